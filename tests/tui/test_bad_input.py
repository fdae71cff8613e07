"""Bad input: the review cannot be opened, a report is missing or changed, an assessment
file is unreadable. The app says what is wrong, the rest stays usable, nothing is written."""

from __future__ import annotations

from pathlib import Path

import pytest

from robtui.errors import InputError
from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench, run_workbench
from robtui.tui.screens.assessment import AssessmentScreen
from robtui.tui.screens.dialogs import ListDialog
from robtui.tui.screens.overview import OverviewScreen
from robtui.tui.screens.start import ProblemScreen
from robtui.tui.session import STATUS_UNREADABLE
from robtui.tui.widgets.report_view import ReportView

from .conftest import SIZE
from .helpers import open_selected, settle

REVIEWER = "tess"


def test_run_workbench_refuses_a_missing_folder(tmp_path):
    with pytest.raises(InputError, match="review folder not found"):
        run_workbench(tmp_path / "nowhere", "tess")


def test_run_workbench_refuses_a_folder_that_is_not_a_review(tmp_path):
    with pytest.raises(InputError, match="not a review folder"):
        run_workbench(tmp_path, "tess")


def test_run_workbench_refuses_a_bad_reviewer_name(demo_dir):
    with pytest.raises(InputError, match="reviewer name"):
        run_workbench(demo_dir, "no spaces please")


async def test_app_on_a_folder_that_is_not_a_review_says_so(tmp_path):
    (tmp_path / "notes.txt").write_text("hello")
    app = Workbench(tmp_path, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert isinstance(app.screen, ProblemScreen)
        assert "not a review folder" in str(app.screen.query_one("#problem-message").render())
    assert sorted(p.name for p in tmp_path.iterdir()) == ["notes.txt"]  # nothing written


def _first_report(demo_dir: Path):
    folder = ReviewFolder.open(demo_dir)
    study = folder.review.studies[0]
    return folder, study, folder.report_path(study.reports[0])


@pytest.mark.parametrize("damage", ["gone", "changed"])
async def test_missing_or_changed_report_is_reported_and_answers_still_work(demo_dir, damage):
    _, study, path = _first_report(demo_dir)
    if damage == "gone":
        path.unlink()
    else:
        path.write_bytes(path.read_bytes() + b"\nan added line\n")
    app = Workbench(demo_dir, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        overview = app.screen
        assert isinstance(overview, OverviewScreen)
        first = next(iter(overview.rows.values()))
        assert first.study_id == study.id and first.problems  # flagged in the overview
        screen = await open_selected(pilot)
        view = screen.query_one("#report", ReportView)
        assert view.document is None
        message = str(view.options[0].prompt)
        assert "missing" in message or "no longer" in message or "sha256" in message, message
        assert "reports/" in message  # says what to do
        await pilot.press("y")  # the form is still usable
        await pilot.pause()
        assert screen.session.response(screen.question_id) == "Y"
        await pilot.press("q")  # no quote without the report: a warning, nothing attached
        await pilot.pause()
        assert screen.session.answer(screen.question_id).quotes == []
    if damage == "changed":
        assert path.read_bytes().endswith(b"an added line\n")  # the file was left alone


async def test_unreadable_assessment_is_reported_never_overwritten(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    study, result = folder.review.studies[0], folder.review.results[0]
    path = folder.assessment_path(REVIEWER, study.id, result.id)
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text('{"schema_version": 1, "reviewer": ', encoding="utf-8")
    before = path.read_bytes()
    app = Workbench(demo_dir, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        overview = app.screen
        assert isinstance(overview, OverviewScreen)
        row = overview.rows[f"{study.id}--{result.id}"]
        assert row.status == STATUS_UNREADABLE
        assert str(path.name) in row.problems[0] or "assessment" in row.problems[0]
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, ListDialog)
        assert "left exactly as it is" in app.screen.intro
        await pilot.press("escape")
        await pilot.pause()
        # the rest of the review is usable: the next result opens
        await pilot.press("down")
        await open_selected(pilot)
    assert path.read_bytes() == before


async def test_a_report_the_reader_cannot_read_is_a_message_not_a_crash(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    garbage = demo_dir / "broken.pdf"
    garbage.write_bytes(b"%PDF-1.4\nthis is not really a PDF\n")
    folder.add_study("broken", "Broken file", [garbage])
    app = Workbench(demo_dir, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        overview = app.screen
        keys = [r.study_id for r in overview.rows.values()]
        overview.query_one("#results").move_cursor(row=keys.index("broken"))
        screen = await open_selected(pilot)
        view = screen.query_one("#report", ReportView)
        assert view.document is None
        assert "broken.pdf" in str(view.options[0].prompt)
        await pilot.press("y")
        await pilot.pause()
        assert screen.session.response(screen.question_id) == "Y"


async def test_leaving_before_the_report_is_read_is_safe(demo_dir):
    app = Workbench(demo_dir, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("enter", "enter", "escape")  # open, then straight back
        await settle(pilot)
        assert isinstance(app.screen, OverviewScreen)
        await pilot.press("enter")
        await settle(pilot)
        assert isinstance(app.screen, AssessmentScreen)
