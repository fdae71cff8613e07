"""Every save from the workbench records the rules version; older ones get a second look."""

from __future__ import annotations

from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.overview import OverviewScreen

from .conftest import SIZE
from .helpers import open_selected
from .test_rules_beside import write_rules


def _demo_reviewer(folder: ReviewFolder) -> str:
    return next(n for n in folder.review.reviewers if n != folder.review.lead)


async def test_a_save_from_the_workbench_records_the_current_rules_version(demo_dir):
    write_rules(demo_dir)  # rules version 3
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        qid = screen.question_id
        await pilot.press("y")
        await pilot.pause()
        study, result = screen.session.assessment.study_id, screen.session.assessment.result_id
    saved = ReviewFolder.open(demo_dir).load_assessment("tess", study, result)
    assert saved.answers[qid].response == "Y"
    assert saved.rules_version == 3


async def test_assessments_made_under_older_rules_are_listed_for_a_second_look(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    me = _demo_reviewer(folder)
    mine, _ = folder.assessments(me)
    assert mine and all(a.rules_version in (None, 0) for a in mine)  # made before any rule
    total = len(folder.review.studies) * len(folder.review.results)
    write_rules(demo_dir)
    app = Workbench(demo_dir, me)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, OverviewScreen)
        table = screen.query_one("#results")
        assert f"rules changed ({len(mine)})" in str(screen.query_one("#overview-filter").render())
        assert "↻ answering rules changed" in str(screen.query_one("#overview-detail").render())
        assert "new rules: R1 (1.1), R3 (1.2)" in str(screen.query_one("#overview-detail").render())
        while screen.filter != "rules changed":
            await pilot.press("f")
        await pilot.pause()
        assert table.row_count == len(mine) == total
        first = screen.rows[screen.selected_key]
        # Looking around a complete assessment is not a second look: the version stays.
        assessment_screen = await open_selected(pilot)
        await pilot.press("j", "j")
        await pilot.pause()
        kept = ReviewFolder.open(demo_dir).load_assessment(me, first.study_id, first.result_id)
        assert kept.rules_version in (None, 0)
        # Reopening and completing again is: it is saved under the current rules.
        await pilot.press("c")
        await pilot.pause()
        await pilot.press("c")
        await pilot.pause()
        assert assessment_screen.session.is_complete
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen is screen
        assert table.row_count == len(mine) - 1
    again = ReviewFolder.open(demo_dir).load_assessment(me, first.study_id, first.result_id)
    assert again.rules_version == 3 and again.status == "complete"
