"""The review overview: every study × result with this reviewer's progress and judgements."""

from __future__ import annotations

from typing import ClassVar

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import Screen
from textual.widgets import DataTable, Static
from textual.widgets.data_table import CellDoesNotExist

from robtui.core.model import OVERALL
from robtui.tui.palette import cell_badge
from robtui.tui.session import (
    SECOND_LOOK,
    STATUS_COMPLETE,
    STATUS_FILTERS,
    STATUS_NOT_STARTED,
    STATUS_UNREADABLE,
    ResultRow,
    ReviewSession,
)
from robtui.tui.widgets.key_hints import KeyHints
from robtui.tui.widgets.preparation_bar import PreparationBar

STATUS_TEXT = {
    STATUS_NOT_STARTED: Text("not started", style="dim"),
    "draft": Text("draft", style="bold"),
    STATUS_COMPLETE: Text("✓ complete", style="bold"),
    STATUS_UNREADABLE: Text("⚠ unreadable", style="bold reverse"),
}


def _short(text: str, width: int) -> str:
    """Cut to ``width`` characters with an ellipsis (the detail line below has it in full)."""
    return text if len(text) <= width else text[: width - 1] + "…"


class OverviewScreen(Screen[None]):
    """Studies × results; enter opens one to assess."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("enter", "open_selected", "Assess", priority=False),
        Binding("f", "cycle_filter", "Filter"),
        Binding("v", "compare", "Compare (lead)", show=False),
        Binding("e", "evidence_map", "Evidence map"),
        Binding("question_mark,f1", "app.help", "Help"),
        Binding("ctrl+q", "app.quit", "Quit"),
    ]

    def __init__(self, session: ReviewSession) -> None:
        super().__init__()
        self.session = session
        self.filter = "all"
        self.rows: dict[str, ResultRow] = {}

    def compose(self) -> ComposeResult:
        review = self.session.review
        with Vertical(id="overview"):
            title = Text(review.title, style="bold")
            who = f"  ·  reviewer {self.session.reviewer}"
            if self.session.is_lead:
                who += " (lead: v compares reviewers)"
            title.append(who, style="")
            if self.session.rules_unavailable:
                title.append(f"\n⚠ {self.session.rules_unavailable}", style="bold")
            yield Static(title, id="overview-title")
            yield Static("", id="overview-filter")
            yield DataTable(id="results", cursor_type="row", zebra_stripes=True)
            yield Static("", id="overview-detail")
        yield PreparationBar()
        yield KeyHints()

    def on_mount(self) -> None:
        table = self.query_one("#results", DataTable)
        table.add_columns("Study", "Result", "Effect", "Progress")
        for domain_id in self.session.qset.domain_ids():
            table.add_column(f"D{domain_id}", key=f"d{domain_id}")
        table.add_column("Overall", key="overall")
        table.add_column("Note", key="note")
        self.refresh_rows()
        table.focus()

    def on_screen_resume(self) -> None:
        self.refresh_rows()

    def refresh_rows(self) -> None:
        table = self.query_one("#results", DataTable)
        keep = self.selected_key
        all_rows = self.session.rows()
        self.rows = {row.key: row for row in all_rows}
        shown = [row for row in all_rows if self._passes(row)]
        table.clear()
        for row in shown:
            table.add_row(*self._cells(row), key=row.key)
        keys = [row.key for row in shown]
        if keep in keys:
            table.move_cursor(row=keys.index(keep))
        counts = {
            name: sum(1 for r in all_rows if self._passes(r, name)) for name in STATUS_FILTERS
        }
        line = Text("Showing: ", style="dim")
        for name in STATUS_FILTERS:
            style = "bold reverse" if name == self.filter else ""
            line.append(f" {name} ({counts[name]}) ", style=style)
        line.append("   f: next filter", style="dim")
        self.query_one("#overview-filter", Static).update(line)
        self._show_detail()

    @staticmethod
    def _progress(row: ResultRow) -> Text:
        text = STATUS_TEXT.get(row.status, Text(row.status)).copy()
        if row.asked:
            text.append(f" {row.answered}/{row.asked}", style="")
        return text

    def _passes(self, row: ResultRow, name: str | None = None) -> bool:
        name = name or self.filter
        if name == "all":
            return True
        if name == "problems":
            return bool(row.problems)
        if name == SECOND_LOOK:
            return row.second_look is not None
        return row.status == name

    def _cells(self, row: ResultRow) -> list:
        cells: list = [
            Text(_short(row.study_label, 24)),
            Text(_short(row.result_label, 28)),
            row.effect,
            self._progress(row),
        ]
        for key in [*self.session.qset.domain_ids(), OVERALL]:
            cells.append(cell_badge(row.final.get(key)) if row.final else Text("—", style="dim"))
        if row.problems:
            cells.append(Text("⚠ " + row.problems[0][:40], style="bold"))
        elif row.second_look:
            cells.append(Text("↻ second look: rules changed", style="bold"))
        else:
            cells.append("")
        return cells

    @property
    def selected_key(self) -> str | None:
        table = self.query_one("#results", DataTable)
        if not table.row_count:
            return None
        try:
            return table.coordinate_to_cell_key(table.cursor_coordinate).row_key.value
        except CellDoesNotExist:
            return None

    @on(DataTable.RowHighlighted, "#results")
    def _show_detail(self) -> None:
        row = self.rows.get(self.selected_key or "")
        detail = self.query_one("#overview-detail", Static)
        if row is None:
            detail.update(Text("No result matches this filter (f: next filter).", style="dim"))
            return
        text = Text(f"{row.study_label} — {row.result_label}", style="bold")
        for problem in row.problems:
            text.append(f"\n⚠ {problem}")
        if row.second_look:
            text.append(f"\n↻ second look: {row.second_look}")
        if not row.problems:
            text.append("\nenter: assess this result", style="dim")
        detail.update(text)

    @on(DataTable.RowSelected, "#results")
    def _row_selected(self) -> None:
        self.action_open_selected()

    def action_open_selected(self) -> None:
        row = self.rows.get(self.selected_key or "")
        if row is not None:
            self.app.open_result(row.study_id, row.result_id)

    def action_cycle_filter(self) -> None:
        index = STATUS_FILTERS.index(self.filter)
        self.filter = STATUS_FILTERS[(index + 1) % len(STATUS_FILTERS)]
        self.refresh_rows()

    def action_compare(self) -> None:
        self.app.open_comparison()

    def action_evidence_map(self) -> None:
        from robtui.tui.screens.evidence_map import EvidenceMapScreen
        from robtui.workspace.preparing import review_effects

        folder = self.session.folder
        self.app.push_screen(EvidenceMapScreen(folder, review_effects(folder), self.session.qset))
