"""The lead's comparison screen: both reviewers side by side, differences first."""

from __future__ import annotations

from robtui.core.comparison import compare_pair
from robtui.store.question_sets import builtin_question_set
from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.compare import CompareScreen
from robtui.tui.session import ReviewSession

from .conftest import SIZE
from .helpers import plain


async def open_pair(pilot, pair) -> CompareScreen:
    """From the lead's overview: v, then the pair's result highlighted."""
    screen = await open_comparison(pilot)
    screen.query_one("#pairs").highlighted = screen.pairs.index(pair)
    await pilot.pause()
    return screen


async def open_comparison(pilot) -> CompareScreen:
    """From the lead's overview: v opens the comparison."""
    await pilot.pause()
    await pilot.press("v")
    await pilot.pause()
    assert isinstance(pilot.app.screen, CompareScreen)
    return pilot.app.screen


async def test_lead_sees_both_sides_differences_first(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    session = ReviewSession(folder, lead)
    a, b = session.comparable_reviewers()[:2]
    pairs, _ = session.comparison_pairs(a, b)
    qset = builtin_question_set(folder.review.question_set)
    comparable = [p for p in pairs if p.comparable]
    assert comparable, "the demo has complete assessments from both reviewers"
    differing = next(p for p in comparable if compare_pair(p, qset).n_differences)
    first = compare_pair(differing, qset).questions[0]
    assert first.differs  # differences are listed first

    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        await open_pair(pilot, differing)
        shown = app.export_screenshot()
        for text in (a, b, first.question_id, "≠"):
            assert text in shown
        await pilot.press("escape")
        await pilot.pause()
        assert not isinstance(app.screen, CompareScreen)


async def domain_1_of_a_result_to_settle(pilot, key: str):
    """The comparison on the first result still to settle; ``key`` (o: override, s: support
    and direction) then enter chooses the first judgement, domain 1."""
    screen = await open_comparison(pilot)
    index = next(i for i, p in enumerate(screen.pairs) if screen._state(p)[0] == 1)
    screen.query_one("#pairs").highlighted = index
    await pilot.pause()
    await pilot.press(key)
    await pilot.pause()
    await pilot.press("enter")
    await pilot.pause()
    return screen, screen.pairs[index]


def _files(root) -> dict[str, bytes]:
    return {str(p.relative_to(root)): p.read_bytes() for p in sorted(root.rglob("*.json"))}


async def test_lead_settles_every_difference_and_completes_the_consensus(demo_dir):
    from robtui.core.algorithm import propose_all
    from robtui.core.assessing import path_answers
    from robtui.core.consensus import pending_questions

    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    qset = builtin_question_set(folder.review.question_set)
    session = ReviewSession(folder, lead)
    a, b = session.comparable_reviewers()[:2]
    pairs, _ = session.comparison_pairs(a, b)
    # a result the demo's lead has not started a consensus for (the demo settles primary-itt)
    pair = next(
        p
        for p in pairs
        if p.comparable
        and compare_pair(p, qset).n_differences >= 2
        and folder.load_consensus(p.study_id, p.result_id) is None
    )
    reviewers_before = _files(demo_dir / "assessments")

    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_pair(pilot, pair)
        assert "not started" in str(screen.query_one("#consensus-status").render())
        titles = [command.title for command in app.get_system_commands(screen)]
        assert "Take reviewer A's answer" in titles and "New consensus answer" in titles
        assert "Consensus" in app.export_screenshot()  # the judgements column beside A and B
        await pilot.press("c")  # refused while differences are open
        await pilot.pause()
        assert folder.load_consensus(pair.study_id, pair.result_id) is None
        await pilot.press("tab")
        first = screen.focused_question
        # A note is required: enter on an empty note keeps the dialog open.
        await pilot.press("n", "enter", "enter")
        await pilot.pause()
        assert "A note is required" in str(app.screen.query_one("#settle-error").render())
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen is screen
        # The first difference gets a new answer (the question's first option) ...
        new_answer = qset.question(first, pair.a.effect).options[0]
        await pilot.press("n", "enter", *"discussed", "enter")
        await pilot.pause()
        # ... every other one takes A's answer, until nothing is pending.
        for _ in range(30):
            pending = pending_questions(screen.consensus, qset)
            if not pending:
                break
            assert screen.focused_question == pending[0]
            await pilot.press("a", *"as A", "enter")
            await pilot.pause()
        assert not pending_questions(screen.consensus, qset)
        await pilot.press("c")
        await pilot.pause()
        assert "✓ complete" in str(screen.query_one("#consensus-status").render())
        listed = screen.query_one("#pairs").get_option_at_index(screen.index).prompt
        assert "✓ done" in listed.plain
        # reopening a complete consensus asks first: n keeps it complete, y reopens it
        await pilot.press("c")
        await pilot.pause()
        assert app.screen is not screen
        await pilot.press("n")
        await pilot.pause()
        assert app.screen is screen and screen.consensus.status == "complete"
        assert ReviewFolder.open(demo_dir).load_consensus(pair.study_id, pair.result_id).status == (
            "complete"
        )
        await pilot.press("c", "y")
        await pilot.pause()
        assert screen.consensus.status == "draft"
        await pilot.press("c")  # completing needs no confirmation
        await pilot.pause()
        assert screen.consensus.status == "complete"

    saved = ReviewFolder.open(demo_dir).load_consensus(pair.study_id, pair.result_id)
    assert saved is not None and saved.status == "complete" and saved.lead == lead
    assert saved.reviewers == (a, b)
    agreed = path_answers(qset, saved.effect, saved.answers)
    by_a = path_answers(qset, pair.a.effect, pair.a.answers)
    assert agreed[first] == new_answer
    assert saved.decisions[first].source == "new" and saved.decisions[first].note == "discussed"
    for qid, decision in saved.decisions.items():
        if decision.source == "a":
            assert decision.note == "as A" and agreed.get(qid) == by_a.get(qid)
        if qid in agreed and qid != first:
            assert decision.source in ("agreed", "a")
    assert saved.proposed == propose_all(qset, saved.effect, agreed)
    assert saved.final == saved.proposed  # no override by the lead
    assert _files(demo_dir / "assessments") == reviewers_before  # reviewers' files untouched


async def test_an_unreadable_consensus_file_is_reported_and_left_alone(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    qset = builtin_question_set(folder.review.question_set)
    session = ReviewSession(folder, lead)
    pairs, _ = session.comparison_pairs(*session.comparable_reviewers()[:2])
    pair = next(p for p in pairs if p.comparable and compare_pair(p, qset).n_differences)
    path = folder.consensus_path(pair.study_id, pair.result_id)
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text("{ not json", encoding="utf-8")

    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_pair(pilot, pair)
        assert "cannot be read" in str(screen.query_one("#consensus-status").render())
        await pilot.press("tab", "a")  # refused: no dialog, nothing written
        await pilot.pause()
        assert app.screen is screen
        await pilot.press("c")
        await pilot.pause()
    assert path.read_text(encoding="utf-8") == "{ not json"


async def test_the_queue_puts_results_to_settle_first_with_progress_and_one_line_rows(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_comparison(pilot)
        assert isinstance(screen, CompareScreen)
        ranks = [screen._state(p)[0] for p in screen.pairs]
        assert ranks == sorted(ranks) and ranks[0] <= 1 and 3 in ranks
        listing = screen.query_one("#pairs")
        for i in range(listing.option_count):
            assert "\n" not in listing.get_option_at_index(i).prompt.plain  # compact rows
        title = str(screen.query_one("#compare-title").render())
        total = len(screen.pairs)
        assert f"of {total} results settled" in title and "to settle" in title
        await pilot.press("f")  # only those that need the lead
        await pilot.pause()
        assert all(screen._state(p)[0] <= 1 for p in screen.pairs) and screen.pairs
        assert len(screen.pairs) < total


async def test_moving_to_another_result_puts_the_cursor_on_its_first_question(demo_dir):
    from robtui.core.consensus import pending_questions

    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    qset = builtin_question_set(folder.review.question_set)
    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_comparison(pilot)
        open_ = [i for i, p in enumerate(screen.pairs) if screen._state(p)[0] == 1]
        assert len(open_) >= 2
        listing = screen.query_one("#pairs")
        listing.highlighted = open_[0]
        await pilot.pause()
        listing_q = screen.query_one("#differences")
        listing_q.highlighted = listing_q.option_count - 1  # the last question of this result
        await pilot.pause()
        listing.highlighted = open_[1]
        await pilot.pause()
        pending = pending_questions(screen.consensus, qset)
        assert screen.focused_question == (pending[0] if pending else screen.to_settle()[0])


async def test_the_lead_overrides_a_consensus_judgement_with_a_reason(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        screen, pair = await domain_1_of_a_result_to_settle(pilot, "o")
        proposed = screen.consensus.proposed["1"]
        choices = ("low", "some_concerns", "high")
        target = next(c for c in choices if c != proposed)
        for _ in range(choices.index(target)):
            await pilot.press("down")
        await pilot.press("enter", *"allocation list was on the ward wall", "enter")
        await pilot.pause()
        assert app.screen is screen
    saved = ReviewFolder.open(demo_dir).load_consensus(pair.study_id, pair.result_id)
    assert saved.overrides["1"].judgement == target and saved.final["1"] == target
    assert saved.overrides["1"].reason == "allocation list was on the ward wall"


async def test_a_stale_consensus_is_flagged_on_the_screen(demo_dir):
    from robtui.core import assessing

    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    qset = builtin_question_set(folder.review.question_set)
    records, _ = folder.consensus_records()
    done = next(c for c in records if c.status == "complete")
    b_name = done.reviewers[1]
    b = folder.load_assessment(b_name, done.study_id, done.result_id)
    qid = next(iter(assessing.path_answers(qset, b.effect, b.answers)))
    old = b.answers[qid].response
    new = next(o for o in qset.question(qid, b.effect).options if o != old)
    b = assessing.mark_complete(assessing.set_response(assessing.reopen(b), qset, qid, new), qset)
    folder.save_assessment(b)
    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_comparison(pilot)
        first = screen.pairs[0]
        assert (first.study_id, first.result_id) == (done.study_id, done.result_id)
        assert "stale" in screen.query_one("#pairs").get_option_at_index(0).prompt.plain
        status = str(screen.query_one("#consensus-status").render())
        assert "stale" in status and f"{b_name}: {qid} {old} -> {new}" in status


async def test_the_panes_keep_their_marks_and_words_at_80_and_110_columns(demo_dir):
    from rich.console import Console

    from robtui.tui.screens.compare import judgements_table

    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    for size in ((80, 24), (110, 32)):
        app = Workbench(demo_dir, lead)
        async with app.run_test(size=size) as pilot:
            screen = await open_comparison(pilot)
            differing = next(
                i
                for i, p in enumerate(screen.pairs)
                if p.comparable
                and compare_pair(p, screen.session.qset_for(p.study_id)).n_differences
            )
            screen.query_one("#pairs").highlighted = differing
            await pilot.pause()
            pair = screen.pairs[differing]
            if size[0] < 100:  # narrow: one pane at a time; tab shows the differences
                await pilot.press("tab")
                await pilot.pause()  # let the layout follow the pane change on a busy machine
                assert not screen.query_one("#pairs").display
            # the differences pane is not squeezed beside the judgements (it was 12 columns)
            assert screen.query_one("#differences").size.width >= size[0] - 36 - 4
            table = screen.query_one("#consensus-judgements")
            console = Console(width=table.size.width, record=True)
            qset = screen.session.qset_for(pair.study_id)
            console.print(judgements_table(pair, qset, screen.consensus))
            shown = console.export_text()
            assert "≠" in shown and "Overall" in shown and "Consensus" in shown, shown
            assert "…" not in shown, shown  # no word cut


async def test_the_lead_settles_support_and_direction_seeing_both_reviewers(demo_dir):
    from robtui.tui.screens.dialogs import SupportDialog

    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        screen, pair = await domain_1_of_a_result_to_settle(pilot, "s")
        assert isinstance(app.screen, SupportDialog)
        note = str(app.screen.query(".dialog-note").first().render())
        assert f"{pair.reviewer_a}:" in note and f"{pair.reviewer_b}:" in note
        await pilot.press(*"allocation by a remote service", "enter", *["down"] * 4, "enter")
        await pilot.pause()
        assert app.screen is screen
        detail = plain(screen.query_one("#pair-detail").content)
        assert "allocation by a remote service" in detail and "Towards null" in detail
    saved = ReviewFolder.open(demo_dir).load_consensus(pair.study_id, pair.result_id)
    assert saved.support["1"] == "allocation by a remote service"
    assert saved.direction["1"] == "towards_null"


async def test_a_complete_consensus_refuses_changes_as_the_command_line_does(demo_dir):
    from robtui.core.consensus import draft_problem

    folder = ReviewFolder.open(demo_dir)
    lead = folder.review.lead
    records, _ = folder.consensus_records()
    done = next(c for c in records if c.status == "complete")
    before = folder.consensus_path(done.study_id, done.result_id).read_bytes()
    app = Workbench(demo_dir, lead)
    async with app.run_test(size=SIZE) as pilot:
        screen = await open_comparison(pilot)
        keys = [p.key for p in screen.pairs]
        screen.query_one("#pairs").highlighted = keys.index((done.study_id, done.result_id))
        await pilot.pause()
        for key in ("o", "s"):
            await pilot.press(key)
            await pilot.pause()
            assert app.screen is screen  # no dialog opens
        shown = [n.message for n in app._notifications]
    assert draft_problem(done, "a judgement") in shown
    assert draft_problem(done, "its support and direction of bias") in shown
    assert folder.consensus_path(done.study_id, done.result_id).read_bytes() == before


async def test_at_80x24_tab_shows_one_pane_at_a_time_with_every_judgement(demo_dir):
    lead = ReviewFolder.open(demo_dir).review.lead
    app = Workbench(demo_dir, lead)
    async with app.run_test(size=(80, 24)) as pilot:
        screen = await open_comparison(pilot)
        side = screen.query_one("#compare-side")
        assert screen.query_one("#pairs").size.width >= 76 and not side.display
        await pilot.press("tab")
        await pilot.pause()  # the pane change is laid out before sizes are read
        assert screen.focused.id == "differences" and side.display
        table = screen.query_one("#consensus-judgements")
        assert table.region.bottom <= 24 - 3  # every row above the three lines of keys
        assert "Overall" in plain(table.content)
        await pilot.press("tab")
        await pilot.pause()  # the pane change is laid out before sizes are read
        assert screen.focused.id == "pair-scroll"
        assert screen.query_one("#pair-scroll").size.height >= 10
        assert "Support and direction of bias" in plain(screen.query_one("#pair-detail").content)
        await pilot.press("tab")
        await pilot.pause()  # the pane change is laid out before sizes are read
        assert screen.focused.id == "pairs" and not side.display
        await pilot.press("shift+tab")
        await pilot.pause()  # the pane change is laid out before sizes are read
        assert screen.focused.id == "pair-scroll"
