"""The colours, labels and glyphs of robtui's exports, and the arithmetic to check them.

Our own scheme: light sky blue (low), ochre (some concerns), aubergine (high) and near-white
with a dashed outline (not judged); the fills darken with severity, so greyscale keeps the
order, and every cell also carries a letter.
The checks (tests/export/test_palette.py) simulate protanopia, deuteranopia and tritanopia
with the Machado, Oliveira & Fernandes (2009) model (IEEE TVCG 15(6):1291-1298, severity 100,
as implemented by colorspacious) and require a CIEDE2000 distance >= 20 between every pair;
text on each cell meets WCAG 2.1 contrast >= 4.5:1.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from robtui.core.questions import JUDGEMENT_LABELS

CODES: tuple[str, ...] = ("low", "some_concerns", "high", "incomplete")


@dataclass(frozen=True)
class Swatch:
    fill: str  # "#rrggbb"
    ink: str  # text colour on the fill
    letter: str  # one-letter label inside a cell
    hatch: str  # matplotlib hatch for bars, so the plot reads in greyscale too
    code: str = "incomplete"

    @property
    def label(self) -> str:
        """Words for legends and tooltips (the one judgement label table)."""
        return JUDGEMENT_LABELS[self.code]


SWATCHES: dict[str, Swatch] = {
    "low": Swatch("#86BCE6", "#111111", "L", "", "low"),
    "some_concerns": Swatch("#C8812A", "#111111", "S", "..", "some_concerns"),
    "high": Swatch("#3D1A4F", "#FFFFFF", "H", "//", "high"),
    "incomplete": Swatch("#FAFAFA", "#111111", "\u00b7", "", "incomplete"),
}
OUTLINE = "#5A5A5A"  # dashed outline of "not judged" cells


def swatch(code: str | None) -> Swatch:
    """The swatch of a judgement code; anything not judged (None, incomplete) shares one."""
    return SWATCHES.get(code or "incomplete", SWATCHES["incomplete"])


def hex_to_rgb(colour: str) -> tuple[float, float, float]:
    """'#rrggbb' -> sRGB components in 0..1."""
    value = colour.lstrip("#")
    return tuple(int(value[i : i + 2], 16) / 255.0 for i in (0, 2, 4))  # type: ignore[return-value]


def relative_luminance(colour: str) -> float:
    """WCAG 2.1 relative luminance (W3C, Web Content Accessibility Guidelines 2.1, 1.4.3)."""

    def channel(c: float) -> float:
        return c / 12.92 if c <= 0.04045 else ((c + 0.055) / 1.055) ** 2.4

    r, g, b = (channel(c) for c in hex_to_rgb(colour))
    return 0.2126 * r + 0.7152 * g + 0.0722 * b


def contrast_ratio(first: str, second: str) -> float:
    """WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05), lighter over darker."""
    high, low = sorted((relative_luminance(first), relative_luminance(second)), reverse=True)
    return (high + 0.05) / (low + 0.05)


def ciede2000(lab1: tuple[float, float, float], lab2: tuple[float, float, float]) -> float:
    """CIEDE2000 colour difference (kL = kC = kH = 1), following Sharma, Wu & Dalal (2005),
    Color Res Appl 30(1):21-30."""
    l1, a1, b1 = lab1
    l2, a2, b2 = lab2
    c_bar = (math.hypot(a1, b1) + math.hypot(a2, b2)) / 2.0
    g = 0.5 * (1.0 - math.sqrt(c_bar**7 / (c_bar**7 + 25.0**7)))
    a1p, a2p = (1.0 + g) * a1, (1.0 + g) * a2
    c1p, c2p = math.hypot(a1p, b1), math.hypot(a2p, b2)
    h1p = math.degrees(math.atan2(b1, a1p)) % 360.0 if c1p else 0.0
    h2p = math.degrees(math.atan2(b2, a2p)) % 360.0 if c2p else 0.0
    d_l, d_c = l2 - l1, c2p - c1p
    if c1p * c2p == 0:
        d_h_angle = 0.0
    else:
        d_h_angle = h2p - h1p
        if d_h_angle > 180:
            d_h_angle -= 360
        elif d_h_angle < -180:
            d_h_angle += 360
    d_h = 2.0 * math.sqrt(c1p * c2p) * math.sin(math.radians(d_h_angle / 2.0))
    l_bar, cp_bar = (l1 + l2) / 2.0, (c1p + c2p) / 2.0
    if c1p * c2p == 0:
        h_bar = h1p + h2p
    elif abs(h1p - h2p) <= 180:
        h_bar = (h1p + h2p) / 2.0
    elif h1p + h2p < 360:
        h_bar = (h1p + h2p + 360.0) / 2.0
    else:
        h_bar = (h1p + h2p - 360.0) / 2.0
    t = (
        1.0
        - 0.17 * math.cos(math.radians(h_bar - 30))
        + 0.24 * math.cos(math.radians(2 * h_bar))
        + 0.32 * math.cos(math.radians(3 * h_bar + 6))
        - 0.20 * math.cos(math.radians(4 * h_bar - 63))
    )
    d_theta = 30.0 * math.exp(-(((h_bar - 275.0) / 25.0) ** 2))
    r_c = 2.0 * math.sqrt(cp_bar**7 / (cp_bar**7 + 25.0**7))
    s_l = 1.0 + 0.015 * (l_bar - 50) ** 2 / math.sqrt(20 + (l_bar - 50) ** 2)
    s_c = 1.0 + 0.045 * cp_bar
    s_h = 1.0 + 0.015 * cp_bar * t
    r_t = -math.sin(math.radians(2 * d_theta)) * r_c
    return math.sqrt(
        (d_l / s_l) ** 2 + (d_c / s_c) ** 2 + (d_h / s_h) ** 2 + r_t * (d_c / s_c) * (d_h / s_h)
    )
