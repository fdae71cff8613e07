"""robtui consensus and robtui export on an invented two-reviewer review."""

from __future__ import annotations

import json

import pytest

from robtui.benchmarks.review import build_synthetic_review
from robtui.cli import main


@pytest.fixture(autouse=True)
def _asking_as(monkeypatch):
    """These tests ask as the review's lead: robtui shows reviewers' work only to someone named
    (robtui.core.blinding)."""
    monkeypatch.setenv("ROBTUI_REVIEWER", "lead")



@pytest.fixture()
def review_dir(tmp_path):
    root = tmp_path / "review"
    build_synthetic_review(root, studies=3, results=1, seed=5, disagreement=0.5)
    return root


def _differing(root, capsys, study):
    main(["compare", str(root), "--study", study, "--json"])
    data = json.loads(capsys.readouterr().out)
    return data["pairs"][0]


def test_consensus_flow_keeps_reviewers_files_untouched(review_dir, capsys):
    pair = _differing(review_dir, capsys, "Trial-000")
    target = ["--study", "Trial-000", "--result", "outcome-1"]
    before = {p: p.read_bytes() for p in (review_dir / "assessments").rglob("*.json")}
    assert main(["consensus", "start", str(review_dir), *target]) == 0
    assert (review_dir / "consensus" / "Trial-000--outcome-1.json").is_file()
    assert main(["consensus", "start", str(review_dir), *target]) == 2
    assert "exists already" in capsys.readouterr().err
    # settle until nothing is pending: take ana's side each time
    for _ in range(30):
        capsys.readouterr()
        main(["consensus", "show", str(review_dir), *target, "--json"])
        shown = json.loads(capsys.readouterr().out)
        if not shown["pending"]:
            break
        qid = shown["pending"][0]
        assert (
            main(
                [
                    "consensus",
                    "settle",
                    str(review_dir),
                    *target,
                    "--question",
                    qid,
                    "--take",
                    "ana",
                    "--note",
                    "ana quoted the methods section",
                ]
            )
            == 0
        )
    assert main(["consensus", "complete", str(review_dir), *target]) == 0
    capsys.readouterr()
    main(["consensus", "show", str(review_dir), *target, "--json"])
    record = json.loads(capsys.readouterr().out)
    assert record["status"] == "complete"
    if pair["differences"]:
        assert any(d["source"] == "a" for d in record["decisions"].values())
    after = {p: p.read_bytes() for p in (review_dir / "assessments").rglob("*.json")}
    assert before == after
    # the export now uses the consensus for this study
    assert main(["export", str(review_dir), "--format", "csv"]) == 0
    text = (review_dir / "exports" / "outcome-1-judgements.csv").read_text(encoding="utf-8")
    assert "Trial-000" in text.splitlines()[1] and ",consensus," in text.splitlines()[1]


def test_settle_needs_a_note_and_a_valid_answer(review_dir, capsys):
    target = ["--study", "Trial-001", "--result", "outcome-1"]
    assert main(["consensus", "start", str(review_dir), *target]) == 0
    capsys.readouterr()
    with pytest.raises(SystemExit) as stop:
        main(["consensus", "settle", str(review_dir), *target, "--question", "1.1", "--take", "a"])
    assert stop.value.code == 2
    assert (
        main(
            [
                "consensus",
                "settle",
                str(review_dir),
                *target,
                "--question",
                "1.1",
                "--answer",
                "maybe",
                "--note",
                "x",
            ]
        )
        == 2
    )
    assert "must be one of" in capsys.readouterr().err
    assert (
        main(
            [
                "consensus",
                "settle",
                str(review_dir),
                *target,
                "--question",
                "1.1",
                "--take",
                "carl",
                "--note",
                "x",
            ]
        )
        == 2
    )


def test_consensus_show_without_record(review_dir, capsys):
    assert (
        main(
            ["consensus", "show", str(review_dir), "--study", "Trial-002", "--result", "outcome-1"]
        )
        == 2
    )
    assert "consensus start" in capsys.readouterr().err


def test_export_all_formats_and_listing(review_dir, capsys):
    assert main(["export", str(review_dir), "--format", "all", "--out", "final"]) == 0
    out, err = capsys.readouterr()
    names = sorted(p.name for p in (review_dir / "exports").iterdir())
    for expected in (
        "final.md",
        "final.html",
        "final.tex",
        "final-judgements.csv",
        "final-answers.csv",
        "final-lights.svg",
        "final-summary.png",
        "final-lights.pdf",
    ):
        assert expected in names
    assert "GRADE" in out and "suggestion for the panel" in out
    if "not judged" in (review_dir / "exports" / "final.md").read_text(encoding="utf-8"):
        assert "not judged or not final" in err


def test_export_refuses_paths_outside_exports(review_dir, capsys):
    for bad in ("../outside", "/tmp/outside"):
        assert main(["export", str(review_dir), "--format", "md", "--out", bad]) == 2
        assert "robtui: export name" in capsys.readouterr().err
    assert not (review_dir / "outside.md").exists()


