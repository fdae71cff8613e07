"""The review folder on disk: round trips, atomic writes, bad files reported and never replaced."""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest

from robtui import files as atomic
from robtui.core.model import (
    Answer,
    Assessment,
    Consensus,
    Decision,
    DismissedSuggestion,
    Override,
    Quote,
    ResultSpec,
)
from robtui.errors import DataFileError, InputError, NewerSchemaError
from robtui.store.review_folder import ReviewFolder

SHA = "a" * 64


@pytest.fixture
def folder(tmp_path: Path) -> ReviewFolder:
    report = tmp_path / "report one.txt"
    report.write_text("Participants were randomised by a computer list.\n", encoding="utf-8")
    f = ReviewFolder.create(
        tmp_path / "rev", "Invented review", lead="lee", reviewers=["ana", "ben"]
    )
    f.add_study("S1", "Invented trial 2021", [report])
    f.add_result(
        ResultSpec(
            id="pain12",
            outcome="Pain score",
            time_point="12 weeks",
            effect="adhering",
            outcome_type="subjective",
            self_reported=True,
            weights={"S1": 12.5},
        )
    )
    return f


def full_assessment() -> Assessment:
    quote = Quote(document_sha256=SHA, start=3, end=20, page=2, text="randomised by a c")
    return Assessment(
        reviewer="ana",
        study_id="S1",
        result_id="pain12",
        effect="adhering",
        answers={
            "1.10": Answer(response="N"),  # natural order check: written after 1.2
            "1.2": Answer(response="PY", justification="list kept by pharmacy", quotes=[quote]),
            "1.1": Answer(response="Y"),
        },
        proposed={"overall": "some_concerns", "1": "low"},
        overrides={
            "overall": Override(
                judgement="high", reason="several domains", proposed="some_concerns"
            )
        },
        final={"1": "low", "overall": "high"},
        rules_version=3,
        dismissed=[DismissedSuggestion(question_id="1.1", document_sha256=SHA, start=0, end=4)],
        last_question="1.2",
    )


def test_create_makes_layout_and_refuses_second_create(folder: ReviewFolder):
    for name in ("review.toml", "reports", "assessments", "consensus", "exports"):
        assert (folder.root / name).exists(), name
    with pytest.raises(InputError, match="already holds a review"):
        ReviewFolder.create(folder.root, "Again")


def test_review_round_trip_and_report_copied(folder: ReviewFolder):
    again = ReviewFolder.open(folder.root)
    assert again.review == folder.review
    report = again.review.study("S1").reports[0]
    assert report.path == "S1/report one.txt"
    assert again.report_path(report).read_text(encoding="utf-8").startswith("Participants")
    assert again.check_report(report) is None
    assert again.review.result("pain12").weights == {"S1": 12.5}


def test_assessment_round_trip_is_stable(folder: ReviewFolder):
    from robtui.core.assessing import recompute
    from robtui.store.question_sets import builtin_question_set

    # Judgements as the algorithm gives them: a load derives them from the answers again.
    a = recompute(full_assessment(), builtin_question_set("rob2-parallel"))
    path = folder.save_assessment(a)
    assert path == folder.root / "assessments" / "ana" / "S1--pain12.json"
    first = path.read_bytes()
    loaded = folder.load_assessment("ana", "S1", "pain12")
    assert loaded == a
    folder.save_assessment(loaded)
    assert path.read_bytes() == first, "same record must give the same bytes"
    text = first.decode("utf-8")
    assert text.endswith("}\n")
    data = json.loads(text)
    assert list(data) == list(Assessment.model_fields)
    assert list(data["answers"]) == ["1.1", "1.2", "1.10"]
    assert list(data["proposed"]) == ["1", "2", "3", "4", "5", "overall"]


def test_consensus_round_trip(folder: ReviewFolder):
    c = Consensus(
        study_id="S1",
        result_id="pain12",
        reviewers=("ana", "ben"),
        lead="lee",
        answers={"1.1": Answer(response="Y")},
        decisions={"1.1": Decision(question_id="1.1", source="agreed", response="Y")},
    )
    path = folder.save_consensus(c)
    assert path == folder.root / "consensus" / "S1--pain12.json"
    from robtui.core.consensus import recompute_consensus
    from robtui.store.question_sets import builtin_question_set

    derived = recompute_consensus(c, builtin_question_set("rob2-parallel")).model_copy(
        update={"updated": c.updated}
    )
    assert folder.load_consensus("S1", "pain12") == derived, "judgements from the answers"
    records, problems = folder.consensus_records()
    assert records == [derived] and problems == []


def test_missing_assessment_is_none_and_listing(folder: ReviewFolder):
    assert folder.load_assessment("ben", "S1", "pain12") is None
    folder.save_assessment(full_assessment())
    found, problems = folder.assessments()
    assert [a.reviewer for a in found] == ["ana"] and problems == []
    assert folder.reviewers_on_disk() == ["ana"]


def test_save_refuses_unknown_study_or_result(folder: ReviewFolder):
    a = full_assessment().model_copy(update={"study_id": "S9"})
    with pytest.raises(InputError, match="no study 'S9'"):
        folder.save_assessment(a)


def test_failed_write_leaves_old_file(folder: ReviewFolder, monkeypatch):
    a = full_assessment()
    path = folder.save_assessment(a)
    before = path.read_bytes()

    def broken_replace(src, dst):
        raise OSError("disk gone")

    monkeypatch.setattr(atomic.os, "replace", broken_replace)
    changed = a.model_copy(update={"last_question": "1.1"})
    with pytest.raises(OSError, match="disk gone"):
        folder.save_assessment(changed)
    assert path.read_bytes() == before
    leftovers = [p.name for p in path.parent.iterdir() if p.name != path.name]
    assert leftovers == [], "the temporary file must be cleaned up"


