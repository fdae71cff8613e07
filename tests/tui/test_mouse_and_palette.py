"""Mouse and command palette reach the same actions as the keys."""

from __future__ import annotations

from robtui.tui.app import Workbench
from robtui.tui.screens.dialogs import TextDialog
from robtui.tui.screens.help import HelpScreen

from .conftest import SIZE
from .helpers import hint_lines, open_selected, plain


async def test_clicks_choose_domain_and_answer(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        await pilot.click("#tab-3")
        await pilot.pause()
        assert screen.domain_id == "3"
        assert screen.question_id == "3.1"
        questions = screen.query_one("#questions")

        def asked() -> list[str]:
            return [o.id for o in questions.options]

        assert "3.2" not in asked()
        # RoB 2 asks 3.2 only when 3.1 is N/PN/NI (the question set's condition)
        await pilot.click("#answer-N")
        await pilot.pause()
        assert screen.session.response("3.1") == "N"
        assert "3.2" in asked()  # appears, with the reason it is asked
        reason = plain(questions.get_option("3.2").prompt)
        assert "asked if" in reason and "3.1" in reason
        await pilot.click("#answer-Y")
        await pilot.pause()
        assert "3.2" not in asked()  # and vanishes again
        assert screen.session.final("3") == "low"


async def test_palette_runs_the_domain_summary(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        await open_selected(pilot)
        await pilot.press("ctrl+p")
        await pilot.pause()
        await pilot.press(*"Domain summary")
        await pilot.pause(0.3)  # the palette searches in the background
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, TextDialog)
        await pilot.press("escape")
        await pilot.press("question_mark")
        await pilot.pause()
        assert isinstance(app.screen, HelpScreen)


async def test_clicking_a_key_hint_runs_it(demo_dir):
    from robtui.tui.widgets.key_hints import KeyHints

    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        hints = screen.query_one(KeyHints)
        lines = hint_lines(hints)
        assert "summary" in " ".join(lines) and "quote" in " ".join(lines)  # always in view
        row, column = next(
            (n, text.index(" summary")) for n, text in enumerate(lines) if " summary" in text
        )
        await pilot.click(KeyHints, offset=(column + 2, row))
        await pilot.pause()
        assert isinstance(app.screen, TextDialog)
