"""PDF trial reports into a Document: reading order, clean lines, blocks with page and box.

Pages are read one at a time and released (``page.close()``), so memory holds the words kept
for the document, never the parsed pages. Layout rules (common practice for journal PDFs, no
source): lines are words sharing a baseline, split at wide gaps; a line crossing the page's
middle is full width, otherwise it belongs to the left or right column; full-width lines cut a
page into bands read top to bottom, each band read left column then right column. Lines at the
top or bottom of pages that repeat on many pages (digits ignored), and bare page numbers, are
running headers and footers. Ruled regions (two or more horizontal rules of equal width) are
tables; blocks opening with "Table n" / "Figure n" are captions. Both are kept out of the
paragraph they interrupt and emitted after it.
"""

from __future__ import annotations

import itertools
import re
import statistics
from collections import Counter
from dataclasses import dataclass, field
from pathlib import Path

from robtui.errors import ReadingError
from robtui.reading.assemble import Block, Box, SentenceMaker, is_caption, looks_like_heading
from robtui.reading.document import Document
from robtui.reading.normalise import normalise_chars

# Running heads are learnt from the first pages, so later pages stream through.
RUNNING_SAMPLE = 12
MARGIN_SHARE = 0.085  # top/bottom share of the page where running heads live
SEGMENT_GAP = 11.0  # points between words that split a line into separate segments
_PAGE_NUMBER = re.compile(r"^(?:page\s*)?#+(?:\s*(?:of|/)\s*#+)?$", re.IGNORECASE)
_TERMINAL = re.compile(r"[.?!:][\"'”’)\]]*(?:\d+(?:[,–-]\d+)*)?$")


@dataclass
class Word:
    text: str
    box: Box
    bold: bool
    italic: bool
    size: float


@dataclass
class Line:
    words: list[Word]
    x0: float
    top: float
    x1: float
    bottom: float
    column: str = "full"  # "full" | "left" | "right"

    @property
    def text(self) -> str:
        return " ".join(w.text for w in self.words)

    @property
    def bold(self) -> bool:
        return sum(w.bold for w in self.words) * 2 > len(self.words)

    @property
    def italic(self) -> bool:
        return sum(w.italic for w in self.words) * 2 > len(self.words)

    @property
    def size(self) -> float:
        return statistics.median(w.size for w in self.words)


@dataclass
class PBlock:
    kind: str
    lines: list[Line]
    page: int
    rows: list[list[Line]] = field(default_factory=list)  # tables: cells per row

    @property
    def last_text(self) -> str:
        return self.lines[-1].text if self.lines else ""


# -- page to lines -----------------------------------------------------------------------------


def _char_device(rsrcmgr):
    """A pdfminer device that keeps characters as plain tuples (no layout objects for them).

    Building pdfminer's per-character objects (and pdfplumber's dicts of them) is most of the
    cost of reading a page; the speed target needs the plain tuples instead. The character box
    follows pdfminer's own LTChar computation for horizontal fonts.
    """
    from pdfminer.converter import PDFLayoutAnalyzer
    from pdfminer.pdffont import PDFUnicodeNotDefined

    class CharDevice(PDFLayoutAnalyzer):
        def __init__(self) -> None:
            super().__init__(rsrcmgr, pageno=1, laparams=None)
            self.chars: list[tuple[float, float, float, float, str, str, float]] = []
            self.page_height = 0.0

        def render_char(self, matrix, font, fontsize, scaling, rise, cid, ncs, graphicstate):
            try:
                text = font.to_unichr(cid)
            except PDFUnicodeNotDefined:
                text = "\ufffd"
            adv = font.char_width(cid) * fontsize * scaling
            a, b, c, d, e, f = matrix
            low = font.get_descent() * fontsize + rise
            high = low + fontsize
            x0, y0 = c * low + e, d * low + f
            x1, y1 = a * adv + c * high + e, b * adv + d * high + f
            if x1 < x0:
                x0, x1 = x1, x0
            if y1 < y0:
                y0, y1 = y1, y0
            self.chars.append((x0, y0, x1, y1, text, font.fontname, y1 - y0))
            return adv

        def receive_layout(self, ltpage) -> None:
            self.result = ltpage

    return CharDevice()


