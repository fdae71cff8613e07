"""A PDF page's characters, horizontal rules and image count, read with pypdfium2.

PDFium parses the page in C++ and hands over its text layer; only what the reader uses is
asked for: per character its text, origin (baseline), box, font and size; per path object its
bounds when it is a thin horizontal rule; images are counted, never decoded. Coordinates are
turned into points from the top-left of the crop box, and into the frame in which the page's
text reads left to right (a page whose text is drawn turned by 90 degrees is turned back).
"""

from __future__ import annotations

import ctypes
import math
import re
from collections import Counter
from dataclasses import dataclass, field
from functools import cache
from types import SimpleNamespace

RULE_MAX_HEIGHT = 2.0  # a path this flat (points) is a rule, not a shape
RULE_MIN_WIDTH = 60.0
SHAPE_MIN = 3.0  # a path smaller than this both ways (a dot, a glyph-like mark) is no shape
MAX_SHAPES = 3000  # a page with more drawn paths is vector art: figures are not searched
MAX_FORM_OBJECTS = 20000  # objects inside forms searched for clipped text, per page
CLIP_SLACK = 1.0  # points: a glyph whose centre is this near its clip still shows
# PDFium's loose box spans the font's declared ascent and descent; symbol and math fonts declare
# a descent of nearly a whole em, so a "=" or a stacked "-" would reach into the next line. A
# box taller than TALL_BOX of the size (and under SANE_BOX: a larger one means the size itself is
# wrong) ends DESCENT_MAX of the size below its baseline, as a text font's does.
TALL_BOX, SANE_BOX, DESCENT_MAX = 1.3, 3.0, 0.3
Box = tuple[float, float, float, float]
_SUBSET = re.compile(r"^[A-Z]{6}\+")  # the subset tag of an embedded font


@dataclass(slots=True)
class Glyph:
    """One character in reading frame: x0/x1 its advance, baseline its origin's y (from top)."""

    text: str
    x0: float
    x1: float
    top: float
    bottom: float
    baseline: float
    size: float
    font: str
    angle: int  # 0, 90, 180, 270 (degrees, quantised) or -1 for any other angle
    space_before: bool = False  # PDFium guessed a space before this glyph


@dataclass
class PageGlyphs:
    number: int
    width: float
    height: float
    glyphs: list[Glyph]  # text in the page's main reading direction, content-stream order
    turned: list[Glyph]  # text drawn at another angle (rotated tables, margin stamps)
    rules: list[tuple[float, float, float]]  # horizontal rules: x0, x1, top
    images: int
    shapes: list[tuple[float, float, float, float]] = field(default_factory=list)  # drawn paths


def _quantise(radians: float) -> int:
    degrees = math.degrees(radians) % 360
    for q in (0, 90, 180, 270, 360):
        if abs(degrees - q) < 2:
            return q % 360
    return -1


_VALUES = (ctypes.c_int, ctypes.c_uint, ctypes.c_ulong, ctypes.c_double, ctypes.c_float)


def _plain(function):
    """A twin of a pypdfium2 raw binding that takes and returns pointers as plain addresses
    (``c_void_p``: ints and ``byref`` both pass). The typed pointers of the bindings cost ctypes
    more per call than PDFium's own work when asked once per character; the twin calls the same
    PDFium function."""
    def plain(kind):
        return kind if kind is None or kind in _VALUES else ctypes.c_void_p

    prototype = ctypes.CFUNCTYPE(plain(function.restype), *map(plain, function.argtypes))
    return prototype(ctypes.cast(function, ctypes.c_void_p).value)


@cache
def _pdfium():
    """The PDFium calls made per character or per text object, as :func:`_plain` twins."""
    from pypdfium2 import raw

    names = ("FPDFText_CountChars", "FPDFText_GetUnicode", "FPDFText_IsGenerated", "FPDFText_GetCharOrigin",
             "FPDFText_GetLooseCharBox", "FPDFText_GetTextObject", "FPDFText_GetMatrix",
             "FPDFText_GetFontSize", "FPDFTextObj_GetFont", "FPDFFont_GetBaseFontName")
    return SimpleNamespace(raw=raw, **{name.split("_", 1)[1]: _plain(getattr(raw, name))
                                       for name in names})


