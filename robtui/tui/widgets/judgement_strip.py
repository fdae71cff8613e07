"""A row of the five domains and the overall judgement; click a domain to go there."""

from __future__ import annotations

from collections.abc import Mapping

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Static

from robtui.tui.palette import badge, cell_badge


class DomainTab(Static):
    """One domain's number and current judgement."""

    class Chosen(Message):
        def __init__(self, key: str) -> None:
            super().__init__()
            self.key = key

    def __init__(self, key: str, **kwargs) -> None:
        super().__init__(**kwargs)
        self.key = key

    def show(self, judgement: str, *, current: bool, overridden: bool, compact: bool) -> None:
        name = "Overall" if self.key == "overall" else f"D{self.key}"
        text = Text(f"{name}", style="bold reverse" if current else "bold")
        if compact:
            text.append(" ")
            text.append_text(cell_badge(judgement, letter_only=True))
        else:
            text.append_text(badge(judgement, short=True))
        if overridden:
            text.append("*", style="bold")
        self.update(text)

    def on_click(self) -> None:
        self.post_message(self.Chosen(self.key))


class JudgementStrip(Horizontal):
    """D1 … D5 and Overall, each with its (final) judgement; * marks an override. Where the
    full labels do not fit, each shows its letter (L, S, H) only."""

    FULL_WIDTH = 70  # cells the strip needs for the full short labels

    def __init__(self, keys: list[str], **kwargs) -> None:
        super().__init__(**kwargs)
        self.keys = keys
        self._last: tuple | None = None

    def on_resize(self) -> None:
        if self._last is not None:
            self.show(*self._last)

    def compose(self) -> ComposeResult:
        for key in self.keys:
            yield DomainTab(key, id=f"tab-{key}", classes="domain-tab")

    def show(self, finals: Mapping[str, str], current: str, overridden: set[str]) -> None:
        self._last = (finals, current, overridden)
        compact = 0 < self.size.width < self.FULL_WIDTH
        for tab in self.query(DomainTab):
            tab.show(
                finals.get(tab.key, "incomplete"),
                current=tab.key == current,
                overridden=tab.key in overridden,
                compact=compact,
            )
