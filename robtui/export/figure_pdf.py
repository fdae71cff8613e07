"""A Figure as a one-page vector PDF, written by hand (PDF 1.5, ISO 32000-1 operators).

Text is set in the standard Helvetica and Helvetica-Bold fonts (no embedding needed), in
WinAnsi encoding. A character WinAnsi cannot hold is drawn as "?" and the whole label is
given as /ActualText (UTF-16), so copying or searching the PDF still yields the exact text;
for labels in other scripts, the SVG export carries every character as drawn text. No dates
are written, so the same figure gives the same bytes.
"""

from __future__ import annotations

import math
import zlib
from functools import lru_cache

from robtui.export.figure_primitives import Box, Dot, Figure, Hatch, Label, Line, num
from robtui.export.palette import hex_to_rgb
from robtui.export.text_metrics import text_width, winansi_byte

_BEZIER = 0.5523  # control-point distance of a quarter circle, as a fraction of the radius
_FONTS = {False: "F1", True: "F2"}


@lru_cache(maxsize=256)
def _rgb(colour: str) -> str:
    return " ".join(f"{c:.4f}".rstrip("0").rstrip(".") or "0" for c in hex_to_rgb(colour))


@lru_cache(maxsize=1024)
def _rounded_at_origin(w: float, h: float, r: float) -> str:
    """Path of a w x h rectangle with corners of radius r, lower-left corner at (0, 0)."""
    k = _BEZIER * r
    p = [
        f"{num(r)} 0 m",
        f"{num(w - r)} 0 l",
        f"{num(w - r + k)} 0 {num(w)} {num(r - k)} {num(w)} {num(r)} c",
        f"{num(w)} {num(h - r)} l",
        f"{num(w)} {num(h - r + k)} {num(w - r + k)} {num(h)} {num(w - r)} {num(h)} c",
        f"{num(r)} {num(h)} l",
        f"{num(r - k)} {num(h)} 0 {num(h - r + k)} 0 {num(h - r)} c",
        f"0 {num(r)} l",
        f"0 {num(r - k)} {num(r - k)} 0 {num(r)} 0 c",
        "h",
    ]
    return " ".join(p)


def _shape(x: float, y: float, w: float, h: float, r: float, paint: str) -> str:
    """A (rounded) rectangle with lower-left corner (x, y) in PDF space, painted by ``paint``
    (the operators after the path). A rounded one is drawn at the origin and moved there, so
    the many tiles of a table share one path text."""
    r = min(r, w / 2, h / 2)
    if r <= 0:
        return f"{num(x)} {num(y)} {num(w)} {num(h)} re {paint}"
    path = _rounded_at_origin(round(w, 2), round(h, 2), round(r, 2))
    return f"q 1 0 0 1 {num(x)} {num(y)} cm {path} {paint} Q"


def _circle(cx: float, cy: float, r: float, paint: str) -> str:
    return _shape(cx - r, cy - r, 2 * r, 2 * r, r, paint)


def _pdf_string(data: bytes) -> str:
    out = []
    for b in data:
        ch = chr(b)
        if ch in "\\()":
            out.append("\\" + ch)
        elif 32 <= b < 127:
            out.append(ch)
        else:
            out.append(f"\\{b:03o}")
    return "(" + "".join(out) + ")"


def _utf16_hex(text: str) -> str:
    return "<FEFF" + text.encode("utf-16-be", "surrogatepass").hex().upper() + ">"


@lru_cache(maxsize=4096)
def _shown(text: str) -> tuple[str, bool]:
    """The PDF string of a label in WinAnsi ("?" for what WinAnsi lacks), and whether any
    character was replaced."""
    codes = [winansi_byte(ch) for ch in text]
    return _pdf_string(bytes(c if c is not None else ord("?") for c in codes)), None in codes


def _text(t: Label, height: float) -> str:
    shown, replaced = _shown(t.text)
    width = text_width(t.text, t.size, t.bold)
    x = t.x - {"start": 0.0, "middle": width / 2, "end": width}[t.anchor]
    op = (
        f"BT /{_FONTS[t.bold]} {num(t.size)} Tf {_rgb(t.colour)} rg "
        f"{num(x)} {num(height - t.y)} Td {shown} Tj ET"
    )
    if replaced:
        op = f"/Span << /ActualText {_utf16_hex(t.text)} >> BDC {op} EMC"
    return op


def _pattern_stream(h: Hatch) -> str:
    """The pattern cell, in the figure's own coordinates (the pattern matrix flips y)."""
    s = h.spacing
    if h.kind == "dots":
        return f"{_rgb(h.colour)} rg " + " ".join(
            _circle(c, c, h.weight, "f") for c in (s / 4, 3 * s / 4)
        )
    lines = " ".join(
        f"{num(-s)} {num(k * s + s)} m {num(2 * s)} {num(k * s - 2 * s)} l" for k in (0, 1, 2)
    )
    return f"{_rgb(h.colour)} RG {num(h.weight)} w {lines} S"


