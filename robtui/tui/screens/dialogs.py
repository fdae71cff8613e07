"""Small dialogs: override with reason, settling a difference, what is
missing, a message."""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Button, Input, Label, OptionList, Static, TextArea
from textual.widgets.option_list import Option

from robtui.core.model import DIRECTION_LABELS
from robtui.tui.keys import RESPONSE_NAMES
from robtui.tui.palette import badge

CLOSE_HINT = "  enter or esc closes"


@dataclass(frozen=True)
class OverrideChoice:
    judgement: str | None  # None: remove the override
    reason: str = ""


class OverrideDialog(ModalScreen[OverrideChoice | None]):
    """Replace the proposed judgement; the reason is required."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape", "cancel", "Cancel")]
    CHOICES = ("low", "some_concerns", "high")

    def __init__(self, title: str, proposed: str, current, note: str = "") -> None:
        super().__init__()
        self.title_text = title
        self.proposed = proposed
        self.current = current  # Override | None
        self.note = note

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(f"Override — {self.title_text}", style="bold"))
            proposed = Text("The algorithm proposes ")
            proposed.append_text(badge(self.proposed))
            yield Static(proposed)
            if self.note:
                yield Static(self.note, classes="dialog-note")
            yield Static(
                "Choose a judgement (enter), give the reason (enter saves). Choosing the "
                "proposal again removes an override. Escape cancels.",
                classes="dialog-note",
            )
            yield OptionList(
                *[Option(badge(code), id=code) for code in self.CHOICES], id="override-options"
            )
            yield Input(
                value=self.current.reason if self.current else "",
                placeholder="Reason for the override (required)",
                id="override-reason",
            )
            yield Static("", id="override-error", classes="error-text")
            with Horizontal(classes="dialog-buttons"):
                yield Button("Save override", id="override-save", variant="primary", compact=True)
                if self.current is not None:
                    yield Button("Remove override", id="override-remove", compact=True)
                yield Button("Cancel", id="override-cancel", compact=True)

    def on_mount(self) -> None:
        options = self.query_one("#override-options", OptionList)
        start = self.current.judgement if self.current else self.proposed
        options.highlighted = self.CHOICES.index(start) if start in self.CHOICES else 0
        options.focus()

    @on(OptionList.OptionSelected, "#override-options")
    def _judgement_chosen(self) -> None:
        self.query_one("#override-reason", Input).focus()

    @on(Input.Submitted, "#override-reason")
    @on(Button.Pressed, "#override-save")
    def _save(self) -> None:
        options = self.query_one("#override-options", OptionList)
        judgement = self.CHOICES[options.highlighted or 0]
        if judgement == self.proposed:  # back to the proposal: no override
            if self.current is not None:
                self.dismiss(OverrideChoice(None))
                return
            self.query_one("#override-error", Static).update(
                "That is the proposed judgement: choose another one to override it."
            )
            options.focus()
            return
        reason = self.query_one("#override-reason", Input).value.strip()
        if not reason:
            self.query_one("#override-error", Static).update(
                "An override needs a reason: say why your judgement differs from the proposal."
            )
            self.query_one("#override-reason", Input).focus()
            return
        self.dismiss(OverrideChoice(judgement, reason))

    @on(Button.Pressed, "#override-remove")
    def _remove(self) -> None:
        self.dismiss(OverrideChoice(None))

    @on(Button.Pressed, "#override-cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)


@dataclass(frozen=True)
class SupportChoice:
    support: str | None  # None: the overall (no support box on the form)
    direction: str | None  # None: no direction given


class SupportDialog(ModalScreen[SupportChoice | None]):
    """The RoB 2 form's support of a domain judgement and the optional direction of bias."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape", "cancel", "Cancel")]
    NONE = "none"

    def __init__(
        self, title: str, support: str | None, direction: str | None, note: Text | str = ""
    ) -> None:
        super().__init__()
        self.title_text = title
        self.support = support
        self.direction = direction
        self.note = note  # e.g. what each reviewer gave, for the lead

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(self.title_text, style="bold"))
            if self.note:
                yield Static(self.note, classes="dialog-note")
            if self.support is not None:
                yield Input(
                    value=self.support,
                    placeholder="Support for the judgement (free text, optional)",
                    id="support-text",
                )
            yield Static(
                "Predicted direction of bias (optional): up/down, enter saves, esc cancels.",
                classes="dialog-note",
            )
            options = [Option("not given", id=self.NONE)]
            options += [Option(label, id=code) for code, label in DIRECTION_LABELS.items()]
            yield OptionList(*options, id="direction-options")

    def on_mount(self) -> None:
        options = self.query_one("#direction-options", OptionList)
        ids = [self.NONE, *DIRECTION_LABELS]
        options.highlighted = ids.index(self.direction) if self.direction in ids else 0
        if self.support is not None:
            self.query_one("#support-text", Input).focus()
        else:
            options.focus()

    @on(Input.Submitted, "#support-text")
    def _to_direction(self) -> None:
        self.query_one("#direction-options", OptionList).focus()

    @on(OptionList.OptionSelected, "#direction-options")
    def _save(self, event: OptionList.OptionSelected) -> None:
        direction = None if event.option.id == self.NONE else event.option.id
        support = None
        if self.support is not None:
            support = self.query_one("#support-text", Input).value
        self.dismiss(SupportChoice(support, direction))

    def action_cancel(self) -> None:
        self.dismiss(None)


