"""The judgement algorithm on every reachable answer path, against tables written here.

The expected tables below are written independently of signalling_questions/rob2-parallel.toml,
from the published algorithms:
  Sterne JAC, Savović J, Page MJ, et al. RoB 2: a revised tool for assessing risk of bias in
  randomised trials. BMJ 2019;366:l4898 (algorithm figures), and
  Higgins JPT, Savović J, Page MJ, Sterne JAC. RoB 2 full guidance document and template for
  individually randomized parallel-group trials, 22 August 2019 ("Algorithm for suggested
  judgement" of each domain; "Overall risk-of-bias judgement" criteria).
Provenance of each table is given beside it: "looked up" means transcribed from the text of the
template's algorithm figures found with the project's search tool; "from memory" means written
from memory (then compared with a published transcription where one was found).

Notation: a cell is a group of codes ("Y/PY/NI"), ANY5 / ANY6 (every code of a question without
or with NA), or NOT_ASKED. Each row expands to concrete answer paths; the test checks that the
rows cover exactly the paths the question set lets a reviewer reach, each path once, and that
the algorithm gives the row's judgement on every one.
"""

from __future__ import annotations

import io
import itertools
import json

import pytest

from robtui.cli import main
from robtui.core.algorithm import (
    explain_domain,
    final_judgement,
    judge_domain,
    judge_overall,
    may_raise_overall,
    propose_all,
    validate_answers,
)
from robtui.core.question_paths import answer_paths
from robtui.errors import InputError
from robtui.store.question_sets import builtin_question_set

ANY5 = "Y/PY/PN/N/NI"
ANY6 = "NA/Y/PY/PN/N/NI"
NOT_ASKED = "-"
LOW, SOME, HIGH = "low", "some_concerns", "high"


def expand(columns: tuple[str, ...], rows: list[tuple]) -> dict[tuple, str]:
    """Concrete paths (tuples of (qid, code) for asked questions) -> expected judgement."""
    expected: dict[tuple, str] = {}
    for *cells, judgement in rows:
        choices = [
            [None] if cell == NOT_ASKED else cell.split("/") for cell in cells
        ]
        for combo in itertools.product(*choices):
            path = tuple((q, c) for q, c in zip(columns, combo) if c is not None)
            assert path not in expected, f"row overlap at {path}"
            expected[path] = judgement
    return expected


# --- Domain 1: looked up (template, algorithm for the randomisation process) ------------------
D1_COLUMNS = ("1.1", "1.2", "1.3")
D1_ROWS = [
    # 1.1        1.2      1.3
    ("Y/PY/NI", "Y/PY", "N/PN/NI", LOW),
    ("Y/PY/NI", "Y/PY", "Y/PY", SOME),
    ("N/PN", "Y/PY", ANY5, SOME),
    (ANY5, "NI", "N/PN/NI", SOME),
    (ANY5, "NI", "Y/PY", HIGH),
    (ANY5, "N/PN", ANY5, HIGH),
]

# --- Domain 2, effect of assignment: looked up (template, parts 1 and 2 and the criteria) -----
D2A_PART1_COLUMNS = ("2.1", "2.2", "2.3", "2.4", "2.5")
_AWARE = [("Y/PY/NI", ANY5), ("N/PN", "Y/PY/NI")]  # either 2.1 or 2.2 Y/PY/NI
D2A_PART1_ROWS = [("N/PN", "N/PN", NOT_ASKED, NOT_ASKED, NOT_ASKED, LOW)]
for a, b in _AWARE:
    D2A_PART1_ROWS += [
        (a, b, "N/PN", NOT_ASKED, NOT_ASKED, LOW),
        (a, b, "NI", NOT_ASKED, NOT_ASKED, SOME),
        (a, b, "Y/PY", "N/PN", NOT_ASKED, SOME),
        (a, b, "Y/PY", "Y/PY/NI", "Y/PY", SOME),
        (a, b, "Y/PY", "Y/PY/NI", "N/PN/NI", HIGH),
    ]
D2A_PART2_COLUMNS = ("2.6", "2.7")
D2A_PART2_ROWS = [
    ("Y/PY", NOT_ASKED, LOW),
    ("N/PN/NI", "N/PN", SOME),
    ("N/PN/NI", "Y/PY/NI", HIGH),
]
# Criteria for the domain (template): low if low in both parts, high if high in either part,
# otherwise some concerns. Written out as a table rather than computed.
D2A_COMBINED = {
    (LOW, LOW): LOW, (LOW, SOME): SOME, (LOW, HIGH): HIGH,
    (SOME, LOW): SOME, (SOME, SOME): SOME, (SOME, HIGH): HIGH,
    (HIGH, LOW): HIGH, (HIGH, SOME): HIGH, (HIGH, HIGH): HIGH,
}

