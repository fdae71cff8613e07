"""Assessment operations: answering, stale answers kept, overrides with reasons, completion.

Expected judgements below follow the RoB 2 algorithm (Sterne JAC et al., BMJ 2019;366:l4898;
RoB 2 full guidance, Higgins JPT et al. 2019). The paths used are the plainest ones
(all-favourable answers give Low; "no information" on allocation concealment with no
baseline imbalance gives Some concerns; 5.1 answered N with no selection gives Some concerns);
written from memory of those algorithms and checked against the bundled question set's tables.
"""

from __future__ import annotations

import pytest

from robtui.core import assessing
from robtui.core.model import Quote, ResultSpec, Review, Study
from robtui.errors import InputError
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set()
LOW_PATH = {
    "1.1": "Y", "1.2": "Y", "1.3": "N",
    "2.1": "N", "2.2": "N", "2.6": "Y",
    "3.1": "Y",
    "4.1": "N", "4.2": "N", "4.3": "N",
    "5.1": "Y", "5.2": "N", "5.3": "N",
}  # fmt: skip


def review(effect: str = "assignment") -> Review:
    return Review(
        title="Invented",
        studies=[Study(id="S1", label="Study one")],
        results=[ResultSpec(id="r1", outcome="Pain", effect=effect)],
    )


def answered(answers: dict[str, str], effect: str = "assignment"):
    a = assessing.new_assessment(review(effect), "S1", "r1", "ana", QSET)
    for qid, code in answers.items():
        a = assessing.set_response(a, QSET, qid, code)
    return a


def test_new_assessment_is_incomplete_draft_with_effect_from_result():
    a = assessing.new_assessment(review("adhering"), "S1", "r1", "ana", QSET)
    assert a.effect == "adhering" and a.status == "draft"
    assert a.proposed == {k: "incomplete" for k in ("1", "2", "3", "4", "5", "overall")}
    with pytest.raises(InputError, match="no result 'r9'"):
        assessing.new_assessment(review(), "S1", "r9", "ana", QSET)


def test_low_path_gives_low_everywhere_and_input_untouched():
    a = answered(LOW_PATH)
    assert a.proposed == {k: "low" for k in ("1", "2", "3", "4", "5", "overall")}
    assert a.final == a.proposed
    before = a.model_dump()
    b = assessing.set_response(a, QSET, "1.2", "NI")
    assert a.model_dump() == before, "input must not change"
    assert b.proposed["1"] == "some_concerns" and b.proposed["overall"] == "some_concerns"


def test_bad_codes_and_conditions_refused():
    a = answered({"2.1": "N", "2.2": "N"})
    with pytest.raises(InputError, match="unknown response 'X'"):
        assessing.set_response(a, QSET, "1.1", "X")
    with pytest.raises(InputError, match="does not offer 'NA'"):
        assessing.set_response(a, QSET, "1.1", "NA")
    with pytest.raises(InputError, match="unknown question '9.9'"):
        assessing.set_response(a, QSET, "9.9", "Y")
    # 2.3 is asked only if 2.1 or 2.2 is Y/PY/NI
    with pytest.raises(InputError, match="2.3 is not asked"):
        assessing.set_response(a, QSET, "2.3", "Y")


def test_answers_no_longer_asked_are_kept_but_not_used():
    a = answered({**LOW_PATH, "2.1": "Y", "2.3": "Y", "2.4": "Y", "2.5": "N"})
    assert a.proposed["2"] == "high"
    b = assessing.set_response(a, QSET, "2.1", "N")  # 2.3-2.5 no longer asked
    assert b.answers["2.3"].response == "Y", "kept in the record"
    assert "2.3" not in assessing.effective_answers(b, QSET, "2")
    assert assessing.unused_answers(b, QSET) == ["2.3", "2.4", "2.5"]
    assert b.proposed["2"] == "low"
    c = assessing.set_response(b, QSET, "2.1", "Y")  # asked again: the old answers count again
    assert c.proposed["2"] == "high"


def test_effect_switch_keeps_both_variants():
    a = answered(LOW_PATH)
    b = assessing.set_effect(a, QSET, "adhering")
    assert b.effect == "adhering"
    assert "2.6" not in b.answers and b.answers["assignment:2.6"].response == "Y"
    assert b.proposed["2"] == "incomplete"
    b = assessing.set_response(b, QSET, "2.1", "N")
    c = assessing.set_effect(b, QSET, "assignment")
    assert c.answers["2.6"].response == "Y" and c.answers["adhering:2.1"].response == "N"
    assert c.proposed["2"] == "low"
    with pytest.raises(InputError, match="unknown effect"):
        assessing.set_effect(c, QSET, "sideways")


