"""The lead's comparison: two reviewers' complete assessments side by side, differences first,
and the consensus: the lead settles each difference (take A, take B or a new answer, always
with a note), the support and predicted direction of bias of each judgement, and overrides,
while the consensus judgements are recomputed beside A's and B's. Every change goes through
the service layer (robtui.workspace.consensus_changes, as the CLI's do): applied to the stored
record under the review's lock and saved apart from both reviewers' files.

Only reachable when the review is opened as its lead (ReviewSession.comparison_pairs refuses
anyone else), so a reviewer's own session stays blind to the other's work.
"""

from __future__ import annotations

from itertools import combinations
from typing import ClassVar

from rich import box
from rich.console import Group
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
from robtui.core.comparison import AssessmentPair, compare_pair, differences, judgement_rows
from robtui.core.consensus import (
    asked_on_path,
    changed_since,
    draft_problem,
    pending_questions,
    start_consensus,
)
from robtui.core.model import DIRECTION_LABELS, OVERALL, Consensus
from robtui.errors import RobtuiError
from robtui.tui.palette import badge, cell_badge
from robtui.tui.screens.dialogs import (
    ChoiceDialog,
    ConfirmDialog,
    OverrideChoice,
    OverrideDialog,
    SettleChoice,
    SettleDialog,
    SupportChoice,
    SupportDialog,
)
from robtui.tui.session import ReviewSession
from robtui.tui.widgets.key_hints import KeyHints
from robtui.workspace.consensus_changes import (
    completing,
    overriding,
    reopening,
    settling,
    supporting,
)


def _side(response: str | None, justification: str, quotes) -> Text:
    text = Text(response or "—", style="bold" if response else "dim")
    if justification:
        text.append(f"\n✎ {justification}")
    for quote in quotes:
        page = f"p.{quote.page}" if quote.page else "no page"
        text.append(f"\n❝ {quote.text} ", style="italic")
        text.append(f"({page})", style="dim")
    return text


def _form_cell(support: str, direction: str | None) -> Text:
    """The support text and predicted direction of bias of one judgement, or a dash."""
    if not support and direction is None:
        return Text("—", style="dim")
    text = Text()
    if direction is not None:
        text.append(f"direction: {DIRECTION_LABELS[direction]}", style="bold")
    if support:
        text.append(("\n" if direction is not None else "") + support)
    return text


def support_table(pair: AssessmentPair, qset, consensus: Consensus | None) -> Table | Text:
    """The RoB 2 form's support and predicted direction of bias of each judgement: A's, B's
    and the consensus's (≠ where both gave a direction and they differ); s settles them."""
    rows = [
        r for r in judgement_rows(pair, qset)
        if r.support_a or r.support_b or r.direction_a or r.direction_b
        or (consensus and (consensus.support.get(r.key) or consensus.direction.get(r.key)))
    ]
    if not rows:
        return Text("Support and direction of bias: neither reviewer gave any (s: the "
                    "consensus's own)", style="dim")
    table = Table(
        title="Support and direction of bias (s settles the consensus's)",
        title_justify="left", expand=True, show_lines=True,
    )
    table.add_column("", no_wrap=True)
    for name in (pair.reviewer_a, pair.reviewer_b, "Consensus"):
        table.add_column(name, ratio=1)
    for r in rows:
        label = Text("≠ " if r.direction_differs else "  ", style="bold")
        label.append("Overall" if r.key == OVERALL else f"D{r.key}")
        agreed = (
            _form_cell(consensus.support.get(r.key, ""), consensus.direction.get(r.key))
            if consensus else Text("—", style="dim")
        )
        table.add_row(label, _form_cell(r.support_a, r.direction_a),
                      _form_cell(r.support_b, r.direction_b), agreed)
    return table


def pair_detail(pair: AssessmentPair, qset, consensus: Consensus | None = None):
    """The support and direction of bias, then the signalling questions of one pair, both
    sides with justifications and quotes; differences first."""
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
    return Group(support_table(pair, qset, consensus), Text(""), questions)


