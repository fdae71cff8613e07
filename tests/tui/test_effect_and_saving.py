"""The effect of interest switches domain 2's questions; typed work survives quitting."""

from __future__ import annotations

from robtui.store.question_sets import builtin_question_set
from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.assessment import AssessmentScreen
from robtui.tui.screens.dialogs import EffectDialog

from .conftest import SIZE
from .helpers import open_selected, settle


async def test_effect_chosen_at_the_start_switches_domain_2(demo_dir):
    qset = builtin_question_set()
    adhering = [q.id + q.text for q in qset.domain("2", "adhering").questions]
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, EffectDialog)
        options = app.screen.query_one("#effect-options")
        if options.highlighted == 0:  # the result's default (assignment) is offered first
            await pilot.press("down")
        await pilot.press("enter")
        await settle(pilot)
        screen = app.screen
        assert isinstance(screen, AssessmentScreen)
        assert screen.session.effect == "adhering"
        await pilot.press("2")
        questions = screen.query_one("#questions")
        shown = [o.id + screen.session.question(o.id).text for o in questions.options]
        assert set(shown) <= set(adhering) and shown
        await pilot.press("t")  # change it back: domain 2 follows
        await pilot.pause()
        app.screen.query_one("#effect-options").highlighted = 0
        await pilot.press("enter")
        await settle(pilot)
        assert screen.session.effect == "assignment"
        assignment = {q.text for q in qset.domain("2", "assignment").questions}
        assert all(screen.session.question(o.id).text in assignment for o in questions.options)


def _first_saved(demo_dir):
    """tess's saved assessment of the overview's first row (first study, first result)."""
    review = ReviewFolder.open(demo_dir).review
    return ReviewFolder.open(demo_dir).load_assessment(
        "tess", review.studies[0].id, review.results[0].id
    )


async def test_justification_typed_just_before_quitting_is_saved(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        await open_selected(pilot)
        qid = app.screen.question_id
        await pilot.press("e", *"sealed", "ctrl+q")  # no pause for the save timer
    saved = _first_saved(demo_dir)
    assert saved.answers[qid].justification == "sealed"


async def test_justification_of_several_lines_is_saved_when_typing_pauses(demo_dir):
    from robtui.tui.screens.assessment import JUSTIFICATION_SAVE_DELAY
    from robtui.tui.widgets.justification import JustificationArea
    from robtui.tui.widgets.question_list import QuestionList

    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        qid = screen.question_id
        await pilot.press("e", *"one", "ctrl+j", *"two")
        assert isinstance(app.focused, JustificationArea)  # ctrl+j stayed in the field
        await pilot.pause(JUSTIFICATION_SAVE_DELAY * 2)  # a pause in typing saves
        on_disk = _first_saved(demo_dir)
        assert on_disk.answers[qid].justification == "one\ntwo"
        await pilot.press(*"!", "enter")  # enter: done, back to the questions
        await pilot.pause()
        assert isinstance(app.focused, QuestionList)
        assert screen.session.answer(qid).justification == "one\ntwo!"
        await pilot.press("j", "k")  # moving away and back shows the saved text
        await pilot.pause()
        assert screen.query_one("#justification").text == "one\ntwo!"
