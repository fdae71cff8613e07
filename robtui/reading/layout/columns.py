"""Columns from the page's own whitespace, lines split at gutters, blocks in reading order.

Gutters: a vertical strip of white at least GUTTER_EM of the body size wide that runs down
through consecutive rows, with text on both sides of it in at least GUTTER_ROWS of them (so
rivers between justified words, which wander, are not mistaken for one). A row crossing the
strip ends it; full-width blocks above and between column runs therefore cut the page into
bands. Rows are split at the gutters that run past them and at gaps wider than SPLIT_EM.

Reading order follows Breuel's rules for line segments, applied to blocks (T. M. Breuel,
"High performance document layout analysis", Symposium on Document Image Understanding
Technology, 2003): a block comes before another that lies below it and overlaps it
horizontally, and before one entirely to its right unless a third block lying vertically
between them spans both. Blocks are ordered by a topological sort, top-left first on ties.
The shares are our own settings (common practice, no source).
"""

from __future__ import annotations

import heapq
import itertools
import re
import statistics
from collections import Counter
from dataclasses import dataclass, field

from robtui.reading.layout.lines import Line, Row, Word, make_line, words_of

GUTTER_EM = 0.75
GUTTER_ROWS = 4
RIGHT_REACH_EM = 2.0  # a word this near (share of the body size) the strip's right edge opens a column
SPLIT_EM = 2.2
MAX_BLOCKS = 220
JUSTIFIED_GAPS = 4
JUSTIFIED_SPREAD = 0.15
FLUSH = 0.15  # a stretched line's ends lie this near (share of the size) its neighbour's
PROSE_GAP_EM = 1.0  # words of prose stand closer than this (share of the size); cells further
# Bullets set before list items; U+FFFD: a glyph mapped to no character, at a line's start
# most often a bullet drawn from a symbol font.
_BULLETS = "[\u2022\u25aa\u25b8\u25ba\u25cf\u25a0\u27a2\ufffd]"
_BULLET = re.compile(_BULLETS)
_SIDE_WORD = re.compile(r"[^\W\d_]{4}")  # four letters in a row: a word, not a reference mark
_LIST_LABEL = re.compile(r"^(?:\(?\d{1,3}[.)]?|\[\d{1,3}\]|[a-z][.)]|[•·▪◦–-]|" + _BULLETS + ")$")


def is_list_label(text: str) -> bool:
    """Whether ``text`` (one word) is a list number or bullet set before an item."""
    return _LIST_LABEL.match(text) is not None


@dataclass
class Gutter:
    x0: float
    x1: float
    top: float
    bottom: float
    left_rows: int = 0  # rows with text just left of the strip
    right_rows: int = 0

    @property
    def rows(self) -> int:
        return min(self.left_rows, self.right_rows)


@dataclass
class TextRow:
    words: list[Word]
    top: float
    bottom: float
    size: float


def text_rows(rows: list[Row]) -> list[TextRow]:
    """Rows of words, top to bottom (rows whose glyphs were all blank are left out)."""
    out = []
    for row in rows:
        words = words_of(row)
        if words:
            out.append(
                TextRow(
                    words,
                    min(w.box[1] for w in words),
                    max(w.box[3] for w in words),
                    row.size,
                )
            )
    return out


def body_size(rows: list[TextRow]) -> float:
    """The most common font size, counted by words."""
    sizes = Counter(round(w.size, 1) for r in rows for w in r.words)
    return sizes.most_common(1)[0][0] if sizes else 10.0


