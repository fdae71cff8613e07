"""One page's glyphs into lines in reading order, with its tables set apart.

Tables: ruled regions (two or more horizontal rules of the same extent), runs of rows cut into
several short cells in one column (unruled tables), and text drawn turned on the page (rotated
tables) become table regions, read row by row and never as body text. A turned run of one or
two lines (a download stamp up the margin) is dropped. Common practice for journal PDFs, our
own thresholds, no source.
"""

from __future__ import annotations

import itertools
import re
from collections import Counter
from dataclasses import dataclass, field

from robtui.reading.assemble import is_caption
from robtui.reading.layout.columns import (
    Gutter,
    Segment,
    TextRow,
    body_size,
    find_gutters,
    geo_blocks,
    reading_order,
    segments,
    text_rows,
)
from robtui.reading.layout.figures import figure_regions
from robtui.reading.layout.glyphs import PageGlyphs, _turn
from robtui.reading.layout.lines import Line, Word, make_line, rows_of

Box = tuple[float, float, float, float]
MARGIN_SHARE = 0.085  # top/bottom share of the page where running heads live
TABLE_RUN = 3  # rows of short cells in a row that make an unruled table
SIDE_SHARE = 0.3  # a side column is narrower than this share of the page
CELL_EM = 1.0  # a gap this wide (share of the body size) separates table cells
HEAD_WORDS = 8  # two lines this long between a caption and its rules are a paragraph
PROSE_ROWS = 3  # lines of prose between two rules that part them into two tables
HEAD_REACH = 12  # a table's caption stands at most this many lines above its first rule
CAPTION_RUN = 0.8  # a caption's next line starts within this many body sizes below it
CAPTION_GAP = 2.5  # a captioned table's rows follow one another within this many lines
CAPTION_CELL_ROWS = 3  # rows of two cells or more under a table's caption make a table
NOTE_GAP = 1.2  # a table's note line follows the one before within this many lines
_NOTE_MARK = re.compile(r"^(?:[a-z]|[*†‡§¶]+)\s+\S")
_PLAIN_NOTE_MARK = re.compile(r"^(?:[a-z]|[*†‡§¶]+)\s+[A-Z]")
_NOTE_LEAD = re.compile(r"^(?:notes?|abbreviations?|source|key)\b\s*[:.]", re.IGNORECASE)
NOTE_SMALLER = 0.5  # a note with a mark is set this many points smaller than the page's body
PLAIN_NOTE_SMALLER = 1.0  # and one without a mark this many
_TABLE_CAPTION = re.compile(r"^(?=(?-i:[A-Z]))(?:supplementary\s+)?table\s*[A-Z]?\d+", re.IGNORECASE)


@dataclass
class PageLines:
    number: int
    width: float
    height: float
    lines: list[Line]  # in reading order; line.column names the column cell it was read in
    tables: list[tuple[Box, list[Line]]]
    warnings: list[str] = field(default_factory=list)
    body_size: float = 10.0
    figures: list[tuple[Box, list[list[Line]]]] = field(default_factory=list)  # rows of text


def analyse_page(page: PageGlyphs) -> PageLines:
    """Lines in reading order and table regions of one page; a page that defeats the analysis
    is read in plain order (top to bottom, left to right) with a warning naming it."""
    rows = text_rows(rows_of(page.glyphs))
    try:
        return _analysed(page, rows)
    except (ValueError, IndexError, ZeroDivisionError, RecursionError) as error:
        lines = [make_line(row.words) for row in rows]
        warning = (
            f"page {page.number}: its layout could not be analysed ({type(error).__name__}); "
            "read in plain order, so columns may be interleaved there"
        )
        return PageLines(page.number, page.width, page.height, lines, [], [warning])


