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
from robtui.tui.palette import LABELS, cell_badge
from robtui.tui.session import (
    FILE_PROBLEMS,
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
STATUS_MARK = {  # the compact column: one mark, explained by the legend line
    STATUS_NOT_STARTED: Text("○", style="dim"),
    "draft": Text("◐", style="bold"),
    STATUS_COMPLETE: Text("✓", style="bold"),
    STATUS_UNREADABLE: Text("⚠", style="bold reverse"),
}
OVERRIDE_MARK = "*"
# (minimum terminal width, layout): the columns are laid out again when the width crosses one
LAYOUTS = ((0, "narrow"), (120, "medium"), (150, "wide"))


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
        self.layout_name = ""
        self.widths = {"study": 24, "result": 28}

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
            yield Static("", id="overview-legend")
            yield Static("", id="overview-detail")
        yield PreparationBar()
        yield KeyHints()

    def on_mount(self) -> None:
        self._lay_out(self.app.size.width)
        self.query_one("#results", DataTable).focus()

    def on_resize(self, event) -> None:
        self._lay_out(event.size.width)

    def _lay_out(self, width: int) -> None:
        """Columns for the terminal's width: narrow ones show marks a legend explains."""
        name = next(n for least, n in reversed(LAYOUTS) if width >= least)
        if name == self.layout_name:
            return
        self.layout_name = name
        table = self.query_one("#results", DataTable)
        table.clear(columns=True)
        wide = name == "wide"
        self.widths = {"study": 24, "result": 28} if wide else {"study": 18, "result": 20}
        if name == "narrow":
            self.widths = {"study": 13, "result": 12}
        table.add_column("Study", width=self.widths["study"])
        table.add_column("Result", width=self.widths["result"])
        if name != "narrow":
            table.add_column("Effect", width=10)
        table.add_column("Progress", width=8 if name == "narrow" else 16)
        # every domain of the sets in use: a study without a domain gets a blank cell
        for domain_id in self.session.sets.domain_ids():
            table.add_column(f"D{domain_id}", key=f"d{domain_id}", width=6 if wide else max(2, len(f"D{domain_id}")))
        table.add_column("Overall", key="overall", width=7)
        table.add_column("Note", key="note", width=28 if wide else 4)
        self.refresh_rows()

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
        self.query_one("#overview-legend", Static).update(self._legend(len(shown)))
        self._show_detail()

    def _legend(self, shown: int) -> Text:
        """What the marks mean, and that the table scrolls when it holds more rows."""
        text = Text()
        for code in ("low", "some_concerns", "high"):
            text.append_text(cell_badge(code, letter_only=True))
            text.append(f" {LABELS[code]}  ")
        text.append_text(cell_badge(None, letter_only=True))
        text.append(f" not judged  {OVERRIDE_MARK} your override")
        if self.layout_name == "narrow":
            text.append("  ○ new ◐ draft ✓ complete")
        table = self.query_one("#results", DataTable)
        if shown > max(table.size.height - 1, 0) > 0:
            text.append(f"\n{shown} results: ↑↓ pgup pgdn scroll", style="bold")
        return text

    def _progress(self, row: ResultRow) -> Text:
        marks = STATUS_MARK if self.layout_name == "narrow" else STATUS_TEXT
        text = marks.get(row.status, Text(row.status)).copy()
        if row.asked:
            text.append(f" {row.answered}/{row.asked}", style="")
        return text

    def _passes(self, row: ResultRow, name: str | None = None) -> bool:
        name = name or self.filter
        if name == "all":
            return True
        if name == FILE_PROBLEMS:
            return bool(row.problems)
        if name == SECOND_LOOK:
            return row.second_look is not None
        return row.status == name

    def _cells(self, row: ResultRow) -> list:
        name = self.layout_name
        wide = name == "wide"
        result = row.result_label if wide or name == "medium" else row.result_id
        cells: list = [
            Text(_short(row.study_label, self.widths["study"])),
            Text(_short(result, self.widths["result"])),
        ]
        if name != "narrow":
            cells.append(row.effect)
        cells.append(self._progress(row))
        own = set(self.session.qset_for(row.study_id).domain_ids())
        for key in [*self.session.sets.domain_ids(), OVERALL]:
            if key != OVERALL and key not in own:
                cells.append(Text(""))  # the study's set has no such domain
                continue
            if not row.final:
                cells.append(Text("—", style="dim"))
                continue
            badge = cell_badge(row.final.get(key), letter_only=not wide and key != OVERALL)
            if key in row.overridden:
                badge.append(OVERRIDE_MARK, style="bold")
            cells.append(badge)
        cells.append(self._note(row, wide))
        return cells

    @staticmethod
    def _note(row: ResultRow, wide: bool) -> Text:
        if row.problems:
            return Text("⚠ " + row.problems[0][:40] if wide else "⚠", style="bold")
        if row.second_look:
            return Text("↻ answering rules changed" if wide else "↻", style="bold")
        return Text("")

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
        text.append(f"  ·  effect of {row.effect}", style="dim")
        if row.overridden:
            names = ", ".join("overall" if k == OVERALL else f"D{k}" for k in row.overridden)
            text.append(f"\n{OVERRIDE_MARK} your override of the proposal: {names}")
        for problem in row.problems:
            text.append(f"\n⚠ {problem}")
        if row.second_look:
            text.append(f"\n↻ answering rules changed since: {row.second_look}")
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
        self.app.push_screen(EvidenceMapScreen(folder, review_effects(folder), self.session.qset,
                                               self.session.workspace.sets))
