"""Reading a study's report and ranking its sentences, for the workbench's worker thread.

Nothing here touches the screen: ``load_report`` reports its stage through a callback and
returns what the assessment screen shows. Problems (a missing or changed file, an unreadable
PDF, missing ranker weights) come back as text, so the rest of the assessment stays usable.
"""

from __future__ import annotations

import threading
import time
from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from robtui.core.model import ReportFile
from robtui.errors import RobtuiError
from robtui.evidence.prepared import suggestions_of
from robtui.reading.document import Document
from robtui.store.review_folder import ReviewFolder

SUGGESTIONS_PER_QUESTION = 5

_ranker_lock = threading.Lock()
_ranker: Any = None


def shared_ranker():
    """The shipped evidence ranker, loaded once per process (raises ModelFileError)."""
    global _ranker
    with _ranker_lock:
        if _ranker is None:
            from robtui.evidence.ranker import load_ranker

            _ranker = load_ranker()
        return _ranker


@dataclass
class LoadedReport:
    report: ReportFile
    document: Document | None = None
    suggestions: dict[str, list[Any]] = field(default_factory=dict)
    problem: str | None = None  # the report cannot be shown (missing, changed, unreadable)
    notes: list[str] = field(default_factory=list)  # shown, but the report is usable
    # scores below this read as "no sentence found for this question" (the ranker's own) ...
    no_evidence_threshold: float | None = None
    # ... unless the question has its own (the cut of the report's kind: text or PDF)
    thresholds: dict[str, float] = field(default_factory=dict)
    seconds: dict[str, float] = field(default_factory=dict)  # "read", "rank" (for the bench)

    def threshold_of(self, question_id: str) -> float | None:
        return self.thresholds.get(question_id, self.no_evidence_threshold)


def load_report(
    folder: ReviewFolder,
    report: ReportFile,
    effect: str,
    *,
    stage: Callable[[str], None] = lambda _text: None,
    ranker_factory: Callable[[], Any] = shared_ranker,
    learned_dir: Path | None = None,
    question_set=None,
    cancel: threading.Event | None = None,
    warn: Callable[[str], None] = lambda _text: None,
) -> LoadedReport:
    """Read ``report`` from the review folder and rank its sentences for every question.

    ``learned_dir`` is the reviewer's own learned model (None: the shipped model only);
    ``question_set`` the study's set, whose questions are ranked (None: the ranker's default);
    ``cancel`` set (the app is ending) stops a report being read in another process;
    ``warn`` is told, as it happens, when that process fails and the report is read here.
    """
    loaded = LoadedReport(report)
    problem = folder.check_report(report)
    if problem:
        loaded.problem = (
            f"{problem}. The answers can still be given; quotes need the report: put the "
            f"original file back in the review's reports/ folder and reopen this result."
        )
        return loaded
    stage(f"Reading {report.path} …")
    from robtui.reading.reader import read_document

    started = time.perf_counter()
    if ranker_factory is shared_ranker:
        failed = prepare_apart(folder.report_path(report), report, effect, question_set, cancel)
        if cancel is not None and cancel.is_set():
            loaded.problem = "the workbench closed before the report was read"
            return loaded
        if failed:
            note = read_here_note(report.path, failed)
            loaded.notes.append(note)
            warn(note)
            stage(f"Reading {report.path} in the workbench itself …")
    try:
        loaded.document = read_document(folder.report_path(report))
    except RobtuiError as error:
        loaded.problem = str(error)
        return loaded
    loaded.seconds["read"] = time.perf_counter() - started
    loaded.notes.extend(loaded.document.warnings)
    started = time.perf_counter()
    prepared = _prepared_suggestions(
        loaded.document, effect, ranker_factory, learned_dir, question_set
    )
    if prepared is not None:  # `robtui prepare` (or the workbench in the background) ranked it
        loaded.suggestions = suggestions_of(prepared)
        loaded.no_evidence_threshold = prepared.no_evidence_threshold
        loaded.thresholds = {qid: q.threshold for qid, q in prepared.questions.items()}
        loaded.seconds["rank"] = time.perf_counter() - started
        return loaded
    loaded.suggestions = rank_document(
        folder, loaded.document, effect, stage, ranker_factory, loaded.notes,
        learned_dir=learned_dir, question_set=question_set,
    )
    loaded.seconds["rank"] = time.perf_counter() - started
    try:
        ranker = ranker_factory()
        loaded.no_evidence_threshold = float(ranker.no_evidence_threshold)
    except (RobtuiError, AttributeError, TypeError, ValueError):
        loaded.no_evidence_threshold = None
        return loaded
    try:
        loaded.thresholds = {
            qid: float(ranker.threshold_for(qid, effect, origin=loaded.document.kind))
            for qid in loaded.suggestions}
    except (RobtuiError, AttributeError, TypeError, ValueError):
        pass  # a ranker without per-question cuts: its one threshold serves every question
    return loaded


