"""Sentence boundaries for trial-report prose.

Rule based, tuned to the way trial reports write: abbreviations ("et al.", "vs.", "Fig. 2",
"i.v."), statistics ("n = 45", "p < 0.001", "95% CI 1.2–3.4"), decimals and reference numbers
glued to the full stop ("as shown before.12 The next") must not end a sentence. The splitter
works on one block (a paragraph or a heading) and returns spans, never rewritten text.
"""

from __future__ import annotations

import re

# Abbreviations after which a full stop does not end a sentence (lower-cased, without the final
# stop). Common practice in biomedical text, no source; list written from experience.
ABBREVIATIONS: frozenset[str] = frozenset(
    [
        "al",
        "vs",
        "v",
        "fig",
        "figs",
        "tab",
        "eq",
        "eqs",
        "ref",
        "refs",
        "no",
        "nos",
        "dr",
        "mr",
        "mrs",
        "ms",
        "prof",
        "e.g",
        "i.e",
        "i.v",
        "i.m",
        "s.c",
        "p.o",
        "b.i.d",
        "t.i.d",
        "q.i.d",
        "q.d",
        "approx",
        "ca",
        "cf",
        "dept",
        "univ",
        "inc",
        "ltd",
        "co",
        "corp",
        "jr",
        "st",
        "vol",
        "pp",
        "suppl",
        "ed",
        "eds",
        "viz",
        "sect",
        "chap",
        "ch",
        "app",
        "nr",
        "tel",
    ]
)


_CANDIDATE = re.compile(r"[.?!](?:[\"'”’)\]]*)")
# Reference numbers after a full stop: "before.12", "before.3,4", "before.18 19 20", "before.27–31".
_CITATION_TAIL = re.compile(r"\d{1,3}(?:(?:[,\u2013\-]|\s(?=\d{1,3}\b))\d{1,3})*(?=\s)")
# Bracketed reference numbers after a full stop: "age.[1,2]", "before.[3–5]", "low.[4, 7]".
_BRACKET_CITATION = re.compile(r"\[\d{1,3}(?:\s?[,\u2013\-]\s?\d{1,3})*\]")
# What may open a sentence: a capital or digit (after quotes or brackets), a footnote mark, or
# a lower-case name with capitals or digits in it ("sPLA2 was", "hs-CRP rose", "mRNA levels").
_OPENER = re.compile(r"[\"'“‘(\[]*(?:[A-Z0-9\u0391-\u03a9À-Þ*†‡§¶]|[a-z]{1,4}-?[A-Z0-9])")
# A caption's label is not a sentence of its own: "Table 1. Baseline characteristics".
# Nor is a list number: "1. Quellmann R, Abeyta S. ...".
_CAPTION_LABEL = re.compile(
    r"\s*(?:(?:Table|Figure|Fig\.?|Box|Panel)\s+[A-Z]?\d+[A-Za-z]?|\[?\d{1,3}\]?|[a-z])\.\s*$"
)
# A bullet standing apart opens a list item, which is a sentence of its own whether or not the
# item before it ends with a full stop ("... to schools ▸ Simplified points system ▸ ...");
# after a number it is a degree sign some typesetters draw with a bullet ("16 ◦ C"). U+FFFD, a
# glyph mapped to no character, is a bullet when an item with a capital follows it.
_BULLET = re.compile(r"(?<=\s)(?<!\d\s)(?:[•▪▫◦▸►‣⁃●■](?=\s)|\ufffd(?=\s[A-Z]))")
LIST_ITEM_WORDS = 4  # a keyword is a few words (our own setting)
_WORD_BEFORE = re.compile(r"([A-Za-z][A-Za-z.]*)$")


