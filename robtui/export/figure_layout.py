"""The two figures of a result's export as primitives (pure): traffic-light table and summary.

Our own design: rounded tiles in the robtui palette, each with its letter (L / S / H; a dot on
a dashed outline when not judged), the overall column set apart by a gap and a heavy frame;
the summary is one 100% bar per domain with hatching per judgement and "letter + percent"
labels, so both read in greyscale. Sizes are in points; every text passes through
text_metrics.one_line, and widths come from text_metrics.text_width.
"""

from __future__ import annotations

from robtui.core.model import OVERALL
from robtui.export.figure_primitives import Box, Dot, Figure, Hatch, Item, Label, Line
from robtui.export.palette import OUTLINE, SWATCHES
from robtui.export.tables import OutcomeExport, column_titles
from robtui.export.text_metrics import CAP_HALF, one_line, text_width

SHARE_CODES = ("low", "some_concerns", "high", "incomplete")
INK = "#1A1A1A"
MARGIN = 12.0

# the palette names its hatches in matplotlib's notation; these are our drawings of them
_HATCHES = {
    "//": lambda colour: Hatch("diagonal", colour, spacing=6.0, weight=1.0),
    "..": lambda colour: Hatch("dots", colour, spacing=4.0, weight=0.7),
}
_HATCH_COLOUR = {"high": "#CFC4D8"}  # light lines on the dark fill; dark elsewhere


# Room left for text: viewers of the SVG without Helvetica or Arial substitute a wider face
# (DejaVu Sans runs 13-20% wider than Helvetica's widths, measured with Pillow on our labels).
SLACK = 1.2


def room(text: str, size: float, bold: bool = False) -> float:
    """The width kept free for a label: its Helvetica width with slack for wider fonts."""
    return text_width(text, size, bold) * SLACK


def hatch_of(code: str) -> Hatch | None:
    """The hatch drawn over a judgement's fill in bars and legends (None: plain fill)."""
    make = _HATCHES.get(SWATCHES[code].hatch)
    return make(_HATCH_COLOUR.get(code, INK)) if make else None


def _centred(x: float, yc: float, text: str, size: float, **style) -> Label:
    return Label(x, yc + CAP_HALF * size, text, size, anchor="middle", **style)


# -- traffic-light table -----------------------------------------------------------------------
ROW = 21.0  # row pitch
COL = 50.0  # column pitch
TILE_W, TILE_H, TILE_R = 38.0, 16.0, 3.0
OVERALL_GAP = 14.0
LABEL_SIZE, SOURCE_SIZE, HEAD_SIZE, TITLE_SIZE, LETTER_SIZE = 7.0, 6.0, 8.0, 10.0, 8.0


def _tile(cx: float, cy: float, code: str, w: float, h: float, letter_size: float) -> list[Item]:
    sw = SWATCHES[code]
    x, y = cx - w / 2, cy - h / 2
    if code == "incomplete":
        return [
            Box(x, y, w, h, fill=sw.fill, stroke=OUTLINE, stroke_width=0.8, radius=TILE_R,
                dash=(3.0, 2.0)),
            Dot(cx, cy, letter_size / 4, sw.ink),
        ]  # fmt: skip
    return [
        Box(x, y, w, h, fill=sw.fill, radius=TILE_R),
        _centred(cx, cy, sw.letter, letter_size, colour=sw.ink, bold=True),
    ]


def _legend(x: float, cy: float) -> tuple[list[Item], float]:
    """A small tile and the words for every judgement, from ``x``; returns items and width."""
    items: list[Item] = []
    for code, sw in SWATCHES.items():
        items += _tile(x + 8, cy, code, 16.0, 11.0, 6.5)
        items.append(Label(x + 20, cy + CAP_HALF * 7, sw.label, 7.0, colour=INK))
        x += 20 + room(sw.label, 7.0) + 10
    return items, x - 10


def lights_figure(ex: OutcomeExport, qset) -> Figure:
    """The traffic-light table: studies down, domains and overall across, source at right."""
    titles = column_titles(qset, ex.effect)
    keys = [k for k, _ in ex.columns]
    labels = [one_line(row.study_label) for row in ex.rows]
    sources = [one_line(row.source) for row in ex.rows]
    label_w = max([room(t, LABEL_SIZE) for t in labels] + [40.0])
    title = one_line(f"Risk of bias: {ex.outcome}")

    items: list[Item] = [Label(MARGIN, MARGIN + 9, title, TITLE_SIZE, colour=INK, bold=True)]
    head_y = MARGIN + 32
    first_y = head_y + 22
    x_of, x = {}, MARGIN + label_w + 12 + COL / 2
    for key in keys:
        if key == OVERALL:
            x += OVERALL_GAP
        x_of[key] = x
        x += COL
        items.append(_centred(x_of[key], head_y, titles[key].split(" ")[0], HEAD_SIZE,
                              colour=INK, bold=True))  # fmt: skip
    source_x = x - COL / 2 + 10
    last_y = first_y + (len(ex.rows) - 1) * ROW
    for r, row in enumerate(ex.rows):
        cy = first_y + r * ROW
        items.append(Label(MARGIN + label_w, cy + CAP_HALF * LABEL_SIZE, labels[r], LABEL_SIZE,
                           colour=INK, anchor="end"))  # fmt: skip
        for key in keys:
            items += _tile(x_of[key], cy, row.judgements[key] or "incomplete", TILE_W, TILE_H,
                           LETTER_SIZE)  # fmt: skip
        items.append(Label(source_x, cy + CAP_HALF * SOURCE_SIZE, sources[r], SOURCE_SIZE,
                           colour="#333333"))  # fmt: skip
    if OVERALL in x_of and ex.rows:
        top, bottom = first_y - TILE_H / 2 - 4, last_y + TILE_H / 2 + 4
        items.append(
            Box(x_of[OVERALL] - TILE_W / 2 - 4, top, TILE_W + 8, bottom - top, stroke=INK,
                stroke_width=1.6, radius=6.0)
        )  # fmt: skip
    legend_y = (last_y if ex.rows else head_y) + ROW / 2 + 20
    legend, legend_right = _legend(MARGIN, legend_y)
    items += legend
    right = max(
        [source_x + room(s, SOURCE_SIZE) for s in sources]
        + [source_x, MARGIN + room(title, TITLE_SIZE, bold=True), legend_right]
    )
    return Figure(right + MARGIN, legend_y + 6 + MARGIN, title, tuple(items))