class _Fonts:
    """Font name, size scale and angle by PDFium text object (asked once per object; a font's
    name once per font)."""

    def __init__(self, calls) -> None:
        self.calls = calls
        self.by_object: dict[int, tuple[str, float, int]] = {}
        self.names: dict[int, str] = {}
        self.buffer = ctypes.create_string_buffer(256)
        self.matrix = calls.raw.FS_MATRIX()
        self.matrix_ref = ctypes.byref(self.matrix)

    def of(self, textpage: int, index: int, address: int) -> tuple[str, float, int]:
        """(font name, size in points, angle) of the text object at ``address``."""
        found = self.by_object.get(address)
        if found is not None:
            return found
        calls, m = self.calls, self.matrix
        calls.GetMatrix(textpage, index, self.matrix_ref)
        scale = math.hypot(m.c, m.d) or 1.0
        size = calls.GetFontSize(textpage, index) * scale
        font = calls.GetFont(address) if address else None
        name = self.names.get(font) if font else ""
        if name is None:
            name = ""
            if calls.GetBaseFontName(font, self.buffer, 256):
                name = _SUBSET.sub("", self.buffer.value.decode("utf-8", "replace"))
            self.names[font] = name
        found = (name, size, _quantise(math.atan2(m.b, m.a)))
        self.by_object[address] = found
        return found


def read_glyphs(page, number: int) -> PageGlyphs:
    """The glyphs, rules and image count of a pypdfium2 ``PdfPage``."""
    left, bottom, right, top = page.get_cropbox()
    width, height = right - left, top - bottom
    rules, shapes, images, forms = _objects(page, left, top)
    frames: dict[int, Box] = {}
    if forms:
        frames = _form_contents(forms, left, top, shapes)
    textpage = page.get_textpage()
    try:
        chars = _chars(_pdfium(), ctypes.cast(textpage.raw, ctypes.c_void_p).value, left, top,
                       frames)
    finally:
        textpage.close()
    angles = Counter(c.angle for c in chars if not c.text.isspace())
    main = angles.most_common(1)[0][0] if angles else 0
    if main not in (0, -1):
        chars = [_turn(c, main, width, height) for c in chars]
        # the rules of a table set landscape are turned with its text; the drawings are not
        rules = _turned_rules(shapes, main, width, height)
        shapes = []
        if main in (90, 270):
            width, height = height, width
        main = 0
    glyphs = [c for c in chars if c.angle == main]
    turned = [c for c in chars if c.angle != main]
    return PageGlyphs(number, width, height, glyphs, turned, rules, images, shapes)


def _chars(calls, tp: int, left: float, top: float,
           frames: dict[int, Box] | None = None) -> list[Glyph]:
    """The characters of the text page at address ``tp`` (see :func:`_pdfium`), but those
    whose centre lies outside their text object's frame in ``frames`` (hidden by a clip)."""
    frames = frames or {}
    frame: Box | None = None
    fonts = _Fonts(calls)
    text_object = calls.GetTextObject
    unicode_of, generated = calls.GetUnicode, calls.IsGenerated
    origin_of, box_of = calls.GetCharOrigin, calls.GetLooseCharBox
    ox, oy = ctypes.c_double(), ctypes.c_double()
    pox, poy = ctypes.byref(ox), ctypes.byref(oy)
    rect = calls.raw.FS_RECTF()
    prect = ctypes.byref(rect)
    out: list[Glyph] = []
    last_address, font = -1, ("", 0.0, 0)
    space_before = False
    for i in range(calls.CountChars(tp)):
        code = unicode_of(tp, i)
        if code in (0x0D, 0x0A):
            continue  # PDFium's own line breaks: the baselines decide here
        if code == 0x20 and generated(tp, i):
            space_before = True  # PDFium's guess from the font's spacing: words_of weighs it
            continue
        # a control code is a glyph the PDF maps to no character (a bullet, a prime drawn
        # from a symbol font): shown as the replacement character, never as a control code
        plain = code >= 0x20 and not 0xD800 <= code <= 0xDFFF or code in (0x02, 0x09)
        text = chr(code) if plain else "\ufffd"
        origin_of(tp, i, pox, poy)
        box_of(tp, i, prect)
        address = text_object(tp, i) or 0
        if address != last_address:
            font = fonts.of(tp, i, address)
            frame = frames.get(address)
            last_address = address
        if frame is not None:
            cx, cy = (rect.left + rect.right) / 2 - left, top - (rect.top + rect.bottom) / 2
            if not (frame[0] - CLIP_SLACK <= cx <= frame[2] + CLIP_SLACK
                    and frame[1] - CLIP_SLACK <= cy <= frame[3] + CLIP_SLACK):
                space_before = False
                continue
        name, size, angle = font
        if angle == 0:
            x0, x1 = rect.left - left, rect.right - left
            gtop, gbottom = top - rect.top, top - rect.bottom
            baseline = top - oy.value
            if TALL_BOX * size < gbottom - gtop < SANE_BOX * size:
                gbottom = min(gbottom, baseline + DESCENT_MAX * size)
        else:  # kept in page coordinates; _turn maps them into the text's own frame
            x0, x1 = min(rect.left, rect.right) - left, max(rect.left, rect.right) - left
            gtop, gbottom = top - max(rect.top, rect.bottom), top - min(rect.top, rect.bottom)
            baseline = ox.value - left if angle in (90, 270) else top - oy.value
        glyph = Glyph(text, x0, x1, gtop, gbottom, baseline, size, name, angle, space_before)
        space_before = False
        if code == 0x02:
            glyph.text = "-"  # PDFium's mark for a hyphen ending a line: the text builder decides
        out.append(glyph)
    return out


