"""The help screen: the key map, and what the suggestions are (and are not)."""

from __future__ import annotations

from typing import ClassVar

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Label, Static

from robtui.tui.keys import KEY_MAP, RESPONSE_KEYS, RESPONSE_NAMES, KeyHelp

ABOUT_SUGGESTIONS = (
    "Suggested sentences are candidates found by a lexical classifier, ranked with a score "
    "between 0 and 1. They can be wrong or incomplete: read the report, and answer as your "
    "review's handbook says. The proposed judgements follow the published RoB 2 algorithm; "
    "you may override any of them with a reason."
)


def key_table(key_map: tuple[KeyHelp, ...] = KEY_MAP) -> Table:
    table = Table(box=None, show_header=True, header_style="bold", expand=True)
    table.add_column("Where", no_wrap=True)
    table.add_column("Keys", no_wrap=True, style="bold")
    table.add_column("What")
    for item in key_map:
        table.add_row(item.screen, item.keys, item.what)
    return table


class HelpScreen(ModalScreen[None]):
    """The key map; ``key_map`` names the domain keys of the question sets in use."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape,question_mark,f1,enter", "close", "Close help")
    ]

    def __init__(self, key_map: tuple[KeyHelp, ...] = KEY_MAP) -> None:
        super().__init__()
        self.key_map = key_map

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog wide", id="help"):
            title = Text("Workbench keys", style="bold")
            title.append("   esc, ? or enter closes · ↑↓ pgup pgdn scroll", style="dim")
            yield Label(title)
            with VerticalScroll(classes="dialog-list"):
                yield Static(key_table(self.key_map))
                answers = Text("\nAnswer keys: ", style="bold")
                answers.append(
                    ", ".join(f"{k} = {c} ({RESPONSE_NAMES[c]})" for k, c in RESPONSE_KEYS.items()),
                    style="",
                )
                yield Static(answers)
                yield Static(Text("\n" + ABOUT_SUGGESTIONS, style="italic"))
                yield Static(
                    "\nEvery change is saved at once; quitting never loses work. Another "
                    "reviewer's answers are never shown here: only the review's lead sees the "
                    "comparison."
                )

    def on_mount(self) -> None:
        self.query_one(VerticalScroll).focus()  # arrows and page keys scroll at once

    def action_close(self) -> None:
        self.dismiss(None)
