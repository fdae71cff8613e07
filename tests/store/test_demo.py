"""The demo builder: layered answers, quotes located by search, both reviewers complete."""

from __future__ import annotations

from pathlib import Path

import pytest

from robtui.cli import main
from robtui.core import assessing
from robtui.core.questions import builtin_question_set
from robtui.errors import DataFileError, InputError
from robtui.store.demo import DEMO_FILE, build_demo_review
from robtui.store.quotes import report_document

QSET = builtin_question_set()

TINY_REPORT = (
    "Fernleaf tonic for invented fatigue: a randomised trial.\n"
    "Methods. A statistician generated the allocation sequence by computer.\n"
    "Allocation was concealed with a central telephone service.\n"
    "Baseline characteristics were similar between groups.\n"
)
TINY_SPEC = """
schema_version = 1
title = "Tiny invented review"
lead = "lead"
reviewers = ["ana", "ben"]

[[study]]
id = "Fern2019"
label = "Fern 2019"
files = ["fern.txt"]

[[result]]
id = "fatigue8"
outcome = "Fatigue score"
time_point = "8 weeks"
outcome_type = "subjective"

[[assessment]]
study = "Fern2019"
[assessment.answers]
"1.1" = { code = "Y", why = "computer sequence", quote = "generated the allocation sequence by computer" }
"1.2" = { code = "Y", why = "central telephone", quote = "central telephone service" }
"1.3" = { code = "N", why = "similar groups" }
"2.1" = { code = "N", why = "placebo tonic" }
"2.2" = { code = "N", why = "placebo tonic" }
"2.6" = { code = "Y", why = "all analysed as randomised" }
"3.1" = { code = "Y", why = "all followed up" }
"4.1" = { code = "N", why = "validated scale" }
"4.2" = { code = "N", why = "same scale" }
"4.3" = { code = "N", why = "participants blinded" }
"5.1" = { code = "Y", why = "registered plan" }
"5.2" = { code = "N", why = "one scale" }
"5.3" = { code = "N", why = "one analysis" }
[assessment.reviewer.ben]
"1.2" = { code = "NI", why = "how the service worked is not said" }
"2.1" = { code = "PY", why = "tonic taste may unblind" }
"2.3" = { code = "PN", why = "no sign of deviations" }
[[assessment.override]]
reviewer = "ana"
key = "4"
judgement = "some_concerns"
reason = "self-rated fatigue with a distinctive taste"
"""


@pytest.fixture
def tiny_source(tmp_path: Path) -> Path:
    source = tmp_path / "samples"
    (source / "demo").mkdir(parents=True)
    (source / "fern.txt").write_text(TINY_REPORT, encoding="utf-8")
    (source / DEMO_FILE).write_text(TINY_SPEC, encoding="utf-8")
    return source


def check_demo(folder) -> None:
    """Every assessment complete and valid, every quote equal to the report at its offsets."""
    found, problems = folder.assessments()
    assert problems == []
    expected = (
        len(folder.review.reviewers) * len(folder.review.studies) * len(folder.review.results)
    )
    assert len(found) == expected
    for a in found:
        assert a.status == "complete", (a.reviewer, a.study_id, a.result_id)
        assert assessing.completion_problems(a, QSET) == []
        assert assessing.recompute(a, QSET).proposed == a.proposed, (
            "proposals come from the algorithm"
        )
        study = folder.review.study(a.study_id)
        for answer in a.answers.values():
            for quote in answer.quotes:
                index = next(
                    i for i, r in enumerate(study.reports) if r.sha256 == quote.document_sha256
                )
                text = report_document(folder, study, index).text
                assert text[quote.start : quote.end] == quote.text


def test_tiny_demo_builds_with_disagreements(tiny_source: Path, tmp_path: Path):
    folder = build_demo_review(tmp_path / "demo", source=tiny_source)
    check_demo(folder)
    ana = folder.load_assessment("ana", "Fern2019", "fatigue8")
    ben = folder.load_assessment("ben", "Fern2019", "fatigue8")
    assert ana.final == {"1": "low", "2": "low", "3": "low", "4": "some_concerns", "5": "low",
                         "overall": "some_concerns"}  # fmt: skip
    assert ana.overrides["4"].proposed == "low"
    # NI on concealment with no baseline imbalance: Some concerns (RoB 2 domain 1 algorithm)
    assert ben.proposed["1"] == "some_concerns"
    assert ben.answers["2.3"].response == "PN" and "2.3" not in ana.answers
    quote = ana.answers["1.1"].quotes[0]
    assert TINY_REPORT[quote.start : quote.end] == "generated the allocation sequence by computer"


