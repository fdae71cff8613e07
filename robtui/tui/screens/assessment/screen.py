"""The assessment screen: the report beside the signalling questions of one domain.

Left: the report by section with page numbers; the focused question's suggested sentences
carry rank and score. Right: the domain's asked questions, the answer keys, the
justification of the focused answer, and the proposed and final judgements, which update as
answers change. Every change is saved at once through the AssessmentSession.

This module holds the screen's layout, its keys and moving about (questions, domains, panes,
search); the rest is in its own module each: documents.py (reading and showing the study's
documents), quoting.py (suggestions and quotes), justifying.py (the justification field),
judging.py (override, support and direction, summary, effect, complete), saving.py (the
changes written in a worker, in order; leaving waits for them), form_text.py (what the panels
say).
"""

from __future__ import annotations

import time
from typing import ClassVar

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.screen import Screen
from textual.widgets import Input, Label, Static, TextArea

from robtui.core.explaining import determined_overall
from robtui.core.model import OVERALL
from robtui.errors import RobtuiError
from robtui.tui.keys import RESPONSE_KEYS, domain_bindings, keys_label
from robtui.tui.report_loading import LoadedReport
from robtui.tui.screens.assessment.documents import ReportDocuments
from robtui.tui.screens.assessment.form_text import (
    heading_text,
    reasons_text,
    report_question_text,
    rules_text,
)
from robtui.tui.screens.assessment.judging import Judging
from robtui.tui.screens.assessment.justifying import Justifying
from robtui.tui.screens.assessment.quoting import CANDIDATE_NOTE, Quoting
from robtui.tui.screens.assessment.saving import Saving
from robtui.tui.session import AssessmentSession
from robtui.tui.widgets.judgement_strip import DomainTab, JudgementStrip
from robtui.tui.widgets.justification import JustificationArea
from robtui.tui.widgets.key_hints import FIELD_KEYS, INPUT_KEYS, KeyHints
from robtui.tui.widgets.question_list import QuestionList, line_for
from robtui.tui.widgets.report_view import ReportView
from robtui.tui.widgets.response_bar import ResponseBar


def _answer_bindings() -> list[Binding]:
    return [
        Binding(key, f"answer('{code}')", code, show=False) for key, code in RESPONSE_KEYS.items()
    ]


