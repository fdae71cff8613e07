"""Locating a quoted passage in a study's report files, to store it with hash, offsets and page."""

from __future__ import annotations

from pathlib import Path

from robtui.core.model import Quote, Study
from robtui.errors import InputError
from robtui.store.review_folder import ReviewFolder

PLAIN_TEXT_SUFFIXES = (".txt", ".md")


def report_text(folder: ReviewFolder, study: Study, index: int) -> tuple[str, object | None]:
    """The text of a study's report (offsets refer to it) and its Document when one was read.

    Plain-text reports are their own text; other kinds go through the reader.
    """
    report = study.reports[index]
    path = folder.report_path(report)
    problem = folder.check_report(report)
    if problem:
        raise InputError(problem)
    if path.suffix.lower() in PLAIN_TEXT_SUFFIXES:
        return _plain_text(path), None
    from robtui.reading.reader import read_document

    document = read_document(path)
    return document.text, document


def _plain_text(path: Path) -> str:
    # Same reading as the text reader: UTF-8, newlines as in the file.
    with open(path, encoding="utf-8", newline="") as handle:
        return handle.read()


def find_quote(folder: ReviewFolder, study_id: str, text: str, *, occurrence: int = 1) -> Quote:
    """The quote of ``text`` in the study's reports (plain text first), located by search."""
    study = folder.study_or_error(study_id)
    wanted = text.strip()
    if not wanted:
        raise InputError("an empty quote was given: quote a passage of the report")
    order = sorted(
        range(len(study.reports)),
        key=lambda i: Path(study.reports[i].path).suffix.lower() not in PLAIN_TEXT_SUFFIXES,
    )
    for index in order:
        body, document = report_text(folder, study, index)
        start = _nth(body, wanted, occurrence)
        if start is None:
            continue
        end = start + len(wanted)
        page = None
        if document is not None:
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