def _analysed(page: PageGlyphs, rows: list[TextRow]) -> PageLines:
    size = body_size(rows)
    gutters = find_gutters(rows, size)
    segs = segments(rows, gutters, page.width, size)
    columns = column_gutters(gutters, segs)
    regions = _ruled_regions(page.rules, page.height, segs, size)
    regions += _unruled_regions(segs, rows, columns, size)
    regions += _captioned_regions(segs, size, page.height)
    tables: list[tuple[Box, list[Line]]] = []
    for region in _merged(regions):
        inside = [s for s in segs if _inside(s.line, region)]
        if inside and (_table_like(inside, size) or _captioned_cells(segs, inside, region, size)):
            head = _table_head(segs, region, size)
            notes = _table_notes(segs, region, size)
            tables.append((region, [s.line for s in head + inside + notes]))
            taken = {id(s) for s in head + inside + notes}
            segs = [s for s in segs if id(s) not in taken]
    tables.extend(_turned_tables(page))
    figures: list[tuple[Box, list[list[Line]]]] = []
    kept = _kept_out_of_figures(segs, size, page.height)
    for region, groups in figure_regions(page.shapes, segs, size, page.width, page.height,
                                         keep=lambda seg: id(seg) in kept):
        figures.append((region, [[s.line for s in group] for group in groups]))
        taken = {id(s) for group in groups for s in group}
        segs = [s for s in segs if id(s) not in taken]
    blocks = geo_blocks(segs, size)
    ordered = reading_order(blocks, size)
    warnings = []
    if ordered is None:
        warnings.append(
            f"page {page.number}: too many text blocks to find its columns; read top to bottom"
        )
        lines = sorted((s.line for s in segs), key=lambda ln: (round(ln.top), ln.x0))
        for line in lines:
            line.column = "full"
        return PageLines(page.number, page.width, page.height, lines, tables, warnings, size,
                         figures)
    prose = [s.line for s in segs if len(s.line.words) >= 5 and abs(s.line.size - size) <= 0.5]
    text_area = (min(ln.x0 for ln in prose), max(ln.x1 for ln in prose)) if prose else None
    lines: list[Line] = []
    for block in ordered:
        left, right = block.cell
        label = "full" if left <= 0.0 and right >= page.width else f"{left:.0f}-{right:.0f}"
        if _side_note(block, page.width, size, text_area):
            label = "aside"
        for seg in block.segments:
            seg.line.column = label
            lines.append(seg.line)
    return PageLines(page.number, page.width, page.height, lines, tables, warnings, size,
                     figures)


def _kept_out_of_figures(segs: list[Segment], size: float, height: float) -> set[int]:
    """Ids of the lines never read as a figure's text: captions with the lines that run on
    below them (each within CAPTION_RUN line heights, starting at most a line's height right
    of the caption's left edge) and the page's margins (running heads, publishers' bands)."""
    kept: set[int] = set()
    captions: list[Line] = []
    for seg in sorted(segs, key=lambda s: s.line.top):
        line = seg.line
        if line.bottom < height * MARGIN_SHARE or line.top > height * (1 - MARGIN_SHARE):
            kept.add(id(seg))
        if is_caption(line.text) or any(
            0 <= line.top - cap.bottom <= CAPTION_RUN * size
            and cap.x0 - size <= line.x0 <= cap.x0 + size and line.x0 < cap.x1
            for cap in captions
        ):
            kept.add(id(seg))
            captions.append(line)
    return kept