def find_gutters(rows: list[TextRow], size: float) -> list[Gutter]:
    """Vertical strips of white between columns of text.

    Sweeping down the rows, a strip stays open while each row leaves it (partly) free and
    closes at a row that crosses it; it is a gutter when text lies beside it on the left in
    GUTTER_ROWS rows or more and on the right in as many (the two columns' baselines need not
    line up).
    """
    if not rows:
        return []
    least = max(3.0, GUTTER_EM * size)
    reach = RIGHT_REACH_EM * size
    left_edge = min(r.words[0].box[0] for r in rows)
    right_edge = max(r.words[-1].box[2] for r in rows)
    active: list[Gutter] = []
    found: list[Gutter] = []
    for row in rows:
        free = _free_space(row.words, left_edge, right_edge, least)
        kept: list[Gutter] = []
        for g in active:
            part = _widest_overlap(free, g.x0, g.x1)
            if part is not None and part[1] - part[0] >= least:
                g.x0, g.x1 = part
                g.bottom = max(g.bottom, row.bottom)
                _count_sides(g, row.words, reach)
                kept.append(g)
            elif g.rows >= GUTTER_ROWS:
                found.append(g)
        for x0, x1 in free:
            if not any(g.x0 < x1 and g.x1 > x0 for g in kept):
                g = Gutter(x0, x1, row.top, row.bottom)
                _count_sides(g, row.words, reach)
                kept.append(g)
        active = kept
    found.extend(g for g in active if g.rows >= GUTTER_ROWS)
    return found


def _free_space(
    words: list[Word], left: float, right: float, least: float
) -> list[tuple[float, float]]:
    """The row's white intervals at least ``least`` wide, between ``left`` and ``right``."""
    free = []
    x = left
    for w in words:
        if w.box[0] - x >= least:
            free.append((x, w.box[0]))
        x = max(x, w.box[2])
    if right - x >= least:
        free.append((x, right))
    return free


def _widest_overlap(
    free: list[tuple[float, float]], x0: float, x1: float
) -> tuple[float, float] | None:
    best = None
    for a, b in free:
        lo, hi = max(a, x0), min(b, x1)
        if hi > lo and (best is None or hi - lo > best[1] - best[0]):
            best = (lo, hi)
    return best


def _count_sides(g: Gutter, words: list[Word], reach: float) -> None:
    """Count the row on the left when text lies left of the strip, and on the right when a
    word opens within ``reach`` of its right edge (a column starts there; text far to the
    right belongs to another column, beside the short lines of this one)."""
    if any(w.box[2] <= g.x0 + 0.5 for w in words):
        g.left_rows += 1
    if any(g.x1 - 0.5 <= w.box[0] <= g.x1 + reach for w in words):
        g.right_rows += 1


# -- segments ----------------------------------------------------------------------------------


@dataclass
class Segment:
    line: Line
    cell: tuple[float, float]  # the gutters (or page edges) either side of the line
    row: int  # index of the row the segment was cut from
    justified: bool = False  # its wide gaps are a justified line's word spaces, not cells


def segments(rows: list[TextRow], gutters: list[Gutter], width: float, size: float) -> list[Segment]:
    """Rows cut at the gutters running past them, at very wide gaps and before a side note in
    smaller type a little apart (also one set higher than the line, unless it is a raised
    reference mark)."""
    out: list[Segment] = []
    for index, row in enumerate(rows):
        cuts = sorted(
            (g for g in gutters if g.top - 1 <= row.top and row.bottom <= g.bottom + 1),
            key=lambda g: g.x0,
        )
        at_gutter = [
            any(a.box[2] <= g.x0 + 0.5 and b.box[0] >= g.x1 - 0.5 for g in cuts)
            for a, b in itertools.pairwise(row.words)
        ]
        spacing = _cell_spacing(row.words, at_gutter, rows, index, size)
        piece = [row.words[0]]
        bulleted = False  # the piece opens with a bullet hung left of a gutter
        justified = False
        for k, word in enumerate(row.words[1:]):
            prev = piece[-1]
            gap = word.box[0] - prev.box[2]
            gutter = at_gutter[k]
            if (gutter and len(piece) == 1 and _LIST_LABEL.match(prev.text)
                    and abs(word.size - prev.size) <= 0.15 * size):
                gutter = False  # a hanging list number or bullet belongs to its item (in its type:
                # a chart's last tick "(10)" beside the column is no label of the column's line)
                bulleted = _BULLET.fullmatch(prev.text) is not None
            # a side note set beside the text in much smaller type, a little apart
            other_type = (
                gap > 0.5 * size
                and abs(word.size - prev.size) > 0.15 * size
                and (abs(word.box[3] - prev.box[3]) < 0.25 * size  # not a raised reference,
                     # though set higher, a word in smaller type is the side note's too
                     or word.size < prev.size and _SIDE_WORD.search(word.text) is not None)
            )
            wide = gap > SPLIT_EM * max(size, word.size) and not (
                spacing[k] and abs(gap - spacing[k]) <= JUSTIFIED_SPREAD * spacing[k])
            if gutter or other_type or wide:
                out.append(_segment(piece, cuts, width, index, bulleted, justified))
                piece, bulleted, justified = [word], False, False
            else:
                piece.append(word)
                justified = justified or spacing[k] is not None
        out.append(_segment(piece, cuts, width, index, bulleted, justified))
    return out


