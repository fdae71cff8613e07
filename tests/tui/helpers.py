"""Helpers that drive the workbench with keys, as a reviewer would."""

from __future__ import annotations

from robtui.tui.screens.assessment import AssessmentScreen
from robtui.tui.widgets.question_list import QuestionList

KEY_FOR = {"Y": "y", "PY": "p", "PN": "m", "N": "n", "NI": "i", "NA": "a"}


async def settle(pilot) -> None:
    """Let workers (reading, ranking) finish and the screen catch up."""
    await pilot.app.workers.wait_for_complete()
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
