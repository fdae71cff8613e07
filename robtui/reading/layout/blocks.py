"""A page's lines (already in reading order) into blocks, without running heads.

Rules (common practice for journal PDFs, no source): lines at the top or bottom of pages that
repeat on many pages (digits ignored), bare page numbers and small print above the text are
running heads. Blocks break at a change of column, wider line gaps and font changes; blocks
opening with "Table n" / "Figure n" are captions; table regions are tables, after the text.
"""

from __future__ import annotations

import itertools
import re
import statistics
from collections import Counter
from dataclasses import dataclass, field

from robtui.reading.assemble import Box, is_caption, looks_like_heading
from robtui.reading.layout.lines import Line, make_line
from robtui.reading.layout.page import MARGIN_SHARE, PageLines

_PAGE_NUMBER = re.compile(r"^(?:page\s*)?#+(?:\s*(?:of|/)\s*#+)?$", re.IGNORECASE)


@dataclass
class PBlock:
    kind: str
    lines: list[Line]
    page: int
    rows: list[list[Line]] = field(default_factory=list)  # tables: cells per row

    @property
    def last_text(self) -> str:
        return self.lines[-1].text if self.lines else ""


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
    return PageLines(
        page.number, page.width, page.height, kept, page.tables, page.warnings, page.body_size
    )


# -- blocks ----------------------------------------------------------------------------------


def _leading(lines: list[Line]) -> float:
    gaps = [
        b.top - a.top
        for a, b in itertools.pairwise(lines)
        if a.column == b.column and 5 < b.top - a.top < 30 and abs(a.size - b.size) < 0.5
    ]
    return statistics.median(gaps) if gaps else 12.0


def page_blocks(page: PageLines) -> list[PBlock]:
    """Blocks of one page in reading order."""
    plain = page.lines
    leading = _leading(plain)
    blocks: list[PBlock] = []
    current: PBlock | None = None
    prev: Line | None = None
    for line in plain:
        new = (
            current is None
            or prev is None
            or line.column != prev.column
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
    for _region, rows in page.tables:
        blocks.append(PBlock("table", [], page.number, rows=_table_rows(rows)))
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
    return [make_line(cell) for cell in cells]
