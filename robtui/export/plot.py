"""Figures (matplotlib, Agg, imported lazily): the traffic-light table and the summary plot.

Our own design: rounded tiles in the robtui palette, each with its letter (L / S / H, a dot
when not judged, on a dashed outline), the overall column set apart by a gap and a heavy
frame; the summary is one 100% bar per domain with hatching per judgement, so both read in
greyscale.
"""

from __future__ import annotations

import io
import warnings

from robtui.core.model import OVERALL
from robtui.export.palette import OUTLINE, SWATCHES
from robtui.export.tables import OutcomeExport, column_titles

SHARE_CODES = ("low", "some_concerns", "high", "incomplete")
_METADATA = {
    "svg": {"Date": None},
    "pdf": {"CreationDate": None, "ModDate": None},
    "png": {},
}


def _plain(text: str) -> str:
    """User text for a matplotlib Text: one line, and "$" never starts mathematics."""
    return " ".join(str(text).split()).replace("$", r"\$")


def _figure(width: float, height: float):
    from matplotlib.figure import Figure

    return Figure(figsize=(width, height), dpi=100)


def _save(fig, fmt: str) -> bytes:
    import matplotlib

    out = io.BytesIO()
    settings = {
        "svg.fonttype": "none",
        "svg.hashsalt": "robtui",
        "pdf.compression": 1,
    }
    with matplotlib.rc_context(settings):
        extra = {"pil_kwargs": {"compress_level": 1}} if fmt == "png" else {}  # speed over size
        fig.savefig(out, format=fmt, metadata=_METADATA[fmt], **extra)
    return out.getvalue()


_GLYPHS: dict[tuple[str, float, str], tuple[object, object, float]] = {}


def _glyph(char: str, size: float, weight: str = "normal"):
    """(vertices in points, codes, advance in points) of one character, cached."""
    key = (char, size, weight)
    if key not in _GLYPHS:
        import numpy as np
        from matplotlib.font_manager import FontProperties
        from matplotlib.textpath import text_to_path

        prop = FontProperties(size=size, weight=weight)
        with warnings.catch_warnings():  # a glyph missing from the font is drawn as a box
            warnings.simplefilter("ignore", UserWarning)
            verts, codes = text_to_path.get_text_path(prop, char)
            width, _, _ = text_to_path.get_text_width_height_descent(char, prop, ismath=False)
        # get_text_path works in units of FONT_SCALE per font size (as TextPath does)
        scale = size / text_to_path.FONT_SCALE
        verts = np.asarray(verts, float).reshape(-1, 2) * scale
        _GLYPHS[key] = (verts, np.asarray(codes), width)
    return _GLYPHS[key]


_LABELS: dict[tuple[str, float, str], tuple[object, object, float]] = {}


def _label(text: str, size: float, weight: str = "normal"):
    """(vertices in points, codes, width in points) of a one-line label, cached."""
    key = (text, size, weight)
    if key not in _LABELS:
        import numpy as np

        if len(_LABELS) > 20000:  # a long session: keep the cache bounded
            _LABELS.clear()

        pen, verts, codes = 0.0, [], []
        for char in " ".join(text.split()):  # one line: newlines and tabs become spaces
            v, c, advance = _glyph(char, size, weight)
            if len(v):
                verts.append(v + (pen, 0.0))
                codes.append(c)
            pen += advance
        if verts:
            _LABELS[key] = (np.concatenate(verts), np.concatenate(codes), pen)
        else:
            _LABELS[key] = (np.zeros((0, 2)), np.zeros(0, dtype=np.uint8), pen)
    return _LABELS[key]


