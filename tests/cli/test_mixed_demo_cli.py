"""The bundled demo mixes designs (parallel-group trials, FIR cluster-randomised, HAZEL
crossover): it opens, compares, reports agreement and exports with the extra columns, from
the command line as a user would run it."""

from __future__ import annotations

import csv
import io
import json

import pytest

from robtui.cli import main
from robtui.store.demo import build_demo_review


@pytest.fixture(autouse=True)
def _asking_as_the_lead(monkeypatch):
    """compare, agreement and export show both reviewers' work: the demo's lead asks
    (robtui.core.blinding)."""
    monkeypatch.setenv("ROBTUI_REVIEWER", "ines")



@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    return build_demo_review(tmp_path_factory.mktemp("mixed") / "demo").root


def test_study_list_names_each_studys_set(demo, capsys):
    assert main(["study", "list", str(demo)]) == 0
    out = capsys.readouterr().out
    assert "FIR2030" in out and "[rob2-cluster v2]" in out
    assert "HAZEL2031" in out and "[rob2-crossover v2]" in out


def test_compare_shows_the_cluster_domain_and_its_difference(demo, capsys):
    assert main(["compare", str(demo), "--study", "FIR2030", "--result", "primary-itt"]) == 0
    out = capsys.readouterr().out
    assert "D1b Recruitment timing" in out and "DS" not in out
    assert "1b.2 Selection knew allocation: maren PY | tobias PN" in out


def test_agreement_counts_the_extra_domains_over_their_own_studies(demo, capsys):
    assert main(["agreement", str(demo), "--json"]) == 0
    stats = json.loads(capsys.readouterr().out)
    n = {key: d["n"] for key, d in stats["domains"].items()}
    assert n == {"1": 7, "1b": 1, "S": 1, "2": 7, "3": 7, "4": 7, "5": 7, "overall": 7}
    assert stats["questions"]["1b.2"]["n"] == 1 and stats["questions"]["S.1"]["n"] == 1
    assert main(["agreement", str(demo)]) == 0
    table = capsys.readouterr().out
    assert "D1b Recruitment timing" in table and "DS Period and carryover" in table


def test_export_has_the_extra_columns_blank_where_a_study_has_no_such_domain(demo, capsys):
    assert main(["export", str(demo), "--format", "csv", "--format", "svg",
                 "--result", "primary-itt"]) == 0
    capsys.readouterr()
    text = (demo / "exports" / "primary-itt-judgements.csv").read_text(encoding="utf-8-sig")
    rows = list(csv.DictReader(io.StringIO(text)))
    by_study = {r["study"]: r for r in rows}
    assert by_study["FIR2030"]["D1b"] == "high" and by_study["FIR2030"]["DS"] == ""
    assert by_study["HAZEL2031"]["DS"] == "low" and by_study["HAZEL2031"]["D1b"] == ""
    assert all(by_study[s]["D1b"] == by_study[s]["DS"] == "" for s in
               ("ALDER2031", "BIRCH2029", "CEDAR2030", "DOGWOOD2029", "ELM2028"))
    assert all(r["Overall"] for r in rows)
    answers = (demo / "exports" / "primary-itt-answers.csv").read_text(encoding="utf-8-sig")
    assert "FIR2030" in answers and ",1b.1," in answers and ",S.3," in answers
    summary = (demo / "exports" / "primary-itt-summary.svg").read_text(encoding="utf-8")
    assert "D1b (1 of 7)" in summary and "DS (1 of 7)" in summary
