"""A complete assessment driven with keys: answer, quote, justify, see the judgement,
override with a reason, mark complete, reopen and find everything.

Expected judgements follow the RoB 2 algorithm (Sterne et al., BMJ 2019;366:l4898): with a
random, concealed sequence and no baseline problem domain 1 is Low; the other domains'
answers below are each domain's low-risk path (read from the method's flowcharts, from
memory, and checked by the question set's own rule tables).
"""

from __future__ import annotations

from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.assessment import AssessmentScreen
from robtui.tui.screens.dialogs import ListDialog, OverrideDialog
from robtui.tui.screens.overview import OverviewScreen
from robtui.tui.widgets.report_view import ReportView

from .conftest import SIZE
from .helpers import LOW_PATH, answer_domain, open_selected

REVIEWER = "tess"  # not one of the demo's reviewers: a fresh assessment


def screen_text(widget) -> str:
    return str(widget.render())


async def test_complete_assessment_then_reopen(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    study = folder.review.studies[0]
    result = folder.review.results[0]
    report = study.reports[0]

    app = Workbench(demo_dir, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        screen = await open_selected(pilot)
        assert screen.session.assessment.study_id == study.id
        assert screen.session.assessment.result_id == result.id
        assert screen.session.effect == result.effect

        # domain 1: answer with keys, the proposal appears at once
        await answer_domain(pilot, "1", LOW_PATH["1"])
        assert screen.session.final("1") == "low"
        assert "Low" in screen_text(screen.query_one("#judgement"))

        # attach the report's highlighted sentence to 1.3 as a supporting quote
        view = screen.query_one("#report", ReportView)
        await pilot.press("tab")
        assert screen.focused is view
        await pilot.press("down", "down", "down")
        sentence = view.highlighted_sentence
        assert sentence is not None
        await pilot.press("q")
        await pilot.pause()
        quotes = screen.session.answer("1.3").quotes
        assert len(quotes) == 1
        assert (quotes[0].start, quotes[0].end, quotes[0].page) == (
            sentence.start,
            sentence.end,
            sentence.page,
        )
        assert quotes[0].document_sha256 == report.sha256

        # a justification for 1.3
        await pilot.press("tab")  # back to the questions
        await pilot.press("e")
        await pilot.press(*"alike")
        await pilot.press("enter")
        await pilot.pause()
        assert screen.session.answer("1.3").justification == "alike"

        # not complete yet: the dialog lists what is missing
        await pilot.press("c")
        await pilot.pause()
        assert isinstance(app.screen, ListDialog)
        assert any("domain 2" in line for line in app.screen.lines)
        await pilot.press("escape")
        await pilot.pause()

        for domain_id in ("2", "3", "4", "5"):
            await answer_domain(pilot, domain_id, LOW_PATH[domain_id])
        assert screen.session.final("overall") == "low"

        # override domain 1 with a reason; the overall follows
        await pilot.press("1", "o")
        await pilot.pause()
        assert isinstance(app.screen, OverrideDialog)
        await pilot.press("down", "enter")  # some concerns, then on to the reason
        await pilot.press("enter")  # an empty reason is refused
        await pilot.pause()
        assert isinstance(app.screen, OverrideDialog)
        assert "needs a reason" in screen_text(app.screen.query_one("#override-error"))
        await pilot.press(*"small")
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, AssessmentScreen)
        assert screen.session.final("1") == "some_concerns"
        assert screen.session.final("overall") == "some_concerns"
        assert "Some concerns" in screen_text(screen.query_one("#judgement"))

        await pilot.press("c")
        await pilot.pause()
        assert screen.session.is_complete
        await app.workers.wait_for_complete()  # the reviewer's ranker learns in a worker
        await pilot.press("y")  # complete: answers are locked
        await pilot.pause()
        assert screen.session.response("1.1") == "Y"
        await pilot.press("escape")
        await pilot.pause()
        assert isinstance(app.screen, OverviewScreen)

    # on disk, exactly as left
    saved = ReviewFolder.open(demo_dir).load_assessment(REVIEWER, study.id, result.id)
    assert saved.status == "complete"
    # completing taught the reviewer's own ranker: the quote is a positive for 1.3
    from robtui.evidence.review_model import load_review_model

    learned = load_review_model(ReviewFolder.open(demo_dir).learned_dir_for(REVIEWER))
    assert any(
        e.positive and e.key == "1.3" and e.text == saved.answers["1.3"].quotes[0].text
        for e in learned.examples
    )
    assert saved.overrides["1"].reason == "small"
    assert saved.answers["1.3"].justification == "alike"

    # reopen: everything is there, and the form resumes at the last question
    app = Workbench(demo_dir, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        screen = await open_selected(pilot)
        s = screen.session
        assert s.is_complete
        for domain_id, wanted in LOW_PATH.items():
            for qid, code in wanted.items():
                assert s.response(qid) == code
        assert len(s.answer("1.3").quotes) == 1
        assert s.final("1") == "some_concerns"
        assert screen.domain_id == s.domain_of(saved.last_question)
        assert screen.question_id == saved.last_question
        await pilot.press("c")  # reopen for changes
        await pilot.pause()
        assert not s.is_complete


async def test_choosing_the_proposal_again_removes_an_override(demo_dir):
    app = Workbench(demo_dir, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_selected(pilot)
        await answer_domain(pilot, "1", LOW_PATH["1"])
        screen.session.set_override("1", "high", "prepared for this test")
        await pilot.press("o")
        await pilot.pause()
        dialog = app.screen
        assert isinstance(dialog, OverrideDialog)
        dialog.query_one("#override-options").highlighted = 0  # low, the proposal
        await pilot.press("enter", "enter")
        await pilot.pause()
        assert isinstance(app.screen, AssessmentScreen)
        assert screen.session.override("1") is None
        assert screen.session.final("1") == "low"
