"""The bundled RoB 2 question set and the loader's checks.

Question numbers, options and conditions below are checked against the RoB 2 template for
individually randomized parallel-group trials (Higgins JPT, Savović J, Page MJ, Sterne JAC,
22 August 2019; Sterne JAC et al. BMJ 2019;366:l4898), looked up as text with the project's
search tool. Items written from memory are marked so.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from robtui.core import questions as qmod
from robtui.core.algorithm import judge_domain
from robtui.core.model import JUDGEMENTS, RESPONSES
from robtui.core.question_paths import answer_paths, representative_codes
from robtui.errors import DataFileError, InputError
from robtui.store import question_sets
from robtui.store.question_sets import (
    available_question_sets,
    builtin_question_set,
    load_question_set,
)

FIXTURES = Path(__file__).resolve().parents[1] / "data" / "question_sets"
ANY5 = ("Y", "PY", "PN", "N", "NI")


@pytest.fixture(scope="module")
def qset():
    return builtin_question_set()


def test_codes_agree_with_the_data_model():
    assert qmod.RESPONSE_CODES == RESPONSES
    assert qmod.JUDGEMENT_CODES == JUDGEMENTS


def test_bundled_set_is_listed_and_described(qset):
    assert "rob2-parallel" in available_question_sets()
    assert qset.id == "rob2-parallel"
    assert qset.domain_ids() == ["1", "2", "3", "4", "5"]
    assert qset.effects() == ["assignment", "adhering"]
    assert "l4898" in qset.source and "2019" in qset.source
    assert qset.licence


# Published question numbers per domain (template, looked up).
@pytest.mark.parametrize(
    ("domain_id", "effect", "ids"),
    [
        ("1", "assignment", ["1.1", "1.2", "1.3"]),
        ("2", "assignment", ["2.1", "2.2", "2.3", "2.4", "2.5", "2.6", "2.7"]),
        ("2", "adhering", ["2.1", "2.2", "2.3", "2.4", "2.5", "2.6"]),
        ("3", "assignment", ["3.1", "3.2", "3.3", "3.4"]),
        ("4", "assignment", ["4.1", "4.2", "4.3", "4.4", "4.5"]),
        ("5", "assignment", ["5.1", "5.2", "5.3"]),
    ],
)
def test_question_numbers(qset, domain_id, effect, ids):
    assert qset.domain(domain_id, effect).question_ids() == ids


# Published domain names (BMJ 2019;366:l4898, table of domains; looked up).
def test_domain_names(qset):
    names = [qset.domain(d).name for d in qset.domain_ids()]
    assert names == [
        "Bias arising from the randomisation process",
        "Bias due to deviations from intended interventions",
        "Bias due to missing outcome data",
        "Bias in measurement of the outcome",
        "Bias in selection of the reported result",
    ]
    assert qset.domain("2", "adhering").name == names[1]
    assert qset.domain("1", "adhering") is qset.domain("1", "assignment")


# Response options (template, looked up): 3.2 has no NI; the three "[If applicable:]"
# questions of the adhering variant (2.3, 2.4, 2.5) also offer NA; every other question
# offers Y/PY/PN/N/NI.
def test_response_options(qset):
    special = {("3.2", e): ("Y", "PY", "PN", "N") for e in ("assignment", "adhering")}
    for q in ("2.3", "2.4", "2.5"):
        special[(q, "adhering")] = ("NA", *ANY5)
    for effect in ("assignment", "adhering"):
        for q in qset.questions(effect):
            want = special.get((q.id, effect), ANY5)
            assert set(q.options) == set(want), (q.id, effect)
            assert q.if_applicable == ("NA" in want), (q.id, effect)


# Conditions (template wording "If Y/PY/NI to 2.1 or 2.2:" etc.; looked up). Checked by
# behaviour: which questions are asked for given earlier answers.
@pytest.mark.parametrize(
    ("domain_id", "effect", "answers", "asked"),
    [
        ("2", "assignment", {"2.1": "N", "2.2": "PN"}, ["2.1", "2.2", "2.6"]),
        ("2", "assignment", {"2.1": "N", "2.2": "NI"}, ["2.1", "2.2", "2.3", "2.6"]),
        ("2", "assignment", {"2.1": "Y", "2.2": "N", "2.3": "PY"},
         ["2.1", "2.2", "2.3", "2.4", "2.6"]),
        ("2", "assignment", {"2.1": "Y", "2.2": "N", "2.3": "Y", "2.4": "NI", "2.6": "NI"},
         ["2.1", "2.2", "2.3", "2.4", "2.5", "2.6", "2.7"]),
        ("2", "adhering", {"2.1": "N", "2.2": "N", "2.4": "NA", "2.5": "N"},
         ["2.1", "2.2", "2.4", "2.5"]),
        ("2", "adhering", {"2.1": "N", "2.2": "N", "2.4": "NA", "2.5": "NI"},
         ["2.1", "2.2", "2.4", "2.5", "2.6"]),
        ("2", "adhering", {"2.1": "PY", "2.2": "N", "2.3": "PN", "2.4": "N", "2.5": "N"},
         ["2.1", "2.2", "2.3", "2.4", "2.5", "2.6"]),
        ("3", "assignment", {"3.1": "Y"}, ["3.1"]),
        ("3", "assignment", {"3.1": "NI", "3.2": "N", "3.3": "NI"},
         ["3.1", "3.2", "3.3", "3.4"]),
        ("4", "assignment", {"4.1": "PY", "4.2": "N"}, ["4.1", "4.2"]),
        ("4", "assignment", {"4.1": "NI", "4.2": "NI", "4.3": "N"}, ["4.1", "4.2", "4.3"]),
        ("4", "assignment", {"4.1": "N", "4.2": "N", "4.3": "NI", "4.4": "PY"},
         ["4.1", "4.2", "4.3", "4.4", "4.5"]),
        ("5", "assignment", {}, ["5.1", "5.2", "5.3"]),
    ],
)
def test_conditions(qset, domain_id, effect, answers, asked):
    from robtui.core.algorithm import asked_questions

    got = asked_questions(qset.domain(domain_id, effect), answers)
    assert [q.id for q in got] == asked


def test_every_question_has_wording_label_guidance_and_condition_text(qset):
    for effect in ("assignment", "adhering"):
        for q in qset.questions(effect):
            assert q.text.endswith("?") and q.short and q.guidance
            assert (q.asked_if is None) or q.condition_text.startswith(("If", "[If"))


def test_published_wording_samples(qset):
    # Verbatim from the template (looked up).
    assert qset.question("1.2").text == (
        "Was the allocation sequence concealed until participants were enrolled and assigned "
        "to interventions?"
    )
    assert qset.question("2.5", "adhering").text == (
        "Was there non-adherence to the assigned intervention regimen that could have "
        "affected participants' outcomes?"
    )
    assert qset.question("3.2").text == (
        "Is there evidence that the result was not biased by missing outcome data?"
    )


def test_representatives_cover_the_same_judgements(qset):
    # The loader proves totality on one code per indistinguishable group; the full walk and
    # the representative walk must give the same set of judgements per domain.
    for domain in qset.domains:
        full = {judge_domain(domain, p) for p in answer_paths(domain)}
        reps = {judge_domain(domain, p) for p in answer_paths(domain, representatives=True)}
        assert full == reps
        assert all(len(codes) >= 2 for codes in representative_codes(domain).values())


def test_lookups_refuse_unknown_ids(qset):
    with pytest.raises(InputError, match="no domain '7'"):
        qset.domain("7")
    with pytest.raises(InputError, match="no question '2.7'"):
        qset.question("2.7", "adhering")
    with pytest.raises(InputError, match="no bundled question set named 'nope'"):
        builtin_question_set("nope")


def test_valid_minimal_file_loads_and_judges():
    # A new variant is a new file: the same code loads and judges it.
    mini = load_question_set(FIXTURES / "valid-minimal.toml")
    d = mini.domain("1")
    assert judge_domain(d, {"1.1": "Y", "1.2": "Y"}) == "high"
    assert judge_domain(d, {"1.1": "N"}) == "low"
    assert judge_domain(d, {"1.1": "Y"}) == "incomplete"


@pytest.mark.parametrize(
    ("fixture", "entry", "problem"),
    [
        ("bad-toml.toml", "", "not valid TOML"),
        ("bad-option-code.toml", "domain 1, question 1.2, options", "'MAYBE' is not a response code"),
        ("duplicate-question.toml", "domain 1, question 1.1", "used twice"),
        ("condition-later-question.toml", "domain 1, question 1.1, asked_if",
         "not an earlier question"),
        ("condition-bad-code.toml", "domain 1, question 1.2, asked_if",
         "'PY' is not an option of question 1.1"),
        ("condition-without-text.toml", "domain 1, question 1.2, condition_text", "is needed"),
        ("rule-unknown-question.toml", "domain 1, table 1, row 4, when",
         "'1.9', which is not a question"),
        ("rule-bad-code.toml", "domain 1, table 1, row 4, when", "'NI' is not an option"),
        ("rule-bad-judgement.toml", "domain 1, table 1, row 3, then", "'severe' is not a judgement"),
        ("not-total.toml", "domain 1, table 1", "no row matches the answers 1.1=Y, 1.2=N"),
        ("dead-row.toml", "domain 1, table 1, row 5", "can never apply"),
        ("unreachable-question.toml", "domain 1, question 1.2", "is never asked"),
        ("na-without-if-applicable.toml", "domain 1, question 1.2, options", "NA must be offered"),
        ("missing-set.toml", "[set]", "needs a [set] table"),
        ("unknown-key.toml", "domain 1, question 1.1", "unknown key 'guidence'"),
        ("no-rule-table.toml", "domain 1, table", "no rule table"),
        ("duplicate-variant.toml", "domain 1", "each variant needs an effect"),
    ],
)
def test_malformed_files_name_file_entry_and_problem(fixture, entry, problem):
    path = FIXTURES / fixture
    with pytest.raises(DataFileError) as caught:
        load_question_set(path)
    message = str(caught.value)
    assert message.startswith(f"{path}: {entry}"), message
    assert problem in message, message
    assert "\n" not in message


def test_missing_and_non_utf8_files(tmp_path):
    with pytest.raises(DataFileError, match="cannot read"):
        load_question_set(tmp_path / "absent.toml")
    bad = tmp_path / "latin1.toml"
    bad.write_bytes('[set]\ntitle = "caf\xe9"\n'.encode("latin-1"))
    with pytest.raises(DataFileError, match="not UTF-8"):
        load_question_set(bad)


def test_bundled_file_round_trip_from_a_copy(tmp_path):
    # The loader reads any path the caller gives; the copy behaves like the bundled set.
    src = Path(question_sets._bundled_folder()) / "rob2-parallel.toml"
    copy = tmp_path / "copy.toml"
    shutil.copy(src, copy)
    assert load_question_set(copy) == builtin_question_set()


def test_domain_labels_follow_the_effect_and_pool_the_variants():
    qset = builtin_question_set()
    assert qset.domain_label("2", "assignment") == "D2 Deviations (assignment)"
    assert qset.domain_label("2", "adhering") == "D2 Deviations (adhering)"
    assert qset.domain_label("2") == "D2 Deviations"  # pooled over both effects
    assert qset.domain_label("1") == "D1 Randomisation"
