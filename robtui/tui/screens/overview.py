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
NARROW_MARGIN = 3  # the table's vertical scrollbar (2) and a column to spare


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
        self.laid_out_for: tuple[str, int] | None = None
        self.widths: dict[str, int] = {"study": 24, "result": 28}

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
        self._show_legend()

    def _lay_out(self, width: int) -> None:
        """Columns for the terminal's width: narrow ones show marks a legend explains; the
        study's name (narrow) or the note (wider) takes the width the other columns leave."""
        name = next(n for least, n in reversed(LAYOUTS) if width >= least)
        if (name, width) == self.laid_out_for:
            return
        self.laid_out_for = (name, width)
        self.layout_name = name
        wide = name == "wide"
        domains = [f"D{d}" for d in self.session.sets.domain_ids()]
        widths: dict[str, int] = {"study": 24, "result": 28} if wide else {"study": 18, "result": 20}
        if name == "narrow":
            widths = {"study": 0, "result": 11}
        else:
            widths["effect"] = 10
        widths["progress"] = 8 if name == "narrow" else 16
        widths.update({d.lower(): 6 if wide else max(2, len(d)) for d in domains})
        widths["overall"] = 7
        widths["note"] = 4
        room = width - NARROW_MARGIN - 2 * len(widths)  # each column is padded by one a side
        spare = room - sum(widths.values())
        if name == "narrow":
            widths["study"] = max(8, spare)
        else:  # the note in words when wide (from the study's and result's width if need be)
            want = 24 if wide else 0
            for key in ("study", "result"):
                if spare < want:
                    give = min(widths[key] - 16, want - spare)
                    widths[key] -= max(0, give)
                    spare += max(0, give)
            widths["note"] += max(0, min(want, spare))
            widths["study"] -= max(0, min(widths["study"] - 12, -spare))
        self.widths = widths
        table = self.query_one("#results", DataTable)
        table.clear(columns=True)
        titles = {"study": "Study", "result": "Result", "effect": "Effect",
                  "progress": "Progress", "overall": "Overall", "note": "Note"}
        titles.update({d.lower(): d for d in domains})
        for key, column_width in widths.items():
            table.add_column(titles[key], key=key, width=column_width)
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
            if self.layout_name == "narrow" and not counts[name] and name != self.filter:
                continue  # a narrow terminal lists the filters that would show something
            style = "bold reverse" if name == self.filter else ""
            line.append(f" {name} ({counts[name]}) ", style=style)
        line.append("   f: next filter", style="dim")
        self.query_one("#overview-filter", Static).update(line)
        self._show_legend()
        self._show_detail()

    def _show_legend(self) -> None:
        """The legend, and again once the table is laid out (its scroll hints need its size)."""
        legend = self.query_one("#overview-legend", Static)
        legend.update(self._legend())
        self.call_after_refresh(lambda: legend.update(self._legend()))

    def _legend(self) -> Text:
        """What the marks mean, and which way the table scrolls when it holds more."""
        text = Text()
        for code in ("low", "some_concerns", "high"):
            text.append_text(cell_badge(code, letter_only=True))
            text.append(f" {LABELS[code]} ")
        text.append_text(cell_badge(None, letter_only=True))
        text.append(f" not judged  {OVERRIDE_MARK} you overrode (why: below)")
        if self.layout_name == "narrow":
            text.append("\n○ new ◐ draft ✓ done")
        if self.widths["note"] < 16:  # a wide Note column says it in words
            shown = [self.rows[k] for k in self._shown_keys()]
            if any(r.problems for r in shown):
                text.append("  ⚠ file problem")
            if any(r.second_look for r in shown):
                text.append("  ↻ rules changed")
        if self.layout_name == "narrow":
            text.append(" · ")
        table = self.query_one("#results", DataTable)
        scrolls = []
        if table.max_scroll_y > 0:
            scrolls.append(f"{table.row_count} results: ↑↓ pgup pgdn")
        if table.max_scroll_x > 0:
            scrolls.append("more columns: ← →")
        if scrolls:
            if self.layout_name != "narrow":
                text.append("\n")
            text.append(" · ".join(scrolls) + " scroll", style="bold")
        return text

    def _shown_keys(self) -> list[str]:
        table = self.query_one("#results", DataTable)
        return [key.value for key in table.rows if key.value in self.rows]

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
        study = row.study_id if name == "narrow" else row.study_label  # the detail line: both
        cells: list = [
            Text(_short(study, self.widths["study"])),
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
        cells.append(self._note(row))
        return cells

    def _note(self, row: ResultRow) -> Text:
        wide = self.widths["note"] >= 16  # room for words, else a mark the legend explains
        if row.problems:
            return Text("⚠ " + row.problems[0][:40] if wide else "⚠", style="bold")
        if row.second_look:
            return Text("↻ answering rules changed" if wide else "↻", style="bold")
        if row.overridden and wide:
            names = ", ".join("overall" if k == OVERALL else f"D{k}" for k in row.overridden)
            return Text(f"{OVERRIDE_MARK} you overrode {names}")
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
        for words in row.override_words:
            text.append(f"\n{OVERRIDE_MARK} you overrode {words}")
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
