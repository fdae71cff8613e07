"""The lead's comparison screen: both reviewers side by side, differences first."""

from __future__ import annotations

from robtui.core.comparison import compare_pair
from robtui.core.questions import builtin_question_set
from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.compare import CompareScreen
from robtui.tui.session import ReviewSession

from .conftest import SIZE


async def test_lead_sees_both_sides_differences_first(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    session = ReviewSession(folder, lead)
    a, b = session.comparable_reviewers()[:2]
    pairs, _ = session.comparison_pairs(a, b)
    qset = builtin_question_set(folder.review.question_set)
    comparable = [p for p in pairs if p.comparable]
    assert comparable, "the demo has complete assessments from both reviewers"
    differing = next(p for p in comparable if compare_pair(p, qset).n_differences)
    first = compare_pair(differing, qset).questions[0]
    assert first.differs  # differences are listed first

    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("v")
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, CompareScreen)
        index = screen.pairs.index(differing)
        screen.query_one("#pairs").highlighted = index
        await pilot.pause()
        shown = app.export_screenshot()
        for text in (a, b, first.question_id, "≠"):
            assert text in shown
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, CompareScreen)