def _text_paths(fig, ax, items, size: float, align: str, colour: str) -> None:
    """Many short labels drawn as one compound outline: one artist instead of one per label,
    so a review of hundreds of studies renders in a fraction of the time. Characters are
    laid out by their advance widths (no kerning)."""
    if not items:
        return
    import numpy as np
    from matplotlib.patches import PathPatch
    from matplotlib.path import Path as MPath

    to_inches = ax.transData + fig.dpi_scale_trans.inverted()
    anchors = to_inches.transform([(x, y) for x, y, _ in items])
    all_verts, all_codes = [], []
    for (x_in, y_in), (_, _, text) in zip(anchors, items):
        verts, codes, width = _label(text, size)
        if not len(verts):
            continue
        shift = -width if align == "right" else 0.0
        # points -> inches; centre on the row (x-height is about half the font size)
        all_verts.append(verts / 72.0 + (x_in + shift / 72.0, y_in - 0.3 * size / 72.0))
        all_codes.append(codes)
    if not all_verts:
        return
    path = MPath(np.concatenate(all_verts), np.concatenate(all_codes))
    # add_artist, not add_patch: the limits are set already and computing the Bezier
    # extents of thousands of glyph curves would dominate the run time
    ax.add_artist(
        PathPatch(
            path,
            transform=fig.dpi_scale_trans,
            facecolor=colour,
            edgecolor="none",
            linewidth=0,
            clip_on=False,
        )
    )


def _add_compound(fig, ax, verts, codes, at, **style) -> None:
    """One shape (vertices in inches around 0) repeated at every point of ``at`` (inches),
    drawn as a single compound path."""
    import numpy as np
    from matplotlib.patches import PathPatch
    from matplotlib.path import Path as MPath

    verts = np.asarray(verts, float)
    placed = (verts[None, :, :] + np.asarray(at, float)[:, None, :]).reshape(-1, 2)
    path = MPath(placed, np.tile(np.asarray(codes), len(at)))
    ax.add_artist(PathPatch(path, transform=fig.dpi_scale_trans, clip_on=False, **style))


def _dot(radius: float):
    from matplotlib.path import Path as MPath

    circle = MPath.circle((0.0, 0.0), radius)
    return circle.vertices, circle.codes


def _tile_path(fig, ax, width: float, height: float):
    """A rounded tile of ``width`` x ``height`` data units, centred on 0, in inches."""
    from matplotlib.patches import BoxStyle

    to_inches = ax.transData + fig.dpi_scale_trans.inverted()
    (x0, y0), (x1, y1) = to_inches.transform([(0, 0), (width, height)])
    w, h = abs(x1 - x0), abs(y1 - y0)
    return BoxStyle.Round(pad=0, rounding_size=0.16 * min(w, h))(-w / 2, -h / 2, w, h, 1.0)