def _cell_spacing(words: list[Word], at_gutter: list[bool], rows: list[TextRow], index: int,
                  size: float) -> list[float | None]:
    """For each gap of the row (``rows[index]``), the justified word space of the stretch
    between gutters that holds it (None where the stretch is not set justified with alike
    spaces); a short line stretched flush with the lines above or below it counts too."""
    out: list[float | None] = []
    start = 0
    for end in [k for k, cut in enumerate(at_gutter) if cut] + [len(words) - 1]:
        stretch = words[start : end + 1]
        spacing = justified_spacing(stretch)
        if spacing is None:
            spacing = _flush_spacing(stretch, rows, index, size)
        out.extend([spacing] * (end - start))
        if end < len(at_gutter):
            out.append(None)  # the gutter itself
        start = end + 1
    return out


def justified_spacing(words: list[Word]) -> float | None:
    """The word space of a row set justified with wide spaces: at least JUSTIFIED_GAPS gaps
    alike (within JUSTIFIED_SPREAD of their median); None when its gaps differ, as a table
    row's do. A line stretched to its column's width keeps one space however wide."""
    gaps = [b.box[0] - a.box[2] for a, b in itertools.pairwise(words)]
    if len(gaps) < JUSTIFIED_GAPS:
        return None
    typical = statistics.median(gaps)
    if typical <= 0 or any(abs(g - typical) > JUSTIFIED_SPREAD * typical for g in gaps):
        return None
    return typical


def _flush_spacing(words: list[Word], rows: list[TextRow], index: int,
                   size: float) -> float | None:
    """The word space of a line of a few words (fewer than JUSTIFIED_GAPS gaps, alike)
    stretched to its column's width, as justified text without hyphenation sets a line of
    long words: both its ends line up, within FLUSH of the size, with the ends of a line of
    prose above or below it (JUSTIFIED_GAPS words or more, set closer than a cell's gap
    (PROSE_GAP_EM) apart). None otherwise: a table's cells do not stand under a line of prose."""
    gaps = [b.box[0] - a.box[2] for a, b in itertools.pairwise(words)]
    if not gaps or len(gaps) >= JUSTIFIED_GAPS or max(gaps) < PROSE_GAP_EM * size:
        return None  # no gap a cell's wide: nothing to tell apart
    typical = statistics.median(gaps)
    if typical <= 0 or any(abs(g - typical) > JUSTIFIED_SPREAD * typical for g in gaps):
        return None
    left, right, reach = words[0].box[0], words[-1].box[2], FLUSH * size
    for row in _lines_beside(rows, index, left - reach, right + reach):
        inside = [w for w in row if w.box[0] >= left - reach and w.box[2] <= right + reach]
        if (len(inside) > JUSTIFIED_GAPS and abs(inside[0].box[0] - left) <= reach
                and abs(inside[-1].box[2] - right) <= reach
                and all(b.box[0] - a.box[2] < PROSE_GAP_EM * size
                        for a, b in itertools.pairwise(inside))):
            return typical
    return None


