"""The review-wide evidence map: studies x signalling questions, from the prepared reports.

A lead sees before assessing which trials report poorly. Cells fill in as the background
preparation finishes reports. The map answers nothing: 'none' means the ranker found no
sentence, not that the report says nothing.
"""

from __future__ import annotations

from typing import ClassVar

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import Screen
from textual.widgets import DataTable, Static

from robtui.tui.widgets.key_hints import KeyHints
from robtui.tui.widgets.preparation_bar import PreparationBar
from robtui.workspace.evidence_map import BAND_WORDS, BANDS, GLYPHS, EvidenceMap, evidence_map

# A glyph never stands alone: the legend names each, and the detail line spells out the cell.
BAND_STYLES = {"strong": "bold", "some": "", "none": "dim", "not prepared": "dim italic",
               "not asked": "dim"}


class EvidenceMapScreen(Screen):
    """Studies x questions: where strong evidence was found, where none."""

    DEFAULT_CSS = """
    EvidenceMapScreen #map-title { padding: 0 1; }
    EvidenceMapScreen #map { height: 1fr; }
    EvidenceMapScreen #map-detail { height: 3; padding: 0 1; }
    EvidenceMapScreen #map-legend { height: auto; padding: 0 1; color: $text-muted; }
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("t", "next_effect", "Effect"),
        Binding("x", "export", "Export csv"),
        Binding("escape", "back", "Overview"),
        Binding("question_mark,f1", "app.help", "Help"),
    ]

    def __init__(self, folder, effects: tuple[str, ...], question_set=None, sets=None) -> None:
        super().__init__()
        self.folder = folder
        self.sets = sets  # each study's question set (ReviewSets); None: read from the folder
        self.effects = effects
        self.effect = effects[0]
        self.question_set = question_set
        self.emap: EvidenceMap | None = None

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static("", id="map-title")
            # no cell padding: 22 questions and the study fit 80 columns
            yield DataTable(id="map", cursor_type="cell", zebra_stripes=True, cell_padding=0)
            yield Static("", id="map-detail")
            legend = "   ".join(f"{GLYPHS[b] if b != 'not prepared' else '(blank)'} "
                               f"{BAND_WORDS[b]}" for b in BANDS)
            yield Static(legend + "\nCandidates to read, not answers: 'none' means the ranker "
                         "found nothing, not that the report says nothing.", id="map-legend")
        yield PreparationBar()
        yield KeyHints()

    def on_mount(self) -> None:
        self.refresh_map()
        self.query_one(DataTable).focus()
        self.watch(self.app, "preparation", lambda _state: self.refresh_map(), init=False)

    def refresh_map(self) -> None:
        self.emap = evidence_map(self.folder, self.effect, self.question_set, self.sets)
        table = self.query_one(DataTable)
        where = table.cursor_coordinate
        table.clear(columns=True)
        table.add_column("Study ", key="study")
        domain = None
        for qid, _short in self.emap.questions:
            here, _, item = qid.partition(".")
            # "1.1 2  3 2.1 2 ...": the domain is written where it starts
            label = qid if here != domain or not item else f" {item} "
            domain = here
            table.add_column(label, key=qid)
        for row in self.emap.rows:
            cells = [Text(f" {row.cells[qid].glyph} ", style=BAND_STYLES[row.cells[qid].band])
                     for qid, _ in self.emap.questions]
            table.add_row(f"{row.study_id} ", *cells, key=row.study_id)
        if table.row_count:
            table.move_cursor(row=min(where.row, table.row_count - 1),
                              column=max(1, min(where.column, len(self.emap.questions))))
        prepared = self.emap.prepared_fraction
        note = "" if prepared >= 1.0 else f" · {prepared:.0%} prepared so far"
        title = Text.assemble(
            ("Evidence map", "bold"), f" ({self.effect}): the best suggested sentence of each "
            f"study's files per signalling question{note}")
        for failure in getattr(self.app, "preparation_failures", []):
            title.append(f"\nnot prepared: {failure}", style="bold")
        self.query_one("#map-title", Static).update(title)
        self._show_detail()

    def on_data_table_cell_highlighted(self, _event) -> None:
        self._show_detail()

    def _show_detail(self) -> None:
        detail = self.query_one("#map-detail", Static)
        table = self.query_one(DataTable)
        if self.emap is None or not self.emap.rows or table.cursor_column < 1:
            detail.update("")
            return
        row = self.emap.rows[min(table.cursor_row, len(self.emap.rows) - 1)]
        qid, short = self.emap.questions[table.cursor_column - 1]
        cell = row.cells[qid]
        score = f" (best {cell.best:.2f})" if cell.best is not None else ""
        sentence = f"\n{cell.file}: {cell.text}" if cell.text else ""
        detail.update(Text.assemble((f"{row.label} · {qid} {short}", "bold"),
                                    f" · {cell.band}{score}{sentence}"))

    def action_next_effect(self) -> None:
        self.effect = self.effects[(self.effects.index(self.effect) + 1) % len(self.effects)]
        self.refresh_map()

    def action_export(self) -> None:
        from robtui.export.safety import export_path
        from robtui.files import write_text_atomic
        from robtui.workspace.evidence_map import to_csv

        if self.emap is None:
            return
        path = export_path(self.folder.exports_dir, f"evidence-map-{self.effect}.csv",
                           self.folder.root)
        write_text_atomic(path, to_csv(self.emap))
        self.notify(f"wrote {path}", timeout=4)

    def action_back(self) -> None:
        self.app.pop_screen()
