"""Turn blocks of a document's text (paragraphs, headings, captions, tables) into sentences.

Every reader finds blocks its own way (lines of a text file, lines on a PDF page) and then
hands them here, so sentence splitting and section tracking are the same for all inputs.
"""

from __future__ import annotations

import bisect
import re
from dataclasses import dataclass, field

from robtui.reading.document import BlockKind, Sentence
from robtui.reading.sections import SectionTracker, bare_run_in, match_heading, run_in_heading
from robtui.reading.sentences import split_sentences

Box = tuple[float, float, float, float]

# A caption opens with a capital ("Table 2", "FIGURE 1", "Fig. 3"); "table 1." opening a line
# in a paragraph is the text naming it. These rules and the verbs below are how journals set
# captions and write about floats (common practice, no source).
_CAPTION = re.compile(
    r"^(?=(?-i:[A-Z]))(?:(?:supplementary|extended data|online)\s+)?(?:table|fig\.?|figure|chart)"
    r"\s*[A-Z]?\d+[A-Za-z]?\b"
    # a caption names its float; a sentence about it goes on with a verb or a conjunction
    # ("Figure 2 shows the flow of participants", "Table 1 and figure 2 give"): prose
    r"(?!\s+(?-i:(?:shows?|presents?|summari[sz]es?|illustrates?|gives?|depicts?|displays?"
    r"|lists?|reports?|describes?|provides?|compares?|contains?|details|outlines?|indicates?"
    r"|demonstrates?|reveals?|highlights?|and|also|was|were|is|are)\b))"
    # a label that a bracket, a semicolon or a comma goes on from is a reference in running
    # text wrapped to a line's start ("Figure A3) that are", "Table 2, which"), no caption
    r"(?!\s*[)\];])(?!\s*,(?!\s*cont))",
    re.IGNORECASE,
)
_HEADING_END_OK = re.compile(r"[\w)\]?:’'\"]$")


@dataclass
class Block:
    """A run of ``text[start:end]`` of one kind; PDF blocks carry word boxes per character run."""

    start: int
    end: int
    kind: BlockKind = "body"
    page: int | None = None
    # (char_start, char_end, page, box) of each word, offsets into the document text.
    words: list[tuple[int, int, int, Box]] = field(default_factory=list)
    section: str | None = None  # set for text outside the article's flow (side notes)
    word_ends: list[int] | None = field(default=None, repr=False)  # made on first use


def looks_like_heading(line: str) -> bool:
    """A short line with no closing full stop that reads as a title, not as a sentence."""
    stripped = line.strip()
    if not stripped or len(stripped) > 120:
        return False
    words = stripped.split()
    if len(words) > 14:
        return False
    if stripped.endswith(".") and not re.match(r"^\d+(\.\d+)*\.?\s", stripped):
        # "Study sample." standing alone is a heading; "We used ITT." is not.
        return run_in_heading(stripped, "methods") is not None
    if not _HEADING_END_OK.search(stripped):
        return False
    first = stripped.lstrip("0123456789.) ")[:1]
    return first.isupper() or first.isdigit()


def is_caption(text: str) -> bool:
    """True when a block opens like a table or figure caption ("Table 2", "Fig. 1")."""
    return bool(_CAPTION.match(text.lstrip()))


