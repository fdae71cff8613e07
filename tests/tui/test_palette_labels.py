"""Judgement badges on screen: the exports' swatches, and never colour alone."""

from __future__ import annotations

from robtui.export.palette import swatch
from robtui.tui.palette import badge, cell_badge

CODES = ("low", "some_concerns", "high", "incomplete")


def test_every_badge_carries_letter_and_words_in_the_export_colours():
    shown = set()
    for code in CODES:
        sw = swatch(code)
        for text in (badge(code), cell_badge(code)):
            assert text.plain.strip().startswith(sw.letter)
            assert len(text.plain.strip()) > 2  # a word follows the letter
            assert sw.fill.lower() in str(text.style).lower()
        shown.add(badge(code).plain)
    assert len(shown) == len(CODES)  # distinguishable in greyscale, by text alone
    assert badge(None).plain == badge("incomplete").plain
