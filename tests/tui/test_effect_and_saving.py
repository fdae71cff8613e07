"""The effect of interest switches domain 2's questions; typed work survives quitting."""

from __future__ import annotations

from textual.widgets import Static

from robtui.store.question_sets import builtin_question_set
from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench

from .conftest import SIZE
from .helpers import open_selected


async def test_the_effect_is_the_results_never_asked_and_not_changed_by_the_reviewer(demo_dir):
    qset = builtin_question_set()
    review = ReviewFolder.open(demo_dir).review
    adhering_result = next(r for r in review.results if r.effect == "adhering")
    adhering = {q.id + q.text for q in qset.domain("2", "adhering").questions}
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        table = app.screen.query_one("#results")
        keys = list(app.screen.rows)
        table.move_cursor(row=keys.index(f"{review.studies[0].id}--{adhering_result.id}"))
        screen = await open_selected(pilot)  # no dialog: straight to the questions
        assert screen.session.effect == "adhering"
        await pilot.press("2")
        questions = screen.query_one("#questions")
        shown = {o.id + screen.session.question(o.id).text for o in questions.options}
        assert shown and shown <= adhering
        await pilot.press("t")  # says where the effect comes from; changes nothing
        await pilot.pause()
        said = " ".join(str(w.render()) for w in app.screen.query(Static))
        assert "set for this result" in said and "lead" in said
        await pilot.press("escape")
        assert screen.session.effect == "adhering"
    saved = ReviewFolder.open(demo_dir).load_assessment(
        "tess", review.studies[0].id, adhering_result.id
    )
    assert saved.effect == "adhering"


async def test_a_draft_made_for_another_effect_follows_the_result(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    review = folder.review
    study, result = review.studies[0], review.results[0]
    assert result.effect == "assignment"
    from robtui.core import assessing

    old = assessing.new_assessment(review, study.id, result.id, "tess", builtin_question_set())
    old = assessing.set_effect(old, builtin_question_set(), "adhering")  # an older file
    folder.save_assessment(old)
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        assert screen.session.effect == "assignment"
    assert ReviewFolder.open(demo_dir).load_assessment("tess", study.id, result.id).effect == (
        "assignment"
    )


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
    from robtui.tui.screens.assessment.justifying import JUSTIFICATION_SAVE_DELAY
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
