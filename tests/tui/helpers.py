"""Helpers that drive the workbench with keys, as a reviewer would."""

from __future__ import annotations

from robtui.tui.screens.assessment import AssessmentScreen
from robtui.tui.widgets.question_list import QuestionList
from robtui.tui.widgets.report_view import ReportView

KEY_FOR = {"Y": "y", "PY": "p", "PN": "m", "N": "n", "NI": "i", "NA": "a"}


async def settle(pilot) -> None:
    """Let workers (reading, ranking) finish, the report be laid out, the screen catch up."""
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()
    screen = pilot.app.screen
    if isinstance(screen, AssessmentScreen):
        view = screen.query_one("#report", ReportView)
        for _ in range(200):
            if view.laid_out:
                break
            await pilot.pause(0.01)
        assert view.laid_out
    await pilot.pause()


async def answer_domain(pilot, domain_id: str, wanted: dict[str, str]) -> None:
    """Go to the domain (its number key) and answer the questions in ``wanted`` with keys.

    Moves with j/k only; fails if a wanted question is never asked.
    """
    screen = pilot.app.screen
    assert isinstance(screen, AssessmentScreen)
    await pilot.press(domain_id)
    questions = screen.query_one("#questions", QuestionList)
    for qid, code in wanted.items():
        ids = [o.id for o in questions.options]
        assert qid in ids, f"{qid} not asked; asked are {ids}"
        while screen.question_id != qid:
            here = ids.index(screen.question_id)
            await pilot.press("j" if ids.index(qid) > here else "k")
        await pilot.press(KEY_FOR[code])
        await pilot.pause()


def plain(renderable, width: int = 160) -> str:
    """The text of a rich renderable (a prompt, a table), without styles."""
    import io

    from rich.console import Console

    console = Console(width=width, record=True, file=io.StringIO())
    console.print(renderable)
    return console.export_text()


async def open_selected(pilot) -> AssessmentScreen:
    """From the overview: enter on the selected result, then wait for the report and
    suggestions (the effect of interest is the result's: nothing is asked)."""
    await pilot.pause()
    await pilot.press("enter")
    await pilot.pause()
    await settle(pilot)
    assert isinstance(pilot.app.screen, AssessmentScreen)
    return pilot.app.screen


# One complete path per domain, all Low (RoB 2 algorithms, Sterne et al. BMJ 2019;366:l4898).
LOW_PATH = {
    "1": {"1.1": "Y", "1.2": "Y", "1.3": "N"},
    "2": {"2.1": "N", "2.2": "N", "2.6": "Y"},
    "3": {"3.1": "Y"},
    "4": {"4.1": "N", "4.2": "N", "4.3": "N"},
    "5": {"5.1": "Y", "5.2": "N", "5.3": "N"},
}


def hint_lines(hints) -> list[str]:
    """The key hints as the bar wraps them at its width."""
    return [line.plain for line in hints.render().wrap(hints.content_region.width)]


def screen_lines(app) -> list[str]:
    """The terminal's lines as the reviewer sees them now (every layer: toasts, dialogs)."""
    return [strip.text for strip in app.screen._compositor.render_strips()]


def said_on_screen(app, sentence: str, region=None) -> bool:
    """True when ``sentence`` can be read on the screen (or in ``region`` of it), wrapped over
    lines as it may be (its words in order, each whole on a line)."""
    lines = screen_lines(app)
    if region is not None:
        lines = [line[region.x:region.right] for line in lines[region.y:region.bottom]]
    words = " ".join(" ".join(lines).split())
    return " ".join(sentence.split()) in words