class QuotePartDialog(ModalScreen[tuple[int, int] | None]):
    """Select part of a sentence or passage to quote: shift+arrows (or the mouse) select,
    enter takes the selection (all of it when nothing is selected), escape cancels. Returns
    offsets into the text shown."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("escape", "cancel", "Cancel"),
        Binding("enter", "take", "Quote the selection", priority=True),
    ]

    def __init__(self, title: str, text: str) -> None:
        super().__init__()
        self.title_text = title
        self.text = text

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog wide"):
            yield Label(Text(self.title_text, style="bold"))
            yield Static(
                "Select the words to quote with shift+arrows (shift+ctrl+arrows by word) or the "
                "mouse; enter quotes the selection (all when none), esc cancels.",
                classes="dialog-note",
            )
            yield TextArea(
                self.text, read_only=True, soft_wrap=True, show_line_numbers=False,
                id="quote-part", classes="dialog-list",
            )

    def on_mount(self) -> None:
        self.query_one("#quote-part", TextArea).focus()

    def action_take(self) -> None:
        area = self.query_one("#quote-part", TextArea)
        start, end = sorted(area.selection)
        if start == end:
            self.dismiss((0, len(self.text)))
            return
        document = area.document
        self.dismiss(
            (document.get_index_from_location(start), document.get_index_from_location(end))
        )

    def action_cancel(self) -> None:
        self.dismiss(None)


class ListDialog(ModalScreen[None]):
    """A titled list of lines (what is missing, problems); any of enter/escape closes it."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape,enter", "close", "Close")]

    def __init__(self, title: str, lines: list[str], intro: str = "") -> None:
        super().__init__()
        self.title_text = title
        self.lines = lines
        self.intro = intro

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(self.title_text, style="bold"))
            if self.intro:
                yield Static(self.intro, classes="dialog-note")
            with VerticalScroll(classes="dialog-list"):
                for line in self.lines:
                    yield Static(Text(f"• {line}"))
            with Horizontal(classes="dialog-buttons"):
                yield Button("Close", id="list-close", compact=True)
                yield Static(CLOSE_HINT, classes="dim")

    @on(Button.Pressed, "#list-close")
    def action_close(self) -> None:
        self.dismiss(None)


