"""Glyphs into words and rows by baseline.

Glyphs are chained in content-stream order while they continue one line: a glyph belongs to a
line when its middle lies in the line's band (from 0.8 of the line's font size above the
baseline to 0.3 below), so superscripts, subscripts and ligature, quote or dash glyphs drawn
from a second font a few points higher stay in their words. Chains on one baseline are then
merged (PDFs that write a line in several pieces). Words break at spaces and at gaps wider
than a fraction of the font size. Spacing accents drawn over a letter are composed with it,
also one drawn after its line's text, back over its letter (the text after it goes on with
that line); a sign drawn as two glyphs stacked over one place ("+" over "-") is its one character;
soft hyphens are kept as U+00AD for the text builder to join on. Band and gap shares are
common practice for PDF text extraction, our own settings, no source.
"""

from __future__ import annotations

import itertools
import re
import statistics
import unicodedata
from collections import Counter
from dataclasses import dataclass
from functools import cache, cached_property
from operator import attrgetter

from robtui.reading.layout.glyphs import Glyph
from robtui.reading.normalise import normalise_chars

Box = tuple[float, float, float, float]

BAND_ABOVE = 0.8  # share of the font size above the baseline that still belongs to the line
BAND_BELOW = 0.3
WORD_GAP = 0.1  # a gap wider than this share of the font size separates words
_SPACED_MARKS = frozenset("/|=+×–—&")  # marks a typesetter may set between word spaces
GUESSED_OVERLAP = 0.1  # where PDFium guessed a space, only glyphs overlapping more are one word
MIDDLE = 0.35  # a glyph's middle sits this share of its size above its baseline
LETTER_RUN = 4  # pieces of one or two characters in a row that may be letter-spaced text
LETTER_GAP_SPREAD = 1.8
LETTER_WORD_GAP = 2.5
LETTER_GAP_MAX = 0.22  # letter spacing stays under this share of the size; word spaces exceed it

# Spacing accents some PDFs draw as separate glyphs over a letter, with their combining forms.
_SPACING_MARKS = {
    "\u00a8": "\u0308",  # diaeresis
    "\u00b4": "\u0301",  # acute
    "`": "\u0300",
    "\u02c6": "\u0302",  # circumflex
    "^": "\u0302",
    "\u02dc": "\u0303",  # tilde
    "~": "\u0303",
    "\u00b8": "\u0327",  # cedilla
    "\u02c7": "\u030c",  # caron
    "\u02da": "\u030a",  # ring
    "\u00b0": "\u030a",
    "\u00af": "\u0304",  # macron
    "\u02d8": "\u0306",  # breve
    "\u02d9": "\u0307",  # dot above
    "\u02dd": "\u030b",  # double acute
}
# Signs some PDFs draw as two glyphs stacked over one place: (upper, lower) -> the sign.
_STACKED_SIGNS = {("+", "\u2212"): "\u00b1", ("+", "-"): "\u00b1", ("+", "_"): "\u00b1",
                  ("\u2212", "+"): "\u2213", ("-", "+"): "\u2213"}
_STACKED_PARTS = frozenset("+")
_MARK = re.compile("[\u0300-\u036f" + "".join(_SPACING_MARKS) .replace("^", "\\^") + "]")
BOLD_MARKS = ("bold", "black", "heavy", "semibold", "demi", "medium", "extrabold")
_BOLD_STYLES = ("bd", "b", "sb", "db", "med", "md", "blk", "hv", "bdit", "bi", "mdit", "bdcn")
_ITALIC_STYLES = ("it", "i", "bdit", "bi", "mdit", "ital", "obl", "cnobl")


@dataclass
class Word:
    text: str
    box: Box
    bold: bool
    italic: bool
    size: float
    font: str = ""  # the font's family key (subset tag and variant number removed)


# Share of a line's letters in one style (bold or not, italic or not) for the line to be set in
# that style throughout (our own setting, no source): a heading's few other letters are a
# bracketed abbreviation or a number.
STYLE_THROUGHOUT = 0.8
STYLE_MIN_LETTERS = 4