def _turn(g: Glyph, angle: int, width: float, height: float) -> Glyph:
    """Map a glyph drawn at ``angle`` into the frame where it reads left to right."""
    if angle == 90:  # text runs up the page: reading x is page y (from bottom)
        x0, x1 = height - g.bottom, height - g.top
        top, bottom = g.x0, g.x1
        baseline = g.baseline
    elif angle == 270:  # text runs down the page
        x0, x1 = g.top, g.bottom
        top, bottom = width - g.x1, width - g.x0
        baseline = width - g.baseline
    elif angle == 180:
        x0, x1 = width - g.x1, width - g.x0
        top, bottom = height - g.bottom, height - g.top
        baseline = height - g.baseline
    else:
        return g
    return Glyph(g.text, x0, x1, top, bottom, baseline, g.size, g.font, 0 if g.angle == angle else -1, g.space_before)


def _turned_rules(shapes: list[Box], angle: int, width: float, height: float
                  ) -> list[tuple[float, float, float]]:
    """The paths that are horizontal rules in the frame where text drawn at ``angle`` reads
    left to right (on a page set landscape, its vertical lines), as x0, x1, top."""
    rules = []
    for x0, top, x1, bottom in shapes:
        if angle == 90:
            x0, top, x1, bottom = height - bottom, x0, height - top, x1
        elif angle == 270:
            x0, top, x1, bottom = top, width - x1, bottom, width - x0
        else:  # 180
            x0, top, x1, bottom = width - x1, height - bottom, width - x0, height - top
        if bottom - top <= RULE_MAX_HEIGHT and x1 - x0 > RULE_MIN_WIDTH:
            rules.append((x0, x1, top))
    return rules


def _objects(
    page, left: float, top: float
) -> tuple[list[tuple[float, float, float]], list[Box], int, list]:
    """Horizontal rules, the bounds of drawn shapes (paths; for figures), the number of
    images and the form objects, from the page's top-level objects; past MAX_SHAPES paths only
    rules are kept."""
    from pypdfium2 import raw

    rules: list[tuple[float, float, float]] = []
    shapes: list[Box] = []
    forms: list = []
    images = 0
    x0, y0, x1, y1 = (ctypes.c_float() for _ in range(4))
    handle = page.raw
    for i in range(raw.FPDFPage_CountObjects(handle)):
        obj = raw.FPDFPage_GetObject(handle, i)
        kind = raw.FPDFPageObj_GetType(obj)
        if kind == raw.FPDF_PAGEOBJ_IMAGE:
            images += 1
        elif kind == raw.FPDF_PAGEOBJ_FORM:
            forms.append(obj)
        elif kind == raw.FPDF_PAGEOBJ_PATH and raw.FPDFPageObj_GetBounds(obj, x0, y0, x1, y1):
            w, h = x1.value - x0.value, y1.value - y0.value
            if h <= RULE_MAX_HEIGHT and w > RULE_MIN_WIDTH:
                rules.append((x0.value - left, x1.value - left, top - y1.value))
            if len(shapes) <= MAX_SHAPES and (w >= SHAPE_MIN or h >= SHAPE_MIN):
                shapes.append((x0.value - left, top - y1.value, x1.value - left, top - y0.value))
    return rules, shapes, images, forms