def render_lights(ex: OutcomeExport, qset, fmt: str) -> bytes:
    """The traffic-light table: studies down, domains and overall across."""
    from matplotlib.patches import FancyBboxPatch

    titles = column_titles(qset, ex.effect)
    keys = [k for k, _ in ex.columns]
    n = max(len(ex.rows), 1)
    label_w = 2.6
    x_of = {k: label_w + i + (0.4 if k == OVERALL else 0.0) for i, k in enumerate(keys)}
    width = label_w + len(keys) + 0.4 + 1.8
    fig = _figure(max(6.0, width * 0.9), 1.6 + 0.32 * n)
    ax = fig.add_axes((0.0, 0.0, 1.0, 1.0))
    ax.set_xlim(0, width)
    ax.set_ylim(n + 1.6, -1.2)
    ax.axis("off")
    ax.text(
        0.1,
        -0.7,
        f"Risk of bias: {_plain(ex.outcome)}",
        fontsize=10,
        fontweight="bold",
        va="center",
    )
    for key in keys:
        ax.text(
            x_of[key] + 0.45,
            0.0,
            titles[key].split(" ")[0],
            ha="center",
            va="center",
            fontsize=8,
            fontweight="bold",
        )
    marks = {code: [] for code in SWATCHES}  # tile centres per judgement
    _text_paths(
        fig,
        ax,
        [(label_w - 0.1, r, row.study_label) for r, row in enumerate(ex.rows, start=1)],
        7,
        "right",
        "#1a1a1a",
    )
    _text_paths(
        fig,
        ax,
        [(x_of[keys[-1]] + 1.05, r, row.source) for r, row in enumerate(ex.rows, start=1)],
        6,
        "left",
        "#333333",
    )
    for r, row in enumerate(ex.rows, start=1):
        for key in keys:
            code = row.judgements[key] or "incomplete"
            marks[code].append((x_of[key] + 0.45, r))
    tile = _tile_path(fig, ax, 0.74, 0.76)
    to_inches = ax.transData + fig.dpi_scale_trans.inverted()
    for code, centres in marks.items():
        if not centres:
            continue
        sw = SWATCHES[code]
        dashed = code == "incomplete"
        at = to_inches.transform(centres)
        # every tile of a judgement in one compound path: one artist per judgement
        _add_compound(
            fig,
            ax,
            tile.vertices,
            tile.codes,
            at,
            facecolor=sw.fill,
            edgecolor=OUTLINE if dashed else "none",
            linewidth=0.8,
            linestyle="--" if dashed else "-",
        )
        if dashed:
            mark_verts, mark_codes = _dot(0.028)
        else:
            verts, codes, width = _label(sw.letter, 8, "bold")
            mark_verts = (verts + (-width / 2, -0.36 * 8)) / 72.0
            mark_codes = codes
        _add_compound(
            fig, ax, mark_verts, mark_codes, at, facecolor=sw.ink, edgecolor="none", linewidth=0
        )
    ax.add_patch(
        FancyBboxPatch(
            (x_of[OVERALL] + 0.02, 0.45),
            0.86,
            n + 0.1,
            boxstyle="round,pad=0,rounding_size=0.1",
            fill=False,
            edgecolor="#1a1a1a",
            linewidth=1.6,
        )
    )
    legend = "   ".join(f"{s.letter} = {s.label}" for s in SWATCHES.values())
    ax.text(0.1, n + 1.0, legend, fontsize=7, va="center")
    return _save(fig, fmt)


def render_summary(ex: OutcomeExport, qset, fmt: str) -> bytes:
    """One 100% bar per domain: share of studies (or of weight) at each judgement."""
    titles = column_titles(qset, ex.effect)
    keys = [k for k, _ in ex.columns]
    fig = _figure(8.0, 1.4 + 0.45 * len(keys))
    ax = fig.add_axes((0.27, 0.24, 0.68, 0.66))
    ys = list(range(len(keys)))
    left = [0.0] * len(keys)
    for code in SHARE_CODES:
        sw = SWATCHES[code]
        widths = [ex.shares[k][code] * 100 for k in keys]
        ax.barh(
            ys,
            widths,
            left=left,
            height=0.62,
            color=sw.fill,
            hatch=sw.hatch,
            edgecolor=OUTLINE if code == "incomplete" else "#1a1a1a",
            linewidth=0.6,
            hatchcolor="#CFC4D8" if code == "high" else "#1a1a1a",
            label=f"{sw.letter} {sw.label}",
        )
        for y, x0, w in zip(ys, left, widths):
            if w >= 8:
                ax.text(
                    x0 + w / 2,
                    y,
                    f"{sw.letter} {w:.0f}%",
                    ha="center",
                    va="center",
                    fontsize=7,
                    color=sw.ink,
                    bbox={"boxstyle": "round,pad=0.15", "fc": sw.fill, "ec": "none"},
                )
        left = [a + b for a, b in zip(left, widths)]
    ax.set_yticks(ys, [titles[k] for k in keys], fontsize=8)
    ax.invert_yaxis()
    ax.set_xlim(0, 100)
    basis = "meta-analysis weight" if ex.basis == "weight" else "studies"
    ax.set_xlabel(f"% of {basis}", fontsize=8)
    ax.tick_params(axis="x", labelsize=7)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    ax.set_title(f"{_plain(ex.outcome)}: judgements per domain", fontsize=9, loc="left")
    handles, labels = ax.get_legend_handles_labels()
    fig.legend(handles, labels, loc="lower center", ncol=4, fontsize=7, frameon=False)
    return _save(fig, fmt)
