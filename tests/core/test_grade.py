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
    assert "5%" in light.rationale


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
    s = suggest_rob_rating({"a": "low", "b": None, "c": "incomplete"})
    assert s.not_judged == ["b", "c"] and s.judged == ["a"]
    assert s.rating == "not serious"
    assert any("not judged" in n for n in s.notes)


def test_missing_weight_falls_back_to_counting_with_a_note():
    s = suggest_rob_rating({"a": "high", "b": "low"}, {"a": 1.0})
    assert s.basis == "studies" and any("no weight" in n for n in s.notes)


def test_nothing_judged_gives_no_rating():
    s = suggest_rob_rating({"a": None})
    assert s.rating is None
    assert RULE_OF_THUMB in s.to_dict()["rule_of_thumb"]