def _intersect(a: Box | None, b: Box | None) -> Box | None:
    """The overlap of two (x0, y0, x1, y1) boxes; either alone when the other is None."""
    if a is None or b is None:
        return a if b is None else b
    return (max(a[0], b[0]), max(a[1], b[1]), min(a[2], b[2]), min(a[3], b[3]))


def _clip_box(raw, obj, matrix) -> Box | None:
    """The bounds (x0, y0, x1, y1 in page space, y up) of the intersection of an object's clip
    paths' bounds, its own space mapped by ``matrix`` (a pypdfium2 PdfMatrix); None when it
    has no clip."""
    clip = raw.FPDFPageObj_GetClipPath(obj)
    if not clip:
        return None
    box = None
    x, y = ctypes.c_float(), ctypes.c_float()
    for p in range(max(raw.FPDFClipPath_CountPaths(clip), 0)):
        points = []
        for k in range(max(raw.FPDFClipPath_CountPathSegments(clip, p), 0)):
            segment = raw.FPDFClipPath_GetPathSegment(clip, p, k)
            if segment and raw.FPDFPathSegment_GetPoint(segment, x, y):
                points.append(matrix.on_point(x.value, y.value))
        if points:
            xs, ys = [px for px, _ in points], [py for _, py in points]
            box = _intersect(box, (min(xs), min(ys), max(xs), max(ys)))
    return box


def _form_contents(forms: list, left: float, top: float, shapes: list[Box]) -> dict[int, Box]:
    """For each text object drawn inside a form XObject (a page or figure placed from another
    PDF) under a clip, the frame it can be seen in: its clip paths' bounds, intersected with
    those of the forms around it, in points from the crop box's top left. A page embedded to
    show one figure keeps the rest of its text, hidden by the clip: PDFium's text layer holds
    it all the same. Top-level text is not searched (it is seldom clipped away, and asking
    for every object's clip costs time). The bounds of the paths the forms draw (a flowchart's
    boxes placed as a form) are added to ``shapes``, as the page's own are, up to MAX_SHAPES."""
    from pypdfium2 import PdfMatrix, raw

    frames: dict[int, Box] = {}
    budget = [MAX_FORM_OBJECTS]
    m = raw.FS_MATRIX()
    x0, y0, x1, y1 = (ctypes.c_float() for _ in range(4))

    def walk(form, outer: PdfMatrix, around: Box | None) -> None:
        matrix = PdfMatrix.from_raw(m) if raw.FPDFPageObj_GetMatrix(form, m) else PdfMatrix()
        # a form's clip is in the space around it; what it draws is in its own matrix's space
        around = _intersect(_clip_box(raw, form, outer), around)
        inner = matrix.multiply(outer)
        for i in range(max(raw.FPDFFormObj_CountObjects(form), 0)):
            budget[0] -= 1
            if budget[0] < 0:
                return
            obj = raw.FPDFFormObj_GetObject(form, i)
            kind = raw.FPDFPageObj_GetType(obj)
            if kind == raw.FPDF_PAGEOBJ_FORM:
                walk(obj, inner, around)
            elif kind == raw.FPDF_PAGEOBJ_TEXT:
                box = _intersect(_clip_box(raw, obj, inner), around)
                if box is not None:
                    frames[ctypes.cast(obj, ctypes.c_void_p).value] = (
                        box[0] - left, top - box[3], box[2] - left, top - box[1])
            elif (kind == raw.FPDF_PAGEOBJ_PATH and len(shapes) <= MAX_SHAPES
                  and raw.FPDFPageObj_GetBounds(obj, x0, y0, x1, y1)):
                corners = [inner.on_point(x, y) for x in (x0.value, x1.value)
                           for y in (y0.value, y1.value)]
                xs, ys = [px for px, _ in corners], [py for _, py in corners]
                if max(xs) - min(xs) >= SHAPE_MIN or max(ys) - min(ys) >= SHAPE_MIN:
                    shapes.append((min(xs) - left, top - max(ys), max(xs) - left, top - min(ys)))

    for form in forms:
        walk(form, PdfMatrix(), None)
    return frames