def _box(b: Box, height: float, patterns: dict[Hatch, str]) -> str:
    x, y = b.x, height - b.y - b.h
    ops = []
    if b.fill:
        ops.append(f"{_rgb(b.fill)} rg " + _shape(x, y, b.w, b.h, b.radius, "f"))
    if b.hatch is not None:
        ops.append(f"/Pattern cs /{patterns[b.hatch]} scn " + _shape(x, y, b.w, b.h, b.radius, "f"))
    if b.stroke and b.stroke_width > 0:
        dash = f"[{num(b.dash[0])} {num(b.dash[1])}] 0 d " if b.dash else ""
        reset = " [] 0 d" if b.dash else ""
        ops.append(
            f"{_rgb(b.stroke)} RG {num(b.stroke_width)} w {dash}"
            + _shape(x, y, b.w, b.h, b.radius, "S")
            + reset
        )
    return "\n".join(ops)


def _content(fig: Figure, patterns: dict[Hatch, str]) -> str:
    H = fig.height
    ops = [f"{_rgb(fig.background)} rg 0 0 {num(fig.width)} {num(H)} re f"]
    for item in fig.items:
        if isinstance(item, Box):
            ops.append(_box(item, H, patterns))
        elif isinstance(item, Label):
            ops.append(_text(item, H))
        elif isinstance(item, Line):
            ops.append(
                f"{_rgb(item.colour)} RG {num(item.width)} w {num(item.x1)} {num(H - item.y1)} m "
                f"{num(item.x2)} {num(H - item.y2)} l S"
            )
        elif isinstance(item, Dot):
            ops.append(f"{_rgb(item.fill)} rg " + _circle(item.cx, H - item.cy, item.r, "f"))
    return "\n".join(ops) + "\n"


def _stream(extra: str, data: bytes) -> bytes:
    packed = zlib.compress(data, 6)
    head = f"<< {extra} /Filter /FlateDecode /Length {len(packed)} >>\nstream\n".encode()
    return head + packed + b"\nendstream"


# Readers need not take a page side above 14,400 units (ISO 32000-1, Annex C, implementation
# limits; from memory). A larger figure (a table of some 680 studies) is drawn at 1/k scale on
# a page whose /UserUnit is k points, so it keeps its physical size.
PAGE_LIMIT = 14400.0


def render_pdf(fig: Figure) -> bytes:
    """The figure as a PDF document of one page, fig.width x fig.height points."""
    patterns: dict[Hatch, str] = {}
    for item in fig.items:
        if isinstance(item, Box) and item.hatch is not None and item.hatch not in patterns:
            patterns[item.hatch] = f"P{len(patterns) + 1}"
    k = max(1, math.ceil(max(fig.width, fig.height) / PAGE_LIMIT))
    w, h = num(fig.width / k), num(fig.height / k)
    content = _content(fig, patterns)
    unit, scale = "", ""
    if k > 1:
        scale = f"{1 / k:.6f}"
        content = f"q {scale} 0 0 {scale} 0 0 cm\n{content}Q\n"
        unit = f" /UserUnit {k}"
    first_pattern = 8
    pattern_refs = " ".join(
        f"/{name} {first_pattern + i} 0 R" for i, name in enumerate(patterns.values())
    )
    objects: list[bytes] = [
        b"<< /Type /Catalog /Pages 2 0 R >>",
        b"<< /Type /Pages /Kids [3 0 R] /Count 1 >>",
        (
            f"<< /Type /Page /Parent 2 0 R /MediaBox [0 0 {w} {h}]{unit} /Contents 4 0 R "
            f"/Resources << /Font << /F1 5 0 R /F2 6 0 R >> /Pattern << {pattern_refs} >> >> >>"
        ).encode(),
        _stream("", content.encode("latin-1")),
        b"<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica /Encoding /WinAnsiEncoding >>",
        b"<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica-Bold /Encoding /WinAnsiEncoding >>",
        f"<< /Title {_utf16_hex(fig.title)} /Producer (robtui) >>".encode(),
    ]
    matrix = f"1 0 0 -1 0 {h}" if k == 1 else f"{scale} 0 0 -{scale} 0 {h}"
    for hatch in patterns:
        s = num(hatch.spacing)
        objects.append(
            _stream(
                f"/Type /Pattern /PatternType 1 /PaintType 1 /TilingType 1 /BBox [0 0 {s} {s}] "
                f"/XStep {s} /YStep {s} /Matrix [{matrix}] /Resources << >>",
                _pattern_stream(hatch).encode("latin-1"),
            )
        )
    version = b"1.5" if k == 1 else b"1.6"  # /UserUnit came with PDF 1.6
    out = bytearray(b"%PDF-" + version + b"\n%\xe2\xe3\xcf\xd3\n")
    offsets = []
    for number, body in enumerate(objects, start=1):
        offsets.append(len(out))
        out += f"{number} 0 obj\n".encode() + body + b"\nendobj\n"
    xref = len(out)
    out += f"xref\n0 {len(objects) + 1}\n0000000000 65535 f \n".encode()
    out += b"".join(f"{o:010d} 00000 n \n".encode() for o in offsets)
    out += (
        f"trailer\n<< /Size {len(objects) + 1} /Root 1 0 R /Info 7 0 R >>\n"
        f"startxref\n{xref}\n%%EOF\n"
    ).encode()
    return bytes(out)