def test_justification_and_quotes():
    a = answered({"1.1": "Y"})
    quote = Quote(document_sha256="b" * 64, start=10, end=30, page=1, text="computer list")
    a = assessing.set_justification(a, QSET, "1.1", "computer-generated list")
    a = assessing.add_quote(a, QSET, "1.1", quote)
    assert assessing.add_quote(a, QSET, "1.1", quote).answers["1.1"].quotes == [quote]
    assert a.answers["1.1"].justification == "computer-generated list"
    b = assessing.remove_quote(a, QSET, "1.1", 0)
    assert b.answers["1.1"].quotes == [] and b.answers["1.1"].response == "Y"
    with pytest.raises(InputError, match="no quote number 2"):
        assessing.remove_quote(a, QSET, "1.1", 1)


def test_override_keeps_proposal_and_needs_reason():
    a = answered(LOW_PATH)
    with pytest.raises(InputError, match="needs a reason"):
        assessing.set_override(a, QSET, "3", "high", "  ")
    with pytest.raises(InputError, match="already Low"):
        assessing.set_override(a, QSET, "3", "low", "why not")
    b = assessing.set_override(a, QSET, "3", "some_concerns", "attrition differs by arm")
    assert b.overrides["3"].proposed == "low"
    assert b.proposed["3"] == "low" and b.final["3"] == "some_concerns"
    # the overall proposal follows the final domain judgements
    assert b.proposed["overall"] == "some_concerns"
    c = assessing.clear_override(b, QSET, "3")
    assert c.final["3"] == "low" and c.overrides == {}


def test_overall_raised_to_high_when_several_domains_have_some_concerns():
    a = answered({**LOW_PATH, "1.2": "NI", "5.1": "N"})
    assert a.final["1"] == a.final["5"] == "some_concerns"
    assert assessing.may_raise_overall(a, QSET)
    b = assessing.set_override(a, QSET, "overall", "high", "two domains with concerns together")
    assert b.proposed["overall"] == "some_concerns" and b.final["overall"] == "high"
    assert b.overrides["overall"].proposed == "some_concerns"
    assert assessing.mark_complete(b, QSET).status == "complete"


def test_overall_cannot_be_lowered_below_worst_domain():
    a = answered({**LOW_PATH, "2.1": "Y", "2.3": "Y", "2.4": "Y", "2.5": "N"})
    with pytest.raises(InputError, match="override that domain instead"):
        assessing.set_override(a, QSET, "overall", "low", "we disagree")


def test_override_of_incomplete_domain_refused():
    a = answered({"1.1": "Y"})
    with pytest.raises(InputError, match="domain 1 is incomplete"):
        assessing.set_override(a, QSET, "1", "high", "reason")


def test_mark_complete_lists_what_is_missing_then_succeeds():
    partial = {k: v for k, v in LOW_PATH.items() if k not in ("1.3", "4.3")}
    a = answered(partial)
    problems = assessing.completion_problems(a, QSET)
    assert problems == ["domain 1: not answered: 1.3", "domain 4: not answered: 4.3"]
    with pytest.raises(InputError, match="cannot mark complete: domain 1: not answered: 1.3"):
        assessing.mark_complete(a, QSET)
    a = assessing.set_response(a, QSET, "1.3", "N")
    a = assessing.set_response(a, QSET, "4.3", "N")
    done = assessing.mark_complete(a, QSET)
    assert done.status == "complete"
    with pytest.raises(InputError, match="reopen it first"):
        assessing.set_response(done, QSET, "1.1", "PY")
    again = assessing.reopen(done)
    assert again.status == "draft"
    assert assessing.set_response(again, QSET, "1.1", "PY").answers["1.1"].response == "PY"


def test_stale_override_must_be_confirmed():
    a = answered(LOW_PATH)
    a = assessing.set_override(a, QSET, "1", "some_concerns", "baseline table odd")
    a = assessing.set_response(a, QSET, "1.2", "N")  # proposal moves from Low to High
    problems = assessing.completion_problems(a, QSET)
    assert any("proposal changed since the override" in p for p in problems)


def test_support_and_direction_per_domain_and_overall():
    set_direction, set_support, qset = assessing.set_direction, assessing.set_support, QSET
    a = assessing.new_assessment(review(), "S1", "r1", "ana", qset)
    a = set_support(a, qset, "1", "  central allocation  ")
    a = set_direction(a, qset, "1", "towards_null")
    a = set_direction(a, qset, "overall", "favours_experimental")
    assert a.support == {"1": "central allocation"}
    assert a.direction == {"1": "towards_null", "overall": "favours_experimental"}
    with pytest.raises(InputError, match="unknown direction of bias"):
        set_direction(a, qset, "1", "upwards")
    with pytest.raises(InputError, match="no domain 'overall' to support"):
        set_support(a, qset, "overall", "x")
    assert set_direction(a, qset, "1", None).direction == {"overall": "favours_experimental"}
    assert set_support(a, qset, "1", " ").support == {}
