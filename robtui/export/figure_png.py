"""A Figure as a PNG at 300 pixels per inch (Pillow), shapes supersampled for smooth edges.

300 ppi is the resolution journals commonly ask of colour figures (common practice, no
source). Rounded corners, dashed outlines, dots and hatching are drawn 4x larger as coverage
masks and reduced, then painted in their colour through the mask; masks of repeated shapes
(every tile of a judgement) are made once. Text is drawn by FreeType in DejaVu Sans (the copy
that comes with matplotlib, else the system's, else Pillow's own font), scaled down where
needed to the Helvetica width the layout planned.

The image is stored with a palette: the figure's flat colours, then blends of each pair of
colours painted over one another (the anti-aliased edges), each pixel mapped to its nearest
entry. Flat colours stay exact; an edge pixel may move by a few levels. On the 100-study
table this encodes in 45 ms instead of 278 ms for RGB, and the file is half the size.
"""

from __future__ import annotations

import io
import itertools
import math
from functools import lru_cache
from importlib.util import find_spec
from pathlib import Path

from robtui.export.figure_primitives import Box, Dot, Figure, Hatch, Label, Line
from robtui.export.palette import hex_to_rgb
from robtui.export.text_metrics import text_width

DPI = 300
SCALE = DPI / 72.0  # pixels per point
SUPER = 4  # supersampling factor of shape masks
# zlib level: on the 100-study table level 3 took 45 ms for 564 kB, level 1 52 ms / 638 kB,
# level 6 104 ms / 432 kB (measured here with Pillow 13)
COMPRESSION = 3
_FONT_FILES = {False: "DejaVuSans.ttf", True: "DejaVuSans-Bold.ttf"}


def _rgb(colour: str) -> tuple[int, int, int]:
    return tuple(round(c * 255) for c in hex_to_rgb(colour))  # type: ignore[return-value]


def _mix(top, below, t: float) -> tuple[int, int, int]:
    """``top`` over ``below`` at coverage t (0..1), as anti-aliasing blends them."""
    return tuple(round(b + (f - b) * t) for f, b in zip(top, below))  # type: ignore[return-value]


def _font_path(bold: bool) -> Path | None:
    name = _FONT_FILES[bold]
    spec = find_spec("matplotlib")  # finds the package without importing it
    places = [Path(p) / "mpl-data" / "fonts" / "ttf" for p in (spec.submodule_search_locations
                                                              if spec else [])]  # fmt: skip
    places.append(Path("/usr/share/fonts/truetype/dejavu"))
    return next((p / name for p in places if (p / name).is_file()), None)


@lru_cache(maxsize=256)
def _font(bold: bool, px: float):
    from PIL import ImageFont

    path = _font_path(bold)
    if path is None:
        return ImageFont.load_default(px)
    return ImageFont.truetype(str(path), px)


@lru_cache(maxsize=1024)
def _text_mask(text: str, size: float, bold: bool, anchor: str):
    """(coverage mask, left, top) of a label drawn at a point: left/top place the mask
    relative to the anchor. The font is made smaller when the text would run wider than the
    layout planned (DejaVu Sans is wider than Helvetica). Repeated texts (every tile's letter)
    are drawn once."""
    from PIL import Image, ImageDraw

    px = size * SCALE
    font = _font(bold, px)
    planned = text_width(text, size, bold) * SCALE
    actual = font.getlength(text)
    if planned > 0 and actual > planned:
        px = math.floor(px * planned / actual * 4) / 4  # quarter-pixel steps share fonts
        font = _font(bold, px)
    code = {"start": "ls", "middle": "ms", "end": "rs"}[anchor]
    left, top, right, bottom = font.getbbox(text, anchor=code)
    mask = Image.new("L", (max(1, right - left), max(1, bottom - top)), 0)
    ImageDraw.Draw(mask).text((-left, -top), text, font=font, fill=255, anchor=code)
    return mask, left, top


def _snap(b: Box) -> tuple[int, int, int, int]:
    x0, y0 = round(b.x * SCALE), round(b.y * SCALE)
    return x0, y0, max(1, round((b.x + b.w) * SCALE) - x0), max(1, round((b.y + b.h) * SCALE) - y0)


def _perimeter(x0: float, y0: float, w: float, h: float, r: float, steps: int = 8):
    """Points along the outline of a rounded rectangle, clockwise from the top-left straight."""
    pts = []
    corners = ((x0 + w - r, y0 + r, -90), (x0 + w - r, y0 + h - r, 0),
               (x0 + r, y0 + h - r, 90), (x0 + r, y0 + r, 180))  # fmt: skip
    for cx, cy, start in corners:
        for i in range(steps + 1):
            a = math.radians(start + 90 * i / steps)
            pts.append((cx + r * math.cos(a), cy + r * math.sin(a)))
    pts.append(pts[0])
    return pts