def split_sentences(text: str, start: int = 0, end: int | None = None) -> list[tuple[int, int]]:
    """Sentence spans (start, end) inside ``text[start:end]``, stripped of surrounding space."""
    end = len(text) if end is None else end
    spans: list[tuple[int, int]] = []
    cursor = start
    stops = [(m.end(), m) for m in _CANDIDATE.finditer(text, start, end)]
    bullets = [(m.start(), None) for m in _BULLET.finditer(text, start, end)]
    for at, match in sorted(stops + bullets, key=lambda pair: pair[0]):
        boundary = at if match is None else _boundary_after(text, match, end)
        if boundary is None or boundary <= cursor:
            continue
        if _CAPTION_LABEL.fullmatch(text, cursor, boundary):
            continue
        spans.append((cursor, boundary))
        cursor = boundary
    spans.append((cursor, end))
    return [s for s in (_strip(text, a, b) for a, b in spans) if s[1] > s[0]]


def _boundary_after(text: str, match: re.Match[str], end: int) -> int | None:
    """Where a sentence ends if the punctuation in ``match`` closes one, else None."""
    stop = match.start()
    after = match.end()
    if text[stop] == "." and stop > 0 and text[stop - 1] in " \t" and _in_list(text, stop, end):
        return None  # a full stop standing apart separates a list: "Walking . Diaries . Mood"
    # Reference numbers glued to the stop: "shown before.12 The".
    if text[stop] == "." and after < end and text[after].isdigit():
        if stop == 0 or not (text[stop - 1].isalpha() or text[stop - 1] in ")]"):
            return None  # a decimal such as 0.001
        tail = _CITATION_TAIL.match(text, after, end)
        if tail is None:
            return None
        after = tail.end()
    elif text[stop] == "." and after < end and text[after] == "[":
        bracket = _BRACKET_CITATION.match(text, after, end)
        if bracket is None:
            return None
        after = bracket.end()
    if after >= end:
        return None
    if not text[after].isspace():
        return None
    nxt = after
    while nxt < end and text[nxt].isspace():
        nxt += 1
    if nxt >= end:
        return None
    if not _OPENER.match(text, nxt, end):
        return None
    if text[stop] == "." and _is_abbreviation(text, stop, nxt):
        return None
    return after


def _in_list(text: str, stop: int, end: int) -> bool:
    """Whether the full stop at ``stop``, standing apart, parts the short items of a list
    (keywords): the item before it has at most LIST_ITEM_WORDS words and another such stop, or
    the block's end, follows within as many."""
    before = max(text.rfind(" .", 0, stop), text.rfind(". ", 0, stop), text.rfind("\n", 0, stop))
    if len(text[before + 1 : stop].split()) > LIST_ITEM_WORDS:
        return False
    ahead = text[stop + 1 : end].split("\n", 1)[0]
    words = ahead.split()[: LIST_ITEM_WORDS + 1]
    return "." in words or len(words) <= LIST_ITEM_WORDS


def _is_abbreviation(text: str, stop: int, next_start: int) -> bool:
    """True when the full stop at ``stop`` belongs to an abbreviation or an initial."""
    left = text[max(0, stop - 20) : stop]
    word_match = _WORD_BEFORE.search(left)
    if word_match is None:
        return False
    word = word_match.group(1)
    lowered = word.lower().strip(".")
    if lowered in ABBREVIATIONS:
        # "Fig. 2", "et al. 2", "vs. Placebo": never a boundary. "No. 3" likewise.
        return True
    # A single capital letter initial: "J. Smith", "A. baumannii" (but not "vitamin D. The").
    if len(word) == 1 and word.isupper():
        prev = text[stop - 2] if stop >= 2 else " "
        return prev.isspace() or prev in "(.-"
    # Dotted abbreviations like "U.S." or "i.v." not in the list.
    if "." in word and len(word) <= 6 and all(len(p) <= 2 for p in word.split(".")):
        nxt = text[next_start]
        return nxt.islower()
    return False


def _strip(text: str, a: int, b: int) -> tuple[int, int]:
    while a < b and text[a].isspace():
        a += 1
    while b > a and text[b - 1].isspace():
        b -= 1
    return a, b
