"""The assessment screen: the report beside the signalling questions of one domain.

Left: the report by section with page numbers; the focused question's suggested sentences
carry rank and score. Right: the domain's asked questions, the answer keys, the
justification of the focused answer, and the proposed and final judgements, which update as
answers change. Every change is saved at once through the AssessmentSession.
"""

from __future__ import annotations

import time
from typing import ClassVar

from rich.text import Text
from textual import on, work
from textual.app import ComposeResult
from textual.binding import Binding, BindingType
from textual.containers import Horizontal, Vertical
from textual.screen import Screen
from textual.widgets import Input, Label, ProgressBar, Static, TextArea
from textual.worker import get_current_worker

from robtui.core.explaining import determined_overall, explain_overall
from robtui.core.model import DIRECTION_LABELS, OVERALL, REPORT_KINDS, Quote
from robtui.errors import RobtuiError
from robtui.tui.keys import RESPONSE_KEYS
from robtui.tui.palette import badge
from robtui.tui.report_loading import LoadedReport, load_report, rank_document
from robtui.tui.screens.dialogs import (
    ListDialog,
    OverrideChoice,
    OverrideDialog,
    QuotePartDialog,
    SupportChoice,
    SupportDialog,
    TextDialog,
)
from robtui.tui.session import AssessmentSession
from robtui.tui.widgets.judgement_strip import DomainTab, JudgementStrip
from robtui.tui.widgets.justification import JustificationArea
from robtui.tui.widgets.key_hints import FIELD_KEYS, INPUT_KEYS, KeyHints
from robtui.tui.widgets.question_list import QuestionList, line_for
from robtui.tui.widgets.report_view import ReportView
from robtui.tui.widgets.response_bar import ResponseBar

CANDIDATE_NOTE = "Suggestions are candidates ranked by a classifier; you decide."
OVERRIDE_MARK = "*"  # beside a judgement the reviewer overrode (explained where it shows)
JUSTIFICATION_SAVE_DELAY = 0.4  # seconds of quiet typing before the justification is saved


def _answer_bindings() -> list[Binding]:
    return [
        Binding(key, f"answer('{code}')", code, show=False) for key, code in RESPONSE_KEYS.items()
    ]


def domain_bindings(qset, taken: set[str]) -> dict[str, str]:
    """Key -> domain id from the question set (QuestionSet.domain_keys), leaving out keys the
    screen already uses for something else."""
    return {k: d for k, d in qset.domain_keys().items() if k not in taken}


def keys_label(keys: list[str]) -> str:
    """Domain keys for the footer: consecutive digits as a range, others after ("1-5 b")."""
    digits = [k for k in keys if k.isdigit()]
    others = [k for k in keys if not k.isdigit()]
    run = digits and [int(k) for k in digits] == list(range(int(digits[0]), int(digits[-1]) + 1))
    head = f"{digits[0]}-{digits[-1]}" if run and len(digits) > 1 else "/".join(digits)
    return " ".join(part for part in (head, "/".join(others)) if part)