# --- Domain 2, effect of adhering: looked up (template, algorithm for adhering) ---------------
D2B_COLUMNS = ("2.1", "2.2", "2.3", "2.4", "2.5", "2.6")
_PROBLEM_45 = [("Y/PY/NI", ANY6), ("NA/N/PN", "Y/PY/NI")]  # either 2.4 or 2.5 Y/PY/NI
D2B_ROWS = [("N/PN", "N/PN", NOT_ASKED, "NA/N/PN", "NA/N/PN", NOT_ASKED, LOW)]
for g4, g5 in _PROBLEM_45:
    D2B_ROWS += [
        ("N/PN", "N/PN", NOT_ASKED, g4, g5, "Y/PY", SOME),
        ("N/PN", "N/PN", NOT_ASKED, g4, g5, "N/PN/NI", HIGH),
    ]
for a, b in _AWARE:
    D2B_ROWS += [
        (a, b, "NA/Y/PY", "NA/N/PN", "NA/N/PN", NOT_ASKED, LOW),
        (a, b, "N/PN/NI", ANY6, ANY6, "Y/PY", SOME),
        (a, b, "N/PN/NI", ANY6, ANY6, "N/PN/NI", HIGH),
    ]
    for g4, g5 in _PROBLEM_45:
        D2B_ROWS += [
            (a, b, "NA/Y/PY", g4, g5, "Y/PY", SOME),
            (a, b, "NA/Y/PY", g4, g5, "N/PN/NI", HIGH),
        ]

# --- Domain 3: FROM MEMORY (every row), then found to agree with a published transcription ----
D3_COLUMNS = ("3.1", "3.2", "3.3", "3.4")
D3_ROWS = [
    ("Y/PY", NOT_ASKED, NOT_ASKED, NOT_ASKED, LOW),  # from memory
    ("N/PN/NI", "Y/PY", NOT_ASKED, NOT_ASKED, LOW),  # from memory
    ("N/PN/NI", "N/PN", "N/PN", NOT_ASKED, LOW),  # from memory
    ("N/PN/NI", "N/PN", "Y/PY/NI", "N/PN", SOME),  # from memory
    ("N/PN/NI", "N/PN", "Y/PY/NI", "Y/PY/NI", HIGH),  # from memory
]

# --- Domain 4: looked up (template, algorithm for measurement of the outcome) -----------------
D4_COLUMNS = ("4.1", "4.2", "4.3", "4.4", "4.5")
D4_ROWS = [
    ("Y/PY", ANY5, NOT_ASKED, NOT_ASKED, NOT_ASKED, HIGH),
    ("N/PN/NI", "Y/PY", NOT_ASKED, NOT_ASKED, NOT_ASKED, HIGH),
    ("N/PN/NI", "N/PN", "N/PN", NOT_ASKED, NOT_ASKED, LOW),
    ("N/PN/NI", "N/PN", "Y/PY/NI", "N/PN", NOT_ASKED, LOW),
    ("N/PN/NI", "N/PN", "Y/PY/NI", "Y/PY/NI", "N/PN", SOME),
    ("N/PN/NI", "N/PN", "Y/PY/NI", "Y/PY/NI", "Y/PY/NI", HIGH),
    ("N/PN/NI", "NI", "N/PN", NOT_ASKED, NOT_ASKED, SOME),
    ("N/PN/NI", "NI", "Y/PY/NI", "N/PN", NOT_ASKED, SOME),
    ("N/PN/NI", "NI", "Y/PY/NI", "Y/PY/NI", "N/PN", SOME),
    ("N/PN/NI", "NI", "Y/PY/NI", "Y/PY/NI", "Y/PY/NI", HIGH),
]

# --- Domain 5: looked up (template, algorithm for selection of the reported result) -----------
D5_COLUMNS = ("5.1", "5.2", "5.3")
D5_ROWS = [
    (ANY5, "Y/PY", ANY5, HIGH),
    (ANY5, "N/PN/NI", "Y/PY", HIGH),
    (ANY5, "NI", "N/PN/NI", SOME),
    (ANY5, "N/PN", "NI", SOME),
    ("Y/PY", "N/PN", "N/PN", LOW),
    ("N/PN/NI", "N/PN", "N/PN", SOME),
]


