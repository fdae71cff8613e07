"""Answering rules beside the focused question; an invalid rules file leaves them unavailable."""

from __future__ import annotations

from robtui.core.rules import add_rule
from robtui.store.question_sets import review_question_set
from robtui.store.review_folder import ReviewFolder
from robtui.store.rules_file import load_folder_rules, save_rulebook
from robtui.tui.app import Workbench

from .conftest import SIZE
from .helpers import open_selected


def write_rules(demo_dir) -> None:
    """Three rules through the store API: one for 1.1 on every result, one for 1.1 that the
    demo's results do not meet (outcome type unset there), one for 1.2."""
    folder = ReviewFolder.open(demo_dir)
    qset = review_question_set(folder)
    book = load_folder_rules(folder)
    new = add_rule(book, "1.1", "Sealed envelopes alone count as PY, not Y.", answer="PY")
    new = add_rule(
        new,
        "1.1",
        "Objective outcomes only: never shown here.",
        when=[("outcome_type", "objective")],
    )
    new = add_rule(new, "1.2", "A central web service counts as concealed.")
    save_rulebook(folder.rules_path, new, expected_version=book.version, qset=qset)


async def test_rules_that_apply_are_shown_beside_the_focused_question(demo_dir):
    write_rules(demo_dir)
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        assert screen.question_id == "1.1"
        shown = str(screen.query_one("#rules").render())
        assert "Answering rules for 1.1 (rules v3)" in shown
        assert "Sealed envelopes alone count as PY" in shown and "→ PY" in shown
        assert "Objective outcomes only" not in shown  # its condition does not hold
        assert "central web service" not in shown  # another question's rule
        await pilot.press("j")
        await pilot.pause()
        assert screen.question_id == "1.2"
        shown = str(screen.query_one("#rules").render())
        assert "central web service" in shown and "Sealed envelopes" not in shown
        await pilot.press("j")
        await pilot.pause()
        assert "none for 1.3" in str(screen.query_one("#rules").render())


async def test_an_invalid_rules_file_says_why_and_the_rest_works(demo_dir):
    rules = ReviewFolder.open(demo_dir).rules_path
    rules.write_text('schema_version = 1\nversion = "two"\n[[rules\n', encoding="utf-8")
    before = rules.read_bytes()
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        title = str(app.screen.query_one("#overview-title").render())
        assert "answering rules unavailable" in title
        screen = await open_selected(pilot)
        shown = str(screen.query_one("#rules").render())
        assert "answering rules unavailable" in shown
        assert "rules.toml" in shown and "not valid TOML" in shown
        qid = screen.question_id
        await pilot.press("y")
        await pilot.pause()
        assert screen.session.response(qid) == "Y"
        assert screen.session.proposed("1") is not None
    saved = ReviewFolder.open(demo_dir).load_assessment(
        "tess", screen.session.assessment.study_id, screen.session.assessment.result_id
    )
    assert saved.answers[qid].response == "Y"
    assert saved.rules_version is None  # unknown: listed for a second look once readable
    assert rules.read_bytes() == before  # never replaced


async def test_without_rules_the_panel_stays_hidden(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        assert not screen.query_one("#rules").display