class AssessmentScreen(Screen[None]):
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
        self.domain_keys = domain_bindings(session.qset, set(self._bindings.key_to_bindings))
        for key, domain_id in self.domain_keys.items():
            self._bindings.bind(key, f"domain('{domain_id}')", f"Domain {domain_id}", show=False)
        self.loaded: list[LoadedReport] = []
        self.document_index = 0
        self._justify_timer = None
        self._justify_for: str | None = None
        self._typed: str | None = None  # justification typed, not saved yet
        self.last_update_seconds: float | None = None  # keystroke -> judgement shown (bench)
        self.show_guidance = False  # g: the focused question's guidance under it
        self._stepped_for: str | None = None  # the question ] / [ last stepped through

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
                with Horizontal(id="report-progress"):
                    yield Label("Opening the report …", id="progress-label")
                    yield ProgressBar(
                        total=None, show_eta=False, show_percentage=False, id="progress-bar"
                    )
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
        self.load_reports()
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

    # -- reading the report (worker) -------------------------------------------------
    @work(thread=True, exclusive=True, group="report")
    def load_reports(self) -> None:
        worker = get_current_worker()
        reports = self.session.reports()
        if not reports:
            self.app.call_from_thread(self._reports_loaded, [])
            return
        learned_dir = self.session.review_session.learned_dir
        loaded = []
        for report, _problem in reports:
            if worker.is_cancelled:
                return
            try:
                loaded.append(
                    load_report(
                        self.session.folder,
                        report,
                        self.session.effect,
                        stage=lambda text: self.app.call_from_thread(self._stage, text),
                        ranker_factory=self.app.ranker_factory,
                        learned_dir=learned_dir,
                        question_set=self.session.qset,
                    )
                )
            except Exception as error:  # noqa: BLE001 - a bad file must not end the session
                problem = f"{report.path} could not be read ({type(error).__name__}: {error})"
                loaded.append(LoadedReport(report, problem=problem))
        if not worker.is_cancelled:
            self.app.call_from_thread(self._reports_loaded, loaded)

    @work(thread=True, exclusive=True, group="report")
    def rerank(self) -> None:
        self.app.call_from_thread(self._stage, "Ranking sentences for the new effect …")
        for loaded in self.loaded:
            if loaded.document is not None:
                loaded.suggestions = rank_document(
                    self.session.folder,
                    loaded.document,
                    self.session.effect,
                    ranker_factory=self.app.ranker_factory,
                    notes=loaded.notes,
                    learned_dir=self.session.review_session.learned_dir,
                    question_set=self.session.qset,
                )
        self.app.call_from_thread(self._reports_loaded, self.loaded)

    def _stage(self, text: str) -> None:
        if not self.is_mounted:
            return
        self.query_one("#report-progress").display = True
        self.query_one("#progress-label", Label).update(text)

    def _reports_loaded(self, loaded: list[LoadedReport]) -> None:
        if not self.is_mounted:  # the reviewer left before the report was ready
            return
        self.loaded = loaded
        self.query_one("#report-progress").display = False
        self.document_index = min(self.document_index, max(len(loaded) - 1, 0))
        self._show_current_document()
        self.query_one(KeyHints).show_field(None)  # "d next document" when there are several

    def _show_current_document(self) -> None:
        view = self.query_one("#report", ReportView)
        heading = self.query_one("#report-heading", Static)
        if not self.loaded:
            heading.update(Text("No report", style="bold"))
            view.show_message(
                "This study has no report file in the review. Answers can still be given."
            )
            return
        loaded = self.loaded[self.document_index]
        title = Text(f"{REPORT_KINDS.get(loaded.report.kind, loaded.report.kind)}: ", style="bold")
        title.append(loaded.report.path)
        if len(self.loaded) > 1:
            others = ", ".join(
                REPORT_KINDS.get(item.report.kind, item.report.kind)
                for i, item in enumerate(self.loaded)
                if i != self.document_index
            )
            title.append(
                f"  (document {self.document_index + 1} of {len(self.loaded)}, d: next; "
                f"also {others})",
                style="dim",
            )
        for note in loaded.notes:
            title.append(f"\n⚠ {note}")
        heading.update(title)
        if loaded.document is None:
            view.show_message(f"⚠ {loaded.problem}")
        else:
            view.show_document(loaded.document)
        self._refresh_question_lines()
        self._mark_report()

    # -- the current state -------------------------------------------------------------
    @property
    def question_id(self) -> str | None:
        return self.query_one("#questions", QuestionList).focused_question

    @property
    def current(self) -> LoadedReport | None:
        return self.loaded[self.document_index] if self.loaded else None

    def suggestions_for(self, question_id: str | None) -> list:
        loaded = self.current
        if loaded is None or loaded.document is None or question_id is None:
            return []
        sha = loaded.document.sha256
        return [
            s
            for s in loaded.suggestions.get(question_id, [])
            if not self.session.is_dismissed(question_id, sha, s.start, s.end)
        ]

    def refresh_form(self, keep: str | None = None) -> None:
        """Redraw the domain's questions, the focused answer and the judgements."""
        s = self.session
        questions = self.query_one("#questions", QuestionList)
        questions.show(self._question_lines(s.asked(self.domain_id)), keep=keep)
        self._refresh_judgements()
        self._refresh_justification()
        self._refresh_rules()
        self._mark_report()

    def _refresh_heading(self) -> None:
        """The domain's name, what its path leaves out, and the assessment's state."""
        s = self.session
        domain = s.domain(self.domain_id)
        heading = Text(f"D{domain.id} {domain.name}", style="bold")
        if domain.effect:
            heading.append(f" · effect of {s.effect} (set for this result)", style="dim")
        result = s.result
        measuring = any("outcome assessor" in q.text for q in domain.questions)
        if result is not None and result.self_reported and measuring:
            heading.append(
                "\nSelf-reported outcome: the participants are the outcome assessors",
                style="bold",
            )
        words = s.explanation(self.domain_id)
        if words.not_asked:
            n = words.not_asked
            heading.append(
                f"\n{n} question{'s' if n != 1 else ''} not asked on this path", style="dim"
            )
        if s.is_complete:
            heading.append("\n✓ marked complete — c reopens it for changes", style="bold")
        if s.effect_differs:
            heading.append(
                f"\n⚠ made for the effect of {s.effect}, but the result is assessed for the "
                f"effect of {s.effect_differs}: c reopens it, and it follows the result",
                style="bold",
            )
        self.query_one("#domain-heading", Static).update(heading)

    def _refresh_rules(self) -> None:
        """The review's answering rules for the focused question, or why they are unavailable."""
        panel = self.query_one("#rules", Static)
        text = self.rules_text(self.question_id)
        panel.update(text)
        panel.display = bool(text.plain)

    def rules_text(self, question_id: str | None) -> Text:
        """Empty when the review has no answering rules at all (nothing to show)."""
        review = self.session.review_session
        if review.rules is None:
            text = Text("⚠ ", style="bold")
            text.append(review.rules_unavailable or "answering rules unavailable", style="bold")
            text.append("\n  Answer as usual; everything else works.", style="dim")
            return text
        if question_id is None or not review.rules.active():
            return Text("")
        rules = self.session.answering_rules(question_id)
        version = f"rules v{review.rules.version}"
        if not rules:
            return Text(f"Answering rules ({version}): none for {question_id}", style="dim")
        text = Text(f"Answering rules for {question_id} ({version}):", style="bold")
        for rule in rules:
            text.append(f"\n{rule.id} ", style="bold")
            if rule.answer:
                text.append(f"→ {rule.answer} ", style="bold reverse")
            text.append(rule.text)
            text.append(f"  (when {rule.condition_text()})", style="dim")
        return text

    def _refresh_judgements(self) -> None:
        s = self.session
        shown = {d: s.shown_judgement(d) for d in s.domain_ids()}
        shown[OVERALL] = s.final(OVERALL)
        if shown[OVERALL] == "incomplete":
            shown[OVERALL] = determined_overall(list(shown.values())[:-1]) or "incomplete"
        overridden = set(s.assessment.overrides)
        self.query_one("#strip", JudgementStrip).show(shown, self.domain_id, overridden)
        self._refresh_heading()
        self._refresh_report_question()
        self.query_one("#judgement", Static).update(self.reasons_text(shown))

    def reasons_text(self, shown: dict[str, str]) -> Text:
        """Why the domain and the overall stand where they do, and what is left to answer."""
        s = self.session
        words = s.explanation(self.domain_id)
        text = Text(f"D{self.domain_id}: ", style="bold")
        text.append_text(badge(shown[self.domain_id]))
        if words.early:
            text.append(" already decided by your answers", style="italic")
        elif shown[self.domain_id] == "incomplete":
            text.append(" (not judged yet)", style="dim")
        override = s.override(self.domain_id)
        if override:
            text.append(f"  your override{OVERRIDE_MARK}: ", style="bold")
            text.append_text(badge(override.judgement))
        for line in words.lines():
            text.append(f"\n  {line}")
        if override:
            text.append(f"\n  {OVERRIDE_MARK} your reason: {override.reason}", style="italic")
        text.append_text(self._form_fields(self.domain_id))
        text.append("\nOverall: ", style="bold")
        text.append_text(badge(shown[OVERALL]))
        finals = {d: shown[d] for d in s.domain_ids()}
        text.append("  " + "; ".join(explain_overall(finals)), style="dim")
        override = s.override(OVERALL)
        if override:
            text.append(f"\n  {OVERRIDE_MARK} your override: {override.reason}", style="italic")
        text.append_text(self._form_fields(OVERALL))
        if s.may_raise_overall() and not override:
            text.append(
                "\n  several domains have some concerns: you may raise the overall to High (O)",
                style="dim",
            )
        left_here = len(words.missing)
        left_all = sum(len(s.explanation(d).missing) for d in s.domain_ids())
        status = "✓ complete (c reopens)" if s.is_complete else "draft (c completes)"
        text.append(
            f"\n{left_here} to answer here · {left_all} in all · {status}", style="dim"
        )
        if s.unsaved_error:
            text.append(f"\n⚠ not saved: {s.unsaved_error}", style="bold reverse")
        else:
            text.append(" · saved", style="dim")
        return text

    def _form_fields(self, key: str) -> Text:
        """The support and predicted direction of bias given for a judgement (b / B)."""
        a = self.session.assessment
        text = Text()
        if a.support.get(key):
            text.append(f"\n  support: {a.support[key]}", style="italic")
        if a.direction.get(key):
            text.append(f"\n  direction of bias: {DIRECTION_LABELS[a.direction[key]]}")
        return text

    def _refresh_report_question(self) -> None:
        """On a narrow terminal the report fills the screen: the focused question above it."""
        line = self.query_one("#report-question", Static)
        qid = self.question_id
        if qid is None:
            line.update("")
            return
        question = self.session.question(qid)
        text = Text(f"{qid} ", style="bold")
        text.append(question.short)
        response = self.session.response(qid)
        text.append("  answer: ")
        text.append(f" {response} " if response else " ·· ", style="bold reverse")
        text.append("  y p m n i a · q quote · tab questions", style="dim")
        line.update(text)

    def _refresh_justification(self) -> None:
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

    def _mark_report(self) -> None:
        view = self.query_one("#report", ReportView)
        loaded = self.current
        if loaded is None or loaded.document is None:
            return
        qid = self.question_id
        quoted = set()
        answer = self.session.answer(qid) if qid else None
        if answer:
            sha = loaded.document.sha256
            for quote in answer.quotes:
                if quote.document_sha256 == sha:  # every sentence a passage touches
                    quoted.update(
                        s.index
                        for s in loaded.document.sentences
                        if s.start < quote.end and s.end > quote.start
                    )
        view.mark(self.suggestions_for(qid), quoted)

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

    @on(TextArea.Changed, "#justification")
    def _justification_typed(self, event: TextArea.Changed) -> None:
        self._typed = event.text_area.text
        if self._justify_timer is not None:
            self._justify_timer.stop()
        self._justify_timer = self.set_timer(JUSTIFICATION_SAVE_DELAY, self._flush_justification)

    @on(JustificationArea.Done, "#justification")
    def _justification_done(self) -> None:
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

    def _refresh_question_lines(self) -> None:
        questions = self.query_one("#questions", QuestionList)
        keep = questions.focused_question
        lines = self._question_lines(self.session.asked(self.domain_id))
        with questions.prevent(QuestionList.OptionHighlighted):
            questions.show(lines, keep=keep)

    def _question_lines(self, asked) -> list:
        answers = self.session.assessment.answers
        level = self.current.no_evidence_threshold if self.current else None
        focused = self.question_id if self.show_guidance else None
        return [
            line_for(
                q, answers, self.suggestions_for(q.id), level, show_guidance=q.id == focused
            )
            for q in asked
        ]

    @on(Input.Submitted, "#search")
    def _search_next(self, event: Input.Submitted) -> None:
        found = self.query_one("#report", ReportView).find(event.value)
        if found is None:
            self.notify(f"no sentence contains {event.value!r}", severity="warning", markup=False)
        else:
            self.notify(f"match {found[0]} of {found[1]}", timeout=2)

    # -- actions -----------------------------------------------------------------------
    def _guard(self, action) -> bool:
        try:
            action()
        except RobtuiError as error:
            self.notify(str(error), severity="warning")
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
            self.last_update_seconds = time.perf_counter() - started

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

    def action_suggestion(self, step: int) -> None:
        suggestions = self.suggestions_for(self.question_id)
        view = self.query_one("#report", ReportView)
        if not suggestions:
            self.notify("no suggested sentences for this question", timeout=2)
            return
        order = [s.sentence_index for s in suggestions]
        here = view.highlighted_sentence
        if self._stepped_for == self.question_id and here is not None and here.index in order:
            position = (order.index(here.index) + step) % len(order)
        else:  # first step for this question: its best suggestion (or, backwards, the last)
            position = 0 if step > 0 else len(order) - 1
        self._stepped_for = self.question_id
        view.go_to_sentence(order[position])
        if self.has_class("-narrow") and self.focused is not view:
            view.focus()  # one pane at a time: show the report, centred once it is laid out
            self.call_after_refresh(view.go_to_sentence, order[position])
        s = suggestions[position]
        self.query_one("#candidate-note", Static).update(
            Text(
                f"Suggestion #{position + 1} of {len(order)} for {self.question_id} "
                f"(score {s.score:.2f}): a candidate; you decide.",
                style="italic",
            )
        )

    def _span_to_quote(self):
        """The passage being marked (v), else the highlighted sentence: (first, last) or None."""
        view = self.query_one("#report", ReportView)
        if view.passage is not None:
            return view.passage
        sentence = view.highlighted_sentence
        return None if sentence is None else (sentence, sentence)

    def action_quote(self) -> None:
        """Attach the highlighted sentence, or the passage marked with v, as a quote."""
        span = self._span_to_quote()
        if span is None:
            self._no_sentence()
            return
        self._attach_quote(span[0].start, span[1].end, span[0].page)

    def action_passage(self) -> None:
        """Start marking a passage across sentences at the highlighted one (v again: drop)."""
        view = self.query_one("#report", ReportView)
        if view.highlighted_sentence is None and view.passage_start is None:
            self._no_sentence()
            return
        if view.start_passage():
            self.query_one("#candidate-note", Static).update(
                Text("Marking a passage: move to its last sentence, then q quotes it "
                     "(Q: part of it; v: drop it).", style="bold")
            )
        else:
            self.query_one("#candidate-note", Static).update(Text(CANDIDATE_NOTE, style="italic"))

    def action_quote_part(self) -> None:
        """Choose the words to quote inside the highlighted sentence or the marked passage."""
        span = self._span_to_quote()
        loaded = self.current
        if span is None or loaded is None or loaded.document is None:
            self._no_sentence()
            return
        start, end = span[0].start, span[1].end
        text = loaded.document.text[start:end]
        page = span[0].page

        def chosen(picked: tuple[int, int] | None) -> None:
            if picked is not None:
                first, last = picked
                while first < last and text[first].isspace():
                    first += 1
                while last > first and text[last - 1].isspace():
                    last -= 1
                if last > first:
                    self._attach_quote(start + first, start + last, page)

        self.app.push_screen(QuotePartDialog(f"Quote part of it for {self.question_id}", text),
                             chosen)

    def _no_sentence(self) -> None:
        self.notify(
            "highlight a sentence of the report first (tab moves to the report)",
            severity="warning",
        )

    def _attach_quote(self, start: int, end: int, page: int | None) -> None:
        """Attach document text [start, end) to the focused question (again: detach it)."""
        qid = self.question_id
        loaded = self.current
        if qid is None or loaded is None or loaded.document is None:
            self._no_sentence()
            return
        quote = Quote(
            document_sha256=loaded.document.sha256,
            start=start,
            end=end,
            page=page,
            text=loaded.document.text[start:end],
        )
        added: list[bool] = []
        if self._guard(lambda: added.append(self.session.toggle_quote(qid, quote))):
            view = self.query_one("#report", ReportView)
            if view.passage_start is not None:
                self.action_passage()  # the passage is quoted: stop marking
            self._refresh_question_lines()
            self._mark_report()
            where = f" (p.{page})" if page else ""
            self.notify(
                f"quote {'attached to' if added[0] else 'removed from'} {qid}{where}", timeout=2
            )

    def action_dismiss_suggestion(self) -> None:
        qid = self.question_id
        sentence = self.query_one("#report", ReportView).highlighted_sentence
        suggestions = self.suggestions_for(qid)
        match = next(
            (s for s in suggestions if sentence and s.sentence_index == sentence.index), None
        )
        if match is None or self.current is None or self.current.document is None:
            self.notify(
                "the highlighted sentence is not a suggestion for this question (] jumps to one)",
                severity="warning",
            )
            return
        sha = self.current.document.sha256
        if self._guard(lambda: self.session.dismiss(qid, sha, match.start, match.end)):
            self._refresh_question_lines()
            self._mark_report()
            self.notify("dismissed: recorded for the review's learned model", timeout=2)

    def action_justify(self) -> None:
        if self.session.is_complete:
            self.notify("this assessment is marked complete: c reopens it", severity="warning")
            return
        self.query_one("#justification", JustificationArea).focus()

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
        field = self.query_one("#search", Input)
        field.display = True
        field.focus()

    def action_back(self) -> None:
        focused = self.focused
        if isinstance(focused, (Input, TextArea)):
            if focused.id == "search":
                focused.display = False
                self.query_one("#report", ReportView).focus()
            else:
                self._flush_justification()
                self.query_one("#questions", QuestionList).focus()
            return
        self._flush_justification()
        self.dismiss(None)

    def action_override(self, which: str) -> None:
        key = OVERALL if which == "overall" else self.domain_id
        s = self.session
        if s.is_complete:
            self.notify("this assessment is marked complete: c reopens it", severity="warning")
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
        if s.is_complete:
            self.notify("this assessment is marked complete: c reopens it", severity="warning")
            return
        if key == OVERALL:
            title, support = "Overall: predicted direction of bias", None
        else:
            title = f"D{key} {s.domain(key).name}: support and direction of bias"
            support = s.assessment.support.get(key, "")

        def done(choice: SupportChoice | None) -> None:
            if choice is not None and self._guard(
                lambda: s.set_support_and_direction(key, choice.support, choice.direction)
            ):
                self._refresh_judgements()

        self.app.push_screen(SupportDialog(title, support, s.assessment.direction.get(key)), done)

    def action_summary(self) -> None:
        self.app.push_screen(TextDialog(f"Domain {self.domain_id} summary", self.domain_summary()))

    def domain_summary(self) -> Text:
        s = self.session
        domain = s.domain(self.domain_id)
        text = Text(f"{domain.name}\n", style="bold")
        for question in s.asked(self.domain_id):
            answer = s.answer(question.id)
            text.append(f"\n{question.id} ", style="bold")
            text.append(
                f"{answer.response if answer and answer.response else 'not answered'}", style="bold"
            )
            text.append(f"  {question.text}\n")
            if answer and answer.justification:
                text.append(f"   ✎ {answer.justification}\n")
            for quote in answer.quotes if answer else []:
                page = f"p.{quote.page}" if quote.page else "no page"
                text.append(f"   ❝ {quote.text}", style="italic")
                text.append(f" ({page})\n", style="dim")
        text.append("\nProposed: ")
        text.append_text(badge(s.proposed(self.domain_id)))
        override = s.override(self.domain_id)
        if override:
            text.append("   your judgement: ")
            text.append_text(badge(override.judgement))
            text.append(f"\nReason: {override.reason}")
        text.append_text(self._form_fields(self.domain_id))
        return text

    def action_effect(self) -> None:
        """The effect of interest belongs to the result: say so, and where it is set."""
        s = self.session
        label = s.result.outcome if s.result else s.assessment.result_id
        self.app.push_screen(
            ListDialog(
                "Effect of interest",
                [
                    f"{label}: the effect of {s.effect} ({s.qset.effect_label(s.effect)}).",
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

    def action_guidance(self) -> None:
        """Show or hide the focused question's guidance (under the question)."""
        self.show_guidance = not self.show_guidance
        self._refresh_question_lines()

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

    @work(thread=True, exclusive=True, group="learn")
    def learn_from_completed(self) -> None:
        """Teach this reviewer's own ranker from the finished assessment: quotes are
        positives, dismissed suggestions negatives (never another reviewer's)."""
        documents = {
            item.document.sha256: item.document for item in self.loaded if item.document is not None
        }
        if not documents:
            return
        try:
            from robtui.evidence.review_model import learn_from_assessment

            learn_from_assessment(
                self.session.review_session.learned_dir,
                self.session.assessment,
                documents,
                self.app.ranker_factory(),
            )
        except Exception as error:  # noqa: BLE001 - learning must never cost the reviewer work
            self.app.call_from_thread(
                self.notify, f"your learned model was not updated: {error}", severity="warning"
            )

    def action_next_document(self) -> None:
        if len(self.loaded) > 1:
            self.document_index = (self.document_index + 1) % len(self.loaded)
            self._show_current_document()

    def action_planned(self) -> None:
        """The pre-specification panel of this study and result."""
        from robtui.tui.screens.prespecification import PrespecificationScreen

        a = self.session.assessment
        self.app.push_screen(PrespecificationScreen(
            self.session.folder, a.study_id, a.result_id, self.question_id, self._attach_passage,
            compared=getattr(self, "planned", None)))

    def _attach_passage(self, passage) -> str:
        """Attach (or, when attached already, detach) a panel passage to the focused question."""
        qid = self.question_id
        if qid is None:
            return "focus a question first (j / k), then open the panel again"
        quote = Quote(document_sha256=passage.document_sha256, start=passage.start,
                      end=passage.end, page=passage.page, text=passage.text)
        added: list[bool] = []
        if not self._guard(lambda: added.append(self.session.toggle_quote(qid, quote))):
            return f"not attached to {qid}"
        self._refresh_question_lines()
        return f"quote {'attached to' if added[0] else 'removed from'} {qid} ({passage.source})"

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