def _d2a_expected() -> dict[tuple, str]:
    part1 = expand(D2A_PART1_COLUMNS, D2A_PART1_ROWS)
    part2 = expand(D2A_PART2_COLUMNS, D2A_PART2_ROWS)
    return {
        p1 + p2: D2A_COMBINED[(j1, j2)]
        for (p1, j1), (p2, j2) in itertools.product(part1.items(), part2.items())
    }


EXPECTED = {
    ("1", "assignment"): lambda: expand(D1_COLUMNS, D1_ROWS),
    ("2", "assignment"): _d2a_expected,
    ("2", "adhering"): lambda: expand(D2B_COLUMNS, D2B_ROWS),
    ("3", "assignment"): lambda: expand(D3_COLUMNS, D3_ROWS),
    ("4", "assignment"): lambda: expand(D4_COLUMNS, D4_ROWS),
    ("5", "assignment"): lambda: expand(D5_COLUMNS, D5_ROWS),
}
# Number of reachable paths per domain, counted by hand from the method's conditions:
PATH_COUNTS = {
    ("1", "assignment"): 125,  # 5**3, all three always asked
    # part 1: 4 (both unaware) + 21 aware pairs * (2 + 1 + 2*2 + 2*3*2 + 2*3*3 = 37) = 781;
    # part 2: 2 + 3*2 + 3*3 = 17; 781 * 17
    ("2", "assignment"): 13277,
    # unaware (4 pairs): 36 answers to 2.4/2.5, 9 of them need no 2.6: 4 * (9 + 27*5) = 576;
    # aware (21 pairs): 2.3 NA/Y/PY 3 * 144 + 2.3 N/PN/NI 3 * 36 * 5 = 972; 576 + 21 * 972
    ("2", "adhering"): 20988,
    ("3", "assignment"): 110,  # 2 + 3*2 + 3*2*2 + 3*2*3*2 + 3*2*3*3
    ("4", "assignment"): 493,  # 2*5 + 3 * (2 + 3 * (2 + 3 * (2 + 3*5)))
    ("5", "assignment"): 125,  # 5**3
}


@pytest.fixture(scope="module")
def qset():
    return builtin_question_set()


@pytest.mark.parametrize("key", list(EXPECTED), ids=lambda k: f"domain{k[0]}-{k[1]}")
def test_every_path_matches_published_algorithm(qset, key):
    domain = qset.domain(*key)
    expected = EXPECTED[key]()
    reachable = {tuple(path.items()): path for path in answer_paths(domain)}
    assert set(reachable) == set(expected), "asked-question conditions differ from the tables"
    assert len(expected) == PATH_COUNTS[key]
    wrong = [
        (path, judge_domain(domain, answers), expected[path])
        for path, answers in reachable.items()
        if judge_domain(domain, answers) != expected[path]
    ]
    assert not wrong, wrong[:5]


@pytest.mark.parametrize("key", list(EXPECTED), ids=lambda k: f"domain{k[0]}-{k[1]}")
def test_every_strict_prefix_of_a_path_is_incomplete(qset, key):
    domain = qset.domain(*key)
    seen = set()
    for path in list(answer_paths(domain))[:3000]:
        items = list(path.items())
        for cut in range(len(items)):
            prefix = tuple(items[:cut])
            if prefix in seen:
                continue
            seen.add(prefix)
            assert judge_domain(domain, dict(prefix)) == "incomplete", prefix


def test_batch_command_agrees_on_every_path(qset, monkeypatch, capsys):
    lines, wanted = [], []
    for (did, effect), make in EXPECTED.items():
        for path, judgement in make().items():
            lines.append(json.dumps(
                {"tool": "rob2", "domain": int(did), "effect": effect, "answers": dict(path)}
            ))
            wanted.append({"judgement": judgement})
    monkeypatch.setattr("sys.stdin", io.StringIO("\n".join(lines) + "\n"))
    assert main(["judge", "--batch"]) == 0
    got = [json.loads(line) for line in capsys.readouterr().out.splitlines()]
    assert len(got) == sum(PATH_COUNTS.values())
    assert got == wanted


def test_answers_to_questions_not_asked_are_ignored_by_judge(qset):
    domain = qset.domain("3")
    assert judge_domain(domain, {"3.1": "Y", "3.2": "N", "3.3": "Y"}) == "low"
    assert validate_answers(domain, {"3.1": "Y", "3.2": "N"}) == [
        (
            "3.2 is answered but not asked: its condition (if N/PN/NI to 3.1) is not met;"
            " leave it out or change the earlier answer"
        )
    ]


