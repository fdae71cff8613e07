"""Snapshots of the main screens at a fixed terminal size, on the demo review built in tmp.

Nothing in view depends on the clock or on the tmp path; the assessment screen's suggestions
come from a fixed stand-in ranker so that retrained weights do not change the picture. Update after a deliberate change
with `pytest tests/tui/test_snapshots.py --snapshot-update` and look at the new SVGs.
"""

from __future__ import annotations

from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench

from .conftest import SIZE, FixedRanker
from .helpers import settle

NEW_REVIEWER = "tess"


def _demo_reviewer(demo_dir) -> str:
    review = ReviewFolder.open(demo_dir).review
    return next(n for n in review.reviewers if n != review.lead)


def test_reviewer_screen(snap_compare, demo_dir):
    assert snap_compare(Workbench(demo_dir), terminal_size=SIZE)


def test_overview_of_a_reviewer_with_finished_work(snap_compare, demo_dir):
    assert snap_compare(Workbench(demo_dir, _demo_reviewer(demo_dir)), terminal_size=SIZE)


def test_assessment_screen_with_suggestions(snap_compare, demo_dir):
    async def open_and_answer(pilot):
        await pilot.press("enter", "enter")  # the result, then its effect
        await settle(pilot)
        await pilot.press("y", "j", "y", "right_square_bracket")
        await settle(pilot)

    app = Workbench(demo_dir, NEW_REVIEWER, ranker_factory=FixedRanker)
    assert snap_compare(app, terminal_size=SIZE, run_before=open_and_answer)


def test_help_screen(snap_compare, demo_dir):
    assert snap_compare(
        Workbench(demo_dir, NEW_REVIEWER), press=["question_mark"], terminal_size=SIZE
    )


def test_comparison_screen_for_the_lead(snap_compare, demo_dir):
    lead = ReviewFolder.open(demo_dir).review.lead
    assert snap_compare(Workbench(demo_dir, lead), press=["v"], terminal_size=SIZE)
