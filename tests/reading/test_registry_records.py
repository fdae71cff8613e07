"""Registry records in the registries' export formats (invented records in tests/data/registry
and the demo's sample_reports/registry)."""

from __future__ import annotations

from datetime import date
from pathlib import Path

import pytest

from robtui.errors import ReadingError
from robtui.paths import bundled_dir
from robtui.reading.reader import read_document
from robtui.reading.registry import (
    outcome_history,
    parse_record_date,
    parse_registry_record,
    read_registry_record,
    record_text,
    split_outcome_text,
)

DATA = Path(__file__).resolve().parents[1] / "data" / "registry"
DEMO = bundled_dir("sample_reports") / "registry"


def test_clinicaltrials_gov_json_study():
    r = read_registry_record(DATA / "ctgov-study.json")
    assert (r.source_format, r.registry, r.registration_number) == (
        "ctgov-json", "ClinicalTrials.gov", "NCT99990001")
    assert str(r.registered) == "2031-04-20"
    assert str(r.first_enrolment) == "2031-04" and r.first_enrolment_anticipated is False
    assert str(r.last_update) == "2032-01-09"
    assert [(o.kind, o.measure, o.time_frame) for o in r.outcomes] == [
        ("primary", "Elbow pain on a 0 to 10 scale", "6 weeks"),
        ("secondary", "Grip strength", "6 weeks"),
        ("secondary", "Use of rescue analgesia", "up to 6 weeks"),
    ]
    assert r.outcomes[0].description == "Patient-rated."
    assert len(r.sha256) == 64


def test_a_search_response_holding_one_study_is_read_and_several_are_refused():
    one = (DATA / "ctgov-study.json").read_text(encoding="utf-8")
    assert parse_registry_record(f'{{"studies": [{one}]}}'.encode()).registration_number == \
        "NCT99990001"
    with pytest.raises(ReadingError, match="holds 2 study records"):
        parse_registry_record(f'{{"studies": [{one}, {one}]}}'.encode())


def test_clinicaltrials_gov_classic_xml():
    r = read_registry_record(DATA / "ctgov-classic.xml")
    assert r.registration_number == "NCT99990002"
    assert str(r.registered) == "2031-08-02" and str(r.last_update) == "2031-10-05"
    assert str(r.first_enrolment) == "2031-09" and r.first_enrolment_anticipated is True
    assert [(o.kind, o.measure, o.time_frame) for o in r.outcomes] == [
        ("primary", "Tear break-up time", "Week 4"), ("secondary", "Eye comfort score", "Week 4")]


def test_who_ictrp_export_flat_and_with_main():
    flat = read_registry_record(DATA / "ictrp-flat.xml")
    assert (flat.registry, flat.registration_number) == ("Registry of Invented Trials",
                                                         "RIT-2031-07777")
    assert str(flat.registered) == "2031-11-15"  # 15 can only be the day
    # 02/11/2031 reads as 2 November or, month first, 11 February: both readings are kept
    assert flat.first_enrolment.swappable
    assert (flat.first_enrolment.earliest, flat.first_enrolment.latest) == (
        date(2031, 2, 11), date(2031, 11, 2))
    assert str(flat.first_enrolment) == "2031-11-02 or 2031-02-11 (written 02/11/2031)"
    assert [(o.kind, o.measure, o.time_frame) for o in flat.outcomes] == [
        ("primary", "Days with cold symptoms", "14 days"),
        ("secondary", "Symptom score at 7 days", ""), ("secondary", "Time off work", "")]
    main = read_registry_record(DEMO / "cedar-registry.xml")  # <Trial><Main>...
    assert main.registration_number == "RIT-2030-00955"
    assert str(main.registered) == "2030-06-18" and str(main.first_enrolment) == "2030-01-13"


def test_who_ictrp_feed_in_lower_case_with_outcome_children():
    r = read_registry_record(DATA / "ictrp-feed.xml")
    assert (r.registry, r.registration_number, r.title) == (
        "Registry of Invented Trials", "RIT-2032-00031", "Invented balm for chapped hands")
    assert str(r.registered) == "2032-01-21" and str(r.last_update) == "2032-11-03"
    assert str(r.first_enrolment) == "2032-02-01 or 2032-01-02 (written 01/02/2032)"
    assert r.first_enrolment_anticipated is True
    assert [(o.kind, o.measure, o.time_frame) for o in r.outcomes] == [
        ("primary", "Skin cracking score", "2 weeks"),
        ("secondary", "Itch on a 0 to 10 scale", ""), ("secondary", "Use of other creams", "")]