# A PDF of this many pages or more that is not prepared yet is read and ranked in a process of
# its own: parsing a page is Python work that, in the worker thread, takes turns with the
# interface for the interpreter, so keys wait; starting a process costs about half a second,
# more than reading a short report takes (the demo's reports have three pages).
APART_MIN_PAGES = 8


def prepare_apart(path: Path, report: ReportFile, effect: str, question_set=None,
                  cancel: threading.Event | None = None) -> str | None:
    """Read and rank a long PDF in another process, as `robtui prepare` does, into the caches
    this process then reads from. Returns None when that went well or was not needed (a short
    file, already prepared, ``cancel`` set: it ends that process at once), else what went
    wrong; the caller then reads the file here (where a damaged file's problem is reported)."""
    from robtui.reading.reader import one_reading_of
    from robtui.workspace.preparing import PrepareJob, is_prepared, prepare

    if path.suffix.lower() != ".pdf" or pdf_pages(path) < APART_MIN_PAGES:
        return None
    job = PrepareJob(str(path), report.sha256, report.path, (effect,), question_set)
    with one_reading_of(report.sha256, "pdf"):  # other threads wait for it, then read the cache
        if is_prepared(job):
            return None
        try:
            summary = prepare([job], workers=1, cancel=cancel)
        except Exception as error:  # noqa: BLE001 - no process could be started: read here
            return f"it could not be started ({type(error).__name__}: {error})"
    if summary.interrupted:
        return None
    if summary.failures:
        return summary.failures[0].error or "it stopped without saying why"
    return None if summary.prepared else "it gave nothing back"


def read_here_note(name: str, failed: str) -> str:
    """What the reviewer is told when the separate reading process failed."""
    return (f"{name} is read in the workbench itself: the separate reading process failed "
            f"({failed}). Nothing is lost; keys may answer more slowly until it is read.")


def pdf_pages(path: Path) -> int:
    """The number of pages of a PDF (0 when PDFium cannot open it)."""
    import pypdfium2

    from robtui.reading.reader import PDFIUM_LOCK

    with PDFIUM_LOCK:
        try:
            document = pypdfium2.PdfDocument(str(path))
        except Exception:  # noqa: BLE001 - a damaged file: the reader says what is wrong
            return 0
        try:
            return len(document)
        finally:
            document.close()


def _prepared_suggestions(
    document: Document, effect: str, ranker_factory, learned_dir, question_set=None
):
    """The prepared entry for this document when it is what ranking would give: the shipped
    model's suggestions, and the reviewer has no learned model yet; else None."""
    from robtui.evidence.prepared import load_prepared

    if ranker_factory is not shared_ranker:
        return None
    if learned_dir is not None:
        from robtui.evidence.review_model import load_review_model

        try:
            if load_review_model(learned_dir).weights:
                return None
        except RobtuiError:
            return None  # ranking says why the learned model was not used
    if question_set is None:
        return load_prepared(document.sha256, effect)
    return load_prepared(document.sha256, effect, question_set.id)


def rank_document(
    folder: ReviewFolder,
    document: Document,
    effect: str,
    stage: Callable[[str], None] = lambda _text: None,
    ranker_factory: Callable[[], Any] = shared_ranker,
    notes: list[str] | None = None,
    *,
    learned_dir: Path | None = None,
    question_set=None,
) -> dict[str, list[Any]]:
    """Suggestions per question id for ``document`` (empty, with a note, if ranking fails);
    the questions are ``question_set``'s (the study's; None: the ranker's default set)."""
    notes = notes if notes is not None else []
    stage("Ranking sentences for each signalling question …")
    try:
        ranker = ranker_factory()
    except RobtuiError as error:
        notes.append(f"no suggestions: {error}")
        return {}
    review_model = None
    try:
        if learned_dir is not None:
            from robtui.evidence.review_model import load_review_model

            review_model = load_review_model(learned_dir)
    except ImportError:
        review_model = None
    except RobtuiError as error:
        notes.append(f"your learned model was not used: {error}")
    try:
        return ranker.rank(
            document, effect=effect, top=SUGGESTIONS_PER_QUESTION, review_model=review_model,
            spread=True, question_set=question_set,
        )
    except RobtuiError as error:
        notes.append(f"no suggestions: {error}")
        return {}
