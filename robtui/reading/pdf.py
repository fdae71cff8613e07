"""PDF trial reports into a Document: text with joined lines, sentences with page and box.

Pages are read one at a time with pypdfium2 and released, so memory holds what is kept for the
document, never the parsed pages (robtui.reading.layout does the per-page work). Paragraphs continue across column and page breaks; captions and tables met inside an
unfinished paragraph are emitted after it, never inside it.
"""

from __future__ import annotations

import re
import statistics
import time
from collections.abc import Callable
from pathlib import Path

from robtui.errors import ReadingError
from robtui.reading.assemble import Block, Box, SentenceMaker
from robtui.reading.document import Document
from robtui.reading.layout.blocks import (
    INDENT_EM,
    PBlock,
    is_cover_sheet,
    page_blocks,
    running_signatures,
    strip_running,
)
from robtui.reading.layout.glyphs import read_glyphs
from robtui.reading.layout.lines import Line
from robtui.reading.layout.page import PageLines, analyse_page

# Running heads are learnt from the first pages, so later pages stream through.
RUNNING_SAMPLE = 12
SOFT_HYPHEN = "\u00ad"
FLOATS = ("caption", "table", "figure", "aside")
# Print this many points smaller than the open paragraph's is a note beside it, not its next
# block (our own setting, no source: footnotes and table notes are set 1.5-3 pt smaller).
SMALL_PRINT = 1.0
_ATTACHED_DASHES = ("-", "\u2010", "\u2011", "\u2013", "\u2014")  # hyphens, en and em dash
_EDGE_PUNCTUATION = re.compile(r"^\W+|\W+$")
_TERMINAL = re.compile(r"[.?!:][\"'”’)\]]*(?:\d+(?:[,–-]\d+)*)?$")


# -- text building -----------------------------------------------------------------------------


class TextBuilder:
    """Appends blocks to the document text, joining line-end hyphens, recording word boxes."""

    def __init__(self) -> None:
        self.parts: list[str] = []
        self.length = 0
        self.blocks = 0
        self.maker = SentenceMaker()
        self.plain_words: set[str] = set()
        self.hyphen_words: set[str] = set()
        self._joined = False  # the next word is the second half of one joined across a line end

    def _put(self, text: str) -> tuple[int, int]:
        start = self.length
        self.parts.append(text)
        self.length += len(text)
        return start, self.length

    def add(self, block: PBlock, kind: str) -> None:
        """Append ``block``; an aside (side note, licence, stamp) goes to section "other"."""
        if self.blocks:
            self._put("\n\n")
        block_start = self.length
        first_part = len(self.parts)
        words: list[tuple[int, int, int, Box]] = []
        if kind in ("table", "figure"):
            for r, row in enumerate(block.rows):
                if r:
                    self._put("\n")
                for c, cell in enumerate(row):
                    if c:
                        self._put(" | ")
                    self._line_words(cell, block.page, words, first=True)
        else:
            for i, line in enumerate(block.lines):
                self._line_words(line, line.page or block.page, words, first=i == 0)
        if self.parts and self.parts[-1].endswith(SOFT_HYPHEN):
            self.parts[-1] = self.parts[-1][:-1]  # a soft hyphen ending the block is not text
            self.length -= 1
        self.blocks += 1
        # Sentences are made now and the word boxes dropped with the block.
        body = "".join(self.parts[first_part:])
        self.parts[first_part:] = [body]
        section = None
        if kind == "aside":
            kind, section = "body", "other"
        self.maker.add(Block(block_start, self.length, kind, block.page, words, section), body)

    def _line_words(self, line: Line, page: int, words: list, first: bool) -> None:
        last = len(line.words) - 1
        for j, word in enumerate(line.words):
            text = word.text if j == last else word.text.rstrip(SOFT_HYPHEN)
            if j == 0 and not first:
                text = self._join_point(text)
            elif j > 0:
                self._put(" ")
            start, end = self._put(text)
            words.append((start, end, page, word.box))
            if self._joined:
                # a word's second half after a line-end hyphen that was dropped is no word of
                # its own ("agree-" + "ment"), and the joined word only a guess: neither learnt
                self._joined = False
            else:
                self._learn(text)

    def _join_point(self, next_word: str) -> str:
        """Join a line to the previous one: drop a line-end hyphen or add a space."""
        prev = self.parts[-1] if self.parts else ""
        if prev.endswith(SOFT_HYPHEN):  # the typesetter's own hyphenation: always joined
            self.parts[-1] = prev[:-1]
            self.length -= 1
            self._joined = True
            return next_word
        if len(prev) >= 2 and prev.endswith("-") and prev[-2].isalnum():
            fragment = re.sub(r"^\W+", "", prev[:-1])
            if next_word[:1].islower() and not (fragment.isupper() or fragment.isdigit()):
                left = fragment.lower()
                right = re.sub(r"\W+$", "", next_word).lower()
                compound = f"{left}-{right}" in self.hyphen_words or (
                    len(left) >= 4 and left in self.plain_words and right in self.plain_words
                )
                if compound and f"{left}{right}" not in self.plain_words:
                    return next_word
                self.parts[-1] = prev[:-1]
                self.length -= 1
                self._joined = True
                return next_word
            return next_word
        if prev.endswith(("-", "−")) and next_word[:1].isdigit():
            return next_word  # a minus sign or range broken before its number: "(-" + "1.4"
        if len(prev) >= 2 and prev.endswith(_ATTACHED_DASHES):
            # a dash set against its word ends the line: the line break is no space
            # ("3′-" + "end", "2a–" + "c)", "standing—" + "which"); a dash
            # standing alone between spaces ("—") keeps them
            return next_word
        self._put(" ")
        return next_word

    def _learn(self, word: str) -> None:
        if word.endswith("-"):
            return  # a fragment before a line break, not a word
        clean = _EDGE_PUNCTUATION.sub("", word).lower()
        if not clean:
            return
        (self.hyphen_words if "-" in clean else self.plain_words).add(clean)

    @property
    def text(self) -> str:
        return "".join(self.parts)


