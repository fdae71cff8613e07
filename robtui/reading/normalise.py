"""Character clean-up for text taken from PDFs: ligatures, odd spaces, soft hyphens."""

from __future__ import annotations

import unicodedata

_TABLE = {
    0xFB00: "ff",
    0xFB01: "fi",
    0xFB02: "fl",
    0xFB03: "ffi",
    0xFB04: "ffl",
    0xFB05: "st",
    0xFB06: "st",
    0x00A0: " ",
    0x2002: " ",
    0x2003: " ",
    0x2004: " ",
    0x2005: " ",
    0x2006: " ",
    0x2007: " ",
    0x2008: " ",
    0x2009: " ",
    0x200A: " ",
    0x202F: " ",
    0x205F: " ",
    0x3000: " ",
    0x00AD: None,  # soft hyphen
    0x200B: None,  # zero-width space
    0x200C: None,
    0x200D: None,
    0xFEFF: None,
    0x2212: "−",  # keep the minus sign as it is (listed to show it is deliberate)
}


def normalise_chars(text: str) -> str:
    """Ligatures spelled out, unusual spaces made plain, invisible characters dropped (NFC)."""
    return unicodedata.normalize("NFC", text.translate(_TABLE))
