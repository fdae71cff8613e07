"""The pre-specification panel's data on the demo (invented registry records and protocols):
every switched, added, dropped or retrospectively registered outcome is surfaced."""

from __future__ import annotations

import json

import pytest

from robtui.cli import main
from robtui.store.demo import build_demo_review
from robtui.workspace.prespecifying import declared_outcomes, prespecification


@pytest.fixture(scope="module")
def demo(tmp_path_factory):
    with pytest.MonkeyPatch.context() as patch:
        patch.setenv("ROBTUI_CACHE_DIR", str(tmp_path_factory.mktemp("cache")))
        yield build_demo_review(tmp_path_factory.mktemp("demo") / "review")


def _topics(found, topic):
    return [f.text for f in found.findings if f.topic == topic]


def test_alder_registered_prospectively_with_the_registered_primary(demo):
    found, sources = prespecification(demo, "ALDER2031", "primary-itt")
    assert found.timing == "prospective" and found.status == "primary"
    assert "monthly migraine days" in found.outcome
    for topic in ("switched", "added", "dropped", "changed"):
        assert _topics(found, topic) == [], topic
    assert not sources.notes


def test_cedar_registered_after_enrolment_began_and_an_added_outcome(demo):
    found, _ = prespecification(demo, "CEDAR2030", "primary-itt")
    assert found.timing == "retrospective"
    assert "2030-06-18" in found.findings[0].text and "2030-01-13" in found.findings[0].text
    assert found.status == "primary"
    added = _topics(found, "added")
    assert len(added) == 1 and "sick leave days" in added[0]


def test_elm_switched_primary_outcome_with_the_passages_side_by_side(demo):
    found, sources = prespecification(demo, "ELM2028", "primary-itt")
    assert found.status == "changed" and found.timing == "prospective"
    switched = [f for f in found.findings if f.topic == "switched"]
    assert {("registry" in f.text, "protocol" in f.text) for f in switched} == {
        (True, False), (False, True)}
    for finding in switched:
        sources_named = {p.source.split()[0] for p in finding.passages}
        assert sources_named >= {"report"} and sources_named & {"registry", "protocol"}
    changed = [t for t in _topics(found, "changed") if "versions" in t]
    assert len(changed) == 1 and "after first enrolment" in changed[0]
    dropped = _topics(found, "dropped")
    assert len(dropped) == 1 and "Six-minute walk distance" in dropped[0]
    assert sources.registry_records[-1].history  # the two saved versions give the history
    for planned, reported in found.side_by_side:
        assert reported is not None and "exacerbation-free days" in reported.text
        assert planned is not None


def test_a_study_without_a_plan_says_so(demo):
    found, sources = prespecification(demo, "BIRCH2029", "primary-itt")
    assert found.status == "no plan given" and found.timing == "no dates"
    assert any("no registry record" in n for n in sources.notes)


@pytest.mark.parametrize(("sentence", "expected"), [
    ("The primary outcome was pain at 12 weeks.", [("primary", "pain at 12 weeks")]),
    ("Secondary outcomes were function, sleep, and mood recorded by diary.",
     [("secondary", "function"), ("secondary", "sleep"), ("secondary", "mood recorded by diary")]),
    ("FEV1 at 12 weeks, the dyspnoea score and quality of life were secondary outcomes.",
     [("secondary", "FEV1 at 12 weeks"), ("secondary", "dyspnoea score"),
      ("secondary", "quality of life")]),
    ("Primary outcome data were available for 109 participants.", []),
    ("The registry named FEV1 as the primary outcome; it was changed later.", []),
    ("The primary endpoint will be the time to relapse.", [("primary", "time to relapse")]),
])
def test_outcomes_declared_in_a_sentence(sentence, expected):
    assert declared_outcomes(sentence) == expected


def test_cli_prints_findings_json_and_attaches_a_quote(demo, capsys, monkeypatch, tmp_path):
    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(tmp_path / "cache"))
    root = str(demo.root)
    assert main(["prespecified", root, "--study", "ELM2028", "--result", "primary-itt"]) == 0
    out = capsys.readouterr().out
    assert "status: changed" in out and "[switched]" in out
    assert "they answer no signalling question" in out
    assert main(["prespecified", root, "--study", "CEDAR2030", "--result", "primary-itt",
                 "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["registration"] == "retrospective"
    assert any(f["topic"] == "added" for f in data["findings"])
    # the demo's assessments are complete: attaching is refused, nothing is written
    before = (demo.assessment_path("maren", "ELM2028", "primary-itt")).read_bytes()
    assert main(["prespecified", root, "--study", "ELM2028", "--result", "primary-itt",
                 "--attach", "4", "--question", "5.2", "--reviewer", "maren"]) == 2
    assert "reopen it first" in capsys.readouterr().err
    assert demo.assessment_path("maren", "ELM2028", "primary-itt").read_bytes() == before
    # a new result has no assessment yet: the finding's passage becomes a quote on 5.2
    assert main(["result", "add", root, "--result", "fev1", "--outcome", "FEV1",
                 "--time-point", "12 weeks"]) == 0
    capsys.readouterr()
    assert main(["prespecified", root, "--study", "ELM2028", "--result", "fev1", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    number = next(i for i, f in enumerate(data["findings"], 1) if f["passages"])
    passage = data["findings"][number - 1]["passages"][0]
    assert main(["prespecified", root, "--study", "ELM2028", "--result", "fev1", "--attach",
                 str(number), "--question", "5.2", "--reviewer", "tobias"]) == 0
    saved = json.loads(demo.assessment_path("tobias", "ELM2028", "fev1").read_text())
    quote = saved["answers"]["5.2"]["quotes"][0]
    assert quote["text"] == passage["text"] and quote["start"] == passage["start"]
    assert saved["answers"]["5.2"]["response"] is None  # attached, never answered


def test_cli_review_wide_table_counts_each_studys_findings(demo, capsys, monkeypatch, tmp_path):
    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(tmp_path / "cache"))
    assert main(["prespecified", str(demo.root), "--result", "primary-itt", "--json"]) == 0
    rows = {r["study"]: r for r in json.loads(capsys.readouterr().out)}
    assert (rows["ELM2028"]["status"], rows["ELM2028"]["switched"], rows["ELM2028"]["dropped"]) \
        == ("changed", 2, 1)
    assert (rows["CEDAR2030"]["registration"], rows["CEDAR2030"]["added"]) == ("retrospective", 1)
    assert rows["BIRCH2029"]["status"] == "no plan given"
    assert main(["prespecified", str(demo.root), "--result", "primary-itt", "--attach", "1"]) == 2
    assert "--attach needs --study" in capsys.readouterr().err