class BlockFlow:
    """Joins paragraphs across column and page breaks; floats wait until the paragraph ends."""

    def __init__(self, builder: TextBuilder) -> None:
        self.builder = builder
        self.open: PBlock | None = None
        self.deferred: list[PBlock] = []

    def feed(self, block: PBlock, column_start: bool) -> None:
        if block.kind in FLOATS or self._small_print(block):
            if self.open is not None:
                self.deferred.append(block)
            else:
                self.builder.add(block, block.kind)
            return
        if block.kind == "body" and self.open is not None and column_start and _continues(
            self.open.lines[-1], block.lines[0]
        ) and not _opens_indented(block):
            for line in block.lines:
                line.page = block.page
            self.open.lines.extend(block.lines)
            self._maybe_close()
            return
        self.close()
        if block.kind == "body":
            for line in block.lines:
                line.page = block.page
            self.open = block
            self._maybe_close()
        else:
            self.builder.add(block, block.kind)

    def _small_print(self, block: PBlock) -> bool:
        """A body block set clearly smaller than the open paragraph (a footnote, a table's
        note, a figure's labels): it floats like a caption instead of ending the paragraph."""
        if self.open is None or block.kind != "body":
            return False
        if len(self.open.lines) <= 3 and all(ln.bold for ln in self.open.lines):
            # a short paragraph all in bold (a title read as a paragraph) holds no footnotes:
            # the text set below it ends it
            return False
        size = statistics.median(ln.size for ln in block.lines)
        return size < statistics.median(ln.size for ln in self.open.lines) - SMALL_PRINT

    def _maybe_close(self) -> None:
        if self.open is not None and _TERMINAL.search(self.open.last_text):
            self.close()

    def close(self) -> None:
        if self.open is not None:
            self.builder.add(self.open, "body")
            self.open = None
        for block in self.deferred:
            self.builder.add(block, block.kind)
        self.deferred.clear()


def _continues(last: Line, first: Line) -> bool:
    """A paragraph goes on in the next column only in the same type (size, weight, style)."""
    return (
        abs(last.size - first.size) <= 0.6
        and last.bold == first.bold
        and last.italic == first.italic
    )


def _opens_indented(block: PBlock) -> bool:
    """A block whose first line is set in from the next by a paragraph's indent opens a
    paragraph: it does not go on with the one left open in the column before."""
    if len(block.lines) < 2:
        return False
    first, second = block.lines[0], block.lines[1]
    low, high = INDENT_EM
    return low * first.size <= first.x0 - second.x0 <= high * first.size


# -- the reader --------------------------------------------------------------------------------