@dataclass
class Line:
    words: list[Word]
    x0: float
    top: float
    x1: float
    bottom: float
    column: str = "full"  # which column block the line was read in ("full" spans the page)
    page: int = 0  # set when a paragraph collects lines from several pages
    item_x: float | None = None  # a list item's text starts here, after a bullet hung left of it

    # A line's words do not change once it is made, so its summaries are computed once.
    @cached_property
    def text(self) -> str:
        return " ".join(w.text for w in self.words)

    @cached_property
    def bold(self) -> bool:
        return sum(w.bold for w in self.words) * 2 > len(self.words)

    @cached_property
    def italic(self) -> bool:
        return sum(w.italic for w in self.words) * 2 > len(self.words)

    @cached_property
    def style(self) -> tuple[bool, bool] | None:
        """(bold, italic) when the line is set in one style throughout (at least
        STYLE_THROUGHOUT of its letters bold, or not, and italic, or not), else None: a mixed
        line, such as statistics with their italic p, d and n ("(p = 0.01; d = 0.70), conduct
        (p < 0.01; d = 1.03) and oppo-") or a phrase set in italics for emphasis."""
        letters = [sum(ch.isalpha() for ch in w.text) for w in self.words]
        total = sum(letters)
        if total < STYLE_MIN_LETTERS:  # "p = .973.", "η2 = .002).": too few letters to tell
            return None
        out = []
        for attr in ("bold", "italic"):
            share = sum(n for w, n in zip(self.words, letters) if getattr(w, attr)) / total
            if STYLE_THROUGHOUT > share > 1 - STYLE_THROUGHOUT:
                return None
            out.append(share >= STYLE_THROUGHOUT)
        return out[0], out[1]

    @cached_property
    def size(self) -> float:
        return statistics.median(w.size for w in self.words)

    @cached_property
    def font(self) -> str:
        """The font most of the line's words are set in."""
        return Counter(w.font for w in self.words).most_common(1)[0][0]  # ties: first


def make_line(words: list[Word]) -> Line:
    """A line from its words (their union box)."""
    return Line(
        words,
        min(w.box[0] for w in words),
        min(w.box[1] for w in words),
        max(w.box[2] for w in words),
        max(w.box[3] for w in words),
    )


@cache
def family_key(font: str) -> str:
    """A font's name without its subset tag or a numbered variant ("AdvTT86d47313+20")."""
    return re.sub(r"\+\w{1,3}$", "", font)


def _style(font: str) -> str:
    """The style part of a font name: after its last '-', ',' or '.' ("AdvTT1234.B" -> "b")."""
    parts = re.split(r"[-,.]", font.lower())
    return parts[-1] if len(parts) > 1 else ""


@cache
def font_is_bold(font: str) -> bool:
    """Weight from the font's name: Bold, Black, Heavy, Semibold, Demi, Medium, -Bd, .B."""
    name = font.lower()
    return any(mark in name for mark in BOLD_MARKS) or _style(font) in _BOLD_STYLES


@cache
def font_is_italic(font: str) -> bool:
    name = font.lower()
    return "italic" in name or "oblique" in name or _style(font) in _ITALIC_STYLES


# -- chains and rows ---------------------------------------------------------------------------


@dataclass
class Row:
    """Glyphs sharing a baseline (one printed line, possibly across several columns)."""

    glyphs: list[Glyph]
    baseline: float
    size: float

    def holds(self, g: Glyph) -> bool:
        middle = g.baseline - MIDDLE * g.size
        return (
            self.baseline - BAND_ABOVE * self.size <= middle <= self.baseline + BAND_BELOW * self.size
        )


def rows_of(glyphs: list[Glyph]) -> list[Row]:
    """Rows of glyphs (unsorted inside), top to bottom."""
    chains: list[Row] = []
    current: Row | None = None
    last: Glyph | None = None
    for g in glyphs:
        if g.text.isspace() and current is not None:
            current.glyphs.append(g)
            continue
        continues = (
            current is not None
            and last is not None
            and current.holds(g)
            and g.x0 >= last.x0 - 0.6 * current.size
        )
        if not continues and _is_mark(g.text) and current is not None:
            # an accent drawn after its line, back over its letter ("A" + ring): a chain of
            # its own, and the text after it goes on with the line it interrupted
            chains.append(Row([g], g.baseline, g.size))
            continue
        if continues:
            current.glyphs.append(g)
            if g.size > current.size * 1.15 and g.baseline >= current.baseline - 0.2 * g.size:
                current.size, current.baseline = g.size, g.baseline
        else:
            if g.text.isspace():
                continue
            current = Row([g], g.baseline, g.size)
            chains.append(current)
        last = g
    return _merge_chains(chains)