def judgements_table(pair: AssessmentPair, qset, consensus: Consensus | None) -> Table:
    """Domain and overall judgements: A's and B's final ones, and the consensus recomputed by
    the algorithm from the agreed answers (≠ where A and B differ, * where overridden)."""
    table = Table(
        title="Judgements (* overridden)",
        title_justify="left",
        box=box.SIMPLE_HEAD,
        show_edge=False,
        pad_edge=False,
    )
    table.add_column("", no_wrap=True)
    for name in (pair.reviewer_a, pair.reviewer_b, "Consensus"):
        table.add_column(name, no_wrap=True)
    for row in compare_pair(pair, qset).judgements:
        cells = []
        for final, reason in ((row.final_a, row.override_a), (row.final_b, row.override_b)):
            cells.append(cell_badge(final).append("*" if reason else ""))
        agreed = cell_badge(consensus.final.get(row.key)) if consensus else Text("—", style="dim")
        if consensus and row.key in consensus.overrides:
            agreed.append("*")
        label = Text("≠ " if row.differs else "  ", style="bold")
        label.append("Overall" if row.key == OVERALL else f"D{row.key}")
        table.add_row(label, *cells, agreed)
    return table


def settle_line(
    qid: str, text: str, sides: tuple[tuple[str, str | None], ...], decision, on_path: bool = True
) -> Text:
    """One question to settle: both reviewers' answers and how the consensus stands."""
    line = Text(f"{qid} ", style="bold")
    line.append(f"{text[:40]}\n", style="")
    answers = "  ·  ".join(f"{name} {code or 'not asked'}" for name, code in sides)
    line.append(f"   {answers}  ·  ")
    if not on_path:
        line.append("not asked on the agreed path", style="dim")
    elif decision is None or decision.response is None:
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
        Binding("o", "override", "Override"),
        Binding("s", "support", "Support/direction"),
        Binding("c", "complete", "Complete / reopen"),
        Binding("f", "toggle_filter", "Only to settle"),
        Binding("r", "next_reviewers", "Other reviewers"),
        Binding("escape", "back", "Overview"),
        Binding("question_mark,f1", "app.help", "Help"),
        Binding("tab", "pane(1)", "Next pane", show=False, priority=True),
        Binding("shift+tab", "pane(-1)", "Previous pane", show=False, priority=True),
    ]
    PANES = ("pairs", "differences", "pair-scroll")  # tab goes round them in this order

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
        self.only_open = False  # f: list only the results that need the lead

    def compose(self) -> ComposeResult:
        yield Static("", id="compare-title")
        with Horizontal(id="compare-body"):
            yield OptionList(id="pairs")
            with Vertical(id="compare-side"):
                yield Static("", id="consensus-status")
                with Vertical(id="consensus-row"):
                    yield OptionList(id="differences")
                    yield Static("", id="consensus-judgements")
                with VerticalScroll(id="pair-scroll"):
                    yield Static("", id="pair-detail")
        yield KeyHints()

    def on_mount(self) -> None:
        self.load()
        self.query_one("#pairs", OptionList).focus()

    def load(self, keep: tuple[str, str] | None = None) -> None:
        title = Text(f"{self.session.review.title}  ·  comparison for the lead", style="bold")
        if not self.reviewer_pairs:
            title.append("\nTwo reviewers are needed for a comparison.")
            self.query_one("#compare-title", Static).update(title)
            return
        a, b = self.reviewer_pairs[self.pair_index]
        pairs, self.problems = self.session.comparison_pairs(a, b)
        states = {p.key: self._state(p) for p in pairs}
        everything = sorted(pairs, key=lambda p: states[p.key][0])  # stable: review order kept
        counts = [sum(states[p.key][0] == rank for p in pairs) for rank in range(4)]
        title.append(f"\n{a} and {b}: ", style="")
        title.append(f"{counts[3]} of {len(pairs)} results settled", style="bold")
        title.append(f" · {counts[1]} to settle · {counts[0]} stale · {counts[2]} waiting")
        if self.only_open:
            title.append(" (f: all)", style="dim")
        if len(self.reviewer_pairs) > 1:
            title.append("  (r: other reviewers)", style="dim")
        for problem in self.problems:
            title.append(f"\n⚠ {problem}")
        self.query_one("#compare-title", Static).update(title)
        self.pairs = [p for p in everything if not self.only_open or states[p.key][0] <= 1]
        options = [
            Option(self._pair_label(p, states[p.key][1]), id=str(i))
            for i, p in enumerate(self.pairs)
        ]
        listing = self.query_one("#pairs", OptionList)
        listing.set_options(options)
        keys = [p.key for p in self.pairs]
        start = keys.index(keep) if keep in keys else 0
        if options:
            listing.highlighted = start
        self._show(start)

    def _state(self, pair: AssessmentPair) -> tuple[int, Text]:
        """(rank in the queue, words for the list): 0 stale, 1 to settle, 2 waiting for a
        reviewer (a side missing or still a draft), 3 settled (a complete consensus)."""
        if not pair.comparable:
            return 2, Text("waiting", style="dim")  # a side missing or still a draft
        qset = self.session.qset_for(pair.study_id)
        n = compare_pair(pair, qset).n_differences
        try:
            saved = self.session.load_consensus(pair.study_id, pair.result_id)
        except RobtuiError:
            return 1, Text("⚠ consensus unreadable", style="bold")
        if saved is not None and changed_since(saved, pair, qset):
            return 0, Text("⚠ stale", style="bold reverse")
        if saved is not None and saved.status == "complete":
            return 3, Text("✓ done", style="dim")
        if saved is not None:
            return 1, Text(f"{len(pending_questions(saved, qset))} open")
        return 1, Text(f"{n} differ" if n else "agree")

    def _relabel_pair(self) -> None:
        pair = self.pair
        if pair is not None:
            self.load(keep=pair.key)

    def _pair_label(self, pair: AssessmentPair, state: Text) -> Text:
        """One line: study, result, state (the words that tell results apart come first)."""
        result = self.session.review.result(pair.result_id)
        label = Text(pair.study_id, style="bold")
        label.append(f" {result.id if result else pair.result_id} ")
        return label.append_text(state)

    @on(OptionList.OptionHighlighted, "#pairs")
    def _highlighted(self, event: OptionList.OptionHighlighted) -> None:
        self._show(int(event.option.id or 0))

    def _show(self, index: int) -> None:
        detail = self.query_one("#pair-detail", Static)
        moved = index != self.index
        self.index = index
        if not self.pairs:
            detail.update(Text("No results to compare.", style="dim"))
            self._load_consensus(None)
            return
        self._load_consensus(self.pairs[index], fresh=moved)
        self._refresh_detail()

    def _refresh_detail(self) -> None:
        pair = self.pair
        if pair is not None:
            detail = pair_detail(pair, self.session.qset_for(pair.study_id), self.consensus)
            self.query_one("#pair-detail", Static).update(detail)

    # -- consensus -----------------------------------------------------------------------
    @property
    def pair(self) -> AssessmentPair | None:
        return self.pairs[self.index] if self.pairs else None

    def _load_consensus(self, pair: AssessmentPair | None, fresh: bool = True) -> None:
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
        # another result: the cursor goes to its first question to settle, not the last one's
        self._refresh_consensus(fresh=fresh)

    def to_settle(self) -> list[str]:
        """Questions listed for the lead: differences, questions now on the agreed path with no
        answer yet, and those already settled (in question order)."""
        pair, consensus = self.pair, self.consensus
        if pair is None or not pair.comparable or consensus is None:
            return []
        wanted = {
            q.question_id
            for q in differences(pair, self.session.qset_for(pair.study_id))
            if q.differs
        }
        wanted |= set(pending_questions(consensus, self.session.qset_for(consensus.study_id)))
        wanted |= {q for q, d in consensus.decisions.items() if d.source != "agreed"}
        order = [
            q.id for q in self.session.qset_for(consensus.study_id).questions(consensus.effect)
        ]
        return [q for q in order if q in wanted]

    def _refresh_consensus(self, keep: str | None = None, fresh: bool = False) -> None:
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
            changes = changed_since(consensus, pair, qset)
            if changes:
                text.append("⚠ stale: ", style="bold reverse")
                text.append(f"changed since it was built: {'; '.join(changes)}. ", style="bold")
            if consensus.status == "complete":
                text.append("✓ complete", style="bold")
                text.append("  (c reopens it, after asking)", style="dim")
            else:
                text.append("draft" if self.consensus_saved else "not started")
                text.append(f", {len(pending)} to settle", style="bold" if pending else "")
                hint = f"a: {pair.reviewer_a}'s answer, b: {pair.reviewer_b}'s, n: new; tab"
                text.append(f"  ·  {hint}" if pending else "  ·  c completes it", style="dim")
        status.update(text)
        by_a = path_answers(qset, pair.a.effect, pair.a.answers)
        by_b = path_answers(qset, pair.b.effect, pair.b.answers)
        keep = keep or (None if fresh else self.focused_question)
        on_path = set(asked_on_path(consensus, qset)) if consensus else set()
        pending = pending_questions(consensus, qset) if consensus else []
        options = []
        for qid in self.to_settle():
            question = qset.question(qid, pair.a.effect)
            decision = consensus.decisions.get(qid) if consensus else None
            sides = ((pair.reviewer_a, by_a.get(qid)), (pair.reviewer_b, by_b.get(qid)))
            line = settle_line(qid, question.short or question.text, sides, decision,
                               qid in on_path)  # fmt: skip
            options.append(Option(line, id=qid))
        listing.set_options(options)
        ids = [o.id for o in options]
        if keep in ids:
            listing.highlighted = ids.index(keep)
        elif ids:
            first = next((q for q in pending if q in ids), ids[0])
            listing.highlighted = ids.index(first)
        table.update(judgements_table(pair, qset, consensus))

    @property
    def focused_question(self) -> str | None:
        listing = self.query_one("#differences", OptionList)
        if listing.highlighted is None or not listing.option_count:
            return None
        return listing.get_option_at_index(listing.highlighted).id

    def _settleable(self, what: str = "an answer") -> bool:
        pair, consensus = self.pair, self.consensus
        problem = None
        if pair is None or not pair.comparable:
            problem = "this result cannot be compared yet: both reviewers must mark it complete"
        elif self.consensus_problem or consensus is None:
            problem = self.consensus_problem or "no consensus record"
        else:
            problem = draft_problem(consensus, what)
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
            change = settling(qid, source, choice.response, choice.note, pair)
            settled = self._change(change, severity="error")
            if settled is None:
                return
            pending = pending_questions(settled, qset)
            self._relabel_pair()
            self._refresh_consensus(keep=pending[0] if pending else qid)

        self.app.push_screen(SettleDialog(title, what, options, chosen), done)

    def action_complete(self) -> None:
        pair, consensus = self.pair, self.consensus
        if pair is None or not pair.comparable or consensus is None or self.consensus_problem:
            self._settleable()
            return
        if consensus.status != "complete":
            self._save_status(completing(pair))
            return

        def answered(yes: bool | None) -> None:
            if yes:
                self._save_status(reopening())

        question = (
            f"The consensus for {pair.study_id} / {pair.result_id} is complete and is what the "
            "exports show. Reopen it? Its judgements leave the exports until it is completed "
            "again."
        )
        self.app.push_screen(ConfirmDialog("Reopen a complete consensus?", question), answered)

    def _change(self, change, severity: str = "warning") -> Consensus | None:
        """One of the lead's changes, through the service layer: the saved record, or None
        (the reason shown)."""
        try:
            changed = self.session.change_consensus(self.consensus, change)
        except RobtuiError as error:
            self.notify(str(error), severity=severity)
            return None
        self.consensus, self.consensus_saved = changed, True
        return changed

    def _save_status(self, change) -> None:
        pair = self.pair
        changed = self._change(change)
        if changed is None:
            return
        done = "complete" if changed.status == "complete" else "reopened"
        self.notify(f"consensus {done} for {pair.study_id} / {pair.result_id}")
        self._relabel_pair()

    def action_override(self) -> None:
        """Override a recomputed consensus judgement, with a reason (the lead's own)."""
        if not self._settleable("a judgement"):
            return
        pair, consensus = self.pair, self.consensus
        qset = self.session.qset_for(pair.study_id)
        rows = compare_pair(pair, qset).judgements
        options = []
        for row in rows:
            label = Text(f"{'Overall' if row.key == OVERALL else 'D' + row.key} {row.label}  ")
            options.append((row.key, label.append_text(badge(consensus.final.get(row.key)))))

        def chosen(key: str | None) -> None:
            if key is None:
                return
            title = "Overall" if key == OVERALL else qset.domain_label(key, consensus.effect)
            note = f"{pair.reviewer_a}: {pair.a.final.get(key)}, {pair.reviewer_b}: " + str(
                pair.b.final.get(key)
            )
            dialog = OverrideDialog(
                f"consensus, {title}",
                self.consensus.proposed.get(key, "incomplete"),
                self.consensus.overrides.get(key),
                note,
            )
            self.app.push_screen(dialog, lambda choice: self._override(key, choice))

        self.app.push_screen(
            ChoiceDialog("Override which judgement?", options),
            chosen,
        )

    def _override(self, key: str, choice: OverrideChoice | None) -> None:
        if choice is None:
            return
        if self._change(overriding(key, choice.judgement, choice.reason), "error") is not None:
            self._refresh_consensus()

    def action_support(self) -> None:
        """Settle the support and predicted direction of bias of a judgement (the RoB 2 form's
        fields), seeing what each reviewer gave."""
        if not self._settleable("its support and direction of bias"):
            return
        pair, consensus = self.pair, self.consensus
        qset = self.session.qset_for(pair.study_id)
        rows = {r.key: r for r in judgement_rows(pair, qset)}
        options = []
        for key, row in rows.items():
            label = Text(f"{'Overall' if key == OVERALL else 'D' + key} {row.label}  ")
            given = consensus.direction.get(key)
            label.append(DIRECTION_LABELS[given] if given else "no direction", style="dim")
            options.append((key, label))

        def chosen(key: str | None) -> None:
            if key is None:
                return
            row = rows[key]
            note = Text()
            for name, support, direction in (
                (pair.reviewer_a, row.support_a, row.direction_a),
                (pair.reviewer_b, row.support_b, row.direction_b),
            ):
                note.append(f"{name}: ", style="bold")
                note.append_text(_form_cell(support, direction))
                note.append("\n")
            title = "Overall" if key == OVERALL else qset.domain_label(key, consensus.effect)
            dialog = SupportDialog(
                f"Consensus, {title}: support and direction of bias",
                None if key == OVERALL else self.consensus.support.get(key, ""),
                self.consensus.direction.get(key),
                note,
            )
            self.app.push_screen(dialog, lambda choice: self._support(key, choice))

        self.app.push_screen(ChoiceDialog("Support and direction of which judgement?", options),
                             chosen)

    def _support(self, key: str, choice: SupportChoice | None) -> None:
        if choice is None:
            return
        change = supporting(key, choice.support, choice.direction)
        if self._change(change, "error") is not None:
            self._refresh_consensus()
            self._refresh_detail()
            self.notify(f"support and direction of bias saved for "
                        f"{'the overall' if key == OVERALL else 'D' + key}", timeout=2)

    def action_toggle_filter(self) -> None:
        self.only_open = not self.only_open
        pair = self.pair
        self.load(keep=pair.key if pair else None)

    def action_next_reviewers(self) -> None:
        if len(self.reviewer_pairs) > 1:
            self.pair_index = (self.pair_index + 1) % len(self.reviewer_pairs)
            self.load()

    def action_back(self) -> None:
        self.dismiss(None)

    def action_pane(self, step: int) -> None:
        """Tab: the results, the differences to settle, both sides in full (support and
        direction, every question); a narrow terminal shows one of them at a time."""
        here = next((p for p in self.PANES if self.focused and self.focused.id == p), "pairs")
        target = self.PANES[(self.PANES.index(here) + step) % len(self.PANES)]
        self.query_one(f"#{target}").focus()

    def on_descendant_focus(self, event) -> None:
        pane = next((p for p in self.PANES if event.widget.id == p), None)
        if pane is not None:
            for name in self.PANES:
                self.set_class(name == pane, f"-pane-{name}")

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
            ("Override a consensus judgement", "With a reason", "override"),
            (
                "Support and direction of bias",
                "Settle the consensus's support text and predicted direction of a judgement",
                "support",
            ),
            ("Complete / reopen the consensus", "Nothing may be left to settle", "complete"),
            ("Only results to settle", "Show or hide the settled ones", "toggle_filter"),
            ("Compare other reviewers", "The next pair of reviewers", "next_reviewers"),
        ]