def _open_error(path: Path, error: Exception) -> ReadingError:
    # pdfplumber wraps pdfminer's errors (PdfminerException(PDFPasswordIncorrect())); PDFium
    # says "password" in its message.
    inner = [error, *(a for a in error.args if isinstance(a, BaseException))]
    names = " ".join(type(e).__name__ for e in inner)
    if "Password" in names or "Encrypt" in names or "password" in str(error).lower():
        return ReadingError(
            f"{path}: the PDF is password protected (encrypted), so its text cannot be read; "
            "open it with its password in a PDF viewer and save or print an unprotected copy, "
            "then add that copy"
        )
    from robtui.reading.reader import reader_failure, robtui_frame

    if robtui_frame(error) is not None:  # a bug in robtui's own page code, not a bad file
        return reader_failure(path, error)
    name = type(error).__name__
    return ReadingError(
        f"{path}: not a readable PDF ({name}: {error or 'damaged file'}); "
        "it may be corrupt or truncated: download it again"
    )


def _flow_page(flow: BlockFlow, page: PageLines, running: set[str]) -> None:
    last_column = None
    for block in page_blocks(strip_running(page, running)):
        column = block.lines[0].column if block.lines else "table"
        column_start = last_column is None or (column != last_column and column != "full")
        floated = flow.open is not None and (block.kind in FLOATS or flow._small_print(block))
        flow.feed(block, column_start)
        if not floated:  # a float between a paragraph's two halves is not where it goes on
            last_column = column


def read_pdf(
    path: Path, data: bytes, digest: str, *, on_page: Callable[[int, float], None] | None = None
) -> Document:
    """A PDF file as a Document; ReadingError for encrypted, damaged or image-only files.

    ``on_page(number, seconds)`` (benchmarks) is told the time spent on each page: reading and
    analysing it, and putting its blocks into the text (for the first pages, held until the
    running heads are known, that second part comes in a later call for the same page)."""
    import pypdfium2

    def timed_flow(page: PageLines) -> None:
        start = time.perf_counter()
        _flow_page(flow, page, running)
        if on_page is not None:
            on_page(page.number, time.perf_counter() - start)

    if not data.lstrip()[:5].startswith(b"%PDF"):
        raise ReadingError(f"{path}: not a PDF (no %PDF header); check the file")
    if b"%%EOF" not in data[-2048:]:
        raise ReadingError(
            f"{path}: the PDF is truncated (no end-of-file marker); download it again"
        )
    builder = TextBuilder()
    flow = BlockFlow(builder)
    buffered: list[PageLines] = []
    running: set[str] | None = None
    count = 0
    images = 0
    found_text = False
    textless: list[int] = []
    page_warnings: list[str] = []
    try:
        pdf = pypdfium2.PdfDocument(data)
        try:
            for number in range(1, len(pdf) + 1):
                started = time.perf_counter()
                page = pdf[number - 1]
                try:
                    glyphs = read_glyphs(page, number)
                finally:
                    page.close()
                images += glyphs.images
                lines = analyse_page(glyphs)
                del glyphs
                if on_page is not None:
                    on_page(number, time.perf_counter() - started)
                page_warnings.extend(lines.warnings)
                count = number
                if lines.lines or lines.tables or lines.figures:
                    found_text = True
                else:
                    textless.append(number)
                if is_cover_sheet(lines):
                    page_warnings.append(
                        "page 1 is a download service's cover sheet: left out of the text"
                    )
                    continue
                if running is None:
                    buffered.append(lines)
                    if len(buffered) < RUNNING_SAMPLE:
                        continue
                    running = running_signatures(buffered)
                    for held in buffered:
                        timed_flow(held)
                    buffered = []
                else:
                    timed_flow(lines)
        finally:
            pdf.close()
    except ReadingError:
        raise
    except Exception as error:  # PDFium's errors (and ours on its output) mean an unusable file
        raise _open_error(path, error) from error
    if count == 0:
        raise ReadingError(f"{path}: the PDF has no pages")
    if not found_text:
        what = f"{images} image(s) and " if images else ""
        raise ReadingError(
            f"{path}: the PDF has {what}no text layer (a scan?); run OCR on it first "
            "(with an OCR tool that adds a text layer), then open the result"
        )
    if running is None:
        running = running_signatures(buffered)
        for held in buffered:
            timed_flow(held)
    flow.close()
    text = builder.text
    sentences = builder.maker.sentences
    warnings = list(page_warnings)
    if textless:
        listed = ", ".join(str(n) for n in textless[:10]) + (", ..." if len(textless) > 10 else "")
        warnings.append(
            f"{len(textless)} page(s) without a text layer (pages {listed}); if they are scans, "
            "their content is missing until the PDF is run through OCR"
        )
    return Document(
        path=str(path),
        sha256=digest,
        kind="pdf",
        text=text,
        sentences=sentences,
        pages=count,
        warnings=warnings,
    )
