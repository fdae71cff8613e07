"""The overview: studies × results, filtered by status; several documents per study."""

from __future__ import annotations

from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.overview import OverviewScreen

from .conftest import SIZE
from .helpers import open_selected


async def test_filter_by_status(demo_dir):
    review = ReviewFolder.open(demo_dir).review
    me = next(n for n in review.reviewers if n != review.lead)
    total = len(review.studies) * len(review.results)
    app = Workbench(demo_dir, me)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, OverviewScreen)
        table = screen.query_one("#results")
        assert screen.filter == "all" and table.row_count == total
        seen = {}
        for _ in range(4):
            await pilot.press("f")
            await pilot.pause()
            seen[screen.filter] = table.row_count
        assert seen == {"not started": 0, "draft": 0, "complete": total, "file problems": 0}
        assert "No result matches" in str(screen.query_one("#overview-detail").render())


async def test_next_document_of_a_study(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    study = folder.review.studies[0]
    assert len(study.reports) >= 2, "the demo's studies come as PDF and text"
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        first = screen.current.document.sha256
        heading = str(screen.query_one("#report-heading").render())
        assert "document 1 of" in heading and heading.startswith("report: ")  # its kind
        also = heading.split("also ", 1)[1]  # the others by kind, a file where kinds repeat
        assert also.startswith("report ") and ".txt, protocol, registry record" in also
        await pilot.press("d")
        await pilot.pause()
        assert screen.current.document.sha256 != first
        assert "document 2 of" in str(screen.query_one("#report-heading").render())
        sentence = screen.query_one("#report").highlighted_sentence
        await pilot.press("q")  # a quote records the document it came from
        await pilot.pause()
        quote = screen.session.answer(screen.question_id).quotes[0]
        assert quote.document_sha256 == screen.current.document.sha256
        assert (quote.start, quote.end) == (sentence.start, sentence.end)