def _dashes(pts, on: float, off: float):
    """The 'on' pieces of a dash pattern walked along a polyline."""
    pieces, current, pos, drawing = [], [pts[0]], 0.0, True
    limit = on
    for (ax, ay), (bx, by) in itertools.pairwise(pts):
        seg = math.hypot(bx - ax, by - ay)
        done = 0.0
        while seg - done > 1e-9:
            step = min(limit - pos, seg - done)
            done += step
            pos += step
            t = done / seg
            point = (ax + (bx - ax) * t, ay + (by - ay) * t)
            if drawing:
                current.append(point)
            if pos >= limit - 1e-9:
                if drawing and len(current) > 1:
                    pieces.append(current)
                drawing = not drawing
                pos, limit, current = 0.0, (on if drawing else off), [point]
    if drawing and len(current) > 1:
        pieces.append(current)
    return pieces


@lru_cache(maxsize=512)
def _box_masks(w: int, h: int, r: float, sw: float, dash: tuple[float, float] | None):
    """(fill mask, outline mask or None, pad): coverage of a box of w x h pixels with corner
    radius r and an outline sw pixels wide, centred on the edge; masks are pad pixels larger
    than the box on every side."""
    from PIL import Image, ImageDraw

    pad = math.ceil(sw / 2) + 1
    S = SUPER
    size = ((w + 2 * pad) * S, (h + 2 * pad) * S)
    x0, y0, x1, y1 = pad * S, pad * S, (pad + w) * S - 1, (pad + h) * S - 1
    r = min(r, w / 2, h / 2)
    fill = Image.new("L", size, 0)
    ImageDraw.Draw(fill).rounded_rectangle((x0, y0, x1, y1), radius=r * S, fill=255)
    outline = None
    if sw > 0:
        outline = Image.new("L", size, 0)
        draw = ImageDraw.Draw(outline)
        half = sw * S / 2
        if dash is None:
            draw.rounded_rectangle((x0 - half, y0 - half, x1 + half, y1 + half),
                                   radius=r * S + half, fill=255)  # fmt: skip
            draw.rounded_rectangle((x0 + half, y0 + half, x1 - half, y1 - half),
                                   radius=max(r * S - half, 0), fill=0)  # fmt: skip
        else:
            line = _perimeter(x0, y0, x1 - x0, y1 - y0, r * S)
            for piece in _dashes(line, dash[0] * SCALE * S, dash[1] * SCALE * S):
                draw.line(piece, fill=255, width=max(1, round(sw * S)), joint="curve")
        outline = outline.reduce(S)
    return fill.reduce(S), outline, pad


def _stretched(mask, w: int, h: int, corner: int):
    """A mask made for a small box, stretched to w x h by repeating its straight middle (the
    pixels ``corner`` from each edge)."""
    from PIL import Image

    def along(img, axis: int, target: int):
        length, other = img.size[axis], img.size[1 - axis]
        if target == length:
            return img

        def box(a: int, b: int):
            return (a, 0, b, other) if axis == 0 else (0, a, other, b)

        def size(n: int):
            return (n, other) if axis == 0 else (other, n)

        out = Image.new("L", size(target))
        out.paste(img.crop(box(0, corner)), box(0, corner)[:2])
        middle = img.crop(box(corner, corner + 1)).resize(
            size(target - 2 * corner), Image.Resampling.NEAREST
        )
        out.paste(middle, box(corner, corner)[:2])
        out.paste(img.crop(box(length - corner, length)), box(target - corner, target)[:2])
        return out

    return along(along(mask, 0, w), 1, h)


SMALL = 100_000  # pixels: masks and plain images up to this size are kept for reuse


def _masks(w: int, h: int, r: float, sw: float, dash: tuple[float, float] | None):
    """(fill, outline, pad) masks of a box w x h pixels (see _box_masks); small ones (tiles,
    which repeat) are kept, large ones (a frame, a bar) made each time to bound memory."""
    if w * h <= SMALL:
        return _kept_masks(w, h, r, sw, dash)
    return _make_masks(w, h, r, sw, dash)


@lru_cache(maxsize=512)
def _kept_masks(w: int, h: int, r: float, sw: float, dash: tuple[float, float] | None):
    return _make_masks(w, h, r, sw, dash)


