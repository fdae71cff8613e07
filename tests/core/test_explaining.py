"""A judgement explained in words, and judgements the answers already decide.

Expected judgements are those of the published RoB 2 algorithms (Sterne JAC et al. BMJ
2019;366:l4898; RoB 2 full guidance, 22 August 2019), as encoded in
signalling_questions/rob2-parallel.toml and checked path by path in test_algorithm.py.
"""

from __future__ import annotations

import pytest

from robtui.core import algorithm
from robtui.core.explaining import (
    _completions,
    determined_judgement,
    determined_overall,
    explain_in_words,
    explain_overall,
)
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set()


def test_a_complete_domain_is_explained_by_the_answers_its_rule_looked_at():
    words = explain_in_words(QSET.domain("1"), {"1.1": "Y", "1.2": "N", "1.3": "N"})
    assert words.judgement == "high" and not words.early
    assert words.lines() == ["1.2 answered N: allocation was not concealed → High"]


def test_domain_4_with_4_1_yes_is_high_whatever_4_2_says():
    words = explain_in_words(QSET.domain("4"), {"4.1": "Y"})
    assert words.judgement == algorithm.INCOMPLETE  # the algorithm still asks 4.2
    assert words.determined == "high" and words.early
    assert [q.id for q in words.missing] == ["4.2"]
    assert words.lines()[0] == "4.1 answered Y: inappropriate method of measuring the outcome → High"
    assert words.lines()[1] == "High whatever the answers to 4.2"


def test_an_open_judgement_says_how_many_questions_are_left():
    words = explain_in_words(QSET.domain("1"), {"1.2": "NI"})
    assert words.determined is None
    assert words.lines() == ["2 questions still to answer before a judgement: 1.1, 1.3"]


@pytest.mark.parametrize("effect", ["assignment", "adhering"])
@pytest.mark.parametrize("domain_id", ["1", "2", "3", "4", "5"])
def test_an_early_judgement_is_what_every_way_of_finishing_gives(domain_id, effect):
    """Check the shortcut against brute force: for every prefix of every complete path, the
    early judgement (when given) equals the algorithm's judgement on every completion."""
    domain = QSET.domain(domain_id, effect)
    prefixes = set()
    for complete in _completions(domain, {}):
        items = list(complete.items())
        prefixes.update(tuple(items[:k]) for k in range(len(items)))
    checked = early = 0
    for prefix in sorted(prefixes)[:: max(1, len(prefixes) // 400)]:
        answers = dict(prefix)
        finals = {
            algorithm.judge_domain(domain, c) for c in _completions(domain, dict(answers))
        }
        got = determined_judgement(domain, answers)
        assert got == (next(iter(finals)) if len(finals) == 1 else None), answers
        checked += 1
        early += got is not None
    assert checked > 20


def test_the_overall_in_words():
    assert explain_overall({"1": "low", "2": "some_concerns", "3": "low"}) == [
        "least favourable domain: domain 2 Some concerns → overall Some concerns"
    ]
    assert explain_overall({"1": "high", "2": "incomplete"}) == [
        "domain 1 High → overall High whatever the other domains"
    ]
    assert explain_overall({"1": "low", "2": "incomplete"}) == [
        "overall not judged yet: domain 2 still open"
    ]
    assert determined_overall(["low", "incomplete", "high"]) == "high"
    assert determined_overall(["low", "incomplete"]) is None