def _merge_chains(chains: list[Row]) -> list[Row]:
    """Chains on one baseline become one row; a chain of small glyphs joins the row it sits in."""
    rows: list[Row] = []
    buckets: dict[int, list[Row]] = {}
    for chain in sorted(chains, key=lambda c: -c.size):
        home = None
        key = int(chain.baseline // 8)
        for k in (key - 1, key, key + 1):
            for row in buckets.get(k, ()):
                close = abs(row.baseline - chain.baseline) <= max(1.0, 0.2 * row.size)
                small = ((chain.size < 0.9 * row.size or all(_is_mark(g.text) for g in chain.glyphs))
                         and all(row.holds(g) for g in chain.glyphs))
                if (close or small) and not _overlaps(row, chain):
                    home = row
                    break
            if home is not None:
                break
        if home is None:
            rows.append(chain)
            buckets.setdefault(key, []).append(chain)
        else:
            home.glyphs.extend(chain.glyphs)
    rows.sort(key=lambda r: r.baseline)
    return rows


def _overlaps(row: Row, chain: Row) -> bool:
    """True when ``chain`` lies over text of ``row`` (two lines printed on one another)."""
    a0 = min(g.x0 for g in chain.glyphs)
    a1 = max(g.x1 for g in chain.glyphs)
    inside = sum(1 for g in row.glyphs if g.x0 < a1 - 1 and g.x1 > a0 + 1 and not g.text.isspace())
    return inside > 2


# -- words -------------------------------------------------------------------------------------

_X0 = attrgetter("x0")


def words_of(row: Row) -> list[Word]:
    """The words of a row, left to right."""
    glyphs = sorted(row.glyphs, key=_X0)
    glyphs = _compose_marks(_stacked_signs(glyphs))
    words: list[Word] = []
    current: list[Glyph] = []
    raised, small = row.baseline - 0.2 * row.size, 0.85 * row.size
    marks_only = False  # the word so far is raised small print (a footnote mark)
    for g in glyphs:
        if g.text.isspace():
            _flush(current, words)
            continue
        if current:
            prev = current[-1]
            gap = g.x0 - prev.x1
            if marks_only and (g.size >= small or g.size > 1.25 * prev.size):
                _flush(current, words)  # a footnote mark before a word: "a Values are"
            if g.space_before:  # PDFium saw a space here from the font's own spacing
                least = -GUESSED_OVERLAP * g.size
            else:
                least = WORD_GAP * max(min(g.size, prev.size), 4.0)
                if len(current) == 1 and prev.text in _SPACED_MARKS and prev.space_before:
                    least /= 2  # a mark set between spaces ("2016 / Accepted"): narrower after
            if gap > least or g.x0 < prev.x0 - 0.5:
                _flush(current, words)
        marks_only = (marks_only or not current) and g.size < small and g.baseline < raised
        current.append(g)
    _flush(current, words)
    return _letter_spaced_joined(words)


def _letter_spaced_joined(words: list[Word]) -> list[Word]:
    """Words set letter-spaced ("R E S E A R C H", "C o m m o n s") joined again: a run of
    LETTER_RUN or more pieces of one or two characters in one size, at least half of them
    single letters, whose gaps are alike (within LETTER_GAP_SPREAD of the run's median) and narrow
    (under LETTER_GAP_MAX of the size, where a word space is wider), is one word when the
    run or its neighbours show word spaces LETTER_WORD_GAP times as wide; those stay spaces."""

    def piece(w: Word) -> bool:
        return len(w.text) <= 2

    out: list[Word] = []
    i = 0
    while i < len(words):
        j = i
        while (j + 1 < len(words) and piece(words[j]) and piece(words[j + 1])
               and words[j + 1].size == words[i].size):
            j += 1
        singles = sum(len(w.text) == 1 and w.text.isalpha() for w in words[i : j + 1])
        if j - i + 1 < LETTER_RUN or 2 * singles < j - i + 1:
            out.append(words[i])
            i += 1
            continue
        run = words[i : j + 1]
        gaps = [b.box[0] - a.box[2] for a, b in itertools.pairwise(run)]
        typical = statistics.median(gaps)
        edges = gaps + [run[0].box[0] - words[i - 1].box[2]] if i else list(gaps)
        if j + 1 < len(words):
            edges.append(words[j + 1].box[0] - run[-1].box[2])
        if not any(gap >= LETTER_WORD_GAP * max(typical, 0.1) for gap in edges):
            out.append(words[i])  # no word space wider than the gaps: tight words, not letters
            i += 1
            continue
        joined = [run[0]]
        for gap, word in zip(gaps, run[1:]):
            if gap <= LETTER_GAP_SPREAD * typical and gap < LETTER_GAP_MAX * word.size:
                joined[-1] = _joined(joined[-1], word)
            else:
                joined.append(word)
        out.extend(joined)
        i = j + 1
    return out


def _joined(a: Word, b: Word) -> Word:
    return Word(
        a.text + b.text,
        (a.box[0], min(a.box[1], b.box[1]), b.box[2], max(a.box[3], b.box[3])),
        a.bold, a.italic, a.size, a.font,
    )


def _stacked_signs(glyphs: list[Glyph]) -> list[Glyph]:
    """A sign drawn as two glyphs stacked over one place ("+" over "-") becomes its one
    character ("±"), spanning both. ``glyphs`` sorted by x0."""
    if not any(g.text in _STACKED_PARTS for g in glyphs):
        return glyphs
    out: list[Glyph] = []
    for g in glyphs:
        prev = out[-1] if out else None
        if (prev is not None and abs(prev.x0 - g.x0) <= 0.5 and abs(prev.x1 - g.x1) <= 0.5
                and abs(prev.baseline - g.baseline) > 0.1 * g.size):
            upper, lower = (prev, g) if prev.baseline < g.baseline else (g, prev)
            sign = _STACKED_SIGNS.get((upper.text, lower.text))
            if sign is not None:
                out[-1] = Glyph(sign, upper.x0, upper.x1, upper.top, lower.bottom, lower.baseline,
                                upper.size, upper.font, upper.angle,
                                prev.space_before or g.space_before)
                continue
        out.append(g)
    return out


def _is_mark(text: str) -> bool:
    """A spacing accent or a combining mark, alone."""
    return len(text) == 1 and (text in _SPACING_MARKS or unicodedata.combining(text) > 0)


def _compose_marks(glyphs: list[Glyph]) -> list[Glyph]:
    """Accents drawn over a neighbouring letter become combining marks after that letter."""
    if not _MARK.search("".join(g.text for g in glyphs)):
        return glyphs
    marks = [i for i, g in enumerate(glyphs) if _is_mark(g.text)]
    out = list(glyphs)
    drop: set[int] = set()
    for i in marks:
        mark = glyphs[i]
        middle = (mark.x0 + mark.x1) / 2
        for j in (i - 1, i + 1):
            if 0 <= j < len(glyphs) and j not in marks and glyphs[j].text.isalpha():
                base = glyphs[j]
                if base.x0 - 0.5 <= middle <= base.x1 + 0.5:
                    accent = _SPACING_MARKS.get(mark.text, mark.text)
                    composed = unicodedata.normalize("NFC", base.text + accent)
                    out[j] = Glyph(
                        composed, base.x0, base.x1, base.top, base.bottom, base.baseline,
                        base.size, base.font, base.angle, base.space_before,
                    )
                    drop.add(i)
                    break
    return [g for k, g in enumerate(out) if k not in drop]


def _flush(current: list[Glyph], words: list[Word]) -> None:
    if not current:
        return
    raw = "".join([g.text for g in current])
    soft = raw.endswith("\u00ad")
    text = raw if raw.isascii() else normalise_chars(raw).strip()
    if text:
        if soft:
            text += "\u00ad"  # a soft hyphen ending the word: the line joins without a space
        font = current[len(current) // 2].font
        # one min/max per coordinate over a list: cheaper than a call per glyph; the far edges
        # and the size start from 0.0, as they always have
        box = (min([g.x0 for g in current]), min([g.top for g in current]),
               max([0.0] + [g.x1 for g in current]), max([0.0] + [g.bottom for g in current]))
        size = max([0.0] + [g.size for g in current])
        words.append(Word(text, box, font_is_bold(font), font_is_italic(font), round(size, 2),
                          family_key(font)))
    current.clear()