def _page_objects(pdf, page) -> tuple[list[Word], list[tuple[float, float, float]], int]:
    """Words, horizontal rules and the image count of a page."""
    from pdfminer.layout import LTFigure, LTImage, LTLine, LTRect
    from pdfminer.pdfinterp import PDFPageInterpreter

    device = _char_device(pdf.rsrcmgr)
    PDFPageInterpreter(pdf.rsrcmgr, device).process_page(page.page_obj)
    x_off, y_top = float(page.mediabox[0]), float(page.mediabox[3])
    chars = [
        (x0 - x_off, y_top - y1, x1 - x_off, y_top - y0, text, font, size)
        for x0, y0, x1, y1, text, font, size in device.chars
    ]
    rules: list[tuple[float, float, float]] = []
    images = 0
    stack = list(device.result)
    while stack:
        obj = stack.pop()
        if isinstance(obj, (LTLine, LTRect)):
            if abs(obj.y1 - obj.y0) <= 2.0 and obj.x1 - obj.x0 > 60:
                rules.append((obj.x0 - x_off, obj.x1 - x_off, y_top - obj.y1))
        elif isinstance(obj, LTImage):
            images += 1
        elif isinstance(obj, LTFigure):
            stack.extend(obj)
    return _group_words(chars), rules, images


