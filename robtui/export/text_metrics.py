"""Text for the figures: one-line cleaning and width estimates (pure, no fonts loaded).

Widths are the advance widths of Helvetica and Helvetica-Bold, in 1/1000 of the font size,
for the WinAnsi bytes 32..255 (PDF 1.7, ISO 32000-1, Annex D.2). They were read off Adobe's
Core 14 AFM files (Helvetica.afm, Helvetica-Bold.afm, Copyright 1985-1997 Adobe Systems;
the copies distributed with matplotlib in mpl-data/fonts/pdfcorefonts), glyph names mapped to
WinAnsi codes with pdfminer's latin_enc table; 0 marks a byte WinAnsi leaves undefined. The
PDF figures use these fonts, so there the widths are exact; SVG viewers substitute a
metric-compatible face (Arial, Liberation Sans) or a close one; the PNG renderer fits its
font to these widths.
"""

from __future__ import annotations

import unicodedata
from functools import lru_cache

# fmt: off
_REGULAR = (
    278, 278, 355, 556, 556, 889, 667, 191, 333, 333, 389, 584, 278, 333, 278, 278, 556, 556,
    556, 556, 556, 556, 556, 556, 556, 556, 278, 278, 584, 584, 584, 556, 1015, 667, 667, 722,
    722, 667, 611, 778, 722, 278, 500, 667, 556, 833, 722, 778, 667, 778, 722, 667, 611, 722,
    667, 944, 667, 667, 611, 278, 278, 278, 469, 556, 333, 556, 556, 500, 556, 556, 278, 556,
    556, 222, 222, 500, 222, 833, 556, 556, 556, 556, 333, 500, 278, 556, 500, 722, 500, 500,
    500, 334, 260, 334, 584, 0, 556, 0, 222, 556, 333, 1000, 556, 556, 333, 1000, 667, 333,
    1000, 0, 611, 0, 0, 222, 222, 333, 333, 350, 556, 1000, 333, 1000, 500, 333, 944, 0, 500,
    667, 278, 333, 556, 556, 556, 556, 260, 556, 333, 737, 370, 556, 584, 278, 737, 333, 400,
    584, 333, 333, 333, 556, 537, 278, 333, 333, 365, 556, 834, 834, 834, 611, 667, 667, 667,
    667, 667, 667, 1000, 722, 667, 667, 667, 667, 278, 278, 278, 278, 722, 722, 778, 778, 778,
    778, 778, 584, 778, 722, 722, 722, 722, 667, 667, 611, 556, 556, 556, 556, 556, 556, 889,
    500, 556, 556, 556, 556, 278, 278, 278, 278, 556, 556, 556, 556, 556, 556, 556, 584, 611,
    556, 556, 556, 556, 500, 556, 500,
)
_BOLD = (
    278, 333, 474, 556, 556, 889, 722, 238, 333, 333, 389, 584, 278, 333, 278, 278, 556, 556,
    556, 556, 556, 556, 556, 556, 556, 556, 333, 333, 584, 584, 584, 611, 975, 722, 722, 722,
    722, 667, 611, 778, 722, 278, 556, 722, 611, 833, 722, 778, 667, 778, 722, 667, 611, 722,
    667, 944, 667, 667, 611, 333, 278, 333, 584, 556, 333, 556, 611, 556, 611, 556, 333, 611,
    611, 278, 278, 556, 278, 889, 611, 611, 611, 611, 389, 556, 333, 611, 556, 778, 556, 556,
    500, 389, 280, 389, 584, 0, 556, 0, 278, 556, 500, 1000, 556, 556, 333, 1000, 667, 333,
    1000, 0, 611, 0, 0, 278, 278, 500, 500, 350, 556, 1000, 333, 1000, 556, 333, 944, 0, 500,
    667, 278, 333, 556, 556, 556, 556, 280, 556, 333, 737, 370, 556, 584, 278, 737, 333, 400,
    584, 333, 333, 333, 611, 556, 278, 333, 333, 365, 556, 834, 834, 834, 611, 722, 722, 722,
    722, 722, 722, 1000, 722, 667, 667, 667, 667, 278, 278, 278, 278, 722, 722, 778, 778, 778,
    778, 778, 584, 778, 722, 722, 722, 722, 667, 667, 611, 556, 556, 556, 556, 556, 556, 889,
    556, 556, 556, 556, 556, 278, 278, 278, 278, 611, 611, 611, 611, 611, 611, 611, 584, 611,
    611, 611, 611, 611, 556, 611, 556,
)
# fmt: on

# Helvetica's cap height is 718/1000 of the font size (from the same AFM files): a baseline at
# centre + CAP_HALF * size centres capitals and digits on a row.
CAP_HALF = 0.359
REPLACEMENT = "\ufffd"  # shown for characters a figure cannot hold (controls, lone surrogates)


def one_line(text: object) -> str:
    """User text for a figure label: one line, single spaces, no control characters.

    Control characters and lone surrogates (which XML and PDF text cannot carry) become
    U+FFFD, so what was there stays visible instead of vanishing."""
    words = " ".join(("" if text is None else str(text)).split())
    return "".join(REPLACEMENT if unicodedata.category(ch) in ("Cc", "Cs") else ch for ch in words)


def winansi_byte(ch: str) -> int | None:
    """The WinAnsi byte of a character, or None when WinAnsi has no such character."""
    try:
        code = ch.encode("cp1252")  # cp1252 is WinAnsi; its undefined bytes raise here too
    except UnicodeEncodeError:
        return None
    if len(code) != 1 or code[0] < 32 or _REGULAR[code[0] - 32] == 0:
        return None
    return code[0]


def _char_width(ch: str, table: tuple[int, ...]) -> int:
    code = winansi_byte(ch)
    if code is not None:
        return table[code - 32]
    if unicodedata.combining(ch):
        return 0
    # our estimate outside WinAnsi: full width for wide East Asian characters, else the width
    # of a Helvetica digit
    return 1000 if unicodedata.east_asian_width(ch) in ("W", "F") else 556


@lru_cache(maxsize=8192)
def text_width(text: str, size: float, bold: bool = False) -> float:
    """Width in points of ``text`` set in Helvetica (bold) at ``size`` points, no kerning."""
    table = _BOLD if bold else _REGULAR
    return sum(_char_width(ch, table) for ch in text) * size / 1000.0
