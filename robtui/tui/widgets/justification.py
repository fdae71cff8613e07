"""The justification field: several lines of text; enter finishes, ctrl+j starts a new line.

Enter keeps the meaning it has everywhere else in the workbench (done); a new line is
ctrl+j (or shift+enter where the terminal reports it). Pasted text keeps its line breaks.
"""

from __future__ import annotations

from textual import events
from textual.message import Message
from textual.widgets import TextArea

NEW_LINE_KEYS = ("ctrl+j", "shift+enter")


class JustificationArea(TextArea):
    """A TextArea whose enter key posts ``Done`` instead of inserting a line break."""

    class Done(Message):
        """The reviewer pressed enter: the justification is written."""

        def __init__(self, area: JustificationArea) -> None:
            super().__init__()
            self.area = area

        @property
        def control(self) -> JustificationArea:
            return self.area

    def __init__(self, **kwargs) -> None:
        super().__init__(soft_wrap=True, show_line_numbers=False, tab_behavior="focus", **kwargs)

    async def _on_key(self, event: events.Key) -> None:
        if self.read_only or self.disabled:
            return
        if event.key == "enter":
            event.stop()
            event.prevent_default()
            self.post_message(self.Done(self))
            return
        if event.key in NEW_LINE_KEYS:
            event.stop()
            event.prevent_default()
            start, end = self.selection
            self._replace_via_keyboard("\n", start, end)
            return
        await super()._on_key(event)
