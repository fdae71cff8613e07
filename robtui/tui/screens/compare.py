"""The lead's comparison: two reviewers' complete assessments side by side, differences first,
and the consensus: the lead settles each difference (take A, take B or a new answer, always
with a note) while the consensus judgements are recomputed beside A's and B's. Consensus
records are saved apart from both reviewers' files (ReviewFolder.save_consensus).

Only reachable when the review is opened as its lead (ReviewSession.comparison_pairs refuses
anyone else), so a reviewer's own session stays blind to the other's work.
"""

from __future__ import annotations

from itertools import combinations
from typing import ClassVar

from rich import box
from rich.table import Table
from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import Screen
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option

from robtui.core.assessing import path_answers
from robtui.core.comparison import AssessmentPair, compare_pair, differences
from robtui.core.consensus import (
    complete_consensus,
    pending_questions,
    reopen_consensus,
    settle,
    start_consensus,
)
from robtui.core.model import OVERALL, Consensus
from robtui.errors import RobtuiError
from robtui.tui.palette import badge
from robtui.tui.screens.dialogs import SettleChoice, SettleDialog
from robtui.tui.session import ReviewSession
from robtui.tui.widgets.key_hints import KeyHints


def _side(response: str | None, justification: str, quotes) -> Text:
    text = Text(response or "—", style="bold" if response else "dim")
    if justification:
        text.append(f"\n✎ {justification}")
    for quote in quotes:
        page = f"p.{quote.page}" if quote.page else "no page"
        text.append(f"\n❝ {quote.text} ", style="italic")
        text.append(f"({page})", style="dim")
    return text


def pair_detail(pair: AssessmentPair, qset) -> Table | Text:
    """The signalling questions of one pair, both sides with justifications and quotes;
    differences first."""
    if not pair.comparable:
        return Text(f"Not compared: {pair.problem}", style="bold")
    comparison = compare_pair(pair, qset)
    n = comparison.n_differences
    questions = Table(
        title=f"Signalling questions: {n} difference{'s' if n != 1 else ''} (listed first)",
        title_justify="left",
        expand=True,
        show_lines=True,
    )
    questions.add_column("", width=1)
    questions.add_column("Question", ratio=2)
    questions.add_column(pair.reviewer_a, ratio=3)
    questions.add_column(pair.reviewer_b, ratio=3)
    for q in comparison.questions:
        questions.add_row(
            "≠" if q.differs else "",
            Text(f"{q.question_id} {q.short or q.text}", style="bold" if q.differs else ""),
            _side(q.response_a, q.justification_a, q.quotes_a),
            _side(q.response_b, q.justification_b, q.quotes_b),
        )
    return questions


def judgements_table(pair: AssessmentPair, qset, consensus: Consensus | None) -> Table:
    """Domain and overall judgements: A's and B's final ones, and the consensus recomputed by
    the algorithm from the agreed answers."""
    table = Table(
        title="Judgements (consensus recomputed from the agreed answers)",
        title_justify="left",
        expand=True,
        box=box.SIMPLE_HEAD,
        show_edge=False,
        pad_edge=False,
    )
    table.add_column("", width=1)
    table.add_column("", no_wrap=True)
    for name in (pair.reviewer_a, pair.reviewer_b, "Consensus"):
        table.add_column(name, no_wrap=True, overflow="ellipsis")
    for row in compare_pair(pair, qset).judgements:
        cells = []
        for final, reason in ((row.final_a, row.override_a), (row.final_b, row.override_b)):
            cell = badge(final)
            if reason:
                cell.append(" (overridden)", style="italic")
            cells.append(cell)
        agreed = badge(consensus.final.get(row.key)) if consensus else Text("—", style="dim")
        if consensus and row.key in consensus.overrides:
            agreed.append(" (overridden)", style="italic")
        label = "Overall" if row.key == OVERALL else f"D{row.key}"
        table.add_row("≠" if row.differs else "", label, *cells, agreed)
    return table