def test_classic_xml_saved_before_2018_uses_the_retired_date_names():
    r = read_registry_record(DATA / "ctgov-classic-2016.xml")
    assert str(r.registered) == "2016-01-12" and str(r.last_update) == "2016-06-03"
    assert str(r.first_enrolment) == "2016-03" and r.first_enrolment_anticipated is None


def test_swapped_readings_make_registration_timing_uncertain():
    from robtui.core.prespecification import Registration, registration_timing

    registered = parse_record_date("04/03/2030")  # 4 March, or 3 April month first
    enrolled = parse_record_date("2030-03-20")
    timing, text = registration_timing(Registration(
        "RIT-1", (registered.earliest, registered.latest), (enrolled.earliest, enrolled.latest)))
    assert timing == "cannot tell" and "2030-03-04 to 2030-04-03" in text
    unambiguous = parse_record_date("14/03/2030")
    assert not unambiguous.swappable and parse_record_date("05/05/2030").swappable is False


@pytest.mark.parametrize(("text", "expected"), [
    ("2031-03-14", "2031-03-14"), ("2031-03", "2031-03"), ("March 14, 2031", "2031-03-14"),
    ("March 2031", "2031-03"), ("14/03/2031", "2031-03-14"), ("14 March 2031", "2031-03-14"),
    ("2031-03-14T10:20:00", "2031-03-14"), ("20310314", "2031-03-14"), ("2031", "2031"),
    ("Apr  1 2007", "2007-04-01"), ("3 November 2009", "2009-11-03"), ("Unknown", "None"),
])
def test_dates_in_the_registries_formats(text, expected):
    assert str(parse_record_date(text)) == expected


def test_partial_dates_span_their_month():
    d = parse_record_date("February 2032")
    assert (d.earliest, d.latest) == (date(2032, 2, 1), date(2032, 2, 29))
    assert parse_record_date("soon") is None and parse_record_date("  ") is None


def test_free_text_outcomes_are_split_with_their_time_frames():
    assert split_outcome_text("Pain; Time frame: 12 weeks\nFunction; at 24 weeks;Sleep") == [
        ("Pain", "12 weeks"), ("Function", "at 24 weeks"), ("Sleep", "")]
    # the ICTRP export keeps HTML line breaks as text, and carriage returns
    assert split_outcome_text("Pain;\r<br>Sleep<BR />Mood<br/>") == [
        ("Pain", ""), ("Sleep", ""), ("Mood", "")]


@pytest.mark.parametrize(("data", "message"), [
    (b"not a record", "not a registry record"),
    (b"{broken", "not valid JSON"),
    (b'{"protocolSection": {"identificationModule": {}}}', "no identificationModule.nctId"),
    (b'{"something": 1}', "without protocolSection"),
    (b"<html><body/></html>", "is not a registry record"),
    (b"<clinical_study/>", "without id_info/nct_id"),
    (b"<Trials_downloaded_from_ICTRP/>", "holds 0 trials"),
    (b"<a><b></a>", "not well-formed XML"),
    ((b'<?xml version="1.0"?><!DOCTYPE t [<!ENTITY a "aaaa"><!ENTITY b "&a;&a;&a;">]>'
      b"<clinical_study><id_info><nct_id>&b;</nct_id></id_info></clinical_study>"),
     "refused for safety"),
])
def test_bad_records_are_refused_with_the_reason(data, message):
    with pytest.raises(ReadingError, match=message):
        parse_registry_record(data, "x")


def test_history_of_changes_from_two_saved_versions():
    old = read_registry_record(DEMO / "elm-registry-2028.xml")
    new = read_registry_record(DEMO / "elm-registry-2029.xml")
    changes = outcome_history([new, old])  # any order: sorted by last update
    assert {c.what for c in changes} == {
        "Number of exacerbation-free days: secondary -> primary outcome",
        "Forced expiratory volume in one second (FEV1): primary -> secondary outcome"}
    assert {str(c.date) for c in changes} == {"2029-05-20"}
    other = read_registry_record(DATA / "ictrp-flat.xml")
    with pytest.raises(ReadingError, match="different registrations"):
        outcome_history([old, other])


def test_a_record_reads_as_a_quotable_document():
    document = read_document(DEMO / "alder-registry.xml")
    assert document.kind == "registry"
    record = read_registry_record(DEMO / "alder-registry.xml")
    assert document.text == record_text(record)
    line = record.outcomes[0].line(1)
    start = document.text.index(line)
    sentence = document.sentence_at(start)
    assert sentence is not None and line.startswith(sentence.text.rstrip("."))
    assert "Date of first enrolment: 2030-03-04." in document.text
