"""Locating a quoted passage in a study's report files, to store it with hash, offsets and page.

A quote pasted from a PDF viewer rarely matches the report byte for byte: case, curly quotes,
dashes, doubled spaces, line breaks and words hyphenated across lines differ. The passage is
looked for in folded text first (those differences ignored, offsets mapped back to the
report's own characters), then fuzzily with rapidfuzz's best partial alignment; below
``FUZZY_ACCEPT`` the closest passage is named in the error so the reviewer can correct the copy.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

from robtui.core.model import Quote, Study
from robtui.errors import InputError
from robtui.reading.document import Document
from robtui.store.review_folder import ReviewFolder

# Plain text first: its offsets are the file's own characters.
DEFAULT_ORDER = (".txt", ".md", ".html", ".htm", ".pdf")
# Lowest rapidfuzz partial-alignment score (0-100, on folded text) taken as the same passage:
# our own setting, no source; a copy with a few characters wrong scores above 95, a different
# sentence on the same topic below 80 in the sample reports.
FUZZY_ACCEPT = 90.0
_FOLD = str.maketrans({"‘": "'", "’": "'", "“": '"', "”": '"', "–": "-", "—": "-",
                       "\u00ad": None, "\u00a0": " "})
_HYPHEN_BREAK = re.compile(r"(\w)-\s*\n\s*(\w)")


class QuoteNotFound(InputError):
    """The passage is not in the study's reports; the message names the closest one."""


@dataclass(frozen=True)
class PassageMatch:
    start: int  # offsets in the searched text
    end: int
    score: float  # 100 for a match of the folded text, else rapidfuzz's alignment score

    @property
    def exact(self) -> bool:
        return self.score >= 100.0


def fold(text: str) -> tuple[str, list[int]]:
    """Text with case, quote marks, dashes, soft hyphens, line-break hyphens and runs of white
    space folded, and for each folded character the offset of its source character."""
    out: list[str] = []
    where: list[int] = []
    joined = {m.start() + 1 for m in _HYPHEN_BREAK.finditer(text)}  # hyphens to drop
    skip_space = False
    i = 0
    while i < len(text):
        ch = text[i]
        if i in joined:  # "ran-\n domised" -> "randomised"
            i += 1
            while i < len(text) and text[i].isspace():
                i += 1
            continue
        mapped = ch.translate(_FOLD)
        if not mapped:
            i += 1
            continue
        if mapped.isspace():
            if not skip_space and out:
                out.append(" ")
                where.append(i)
            skip_space = True
        else:
            for c in mapped.casefold():
                out.append(c)
                where.append(i)
            skip_space = False
        i += 1
    return "".join(out).rstrip(), where


def locate_passage(body: str, wanted: str, occurrence: int = 1) -> PassageMatch | None:
    """Where ``wanted`` stands in ``body``: exactly, then in folded text, then fuzzily (the
    best alignment, whatever its score; None only for an empty passage)."""
    wanted = wanted.strip()
    if not wanted:
        return None
    start = _nth(body, wanted, occurrence)
    if start is not None:
        return PassageMatch(start, start + len(wanted), 100.0)
    folded_body, where = fold(body)
    folded_wanted = fold(wanted)[0]
    if not folded_body or not folded_wanted:
        return None
    start = _nth(folded_body, folded_wanted, occurrence)
    if start is not None:
        end = start + len(folded_wanted) - 1
        return PassageMatch(where[start], where[end] + 1, 100.0)
    from rapidfuzz import fuzz

    found = fuzz.partial_ratio_alignment(folded_wanted, folded_body)
    first, last = _word_edges(folded_body, found.dest_start, found.dest_end)
    return PassageMatch(where[first], where[last - 1] + 1, round(found.score, 1))


def _word_edges(text: str, start: int, end: int) -> tuple[int, int]:
    """Widen [start, end) to whole words."""
    while start > 0 and text[start - 1].isalnum():
        start -= 1
    while end < len(text) and text[end].isalnum():
        end += 1
    return start, max(end, start + 1)


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
    """The quote of ``text`` in the study's reports (see ``locate_quote``)."""
    return locate_quote(folder, study_id, text, occurrence=occurrence, prefer=prefer)[0]


def locate_quote(
    folder: ReviewFolder,
    study_id: str,
    text: str,
    *,
    occurrence: int = 1,
    prefer: tuple[str, ...] = DEFAULT_ORDER,
) -> tuple[Quote, float, str]:
    """The quote of ``text`` in the study's reports, its match score (100: the same text once
    case, quote marks, dashes and spacing are folded) and the report's path. ``prefer``:
    suffixes tried first, in order. QuoteNotFound names the closest passage."""
    study = folder.study_or_error(study_id)
    wanted = text.strip()
    if not wanted:
        raise InputError("an empty quote was given: quote a passage of the report")

    def rank(i: int) -> int:
        suffix = Path(study.reports[i].path).suffix.lower()
        return prefer.index(suffix) if suffix in prefer else len(prefer)

    best: tuple[PassageMatch, int, Document] | None = None
    for index in sorted(range(len(study.reports)), key=rank):
        document = report_document(folder, study, index)
        match = locate_passage(document.text, wanted, occurrence)
        if match is None:
            continue
        if match.exact:
            return _quote(study, index, document, match), match.score, study.reports[index].path
        if best is None or match.score > best[0].score:
            best = (match, index, document)
    if best is not None and best[0].score >= FUZZY_ACCEPT:
        match, index, document = best
        return _quote(study, index, document, match), match.score, study.reports[index].path
    names = ", ".join(r.path for r in study.reports) or "no reports"
    closest = ""
    if best is not None:
        match, index, document = best
        text = " ".join(document.text[match.start : match.end].split())
        closest = (
            f"; the closest passage ({study.reports[index].path}, similarity "
            f"{match.score:.0f} of 100) reads {text[:160]!r}"
        )
    raise QuoteNotFound(
        f"quote not found in the reports of {study_id} ({names}): {wanted[:60]!r}{closest}: "
        "copy the passage again from the report"
    )


def _quote(study: Study, index: int, document: Document, match: PassageMatch) -> Quote:
    sentence = document.sentence_at(match.start)
    return Quote(
        document_sha256=study.reports[index].sha256,
        start=match.start,
        end=match.end,
        page=sentence.page if sentence is not None else None,
        text=document.text[match.start : match.end],
    )


def _nth(body: str, wanted: str, occurrence: int) -> int | None:
    position = -1
    for _ in range(max(occurrence, 1)):
        position = body.find(wanted, position + 1)
        if position < 0:
            return None
    return position
