"""Blinding in the CLI: who is asking decides what robtui shows and changes (core/blinding.py)."""

from __future__ import annotations

import json
import shutil

import pytest

from robtui.cli import main
from robtui.store.demo import build_demo_review
from robtui.store.review_folder import ReviewFolder


@pytest.fixture(scope="module")
def demo_master(tmp_path_factory):
    return build_demo_review(tmp_path_factory.mktemp("blind") / "demo").root


@pytest.fixture
def demo(demo_master, tmp_path, monkeypatch):
    monkeypatch.delenv("ROBTUI_REVIEWER", raising=False)
    root = tmp_path / "demo"
    shutil.copytree(demo_master, root)
    return root


def _target(root):
    review = ReviewFolder.open(root).review
    return ["--study", review.studies[0].id, "--result", review.results[0].id]


def run(capsys, *argv):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("command", [["compare"], ["agreement"], ["export", "--format", "csv"]])
def test_commands_showing_both_reviewers_need_the_lead(demo, capsys, command):
    name, *rest = command
    code, _, err = run(capsys, name, demo, *rest)
    assert code == 2 and "say who is asking" in err
    code, _, err = run(capsys, name, demo, *rest, "--as", "maren")
    assert code == 2 and "only the lead (ines)" in err and "maren" in err
    code, _, err = run(capsys, name, demo, *rest, "--as", "nobody")
    assert code == 2 and "not on this review" in err
    assert run(capsys, name, demo, *rest, "--as", "ines")[0] == 0


def test_the_environment_says_who_is_asking(demo, capsys, monkeypatch):
    monkeypatch.setenv("ROBTUI_REVIEWER", "ines")
    assert run(capsys, "compare", demo)[0] == 0
    monkeypatch.setenv("ROBTUI_REVIEWER", "tobias")
    assert run(capsys, "compare", demo)[0] == 2


def test_a_reviewer_cannot_see_or_change_anothers_assessment(demo, capsys, monkeypatch):
    target = _target(demo)
    monkeypatch.setenv("ROBTUI_REVIEWER", "maren")
    code, out, err = run(capsys, "assess", demo, "--reviewer", "tobias", *target, "--json")
    assert code == 2 and "tobias's assessment" in err and out == ""
    code, _, err = run(capsys, "assess", demo, "--reviewer", "maren", *target, "--json")
    assert code == 0


def test_the_lead_sees_complete_work_and_changes_it_only_with_unblind(demo, capsys):
    target = _target(demo)
    path = ReviewFolder.open(demo).assessment_path("tobias", target[1], target[3])
    before = path.read_bytes()
    code, out, _ = run(capsys, "assess", demo, "--reviewer", "tobias", *target, "--json",
                       "--as", "ines")  # fmt: skip
    assert code == 0 and json.loads(out)["reviewer"] == "tobias"
    code, _, err = run(capsys, "assess", demo, "--reviewer", "tobias", *target, "--reopen",
                       "--as", "ines")  # fmt: skip
    assert code == 2 and "--unblind" in err
    assert path.read_bytes() == before
    code, _, _ = run(capsys, "assess", demo, "--reviewer", "tobias", *target, "--reopen",
                     "--as", "ines", "--unblind")  # fmt: skip
    assert code == 0 and json.loads(path.read_text("utf-8"))["status"] == "draft"
    # now a draft: the lead sees it only with --unblind
    code, _, err = run(capsys, "assess", demo, "--reviewer", "tobias", *target, "--json",
                       "--as", "ines")  # fmt: skip
    assert code == 2 and "not complete" in err


def test_status_hides_other_reviewers_rows_and_refuses_their_filter(demo, capsys):
    code, out, _ = run(capsys, "status", demo, "--as", "maren", "--json")
    rows = json.loads(out)["rows"]
    theirs = [r for r in rows if r["reviewer"] == "tobias"]
    assert theirs and all(r["overall"] is None and r["status"].endswith("(blind)") for r in theirs)
    assert any(r["overall"] for r in rows if r["reviewer"] == "maren")
    code, _, err = run(capsys, "status", demo, "--reviewer", "tobias", "--as", "maren")
    assert code == 2 and "only tobias or the lead" in err
    code, out, _ = run(capsys, "status", demo, "--as", "ines", "--json")
    assert all(r["overall"] for r in json.loads(out)["rows"] if r["status"] == "complete")


def test_consensus_is_started_by_the_reviews_lead_only(demo, capsys):
    target = _target(demo)
    shutil.rmtree(demo / "consensus")
    code, _, err = run(capsys, "consensus", "start", demo, *target, "--as", "ines",
                       "--lead", "maren")  # fmt: skip
    assert code == 2 and "the review's lead is ines" in err
    code, _, err = run(capsys, "consensus", "start", demo, *target, "--as", "maren")
    assert code == 2 and "only the lead" in err
    assert not (demo / "consensus").exists() or not any((demo / "consensus").iterdir())


def test_status_shows_overrides_with_proposal_and_reason_to_whom_may_see_them(demo, capsys):
    code, out, _ = run(capsys, "status", demo, "--as", "maren")
    assert code in (0, 1)
    birch = [line for line in out.splitlines() if line.startswith("BIRCH2029")]
    mine = next(i for i, line in enumerate(out.splitlines())
                if line.startswith("BIRCH2029") and " maren " in line and "primary-itt" in line)
    lines = out.splitlines()
    assert lines[mine].endswith("High (overridden)")
    assert lines[mine + 1].strip().startswith("override Overall: proposed Some concerns, "
                                             "judged High instead (reason: Some concerns in")
    assert birch  # tobias's BIRCH row shows no override to maren (blinding)
    assert "Unbalanced opt-outs" not in out
    code, out, _ = run(capsys, "status", demo, "--as", "maren", "--json")
    row = next(r for r in json.loads(out)["rows"]
               if (r["study"], r["result"], r["reviewer"]) == ("BIRCH2029", "primary-itt", "maren"))
    assert row["overrides"] == [{
        "key": "overall", "label": "Overall", "proposed": "some_concerns", "judgement": "high",
        "reason": row["overrides"][0]["reason"],
    }] and row["overrides"][0]["reason"].startswith("Some concerns in four domains")
    code, out, _ = run(capsys, "status", demo, "--as", "ines")  # the lead sees both
    assert "Unbalanced opt-outs" in out