def test_unanswered_question_on_path_gives_incomplete_not_a_guess(qset):
    # 1.2=N would give High whatever 1.1 and 1.3 are, but they are still asked.
    assert judge_domain(qset.domain("1"), {"1.2": "N"}) == "incomplete"
    result = explain_domain(qset.domain("1"), {"1.2": "N", "1.1": "Y"})
    assert [q.id for q in result.missing] == ["1.3"]
    assert result.path() == ["1.1=Y", "1.2=N", "1.3=?"]


def test_bad_codes_are_refused(qset):
    domain = qset.domain("3")
    with pytest.raises(InputError, match="NI is not an option"):
        judge_domain(domain, {"3.1": "N", "3.2": "NI"})
    with pytest.raises(InputError, match="unknown answer code 'MAYBE'"):
        judge_domain(domain, {"3.1": "MAYBE"})
    assert validate_answers(domain, {"9.9": "Y"})[0].startswith("unknown question '9.9'")


def test_explanation_names_the_deciding_rows(qset):
    result = explain_domain(
        qset.domain("2"), {"2.1": "Y", "2.2": "Y", "2.3": "NI", "2.6": "N", "2.7": "Y"}
    )
    assert result.judgement == "high"
    assert [p.rule.judgement for p in result.parts] == ["some_concerns", "high"]


# --- overall and the reviewer's options --------------------------------------------------------
# Overall criteria, template "Overall risk-of-bias judgement" (looked up): low if low for all
# domains; some concerns if some concerns in at least one domain and high in none; high if high
# in at least one domain. Incomplete domains make the overall incomplete (robtui's rule: no guess).

def _published_overall(judgements):
    if "incomplete" in judgements:
        return "incomplete"
    if "high" in judgements:
        return "high"
    if "some_concerns" in judgements:
        return "some_concerns"
    return "low"


def test_overall_is_least_favourable_on_every_combination():
    codes = ("low", "some_concerns", "high", "incomplete")
    for combo in itertools.product(codes, repeat=5):
        assert judge_overall(list(combo)) == _published_overall(combo), combo


def test_overall_examples():
    assert judge_overall(["low"] * 5) == "low"
    assert judge_overall(["low", "some_concerns", "low", "low", "low"]) == "some_concerns"
    assert judge_overall(["low", "some_concerns", "high", "low", "low"]) == "high"
    assert judge_overall(["low", "incomplete", "high", "low", "low"]) == "incomplete"


def test_overall_refuses_bad_input():
    with pytest.raises(InputError):
        judge_overall([])
    with pytest.raises(InputError, match="unknown judgement 'medium'"):
        judge_overall(["low", "medium"])


# The guidance: overall may be judged High when some concerns arise in multiple domains in a way
# that substantially lowers confidence in the result (template, overall criteria; looked up).
@pytest.mark.parametrize(
    ("judgements", "may_raise"),
    [
        (["some_concerns", "some_concerns", "low", "low", "low"], True),
        (["some_concerns"] * 5, True),
        (["some_concerns", "low", "low", "low", "low"], False),
        (["low"] * 5, False),
        (["some_concerns", "some_concerns", "high", "low", "low"], False),  # already High
        (["some_concerns", "some_concerns", "incomplete", "low", "low"], False),
    ],
)
def test_may_raise_overall(judgements, may_raise):
    assert may_raise_overall(judgements) is may_raise


def test_final_judgement_prefers_override_and_keeps_codes_valid():
    assert final_judgement("some_concerns") == "some_concerns"
    assert final_judgement("some_concerns", "high") == "high"
    assert final_judgement("incomplete", None) == "incomplete"
    with pytest.raises(InputError):
        final_judgement("some_concerns", "incomplete")  # an override is a real judgement
    with pytest.raises(InputError):
        final_judgement("maybe")


def test_propose_all_uses_the_effect_variant(qset):
    answers = {
        "1.1": "Y", "1.2": "Y", "1.3": "N",
        "2.1": "N", "2.2": "N", "2.4": "N", "2.5": "N", "2.6": "Y",
        "3.1": "Y",
        "4.1": "N", "4.2": "N", "4.3": "N",
        "5.1": "Y", "5.2": "N", "5.3": "N",
    }
    adhering = propose_all(qset, "adhering", answers)
    assert adhering == {"1": "low", "2": "low", "3": "low", "4": "low", "5": "low",
                        "overall": "low"}
    # For assignment, 2.4 and 2.5 are not asked on this path (ignored); 2.6=Y gives low too.
    assert propose_all(qset, "assignment", answers)["2"] == "low"
    answers["5.3"] = "NI"
    assert propose_all(qset, "assignment", answers)["overall"] == "some_concerns"
    del answers["3.1"]
    assert propose_all(qset, "assignment", answers)["overall"] == "incomplete"
