"""Figures drawn in vector graphics (flowcharts, charts): their text is a figure block.

A figure is found from the page's drawn shapes (PDFium path objects: boxes, arrows, axes,
bars). Shapes that touch or lie within REACH points of each other form a group; a group of at
least MIN_SHAPES shapes with text inside it is a figure unless that text reads as prose (lines of
HEAD_WORDS words or more in the body's size spanning most of the group: a boxed panel, a shaded
abstract), or a frame's text set in one column with at most one drawn box holding it (a
registration box). Lines in the figure are kept out of the body and read as one row per drawn box
(a flowchart's box) or per line. Headings set larger than the body and captions stay where
they are. Common practice for journal PDFs, our own thresholds, no source.
"""

from __future__ import annotations

from robtui.reading.layout.columns import Segment
from robtui.reading.layout.glyphs import MAX_SHAPES

Box = tuple[float, float, float, float]

REACH = 6.0  # shapes this near (points) belong to one drawing
MIN_SHAPES = 3
PROSE_WORDS = 6
PROSE_SHARE = 0.3  # this share of a group's lines read as prose: a boxed panel, not a figure
SPAN_SHARE = 0.6  # a prose line spans at least this share of its group's width
ONE_COLUMN_SHARE = 0.8
FOLLOW = 1.6  # a loose line within this many line heights below another continues its row


def _groups(shapes: list[Box]) -> list[list[int]]:
    """Shapes that touch or lie about REACH apart joined: each shape, grown by half of REACH,
    marks the grid cells (REACH square) it covers, and shapes marking one cell are joined
    (union-find; linear in the cells covered, so thousands of chart marks stay cheap)."""
    parent = list(range(len(shapes)))

    def find(i: int) -> int:
        while parent[i] != i:
            parent[i] = parent[parent[i]]
            i = parent[i]
        return i

    first: dict[tuple[int, int], int] = {}
    half = REACH / 2
    for i, (x0, top, x1, bottom) in enumerate(shapes):
        for cx in range(int((x0 - half) // REACH), int((x1 + half) // REACH) + 1):
            for cy in range(int((top - half) // REACH), int((bottom + half) // REACH) + 1):
                j = first.setdefault((cx, cy), i)
                if j != i:
                    ri, rj = find(i), find(j)
                    if ri != rj:
                        parent[ri] = rj
    out: dict[int, list[int]] = {}
    for i in range(len(shapes)):
        out.setdefault(find(i), []).append(i)
    return list(out.values())


def _inside(seg: Segment, box: Box) -> bool:
    line = seg.line
    cx, cy = (line.x0 + line.x1) / 2, (line.top + line.bottom) / 2
    return box[0] <= cx <= box[2] and box[1] <= cy <= box[3]


def figure_regions(
    shapes: list[Box], segs: list[Segment], size: float, width: float, height: float,
    keep=lambda seg: False,
) -> list[tuple[Box, list[list[Segment]]]]:
    """Figures of a page: each region with its text as rows (lines in one drawn box are one
    row). ``keep(seg)`` names lines that stay in the text wherever they are (captions)."""
    if len(shapes) > MAX_SHAPES:
        return []
    drawn = [s for s in shapes
             if not (s[2] - s[0] > 0.9 * width and s[3] - s[1] > 0.5 * height)]
    figures = []
    for group in _groups(drawn):
        if len(group) < MIN_SHAPES:
            continue
        boxes = [drawn[i] for i in group]
        region = (min(b[0] for b in boxes), min(b[1] for b in boxes),
                  max(b[2] for b in boxes), max(b[3] for b in boxes))
        inside = [s for s in segs if _inside(s, region) and not keep(s)
                  and s.line.size <= size + 0.5]
        if not inside:
            continue
        span = region[2] - region[0]
        prose = sum(len(s.line.words) >= PROSE_WORDS and abs(s.line.size - size) <= 0.5
                    and s.line.x1 - s.line.x0 >= SPAN_SHARE * span for s in inside)
        if prose >= 2 and prose >= PROSE_SHARE * len(inside):
            continue  # a boxed panel of prose
        if _held_boxes(inside, boxes, region) < 2 and _one_column(inside, size):
            continue  # text set in one column inside a frame: boxed text, not a drawing
        figures.append((region, _rows(inside, boxes, region)))
    return figures


def _small_boxes(boxes: list[Box], region: Box) -> list[Box]:
    """The drawn boxes of a group that may hold a flowchart's text: not the whole drawing's
    frame or background, not a line or an arrow head; smallest first."""
    area = (region[2] - region[0]) * (region[3] - region[1])
    return sorted((b for b in boxes if (b[2] - b[0]) * (b[3] - b[1]) < 0.5 * area
                   and b[2] - b[0] > 8 and b[3] - b[1] > 8),
                  key=lambda b: (b[2] - b[0]) * (b[3] - b[1]))


def _held_boxes(inside: list[Segment], boxes: list[Box], region: Box) -> int:
    """How many of the drawing's small boxes hold some of its text."""
    return sum(any(_inside(seg, b) for seg in inside) for b in _small_boxes(boxes, region))


def _one_column(inside: list[Segment], size: float) -> bool:
    """Whether nearly all lines (ONE_COLUMN_SHARE) start at one left edge (within a body
    size): a frame's text, where a flowchart's or a chart's labels start all over."""
    edges = sorted(seg.line.x0 for seg in inside)
    middle = edges[len(edges) // 2]
    return sum(abs(x - middle) <= size for x in edges) >= ONE_COLUMN_SHARE * len(edges)


def _rows(inside: list[Segment], boxes: list[Box], region: Box) -> list[list[Segment]]:
    """The figure's lines grouped by the smallest drawn box holding each (a flowchart's box);
    lines in no such box run together while each follows the one before closely (within
    FOLLOW line heights, overlapping it across). Rows in reading order, top to bottom."""
    small = _small_boxes(boxes, region)
    rows: dict[object, list[Segment]] = {}
    loose: list[list[Segment]] = []
    for seg in sorted(inside, key=lambda s: (round(s.line.top), s.line.x0)):
        holder = next((b for b in small if _inside(seg, b)), None)
        if holder is not None:
            rows.setdefault(holder, []).append(seg)
            continue
        line = seg.line
        for run in loose:
            last = run[-1].line
            if (0 <= line.top - last.top <= FOLLOW * max(last.size, 1.0)
                    and line.x0 < last.x1 and last.x0 < line.x1):
                run.append(seg)
                break
        else:
            loose.append([seg])
    out = list(rows.values()) + loose
    return sorted(out, key=lambda row: (round(row[0].line.top), row[0].line.x0))