def _lines_beside(rows: list[TextRow], index: int, left: float, right: float) -> list[list[Word]]:
    """The words between ``left`` and ``right`` of the nearest rows above and below
    ``rows[index]`` that hold any there, within two lines' height: the lines of the same
    column (another column's baselines may lie between them)."""
    out = []
    row = rows[index]
    for step in (-1, 1):
        i = index + step
        while 0 <= i < len(rows) and abs(rows[i].top - row.top) <= 2.5 * max(row.size, 1.0):
            inside = [w for w in rows[i].words if w.box[2] > left and w.box[0] < right]
            if inside:
                out.append(inside)
                break
            i += step
    return out


def _segment(words: list[Word], cuts: list[Gutter], width: float, row: int,
             bulleted: bool = False, justified: bool = False) -> Segment:
    line = make_line(words)
    if bulleted and len(words) > 1:
        line.item_x = words[1].box[0]
    left = max((g.x1 for g in cuts if g.x1 <= line.x0 + 0.5), default=0.0)
    right = min((g.x0 for g in cuts if g.x0 >= line.x1 - 0.5), default=width)
    return Segment(line, (left, right), row, justified)


# -- blocks and their order --------------------------------------------------------------------


@dataclass
class GeoBlock:
    """Lines stacked in one column cell, close enough to be read on from one to the next."""

    segments: list[Segment] = field(default_factory=list)
    x0: float = 0.0
    top: float = 0.0
    x1: float = 0.0
    bottom: float = 0.0

    def add(self, seg: Segment) -> None:
        line = seg.line
        if not self.segments:
            self.x0, self.top, self.x1, self.bottom = line.x0, line.top, line.x1, line.bottom
        else:
            self.x0, self.x1 = min(self.x0, line.x0), max(self.x1, line.x1)
            self.top, self.bottom = min(self.top, line.top), max(self.bottom, line.bottom)
        self.segments.append(seg)

    @property
    def cell(self) -> tuple[float, float]:
        return self.segments[0].cell


def geo_blocks(segs: list[Segment], size: float) -> list[GeoBlock]:
    """Segments stacked into blocks: same column cell, small vertical gap, within its width."""
    blocks: list[GeoBlock] = []
    open_blocks: list[GeoBlock] = []
    for seg in sorted(segs, key=lambda s: (s.line.top, s.line.x0)):
        line = seg.line
        home = None
        for block in reversed(open_blocks):
            last = block.segments[-1].line
            gap = line.top - last.bottom
            if gap > 1.2 * max(size, line.size) or gap < -0.5 * line.size:
                continue
            if not _same_cell(block.cell, seg.cell):
                continue
            if line.x0 < last.x1 and line.x1 > last.x0 and block.segments[-1].row != seg.row:
                home = block
                break
        if home is None:
            home = GeoBlock()
            blocks.append(home)
            open_blocks.append(home)
        home.add(seg)
        open_blocks = [b for b in open_blocks if line.top - b.bottom <= 3 * size]
    return blocks


def _same_cell(a: tuple[float, float], b: tuple[float, float]) -> bool:
    return abs(a[0] - b[0]) < 2 and abs(a[1] - b[1]) < 2


# A heading set apart this near (share of the body size) above a block leads into that block.
LEAD_IN_GAP_EM = 1.5
LEAD_IN_WORDS = 12


def _lead_ins(blocks: list[GeoBlock], size: float) -> dict[int, int]:
    """{heading block: the block it leads into}: a block of one or two short lines set apart
    (bold, or larger than the body), with a block starting just below it that spans it.
    A heading is read with the text it heads: alone, Breuel's rules put a heading that sits
    under a run of columns, above a full-width block, before the columns' right-hand run."""
    out: dict[int, int] = {}
    for i, a in enumerate(blocks):
        lines = [seg.line for seg in a.segments]
        if len(lines) > 2 or any(len(ln.words) > LEAD_IN_WORDS for ln in lines):
            continue
        if not all(ln.bold or ln.size >= size + 0.8 for ln in lines):
            continue
        below = [(b.top, j) for j, b in enumerate(blocks)
                 if j != i and b.top >= a.bottom - 1 and b.x0 <= a.x0 + 1 and b.x1 >= a.x1 - 1]
        if not below:
            continue
        top, j = min(below)
        crossing = any(k not in (i, j) and c.top < top and c.bottom > a.bottom
                       and c.x0 < a.x1 and c.x1 > a.x0 for k, c in enumerate(blocks))
        if top - a.bottom <= LEAD_IN_GAP_EM * size and not crossing:
            out[i] = j
    return out


