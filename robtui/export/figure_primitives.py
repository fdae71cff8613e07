"""What a figure is made of: boxes, lines, dots and labels in points (pure data).

The layout (figure_layout.py) computes a Figure once; each renderer (figure_svg.py,
figure_pdf.py, figure_png.py) draws the same primitives, so the formats cannot drift apart.
Coordinates are points (1/72 inch) from the top-left corner, y growing downwards. Items are
painted in order; a Box paints its fill, then its hatch, then its outline.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Hatch:
    """A repeating pattern over a fill, anchored at the figure's origin so every renderer
    places it the same way. ``kind`` "diagonal": lines rising to the right, ``spacing``
    apart, ``weight`` thick; "dots": a staggered grid of dots of radius ``weight``."""

    kind: str
    colour: str
    spacing: float
    weight: float


@dataclass(frozen=True)
class Box:
    x: float
    y: float
    w: float
    h: float
    fill: str | None = None
    stroke: str | None = None
    stroke_width: float = 0.0
    radius: float = 0.0  # rounded corners
    dash: tuple[float, float] | None = None  # (on, off) lengths of a dashed outline
    hatch: Hatch | None = None


@dataclass(frozen=True)
class Line:
    x1: float
    y1: float
    x2: float
    y2: float
    colour: str
    width: float


@dataclass(frozen=True)
class Dot:
    cx: float
    cy: float
    r: float
    fill: str


@dataclass(frozen=True)
class Label:
    """One line of text; ``y`` is the baseline, ``anchor`` "start", "middle" or "end" says
    where ``x`` is; ``text`` is already one clean line (text_metrics.one_line)."""

    x: float
    y: float
    text: str
    size: float
    colour: str = "#1A1A1A"
    bold: bool = False
    anchor: str = "start"


Item = Box | Line | Dot | Label


@dataclass(frozen=True)
class Figure:
    width: float
    height: float
    title: str  # the document title (SVG <title>, PDF /Title)
    items: tuple[Item, ...]
    background: str = "#FFFFFF"


def num(value: float) -> str:
    """A number for SVG or PDF text: at most two decimals, no trailing zeros (stable output)."""
    text = f"{value:.2f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text
