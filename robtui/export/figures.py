"""The two figures of a result's export, drawn with matplotlib at the size a journal prints.

One drawing code for every format (svg, pdf, png): each figure is laid out in points on a
canvas of the final size, so nothing is scaled down afterwards and no text is below 7 pt.
Widths: a journal page's text block (174 mm) or one of its two columns (84 mm); heights grow
with the studies and a long traffic-light table splits into pages of at most 225 mm (a
two-column A4 journal page's text block is about 174 x 235 mm: common practice, no source).

Our own design: rounded tiles in the robtui palette, each with its letter (L / S / H; a dot on
a dashed outline when not judged), the overall column set apart; the summary is one 100% bar
per domain with a hatch per judgement and "letter + percent" labels. Both carry a key of the
judgements and of the domains. Rows not settled by a complete consensus are marked, never the
reviewers' names. Fonts: DejaVu Sans (shipped with matplotlib), embedded as TrueType in PDF,
as glyph outlines in SVG.
"""

from __future__ import annotations

import io
from collections.abc import Sequence
from dataclasses import dataclass
from functools import lru_cache

from robtui.core.model import OVERALL
from robtui.export.palette import OUTLINE, SWATCHES
from robtui.export.tables import OutcomeExport, column_titles

FORMATS = ("svg", "pdf", "png")
WIDTHS_MM = {"page": 174.0, "column": 84.0}
MAX_HEIGHT_MM = 225.0
PNG_DPI = 600
PT_PER_MM = 72 / 25.4
INK = "#1A1A1A"
FONT = "DejaVu Sans"
TEXT, SMALL_TITLE = 7.0, 8.0  # label size and title size, in points at print size
PAD = 4.0  # margin around the drawing, points
SHARE_CODES = ("low", "some_concerns", "high", "incomplete")
# hatches (matplotlib's notation) so the bars read in greyscale; light lines on the dark fill
HATCH = {"some_concerns": ("....", INK), "high": ("////", "#CFC4D8")}

# marks beside a study whose row is not a complete consensus (the note under the figure says why)
MARKS = (
    ("stale", "\u2021", "consensus built on answers a reviewer has since changed"),
    ("agreed", "\u2020", "reviewers' judgements agree; no consensus record"),
    ("single", "*", "one reviewer's assessment only"),
)


def row_mark(source: str) -> str:
    """The kind of row a source string names: "stale", "agreed", "single" or "" (none)."""
    if "stale" in source:
        return "stale"
    if source.startswith("agreed"):
        return "agreed"
    if source.endswith(" only"):
        return "single"
    return ""


# -- text --------------------------------------------------------------------------------------
def one_line(text: object) -> str:
    """A label as one clean line: whitespace runs collapsed, control characters made visible."""
    clean = "".join(
        "\ufffd" if (ord(c) < 32 and c not in "\t\n\r") or 0xD800 <= ord(c) <= 0xDFFF else c
        for c in str(text or "")
    )
    return " ".join(clean.split())


@lru_cache(maxsize=4096)
def text_width(text: str, size: float = TEXT, bold: bool = False) -> float:
    """The width in points of ``text`` set in the figures' font (matplotlib's own metrics)."""
    from matplotlib.font_manager import FontProperties
    from matplotlib.textpath import TextToPath

    props = FontProperties(family=FONT, size=size, weight="bold" if bold else "normal")
    width, _, _ = TextToPath().get_text_width_height_descent(text, props, ismath=False)
    return width


def fitted(text: str, room: float, size: float = TEXT, bold: bool = False) -> str:
    """``text`` shortened with an ellipsis until it fits ``room`` points."""
    if text_width(text, size, bold) <= room:
        return text
    while text and text_width(text + "\u2026", size, bold) > room:
        text = text[:-1]
    return text.rstrip() + "\u2026"


def wrapped(text: str, room: float, size: float = TEXT) -> list[str]:
    """``text`` broken into lines at spaces so each fits ``room`` points."""
    lines: list[str] = []
    for word in text.split(" "):
        if lines and text_width(f"{lines[-1]} {word}", size) <= room:
            lines[-1] = f"{lines[-1]} {word}"
        else:
            lines.append(fitted(word, room, size))
    return lines