def _side_note(block, width: float, size: float, text_area: tuple[float, float] | None) -> bool:
    """A block of small print in a narrow column at the page's edge (a side column), or
    beside the page's prose (outside the span its body-size lines cover)."""
    sizes = sorted(seg.line.size for seg in block.segments)
    if sizes[len(sizes) // 2] >= size - 1.0:
        return False
    if text_area is not None and (block.x0 >= text_area[1] - 1 or block.x1 <= text_area[0] + 1):
        return True
    left, right = block.cell
    return right - left <= SIDE_SHARE * width and (left <= 0.0 or right >= width)


# -- tables ------------------------------------------------------------------------------------


def _table_like(inside: list[Segment], size: float) -> bool:
    """Text between rules is a table when its rows are cut into cells, not prose in a box; a
    box of short lines is one when some of its rows hold several cells, or mostly figures: one
    line of words to a row (a registration box, a cover page's links) is boxed text."""
    by_row: dict[int, list[Word]] = {}
    for seg in inside:
        by_row.setdefault(seg.row, []).extend(seg.line.words)
    rows = [sorted(words, key=lambda w: w.box[0]) for words in by_row.values()]
    tabular = sum(_tabular(words, size) for words in rows)
    if tabular >= 0.3 * len(rows):
        return True
    words = [w for seg in inside for w in seg.line.words]
    if len(words) / len(inside) >= 5:
        return False
    cells = _rows_in_cells(inside)
    numeric = sum(bool(NUMERIC.match(w.text)) for w in words)
    return cells >= 0.3 * len(rows) or numeric >= 0.5 * len(words)


def _caption_over(segs: list[Segment], region: Box, size: float) -> Line | None:
    """The nearest "Table N" caption standing over the region within HEAD_REACH lines."""
    x0, top, x1, _ = region
    captions = [
        s.line for s in segs
        if _TABLE_CAPTION.match(s.line.text) and s.line.bottom <= top + 1
        and top - s.line.bottom <= HEAD_REACH * size and s.line.x0 < x1 and s.line.x1 > x0
    ]
    return max(captions, key=lambda ln: ln.bottom) if captions else None


def _captioned_cells(segs: list[Segment], inside: list[Segment], region: Box,
                     size: float) -> bool:
    """Rules under a "Table N" caption holding rows parted into cells (a term beside its
    description in CAPTION_CELL_ROWS rows or more, the rows of a table of words) are a table,
    however much prose its cells hold; boxed text has no caption and one piece to a row."""
    if _caption_over(segs, region, size) is None:
        return False
    return _rows_in_cells(inside) >= CAPTION_CELL_ROWS


def _pieces_by_row(segs: list[Segment]) -> Counter[int]:
    """How many pieces (cells) each row of text is cut into."""
    return Counter(s.row for s in segs)


def _rows_in_cells(segs: list[Segment]) -> int:
    """The rows cut into two pieces or more."""
    return sum(n > 1 for n in _pieces_by_row(segs).values())


def _table_head(segs: list[Segment], region: Box, size: float) -> list[Segment]:
    """The column heads of a table set between its caption ("Table 2 ...") and its first rule:
    what lies there within the table's width, when a caption stands above within HEAD_REACH
    lines and no two lines there hold HEAD_WORDS words or more (a paragraph)."""
    x0, top, x1, _ = region
    caption = _caption_over(segs, region, size)
    if caption is None:
        return []
    within = [s for s in segs if x0 - size <= (s.line.x0 + s.line.x1) / 2 <= x1 + size]
    between = [s for s in within if s.line.top >= caption.bottom - 1 and s.line.bottom <= top + 1
               and s.line is not caption]
    pieces = _pieces_by_row(within)  # pieces of each row within the table's width
    caption_lines = {id(s.line) for s in segs if s.line.top < caption.bottom + size
                     and s.line.top >= caption.top and s.line.x0 >= caption.x0 - 1
                     and abs(s.line.size - caption.size) <= 0.3
                     and pieces.get(s.row, 1) == 1}  # a row parted into cells is column heads
    between = [s for s in between if id(s.line) not in caption_lines]
    if sum(len(s.line.words) >= HEAD_WORDS for s in between) >= 2:
        return []  # a paragraph between a caption and the rules: not a head
    return between


def _table_notes(segs: list[Segment], region: Box, size: float) -> list[Segment]:
    """The notes under a table: lines that follow its last row, each within NOTE_GAP lines of
    the one before, starting within the table's width (a note may run wider than the table).
    The first opens with a note's lead ("Notes:", "Abbreviations:"), a note mark before a
    capital ("a Values", "* P"), or, in print smaller than the page's body, any note mark
    ("a ", "*", "†"), or none in print smaller still; the others are words (no chart's
    figures), no caption, set no larger than the first and starting under it."""
    x0, _, x1, bottom = region
    below = sorted((s for s in segs if s.line.top >= bottom - 1 and x0 - size <= s.line.x0 <= x1),
                   key=lambda s: s.line.top)
    notes: list[Segment] = []
    last = bottom
    for seg in below:
        line = seg.line
        if line.top - last > NOTE_GAP * size:
            break
        if notes:
            first = notes[0].line
            if (line.size > first.size + 0.3 or is_caption(line.text)
                    or abs(line.x0 - first.x0) > 2 * size
                    or not any(sum(ch.isalpha() for ch in w.text) >= 2 for w in line.words)):
                break  # the text resumes in a larger type, or a caption or a chart follows
        elif line.size > size + 0.3 or is_caption(line.text) or not (
            _NOTE_LEAD.match(line.text) or _PLAIN_NOTE_MARK.match(line.text)
            or (line.size < size - NOTE_SMALLER and _NOTE_MARK.match(line.text))
            or line.size < size - PLAIN_NOTE_SMALLER
        ):
            break  # in the body's size only an unmistakable note ("a Values", "Notes:")
        notes.append(seg)
        last = max(last, line.bottom)
    return notes


def _ruled_regions(
    rules: list[tuple[float, float, float]], height: float, segs: list[Segment], size: float
) -> list[Box]:
    """Regions between two or more rules of the same extent, outside the page margins; a
    table's caption or paragraphs of body text between two rules part them (the last rule of
    one table and the first of the next)."""
    groups: dict[tuple[int, int], list[float]] = {}
    for x0, x1, top in rules:
        if top < height * MARGIN_SHARE or top > height * (1 - MARGIN_SHARE):
            continue
        groups.setdefault((round(x0 / 4), round(x1 / 4)), []).append(top)
    regions = []
    for (gx0, gx1), tops in groups.items():
        tops.sort()
        chain = [tops[0]]
        for top in tops[1:] + [float("inf")]:
            if top - chain[-1] <= 260 and not _parts_rules(
                segs, (gx0 * 4.0, chain[-1], gx1 * 4.0, top), size
            ):
                chain.append(top)
                continue
            if len(chain) >= 2 and chain[-1] - chain[0] > 4:
                regions.append((gx0 * 4.0 - 2, chain[0] - 1, gx1 * 4.0 + 2, chain[-1] + 1))
            chain = [top]
    return regions


def _parts_rules(segs: list[Segment], between: Box, size: float) -> bool:
    """Whether the text between two rules is a table's caption or PROSE_ROWS lines of prose
    (HEAD_WORDS words or more in the body's size), so the rules belong to two tables."""
    x0, top, x1, bottom = between
    prose = 0
    for seg in segs:
        line = seg.line
        if not (top < (line.top + line.bottom) / 2 < bottom and line.x0 < x1 and line.x1 > x0):
            continue
        if _TABLE_CAPTION.match(line.text):
            return True
        if len(line.words) >= HEAD_WORDS and abs(line.size - size) <= 0.5:
            prose += 1
    return prose >= PROSE_ROWS


NUMERIC = re.compile(r"^[(\[<>≤≥±+−–-]*[\d.,·]+[%)\]*†‡,;]*$")


def _tabular(words: list[Word], size: float, justified: bool = False) -> bool:
    """A row piece that reads as table cells: two or more wide gaps, with short cells or
    figures; or three or more tokens that are mostly numbers spread wide apart. Words of a
    line set ``justified`` (columns.Segment.justified: alike wide spaces) are cells only by
    their figures."""
    if len(words) < 3:
        return False
    gaps = [b.box[0] - a.box[2] for a, b in itertools.pairwise(words)]
    wide = sum(gap >= CELL_EM * size for gap in gaps)
    numeric = sum(bool(NUMERIC.match(w.text)) for w in words) / len(words)
    if (wide >= 2 and numeric >= 0.3) or (wide >= 1 and numeric >= 0.5):
        return True
    if justified:
        return False
    cells, longest = 1, 0
    run = 1
    for gap in gaps:
        if gap >= CELL_EM * size:
            cells, longest, run = cells + 1, max(longest, run), 1
        else:
            run += 1
    longest = max(longest, run)
    return cells >= 3 and longest <= 6


def column_gutters(gutters: list[Gutter], segs: list[Segment]) -> list[Gutter]:
    """The gutters between columns of prose (not those between the cells of a table): the
    pieces either side of them hold five words or more in most rows they pass."""
    by_row: dict[int, list[Segment]] = {}
    for seg in segs:
        by_row.setdefault(seg.row, []).append(seg)
    out = []
    for g in gutters:
        long = short = 0
        for row_segs in by_row.values():
            left = [s for s in row_segs if abs(s.cell[1] - g.x0) < 1 and s.line.top >= g.top - 1]
            right = [s for s in row_segs if abs(s.cell[0] - g.x1) < 1 and s.line.top >= g.top - 1]
            for side in (left, right):
                for s in side:
                    if s.line.bottom > g.bottom + 1:
                        continue
                    if len(s.line.words) >= 5:
                        long += 1
                    else:
                        short += 1
        if long > short:
            out.append(g)
    return out


def _unruled_regions(
    segs: list[Segment], rows: list[TextRow], columns: list[Gutter], size: float
) -> list[Box]:
    by_row: dict[tuple[int, tuple[int, int]], list[Segment]] = {}
    for s in segs:
        cuts = [g for g in columns if g.top - 1 <= s.line.top and s.line.bottom <= g.bottom + 1]
        left = max((g.x1 for g in cuts if g.x1 <= s.line.x0 + 0.5), default=0.0)
        right = min((g.x0 for g in cuts if g.x0 >= s.line.x1 - 0.5), default=-1.0)
        by_row.setdefault((s.row, (round(left), round(right))), []).append(s)
    runs: dict[tuple[int, int], list[list[Line]]] = {}
    for (row, cell), pieces in sorted(by_row.items()):
        cells = [s.line for s in pieces]
        words = sorted((w for c in cells for w in c.words), key=lambda w: w.box[0])
        if not _tabular(words, size, justified=all(s.justified for s in pieces)):
            continue
        chains = runs.setdefault(cell, [])
        if chains and rows[row].top - max(ln.bottom for ln in chains[-1]) <= 2.5 * size:
            chains[-1].extend(cells)
        else:
            chains.append(list(cells))
    regions = []
    for chains in runs.values():
        for chain in chains:
            if len({round(ln.bottom) for ln in chain}) >= TABLE_RUN:
                regions.append(
                    (
                        min(ln.x0 for ln in chain) - 1,
                        min(ln.top for ln in chain) - 1,
                        max(ln.x1 for ln in chain) + 1,
                        max(ln.bottom for ln in chain) + 1,
                    )
                )
    return regions


def _captioned_regions(segs: list[Segment], size: float, height: float) -> list[Box]:
    """Unruled tables found from their caption: a "Table N" caption (and the lines in its size
    that run on below it) over TABLE_RUN or more rows in print smaller than the page's body,
    starting no further left than the caption, down to a line in the body's size under the
    caption, another caption, the page's foot or a gap of CAPTION_GAP lines. Rows
    are judged whole, across the strips of white a table's empty columns leave (which the
    row-by-column search takes for gutters): one at least must read as cells."""
    ordered = sorted(segs, key=lambda s: (s.line.top, s.line.x0))
    regions: list[Box] = []
    for seg in ordered:
        cap = seg.line
        if not _TABLE_CAPTION.match(cap.text):
            continue
        last_cap, last = cap, cap.bottom
        lines: list[Line] = []
        rows: dict[int, list[Word]] = {}
        for other in ordered:
            line = other.line
            if other is seg or line.top < cap.bottom - 1:
                continue
            if (not lines and 0 <= line.top - last_cap.bottom <= CAPTION_RUN * size
                    and abs(line.x0 - cap.x0) <= size and abs(line.size - cap.size) <= 0.3):
                last_cap = line  # the caption runs on
                last = line.bottom
                continue
            if line.top - last > CAPTION_GAP * size or is_caption(line.text):
                break  # a gap, or the next table's or figure's caption
            if line.top > height * (1 - MARGIN_SHARE):
                break  # the page's foot
            if line.size >= size - NOTE_SMALLER:
                if line.x0 < cap.x1 and line.x1 > cap.x0:
                    break  # the text resumes under the caption
                continue  # prose beside the table
            if line.x0 < cap.x0 - size:
                continue  # a table starts at its caption's left edge: this is beside it
            lines.append(line)
            rows.setdefault(other.row, []).extend(line.words)
            last = max(last, line.bottom)
        if len(rows) >= TABLE_RUN and any(
            _tabular(sorted(words, key=lambda w: w.box[0]), size) for words in rows.values()
        ):
            regions.append((min(ln.x0 for ln in lines) - 1, min(ln.top for ln in lines) - 1,
                            max(ln.x1 for ln in lines) + 1, max(ln.bottom for ln in lines) + 1))
    return regions


def _turned_tables(page: PageGlyphs) -> list[tuple[Box, list[Line]]]:
    """Text drawn at another angle than the page's: three or more rows are a table."""
    by_angle: dict[int, list] = {}
    for g in page.turned:
        by_angle.setdefault(g.angle, []).append(g)
    tables = []
    for angle, glyphs in by_angle.items():
        if angle == -1 or len(glyphs) < 20:
            continue
        turned = [_turn(g, angle, page.width, page.height) for g in glyphs]
        rows = text_rows(rows_of(turned))
        if len(rows) < 3:
            continue  # a stamp or a label up the margin
        segs = segments(rows, [], float("inf"), body_size(rows))
        lines = [s.line for s in segs]
        box = (
            min(g.x0 for g in glyphs),
            min(g.top for g in glyphs),
            max(g.x1 for g in glyphs),
            max(g.bottom for g in glyphs),
        )
        tables.append((box, lines))
    return tables


def _merged(regions: list[Box]) -> list[Box]:
    """Overlapping regions joined."""
    out: list[Box] = []
    for r in sorted(regions, key=lambda b: b[1]):
        for i, o in enumerate(out):
            if r[0] < o[2] and r[2] > o[0] and r[1] < o[3] and r[3] > o[1]:
                out[i] = (min(r[0], o[0]), min(r[1], o[1]), max(r[2], o[2]), max(r[3], o[3]))
                break
        else:
            out.append(r)
    return out


def _inside(line: Line, region: Box) -> bool:
    cx, cy = (line.x0 + line.x1) / 2, (line.top + line.bottom) / 2
    return region[0] <= cx <= region[2] and region[1] <= cy <= region[3]