def _make_masks(w: int, h: int, r: float, sw: float, dash: tuple[float, float] | None):
    pad = math.ceil(sw / 2) + 1
    corner = pad + math.ceil(r + sw / 2) + 1
    small = 2 * corner + 2
    if dash is not None or (w + 2 * pad <= small and h + 2 * pad <= small):
        return _box_masks(w, h, r, sw, dash)
    # a large solid box: make the masks for a small one and stretch its straight middle
    fill, outline, pad = _box_masks(min(w, small), min(h, small), r, sw, None)
    W, H = w + 2 * pad, h + 2 * pad
    return (
        _stretched(fill, W, H, corner),
        _stretched(outline, W, H, corner) if outline is not None else None,
        pad,
    )


def _hatch_mask(h: Hatch, x0: int, y0: int, w: int, h_px: int):
    """Coverage of the hatch over the pixel rectangle (x0, y0, w, h_px), in figure phase."""
    from PIL import Image, ImageDraw

    S = SUPER
    img = Image.new("L", (w * S, h_px * S), 0)
    draw = ImageDraw.Draw(img)
    step = h.spacing * SCALE
    if h.kind == "dots":
        r = h.weight * SCALE * S
        for offset in (0.25, 0.75):
            i0 = math.floor(x0 / step - offset) - 1
            j0 = math.floor(y0 / step - offset) - 1
            for j in range(j0, j0 + math.ceil(h_px / step) + 3):
                cy = ((j + offset) * step - y0) * S
                for i in range(i0, i0 + math.ceil(w / step) + 3):
                    cx = ((i + offset) * step - x0) * S
                    draw.ellipse((cx - r, cy - r, cx + r, cy + r), fill=255)
    else:  # lines y = -x + k * step in figure pixels
        width = max(1, round(h.weight * SCALE * S))
        xa, xb = x0 - step, x0 + w + step
        for k in range(math.floor((x0 + y0) / step) - 1, math.ceil((xb + y0 + h_px) / step) + 2):
            c = k * step
            draw.line((((xa - x0) * S, (c - xa - y0) * S), ((xb - x0) * S, (c - xb - y0) * S)),
                      fill=255, width=width)  # fmt: skip
    return img.reduce(S)


@lru_cache(maxsize=64)
def _dot_mask(r: float):
    from PIL import Image, ImageDraw

    size = math.ceil(r) + 1
    S = SUPER
    img = Image.new("L", (2 * size * S, 2 * size * S), 0)
    c = size * S
    ImageDraw.Draw(img).ellipse((c - r * S, c - r * S, c + r * S, c + r * S), fill=255)
    return img.reduce(S), size


@lru_cache(maxsize=256)
def _solid(colour: tuple[int, int, int], w: int, h: int):
    """A plain image of one colour, kept for reuse (tiles repeat the same size thousands of
    times; Pillow would make a new one for every paste of a colour)."""
    from PIL import Image

    return Image.new("RGB", (w, h), colour)


RGB = tuple[int, int, int]


def _figure_colours(fig: Figure) -> set[RGB]:
    found = {fig.background}
    for item in fig.items:
        if isinstance(item, Box):
            found |= {c for c in (item.fill, item.stroke) if c}
            if item.hatch is not None:
                found.add(item.hatch.colour)
        elif isinstance(item, Label | Line):
            found.add(item.colour)
        elif isinstance(item, Dot):
            found.add(item.fill)
    return {_rgb(c) for c in found}


def _palette_indices(entries: list[RGB]) -> list[int]:
    """The palette entry Pillow picks for a pixel of each colour of ``entries``."""
    from PIL import Image

    holder = Image.new("P", (1, 1))
    holder.putpalette([v for c in entries for v in c])
    probe = Image.new("RGB", (len(entries), 1))
    probe.putdata(entries)
    found = probe.quantize(palette=holder, dither=Image.Dither.NONE)
    return [found.getpixel((i, 0)) for i in range(len(entries))]


def _stand_ins(colours: set[RGB], keep: RGB) -> dict[RGB, RGB] | None:
    """A colour to paint for each figure colour, such that each finds its own palette entry.

    The image is painted in these and stored with the true colours in the palette. Pillow
    finds a pixel's palette entry through a cache of 64 levels per channel (the entry nearest
    to the cache cell's corner, not to the pixel), so two colours as close as white and the
    near-white of "not judged" (5 levels apart) would share one; the one that is not ``keep``
    (the background) is moved away from the other in steps of 4 levels until each has its
    own. None when that does not settle (then the image is stored in RGB)."""
    stand = {c: c for c in colours}
    for _ in range(32):
        base = sorted(stand.values())
        wrong = [(base[i], base[j]) for i, j in enumerate(_palette_indices(base)) if i != j]
        if not wrong:
            return stand
        for c, taken in wrong:
            mover, other = (taken, c) if c == stand[keep] else (c, taken)
            moved = tuple(
                min(255, max(0, m + 4 * ((m > o) - (m < o)))) for m, o in zip(mover, other)
            )
            if moved == mover:
                return None
            owner = next(t for t, p in stand.items() if p == mover)
            stand[owner] = moved  # type: ignore[assignment]
    return None