class TextDialog(ModalScreen[None]):
    """A titled block of rich text in a scroll area (domain summary)."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape,enter,s", "close", "Close")]

    def __init__(self, title: str, body: Text) -> None:
        super().__init__()
        self.title_text = title
        self.body = body

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog wide"):
            yield Label(Text(self.title_text, style="bold"))
            with VerticalScroll(classes="dialog-list"):
                yield Static(self.body)
            with Horizontal(classes="dialog-buttons"):
                yield Button("Close", id="text-close", compact=True)
                yield Static(CLOSE_HINT + " · ↑↓ scroll", classes="dim")

    @on(Button.Pressed, "#text-close")
    def action_close(self) -> None:
        self.dismiss(None)


@dataclass(frozen=True)
class SettleChoice:
    response: str | None  # the new answer; None when a reviewer's answer is taken
    note: str


class SettleDialog(ModalScreen[SettleChoice | None]):
    """The lead settles one question: a note is required; a new answer also needs a response."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape", "cancel", "Cancel")]

    def __init__(
        self, title: str, what: Text, options: tuple[str, ...] = (), current: str | None = None
    ) -> None:
        super().__init__()
        self.title_text = title
        self.what = what
        self.options = options  # empty: a reviewer's answer is taken as it is
        self.current = current

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog wide"):
            yield Label(Text(self.title_text, style="bold"))
            yield Static(self.what, classes="dialog-note")
            if self.options:
                yield OptionList(
                    *[
                        Option(f"{code}  {RESPONSE_NAMES.get(code, code)}", id=code)
                        for code in self.options
                    ],
                    id="settle-options",
                )
            yield Input(
                placeholder="Note: why this is the agreed answer (required)", id="settle-note"
            )
            yield Static("", id="settle-error", classes="error-text")
            with Horizontal(classes="dialog-buttons"):
                yield Button("Settle", id="settle-save", variant="primary")
                yield Button("Cancel", id="settle-cancel")

    def on_mount(self) -> None:
        if self.options:
            options = self.query_one("#settle-options", OptionList)
            if self.current in self.options:
                options.highlighted = self.options.index(self.current)
            options.focus()
        else:
            self.query_one("#settle-note", Input).focus()

    @on(OptionList.OptionSelected, "#settle-options")
    def _response_chosen(self) -> None:
        self.query_one("#settle-note", Input).focus()

    @on(Input.Submitted, "#settle-note")
    @on(Button.Pressed, "#settle-save")
    def _save(self) -> None:
        note = self.query_one("#settle-note", Input).value.strip()
        if not note:
            self.query_one("#settle-error", Static).update(
                "A note is required: say why this is the agreed answer."
            )
            self.query_one("#settle-note", Input).focus()
            return
        response = None
        if self.options:
            response = self.options[self.query_one("#settle-options", OptionList).highlighted or 0]
        self.dismiss(SettleChoice(response, note))

    @on(Button.Pressed, "#settle-cancel")
    def action_cancel(self) -> None:
        self.dismiss(None)


class ChoiceDialog(ModalScreen[str | None]):
    """Choose one of a few labelled options (enter chooses, escape cancels)."""

    BINDINGS: ClassVar[list[BindingType]] = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, title: str, options: list[tuple[str, Text | str]]) -> None:
        super().__init__()
        self.title_text = title
        self.options = options

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(f"{self.title_text} (enter chooses, escape cancels)", style="bold"))
            yield OptionList(*[Option(label, id=key) for key, label in self.options])

    @on(OptionList.OptionSelected)
    def _chosen(self, event: OptionList.OptionSelected) -> None:
        self.dismiss(event.option.id)

    def action_cancel(self) -> None:
        self.dismiss(None)


class ConfirmDialog(ModalScreen[bool]):
    """A yes/no question; only an explicit yes confirms (y or the button), anything else not."""

    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("y", "answer(True)", "Yes"),
        Binding("n,escape", "answer(False)", "No"),
    ]

    def __init__(self, title: str, question: str) -> None:
        super().__init__()
        self.title_text = title
        self.question = question

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Label(Text(self.title_text, style="bold"))
            yield Static(self.question, classes="dialog-note")
            with Horizontal(classes="dialog-buttons"):
                yield Button("Yes (y)", id="confirm-yes", variant="warning")
                yield Button("No (n)", id="confirm-no", variant="primary")

    def on_mount(self) -> None:
        self.query_one("#confirm-no", Button).focus()

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        self.dismiss(event.button.id == "confirm-yes")

    def action_answer(self, yes: bool) -> None:
        self.dismiss(yes)
