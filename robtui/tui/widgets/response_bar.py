"""The answer keys as a row of small buttons: the key hint and a mouse target at once."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.message import Message
from textual.widgets import Button

from robtui.tui.keys import RESPONSE_KEYS, RESPONSE_NAMES


class ResponseButton(Button, can_focus=False):
    pass


class ResponseBar(Horizontal):
    class Picked(Message):
        def __init__(self, response: str | None) -> None:
            super().__init__()
            self.response = response

    def compose(self) -> ComposeResult:
        for key, code in RESPONSE_KEYS.items():
            button = ResponseButton(f"{key} {code}", id=f"answer-{code}", compact=True)
            button.tooltip = RESPONSE_NAMES[code]
            yield button
        yield ResponseButton("⌫ clear", id="answer-clear", compact=True)

    def on_button_pressed(self, event: Button.Pressed) -> None:
        event.stop()
        code = (event.button.id or "").removeprefix("answer-")
        self.post_message(self.Picked(None if code == "clear" else code))
