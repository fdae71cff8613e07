"""A Figure as SVG 1.1 text (plain string writer): labels are real, searchable <text>."""

from __future__ import annotations

from robtui.export.figure_primitives import Box, Dot, Figure, Hatch, Label, Line, num
from robtui.export.safety import markup

FONT_FAMILY = "Helvetica, Arial, 'Liberation Sans', 'DejaVu Sans', sans-serif"


def _pattern(pid: str, hatch: Hatch) -> str:
    s = hatch.spacing
    if hatch.kind == "dots":
        r = num(hatch.weight)
        marks = (
            f'<circle cx="{num(s / 4)}" cy="{num(s / 4)}" r="{r}" fill="{hatch.colour}"/>'
            f'<circle cx="{num(3 * s / 4)}" cy="{num(3 * s / 4)}" r="{r}" fill="{hatch.colour}"/>'
        )
    else:  # lines rising to the right: y = -x + k s, for the tile and its neighbours
        marks = "".join(
            f'<line x1="{num(-s)}" y1="{num(k * s + s)}" x2="{num(2 * s)}" y2="{num(k * s - 2 * s)}"'
            f' stroke="{hatch.colour}" stroke-width="{num(hatch.weight)}"/>'
            for k in (0, 1, 2)
        )
    return (
        f'<pattern id="{pid}" patternUnits="userSpaceOnUse" x="0" y="0" '
        f'width="{num(s)}" height="{num(s)}">{marks}</pattern>'
    )


def _box(b: Box, patterns: dict[Hatch, str]) -> str:
    geometry = f'x="{num(b.x)}" y="{num(b.y)}" width="{num(b.w)}" height="{num(b.h)}"'
    if b.radius:
        geometry += f' rx="{num(b.radius)}"'
    parts = []
    if b.fill:
        parts.append(f'<rect {geometry} fill="{b.fill}"/>')
    if b.hatch is not None:
        parts.append(f'<rect {geometry} fill="url(#{patterns[b.hatch]})"/>')
    if b.stroke and b.stroke_width > 0:
        dash = f' stroke-dasharray="{num(b.dash[0])} {num(b.dash[1])}"' if b.dash else ""
        parts.append(
            f'<rect {geometry} fill="none" stroke="{b.stroke}" '
            f'stroke-width="{num(b.stroke_width)}"{dash}/>'
        )
    return "".join(parts)


def _label(t: Label) -> str:
    weight = ' font-weight="bold"' if t.bold else ""
    anchor = "" if t.anchor == "start" else f' text-anchor="{t.anchor}"'
    return (
        f'<text x="{num(t.x)}" y="{num(t.y)}" font-size="{num(t.size)}" fill="{t.colour}"'
        f"{weight}{anchor}>{markup(t.text)}</text>"
    )


def render_svg(fig: Figure) -> bytes:
    """The figure as a standalone SVG document (UTF-8), sized in points."""
    patterns: dict[Hatch, str] = {}
    for item in fig.items:
        if isinstance(item, Box) and item.hatch is not None and item.hatch not in patterns:
            patterns[item.hatch] = f"hatch{len(patterns) + 1}"
    body = []
    for item in fig.items:
        if isinstance(item, Box):
            body.append(_box(item, patterns))
        elif isinstance(item, Label):
            body.append(_label(item))
        elif isinstance(item, Line):
            body.append(
                f'<line x1="{num(item.x1)}" y1="{num(item.y1)}" x2="{num(item.x2)}" '
                f'y2="{num(item.y2)}" stroke="{item.colour}" stroke-width="{num(item.width)}"/>'
            )
        elif isinstance(item, Dot):
            body.append(
                f'<circle cx="{num(item.cx)}" cy="{num(item.cy)}" r="{num(item.r)}" '
                f'fill="{item.fill}"/>'
            )
    w, h = num(fig.width), num(fig.height)
    head = [
        '<?xml version="1.0" encoding="UTF-8"?>',
        (
            f'<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="{w}pt" height="{h}pt" '
            f'viewBox="0 0 {w} {h}" font-family="{FONT_FAMILY}">'
        ),
        f"<title>{markup(fig.title)}</title>",
    ]
    if patterns:
        head.append("<defs>" + "".join(_pattern(p, h_) for h_, p in patterns.items()) + "</defs>")
    head.append(f'<rect width="{w}" height="{h}" fill="{fig.background}"/>')
    return ("\n".join(head + body + ["</svg>"]) + "\n").encode("utf-8")
