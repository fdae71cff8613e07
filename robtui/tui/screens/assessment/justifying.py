"""The justification of the focused answer on the assessment screen: e opens the field, what
is typed is saved after a short quiet spell, on enter, on leaving the field, and before the
screen or the app closes.

A mixin of AssessmentScreen (it uses the screen's session, widgets and ``question_id``).
"""

from __future__ import annotations

from textual.widgets import TextArea

from robtui.errors import RobtuiError
from robtui.tui.widgets.justification import JustificationArea
from robtui.tui.widgets.question_list import QuestionList

JUSTIFICATION_SAVE_DELAY = 0.4  # seconds of quiet typing before the justification is saved


class Justifying:
    """Writing and saving the focused answer's justification."""

    _justify_timer = None
    _justify_for: str | None = None  # the question the field shows
    _typed: str | None = None  # justification typed, not saved yet

    def action_justify(self) -> None:
        if self._editable():
            self.query_one("#justification", JustificationArea).focus()

    def _refresh_justification(self) -> None:
        """Show the focused answer's justification (what was typed for another is saved)."""
        field = self.query_one("#justification", JustificationArea)
        qid = self.question_id
        answer = self.session.answer(qid) if qid else None
        self._justify_for = qid
        self._typed = None
        text = answer.justification if answer else ""
        if field.text != text:
            with field.prevent(TextArea.Changed):
                field.load_text(text)
        field.placeholder = (
            f"Justification for {qid} (e to write, enter when done, ctrl+j new line)" if qid else ""
        )
        field.disabled = self.session.is_complete or qid is None

    def on_text_area_changed(self, event: TextArea.Changed) -> None:
        if event.text_area.id != "justification":
            return
        self._typed = event.text_area.text
        if self._justify_timer is not None:
            self._justify_timer.stop()
        self._justify_timer = self.set_timer(JUSTIFICATION_SAVE_DELAY, self._flush_justification)

    def on_justification_area_done(self, event: JustificationArea.Done) -> None:
        self._flush_justification()
        self.query_one("#questions", QuestionList).focus()

    def on_descendant_blur(self, event) -> None:
        if getattr(event.widget, "id", None) == "justification":
            self._flush_justification()

    def _flush_justification(self, *, redraw: bool = True) -> None:
        """Save what was typed in the justification field (also called when quitting)."""
        if self._justify_timer is not None:
            self._justify_timer.stop()
            self._justify_timer = None
        qid, text, self._typed = self._justify_for, self._typed, None
        if qid is None or text is None or self.session.is_complete:
            return
        try:
            before = self.session.answer(qid)
            if (before.justification if before else "") != text:
                self.session.set_justification(qid, text)
                if redraw:
                    self._refresh_question_lines()
        except RobtuiError as error:
            self.notify(str(error), severity="error")

    def save_pending(self) -> None:
        """Write anything not yet saved (the app calls this before it exits)."""
        self._flush_justification(redraw=False)