def reading_order(blocks: list[GeoBlock], size: float = 0.0) -> list[GeoBlock] | None:
    """Blocks in reading order (Breuel 2003), or None when the page has too many to order.
    With the body ``size``, a heading is ordered as one with the block it leads into."""
    leads = _lead_ins(blocks, size) if size else {}
    if leads:
        heads: dict[int, list[int]] = {}  # the block led into: the headings above it, in order
        for i in sorted(leads, key=lambda i: blocks[i].top):
            j = leads[i]
            seen = {i}
            while j in leads and j not in seen:  # "Abstract" over "Background" over the text
                seen.add(j)
                j = leads[j]
            heads.setdefault(j, []).append(i)
        units: list[GeoBlock] = []
        members: dict[int, list[GeoBlock]] = {}
        for j, b in enumerate(blocks):
            if j in leads:
                continue
            unit = b
            if j in heads:
                group = [blocks[i] for i in heads[j]] + [b]
                unit = GeoBlock([seg for g in group for seg in g.segments],
                                min(g.x0 for g in group), min(g.top for g in group),
                                max(g.x1 for g in group), max(g.bottom for g in group))
                members[id(unit)] = group
            units.append(unit)
        ordered = reading_order(units)
        return None if ordered is None else [
            m for unit in ordered for m in members.get(id(unit), [unit])]
    n = len(blocks)
    if n > MAX_BLOCKS:
        return None
    after: list[list[int]] = [[] for _ in range(n)]
    indegree = [0] * n
    for i, a in enumerate(blocks):
        for j, b in enumerate(blocks):
            if i != j and _before(a, b, blocks):
                after[i].append(j)
                indegree[j] += 1
    ready = [(b.top, b.x0, i) for i, b in enumerate(blocks) if indegree[i] == 0]
    heapq.heapify(ready)
    order: list[int] = []
    done = [False] * n
    waiting = sorted(range(n), key=lambda i: (blocks[i].top, blocks[i].x0))
    while len(order) < n:
        if not ready:
            # a cycle (a small mark beside a title can close one): the highest block still
            # waiting goes next, and the order holds for the rest of the page
            i = next(i for i in waiting if not done[i])
            heapq.heappush(ready, (blocks[i].top, blocks[i].x0, i))
        _, _, i = heapq.heappop(ready)
        if done[i]:
            continue
        done[i] = True
        order.append(i)
        for j in after[i]:
            indegree[j] -= 1
            if indegree[j] == 0 and not done[j]:
                heapq.heappush(ready, (blocks[j].top, blocks[j].x0, j))
    return [blocks[i] for i in order]


def _before(a: GeoBlock, b: GeoBlock, blocks: list[GeoBlock]) -> bool:
    if a.x0 < b.x1 - 1 and b.x0 < a.x1 - 1:  # they overlap horizontally
        return a.top < b.top
    if a.x1 > b.x0 + 1:
        return False  # a is not left of b
    low, high = min(a.bottom, b.bottom), max(a.top, b.top)
    for c in blocks:
        if c is a or c is b:
            continue
        if c.top >= low - 1 and c.bottom <= high + 1 and c.x0 < a.x1 and c.x1 > b.x0:
            return False
    return True


def median_leading(lines: list[Line]) -> float:
    gaps = [b.top - a.top for a, b in itertools.pairwise(lines) if 5 < b.top - a.top < 30]
    return statistics.median(gaps) if gaps else 12.0