class _Canvas:
    """The image being painted (in stand-in colours, see _stand_ins), and which colour was
    blended over which (for the palette)."""

    def __init__(self, fig: Figure, stand_ins: dict[RGB, RGB]):
        from PIL import Image, ImageDraw

        self.true = stand_ins
        self.back = {p: t for t, p in self.true.items()}
        size = (math.ceil(fig.width * SCALE), math.ceil(fig.height * SCALE))
        self.im = Image.new("RGB", size, self.ink(fig.background))
        self.draw = ImageDraw.Draw(self.im)
        self.colours = {self.ink(fig.background)}
        self.blends: set[tuple[RGB, RGB]] = set()

    def ink(self, colour: str) -> RGB:
        """The stand-in painted for a figure colour."""
        return self.true[_rgb(colour)]

    def under(self, x: int, y: int) -> RGB:
        """The flat colour painted at a pixel (the nearest one, should it be an edge)."""
        x = min(max(x, 0), self.im.width - 1)
        y = min(max(y, 0), self.im.height - 1)
        seen = self.im.getpixel((x, y))
        if seen in self.back:
            return seen
        return min(self.back, key=lambda c: sum((a - b) ** 2 for a, b in zip(c, seen)))

    def paint(self, colour, box, mask, over) -> None:
        """Paint ``colour`` through ``mask`` at ``box``; its edges blend into ``over``."""
        self.colours.add(colour)
        for below in over:
            if below != colour:
                self.blends.add((colour, below))
        w, h = box[2] - box[0], box[3] - box[1]
        self.im.paste(_solid(colour, w, h) if w * h <= SMALL else colour, box, mask)

    def box(self, b: Box) -> None:
        x0, y0, w, h = _snap(b)
        sw = b.stroke_width * SCALE if b.stroke else 0.0
        fill, outline, pad = _masks(w, h, round(b.radius * SCALE, 2), round(sw, 2), b.dash)
        at = (x0 - pad, y0 - pad, x0 - pad + fill.width, y0 - pad + fill.height)
        outside = self.under(at[0], at[1])
        inside = outside
        if b.fill:
            inside = self.ink(b.fill)
            self.paint(inside, at, fill, [outside])
        if b.hatch is not None:
            from PIL import ImageChops

            mask = _hatch_mask(b.hatch, x0, y0, w, h)
            if b.radius:
                mask = ImageChops.multiply(mask, fill.crop((pad, pad, pad + w, pad + h)))
            self.paint(self.ink(b.hatch.colour), (x0, y0, x0 + w, y0 + h), mask, [inside])
        if outline is not None:
            self.paint(self.ink(b.stroke), at, outline, [outside, inside])

    def dot(self, d: Dot) -> None:
        mask, half = _dot_mask(round(d.r * SCALE, 2))
        cx, cy = round(d.cx * SCALE), round(d.cy * SCALE)
        box = (cx - half, cy - half, cx + half, cy + half)
        self.paint(self.ink(d.fill), box, mask, [self.under(box[0], box[1])])

    def label(self, t: Label) -> None:
        if not t.text:
            return
        mask, left, top = _text_mask(t.text, t.size, t.bold, t.anchor)
        x, y = round(t.x * SCALE) + left, round(t.y * SCALE) + top
        below = self.under(x + mask.width // 2, y + mask.height // 2)
        self.paint(self.ink(t.colour), (x, y, x + mask.width, y + mask.height), mask, [below])

    def line(self, line: Line) -> None:
        t = line.width * SCALE
        x1, y1, x2, y2 = (v * SCALE for v in (line.x1, line.y1, line.x2, line.y2))
        colour = self.ink(line.colour)
        self.colours.add(colour)
        thick = max(1, round(t))
        if y1 == y2:  # axis-aligned lines sit on the pixel grid: sharp, nothing to blend
            top = round(y1 - thick / 2)
            self.draw.rectangle((round(min(x1, x2)), top, round(max(x1, x2)) - 1,
                                 top + thick - 1), fill=colour)  # fmt: skip
        elif x1 == x2:
            left = round(x1 - thick / 2)
            self.draw.rectangle((left, round(min(y1, y2)), left + thick - 1,
                                 round(max(y1, y2)) - 1), fill=colour)  # fmt: skip
        else:
            self.draw.line((x1, y1, x2, y2), fill=colour, width=thick)

    def palettes(self) -> tuple[list[RGB], list[RGB]]:
        """(painted, true): the flat colours, then evenly spaced blends of each painted pair,
        at most 256; the first list in stand-in colours, the second in the figure's own.
        Blends within 10 levels of a flat colour are left out, so they cannot capture the
        flat colour's pixels."""
        base = sorted(self.colours)
        levels = max(2, min(16, (256 - len(base)) // max(1, len(self.blends)) + 1))
        painted, true, seen = list(base), [self.back[c] for c in base], set(base)
        for top, below in sorted(self.blends):
            for i in range(1, levels):
                c = _mix(top, below, i / levels)
                if c in seen or any(max(abs(x - y) for x, y in zip(c, b)) < 10 for b in base):
                    continue
                seen.add(c)
                painted.append(c)
                true.append(_mix(self.back[top], self.back[below], i / levels))
        return painted[:256], true[:256]

    def encode_indexed(self, ppi: float) -> bytes:
        """The image as a palette PNG, the stand-ins replaced by the true colours."""
        from PIL import Image

        painted, true = self.palettes()
        holder = Image.new("P", (1, 1))
        holder.putpalette([v for c in painted for v in c])
        # each pixel to its nearest palette colour: edges land on a blend of their pair
        indexed = self.im.quantize(palette=holder, dither=Image.Dither.NONE)
        indexed.putpalette([v for c in true for v in c])
        out = io.BytesIO()
        indexed.save(out, format="PNG", compress_level=COMPRESSION, dpi=(ppi, ppi))
        return out.getvalue()

    def encode_rgb(self, ppi: float) -> bytes:
        out = io.BytesIO()
        self.im.save(out, format="PNG", compress_level=COMPRESSION, dpi=(ppi, ppi))
        return out.getvalue()


def _paint(fig: Figure, stand_ins: dict[RGB, RGB]) -> _Canvas:
    canvas = _Canvas(fig, stand_ins)
    for item in fig.items:
        if isinstance(item, Box):
            canvas.box(item)
        elif isinstance(item, Label):
            canvas.label(item)
        elif isinstance(item, Line):
            canvas.line(item)
        elif isinstance(item, Dot):
            canvas.dot(item)
    return canvas


MAX_PIXELS = 40_000_000  # ~160 MB of image in memory; a table of about 200 studies


def _scaled(fig: Figure, f: float) -> Figure:
    """The figure with every length multiplied by f (drawn at 300 ppi, it is then a figure at
    300 * f ppi)."""
    from dataclasses import replace

    def one(item):
        if isinstance(item, Box):
            hatch = item.hatch and replace(
                item.hatch, spacing=item.hatch.spacing * f, weight=item.hatch.weight * f
            )
            dash = item.dash and (item.dash[0] * f, item.dash[1] * f)
            return replace(item, x=item.x * f, y=item.y * f, w=item.w * f, h=item.h * f,
                           stroke_width=item.stroke_width * f, radius=item.radius * f,
                           dash=dash, hatch=hatch)  # fmt: skip
        if isinstance(item, Line):
            return replace(item, x1=item.x1 * f, y1=item.y1 * f, x2=item.x2 * f, y2=item.y2 * f,
                           width=item.width * f)  # fmt: skip
        if isinstance(item, Dot):
            return replace(item, cx=item.cx * f, cy=item.cy * f, r=item.r * f)
        return replace(item, x=item.x * f, y=item.y * f, size=item.size * f)

    items = tuple(one(i) for i in fig.items)
    return replace(fig, width=fig.width * f, height=fig.height * f, items=items)


def render_png(fig: Figure) -> bytes:
    """The figure as a PNG image at 300 ppi (its physical size is the figure's, in points):
    with a palette, or in RGB when the figure's colours do not settle into one. A figure that
    would exceed MAX_PIXELS is drawn at the resolution that fits (stated in the file)."""
    pixels = fig.width * SCALE * fig.height * SCALE
    ppi = DPI
    if pixels > MAX_PIXELS:
        f = math.sqrt(MAX_PIXELS / pixels)
        fig, ppi = _scaled(fig, f), DPI * f
    colours = _figure_colours(fig)
    stand_ins = _stand_ins(colours, _rgb(fig.background))
    if stand_ins is None:
        return _paint(fig, {c: c for c in colours}).encode_rgb(ppi)
    return _paint(fig, stand_ins).encode_indexed(ppi)
