"""Pre-specification: outcome names, time frames, registration timing and the findings."""

from __future__ import annotations

from datetime import date

import pytest

from robtui.core.prespecification import (
    Passage,
    PlannedOutcome,
    Registration,
    ReportedOutcome,
    compare,
    durations,
    outcome_changes,
    registration_timing,
    same_time,
    similarity,
)


@pytest.mark.parametrize(("text", "days"), [
    ("12 weeks", {84}), ("week 12", {84}), ("Week 4", {28}), ("weeks 9 to 12", {63, 84}),
    ("3 months", {91}), ("one year", {365}), ("over 24 weeks", {168}), ("at 8-week", {56}),
    ("twenty-four weeks", {168}), ("end of treatment", set()), ("", set()),
])
def test_durations_in_days(text, days):
    assert durations(text) == frozenset(days)


def test_same_time_within_ten_percent_or_cannot_compare():
    assert same_time("12 weeks", "3 months") is True  # 84 and 91 days
    assert same_time("12 weeks", "week 12") is True
    assert same_time("12 weeks", "24 weeks") is False
    assert same_time("end of treatment", "12 weeks") is None


def test_outcome_names_match_on_their_content_words():
    assert similarity("sleep quality", "Self-rated sleep quality on the Larkspur Sleep Scale") \
        == 100
    assert similarity("Dyspnoea score", "dyspnea score") >= 80
    assert similarity("sleep quality", "daytime sleepiness and sleep duration") < 80
    assert similarity("quality of life", "sleep quality") < 80
    assert similarity("number of exacerbation-free days", "FEV1 at 12 weeks") < 80
    assert similarity("", "anything") == 0


def _reg(registered, enrolled, anticipated=None):
    return Registration("RIT-1", registered, enrolled, anticipated)


def test_registration_timing():
    day = date(2030, 3, 4)
    assert registration_timing(_reg((day, day), (day, day)))[0] == "prospective"  # same day
    later = date(2030, 6, 18)
    timing, text = registration_timing(_reg((later, later), (day, day)))
    assert timing == "retrospective" and "106 days" in text
    month = (date(2030, 3, 1), date(2030, 3, 31))  # enrolment given to the month only
    assert registration_timing(_reg((day, day), month))[0] == "cannot tell"
    assert registration_timing(None)[0] == "no dates"
    assert "anticipated" in registration_timing(_reg((day, day), (later, later), True))[1]


def _p(source, kind, measure, frame="", as_of=None):
    text = f"{kind} {measure}"
    return PlannedOutcome(source, kind, measure, frame, as_of,
                          Passage(source, "0" * 64, 0, len(text), text))


def _r(kind, measure):
    return ReportedOutcome(kind, measure, Passage("report", "1" * 64, 0, len(measure), measure))


def test_consistent_primary_outcome():
    found = compare("knee pain at 12 weeks", "12 weeks", [_r("primary", "knee pain at 12 weeks")],
                    [_p("registry", "primary", "Knee pain", "12 weeks", date(2030, 1, 1)),
                     _p("protocol", "primary", "knee pain on a 0 to 10 scale at 12 weeks")])
    assert found.status == "primary"
    assert [f.topic for f in found.findings] == ["registration", "status"]


def test_switched_added_and_dropped_are_all_surfaced():
    reported = [_r("primary", "exacerbation-free days over 24 weeks"), _r("secondary", "FEV1"),
                _r("secondary", "hospital admissions")]
    planned = [_p("registry", "primary", "FEV1", "12 weeks", date(2028, 2, 7)),
               _p("registry", "secondary", "Exacerbation-free days", "24 weeks", date(2028, 2, 7)),
               _p("registry", "secondary", "Six-minute walk distance", "24 weeks",
                  date(2028, 2, 7))]
    found = compare("exacerbation-free days over 24 weeks", "24 weeks", reported, planned)
    topics = [f.topic for f in found.findings]
    assert found.status == "changed"
    assert topics.count("switched") == 1 and "FEV1" in found.findings[topics.index("switched")].text
    added = [f.text for f in found.findings if f.topic == "added"]
    assert len(added) == 1 and "hospital admissions" in added[0]
    dropped = [f.text for f in found.findings if f.topic == "dropped"]
    assert len(dropped) == 1 and "Six-minute walk distance" in dropped[0]


def test_changed_between_registry_versions_after_enrolment():
    v1, v2 = date(2028, 2, 7), date(2029, 5, 20)
    planned = [_p("registry", "primary", "FEV1", "12 weeks", v1),
               _p("registry", "secondary", "Exacerbation-free days", "24 weeks", v1),
               _p("registry", "secondary", "FEV1", "12 weeks", v2),
               _p("registry", "primary", "Exacerbation-free days", "24 weeks", v2)]
    enrolled = date(2028, 3, 1)
    found = compare("exacerbation-free days", "24 weeks",
                    [_r("primary", "exacerbation-free days")], planned,
                    _reg((v1, v1), (enrolled, enrolled)))
    assert found.status == "changed" and found.timing == "prospective"
    versions = [f.text for f in found.findings if f.text.startswith("The registry record's")]
    assert len(versions) == 1 and "after first enrolment" in versions[0]
    assert "secondary -> primary" in versions[0]


def test_time_point_that_differs_is_a_finding():
    found = compare("pain", "24 weeks", [_r("primary", "pain")],
                    [_p("registry", "primary", "Pain", "12 weeks", date(2030, 1, 1))])
    differs = [f.text for f in found.findings if f.topic == "time point"]
    assert len(differs) == 1 and "'24 weeks'" in differs[0] and "'12 weeks'" in differs[0]


def test_not_pre_specified_and_no_plan():
    found = compare("sick leave days", "8 weeks", [_r("secondary", "sick leave days")],
                    [_p("registry", "primary", "Sleep quality", "8 weeks", date(2030, 1, 1))])
    assert found.status == "not pre-specified"
    assert compare("pain", "", [], []).status == "no plan given"


def test_outcome_changes_between_versions():
    before = [("primary", "FEV1", "12 weeks"), ("secondary", "Walk distance", "24 weeks")]
    after = [("secondary", "FEV1", "12 weeks"), ("primary", "Exacerbations", "24 weeks"),
             ("secondary", "Walk distance", "12 weeks")]
    assert outcome_changes(before, after) == [
        "FEV1: primary -> secondary outcome", "primary outcome added: Exacerbations",
        "Walk distance: time frame 24 weeks -> 12 weeks"]
    assert outcome_changes(after, before)[-1] == "primary outcome removed: Exacerbations"