class AssessmentScreen(Saving, Judging, Quoting, Justifying, ReportDocuments, Screen[None]):
    AUTO_FOCUS = "#questions"
    BINDINGS: ClassVar[list[BindingType]] = [
        *_answer_bindings(),
        Binding("backspace", "answer(None)", "Clear", show=False),
        Binding("j", "next_question", "Next Q", show=False),
        Binding("k", "previous_question", "Prev Q", show=False),
        Binding("right_square_bracket", "suggestion(1)", "Next sugg.", show=False),
        Binding("left_square_bracket", "suggestion(-1)", "Prev sugg.", show=False),
        Binding("q", "quote", "Quote", show=False),
        Binding("v", "passage", "Mark a passage", show=False),
        Binding("Q", "quote_part", "Quote part", show=False),
        Binding("x", "dismiss_suggestion", "Dismiss", show=False),
        Binding("e", "justify", "Justify", show=False),
        Binding("g", "guidance", "Guidance", show=False),
        Binding("slash", "search", "Search", show=False),
        Binding("o", "override('domain')", "Override", show=False),
        Binding("O", "override('overall')", "Override overall", show=False),
        Binding("r", "support('domain')", "Support, direction of bias", show=False),
        Binding("R", "support('overall')", "Overall direction of bias", show=False),
        Binding("s", "summary", "Summary", show=False),
        Binding("t", "effect", "Effect", show=False),
        Binding("c", "complete", "Complete", show=False),
        Binding("d", "next_document", "Next document", show=False),
        Binding("w", "planned", "Planned", show=False),
        Binding("tab", "switch_pane", "Report/questions", show=False, priority=True),
        Binding("escape", "back", "Overview", show=False),
        Binding("question_mark,f1", "app.help", "Help", show=False),
    ]

    def __init__(self, session: AssessmentSession) -> None:
        super().__init__()
        self.session = session
        self.domain_id = session.domain_ids()[0]
        self.domain_keys = domain_bindings(session.qset, self.taken_keys())
        for key, domain_id in self.domain_keys.items():
            self._bindings.bind(key, f"domain('{domain_id}')", f"Domain {domain_id}", show=False)
        self.loaded: list[LoadedReport] = []
        self.document_index = 0
        self.last_update_seconds: float | None = None  # keystroke -> judgement shown (bench)
        self.last_update_at = 0.0  # time.perf_counter() when it was shown (bench)
        self._plan_started = False
        self.show_guidance = False  # g: the focused question's guidance under it
        self._stepped_for: str | None = None  # the question ] / [ last stepped through

    @classmethod
    def taken_keys(cls) -> set[str]:
        """Keys the screen binds itself: a question set's domain key among them is left out."""
        return {key.strip() for b in cls.BINDINGS for key in b.key.split(",")}

    def key_hints(self) -> list[tuple[str, str, str]]:
        """The footer: every key a reviewer needs, short (the help screen says more)."""
        first = self.session.domain_ids()[0]
        hints = [
            ("j/k", "question", "next_question"),
            (keys_label(list(self.domain_keys)), "domain", f"domain('{first}')"),
            ("tab", "questions" if self.has_class("-reading") else "report", "switch_pane"),
            ("]/[", "suggestion", "suggestion(1)"),
            ("q", "quote", "quote"),
            ("v/Q", "passage", "passage"),
            ("x", "dismiss", "dismiss_suggestion"),
            ("e", "justify", "justify"),
            ("g", "guidance", "guidance"),
            ("/", "search", "search"),
            ("o/O", "override", "override('domain')"),
            ("r/R", "support", "support('domain')"),
            ("s", "summary", "summary"),
            ("c", "complete", "complete"),
        ]
        if len(self.loaded) > 1:
            hints.append(("d", "document", "next_document"))
        hints.append(("w", "planned", "planned"))
        hints += [("esc", "overview", "back"), ("?", "help", "app.help")]  # ^q: overview, help
        return hints

    # -- layout ------------------------------------------------------------------------
    def compose(self) -> ComposeResult:
        s = self.session
        heading = Text(f"{s.study.label if s.study else s.assessment.study_id}", style="bold")
        result = s.result
        heading.append(f"  ·  {result.outcome if result else s.assessment.result_id}")
        if result and result.time_point:
            heading.append(f" ({result.time_point})")
        heading.append(f"  ·  reviewer {s.review_session.reviewer}", style="dim")
        yield Static(heading, id="assessment-title")
        with Horizontal(id="assessment-body"):
            with Vertical(id="report-panel"):
                yield Static("", id="report-question")
                yield Static("", id="report-heading")
                yield Label("Opening the report …", id="report-progress")
                yield ReportView(id="report")
                yield Input(
                    placeholder="Search the report (enter: next match, escape: close)", id="search"
                )
                yield Static(Text(CANDIDATE_NOTE, style="italic"), id="candidate-note")
            with Vertical(id="form-panel"):
                yield JudgementStrip([*s.domain_ids(), OVERALL], id="strip")
                yield Static("", id="domain-heading")
                yield QuestionList(id="questions")
                yield Static("", id="rules")
                yield ResponseBar(id="responses")
                yield JustificationArea(
                    placeholder="Justification (e to write, enter when done)", id="justification"
                )
                yield Static("", id="judgement")
        yield KeyHints()

    def on_mount(self) -> None:
        self.session.on_reloaded = self._reloaded
        self.start_saving_in_background()
        self.query_one("#search", Input).display = False
        before = self.session.effect
        self._guard(self.session.follow_result_effect)
        if self.session.effect != before:
            self.notify(
                f"This draft was made for the effect of {before}; it now follows the result "
                f"(effect of {self.session.effect}). Answers to both variants are kept."
            )
        start = self.session.assessment.last_question
        if start:
            try:
                self.domain_id = self.session.domain_of(start)
            except (KeyError, RobtuiError):
                start = None
        self.refresh_form(keep=start)
        self.query_one("#questions", QuestionList).focus()
        self.load_reports()  # then compare_with_plan, once the report is in the caches

    def compare_with_plan(self) -> None:
        """Start comparing the result with what was planned (once), ahead of the panel (w)."""
        if not self._plan_started:
            self._plan_started = True
            self.run_worker(self._compare_with_plan, thread=True, group="planned",
                            exit_on_error=False)

    def _compare_with_plan(self) -> None:
        """Compare the result with what was planned ahead of the panel (w), so it opens at once."""
        from robtui.workspace.prespecifying import prespecification

        a = self.session.assessment
        try:
            self.planned = prespecification(self.session.folder, a.study_id, a.result_id)
        except RobtuiError:
            self.planned = None  # the panel says why when it is opened

    def _reloaded(self, message: str) -> None:
        """The file changed on disk and was read again: show what it holds now."""
        self.notify(message, severity="warning", markup=False)
        self.call_after_refresh(self.refresh_form, self.question_id)

    # -- the current state -------------------------------------------------------------
    @property
    def question_id(self) -> str | None:
        return self.query_one("#questions", QuestionList).focused_question

    def refresh_form(self, keep: str | None = None) -> None:
        """Redraw the domain's questions, the focused answer and the judgements."""
        s = self.session
        questions = self.query_one("#questions", QuestionList)
        questions.show(self._question_lines(s.asked(self.domain_id)), keep=keep)
        self._refresh_judgements()
        self._refresh_justification()
        self._refresh_rules()
        self._mark_report()

    def _refresh_judgements(self) -> None:
        s = self.session
        shown = {d: s.shown_judgement(d) for d in s.domain_ids()}
        shown[OVERALL] = s.final(OVERALL)
        if shown[OVERALL] == "incomplete":
            shown[OVERALL] = determined_overall(list(shown.values())[:-1]) or "incomplete"
        overridden = set(s.assessment.overrides)
        self.query_one("#strip", JudgementStrip).show(shown, self.domain_id, overridden)
        self.query_one("#domain-heading", Static).update(heading_text(s, self.domain_id))
        self._refresh_report_question()
        self.query_one("#judgement", Static).update(reasons_text(s, self.domain_id, shown))

    def _refresh_rules(self) -> None:
        """The review's answering rules for the focused question, or why they are unavailable."""
        panel = self.query_one("#rules", Static)
        text = rules_text(self.session, self.question_id)
        panel.update(text)
        panel.display = bool(text.plain)

    def _refresh_report_question(self) -> None:
        """On a narrow terminal the report fills the screen: the focused question above it."""
        line = self.query_one("#report-question", Static)
        line.update(report_question_text(self.session, self.question_id))

    # -- events ------------------------------------------------------------------------
    @on(QuestionList.OptionHighlighted, "#questions")
    def _question_moved(self) -> None:
        self._flush_justification()
        if self.show_guidance:
            self._refresh_question_lines()
        self._refresh_justification()
        self._refresh_rules()
        self._refresh_report_question()
        self._mark_report()
        qid = self.question_id
        if qid:
            try:
                self.session.remember_position(qid)
            except RobtuiError as error:
                self.notify(str(error), severity="error")

    @on(DomainTab.Chosen)
    def _tab_clicked(self, event: DomainTab.Chosen) -> None:
        if event.key == OVERALL:
            self.action_override("overall")
        else:
            self.action_domain(event.key)

    @on(ResponseBar.Picked)
    def _response_clicked(self, event: ResponseBar.Picked) -> None:
        self.action_answer(event.response)

    def _refresh_question_lines(self) -> None:
        questions = self.query_one("#questions", QuestionList)
        keep = questions.focused_question
        lines = self._question_lines(self.session.asked(self.domain_id))
        with questions.prevent(QuestionList.OptionHighlighted):
            questions.show(lines, keep=keep)

    def _question_lines(self, asked) -> list:
        answers = self.session.assessment.answers
        current = self.current
        focused = self.question_id if self.show_guidance else None
        return [
            line_for(
                q, answers, self.suggestions_for(q.id),
                current.threshold_of(q.id) if current else None, show_guidance=q.id == focused
            )
            for q in asked
        ]

    @on(Input.Submitted, "#search")
    def _search_next(self, event: Input.Submitted) -> None:
        """Enter: the next match, with the reviewer's cursor on it in the report (so q quotes
        it at once); the field stays open with the words (/ then enter: the match after).
        No match: the field keeps the cursor, to change the words."""
        view = self.query_one("#report", ReportView)
        found = view.find(event.value)
        if found is None:
            self.notify(f"no sentence contains {event.value!r}", severity="warning", markup=False)
            return
        view.focus()
        self.notify(
            f"match {found[0]} of {found[1]} for {event.value!r} · / enter: next match · "
            "esc: close the search", timeout=4, markup=False)

    # -- actions -----------------------------------------------------------------------
    def _guard(self, action) -> bool:
        """Run a change; a RobtuiError becomes a warning on screen (False)."""
        try:
            action()
        except RobtuiError as error:
            self.notify(str(error), severity="warning")
            return False
        return True

    def _editable(self) -> bool:
        """False (and says why) when the assessment is marked complete."""
        if self.session.is_complete:
            self.notify("this assessment is marked complete: c reopens it", severity="warning")
            return False
        return True

    def action_answer(self, response: str | None) -> None:
        qid = self.question_id
        if qid is None:
            return
        started = time.perf_counter()
        self._flush_justification()
        if self._guard(lambda: self.session.set_response(qid, response)):
            self._refresh_question_lines()
            self._refresh_judgements()
            self.last_update_at = time.perf_counter()
            self.last_update_seconds = self.last_update_at - started

    def action_next_question(self) -> None:
        self.query_one("#questions", QuestionList).action_cursor_down()

    def action_previous_question(self) -> None:
        self.query_one("#questions", QuestionList).action_cursor_up()

    def action_domain(self, domain_id: str) -> None:
        if domain_id not in self.session.domain_ids():
            return
        self._flush_justification()
        self.domain_id = domain_id
        self.refresh_form()
        first = self.question_id
        if first:
            self._guard(lambda: self.session.remember_position(first))

    def on_descendant_focus(self, event) -> None:
        """On a narrow terminal the focused pane fills the screen; a text field shows its
        own keys in the footer."""
        widget = event.widget
        in_report = any(node.id == "report-panel" for node in widget.ancestors_with_self)
        if widget.id != "search":
            self.set_class(in_report, "-reading")
        hints = self.query_one(KeyHints)
        if isinstance(widget, TextArea):
            hints.show_field(FIELD_KEYS)
        elif isinstance(widget, Input):
            hints.show_field(INPUT_KEYS)
        else:
            hints.show_field(None)

    def action_switch_pane(self) -> None:
        """Tab: between the report and the questions (leaving a text field first)."""
        report = self.query_one("#report", ReportView)
        if self.focused is report:
            self.query_one("#questions", QuestionList).focus()
        else:
            self._flush_justification()
            report.focus()

    def action_search(self) -> None:
        """/: the search field under the report (shown first on a narrow terminal, where
        the report may be hidden behind the questions), its last words selected."""
        self.add_class("-reading")
        field = self.query_one("#search", Input)
        field.display = True
        field.focus()

    def _close_search(self) -> bool:
        """Esc closes an open search first (the cursor stays in the report); True if it did."""
        field = self.query_one("#search", Input)
        if not field.display:
            return False
        field.display = False
        self.query_one("#report", ReportView).focus()
        return True

    def action_back(self) -> None:
        focused = self.focused
        if isinstance(focused, (Input, TextArea)) and focused.id != "search":
            self._flush_justification()
            self.query_one("#questions", QuestionList).focus()
            return
        if self._close_search():
            return
        self._flush_justification()
        self.leave_when_saved()

    def action_guidance(self) -> None:
        """Show or hide the focused question's guidance (under the question)."""
        self.show_guidance = not self.show_guidance
        self._refresh_question_lines()

    def palette_commands(self) -> list[tuple[str, str, str]]:
        return [
            (
                "Mark complete / reopen",
                "Check what is missing, then mark this assessment complete",
                "complete",
            ),
            (
                "Override domain judgement",
                "Replace the proposed judgement of this domain (reason required)",
                "override('domain')",
            ),
            (
                "Override overall judgement",
                "Replace the proposed overall judgement (reason required)",
                "override('overall')",
            ),
            ("Domain summary", "Answers, quotes and judgement of this domain", "summary"),
            ("Search the report", "Find text in the report", "search"),
            (
                "Effect of interest",
                "Assignment or adhering: switches domain 2's questions",
                "effect",
            ),
            ("Attach quote", "Attach the highlighted sentence to the focused question", "quote"),
            (
                "What was planned",
                "The outcome beside the registry record's and protocol's (pre-specification)",
                "planned",
            ),
            ("Back to the overview", "All work is saved", "back"),
        ]
