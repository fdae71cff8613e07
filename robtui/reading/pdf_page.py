"""One PDF page into words and lines, with its ruled table regions.

Characters come from pdfminer (through pdfplumber's open document) as plain tuples; words are
characters on one baseline with no space between; lines are words on one baseline, split into
segments at wide gaps (column gutters, table cells). Ruled regions (two or more horizontal
rules of the same extent) are tables. Common practice for journal PDFs, no source.
"""

from __future__ import annotations

import statistics
from dataclasses import dataclass

from robtui.reading.assemble import Box
from robtui.reading.normalise import normalise_chars

MARGIN_SHARE = 0.085  # top/bottom share of the page where running heads live
SEGMENT_GAP = 11.0  # points between words that split a line into separate segments


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
    page: int = 0  # set when a paragraph collects lines from several pages

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
                lines.append(make_line(segment))
                segment = [word]
            else:
                segment.append(word)
        lines.append(make_line(segment))
    return lines


def make_line(words: list[Word]) -> Line:
    """A line from its words (their union box)."""
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