@pytest.mark.parametrize(
    "broken, problem",
    [
        ("{ not json", "not valid JSON"),
        ('{"schema_version": 1, "reviewer": "ana"}', "study_id"),
        ('{"reviewer": "ana"}', "schema_version is missing"),
        ("[1, 2]", "expected a table"),
    ],
)
def test_corrupt_assessment_reported_and_never_overwritten(folder, broken, problem):
    path = folder.assessment_path("ana", "S1", "pain12")
    path.parent.mkdir(parents=True)
    path.write_text(broken, encoding="utf-8")
    with pytest.raises(DataFileError, match=problem) as info:
        folder.load_assessment("ana", "S1", "pain12")
    assert str(path) in str(info.value)
    with pytest.raises(DataFileError, match="not saved"):
        folder.save_assessment(full_assessment())
    assert path.read_text(encoding="utf-8") == broken
    found, problems = folder.assessments()
    assert found == [] and len(problems) == 1 and str(path) in problems[0]


def test_newer_schema_refused(folder: ReviewFolder):
    path = folder.save_assessment(full_assessment())
    data = json.loads(path.read_text(encoding="utf-8"))
    data["schema_version"] = 99
    path.write_text(json.dumps(data), encoding="utf-8")
    with pytest.raises(NewerSchemaError, match=r"schema 99, this one reads up to 1\): upgrade"):
        folder.load_assessment("ana", "S1", "pain12")
    with pytest.raises(NewerSchemaError):
        folder.save_assessment(full_assessment())
    assert json.loads(path.read_text(encoding="utf-8"))["schema_version"] == 99


def test_newer_or_broken_review_toml(folder: ReviewFolder):
    toml = folder.root / "review.toml"
    original = toml.read_text(encoding="utf-8")
    toml.write_text(original.replace("schema_version = 1", "schema_version = 7"), encoding="utf-8")
    with pytest.raises(NewerSchemaError, match="schema 7"):
        ReviewFolder.open(folder.root)
    toml.write_text(original.replace('"ben"', '"b en"'), encoding="utf-8")
    with pytest.raises(DataFileError, match="reviewer id 'b en' is not allowed"):
        ReviewFolder.open(folder.root)
    toml.write_text("title = [unclosed", encoding="utf-8")
    with pytest.raises(DataFileError, match="not valid TOML"):
        ReviewFolder.open(folder.root)
    # the in-memory folder cannot save over the broken file either
    with pytest.raises(DataFileError):
        folder.save_review()
    assert toml.read_text(encoding="utf-8") == "title = [unclosed"


def test_misplaced_file_reported(folder: ReviewFolder):
    path = folder.save_assessment(full_assessment())
    os.rename(path, path.with_name("S1--other.json"))
    found, problems = folder.assessments()
    assert found == [] and "does not match its place" in problems[0]


def test_open_errors_say_what_to_do(tmp_path: Path):
    with pytest.raises(InputError, match="review folder not found.*robtui init"):
        ReviewFolder.open(tmp_path / "nowhere")
    with pytest.raises(InputError, match="not a review folder.*robtui init"):
        ReviewFolder.open(tmp_path)


@pytest.mark.parametrize("bad", ["", "a b", "-x", "a--b", "x/y", "ü"])
def test_ids_validated(folder: ReviewFolder, tmp_path: Path, bad: str):
    report = tmp_path / "r.txt"
    report.write_text("x", encoding="utf-8")
    with pytest.raises(InputError, match="not allowed"):
        folder.add_study(bad, "Label", [report])
    with pytest.raises(InputError):
        folder.assessment_path(bad, "S1", "pain12")


def test_check_report_missing_and_changed(folder: ReviewFolder):
    report = folder.review.study("S1").reports[0]
    path = folder.report_path(report)
    path.write_text("edited", encoding="utf-8")
    assert "changed since it was added" in folder.check_report(report)
    path.unlink()
    assert "report file missing" in folder.check_report(report)


def test_add_study_refuses_duplicates_and_missing_files(folder: ReviewFolder, tmp_path: Path):
    before = (folder.root / "review.toml").read_bytes()
    with pytest.raises(InputError, match="already in the review"):
        folder.add_study("S1", "Again", [])
    with pytest.raises(InputError, match="report file not found"):
        folder.add_study("S2", "Two", [tmp_path / "absent.pdf"])
    with pytest.raises(InputError, match="weights name unknown studies"):
        folder.add_result(ResultSpec(id="x", outcome="X", weights={"S7": 1.0}))
    assert (folder.root / "review.toml").read_bytes() == before
    assert folder.review.study("S2") is None


def test_add_report_to_existing_study(folder: ReviewFolder, tmp_path: Path):
    protocol = tmp_path / "protocol.txt"
    protocol.write_text("Protocol text", encoding="utf-8")
    report = folder.add_report("S1", protocol, kind="protocol")
    assert report.kind == "protocol"
    assert ReviewFolder.open(folder.root).review.study("S1").reports[-1] == report


def test_unknown_question_set_refused(tmp_path: Path):
    with pytest.raises(InputError, match="no bundled question set named 'rob9'"):
        ReviewFolder.create(tmp_path / "r", "T", question_set="rob9")
    assert not (tmp_path / "r").exists()
