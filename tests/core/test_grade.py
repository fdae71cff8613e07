"""GRADE helper: our rule of thumb applied to shares of weight or of studies."""

import pytest

from robtui.core.grade import RULE_OF_THUMB, suggest_rob_rating


def test_all_low_is_not_serious():
    s = suggest_rob_rating({"a": "low", "b": "low", "c": "low"})
    assert s.rating == "not serious" and s.basis == "studies"
    assert s.share_low == pytest.approx(1.0)
    assert "suggestion" in s.label.lower() and "own rule of thumb" in s.rule_of_thumb.lower()


def test_weight_changes_the_rating():
    overall = {"big": "high", "small1": "low", "small2": "low"}
    by_count = suggest_rob_rating(overall)
    assert by_count.share_high == pytest.approx(1 / 3)
    assert by_count.rating == "serious"
    by_weight = suggest_rob_rating(overall, {"big": 80, "small1": 10, "small2": 10})
    assert by_weight.basis == "weight" and by_weight.share_high == pytest.approx(0.8)
    assert by_weight.rating == "very serious"
    light = suggest_rob_rating(overall, {"big": 5, "small1": 50, "small2": 45})
    assert light.rating == "not serious"
    assert "5.0%" in light.rationale


def test_some_concerns_majority_is_serious():
    s = suggest_rob_rating({"a": "some_concerns", "b": "some_concerns", "c": "low"})
    assert s.rating == "serious" and ">= 50%" in s.rationale


def test_thresholds_are_inclusive():
    # exactly 20% high -> serious; exactly 50% high -> very serious
    assert suggest_rob_rating({"a": "high", **{f"l{i}": "low" for i in range(4)}}).rating == (
        "serious"
    )
    assert suggest_rob_rating({"a": "high", "b": "low"}).rating == "very serious"


def test_not_judged_studies_are_listed_and_left_out():
    s = suggest_rob_rating({"a": "low", "d": "low", "b": None, "c": "incomplete"})
    assert s.not_judged == ["b", "c"] and s.judged == ["a", "d"]
    assert s.rating == "not serious" and s.rationale.startswith("2 judged studies;")
    assert any("not judged" in n for n in s.notes)


def test_no_suggestion_while_most_of_the_weight_is_not_judged():
    # one study judged holding 11% of the weight: no firm rating from it
    weights = {"a": 11.0, "b": 45.0, "c": 44.0}
    s = suggest_rob_rating({"a": "high", "b": None, "c": None}, weights)
    assert s.rating is None
    assert "Only 11.0% of the weight is judged (1 judged study of 3)" in s.rationale
    # by counting studies when no weights: 1 of 3 judged is not enough either
    assert suggest_rob_rating({"a": "high", "b": None, "c": None}).rating is None
    assert suggest_rob_rating({"a": "high", "b": "low", "c": None}).rating == "very serious"


def test_shown_shares_never_contradict_the_rule():
    # 19.6% at high risk is below the 20% threshold: shown as 19.6%, not rounded to 20%
    weights = {"h": 19.6, "l": 80.4}
    s = suggest_rob_rating({"h": "high", "l": "low"}, weights)
    assert s.rating == "not serious"
    assert "19.6% of the weight is at high risk (< 20%)" in s.rationale
    assert "20%" not in s.rationale.replace("(< 20%)", "")
    s = suggest_rob_rating({"h": "high", "l": "low"}, {"h": 19.96, "l": 80.04})
    assert s.rating == "not serious" and "19.9%" in s.rationale


def test_missing_weight_falls_back_to_counting_with_a_note():
    s = suggest_rob_rating({"a": "high", "b": "low"}, {"a": 1.0})
    assert s.basis == "studies" and any("no weight" in n for n in s.notes)


def test_nothing_judged_gives_no_rating():
    s = suggest_rob_rating({"a": None})
    assert s.rating is None
    assert RULE_OF_THUMB in s.to_dict()["rule_of_thumb"]
