"""The workbench's evidence map, pre-specification panel and background preparation."""

from __future__ import annotations

import asyncio
import csv

from robtui.evidence.prepared import load_prepared
from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.evidence_map import EvidenceMapScreen
from robtui.tui.screens.overview import OverviewScreen
from robtui.tui.screens.prespecification import PrespecificationScreen

from .conftest import SIZE
from .helpers import open_selected

NEW_REVIEWER = "tess"


async def _overview(pilot) -> None:
    while not isinstance(pilot.app.screen, OverviewScreen):
        await asyncio.sleep(0.01)
    await pilot.pause()


async def test_background_preparation_fills_the_evidence_map(demo_dir, tmp_path, monkeypatch):
    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(tmp_path / "cache"))
    changed = demo_dir / "reports" / "FIR2030" / "fir-handwashing.txt"
    changed.write_text(changed.read_text(encoding="utf-8") + "\nEdited.\n", encoding="utf-8")
    app = Workbench(demo_dir, "maren", prepare_in_background=True)
    async with app.run_test(size=(80, 24)) as pilot:
        await _overview(pilot)
        await pilot.press("e")
        await pilot.pause()
        assert isinstance(app.screen, EvidenceMapScreen)
        for _ in range(1200):  # the interface stays usable while the pool works
            if app.preparation_done:
                break
            await asyncio.sleep(0.05)
        assert app.preparation_done
        assert len(app.preparation_failures) == 1  # the edited copy, named with the reason
        assert "FIR2030" in app.preparation_failures[0]
        assert "changed since it was added" in app.preparation_failures[0]
        assert app.preparation.done == app.preparation.total > 0
        await pilot.pause()
        assert "not prepared: FIR2030" in str(app.screen.query_one("#map-title").render())
        emap = app.screen.emap
        assert emap.prepared_fraction == 1.0
        alder = next(r for r in emap.rows if r.study_id == "ALDER2031")
        assert alder.cells["1.1"].band == "strong"
        await pilot.press("x")
        await pilot.pause()
        rows = list(csv.DictReader((demo_dir / "exports" / "evidence-map-assignment.csv").open()))
        assert {r["study"] for r in rows} == {s.id for s in ReviewFolder.open(demo_dir).review.studies}
    folder = ReviewFolder.open(demo_dir)
    report = folder.review.study("ELM2028").reports[0]
    assert load_prepared(report.sha256, "assignment") is not None


async def test_the_plan_panel_shows_findings_and_attaches_a_passage(demo_dir):
    app = Workbench(demo_dir, NEW_REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await _overview(pilot)
        screen = await open_selected(pilot)  # ALDER2031, the first result
        await app.workers.wait_for_complete()
        qid = screen.question_id
        await pilot.press("w")
        for _ in range(400):
            if isinstance(app.screen, PrespecificationScreen) and app.screen.passages:
                break
            await asyncio.sleep(0.01)
        panel = app.screen
        assert isinstance(panel, PrespecificationScreen) and panel.shown_seconds is not None
        head = str(panel.query_one("#plan-head").render())
        assert "prospective" in head and "status: primary" in head
        await pilot.press("down")
        await pilot.press("q")
        await pilot.pause()
        await pilot.press("escape")
        await pilot.pause()
        quotes = screen.session.assessment.answers[qid].quotes
        assert len(quotes) == 1 and quotes[0].text in {p.text for p in panel.passages.values()}
        assert screen.session.assessment.answers[qid].response is None  # nothing answered
