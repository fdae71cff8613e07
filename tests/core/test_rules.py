"""Answering rules (pure): conditions, which rules apply, validation, versions, stale lists."""

from dataclasses import dataclass

import pytest

from robtui.core.model import Assessment, ResultSpec
from robtui.core.rules import (
    RuleBook,
    add_rule,
    changes_between,
    conditions_from_result,
    parse_condition,
    retire_rule,
    rule_applies,
    rules_beside_question,
    rules_for,
    stale_assessments,
    stamp_rules_version,
    validate_rulebook,
)


@dataclass(frozen=True)
class FakeQuestion:
    id: str
    domain: str
    text: str
    options: tuple[str, ...] = ("Y", "PY", "PN", "N", "NI")


class FakeQuestionSet:
    """Two domains; question 2.6 exists only for the effect of assignment."""

    id = "rob2-parallel"
    version = "1"

    def effects(self):
        return ["assignment", "adhering"]

    def questions(self, effect="assignment"):
        qs = [FakeQuestion("1.1", "1", "Random?"), FakeQuestion("4.4", "4", "Assessors aware?")]
        qs.append(FakeQuestion("2.1", "2", "Participants aware?"))
        if effect == "assignment":
            qs.append(FakeQuestion("2.6", "2", "Appropriate analysis?"))
        qs.append(FakeQuestion("4.5", "4", "Influenced?", ("Y", "PY", "PN", "N", "NI", "NA")))
        return qs


QSET = FakeQuestionSet()
MORTALITY = ResultSpec(
    id="mort",
    outcome="All-cause mortality",
    time_point="12 months",
    outcome_type="objective",
    self_reported=False,
)
PAIN = ResultSpec(id="pain", outcome="Pain score", outcome_type="subjective", self_reported=True)
UNKNOWN = ResultSpec(id="fev", outcome="Lung function")


def _book_with_rules():
    book = RuleBook()
    book = add_rule(
        book, "4.4", "Objective counts: answer N.", when=[("outcome_type", "objective")], answer="N"
    )
    book = add_rule(
        book,
        "4.4",
        "Self-reported pain: assessors are the participants.",
        when=[("self_reported", "yes")],
    )
    book = add_rule(book, "1.1", "A bare 'randomised' is NI.")
    return book


def test_conditions_parse_and_normalise():
    assert parse_condition("outcome_type=Objective") == ("outcome_type", "objective")
    assert parse_condition("self_reported=no") == ("self_reported", "false")
    assert parse_condition("time_point= 12 months ") == ("time_point", "12 months")
    for bad, word in [
        ("outcome_kind=objective", "unknown attribute"),
        ("outcome_type", "attribute=value"),
        ("outcome_type=hard", "objective, subjective"),
        ("self_reported=maybe", "true or false"),
    ]:
        with pytest.raises(ValueError, match=word):
            parse_condition(bad)


def test_rules_for_follows_result_attributes():
    book = _book_with_rules()
    assert [r.id for r in rules_for(book, "4.4", MORTALITY)] == ["R1"]
    assert [r.id for r in rules_for(book, "4.4", PAIN)] == ["R2"]
    # unknown outcome type: a rule conditioned on it is not shown
    assert rules_for(book, "4.4", UNKNOWN) == []
    # unconditioned rule applies everywhere
    assert [r.id for r in rules_for(book, "1.1", UNKNOWN)] == ["R3"]
    assert rules_for(None, "1.1", UNKNOWN) == []


def test_lines_beside_the_question():
    book = _book_with_rules()
    assert rules_beside_question(book, None, "4.4", MORTALITY) == [
        "R1 (rules v3, when outcome_type=objective) N: Objective counts: answer N."
    ]
    assert rules_beside_question(book, None, "4.5", MORTALITY) == []
    why = "answering rules unavailable: rules.toml: not valid TOML"
    assert rules_beside_question(None, why, "4.4", MORTALITY) == [why]


def test_free_text_attributes_compare_case_and_space_insensitively():
    book = add_rule(
        RuleBook(),
        "4.4",
        "x",
        when=[("outcome", "all-cause  MORTALITY"), ("time_point", "12 months")],
    )
    assert rule_applies(book.rules[0], MORTALITY)
    assert not rule_applies(book.rules[0], PAIN)


