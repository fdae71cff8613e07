"""Judgement colours and labels in the workbench: the same swatches as the exports.

The colours, ink and letters come from robtui.export.palette (checked there for
distinguishability under simulated colour-vision deficiency and for WCAG 2.1 contrast), so a
judgement looks the same on screen and in a published table. A colour never stands alone:
every badge carries the letter and the text label.
"""

from __future__ import annotations

from rich.text import Text

from robtui.core.questions import JUDGEMENT_LABELS as LABELS
from robtui.export.palette import swatch

# Narrow table cells: the first word of each label, a dash for not judged.
SHORT_LABELS = {code: label.split()[0] for code, label in LABELS.items()} | {"incomplete": "—"}


def badge(code: str | None, *, short: bool = False) -> Text:
    """A coloured badge with letter and text label, e.g. ' S Some concerns '."""
    key = code if code in LABELS else "incomplete"
    sw = swatch(key)
    words = SHORT_LABELS[key] if short else LABELS[key]
    return Text(f" {sw.letter} {words} ", style=f"{sw.ink} on {sw.fill}")


def cell_badge(code: str | None, *, letter_only: bool = False) -> Text:
    """A compact badge for table cells: letter and short label, e.g. 'S Some', or the
    letter alone where a legend explains it."""
    key = code if code in LABELS else "incomplete"
    sw = swatch(key)
    words = sw.letter if letter_only else f"{sw.letter} {SHORT_LABELS[key]}"
    return Text(words, style=f"{sw.ink} on {sw.fill}")
