"""First screens: who is assessing, and the message shown when a review cannot be opened."""

from __future__ import annotations

from typing import ClassVar

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Vertical
from textual.screen import Screen
from textual.widgets import Input, Label, OptionList, Static
from textual.widgets.option_list import Option

from robtui.errors import InputError
from robtui.tui.widgets.key_hints import KeyHints
from robtui.workspace import check_reviewer_name


class ReviewerScreen(Screen[str]):
    """Ask for the reviewer's name (the names listed in the review are offered)."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("ctrl+q", "app.quit", "Quit")]

    def __init__(self, review_title: str, listed: list[str]) -> None:
        super().__init__()
        self.review_title = review_title
        self.listed = listed

    def compose(self) -> ComposeResult:
        with Vertical(classes="start-box"):
            yield Label(Text(self.review_title, style="bold"))
            yield Static(
                "Who is assessing? Your answers are kept apart from every other reviewer's, "
                "and you will not see theirs."
            )
            if self.listed:
                yield Static(
                    "Reviewers named in this review (up/down, enter to choose; tab: type a "
                    "name instead):",
                    classes="dim",
                )
                yield OptionList(*[Option(n, id=n) for n in self.listed], id="reviewer-list")
            yield Input(
                placeholder="or type your reviewer name and press enter", id="reviewer-name"
            )
            yield Static("", id="reviewer-error", classes="error-text")
        yield KeyHints()

    def on_mount(self) -> None:
        if self.listed:
            self.query_one("#reviewer-list", OptionList).focus()
        else:
            self.query_one("#reviewer-name", Input).focus()

    @on(OptionList.OptionSelected, "#reviewer-list")
    def _picked(self, event: OptionList.OptionSelected) -> None:
        self._accept(event.option.id or "")

    @on(Input.Submitted, "#reviewer-name")
    def _typed(self, event: Input.Submitted) -> None:
        if not event.value.strip() and self.listed:
            self.query_one("#reviewer-error", Static).update(
                "Type your reviewer name, or choose one from the list above (shift+tab, "
                "then enter)."
            )
            return
        self._accept(event.value)

    def _accept(self, name: str) -> None:
        try:
            name = check_reviewer_name(name)
        except InputError as error:
            self.query_one("#reviewer-error", Static).update(Text(str(error)))
            return
        self.dismiss(name)


class ProblemScreen(Screen[None]):
    """A review that cannot be opened: say what is wrong and what to do."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("ctrl+q,escape,q", "app.quit", "Quit")]

    def __init__(self, message: str) -> None:
        super().__init__()
        self.message = message

    def compose(self) -> ComposeResult:
        with Vertical(classes="start-box"):
            yield Label(Text("This review cannot be opened", style="bold"))
            yield Static(Text(self.message), id="problem-message", classes="error-text")
            yield Static("Nothing was changed on disk. Press q to quit.")
        yield KeyHints()
