"""A long PDF is read in a process of its own; when that process fails, the workbench reads the
report in its own thread and tells the reviewer so (what failed, where it reads now, nothing
lost)."""

from __future__ import annotations

import pytest

from robtui.cli import main
from robtui.paths import bundled_dir
from robtui.tui.app import Workbench
from robtui.tui.report_loading import APART_MIN_PAGES, pdf_pages
from robtui.tui.screens.assessment import AssessmentScreen
from robtui.workspace import preparing

from .helpers import said_on_screen, settle

LONG_PDF = bundled_dir("sample_reports") / "grove-neuropathy.pdf"


@pytest.fixture
def long_review(tmp_path, monkeypatch, capsys):
    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(tmp_path / "cache"))  # nothing prepared yet
    root = tmp_path / "rev"
    assert main(["init", str(root), "--title", "T", "--reviewer", "ana"]) == 0
    assert main(["study", "add", str(root), "--study", "G1", "--label", "Grove",
                 "--report", str(LONG_PDF)]) == 0
    assert main(["result", "add", str(root), "--result", "pain", "--outcome", "Pain"]) == 0
    capsys.readouterr()
    assert pdf_pages(LONG_PDF) >= APART_MIN_PAGES  # else it is read here anyway
    return root


def _no_process(*_args, **_kwargs):
    raise OSError("no more processes")


def _worker_died(jobs, **_kwargs):
    job = jobs[0]
    summary = preparing.PrepareSummary(workers=1)
    summary.outcomes.append(preparing.ReportOutcome(
        job.label, job.path, job.sha256,
        error="the worker preparing it stopped (BrokenProcessPool: killed)"))
    return summary


async def _open_the_result(pilot) -> AssessmentScreen:
    await pilot.pause()
    await pilot.press("enter")  # the overview's only result
    await settle(pilot)
    assert isinstance(pilot.app.screen, AssessmentScreen)
    return pilot.app.screen


@pytest.mark.parametrize(("fail", "cause"), [
    (_no_process, "OSError: no more processes"),
    (_worker_died, "BrokenProcessPool: killed"),
])
async def test_a_failed_reading_process_is_said_and_the_report_still_opens(
        long_review, monkeypatch, fail, cause):
    monkeypatch.setattr(preparing, "prepare", fail)
    app = Workbench(long_review, "ana")
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await _open_the_result(pilot)
        # told at once, in a message: what failed, that it reads here, nothing lost
        told = [n.message for n in app._notifications]
        said = [m for m in told if "separate reading process failed" in m]
        assert len(said) == 1, told
        assert cause in said[0]
        assert "read in the workbench itself" in said[0] and "Nothing is lost" in said[0]
        # and it stays said above the report, which was read and ranked here all the same
        loaded = screen.current
        assert loaded is not None and loaded.problem is None
        assert loaded.document is not None and loaded.document.pages >= APART_MIN_PAGES
        assert screen.suggestions_for(screen.question_id)
        await pilot.press("tab")  # the report pane, above it the note, whole at 80x24
        await pilot.pause()
        assert said_on_screen(app, loaded.notes[0]), loaded.notes


async def test_nothing_is_said_when_the_reading_process_works(long_review):
    app = Workbench(long_review, "ana")
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await _open_the_result(pilot)
        assert screen.current is not None and screen.current.document is not None
        assert screen.current.notes == [] or all(
            "reading process" not in note for note in screen.current.notes)
        assert not [n for n in app._notifications if "reading process" in n.message]
