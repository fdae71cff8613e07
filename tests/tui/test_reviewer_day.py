"""A reviewer's day at any terminal size: the reasons beside each proposal, guidance on demand,
live counts, suggestions stepped best first, the RoB 2 form's support and direction of bias,
and a whole assessment done at 80x24 without leaving the workbench."""

from __future__ import annotations

from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.assessment.quoting import CANDIDATE_NOTE
from robtui.tui.screens.dialogs import SupportDialog
from robtui.tui.widgets.key_hints import KeyHints
from robtui.tui.widgets.report_view import ReportView

from .conftest import SIZE
from .helpers import LOW_PATH, answer_domain, hint_lines, open_selected, plain, said_on_screen

SMALL = (80, 24)


def _reasons(screen) -> str:
    return plain(screen.query_one("#judgement").render())


async def test_the_reasons_show_the_path_in_words_and_an_early_judgement(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        assert "3 questions still to answer before a judgement: 1.1, 1.2, 1.3" in _reasons(screen)
        total = sum(len(screen.session.explanation(d).missing) for d in screen.session.domain_ids())
        assert f"3 to answer here · {total} in all" in _reasons(screen)
        await answer_domain(pilot, "1", {"1.2": "N"})
        said = _reasons(screen)
        assert "already decided by your answers" in said
        assert "1.2 answered N: allocation was not concealed → High" in said
        assert "High whatever the answers to 1.1, 1.3" in said
        assert f"2 to answer here · {total - 1} in all" in said
        assert "H" in plain(screen.query_one("#tab-1").render())  # the strip shows it too
        assert "domain 1 High → overall High" in said


async def test_guidance_on_demand_and_a_live_not_asked_count(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        questions = screen.query_one("#questions")
        guidance = screen.session.question(screen.question_id).guidance
        assert guidance[:30] not in plain(questions.get_option_at_index(0).prompt)
        await pilot.press("g")
        assert guidance[:30] in plain(questions.get_option_at_index(0).prompt)
        await pilot.press("g")
        assert guidance[:30] not in plain(questions.get_option_at_index(0).prompt)
        await answer_domain(pilot, "3", {"3.1": "Y"})  # the rest of domain 3 is not asked
        heading = plain(screen.query_one("#domain-heading").render())
        assert "3 questions not asked on this path" in heading
        await answer_domain(pilot, "3", {"3.1": "N"})  # at once, without leaving the domain
        heading = plain(screen.query_one("#domain-heading").render())
        assert "not asked on this path" not in heading or "3 questions" not in heading


async def test_suggestions_start_from_the_best_after_a_change_of_question(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        view = screen.query_one("#report", ReportView)
        await pilot.press("right_square_bracket", "right_square_bracket")
        first = screen.suggestions_for(screen.question_id)
        assert view.highlighted_sentence.index == first[1].sentence_index
        await pilot.press("j", "right_square_bracket")
        best = screen.suggestions_for(screen.question_id)[0]
        assert view.highlighted_sentence.index == best.sentence_index


async def test_support_and_direction_of_bias_are_saved(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        await pilot.press("r")
        assert isinstance(app.screen, SupportDialog)
        await pilot.press(*"groups alike", "enter", *["down"] * 4, "enter")  # NA is first
        await pilot.pause()
        assert "direction of bias: Towards null" in _reasons(screen)
        await pilot.press("R", *["down"] * 6, "enter")
        await pilot.pause()
        a = screen.session.assessment
    saved = ReviewFolder.open(demo_dir).load_assessment("tess", a.study_id, a.result_id)
    assert saved.support == {"1": "groups alike"}
    assert saved.direction == {"1": "towards_null", "overall": "unpredictable"}


async def test_while_typing_the_footer_shows_the_fields_keys(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        hints = screen.query_one(KeyHints)
        await pilot.press("e")
        assert "ctrl+j" in hints.render().plain and "override" not in hints.render().plain
        await pilot.press("escape")
        assert "override" in hints.render().plain


async def test_a_whole_assessment_at_80x24_without_leaving_the_workbench(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SMALL) as pilot:
        screen = await open_selected(pilot)
        hints = screen.query_one(KeyHints)
        lines = hint_lines(hints)
        assert len(lines) <= hints.size.height  # every hint in view, none cut off
        for needed in ("j/k", "1-5", "tab", "]/[", "q ", "e ", "o/O", "r/R", "c ", "esc", "?"):
            assert needed in " ".join(lines), needed
        assert screen.has_class("-narrow")
        report = screen.query_one("#report-panel")
        assert not report.display or not report.visible or report.region.width == 0
        await pilot.press("right_square_bracket")  # the report shows, at the suggestion
        await pilot.pause()
        assert screen.has_class("-reading") and screen.query_one("#report-panel").region.width
        await pilot.press("q")  # quote it for the focused question
        qid = screen.question_id
        assert screen.session.answer(qid).quotes
        await pilot.press("tab")
        await pilot.pause()
        assert not screen.has_class("-reading")
        for domain_id, answers in LOW_PATH.items():
            await answer_domain(pilot, domain_id, answers)
        await pilot.press("c")
        await pilot.pause()
        assert screen.session.is_complete
        assert "✓ complete" in _reasons(screen)


async def test_a_passage_across_sentences_and_part_of_a_sentence_are_quoted(demo_dir):
    from robtui.tui.screens.dialogs import QuotePartDialog

    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        view = screen.query_one("#report", ReportView)
        await pilot.press("tab")  # into the report
        first = view.highlighted_sentence
        await pilot.press("v", "down", "down")  # three sentences (headings are skipped)
        last = view.highlighted_sentence
        assert view.passage == (first, last) and last.index > first.index
        await pilot.press("q")
        qid = screen.question_id
        [quote] = screen.session.answer(qid).quotes
        text = screen.current.document.text
        assert (quote.start, quote.end) == (first.start, last.end)
        assert quote.text == text[first.start : last.end] and view.passage_start is None
        await pilot.press("Q")  # part of the highlighted sentence
        assert isinstance(app.screen, QuotePartDialog)
        await pilot.press("shift+right", "shift+right", "shift+right", "shift+right", "enter")
        await pilot.pause()
        quotes = screen.session.answer(qid).quotes
        assert len(quotes) == 2
        part = quotes[1]
        assert part.start == last.start and part.end == last.start + 4
        assert part.text == text[last.start : last.start + 4]


async def test_at_80x24_marking_a_passage_says_how_to_quote_it(demo_dir):
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_selected(pilot)
        await pilot.press("right_square_bracket", "v")
        await pilot.pause()
        note = screen.query_one("#candidate-note")  # under the report, at 80x24 too
        assert note.region.area and said_on_screen(app, "then q quotes it", note.region)


async def test_at_80x24_the_report_says_suggestions_are_candidates(demo_dir):
    """Where the suggestions are seen, on the smallest terminal too: candidates; you decide."""
    app = Workbench(demo_dir, "tess")
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_selected(pilot)
        note = screen.query_one("#candidate-note")
        await pilot.press("tab")  # the report, with its suggestions marked
        await pilot.pause()
        assert note.region.area and said_on_screen(app, CANDIDATE_NOTE, note.region)
        await pilot.press("right_square_bracket")  # a suggestion: its rank, "you decide"
        await pilot.pause()
        assert said_on_screen(app, "a candidate; you decide.", note.region)
