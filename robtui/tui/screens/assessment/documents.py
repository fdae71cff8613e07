"""The study's documents on the assessment screen: read and ranked in a worker, shown one at a
time (d: next), the focused question's suggestions and quotes marked in the report.

A mixin of AssessmentScreen (it uses the screen's session, widgets and ``question_id``).
"""

from __future__ import annotations

import time
from pathlib import PurePosixPath

from rich.text import Text
from textual import work
from textual.timer import Timer
from textual.widgets import Label, Static
from textual.worker import get_current_worker

from robtui.core.model import REPORT_KINDS
from robtui.tui.report_loading import LoadedReport, load_report, rank_document
from robtui.tui.widgets.key_hints import KeyHints
from robtui.tui.widgets.report_view import ReportView


class ReportDocuments:
    """Reading, ranking and showing the study's documents."""

    loaded: list[LoadedReport]
    document_index: int

    @property
    def current(self) -> LoadedReport | None:
        return self.loaded[self.document_index] if self.loaded else None

    def suggestions_for(self, question_id: str | None) -> list:
        """The current document's suggestions for a question, less those dismissed."""
        loaded = self.current
        if loaded is None or loaded.document is None or question_id is None:
            return []
        sha = loaded.document.sha256
        return [
            s
            for s in loaded.suggestions.get(question_id, [])
            if not self.session.is_dismissed(question_id, sha, s.start, s.end)
        ]

    # -- reading (worker) --------------------------------------------------------------
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
                        cancel=getattr(self.app, "closing", None),
                        warn=lambda text: self.app.call_from_thread(
                            self.notify, text, severity="warning", timeout=12),
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

    # What the report pane says while the worker reads: the stage and the seconds it has
    # taken, counted once a second. A line of text, not an animated bar: a bar redrawn many
    # times a second takes the interface's time (and the reader's) for the whole reading.
    _stage_text = "Opening the report …"
    _stage_since = 0.0
    _stage_clock: Timer | None = None

    def _stage(self, text: str) -> None:
        if not self.is_mounted:
            return
        self._stage_text, self._stage_since = text, time.monotonic()
        self._stop_stage_clock()  # whole seconds from this stage's start
        self._stage_clock = self.set_interval(1.0, self._show_stage)
        self._show_stage()

    def _stop_stage_clock(self) -> None:
        if self._stage_clock is not None:
            self._stage_clock.stop()
            self._stage_clock = None

    def _show_stage(self) -> None:
        seconds = round(time.monotonic() - self._stage_since)
        label = self.query_one("#report-progress", Label)
        label.display = True
        label.update(self._stage_text + (f" {seconds} s" if seconds else ""))

    def _reports_loaded(self, loaded: list[LoadedReport]) -> None:
        if not self.is_mounted:  # the reviewer left before the report was ready
            return
        self.loaded = loaded
        self._stop_stage_clock()
        self.query_one("#report-progress").display = False
        self.document_index = min(self.document_index, max(len(loaded) - 1, 0))
        self._show_current_document()
        self.query_one(KeyHints).show_field(None)  # "d next document" when there are several
        self.compare_with_plan()  # reads the report again: from the cache now

    # -- showing -----------------------------------------------------------------------
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
            kinds = [item.report.kind for item in self.loaded]
            others = ", ".join(  # a file's name only where its kind is not enough
                REPORT_KINDS.get(item.report.kind, item.report.kind)
                + (f" {PurePosixPath(item.report.path).name}"
                   if kinds.count(item.report.kind) > 1 else "")
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

    def action_next_document(self) -> None:
        if len(self.loaded) > 1:
            self.document_index = (self.document_index + 1) % len(self.loaded)
            self._show_current_document()

    def _mark_report(self) -> None:
        """The focused question's suggestions and quoted sentences, marked in the report."""
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

    # -- learning ----------------------------------------------------------------------
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