def _group_words(chars) -> list[Word]:
    """Characters into words: same baseline, no space between, no gap wider than 1.5 pt."""
    chars.sort(key=lambda c: (round(c[3]), c[0]))
    words: list[Word] = []
    current: list = []

    def flush() -> None:
        if not current:
            return
        text = normalise_chars("".join(c[4] for c in current)).strip()
        if text:
            fonts = current[len(current) // 2][5].lower()
            words.append(
                Word(
                    text,
                    (
                        min(c[0] for c in current),
                        min(c[1] for c in current),
                        max(c[2] for c in current),
                        max(c[3] for c in current),
                    ),
                    "bold" in fonts or "black" in fonts or "heavy" in fonts,
                    "italic" in fonts or "oblique" in fonts,
                    float(current[len(current) // 2][6]),
                )
            )
        current.clear()

    for c in chars:
        if c[4].isspace():
            flush()
            continue
        if current:
            last = current[-1]
            if abs(last[3] - c[3]) > 2.0 or c[0] - last[2] > 1.5 or c[0] < last[0]:
                flush()
        current.append(c)
    flush()
    return words


def _lines(words: list[Word]) -> list[Line]:
    """Words sharing a baseline, split into segments at wide gaps."""
    rows: list[list[Word]] = []
    for word in sorted(words, key=lambda w: (round(w.box[3], 0), w.box[0])):
        if rows and abs(rows[-1][0].box[3] - word.box[3]) <= 2.0:
            rows[-1].append(word)
        else:
            rows.append([word])
    lines = []
    for row in rows:
        row.sort(key=lambda w: w.box[0])
        segment = [row[0]]
        for word in row[1:]:
            if word.box[0] - segment[-1].box[2] > max(SEGMENT_GAP, 1.2 * word.size):
                lines.append(_line(segment))
                segment = [word]
            else:
                segment.append(word)
        lines.append(_line(segment))
    return lines


def _line(words: list[Word]) -> Line:
    return Line(
        words,
        min(w.box[0] for w in words),
        min(w.box[1] for w in words),
        max(w.box[2] for w in words),
        max(w.box[3] for w in words),
    )


def _table_regions(rules: list[tuple[float, float, float]], height: float) -> list[Box]:
    """Regions between two or more rules of the same extent, outside the page margins."""
    groups: dict[tuple[int, int], list[float]] = {}
    for x0, x1, top in rules:
        if top < height * MARGIN_SHARE or top > height * (1 - MARGIN_SHARE):
            continue
        groups.setdefault((round(x0 / 4), round(x1 / 4)), []).append(top)
    regions = []
    for (gx0, gx1), tops in groups.items():
        tops.sort()
        chain = [tops[0]]
        for top in tops[1:]:
            if top - chain[-1] <= 260:
                chain.append(top)
                continue
            if len(chain) >= 2:
                regions.append((gx0 * 4.0 - 2, chain[0] - 1, gx1 * 4.0 + 2, chain[-1] + 1))
            chain = [top]
        if len(chain) >= 2:
            regions.append((gx0 * 4.0 - 2, chain[0] - 1, gx1 * 4.0 + 2, chain[-1] + 1))
    return regions


def _inside(line: Line, region: Box) -> bool:
    cx, cy = (line.x0 + line.x1) / 2, (line.top + line.bottom) / 2
    return region[0] <= cx <= region[2] and region[1] <= cy <= region[3]


@dataclass
class PageLines:
    number: int
    width: float
    height: float
    lines: list[Line]
    tables: list[tuple[Box, list[Line]]]


def extract_page(pdf, page, number: int) -> tuple[PageLines, int]:
    """Lines and ruled tables of one pdfplumber page, and how many images it holds."""
    words, rules, images = _page_objects(pdf, page)
    lines = _lines(words)
    regions = _table_regions(rules, float(page.height))
    tables = []
    for region in regions:
        inside = [line for line in lines if _inside(line, region)]
        if inside:
            tables.append((region, inside))
            lines = [line for line in lines if not _inside(line, region)]
    return PageLines(number, float(page.width), float(page.height), lines, tables), images


# -- running headers and footers ---------------------------------------------------------------


def _signature(line: Line) -> str:
    return re.sub(r"\d+", "#", " ".join(line.text.lower().split()))


def _margin_lines(page: PageLines) -> list[Line]:
    top_zone = page.height * MARGIN_SHARE
    bottom_zone = page.height * (1 - MARGIN_SHARE)
    return [ln for ln in page.lines if ln.bottom <= top_zone or ln.top >= bottom_zone]


def running_signatures(pages: list[PageLines]) -> set[str]:
    """Signatures of margin lines that repeat on enough pages to be running heads."""
    counts: Counter[str] = Counter()
    for page in pages:
        counts.update({_signature(ln) for ln in _margin_lines(page)})
    needed = max(2, int(0.4 * len(pages) + 0.5))
    return {sig for sig, n in counts.items() if n >= needed}


def strip_running(page: PageLines, running: set[str]) -> PageLines:
    """The page without running heads, page numbers and small print above the text.

    Small print in the top margin (smaller than the body text) is dropped even when it does
    not repeat, so one- and two-page documents lose their running head too; small print at
    the bottom is kept, since footnotes there may name funding or registration.
    """
    body_size = _body_size(page.lines)
    top_zone = page.height * MARGIN_SHARE
    margin = {id(ln) for ln in _margin_lines(page)}

    def running_line(ln: Line) -> bool:
        if id(ln) not in margin:
            return False
        signature = _signature(ln)
        if signature in running or _PAGE_NUMBER.match(signature):
            return True
        return ln.bottom <= top_zone and ln.size < body_size - 0.8

    kept = [ln for ln in page.lines if not running_line(ln)]
    return PageLines(page.number, page.width, page.height, kept, page.tables)


# -- reading order and blocks ------------------------------------------------------------------


def reading_order(page: PageLines) -> list[Line | tuple[Box, list[Line]]]:
    """Lines (and tables, as one item) in reading order: bands, then left before right."""
    mid = page.width / 2
    items: list[tuple[float, str, Line | tuple[Box, list[Line]]]] = []
    for line in page.lines:
        if line.x0 < mid - 6 and line.x1 > mid + 6:
            line.column = "full"
        elif line.x1 <= mid + 6:
            line.column = "left"
        else:
            line.column = "right"
        items.append((line.top, line.column, line))
    for region, rows in page.tables:
        column = (
            "full"
            if region[0] < mid - 6 and region[2] > mid + 6
            else ("left" if region[2] <= mid + 6 else "right")
        )
        items.append((region[1], column, (region, rows)))
    items.sort(key=lambda item: item[0])
    ordered: list[Line | tuple[Box, list[Line]]] = []
    band: list[tuple[float, str, object]] = []

    def flush() -> None:
        ordered.extend(i[2] for i in band if i[1] == "left")
        ordered.extend(i[2] for i in band if i[1] == "right")
        band.clear()

    for item in items:
        if item[1] == "full":
            flush()
            ordered.append(item[2])
        else:
            band.append(item)
    flush()
    return ordered


def _leading(lines: list[Line]) -> float:
    gaps = [
        b.top - a.top
        for a, b in itertools.pairwise(lines)
        if a.column == b.column and 5 < b.top - a.top < 30 and abs(a.size - b.size) < 0.5
    ]
    return statistics.median(gaps) if gaps else 12.0


def _short_last_line(prev: Line, line: Line, width: float) -> bool:
    """The short last line of a full-width paragraph (it does not reach the page middle)."""
    return (
        prev.column == "full"
        and line.column == "left"
        and abs(line.x0 - prev.x0) < 3
        and prev.x1 > width * 0.75
        and abs(line.size - prev.size) < 0.3
    )


def page_blocks(page: PageLines) -> list[PBlock]:
    """Blocks of one page in reading order."""
    ordered = reading_order(page)
    plain = [item for item in ordered if isinstance(item, Line)]
    leading = _leading(plain)
    blocks: list[PBlock] = []
    current: PBlock | None = None
    prev: Line | None = None
    for item in ordered:
        if not isinstance(item, Line):
            _region, rows = item
            blocks.append(PBlock("table", [], page.number, rows=_table_rows(rows)))
            current, prev = None, None
            continue
        line = item
        new = (
            current is None
            or prev is None
            or (line.column != prev.column and not _short_last_line(prev, line, page.width))
            or line.top - prev.top > 1.35 * max(leading, prev.size * 1.25)
            or line.top < prev.top
            or line.bold != prev.bold
            or line.italic != prev.italic
            or abs(line.size - prev.size) > 0.6
            or is_caption(line.text)
            and not is_caption(current.lines[0].text)
        )
        if new:
            current = PBlock("body", [line], page.number)
            blocks.append(current)
        else:
            current.lines.append(line)
        prev = line
    body_size = _body_size(plain)
    for block in blocks:
        if block.kind == "table":
            continue
        first = block.lines[0].text
        text = " ".join(ln.text for ln in block.lines)
        if is_caption(first):
            block.kind = "caption"
        elif (
            len(block.lines) <= 2
            and looks_like_heading(text)
            and (block.lines[0].bold or block.lines[0].size > body_size + 0.8)
        ):
            block.kind = "heading"
    return blocks


def _body_size(lines: list[Line]) -> float:
    sizes = Counter(round(ln.size, 1) for ln in lines)
    return sizes.most_common(1)[0][0] if sizes else 0.0


def _table_rows(lines: list[Line]) -> list[list[Line]]:
    rows: list[list[Line]] = []
    for line in sorted(lines, key=lambda ln: (round(ln.bottom), ln.x0)):
        if rows and abs(rows[-1][0].bottom - line.bottom) <= 2.0:
            rows[-1].append(line)
        else:
            rows.append([line])
    return [_cells(row) for row in rows]


def _cells(row: list[Line]) -> list[Line]:
    """Table cells of a row: words split at gaps wider than a few spaces."""
    words = sorted((w for line in row for w in line.words), key=lambda w: w.box[0])
    cells = [[words[0]]]
    for word in words[1:]:
        if word.box[0] - cells[-1][-1].box[2] > max(3.5, 0.6 * word.size):
            cells.append([word])
        else:
            cells[-1].append(word)
    return [_line(cell) for cell in cells]


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

    def _put(self, text: str) -> tuple[int, int]:
        start = self.length
        self.parts.append(text)
        self.length += len(text)
        return start, self.length

    def add(self, block: PBlock, kind: str) -> None:
        if self.blocks:
            self._put("\n\n")
        block_start = self.length
        first_part = len(self.parts)
        words: list[tuple[int, int, int, Box]] = []
        if kind == "table":
            for r, row in enumerate(block.rows):
                if r:
                    self._put("\n")
                for c, cell in enumerate(row):
                    if c:
                        self._put(" | ")
                    self._line_words(cell, block.page, words, first=True)
        else:
            for i, line in enumerate(block.lines):
                self._line_words(line, getattr(line, "page", block.page), words, first=i == 0)
        self.blocks += 1
        # Sentences are made now and the word boxes dropped with the block.
        body = "".join(self.parts[first_part:])
        self.parts[first_part:] = [body]
        self.maker.add(Block(block_start, self.length, kind, block.page, words), body)

    def _line_words(self, line: Line, page: int, words: list, first: bool) -> None:
        for j, word in enumerate(line.words):
            text = word.text
            if j == 0 and not first:
                text = self._join_point(text)
            elif j > 0:
                self._put(" ")
            start, end = self._put(text)
            words.append((start, end, page, word.box))
            self._learn(text)

    def _join_point(self, next_word: str) -> str:
        """Join a line to the previous one: drop a line-end hyphen or add a space."""
        prev = self.parts[-1] if self.parts else ""
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
                return next_word
            return next_word
        if prev.endswith(("-", "−")) and next_word[:1].isdigit():
            return next_word  # a minus sign or range broken before its number: "(-" + "1.4"
        self._put(" ")
        return next_word

    def _learn(self, word: str) -> None:
        if word.endswith("-"):
            return  # a fragment before a line break, not a word
        clean = re.sub(r"^\W+|\W+$", "", word).lower()
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
        if block.kind in ("caption", "table"):
            if self.open is not None:
                self.deferred.append(block)
            else:
                self.builder.add(block, block.kind)
            return
        if block.kind == "body" and self.open is not None and column_start:
            for line in block.lines:
                line.page = block.page  # type: ignore[attr-defined]
            self.open.lines.extend(block.lines)
            self._maybe_close()
            return
        self.close()
        if block.kind == "body":
            for line in block.lines:
                line.page = block.page  # type: ignore[attr-defined]
            self.open = block
            self._maybe_close()
        else:
            self.builder.add(block, block.kind)

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


# -- the reader --------------------------------------------------------------------------------


def _open_error(path: Path, error: Exception) -> ReadingError:
    name = type(error).__name__
    if "Password" in name or "Encrypt" in name:
        return ReadingError(
            f"{path}: the PDF is encrypted (password protected); save an unprotected copy first"
        )
    return ReadingError(
        f"{path}: not a readable PDF ({name}: {error or 'damaged file'}); "
        "it may be corrupt or truncated: download it again"
    )


def _flow_page(flow: BlockFlow, page: PageLines, running: set[str]) -> None:
    last_column = None
    for block in page_blocks(strip_running(page, running)):
        column = block.lines[0].column if block.lines else "table"
        column_start = last_column is None or (column != last_column and column != "full")
        flow.feed(block, column_start)
        last_column = column


def read_pdf(path: Path, data: bytes, digest: str) -> Document:
    """A PDF file as a Document; ReadingError for encrypted, damaged or image-only files."""
    import pdfplumber

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
    try:
        with pdfplumber.open(path) as pdf:
            for number, page in enumerate(pdf.pages, start=1):
                lines, page_images = extract_page(pdf, page, number)
                images += page_images
                page.close()
                count = number
                if lines.lines or lines.tables:
                    found_text = True
                else:
                    textless.append(number)
                if running is None:
                    buffered.append(lines)
                    if len(buffered) < RUNNING_SAMPLE:
                        continue
                    running = running_signatures(buffered)
                    for held in buffered:
                        _flow_page(flow, held, running)
                    buffered = []
                else:
                    _flow_page(flow, lines, running)
    except ReadingError:
        raise
    except Exception as error:  # pdfminer raises many kinds; all mean the file is unusable
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
            _flow_page(flow, held, running)
    flow.close()
    text = builder.text
    sentences = builder.maker.sentences
    warnings = []
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