def settle_line(qid: str, text: str, sides: tuple[tuple[str, str | None], ...], decision) -> Text:
    """One question to settle: both reviewers' answers and how the consensus stands."""
    line = Text(f"{qid} ", style="bold")
    line.append(f"{text[:40]}\n", style="")
    answers = "  ·  ".join(f"{name} {code or 'not asked'}" for name, code in sides)
    line.append(f"   {answers}  ·  ")
    if decision is None or decision.response is None:
        line.append("to settle", style="bold reverse")
    else:
        taken = {"a": "took A", "b": "took B", "new": "new answer", "agreed": "agreed"}
        line.append(f"agreed {decision.response}", style="bold")
        line.append(f" ({taken[decision.source]}: {decision.note})", style="dim")
    return line


class CompareScreen(Screen[None]):
    """Pairs on the left; on the right the differences to settle with the judgements of A, B
    and the consensus, then both sides question by question."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("a", "settle('a')", "Take A"),
        Binding("b", "settle('b')", "Take B"),
        Binding("n", "settle('new')", "New answer"),
        Binding("c", "complete", "Complete consensus"),
        Binding("r", "next_reviewers", "Other reviewers"),
        Binding("escape", "back", "Overview"),
        Binding("question_mark,f1", "app.help", "Help"),
    ]

    def __init__(self, session: ReviewSession) -> None:
        super().__init__()
        session.require_lead()  # blinding: the comparison is the lead's alone
        self.session = session
        names = session.comparable_reviewers()
        self.reviewer_pairs = (
            list(combinations(names, 2)) or [(names[0], names[0])] if names else []
        )
        self.pair_index = 0
        self.pairs: list[AssessmentPair] = []
        self.problems: list[str] = []
        self.index = 0  # the selected pair
        self.consensus: Consensus | None = None  # saved record, or a preview not saved yet
        self.consensus_saved = False
        self.consensus_problem: str | None = None

    def compose(self) -> ComposeResult:
        yield Static("", id="compare-title")
        with Horizontal(id="compare-body"):
            yield OptionList(id="pairs")
            with Vertical(id="compare-side"):
                yield Static("", id="consensus-status")
                with Horizontal(id="consensus-row"):
                    yield OptionList(id="differences")
                    yield Static("", id="consensus-judgements")
                with VerticalScroll(id="pair-scroll"):
                    yield Static("", id="pair-detail")
        yield KeyHints()

    def on_mount(self) -> None:
        self.load()
        self.query_one("#pairs", OptionList).focus()

    def load(self) -> None:
        title = Text(f"{self.session.review.title}  ·  comparison for the lead", style="bold")
        if not self.reviewer_pairs:
            title.append("\nTwo reviewers are needed for a comparison.")
            self.query_one("#compare-title", Static).update(title)
            return
        a, b = self.reviewer_pairs[self.pair_index]
        self.pairs, self.problems = self.session.comparison_pairs(a, b)
        title.append(f"\n{a} and {b}", style="")
        if len(self.reviewer_pairs) > 1:
            title.append("  (r: other reviewers)", style="dim")
        for problem in self.problems:
            title.append(f"\n⚠ {problem}")
        self.query_one("#compare-title", Static).update(title)
        options = []
        for index, pair in enumerate(self.pairs):
            options.append(Option(self._pair_label(pair), id=str(index)))
        pairs = self.query_one("#pairs", OptionList)
        pairs.set_options(options)
        if options:
            pairs.highlighted = 0
        self._show(0)

    def _pair_state(self, pair: AssessmentPair) -> Text:
        """Differences and the consensus state, for the pair's line in the list."""
        if not pair.comparable:
            return Text("\nnot comparable yet", style="dim")
        n = compare_pair(pair, self.session.qset_for(pair.study_id)).n_differences
        text = Text(f"\n{n} difference{'s' if n != 1 else ''}")
        try:
            saved = self.session.load_consensus(pair.study_id, pair.result_id)
        except RobtuiError:
            return text.append("  ·  ⚠ consensus unreadable", style="bold")
        if saved is not None:
            done = saved.status == "complete"
            text.append(f"  ·  {'✓ consensus' if done else 'consensus draft'}", style="bold")
        return text

    def _relabel_pair(self) -> None:
        pair = self.pair
        if pair is None:
            return
        self.query_one("#pairs", OptionList).replace_option_prompt_at_index(
            self.index, self._pair_label(pair)
        )

    def _pair_label(self, pair: AssessmentPair) -> Text:
        study = self.session.review.study(pair.study_id)
        result = self.session.review.result(pair.result_id)
        label = Text(study.label if study else pair.study_id, style="bold")
        label.append(f"\n{result.outcome if result else pair.result_id}")
        label.append_text(self._pair_state(pair))
        return label

    @on(OptionList.OptionHighlighted, "#pairs")
    def _highlighted(self, event: OptionList.OptionHighlighted) -> None:
        self._show(int(event.option.id or 0))

    def _show(self, index: int) -> None:
        detail = self.query_one("#pair-detail", Static)
        self.index = index
        if not self.pairs:
            detail.update(Text("No results to compare.", style="dim"))
            self._load_consensus(None)
            return
        pair = self.pairs[index]
        detail.update(pair_detail(pair, self.session.qset_for(pair.study_id)))
        self._load_consensus(pair)

    # -- consensus -----------------------------------------------------------------------
    @property
    def pair(self) -> AssessmentPair | None:
        return self.pairs[self.index] if self.pairs else None

    def _load_consensus(self, pair: AssessmentPair | None) -> None:
        self.consensus, self.consensus_saved, self.consensus_problem = None, False, None
        if pair is not None and pair.comparable:
            try:
                saved = self.session.load_consensus(pair.study_id, pair.result_id)
            except RobtuiError as error:
                self.consensus_problem = f"the consensus record cannot be read: {error}"
                saved = None
            if saved is not None:
                self.consensus, self.consensus_saved = saved, True
                if tuple(saved.reviewers) != (pair.reviewer_a, pair.reviewer_b):
                    self.consensus_problem = (
                        f"this result's consensus was made from {' and '.join(saved.reviewers)}: "
                        "r shows those reviewers"
                    )
            elif self.consensus_problem is None:
                lead = self.session.reviewer
                self.consensus = start_consensus(pair, lead, self.session.qset_for(pair.study_id))
        self._refresh_consensus()

    def to_settle(self) -> list[str]:
        """Questions listed for the lead: differences, questions now on the agreed path with no
        answer yet, and those already settled (in question order)."""
        pair, consensus = self.pair, self.consensus
        if pair is None or not pair.comparable or consensus is None:
            return []
        wanted = {q.question_id for q in differences(pair, self.session.qset_for(pair.study_id)) if q.differs}
        wanted |= set(pending_questions(consensus, self.session.qset_for(consensus.study_id)))
        wanted |= {q for q, d in consensus.decisions.items() if d.source != "agreed"}
        order = [q.id for q in self.session.qset_for(consensus.study_id).questions(consensus.effect)]
        return [q for q in order if q in wanted]

    def _refresh_consensus(self, keep: str | None = None) -> None:
        status = self.query_one("#consensus-status", Static)
        listing = self.query_one("#differences", OptionList)
        table = self.query_one("#consensus-judgements", Static)
        pair, consensus = self.pair, self.consensus
        if pair is None or not pair.comparable:
            status.update(Text("Consensus: both reviewers must mark complete first.", style="dim"))
            listing.set_options([])
            table.update("")
            return
        qset = self.session.qset_for(self.pair.study_id)
        text = Text("Consensus: ", style="bold")
        if self.consensus_problem:
            text.append(f"⚠ {self.consensus_problem}")
        elif consensus is not None:
            pending = pending_questions(consensus, qset)
            if consensus.status == "complete":
                text.append("✓ complete", style="bold")
                text.append("  (c reopens it)", style="dim")
            else:
                text.append("draft" if self.consensus_saved else "not started")
                text.append(f", {len(pending)} to settle", style="bold" if pending else "")
                hint = (
                    f"a takes {pair.reviewer_a}'s answer · b takes {pair.reviewer_b}'s · "
                    "n new answer (tab: to the list)"
                )
                text.append(f"  ·  {hint}" if pending or self.to_settle() else "", style="dim")
                if not pending:
                    text.append("  ·  c marks it complete", style="dim")
        status.update(text)
        by_a = path_answers(qset, pair.a.effect, pair.a.answers)
        by_b = path_answers(qset, pair.b.effect, pair.b.answers)
        keep = keep or self.focused_question
        options = []
        for qid in self.to_settle():
            question = qset.question(qid, pair.a.effect)
            decision = consensus.decisions.get(qid) if consensus else None
            sides = ((pair.reviewer_a, by_a.get(qid)), (pair.reviewer_b, by_b.get(qid)))
            line = settle_line(qid, question.short or question.text, sides, decision)
            options.append(Option(line, id=qid))
        listing.set_options(options)
        ids = [o.id for o in options]
        if keep in ids:
            listing.highlighted = ids.index(keep)
        elif ids:
            listing.highlighted = 0
        table.update(judgements_table(pair, qset, consensus))

    @property
    def focused_question(self) -> str | None:
        listing = self.query_one("#differences", OptionList)
        if listing.highlighted is None or not listing.option_count:
            return None
        return listing.get_option_at_index(listing.highlighted).id

    def _settleable(self) -> bool:
        pair, consensus = self.pair, self.consensus
        problem = None
        if pair is None or not pair.comparable:
            problem = "this result cannot be compared yet: both reviewers must mark it complete"
        elif self.consensus_problem or consensus is None:
            problem = self.consensus_problem or "no consensus record"
        elif consensus.status == "complete":
            problem = "this consensus is marked complete: c reopens it"
        if problem:
            self.notify(problem, severity="warning")
        return problem is None

    def action_settle(self, source: str) -> None:
        if not self._settleable():
            return
        qid = self.focused_question
        if qid is None:
            self.notify("nothing to settle here: the reviewers agree", severity="warning")
            return
        pair, consensus = self.pair, self.consensus
        qset = self.session.qset_for(pair.study_id)
        question = qset.question(qid, consensus.effect)
        by_side = path_answers(
            qset, consensus.effect, (pair.a if source == "a" else pair.b).answers
        )
        name = pair.reviewer_a if source == "a" else pair.reviewer_b
        what = Text(f"{qid} {question.text}\n", style="")
        if source == "new":
            title, options = f"New answer to {qid}", question.options
            current = consensus.answers.get(qid)
            chosen = current.response if current else None
        else:
            title, options, chosen = f"Take {name}'s answer to {qid}", (), None
            what.append(f"{name}: {by_side.get(qid) or 'not asked'}", style="bold")

        def done(choice: SettleChoice | None) -> None:
            if choice is None:
                return
            try:
                settled = settle(
                    self.consensus,
                    qset,
                    qid,
                    source,
                    choice.response,
                    choice.note,
                    pair=pair,
                )
                self.session.save_consensus(settled)
            except RobtuiError as error:
                self.notify(str(error), severity="error")
                return
            self.consensus, self.consensus_saved = settled, True
            self._relabel_pair()
            pending = pending_questions(settled, qset)
            self._refresh_consensus(keep=pending[0] if pending else qid)

        self.app.push_screen(SettleDialog(title, what, options, chosen), done)

    def action_complete(self) -> None:
        pair, consensus = self.pair, self.consensus
        if pair is None or not pair.comparable or consensus is None or self.consensus_problem:
            self._settleable()
            return
        try:
            if consensus.status == "complete":
                changed = reopen_consensus(consensus)
            else:
                changed = complete_consensus(consensus, self.session.qset_for(pair.study_id), pair)
            self.session.save_consensus(changed)
        except RobtuiError as error:
            self.notify(str(error), severity="warning")
            return
        self.consensus, self.consensus_saved = changed, True
        self._relabel_pair()
        done = "complete" if changed.status == "complete" else "reopened"
        self.notify(f"consensus {done} for {pair.study_id} / {pair.result_id}")
        self._refresh_consensus()

    def action_next_reviewers(self) -> None:
        if len(self.reviewer_pairs) > 1:
            self.pair_index = (self.pair_index + 1) % len(self.reviewer_pairs)
            self.load()

    def action_back(self) -> None:
        self.dismiss(None)

    def palette_commands(self) -> list[tuple[str, str, str]]:
        return [
            (
                "Take reviewer A's answer",
                "Settle the focused difference (note required)",
                "settle('a')",
            ),
            (
                "Take reviewer B's answer",
                "Settle the focused difference (note required)",
                "settle('b')",
            ),
            (
                "New consensus answer",
                "Settle the focused difference (note required)",
                "settle('new')",
            ),
            ("Complete / reopen the consensus", "Nothing may be left to settle", "complete"),
            ("Compare other reviewers", "The next pair of reviewers", "next_reviewers"),
        ]