class SentenceMaker:
    """Turns blocks into sentences one block at a time, so a reader can drop each block's word
    boxes as soon as the block is done (memory stays flat on long PDFs)."""

    def __init__(self) -> None:
        self.tracker = SectionTracker()
        self.sentences: list[Sentence] = []

    def add(self, block: Block, body: str) -> None:
        """Take ``block`` whose text is ``body`` (the document's text[block.start:block.end])."""
        if not body.strip():
            return
        tracker = self.tracker
        whole = [(0, len(body))]
        if block.section is not None:
            self._emit(block, body, split_sentences(body), block.section)
        elif not self.sentences and block.kind == "heading" and match_heading(body) is None:
            self._emit(block, body, whole, "title")  # a title set as a heading
        elif block.kind == "heading":
            self._emit(block, body, whole, tracker.heading(body))
        elif block.kind == "caption":
            self._emit(block, body, split_sentences(body), tracker.current)
        elif block.kind == "table":
            self._emit(block, body, _row_spans(body), tracker.current)
        elif block.kind == "figure":  # a box or a run of lines per row, split into sentences
            spans = [(a + x, a + y) for a, b in _row_spans(body)
                     for x, y in split_sentences(body[a:b])]
            self._emit(block, body, spans, tracker.current)
        elif not self.sentences and len(body.split()) <= 40 and len(split_sentences(body)) == 1:
            # The first block of a report is its title.
            self._emit(block, body, whole, "title")
        else:
            self._body(block, body)

    def _body(self, block: Block, body: str) -> None:
        tracker = self.tracker
        if tracker.current == "references":
            self._emit(block, body, whole_span(body), "references")  # one reference, one entry
            return
        bare = bare_run_in(body.lstrip())
        if bare is not None:
            tracker.run_in(bare)
        spans = split_sentences(body)
        for i, (a, b) in enumerate(spans):
            piece = body[a:b]
            # A run-in heading opens a paragraph, or stands after a wide gap inside it (text
            # exported from layouts sometimes glues a heading to the paragraph before).
            gap = body[spans[i - 1][1] : a] if i else ""
            last = i == len(spans) - 1 and i > 0
            if (i == 0 and len(spans) > 1) or last or "\n" in gap or "   " in gap:
                label = run_in_heading(piece, tracker.current)
                if label is not None:
                    tracker.run_in(label)
                    self._emit(block, body, [(a, b)], tracker.current, kind="heading")
                    continue
            self._emit(block, body, [(a, b)], tracker.text(len(piece.split())))

    def _emit(
        self,
        block: Block,
        body: str,
        spans: list[tuple[int, int]],
        section: str,
        kind: BlockKind | None = None,
    ) -> None:
        for a, b in _trimmed(body, spans):
            start, end = block.start + a, block.start + b
            page, box = _locate(block, start, end)
            self.sentences.append(
                Sentence(
                    index=len(self.sentences),
                    start=start,
                    end=end,
                    text=body[a:b],
                    section=section,
                    block=kind or block.kind,
                    page=page,
                    bbox=box,
                )
            )


def build_sentences(text: str, blocks: list[Block]) -> list[Sentence]:
    """Sentences of ``blocks`` (in reading order) with their section, kind, page and box."""
    maker = SentenceMaker()
    for block in blocks:
        if block.end > block.start:
            maker.add(block, text[block.start : block.end])
    return maker.sentences


def whole_span(body: str) -> list[tuple[int, int]]:
    return [(0, len(body))]


def _row_spans(body: str) -> list[tuple[int, int]]:
    """One span per line of a table block."""
    spans = []
    pos = 0
    for row in body.split("\n"):
        spans.append((pos, pos + len(row)))
        pos += len(row) + 1
    return spans


def _trimmed(text: str, spans: list[tuple[int, int]]) -> list[tuple[int, int]]:
    out = []
    for a, b in spans:
        while a < b and text[a].isspace():
            a += 1
        while b > a and text[b - 1].isspace():
            b -= 1
        if b > a:
            out.append((a, b))
    return out


def _locate(block: Block, a: int, b: int) -> tuple[int | None, Box | None]:
    """Page of the sentence's first word and the union of its word boxes on that page."""
    if not block.words:
        return block.page, None
    page = None
    x0 = top = float("inf")
    x1 = bottom = float("-inf")
    if block.word_ends is None:  # words come in text order: find the first one by bisection
        block.word_ends = [w[1] for w in block.words]
    first = bisect.bisect_right(block.word_ends, a)
    for ws, we, wpage, (bx0, btop, bx1, bbottom) in block.words[first:]:
        if ws >= b:
            break
        if we <= a:
            continue
        if page is None:
            page = wpage
        if wpage != page:
            continue
        x0, top = min(x0, bx0), min(top, btop)
        x1, bottom = max(x1, bx1), max(bottom, bbottom)
    if page is None:
        return block.page, None
    return page, (round(x0, 2), round(top, 2), round(x1, 2), round(bottom, 2))
