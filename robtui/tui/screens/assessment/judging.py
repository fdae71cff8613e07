"""The reviewer's own word on the judgements, in dialogs on the assessment screen: overriding a
proposed judgement (o / O), the support and predicted direction of bias (r / R), the domain
summary (s), the effect of interest (t, set by the review), marking complete or reopening (c).

A mixin of AssessmentScreen (it uses the screen's session, widgets and ``domain_id``).
"""

from __future__ import annotations

from robtui.core.model import OVERALL
from robtui.tui.screens.assessment.form_text import domain_summary
from robtui.tui.screens.dialogs import (
    ListDialog,
    OverrideChoice,
    OverrideDialog,
    SupportChoice,
    SupportDialog,
    TextDialog,
)


class Judging:
    """Overrides, support and direction, summary, effect, completion."""

    def action_override(self, which: str) -> None:
        key = OVERALL if which == "overall" else self.domain_id
        s = self.session
        if not self._editable():
            return
        if s.proposed(key) == "incomplete":
            what = "the overall" if key == OVERALL else f"domain {key}"
            self.notify(
                f"{what} is not judged yet: answer its questions before overriding",
                severity="warning",
            )
            return
        title = "overall judgement" if key == OVERALL else f"domain {key}: {s.domain(key).name}"
        note = ""
        if key == OVERALL and s.may_raise_overall():
            note = "Several domains have some concerns and none is high: the overall may be raised to High."

        def done(choice: OverrideChoice | None) -> None:
            if choice is None:
                return
            if choice.judgement is None:
                ok = self._guard(lambda: s.clear_override(key))
            else:
                ok = self._guard(lambda: s.set_override(key, choice.judgement, choice.reason))
            if ok:
                self._refresh_judgements()

        self.app.push_screen(OverrideDialog(title, s.proposed(key), s.override(key), note), done)

    def action_support(self, which: str) -> None:
        """The support of the domain's judgement and its predicted direction of bias (r), or
        the overall direction (R), as the RoB 2 form has them."""
        key = OVERALL if which == "overall" else self.domain_id
        s = self.session
        if not self._editable():
            return
        if key == OVERALL:
            title, support = "Overall: predicted direction of bias", None
        else:
            title = f"{s.qset.domain_label(key, s.effect)}: support and direction of bias"
            support = s.assessment.support.get(key, "")

        def done(choice: SupportChoice | None) -> None:
            if choice is not None and self._guard(
                lambda: s.set_support_and_direction(key, choice.support, choice.direction)
            ):
                self._refresh_judgements()

        self.app.push_screen(SupportDialog(title, support, s.assessment.direction.get(key)), done)

    def action_summary(self) -> None:
        self.app.push_screen(
            TextDialog(f"Domain {self.domain_id} summary",
                       domain_summary(self.session, self.domain_id))
        )

    def action_effect(self) -> None:
        """The effect of interest belongs to the result: say so, and where it is set."""
        s = self.session
        label = s.result.outcome if s.result else s.assessment.result_id
        self.app.push_screen(
            ListDialog(
                "Effect of interest",
                [
                    f"{label}: the {s.qset.effect_label(s.effect)}.",
                    (
                        "It was set for this result when the review added it, so every "
                        "reviewer answers the same questions."
                    ),
                    (
                        "To change it, the review's lead edits the result (robtui result); "
                        "your answers to both variants are kept."
                    ),
                ],
            )
        )

    def action_complete(self) -> None:
        s = self.session
        self._flush_justification()
        if s.is_complete:
            if self._guard(s.reopen):
                self.notify("reopened: you can change the answers again")
                self.refresh_form(keep=self.question_id)
            return
        missing = s.completion_problems()
        if missing:
            self.app.push_screen(
                ListDialog("Not complete yet", missing, "Before marking complete, please see to:")
            )
            return
        if self._guard(s.mark_complete):
            self.notify("marked complete")
            self.refresh_form(keep=self.question_id)
            self.learn_from_completed()
