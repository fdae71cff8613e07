"""The figures of a result's export in svg, pdf or png: one layout, one renderer per format.

figure_layout.py computes each figure once as primitives; figure_svg.py and figure_pdf.py
write vector files by hand, figure_png.py draws a 300 ppi image with Pillow. No matplotlib.
"""

from __future__ import annotations

from collections.abc import Callable

from robtui.export.figure_layout import lights_figure, summary_figure
from robtui.export.figure_primitives import Figure
from robtui.export.tables import OutcomeExport


def _renderer(fmt: str) -> Callable[[Figure], bytes]:
    if fmt == "svg":
        from robtui.export.figure_svg import render_svg

        return render_svg
    if fmt == "pdf":
        from robtui.export.figure_pdf import render_pdf

        return render_pdf
    if fmt == "png":
        from robtui.export.figure_png import render_png

        return render_png
    raise ValueError(f"no figure renderer for {fmt!r}: use svg, pdf or png")


def render(fig: Figure, fmt: str) -> bytes:
    """A laid-out figure as the bytes of an svg, pdf or png file."""
    return _renderer(fmt)(fig)


def render_lights(ex: OutcomeExport, qset, fmt: str) -> bytes:
    """The traffic-light table: studies down, domains and overall across."""
    return render(lights_figure(ex, qset), fmt)


def render_summary(ex: OutcomeExport, qset, fmt: str) -> bytes:
    """One 100% bar per domain: share of studies (or of weight) at each judgement."""
    return render(summary_figure(ex, qset), fmt)
