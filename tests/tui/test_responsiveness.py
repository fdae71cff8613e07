"""Reading and ranking run in a worker: a progress line shows, and keys keep working."""

from __future__ import annotations

import re
import threading

from robtui.tui.app import Workbench
from robtui.tui.report_loading import shared_ranker
from robtui.tui.screens.assessment import AssessmentScreen

from .conftest import SIZE
from .helpers import settle


class HeldRanker:
    """The real ranker, held back until the test lets it go (the point: a slow ranking)."""

    def __init__(self) -> None:
        self.release = threading.Event()
        self.real = shared_ranker()
        self.no_evidence_threshold = self.real.no_evidence_threshold

    def rank(self, *args, **kwargs):
        assert self.release.wait(timeout=20), "the test never released the ranker"
        return self.real.rank(*args, **kwargs)


async def test_keys_work_while_the_report_is_being_ranked(demo_dir):
    held = HeldRanker()
    app = Workbench(demo_dir, "tess", ranker_factory=lambda: held)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("enter", "enter")
        screen = app.screen
        assert isinstance(screen, AssessmentScreen)
        progress = label = screen.query_one("#report-progress")
        for _ in range(400):  # reading first (quick when cached), then ranking, held
            if "Ranking" in str(label.render()):
                break
            await pilot.pause(0.025)
        assert progress.display
        assert "Ranking" in str(label.render())
        await pilot.press("right_square_bracket")  # no suggestions yet: says why
        await pilot.pause()
        said = [n.message for n in app._notifications]
        assert any("still being read" in m for m in said), said
        assert not any("no suggested sentences" in m for m in said), said
        await pilot.press("y")  # the interface answers while the worker waits
        await pilot.pause()
        assert screen.session.response(screen.question_id) == "Y"
        assert screen.session.final("1") == "incomplete"
        await pilot.pause(1.2)  # the line counts the seconds, so a long stage shows it is alive
        assert re.search(r"Ranking .* [1-9]\d* s$", str(label.render())), str(label.render())
        held.release.set()
        await settle(pilot)
        assert not progress.display
        assert screen.suggestions_for(screen.question_id)
