"""Agreement over the review: kappa per domain by batches of studies in assessment order.

A table (Markdown, HTML) and a plot (matplotlib with the Agg backend, imported only when a plot
is drawn). Our own design: one line per domain, each with its own marker and dash pattern and
its label written at the line's end, so the plot reads in greyscale; undefined kappas leave a
gap and are marked "n/a" under the axis. Reference lines mark the Landis & Koch (1977) bands.
"""

from __future__ import annotations

import io
import math
from collections.abc import Mapping, Sequence

from robtui.core.calibration import BatchAgreement, format_figure
from robtui.core.model import OVERALL
from robtui.export.calibration_report import (
    Block,
    Heading,
    Para,
    Table,
    render_html,
    render_markdown,
)

PLOT_FORMATS = ("png", "svg", "pdf")
_MARKERS = ("o", "s", "^", "D", "v", "P")
_DASHES = ("-", "--", "-.", ":", (0, (5, 1, 1, 1)), (0, (1, 1)))
_INKS = ("#1b4f72", "#7b3f00", "#145a32", "#5b2c6f", "#616a6b", "#000000")
_BANDS = ((0.2, "slight"), (0.4, "fair"), (0.6, "moderate"), (0.8, "substantial"))


def _label(key: str, names: Mapping[str, str]) -> str:
    return "Overall" if key == OVERALL else f"D{key} {names.get(key, '')}".strip()


def trend_blocks(
    batches: Sequence[BatchAgreement], domain_names: Mapping[str, str], batch_size: int
) -> list[Block]:
    """Heading, explanation and one row per batch: kappa (percent agreement) per domain."""
    keys = list(batches[0].domains) if batches else [*domain_names, OVERALL]
    header = ("Batch", "Studies", "Pairs", *(_label(k, domain_names) for k in keys))
    rows = []
    for b in batches:
        cells = []
        for k in keys:
            s = b.domains[k]
            pct = "" if s.percent_agreement is None else f" ({s.percent_agreement:.0f}%)"
            cells.append(f"{format_figure(s.kappa)}{pct}")
        rows.append((str(b.index), ", ".join(b.studies), str(b.n_pairs), *cells))
    return [
        Heading("Agreement over the review"),
        Para(
            f"Cohen's kappa (percent agreement) between the two reviewers' final judgements, by "
            f"batches of {batch_size} studies in the order they were taken up (the earliest start "
            "of any of a study's assessments). \u2013: kappa undefined (one same judgement "
            "throughout, or no pairs)."
        ),
        Table(header, tuple(rows)),
    ]


def trend_markdown(batches, domain_names, batch_size: int, *, title: str) -> str:
    return render_markdown([Heading(title, 1), *trend_blocks(batches, domain_names, batch_size)])


def trend_html(batches, domain_names, batch_size: int, *, title: str) -> str:
    blocks = [Heading(title, 1), *trend_blocks(batches, domain_names, batch_size)]
    return render_html(blocks, title)


def _label_ends(ax, ends: Mapping[tuple[int, float], list[str]]) -> None:
    """Write each line's name at its last point; lines ending together share one label, and
    labels closer than a few points are pushed apart."""
    placed: list[tuple[int, float]] = []
    for (x, y), names in sorted(ends.items(), key=lambda kv: (kv[0][0], -kv[0][1])):
        shown = y
        for px, py in placed:
            if px == x and abs(py - shown) < 0.05:
                shown = py - 0.05
        placed.append((x, shown))
        ax.annotate(", ".join(names), (x, y), xytext=(x + 0.08, shown), fontsize=7, va="center")


def render_trend_plot(
    batches: Sequence[BatchAgreement], domain_names: Mapping[str, str], fmt: str = "png"
) -> bytes:
    """The kappa-by-batch plot as ``fmt`` bytes (png, svg or pdf); ``domain_names`` are best
    short (they label the legend)."""
    if fmt not in PLOT_FORMATS:
        raise ValueError(f"plot format must be one of {', '.join(PLOT_FORMATS)}, not {fmt!r}")
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib.figure import Figure

    keys = list(batches[0].domains) if batches else []
    fig = Figure(figsize=(8, 5), dpi=100)
    ax = fig.add_subplot(1, 1, 1)
    xs = [b.index for b in batches]
    for level, name in _BANDS:
        ax.axhline(level, color="#b3b3b3", linewidth=0.6, zorder=0)
        ax.text(0.25, level - 0.01, name, fontsize=7, color="#6b6b6b", va="top")
    ax.axhline(0.0, color="#6b6b6b", linewidth=0.8, zorder=0)
    ends: dict[tuple[int, float], list[str]] = {}
    for i, key in enumerate(keys):
        ys = [b.domains[key].kappa for b in batches]
        values = [math.nan if y is None else y for y in ys]
        heavy = key == OVERALL
        ax.plot(
            xs,
            values,
            marker=_MARKERS[i % len(_MARKERS)],
            linestyle=_DASHES[i % len(_DASHES)],
            color=_INKS[-1] if heavy else _INKS[i % (len(_INKS) - 1)],
            linewidth=2.4 if heavy else 1.4,
            label=_label(key, domain_names),
        )
        last = next(((x, y) for x, y in zip(reversed(xs), reversed(ys)) if y is not None), None)
        if last:
            ends.setdefault((last[0], round(last[1], 2)), []).append(
                "Overall" if heavy else f"D{key}"
            )
    _label_ends(ax, ends)
    for b in batches:
        if all(s.kappa is None for s in b.domains.values()):
            ax.text(b.index, 0.03, "n/a", ha="center", fontsize=7, color="#6b6b6b")
    ax.set_xlim(0.2, max(xs, default=1) + 1.0)
    known = [s.kappa for b in batches for s in b.domains.values() if s.kappa is not None]
    low = max(-1.05, min([-0.3, *(k - 0.1 for k in known)]))
    ax.set_ylim(low, 1.05)
    ax.set_xticks(xs)
    ax.set_xlabel("Batch of studies, in assessment order")
    ax.set_ylabel("Cohen's kappa")
    ax.set_title("Agreement between reviewers over the review", fontsize=11)
    ax.legend(fontsize=7, loc="upper center", bbox_to_anchor=(0.5, -0.16), ncol=3, frameon=False)
    for side in ("top", "right"):
        ax.spines[side].set_visible(False)
    fig.tight_layout()
    out = io.BytesIO()
    metadata = {"svg": {"Date": None}, "pdf": {"CreationDate": None}, "png": {}}[fmt]
    with matplotlib.rc_context({"svg.hashsalt": "robtui"}):
        fig.savefig(out, format=fmt, metadata=metadata)
    return out.getvalue()
