"""Every message (toast) can be read whole on an 80x24 terminal, and none covers a dialog's
title."""

from __future__ import annotations

import pytest
from textual.widgets._toast import Toast

from robtui.tui.app import Workbench
from robtui.tui.screens.assessment import AssessmentScreen

from .conftest import FixedRanker
from .helpers import LOW_PATH, answer_domain, said_on_screen, screen_lines, settle

RELOADED = ("this assessment was changed by another robtui process or an editor (answers to "
            "1.2, 2.1): it was read again and your change was saved on top of theirs; yours "
            "replaced theirs: 1.2 PY → N")  # save_queue.reloaded_message's longest form
LONG_WORD = ("could not save the assessment: /home/reviewer/reviews/sleep-trials-2026/"
             "assessments/ana/GOA--physical-activity-10-weeks.json is read-only")


async def _assessing(pilot) -> AssessmentScreen:
    await pilot.press("enter")
    await settle(pilot)
    assert isinstance(pilot.app.screen, AssessmentScreen)
    return pilot.app.screen


async def _read_whole(pilot, message: str) -> None:
    """The message's toast lies inside the screen, and every word of it can be read there
    (a word longer than the line folds onto the next: then its characters, in order)."""
    app = pilot.app
    width, height = app.size
    for _ in range(50):
        toasts = [t for t in app.screen.query(Toast) if t._notification.message == message]
        if toasts and toasts[0].region.height:
            break
        await pilot.pause(0.01)
    assert len(toasts) == 1
    await pilot.pause()
    region = toasts[0].region
    assert region.x >= 0 and region.right <= width, region
    assert region.y >= 0 and region.bottom <= height, region
    region = toasts[0].content_region  # inside its padding and coloured edge
    lines = screen_lines(app)[region.y:region.bottom]
    shown = [line[region.x:region.right] for line in lines]
    if said_on_screen(app, message, region):
        return
    assert "".join(message.split()) in "".join("".join(shown).split()), shown


@pytest.mark.parametrize("size", [(80, 24), (160, 48)])
async def test_long_messages_are_read_whole(demo_dir, size):
    app = Workbench(demo_dir, "tess", ranker_factory=FixedRanker)
    async with app.run_test(size=size, notifications=True) as pilot:
        await _assessing(pilot)
        for message in (RELOADED, LONG_WORD):
            app.notify(message, severity="warning")
            await _read_whole(pilot, message)
            app.clear_notifications()
            await pilot.pause()


@pytest.mark.parametrize(("key", "title"), [
    ("s", "Domain 1 summary"),
    ("o", "Override — domain 1: Bias arising from the randomisation process"),
])
async def test_a_message_leaves_the_dialog_title_in_view(demo_dir, key, title):
    app = Workbench(demo_dir, "tess", ranker_factory=FixedRanker)
    async with app.run_test(size=(80, 24), notifications=True) as pilot:
        await _assessing(pilot)
        await answer_domain(pilot, "1", LOW_PATH["1"])  # D1 judged: it may be overridden
        await pilot.press(key)
        await pilot.pause()
        before = screen_lines(app)
        row = next(i for i, line in enumerate(before) if title in line)
        app.notify(RELOADED, severity="warning")
        await _read_whole(pilot, RELOADED)
        assert screen_lines(app)[row] == before[row]  # the title's line, untouched
