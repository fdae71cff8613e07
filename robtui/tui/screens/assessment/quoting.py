"""Evidence for the focused question on the assessment screen: stepping through its suggested
sentences (] / [), quoting a sentence (q), a passage across sentences (v) or part of one (Q),
dismissing a suggestion (x), and passages from the pre-specification panel (w).

A mixin of AssessmentScreen (it uses the screen's session, widgets and ``question_id``).
"""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static

from robtui.core.model import Quote
from robtui.tui.screens.dialogs import QuotePartDialog
from robtui.tui.widgets.report_view import ReportView

CANDIDATE_NOTE = "Suggestions are candidates ranked by a classifier; you decide."


class Quoting:
    """Suggestions and quotes for the focused question."""

    _stepped_for: str | None  # the question ] / [ last stepped through

    def _say(self, text: Text) -> None:
        """The note under the report (kept on an 80x24 terminal too: it is where the reviewer
        reads that suggestions are candidates)."""
        self.query_one("#candidate-note", Static).update(text)

    def action_suggestion(self, step: int) -> None:
        suggestions = self.suggestions_for(self.question_id)
        view = self.query_one("#report", ReportView)
        if not suggestions:
            if self.query_one("#report-progress").display:  # not read yet: none to say
                self.notify("the report is still being read: its suggestions come when it is "
                            "ready", timeout=3)
            else:
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
        self._say(
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
            self._say(
                Text("Marking a passage: move to its last sentence, then q quotes it "
                     "(Q: part of it; v: drop it).", style="bold"),
            )
        else:
            self._say(Text(CANDIDATE_NOTE, style="italic"))

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
