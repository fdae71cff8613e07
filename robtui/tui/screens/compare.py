"""The lead's comparison: two reviewers' complete assessments side by side, differences first.

Only reachable when the review is opened as its lead (ReviewSession.comparison_pairs refuses
anyone else), so a reviewer's own session stays blind to the other's work.
"""

from __future__ import annotations

from itertools import combinations
from typing import ClassVar

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, VerticalScroll
from textual.screen import Screen
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option

from robtui.core.comparison import AssessmentPair, compare_pair
from robtui.tui.palette import badge
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


def pair_detail(pair: AssessmentPair, qset) -> Group | Text:
    """Judgements then questions of one pair, both sides; differences first."""
    if not pair.comparable:
        return Text(f"Not compared: {pair.problem}", style="bold")
    comparison = compare_pair(pair, qset)
    judgements = Table(title="Judgements", title_justify="left", expand=True, show_lines=False)
    judgements.add_column("", width=1)
    judgements.add_column("Domain", ratio=2)
    judgements.add_column(pair.reviewer_a, ratio=3)
    judgements.add_column(pair.reviewer_b, ratio=3)
    for row in comparison.judgements:
        cells = []
        for final, reason in ((row.final_a, row.override_a), (row.final_b, row.override_b)):
            cell = badge(final)
            if reason:
                cell.append(f"\noverride: {reason}", style="italic")
            cells.append(cell)
        judgements.add_row("≠" if row.differs else "", row.label, *cells)
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
    return Group(judgements, Text(""), questions)


class CompareScreen(Screen[None]):
    """Pairs on the left, the selected pair side by side on the right."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("r", "next_reviewers", "Other reviewers"),
        Binding("escape", "back", "Overview"),
        Binding("question_mark,f1", "app.help", "Help"),
    ]

    def __init__(self, session: ReviewSession) -> None:
        super().__init__()
        self.session = session
        names = session.comparable_reviewers()
        self.reviewer_pairs = (
            list(combinations(names, 2)) or [(names[0], names[0])] if names else []
        )
        self.pair_index = 0
        self.pairs: list[AssessmentPair] = []
        self.problems: list[str] = []

    def compose(self) -> ComposeResult:
        yield Static("", id="compare-title")
        with Horizontal(id="compare-body"):
            yield OptionList(id="pairs")
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
            study = self.session.review.study(pair.study_id)
            result = self.session.review.result(pair.result_id)
            label = Text(study.label if study else pair.study_id, style="bold")
            label.append(f"\n{result.outcome if result else pair.result_id}")
            if pair.comparable:
                n = compare_pair(pair, self.session.qset).n_differences
                label.append(f"\n{n} difference{'s' if n != 1 else ''}", style="")
            else:
                label.append("\nnot comparable yet", style="dim")
            options.append(Option(label, id=str(index)))
        pairs = self.query_one("#pairs", OptionList)
        pairs.set_options(options)
        if options:
            pairs.highlighted = 0
        self._show(0)

    @on(OptionList.OptionHighlighted, "#pairs")
    def _highlighted(self, event: OptionList.OptionHighlighted) -> None:
        self._show(int(event.option.id or 0))

    def _show(self, index: int) -> None:
        detail = self.query_one("#pair-detail", Static)
        if not self.pairs:
            detail.update(Text("No results to compare.", style="dim"))
            return
        detail.update(pair_detail(self.pairs[index], self.session.qset))

    def action_next_reviewers(self) -> None:
        if len(self.reviewer_pairs) > 1:
            self.pair_index = (self.pair_index + 1) % len(self.reviewer_pairs)
            self.load()

    def action_back(self) -> None:
        self.dismiss(None)