# -- canvas ------------------------------------------------------------------------------------
@dataclass
class Canvas:
    """A matplotlib figure whose axes' units are points from the top-left corner."""

    fig: object
    ax: object
    width: float
    height: float

    def text(self, x, y, s, size=TEXT, *, bold=False, colour=INK, ha="left", va="center"):
        self.ax.text(x, y, s, fontsize=size, fontweight="bold" if bold else "normal",
                     color=colour, ha=ha, va=va, family=FONT, parse_math=False)  # fmt: skip

    def box(self, x, y, w, h, *, fill, edge=None, lw=0.0, dash=False, radius=0.0, hatch=None):
        from matplotlib.patches import FancyBboxPatch, Rectangle

        dashes = (0, (2.0, 1.2)) if dash else "solid"
        style = {"facecolor": fill, "edgecolor": edge or "none", "linewidth": lw,
                 "linestyle": dashes, "hatch": hatch}  # fmt: skip
        if radius:
            patch = FancyBboxPatch((x + radius, y + radius), w - 2 * radius, h - 2 * radius,
                                   boxstyle=f"round,pad={radius}", **style)  # fmt: skip
        else:
            patch = Rectangle((x, y), w, h, **style)
        self.ax.add_artist(patch)  # add_patch would recompute data limits each time

    def line(self, x1, y1, x2, y2, lw=0.6):
        from matplotlib.lines import Line2D

        self.ax.add_line(Line2D([x1, x2], [y1, y2], color=INK, linewidth=lw,
                                solid_capstyle="butt"))  # fmt: skip


def _canvas(width: float, height: float) -> Canvas:
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width / 72, height / 72), dpi=72)
    ax = fig.add_axes((0, 0, 1, 1))
    ax.set_xlim(0, width)
    ax.set_ylim(height, 0)
    ax.set_axis_off()
    ax.set_autoscale_on(False)  # the limits are the page: no autoscaling per patch
    return Canvas(fig, ax, width, height)


def tile(c: Canvas, cx: float, cy: float, code: str, w: float, h: float) -> None:
    """A judgement's tile: its fill and letter, or a dashed outline and a dot when not judged."""
    sw = SWATCHES[code]
    if code == "incomplete":
        c.box(cx - w / 2, cy - h / 2, w, h, fill=sw.fill, edge=OUTLINE, lw=0.6, dash=True,
              radius=1.5)  # fmt: skip
        from matplotlib.patches import Circle

        c.ax.add_artist(Circle((cx, cy), 1.1, facecolor=sw.ink, edgecolor="none"))
    else:
        c.box(cx - w / 2, cy - h / 2, w, h, fill=sw.fill, radius=1.5)
        c.text(cx, cy, sw.letter, bold=True, colour=sw.ink, ha="center")


def _domain_name(qset, key: str, effect: str) -> str:
    try:
        name = qset.domain(key, effect).name
    except (KeyError, ValueError, LookupError):
        return column_titles(qset, effect).get(key, key)
    return f"{name} (effect of {effect})" if qset.has_effect_variants(key) else name


def _key_lines(ex: OutcomeExport, qset, room: float, marks: Sequence[str]) -> list[str]:
    """The domain key (and the marks used), entries packed into lines that fit ``room``."""
    entries = [
        f"{head} {one_line(_domain_name(qset, key, ex.effect))}"
        for key, head in ex.columns
        if key != OVERALL
    ]
    entries += [f"{sign} {words}" for kind, sign, words in MARKS if kind in marks]
    lines: list[str] = []
    for entry in entries:
        if lines and text_width(f"{lines[-1]};  {entry}") <= room:
            lines[-1] = f"{lines[-1]};  {entry}"
        else:
            lines += wrapped(entry, room)
    return lines


def _legend_need(code: str, hatched: bool) -> float:
    sw = SWATCHES[code]
    return 16 + text_width(f"{sw.letter} {sw.label}" if hatched else sw.label) + 8


def _legend_rows(room: float, hatched: bool) -> int:
    rows, x = 1, 0.0
    for code in SHARE_CODES:
        need = _legend_need(code, hatched)
        if x and x + need > room:
            rows, x = rows + 1, 0.0
        x += need
    return rows


def _legend(c: Canvas, x: float, y: float, room: float, *, hatched: bool) -> float:
    """A swatch and the words for every judgement, wrapping within ``room``; returns the
    y below it."""
    left = x
    for code in SHARE_CODES:
        sw = SWATCHES[code]
        words = f"{sw.letter} {sw.label}" if hatched else sw.label
        need = _legend_need(code, hatched)
        if x > left and x + need > left + room:
            x, y = left, y + 11
        if hatched:
            hatch, colour = HATCH.get(code, (None, INK))
            c.box(x, y - 3.5, 12, 7, fill=sw.fill, edge=OUTLINE if code == "incomplete" else INK,
                  lw=0.4)  # fmt: skip
            if hatch:
                c.box(x, y - 3.5, 12, 7, fill="none", edge=colour, lw=0, hatch=hatch)
        else:
            tile(c, x + 6, y, code, 12, 8)
        c.text(x + 16, y, words)
        x += need
    return y + 8


# -- traffic-light table -----------------------------------------------------------------------
ROW = 12.0  # row pitch, points
TILE_H = 9.0