def test_demo_refuses_non_empty_folder(tiny_source: Path, tmp_path: Path):
    dest = tmp_path / "busy"
    dest.mkdir()
    (dest / "keep.txt").write_text("mine", encoding="utf-8")
    with pytest.raises(InputError, match="not empty"):
        build_demo_review(dest, source=tiny_source)
    assert [p.name for p in dest.iterdir()] == ["keep.txt"]


@pytest.mark.parametrize(
    "change, message",
    [
        (('"1.3" = { code = "N", why = "similar groups" }', ""), "not answered: 1.3"),
        (("central telephone service", "a courier on a bicycle"), "quote not found"),
        (('"2.3" = { code = "PN"', '"2.3" = { code = "XX"'), "unknown response"),
        (("schema_version = 1", "schema_version = 2"), "schema_version must be 1"),
    ],
)
def test_bad_demo_description_named(tiny_source: Path, tmp_path: Path, change, message):
    spec = tiny_source / DEMO_FILE
    spec.write_text(TINY_SPEC.replace(*change), encoding="utf-8")
    with pytest.raises(DataFileError, match=message) as info:
        build_demo_review(tmp_path / "demo", source=tiny_source)
    assert str(spec) in str(info.value)


def test_demo_command_copy_to(tmp_path: Path, capsys, monkeypatch, tiny_source: Path):
    monkeypatch.setattr("robtui.store.demo.demo_source_dir", lambda: tiny_source)
    dest = tmp_path / "copy"
    assert main(["demo", "--copy-to", str(dest)]) == 0
    out = capsys.readouterr().out
    assert f"demo review built in {dest}" in out and "next: robtui " in out
    assert main(["demo", "--copy-to", str(dest)]) == 2
    assert "not empty" in capsys.readouterr().err


def test_same_demo_every_build(tmp_path: Path):
    one = build_demo_review(tmp_path / "one")
    two = build_demo_review(tmp_path / "two")
    files = sorted(p.relative_to(one.root) for p in one.root.rglob("*") if p.is_file())
    assert files == sorted(p.relative_to(two.root) for p in two.root.rglob("*") if p.is_file())
    for rel in files:
        assert (one.root / rel).read_bytes() == (two.root / rel).read_bytes(), rel


def test_failed_build_leaves_nothing(tiny_source: Path, tmp_path: Path):
    spec = tiny_source / DEMO_FILE
    spec.write_text(TINY_SPEC.replace('"5.3" = { code = "N", why = "one analysis" }', ""), "utf-8")
    with pytest.raises(DataFileError, match="not answered: 5.3"):
        build_demo_review(tmp_path / "demo", source=tiny_source)
    assert sorted(p.name for p in tmp_path.iterdir()) == ["samples"]


def test_bundled_demo_builds_and_validates(tmp_path: Path):
    folder = build_demo_review(tmp_path / "demo")
    check_demo(folder)
    assert len(folder.review.studies) == 6
    assert len(folder.review.reviewers) == 2
    a, b = folder.review.reviewers
    differing = 0
    for study in folder.review.studies:
        for result in folder.review.results:
            x = folder.load_assessment(a, study.id, result.id)
            y = folder.load_assessment(b, study.id, result.id)
            qids = set(x.answers) | set(y.answers)
            differing += sum(
                (x.answers.get(q) and x.answers[q].response)
                != (y.answers.get(q) and y.answers[q].response)
                for q in qids
            )
    assert 3 <= differing <= 40, differing
    quotes = [q for a in folder.assessments()[0] for ans in a.answers.values() for q in ans.quotes]
    assert len(quotes) >= 30


def test_plain_demo_builds_fresh_folder_and_opens_workbench(tmp_path, capsys, monkeypatch):
    import robtui.tui.app

    calls = []
    monkeypatch.setattr("platformdirs.user_data_dir", lambda app: str(tmp_path / "data" / app))
    monkeypatch.setattr(
        robtui.tui.app,
        "run_workbench",
        lambda folder, reviewer=None: calls.append((folder, reviewer)) or 0,
    )
    assert main(["demo", "--reviewer", "tobias"]) == 0
    out = capsys.readouterr().out
    [(folder, reviewer)] = calls
    assert reviewer == "tobias"
    assert folder.parent == tmp_path / "data" / "robtui" / "demo"
    assert f"demo review built in {folder}" in out
    assert (folder / "review.toml").is_file()
