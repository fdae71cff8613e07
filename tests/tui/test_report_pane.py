"""The report beside the questions: suggestions with rank and score, jumping between them,
dismissing one (recorded for the review's learned model), searching, detaching a quote."""

from __future__ import annotations

from robtui.tui.app import Workbench
from robtui.tui.widgets.report_view import ReportView

from .conftest import SIZE
from .helpers import open_selected, plain, settle


async def test_suggestions_jump_dismiss_and_quote(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        view = screen.query_one("#report", ReportView)
        qid = screen.question_id
        suggestions = screen.suggestions_for(qid)
        assert suggestions, "the shipped ranker suggests sentences for the first question"
        scores = [s.score for s in suggestions]
        assert scores == sorted(scores, reverse=True)

        await pilot.press("right_square_bracket")
        assert view.highlighted_sentence.index == suggestions[0].sentence_index
        shown = plain(view.options[view.highlighted].prompt)
        assert f"#1 {suggestions[0].score:.2f}" in shown  # rank and score in the report
        await pilot.press("right_square_bracket")
        assert view.highlighted_sentence.index == suggestions[1].sentence_index
        await pilot.press("left_square_bracket")
        assert view.highlighted_sentence.index == suggestions[0].sentence_index

        await pilot.press("x")  # not evidence for this question
        await pilot.pause()
        dismissed = screen.session.assessment.dismissed
        assert [(d.question_id, d.start, d.end) for d in dismissed] == [
            (qid, suggestions[0].start, suggestions[0].end)
        ]
        assert suggestions[0].sentence_index not in [
            s.sentence_index for s in screen.suggestions_for(qid)
        ]

        await pilot.press("right_square_bracket", "q")
        await pilot.pause()
        assert len(screen.session.answer(qid).quotes) == 1
        await pilot.press("q")  # the same sentence again: detached
        await pilot.pause()
        assert screen.session.answer(qid).quotes == []


async def test_search_moves_to_matching_sentences(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        view = screen.query_one("#report", ReportView)
        document = view.document
        word = "randomi"  # every trial report says how it was randomised
        hits = [s.index for s in document.sentences if word in s.text.casefold()]
        assert len(hits) >= 2
        start = view.highlighted_sentence.index
        after = [i for i in hits if i > start] + [i for i in hits if i <= start]
        field = screen.query_one("#search")
        await pilot.press("slash", *word, "enter")
        await pilot.pause()
        assert view.highlighted_sentence.index == after[0]  # the next match after the cursor
        # the reviewer lands on it: the report has the keys (q would quote it), the field
        # stays open with the words
        assert screen.focused is view and field.display and field.value == word
        await pilot.press("slash", "enter")  # the words kept: the match after
        await pilot.pause()
        assert view.highlighted_sentence.index == after[1] and screen.focused is view
        await pilot.press("escape")  # closes the search, stays on the assessment
        await pilot.pause()
        assert screen.focused is view and not field.display and app.screen is screen
        await pilot.press("slash", *"zzqxj", "enter")  # no match: the words can be changed
        await pilot.pause()
        assert screen.focused is field and view.highlighted_sentence.index == after[1]
        await pilot.press("escape", "escape")  # closed, then back to the overview
        await pilot.pause()
        assert app.screen is not screen


async def test_search_shows_the_report_on_a_narrow_terminal(demo_dir):
    """At 80x24 one pane shows at a time: / from the questions brings the report and its
    search field into view, and enter lands on the match."""
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_selected(pilot)
        view = screen.query_one("#report", ReportView)
        field = screen.query_one("#search")
        assert not view.region.area  # the questions fill the screen
        await pilot.press("slash")
        await pilot.pause()
        assert screen.focused is field and field.region.area and view.region.area
        await pilot.press(*"randomi", "enter")
        await pilot.pause()
        assert screen.focused is view and "randomi" in view.highlighted_sentence.text.casefold()
        assert view.region.area


async def test_resizing_rewraps_the_report_and_keeps_the_place(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        view = screen.query_one("#report", ReportView)
        await pilot.press("right_square_bracket")
        here = view.highlighted_sentence.index
        wide = max(len(plain(o.prompt).splitlines()) for o in view.options)
        await pilot.resize_terminal(100, 42)
        await settle(pilot)
        assert view.highlighted_sentence.index == here
        narrow = max(len(plain(o.prompt).splitlines()) for o in view.options)
        assert narrow > wide  # the same sentences take more lines when narrower