def lights_pages(ex: OutcomeExport, qset, width: str = "page") -> list[Canvas]:
    """The traffic-light table on one or more canvases of the journal ``width``."""
    w = WIDTHS_MM[width] * PT_PER_MM
    inner = w - 2 * PAD
    keys = [k for k, _ in ex.columns]
    heads = dict(ex.columns)
    marks = [row_mark(r.source) for r in ex.rows]
    labels = [
        one_line(r.study_label) + ([s for k, s, _ in MARKS if k == m] or [""])[0]
        for r, m in zip(ex.rows, marks)
    ]
    pitch = min(34.0, (inner * 0.6) / max(1, len(keys)))
    # the overall column is set apart and wide enough for its header
    wide = max(pitch, text_width(heads.get(OVERALL, ""), TEXT, True) + 3)
    gap = 4.0 + wide - pitch if OVERALL in keys else 0.0
    grid = pitch * len(keys) + gap
    label_room = min(max([text_width(t) for t in labels] + [30.0]), inner - grid - 4)
    labels = [fitted(t, label_room) for t in labels]
    key_lines = _key_lines(ex, qset, inner, marks)
    legend_rows = _legend_rows(inner, hatched=False)
    head_h = 2 * SMALL_TITLE + 14
    foot_h = 6 + legend_rows * 11 + len(key_lines) * 8.5 + PAD
    fits = max(1, int((MAX_HEIGHT_MM * PT_PER_MM - head_h - foot_h - PAD) // ROW))
    per_page = -(-len(ex.rows) // -(-len(ex.rows) // fits)) if ex.rows else 1  # even pages
    chunks = [ex.rows[i : i + per_page] for i in range(0, len(ex.rows), per_page)] or [[]]
    pages = []
    for number, chunk in enumerate(chunks):
        first = number * per_page
        height = head_h + len(chunk) * ROW + foot_h + PAD
        c = _canvas(w, height)
        title = f"Risk of bias: {one_line(ex.outcome)}"
        if len(chunks) > 1:
            title += f" ({number + 1} of {len(chunks)})"
        c.text(PAD, PAD + SMALL_TITLE / 2, fitted(title, inner, SMALL_TITLE, True),
               SMALL_TITLE, bold=True)  # fmt: skip
        x0 = PAD + label_room + 4
        xs = {}
        for i, key in enumerate(keys):
            xs[key] = x0 + (i + 0.5) * pitch + (gap - (wide - pitch) / 2 if key == OVERALL else 0)
            room = wide if key == OVERALL else pitch - 1
            c.text(xs[key], head_h - 7, fitted(heads[key], room, TEXT, True), bold=True,
                   ha="center")  # fmt: skip
        for r, row in enumerate(chunk):
            cy = head_h + (r + 0.5) * ROW
            c.text(PAD + label_room, cy, labels[first + r], ha="right")
            for key in keys:
                if key in row.judgements:  # a study without the domain has no cell
                    tw = (wide if key == OVERALL else pitch) - 3
                    tile(c, xs[key], cy, row.judgements[key] or "incomplete", tw, TILE_H)
        if OVERALL in xs and chunk:
            c.box(xs[OVERALL] - wide / 2, head_h, wide, len(chunk) * ROW, fill="none",
                  edge=INK, lw=0.9, radius=2.0)  # fmt: skip
        y = _legend(c, PAD, head_h + len(chunk) * ROW + 10, inner, hatched=False)
        for line in key_lines:
            c.text(PAD, y + 3, line)
            y += 8.5
        pages.append(c)
    return pages


# -- summary bars ------------------------------------------------------------------------------
BAR_PITCH, BAR_H = 14.0, 9.0


def _bar_label(ex: OutcomeExport, key: str, head: str) -> str:
    """A bar's label; in a review mixing designs, how many studies have the domain."""
    have = ex.coverage.get(key, len(ex.rows))
    return head if have == len(ex.rows) else f"{head} ({have} of {len(ex.rows)})"


def summary_page(ex: OutcomeExport, qset, width: str = "page") -> Canvas:
    """One 100% bar per domain (and overall): share of studies, or of weight, per judgement."""
    w = WIDTHS_MM[width] * PT_PER_MM
    inner = w - 2 * PAD
    keys = [k for k, _ in ex.columns]
    heads = {k: _bar_label(ex, k, head) for k, head in ex.columns}
    label_room = max(text_width(heads[k], TEXT, k == OVERALL) for k in keys) if keys else 20.0
    plot_x = PAD + label_room + 5
    plot_w = w - PAD - 6 - plot_x
    key_lines = _key_lines(ex, qset, inner, [])
    top = 2 * SMALL_TITLE + 6
    bottom = top + len(keys) * BAR_PITCH
    legend_rows = _legend_rows(inner, hatched=True)
    height = bottom + 24 + 6 + legend_rows * 11 + len(key_lines) * 8.5 + 2 * PAD
    c = _canvas(w, height)
    title = f"{one_line(ex.outcome)}: judgements per domain"
    c.text(PAD, PAD + SMALL_TITLE / 2, fitted(title, inner, SMALL_TITLE, True), SMALL_TITLE,
           bold=True)  # fmt: skip
    for i, key in enumerate(keys):
        cy = top + (i + 0.5) * BAR_PITCH
        c.text(plot_x - 5, cy, heads[key], bold=key == OVERALL, ha="right")
        left = 0.0
        for code in SHARE_CODES:
            share = ex.shares[key][code]
            if share <= 0:
                continue
            sw = SWATCHES[code]
            x, bw = plot_x + plot_w * left, plot_w * share
            hatch, colour = HATCH.get(code, (None, INK))
            c.box(x, cy - BAR_H / 2, bw, BAR_H, fill=sw.fill,
                  edge=OUTLINE if code == "incomplete" else INK, lw=0.4)  # fmt: skip
            words = f"{sw.letter} {share:.0%}"
            fits = text_width(words) + 4 <= bw
            if hatch:
                c.box(x, cy - BAR_H / 2, bw, BAR_H, fill="none", edge=colour, lw=0, hatch=hatch)
            if fits:  # a backing in the fill keeps the label readable on the hatch
                tw = text_width(words)
                c.box(x + bw / 2 - tw / 2 - 1, cy - 4, tw + 2, 8, fill=sw.fill)
                c.text(x + bw / 2, cy, words, colour=sw.ink, ha="center")
            left += share
    c.line(plot_x, top, plot_x, bottom)
    c.line(plot_x, bottom, plot_x + plot_w, bottom)
    for tick in range(0, 101, 20):
        tx = plot_x + plot_w * tick / 100
        c.line(tx, bottom, tx, bottom + 2.5)
        c.text(tx, bottom + 7, str(tick), ha="center")
    basis = "meta-analysis weight" if ex.basis == "weight" else "studies"
    c.text(plot_x + plot_w / 2, bottom + 16, f"% of {basis}", ha="center")
    y = _legend(c, PAD, bottom + 30, inner, hatched=True)
    for line in key_lines:
        c.text(PAD, y + 3, line)
        y += 8.5
    return c


# -- files -------------------------------------------------------------------------------------
def _rc() -> dict:
    return {
        "pdf.fonttype": 42,  # TrueType, embedded (subset)
        "svg.fonttype": "path",  # glyph outlines: the SVG draws the same everywhere
        "svg.hashsalt": "robtui",  # stable ids, stable bytes
        "font.family": FONT,
    }


def save(pages: Sequence[Canvas], fmt: str, title: str) -> list[bytes]:
    """The pages as files: one multi-page PDF, or one SVG or PNG per page."""
    if fmt not in FORMATS:
        raise ValueError(f"no figure format {fmt!r}: use svg, pdf or png")
    import matplotlib

    meta = {"pdf": {"Title": title, "CreationDate": None, "Creator": "robtui"},
            "svg": {"Title": title, "Date": None}, "png": {"Title": title}}[fmt]  # fmt: skip
    with matplotlib.rc_context(_rc()):
        if fmt == "pdf":
            from matplotlib.backends.backend_pdf import PdfPages

            out = io.BytesIO()
            with PdfPages(out, metadata=meta) as pdf:
                for page in pages:
                    pdf.savefig(page.fig)
            return [out.getvalue()]
        files = []
        for page in pages:
            out = io.BytesIO()
            page.fig.savefig(out, format=fmt, dpi=PNG_DPI if fmt == "png" else 72, metadata=meta)
            files.append(out.getvalue())
        return files


def figure_files(ex: OutcomeExport, qset, fmt: str, width: str = "page") -> dict[str, bytes]:
    """Suffix -> bytes of both figures in ``fmt``: ``-lights`` (``-lights-2`` ... when an SVG
    or PNG table runs over several pages) and ``-summary``."""
    if width not in WIDTHS_MM:
        raise ValueError(f"figure width must be one of {', '.join(WIDTHS_MM)}, not {width!r}")
    import matplotlib

    with matplotlib.rc_context(_rc()):
        lights = lights_pages(ex, qset, width)
        summary = summary_page(ex, qset, width)
    outcome = one_line(ex.outcome)
    files = {}
    for n, data in enumerate(save(lights, fmt, f"Risk of bias: {outcome}")):
        files[f"-lights.{fmt}" if n == 0 else f"-lights-{n + 1}.{fmt}"] = data
    [files[f"-summary.{fmt}"]] = save([summary], fmt, f"{outcome}: judgements per domain")
    return files
