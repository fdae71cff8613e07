"""What was planned, beside what was reported: the pre-specification panel of one result.

Registration date against first enrolment, the outcome's status in the registry record(s) and
the protocol, outcomes switched, added, dropped or changed, and the planned and reported
sentences side by side. The reviewer may attach any passage to the focused question as a
quote (``q``); the panel answers nothing.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from typing import ClassVar

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option

from robtui.errors import RobtuiError


class PrespecificationScreen(ModalScreen):
    """One study and result: the findings, each passage selectable to quote."""

    DEFAULT_CSS = """
    PrespecificationScreen { align: center middle; }
    PrespecificationScreen > Vertical {
        width: 96%; height: 94%; border: round $accent; background: $surface; padding: 0 1;
    }
    PrespecificationScreen #plan-head { height: auto; }
    PrespecificationScreen #plan-findings { height: 2fr; }
    PrespecificationScreen #plan-side { height: 1fr; }
    PrespecificationScreen #plan-foot { height: auto; color: $text-muted; }
    """

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("q", "attach", "Quote to focused question"),
        Binding("escape,w", "close", "Close"),
    ]

    def __init__(self, folder, study_id: str, result_id: str, question_id: str | None,
                 attach: Callable[[object], str], *, compared=None) -> None:
        """``compared``: the comparison already made (found, sources), else it is made here."""
        super().__init__()
        self.compared = compared
        self.folder = folder
        self.study_id = study_id
        self.result_id = result_id
        self.question_id = question_id
        self.attach = attach
        self.passages: dict[str, object] = {}
        self._opened = time.perf_counter()
        self.shown_seconds: float | None = None  # opening to findings shown (for the bench)

    def compose(self) -> ComposeResult:
        with Vertical():
            yield Static(f"What was planned · {self.study_id} / {self.result_id}: reading the "
                         "registry records, protocol and report …", id="plan-head")
            yield OptionList(id="plan-findings")
            with VerticalScroll(id="plan-side"):
                yield Static("", id="plan-side-text")
            target = self.question_id or "the focused question"
            yield Static(f"q: attach the highlighted passage to {target} as a quote · escape: "
                         "close. Findings are for you to read; they answer nothing.",
                         id="plan-foot")

    def on_mount(self) -> None:
        if self.compared is not None:
            self._show(*self.compared)
        else:
            self.run_worker(self._compare, thread=True, exit_on_error=False)

    def _compare(self) -> None:
        from robtui.workspace.prespecifying import prespecification

        try:
            found, sources = prespecification(self.folder, self.study_id, self.result_id)
        except RobtuiError as error:
            self.app.call_from_thread(self._problem, str(error))
            return
        self.app.call_from_thread(self._show, found, sources)

    def _problem(self, message: str) -> None:
        self.query_one("#plan-head", Static).update(Text(message, style="bold"))

    def _show(self, found, sources) -> None:
        head = Text.assemble(
            ("What was planned", "bold"), f" · {self.study_id} / {self.result_id}\n",
            "outcome in the report's words: ", (found.outcome, "italic"), "\n",
            "status: ", (found.status, "bold"), "   registration: ", (found.timing, "bold"))
        for note in sources.notes:
            head.append(f"\nnote: {note}")
        self.query_one("#plan-head", Static).update(head)
        options: list[Option] = []
        for number, finding in enumerate(found.findings, 1):
            options.append(Option(Text.assemble((f"{number}. [{finding.topic}] ", "bold"),
                                                finding.text), disabled=True))
            for k, passage in enumerate(finding.passages, 1):
                key = f"{number}-{k}"
                self.passages[key] = passage
                where = f" p{passage.page}" if passage.page else ""
                options.append(Option(Text(f"    {passage.source}{where}: “{passage.text}”"),
                                      id=key))
        findings = self.query_one(OptionList)
        findings.add_options(options)
        findings.focus()
        side = Table(box=None, expand=True, show_header=True, header_style="bold")
        side.add_column("planned (registry / protocol)", ratio=1)
        side.add_column("reported", ratio=1)
        for planned, reported in found.side_by_side:
            side.add_row(planned.text if planned else "(no match)",
                         reported.text if reported else "(the report names no match)")
        self.query_one("#plan-side-text", Static).update(side)
        self.shown_seconds = time.perf_counter() - self._opened

    def action_attach(self) -> None:
        findings = self.query_one(OptionList)
        index = findings.highlighted
        if index is None:
            self.notify("highlight a passage first (up/down)", severity="warning")
            return
        option = findings.get_option_at_index(index)
        passage = self.passages.get(option.id or "")
        if passage is None:
            return
        self.notify(self.attach(passage), timeout=3)

    def action_close(self) -> None:
        self.dismiss(None)
