"""robtui compare and robtui agreement on an invented two-reviewer review."""

from __future__ import annotations

import json
import math
import re

import pytest
from sklearn.metrics import cohen_kappa_score

from robtui.benchmarks.review import build_synthetic_review
from robtui.cli import main
from robtui.core import assessing


@pytest.fixture(autouse=True)
def _asking_as(monkeypatch):
    """These tests ask as the review's lead: robtui shows reviewers' work only to someone named
    (robtui.core.blinding)."""
    monkeypatch.setenv("ROBTUI_REVIEWER", "lead")



@pytest.fixture(scope="module")
def review_dir(tmp_path_factory):
    root = tmp_path_factory.mktemp("cmp") / "review"
    folder = build_synthetic_review(root, studies=6, results=1, seed=11, disagreement=0.3)
    draft = assessing.reopen(folder.load_assessment("ben", "Trial-005", "outcome-1"))
    folder.save_assessment(draft)
    return root


def test_compare_json_lists_differences_first_and_drafts(review_dir, capsys):
    assert main(["compare", str(review_dir), "--json"]) == 0
    out = capsys.readouterr()
    data = json.loads(out.out)
    assert data["reviewers"] == ["ana", "ben"]
    assert len(data["pairs"]) == 5
    assert data["not_compared"] == [
        {"study": "Trial-005", "result": "outcome-1", "problem": "ben: draft, not marked complete"}
    ]
    assert "not compared" in out.err
    for pair in data["pairs"]:
        flags = [q["differs"] for q in pair["questions"]]
        assert flags == sorted(flags, reverse=True)  # differences first
        assert pair["differences"] == sum(flags)
        assert [j["key"] for j in pair["judgements"]][-1] == "overall"
        first = pair["questions"][0]
        assert set(first["a"]) == {"response", "justification", "quotes"}


def test_compare_text_output(review_dir, capsys):
    assert main(["compare", str(review_dir), "--study", "Trial-000"]) == 0
    out = capsys.readouterr().out
    assert "== Trial-000 / outcome-1" in out and "Overall" in out
    assert "1 compared, 0 not compared" in out


def test_compare_refuses_unknown_reviewer(review_dir, capsys):
    assert main(["compare", str(review_dir), "--reviewers", "ana", "zoe"]) == 2
    assert "robtui: reviewer zoe is not in this review" in capsys.readouterr().err


def test_compare_refuses_unknown_study(review_dir, capsys):
    assert main(["compare", str(review_dir), "--study", "Nope"]) == 2
    assert "no study 'Nope'" in capsys.readouterr().err


def test_agreement_json_shape_and_values(review_dir, capsys):
    assert main(["agreement", str(review_dir), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["reviewers"] == ["ana", "ben"]
    assert list(data["domains"]) == ["1", "2", "3", "4", "5", "overall"]
    for stats in [*data["domains"].values(), *data["questions"].values()]:
        for key in (
            "n",
            "pairs",
            "percent_agreement",
            "kappa",
            "kappa_ci",
            "weighted_kappa",
            "pabak",
            "band",
        ):
            assert key in stats
    d1 = data["domains"]["1"]
    assert d1["n"] == 5
    a, b = zip(*d1["pairs"])
    labels = ["low", "some_concerns", "high"]
    reference = cohen_kappa_score(a, b, labels=labels)  # scikit-learn as the reference
    if d1["kappa"] is None:
        assert math.isnan(reference)  # undefined in both
    else:
        assert d1["kappa"] == pytest.approx(reference, abs=1e-6)
    assert "1.1" in data["questions"]


def test_agreement_table(review_dir, capsys):
    assert main(["agreement", str(review_dir)]) == 0
    out = capsys.readouterr().out
    assert "kappa" in out and "PABAK" in out and "Overall" in out
    assert "Unit of analysis: result" in out
    # every numbered note is marked on the rows it concerns
    lines = out.splitlines()
    notes = lines[lines.index("Notes:") + 1 :]
    assert notes
    for i, _ in enumerate(notes, start=1):
        marked = [ln for ln in lines if re.search(rf"\[(\d+,)*{i}(,\d+)*\]$", ln)]
        assert marked, f"note {i} is tied to no row"


def test_agreement_counts_a_study_once_when_its_results_share_it(tmp_path, capsys):
    root = tmp_path / "two"
    build_synthetic_review(root, studies=5, results=2, seed=11, disagreement=0.3)
    assert main(["agreement", str(root), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["compared"] == 10 and data["studies"] == 5
    assert data["analysis"]["unit"] == "study" and data["domains"]["overall"]["n"] == 5
    assert set(data["by_result"]) == {"outcome-1", "outcome-2"}
    assert main(["agreement", str(root)]) == 0
    out = capsys.readouterr().out
    assert "Unit of analysis: study" in out and "Result outcome-2 on its own" in out


def test_on_the_demo_review(tmp_path, capsys, monkeypatch):
    from robtui.errors import DataFileError
    from robtui.store.demo import build_demo_review

    try:
        folder = build_demo_review(tmp_path / "demo")
    except DataFileError as error:
        pytest.skip(f"demo review not bundled yet: {error}")
    if len(folder.review.reviewers) < 2:
        pytest.skip("demo review names fewer than two reviewers")
    root = str(folder.root)
    monkeypatch.setenv("ROBTUI_REVIEWER", folder.review.lead)  # the demo's lead asks
    assert main(["compare", root, "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert len(data["pairs"]) + len(data["not_compared"]) == len(folder.review.studies) * len(
        folder.review.results
    )
    assert main(["agreement", root, "--json"]) == 0
    assert "overall" in json.loads(capsys.readouterr().out)["domains"]
    assert main(["export", root, "--format", "md"]) == 0


def test_review_benchmark_prints_figures(capsys):
    from robtui.benchmarks.review import main as bench

    assert bench(["--studies", "3", "--results", "1"]) == 0
    out = capsys.readouterr().out
    for name in ("compare", "agreement", "export csv", "export png", "total"):
        assert name in out
