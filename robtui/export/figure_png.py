"""A Figure as a PNG at 300 pixels per inch (Pillow), shapes supersampled for smooth edges.

300 ppi is the resolution journals commonly ask of colour figures (common practice, no
source). Rounded corners, dashed outlines, dots and hatching are drawn 4x larger as coverage
masks and reduced; boxes without rounded corners sit on the pixel grid, so side by side they
join cleanly. Masks of repeated shapes (every tile of a judgement) are made once. Text is
drawn by FreeType in DejaVu Sans (the copy that comes with matplotlib, else the system's,
else Pillow's own font), scaled down where needed to the Helvetica width the layout planned.

The image is painted directly as palette indices: every flat colour has its own entry (so
fills are exact), every pair of a colour painted over another has 11 blends for its edges,
and an edge pixel takes the blend nearest its coverage. Painting one byte per pixel and
storing it as it is (no quantising afterwards) is what keeps a 100-study table fast.
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


SMALL = 100_000  # pixels: masks up to this size are kept for reuse


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


RGB = tuple[int, int, int]
LEVELS = 12  # coverage steps of an anti-aliased edge (11 blends between two colours)


_LEVEL = [round(m * LEVELS / 255) for m in range(256)]  # coverage -> step of a ramp
_PAINTS = [0 if level == 0 else 255 for level in _LEVEL]  # coverage -> painted at all
_CUTS: dict[int, tuple[object, object]] = {}  # id(mask) -> (mask, its 0/255 mask)


def _cut(mask):
    """The 0/255 mask of the pixels a coverage mask paints at all; kept for small masks (the
    repeated ones), which this dict keeps alive so their ids stay theirs."""
    entry = _CUTS.get(id(mask))
    if entry is not None:
        return entry[1]
    cut = mask.point(_PAINTS)
    if mask.width * mask.height <= 20_000:  # tiles and letters; at most ~80 MB in all
        if len(_CUTS) >= 2048:
            _CUTS.clear()
        _CUTS[id(mask)] = (mask, cut)
    return cut


class _Canvas:
    """The image as palette indices (mode "L" until the palette is attached), painted through
    coverage masks. Each flat colour gets an entry; each pair of a colour painted over
    another gets LEVELS - 1 entries for its blends, so an edge pixel takes the blend nearest
    its coverage. Flat colours stay exact and nothing is quantised afterwards."""

    def __init__(self, fig: Figure):
        from PIL import Image, ImageDraw

        self.entries: list[RGB] = []
        self.flat: dict[RGB, int] = {}
        self.ramps: dict[tuple[int, int], list[int]] = {}
        self.indexed: dict[tuple[int, int, int], tuple] = {}  # (mask, index image)
        self.split: dict[tuple[int, int], tuple] = {}  # keeps its masks alive, as indexed does
        background = self.index(_rgb(fig.background))
        size = (math.ceil(fig.width * SCALE), math.ceil(fig.height * SCALE))
        self.im = Image.new("L", size, background)
        self.draw = ImageDraw.Draw(self.im)

    def _entry(self, colour: RGB) -> int:
        """A palette entry for ``colour``; once the palette is full, the nearest one."""
        if len(self.entries) < 256:
            self.entries.append(colour)
            return len(self.entries) - 1
        return min(range(256), key=lambda i: sum((a - b) ** 2 for a, b in
                                                 zip(self.entries[i], colour)))  # fmt: skip

    def index(self, colour: RGB) -> int:
        if colour not in self.flat:
            self.flat[colour] = self._entry(colour)
        return self.flat[colour]

    def ramp(self, top: int, below: int) -> list[int]:
        """Entries for coverage 0..LEVELS of ``top`` painted over ``below``."""
        key = (top, below)
        if key not in self.ramps:
            a, b = self.entries[top], self.entries[below]
            middle = [self._entry(_mix(a, b, i / LEVELS)) for i in range(1, LEVELS)]
            self.ramps[key] = [below, *middle, top]
        return self.ramps[key]

    def under(self, x: int, y: int) -> int:
        """The flat colour at a pixel (the nearest one, should it be an edge)."""
        x = min(max(x, 0), self.im.width - 1)
        y = min(max(y, 0), self.im.height - 1)
        seen = self.entries[self.im.getpixel((x, y))]
        if seen in self.flat:
            return self.flat[seen]
        nearest = min(self.flat, key=lambda c: sum((a - b) ** 2 for a, b in zip(c, seen)))
        return self.flat[nearest]

    def paint(self, colour: RGB, at: tuple[int, int], mask, below: int) -> None:
        """Paint ``colour`` through the coverage ``mask`` with its top-left corner at ``at``;
        partly covered pixels take the blend with the flat colour ``below``."""
        top = self.index(colour)
        key = (id(mask), top, below)
        if key not in self.indexed:
            ramp = self.ramp(top, below) if top != below else [top] * (LEVELS + 1)
            # the mask is kept with its image, so its id is not reused while the canvas lives
            self.indexed[key] = (mask, mask.point([ramp[level] for level in _LEVEL]))
        self.im.paste(self.indexed[key][1], at, _cut(mask))

    def box(self, b: Box) -> None:
        if not b.radius and not b.dash:
            self.square_box(b)
            return
        x0, y0, w, h = _snap(b)
        sw = b.stroke_width * SCALE if b.stroke else 0.0
        fill, outline, pad = _masks(w, h, round(b.radius * SCALE, 2), round(sw, 2), b.dash)
        at = (x0 - pad, y0 - pad)
        outside = self.under(*at)
        inside = outside
        if b.fill:
            self.paint(_rgb(b.fill), at, fill, outside)
            inside = self.index(_rgb(b.fill))
        if b.hatch is not None:
            from PIL import ImageChops

            mask = _hatch_mask(b.hatch, x0, y0, w, h)
            if b.radius:
                mask = ImageChops.multiply(mask, fill.crop((pad, pad, pad + w, pad + h)))
            self.paint(_rgb(b.hatch.colour), (x0, y0), mask, inside)
        if outline is None:
            return
        if not b.fill:
            self.paint(_rgb(b.stroke), at, outline, outside)
            return
        # an outline straddles the edge: where it lies over the fill its edges blend with the
        # fill, elsewhere with the outside
        inner, outer = self.halves(fill, outline)
        self.paint(_rgb(b.stroke), at, outer, outside)
        self.paint(_rgb(b.stroke), at, inner, inside)

    def square_box(self, b: Box) -> None:
        """A box without rounded corners, on the pixel grid: sharp, nothing to blend (only the
        hatch), so boxes side by side (the segments of a bar) join cleanly. The outline is a
        whole number of pixels wide."""
        x0, y0, w, h = _snap(b)
        inside = self.under(x0, y0)
        if b.fill:
            inside = self.index(_rgb(b.fill))
            self.draw.rectangle((x0, y0, x0 + w - 1, y0 + h - 1), fill=inside)
        if b.hatch is not None:
            self.paint(_rgb(b.hatch.colour), (x0, y0), _hatch_mask(b.hatch, x0, y0, w, h), inside)
        if b.stroke and b.stroke_width > 0:
            t = max(1, round(b.stroke_width * SCALE))
            a, z = -(t // 2), t - t // 2 - 1  # the line's pixels around each edge
            ink = self.index(_rgb(b.stroke))
            x1, y1 = x0 + w, y0 + h
            for rect in (
                (x0 + a, y0 + a, x1 + z, y0 + z),
                (x0 + a, y1 + a, x1 + z, y1 + z),
                (x0 + a, y0 + a, x0 + z, y1 + z),
                (x1 + a, y0 + a, x1 + z, y1 + z),
            ):
                self.draw.rectangle(rect, fill=ink)  # fmt: skip

    def halves(self, fill, outline):
        """(over the fill, outside it): the outline mask split at the fill's half coverage."""
        from PIL import ImageChops

        key = (id(fill), id(outline))
        if key not in self.split:
            over = fill.point([255 if v >= 128 else 0 for v in range(256)])
            inner = ImageChops.multiply(outline, over)
            self.split[key] = (fill, outline, inner, ImageChops.subtract(outline, inner))
        return self.split[key][2:]

    def dot(self, d: Dot) -> None:
        mask, half = _dot_mask(round(d.r * SCALE, 2))
        at = (round(d.cx * SCALE) - half, round(d.cy * SCALE) - half)
        self.paint(_rgb(d.fill), at, mask, self.under(*at))

    def label(self, t: Label) -> None:
        if not t.text:
            return
        mask, left, top = _text_mask(t.text, t.size, t.bold, t.anchor)
        x, y = round(t.x * SCALE) + left, round(t.y * SCALE) + top
        below = self.under(x + mask.width // 2, y + mask.height // 2)
        self.paint(_rgb(t.colour), (x, y), mask, below)

    def line(self, line: Line) -> None:
        t = line.width * SCALE
        x1, y1, x2, y2 = (v * SCALE for v in (line.x1, line.y1, line.x2, line.y2))
        colour = self.index(_rgb(line.colour))
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

    def encode(self, ppi: float) -> bytes:
        self.im.putpalette([v for c in self.entries for v in c])  # "L" becomes "P"
        out = io.BytesIO()
        self.im.save(out, format="PNG", compress_level=COMPRESSION, dpi=(ppi, ppi))
        return out.getvalue()


def _paint(fig: Figure) -> _Canvas:
    canvas = _Canvas(fig)
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


MAX_PIXELS = 40_000_000  # 40 MB of image in memory; a table of about 200 studies


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
    """The figure as a palette PNG at 300 ppi (its physical size is the figure's, in points);
    a figure that would exceed MAX_PIXELS is drawn at the resolution that fits (stated in the
    file)."""
    pixels = fig.width * SCALE * fig.height * SCALE
    ppi = DPI
    if pixels > MAX_PIXELS:
        f = math.sqrt(MAX_PIXELS / pixels)
        fig, ppi = _scaled(fig, f), DPI * f
    return _paint(fig).encode(ppi)