def test_a_stale_consensus_is_flagged_by_consensus_show_and_compare(review_dir, capsys):
    from robtui.core import assessing
    from robtui.store.question_sets import builtin_question_set
    from robtui.store.review_folder import ReviewFolder

    target = ["--study", "Trial-001", "--result", "outcome-1"]
    assert main(["consensus", "start", str(review_dir), *target]) == 0
    for _ in range(30):
        capsys.readouterr()
        main(["consensus", "show", str(review_dir), *target, "--json"])
        pending = json.loads(capsys.readouterr().out)["pending"]
        if not pending:
            break
        main(["consensus", "settle", str(review_dir), *target, "--question", pending[0],
              "--take", "a", "--note", "ana's reading"])  # fmt: skip
    assert main(["consensus", "complete", str(review_dir), *target]) == 0
    assert "STALE" not in capsys.readouterr().out
    qset = builtin_question_set()
    folder = ReviewFolder.open(review_dir)
    ben = folder.load_assessment("ben", "Trial-001", "outcome-1")
    old = ben.answers["1.1"].response
    new = next(o for o in qset.question("1.1").options if o != old)
    ben = assessing.mark_complete(assessing.set_response(assessing.reopen(ben), qset, "1.1", new),
                                  qset)  # fmt: skip
    folder.save_assessment(ben)
    main(["consensus", "show", str(review_dir), *target])
    assert (
        f"STALE: a reviewer changed answers this consensus was built on (ben: 1.1 {old} -> {new})"
        in (capsys.readouterr().out)
    )
    main(["compare", str(review_dir), "--study", "Trial-001"])
    assert "Trial-001 / outcome-1: consensus is stale" in capsys.readouterr().err


def _settle_all(root, capsys, target):
    """Take ana's side for every question still to settle."""
    for _ in range(30):
        capsys.readouterr()
        main(["consensus", "show", str(root), *target, "--json"])
        pending = json.loads(capsys.readouterr().out)["pending"]
        if not pending:
            return
        assert main(["consensus", "settle", str(root), *target, "--question", pending[0],
                     "--take", "a", "--note", "ana's reading of the methods"]) == 0


def test_the_lead_settles_support_and_direction_shown_and_exported(review_dir, capsys):
    target = ["--study", "Trial-000", "--result", "outcome-1"]
    assert main(["consensus", "start", str(review_dir), *target]) == 0
    assert main(["consensus", "support", str(review_dir), *target, "--domain", "1",
                 "--text", "sealed envelopes held by the pharmacy",
                 "--direction", "towards_null"]) == 0
    assert main(["consensus", "support", str(review_dir), *target, "--domain", "overall",
                 "--direction", "unpredictable"]) == 0
    out = capsys.readouterr().out
    assert "support: sealed envelopes held by the pharmacy" in out
    assert "predicted direction of bias: Towards null" in out
    assert "predicted direction of bias: Unpredictable" in out
    record = json.loads((review_dir / "consensus" / "Trial-000--outcome-1.json").read_text())
    assert record["support"]["1"] == "sealed envelopes held by the pharmacy"
    assert record["direction"] == {"1": "towards_null", "overall": "unpredictable"}
    # the overall has a direction but no support box; a change needs something to change
    assert main(["consensus", "support", str(review_dir), *target, "--domain", "overall",
                 "--text", "x"]) == 2
    assert "no support text" in capsys.readouterr().err
    assert main(["consensus", "support", str(review_dir), *target, "--domain", "1"]) == 2
    assert "give --text" in capsys.readouterr().err
    # clearing the direction keeps the text
    assert main(["consensus", "support", str(review_dir), *target, "--domain", "1",
                 "--direction", "none"]) == 0
    record = json.loads((review_dir / "consensus" / "Trial-000--outcome-1.json").read_text())
    assert "1" not in record["direction"] and record["support"]["1"]
    _settle_all(review_dir, capsys, target)
    assert main(["consensus", "complete", str(review_dir), *target]) == 0
    assert main(["export", str(review_dir), "--format", "md"]) == 0
    exported = (review_dir / "exports" / "outcome-1.md").read_text(encoding="utf-8")
    assert "sealed envelopes held by the pharmacy" in exported
    assert "Predicted direction of bias: Unpredictable" in exported


def test_a_complete_consensus_refuses_overrides_and_support_until_reopened(review_dir, capsys):
    target = ["--study", "Trial-002", "--result", "outcome-1"]
    assert main(["consensus", "start", str(review_dir), *target]) == 0
    _settle_all(review_dir, capsys, target)
    assert main(["consensus", "complete", str(review_dir), *target]) == 0
    path = review_dir / "consensus" / "Trial-002--outcome-1.json"
    before = path.read_bytes()
    capsys.readouterr()
    assert main(["consensus", "override", str(review_dir), *target, "--domain", "overall",
                 "--judgement", "high", "--reason", "funder ran the analysis"]) == 2
    err = capsys.readouterr().err
    assert "is marked complete, so a judgement cannot change: reopen it first" in err
    assert main(["consensus", "support", str(review_dir), *target, "--domain", "2",
                 "--direction", "towards_null"]) == 2
    assert "is marked complete" in capsys.readouterr().err
    assert path.read_bytes() == before
    # reopened, the override is taken; it needs a reason, and --remove takes it back
    assert main(["consensus", "reopen", str(review_dir), *target]) == 0
    assert main(["consensus", "override", str(review_dir), *target, "--domain", "overall",
                 "--judgement", "high"]) == 2
    assert "needs a reason" in capsys.readouterr().err
    assert main(["consensus", "override", str(review_dir), *target, "--domain", "overall",
                 "--judgement", "high", "--reason", "funder ran the analysis"]) == 0
    assert "override reason: funder ran the analysis" in capsys.readouterr().out
    assert json.loads(path.read_text())["final"]["overall"] == "high"
    assert main(["consensus", "override", str(review_dir), *target, "--domain", "overall",
                 "--remove"]) == 0
    assert json.loads(path.read_text())["overrides"] == {}
