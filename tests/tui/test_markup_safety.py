"""The workbench never reads user text as markup: searches and messages with brackets."""

from __future__ import annotations

import pytest

from robtui.tui.app import Workbench

from .conftest import SIZE
from .helpers import open_selected


@pytest.mark.parametrize("query", ["[/]", "[95% CI]", "[b]bold[/b]", "[link=x]y"])
async def test_search_text_with_brackets_is_shown_as_written(demo_dir, query):
    app = Workbench(demo_dir, "tess")
    shown: list[str] = []
    original = app.notify

    def record(message, **kwargs):
        shown.append(message)
        original(message, **kwargs)

    app.notify = record
    async with app.run_test(size=SIZE) as pilot:
        await open_selected(pilot)
        await pilot.press("slash", *query, "enter")
        await pilot.pause()
        assert app.is_running, "no markup error ended the app"
        assert any(query in message for message in shown), shown
        toasts = list(app._notifications)
        assert toasts and all(not t.markup for t in toasts if query in t.message)
