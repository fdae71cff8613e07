"""Locating a quoted passage in a study's report files, to store it with hash, offsets and page."""

from __future__ import annotations

from pathlib import Path

from robtui.core.model import Quote, Study
from robtui.errors import InputError
from robtui.reading.document import Document
from robtui.store.review_folder import ReviewFolder

# Plain text first: its offsets are the file's own characters.
DEFAULT_ORDER = (".txt", ".md", ".html", ".htm", ".pdf")


def report_document(folder: ReviewFolder, study: Study, index: int) -> Document:
    """The Document of a study's report as the reader gives it (quote offsets refer to it)."""
    from robtui.reading.reader import read_document

    report = study.reports[index]
    problem = folder.check_report(report)
    if problem:
        raise InputError(problem)
    return read_document(folder.report_path(report))


def find_quote(
    folder: ReviewFolder,
    study_id: str,
    text: str,
    *,
    occurrence: int = 1,
    prefer: tuple[str, ...] = DEFAULT_ORDER,
) -> Quote:
    """The quote of ``text`` in the study's reports, located by search (``prefer``: suffixes
    tried first, in order)."""
    study = folder.study_or_error(study_id)
    wanted = text.strip()
    if not wanted:
        raise InputError("an empty quote was given: quote a passage of the report")

    def rank(i: int) -> int:
        suffix = Path(study.reports[i].path).suffix.lower()
        return prefer.index(suffix) if suffix in prefer else len(prefer)

    for index in sorted(range(len(study.reports)), key=rank):
        document = report_document(folder, study, index)
        body = document.text
        start = _nth(body, wanted, occurrence)
        if start is None:
            continue
        end = start + len(wanted)
        sentence = document.sentence_at(start)
        page = sentence.page if sentence is not None else None
        return Quote(
            document_sha256=study.reports[index].sha256,
            start=start,
            end=end,
            page=page,
            text=body[start:end],
        )
    names = ", ".join(r.path for r in study.reports) or "no reports"
    raise InputError(
        f"quote not found in the reports of {study_id} ({names}): {wanted[:60]!r}: "
        "copy the passage exactly as the report has it"
    )


def _nth(body: str, wanted: str, occurrence: int) -> int | None:
    position = -1
    for _ in range(max(occurrence, 1)):
        position = body.find(wanted, position + 1)
        if position < 0:
            return None
    return position