def test_effect_condition_uses_the_assessment_effect():
    book = add_rule(RuleBook(), "2.1", "x", when=[("effect", "adhering")])
    assert rules_for(book, "2.1", MORTALITY) == []
    assert len(rules_for(book, "2.1", MORTALITY, effect="adhering")) == 1


def test_conditions_prefilled_from_result():
    assert conditions_from_result(MORTALITY) == (
        ("outcome_type", "objective"),
        ("self_reported", "false"),
    )
    assert conditions_from_result(UNKNOWN) == ()
    assert conditions_from_result(MORTALITY, "adhering", question_id="2.1")[0] == (
        "effect",
        "adhering",
    )


def test_versions_go_up_and_history_reconstructs():
    book = _book_with_rules()
    assert book.version == 3 and [r.added_in for r in book.rules] == [1, 2, 3]
    retired = retire_rule(book, "R1")
    assert retired.version == 4 and [r.id for r in retired.active()] == ["R2", "R3"]
    assert [r.id for r in retired.active(1)] == ["R1"]  # older version still readable
    change = changes_between(retired, 1)
    assert [r.id for r in change.added] == ["R2", "R3"] and [r.id for r in change.retired] == ["R1"]
    # ids are never reused after withdrawal
    assert add_rule(retired, "1.1", "again").rules[-1].id == "R4"
    with pytest.raises(ValueError, match="already withdrawn"):
        retire_rule(retired, "R1")
    with pytest.raises(ValueError, match="no rule R9"):
        retire_rule(retired, "R9")
    with pytest.raises(ValueError, match="needs a text"):
        add_rule(book, "1.1", "   ")


def test_validation_names_entry_and_problem():
    book = add_rule(_book_with_rules(), "4.9", "no such question")
    book = add_rule(book, "2.6", "only for assignment", when=[("effect", "adhering")])
    book = add_rule(book, "1.1", "NA is not an option of 1.1", answer="NA")
    problems = [str(p) for p in validate_rulebook(book, QSET)]
    assert len(problems) == 3
    assert "rule R4 (entry 4): unknown question id '4.9'" in problems[0]
    assert (
        "rule R5 (entry 5)" in problems[1] and "not asked for the effect of adhering" in problems[1]
    )
    assert "rule R6 (entry 6)" in problems[2] and "'NA' is not an option" in problems[2]
    assert validate_rulebook(_book_with_rules(), QSET) == []


def test_rules_for_another_question_set_version_are_refused():
    book = RuleBook(question_set="rob2-parallel", question_set_version="0.9")
    [problem] = validate_rulebook(book, QSET)
    assert problem.entry == "file"
    assert "version 0.9" in problem.message and "version 1" in problem.message


def test_stamp_and_stale_listing():
    book = _book_with_rules()
    a = Assessment(reviewer="ana", study_id="S1", result_id="mort")
    stamped = stamp_rules_version(a, book)
    assert stamped.rules_version == 3 and a.rules_version is None  # input untouched
    assert stamp_rules_version(a, None).rules_version is None
    old = a.model_copy(update={"rules_version": 1})
    pain = Assessment(reviewer="ben", study_id="S1", result_id="pain", rules_version=1)
    unknown = Assessment(reviewer="ben", study_id="S2", result_id="mort")
    stale = stale_assessments(
        [stamped, old, pain, unknown], book, {"mort": MORTALITY, "pain": PAIN}
    )
    assert [(s.assessment.reviewer, s.assessment.study_id, s.made_under) for s in stale] == [
        ("ana", "S1", 1),
        ("ben", "S1", 1),
        ("ben", "S2", None),
    ]
    # new rules since v1 that apply: for pain R2 (self-reported) and R3; for mortality only R3
    assert [r.id for r in stale[0].new_rules] == ["R3"]
    assert [r.id for r in stale[1].new_rules] == ["R2", "R3"]
    assert [r.id for r in stale[2].new_rules] == ["R1", "R3"]
    assert stale_assessments([a], RuleBook(), {}) == []  # no rules ever written: nothing stale