# -- summary plot ------------------------------------------------------------------------------
BAR_PITCH, BAR_H = 30.0, 19.0
PLOT_WIDTH = 576.0  # 8 inches unless the domain titles need more


def _bar_segments(ex: OutcomeExport, key: str, x0: float, plot_w: float, cy: float):
    items: list[Item] = []
    marks: list[Item] = []
    left = 0.0
    for code in SHARE_CODES:
        share = ex.shares[key][code] * 100
        if share <= 0:
            continue
        sw = SWATCHES[code]
        x, w = x0 + plot_w * left / 100, plot_w * share / 100
        edge = OUTLINE if code == "incomplete" else INK
        items.append(Box(x, cy - BAR_H / 2, w, BAR_H, fill=sw.fill, stroke=edge, stroke_width=0.6,
                         hatch=hatch_of(code)))  # fmt: skip
        if share >= 8:
            text = f"{sw.letter} {share:.0f}%"
            tw = room(text, 7.0)
            cx = x + w / 2
            # a backing in the fill colour keeps the label readable on the hatch
            marks.append(Box(cx - tw / 2 - 1.5, cy - 5.5, tw + 3, 11.0, fill=sw.fill, radius=2.0))
            marks.append(_centred(cx, cy, text, 7.0, colour=sw.ink))
        left += share
    return items + marks


def summary_figure(ex: OutcomeExport, qset) -> Figure:
    """One 100% bar per domain (and overall): share of studies, or of weight, per judgement."""
    titles = column_titles(qset, ex.effect)
    keys = [k for k, _ in ex.columns]
    names = {k: one_line(titles[k]) for k in keys}
    label_w = max([room(t, 8.0) for t in names.values()] + [40.0])
    plot_x = MARGIN + label_w + 8
    plot_w = max(300.0, PLOT_WIDTH - plot_x - 24)
    title = one_line(f"{ex.outcome}: judgements per domain")
    width = max(plot_x + plot_w + 24, plot_x + room(title, 9.0) + MARGIN)
    items: list[Item] = [Label(plot_x, MARGIN + 10, title, 9.0, colour=INK)]
    top = MARGIN + 22
    for i, key in enumerate(keys):
        cy = top + (i + 0.5) * BAR_PITCH
        items.append(Label(plot_x - 6, cy + CAP_HALF * 8, names[key], 8.0, colour=INK,
                           anchor="end"))  # fmt: skip
        items += _bar_segments(ex, key, plot_x, plot_w, cy)
    bottom = top + len(keys) * BAR_PITCH
    items += [Line(plot_x, top, plot_x, bottom, INK, 0.8),
              Line(plot_x, bottom, plot_x + plot_w, bottom, INK, 0.8)]  # fmt: skip
    for tick in range(0, 101, 20):
        tx = plot_x + plot_w * tick / 100
        items.append(Line(tx, bottom, tx, bottom + 3.5, INK, 0.8))
        items.append(Label(tx, bottom + 13, str(tick), 7.0, colour=INK, anchor="middle"))
    basis = "meta-analysis weight" if ex.basis == "weight" else "studies"
    items.append(Label(plot_x + plot_w / 2, bottom + 28, f"% of {basis}", 8.0, colour=INK,
                       anchor="middle"))  # fmt: skip
    legend_y = bottom + 46
    legend: list[Item] = []
    x = 0.0
    for code in SHARE_CODES:
        sw = SWATCHES[code]
        edge = OUTLINE if code == "incomplete" else INK
        legend.append(Box(x, legend_y - 4.5, 18.0, 9.0, fill=sw.fill, stroke=edge,
                          stroke_width=0.6, hatch=hatch_of(code)))  # fmt: skip
        words = f"{sw.letter} {sw.label}"
        legend.append(Label(x + 23, legend_y + CAP_HALF * 7, words, 7.0, colour=INK))
        x += 23 + room(words, 7.0) + 12
    legend_w = x - 12
    width = max(width, legend_w + 2 * MARGIN)
    items += [_shifted(item, (width - legend_w) / 2) for item in legend]
    return Figure(width, legend_y + 4.5 + MARGIN, title, tuple(items))


def _shifted(item: Item, dx: float) -> Item:
    from dataclasses import replace

    if isinstance(item, Box | Label):
        return replace(item, x=item.x + dx)
    return item
