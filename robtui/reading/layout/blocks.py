"""A page's lines (already in reading order) into blocks, without running heads.

Rules (common practice for journal PDFs, no source): lines at the top or bottom of pages that
repeat on many pages (digits ignored), bare page numbers and small print above the text are
running heads, but only when they are set apart from the page's text (a paragraph running on
from the margin into the page is text, however often its wording comes back) and, for lines
that repeat with other numbers, when those numbers follow the page number. Blocks break at a
change of column, wider line gaps, a first-line indent and font changes; blocks opening with
"Table n" / "Figure n" are captions; table regions are tables, after the text.
"""

from __future__ import annotations

import itertools
import re
import statistics
from collections import Counter
from dataclasses import dataclass, field

from robtui.reading.assemble import is_caption, looks_like_heading
from robtui.reading.layout.columns import JUSTIFIED_SPREAD, is_list_label, justified_spacing
from robtui.reading.layout.lines import Line, make_line
from robtui.reading.layout.page import MARGIN_SHARE, NUMERIC, PageLines
from robtui.reading.sections import (
    TOP_LEVEL,
    abstract_vocabulary,
    match_heading,
    normalise_heading,
    run_in_heading,
)

# A white band at least this share of the body size tall sets a margin line apart from the text
# (lines of one paragraph are about 0.2 apart in their glyph boxes; our own setting, no source).
SET_APART = 0.6
HEAD_ROWS = 4  # a running head or footer has at most this many rows
LEADING_SAMPLE = 3  # steps between body lines enough to tell the page's leading
# A running line set on facing pages of one side only repeats on this share of that side's
# pages, and on at least FACING_MIN of them (our own rule, no source).
FACING_SHARE = 0.6
FACING_MIN = 3
NUMBER_RUN = 5
NUMBER_SHARE = 0.6
_PAGE_NUMBER = re.compile(r"^(?:page\s*)?#+(?:\s*(?:of|/)\s*#+)?$", re.IGNORECASE)
# Publishers' notes where a block breaks across pages or columns (not the article's text).
_CONTINUED = re.compile(
    r"^(?:(?:figure|fig\.|table)\s*\d+[a-z]?\s+)?\(?(?:continued|cont'?d\.?)(?: (?:on|from|in) (?:the )?(?:next|previous|following)"
    r" (?:page|column))?\)?$",
    re.IGNORECASE,
)


@dataclass
class PBlock:
    kind: str
    lines: list[Line]
    page: int
    rows: list[list[Line]] = field(default_factory=list)  # tables: cells per row

    @property
    def last_text(self) -> str:
        return self.lines[-1].text if self.lines else ""


# -- running headers and footers ---------------------------------------------------------------


def _signature(line: Line) -> str:
    return re.sub(r"\d+", "#", " ".join(line.text.lower().split()))


def _margin_lines(page: PageLines) -> list[Line]:
    """Lines of the top or bottom margin set apart from the page's text: runs of closely
    spaced lines (closer than SET_APART of the body size, whatever their column) that lie in
    the margin, or open (close) in it with at most HEAD_ROWS rows. A paragraph running on
    from the margin into the page is text. The margins are as deep on a page set landscape
    as on the upright pages around it: the zone is a share of the page's longer side."""
    depth = max(page.height, page.width) * MARGIN_SHARE
    top_zone = depth
    bottom_zone = page.height - depth
    out: list[Line] = []
    for run in _vertical_runs(page.lines, SET_APART * max(page.body_size, 4.0)):
        if any(is_caption(ln.text) for ln in run[:2]):
            continue  # a figure or table set high or low on the page, with its caption
        inside = max(ln.bottom for ln in run) <= top_zone or min(ln.top for ln in run) >= bottom_zone
        if not inside and len({round(ln.top) for ln in run}) > HEAD_ROWS:
            continue
        if min(ln.bottom for ln in run) <= top_zone or max(ln.top for ln in run) >= bottom_zone:
            out.extend(run)
    return out


def _vertical_runs(lines: list[Line], gap: float) -> list[list[Line]]:
    """Lines grouped top to bottom into runs separated by white bands taller than ``gap``."""
    runs: list[list[Line]] = []
    bottom = float("-inf")
    for line in sorted(lines, key=lambda ln: ln.top):
        if runs and line.top - bottom <= gap:
            runs[-1].append(line)
        else:
            runs.append([line])
            bottom = float("-inf")
        bottom = max(bottom, line.bottom)
    return runs


def running_signatures(pages: list[PageLines]) -> set[str]:
    """Signatures of margin lines that repeat on enough pages to be running heads, and whose
    numbers stay the same or follow the page number (a journal's volume and page); a line
    whose numbers change otherwise from page to page (line numbers, counts) is text."""
    counts: Counter[str] = Counter()
    numbers: dict[str, dict[int, tuple[int, ...]]] = {}
    for page in pages:
        for line in _margin_lines(page):
            signature = _signature(line)
            seen = numbers.setdefault(signature, {})
            if page.number not in seen:
                seen[page.number] = tuple(int(n) for n in re.findall(r"\d+", line.text)[:8])
                counts[signature] += 1
    needed = max(2, int(0.4 * len(pages) + 0.5))
    by_parity = Counter(page.number % 2 for page in pages)

    def repeats(signature: str, n: int) -> bool:
        if n >= needed:
            return True
        # facing pages: a head or foot of the left-hand (even) or right-hand (odd) pages alone
        parities = {number % 2 for number in numbers[signature]}
        return len(parities) == 1 and n >= max(
            FACING_MIN, int(FACING_SHARE * by_parity[parities.pop()] + 0.5))

    return {sig for sig, n in counts.items() if repeats(sig, n) and _page_bound(numbers[sig])}


def _page_bound(numbers: dict[int, tuple[int, ...]]) -> bool:
    """Whether each number of a repeated line is the same on every page or moves with the
    page number (a constant offset from it)."""
    if len({len(found) for found in numbers.values()}) != 1:
        return True  # digits split differently ("12" vs "1 2"): no evidence either way
    for i in range(len(next(iter(numbers.values())))):
        values = {found[i] for found in numbers.values()}
        offsets = {found[i] - page for page, found in numbers.items()}
        if len(values) > 1 and len(offsets) > 1:
            return False
    return True


_END_NUMBERS = re.compile(r"(?:\s+[#\W]*#[#\W]*)+$")


def _without_end_numbers(signature: str) -> str:
    """A signature without the numbers ending it ("journal #:# #–#" -> "journal #:#"), when
    two words of letters are left (a bare page number leaves nothing to match)."""
    stripped = _END_NUMBERS.sub("", signature)
    return stripped if len(re.findall(r"[^\W\d_]{2,}", stripped)) >= 2 else ""


def strip_running(page: PageLines, running: set[str]) -> PageLines:
    """The page without running heads, page numbers and small print above the text.

    Small print in the top margin (smaller than the body text) is dropped even when it does
    not repeat, so one- and two-page documents lose their running head too; small print at
    the bottom is kept, since footnotes there may name funding or registration.
    """
    body_size = _body_size(page.lines)
    margin = {id(ln) for ln in _margin_lines(page)}
    bare = {_without_end_numbers(sig) for sig in running} - {""}

    def running_line(ln: Line) -> bool:
        if id(ln) not in margin or is_caption(ln.text):
            return False  # a caption set high on the page opens its figure or table
        signature = _signature(ln)
        if signature in running or _PAGE_NUMBER.match(signature):
            return True
        if _without_end_numbers(signature) in bare:
            return True  # the running foot with other numbers at its end (page 1's page range)
        return ln.top < page.height / 2 and ln.size < body_size - 0.8

    dropped = [ln for ln in page.lines if running_line(ln)]

    def beside_dropped(ln: Line) -> bool:
        """Numbers alone in the margin on a dropped line's row: a piece of that running head
        set in another font ("Author et al. Journal" + "(2030) 12:34")."""
        return (id(ln) in margin and not any(ch.isalpha() for ch in ln.text)
                and any(abs(ln.top - d.top) <= 2 for d in dropped))

    gone = {id(ln) for ln in dropped}
    kept = [ln for ln in page.lines if id(ln) not in gone and not beside_dropped(ln)
            and not _CONTINUED.match(ln.text)]
    return PageLines(
        page.number, page.width, page.height, kept, page.tables, page.warnings, page.body_size,
        page.figures,
    )


# -- download cover sheets ---------------------------------------------------------------------

# What the sheets that download services put before an article say (common practice, our own
# list, no source); COVER_PHRASES of them on a first page make it such a sheet.
_COVER = re.compile(
    r"to cite this article|to link to this article|terms (?:&|and) conditions|"
    r"download(?:ed)? by|submit your article|view related articles|view crossmark|"
    r"article views|see discussions, stats|stable url|your use of the jstor",
    re.IGNORECASE,
)
COVER_PHRASES = 3


def is_cover_sheet(page: PageLines) -> bool:
    """Whether a first page is a download service's cover sheet, not the article's."""
    if page.number != 1:
        return False
    found = {m.group(0).lower() for ln in page.lines for m in _COVER.finditer(ln.text)}
    return len(found) >= COVER_PHRASES


# -- blocks ----------------------------------------------------------------------------------


def _leading(lines: list[Line], body_font: str = "") -> float:
    """The page's line pitch: the median step between lines of one column in one size, taken
    between lines of the body's font when there are a few (a page of spaced-out short lines
    in another font, a list of abbreviations set as headings, sets no leading of its own)."""
    gaps = [
        (b.top - a.top, a.font == b.font == body_font)
        for a, b in itertools.pairwise(lines)
        if a.column == b.column and 5 < b.top - a.top < 30 and abs(a.size - b.size) < 0.5
    ]
    body = [gap for gap, in_body in gaps if in_body]
    if len(body) >= LEADING_SAMPLE:
        return statistics.median(body)
    return statistics.median(gap for gap, _ in gaps) if gaps else 12.0


def _both_set_in_one_style(prev: Line, line: Line) -> bool:
    """Whether each line is set in one style throughout (Line.style): a line of mixed styles,
    such as statistics with italic letters, says nothing of where a block begins."""
    return prev.style is not None and line.style is not None


def _style_changes(prev: Line, line: Line) -> bool:
    """Two lines each set in one style throughout, and in different ones: a heading, a
    caption's title or a legend begins or ends."""
    return _both_set_in_one_style(prev, line) and prev.style != line.style


def page_blocks(page: PageLines) -> list[PBlock]:
    """Blocks of one page in reading order: body, heading, caption, aside; tables and
    figures last."""
    plain = page.lines
    body_size = _body_size(plain)
    body_font = _body_font(plain, body_size)
    leading = _leading(plain, body_font)
    blocks: list[PBlock] = []
    current: PBlock | None = None
    prev: Line | None = None
    legends: set[int] = set()  # blocks opened by a caption's legend in another weight
    for index, line in enumerate(plain):
        legend = _legend_of(current, line, prev, body_size)
        new = not legend and (
            current is None
            or prev is None
            or line.item_x is not None  # a list item opens at its bullet
            or line.column != prev.column and not _wraps_item(current, line, prev, leading)
            or line.top - prev.top > 1.35 * max(leading, prev.size * 1.25)
            or line.top < prev.top
            or _style_changes(prev, line)
            or abs(line.size - prev.size) > 0.6
            or (line.font == body_font) != (prev.font == body_font)
            and min(len(line.words), len(prev.words)) <= 8
            and _both_set_in_one_style(prev, line)
            or line.font != prev.font
            and len(current.lines) == 1
            and len(prev.words) <= 6
            and looks_like_heading(prev.text)
            or is_caption(line.text)
            and not is_caption(current.lines[0].text)
            and not _runs_on(prev, line)
            or _abstract_run_in_opens(line, prev, body_font)
            or _indent_opens(line, prev, plain[index + 1] if index + 1 < len(plain) else None)
        )
        if new or legend and prev.words[-1].bold and not line.words[0].bold:
            # the caption's bold title ends its line, its legend follows: two blocks
            current = PBlock("body", [line], page.number)
            blocks.append(current)
            if legend:
                legends.add(id(current))
        else:
            current.lines.append(line)
        prev = line
    for block in blocks:
        block.kind = "caption" if id(block) in legends else _kind(block, body_size, body_font)
    # Figures standing alone outside any table are a chart's axis ticks: not the article's text.
    blocks = [b for b in blocks if b.kind != "ticks"]
    blocks = _with_run_in_split(blocks, body_font)
    for i, block in enumerate(blocks):
        if block.kind == "body" and _stands_as_heading(block, blocks[i + 1 : i + 2], body_font):
            block.kind = "heading"
    for _region, rows in page.tables:
        blocks.append(PBlock("table", [], page.number, rows=_table_rows(rows)))
    for _region, groups in page.figures:  # one row per drawn box, its lines in one cell
        rows = [[make_line([w for line in group for w in line.words])] for group in groups]
        blocks.append(PBlock("figure", [], page.number, rows=rows))
    return blocks


def _runs_on(prev: Line, line: Line) -> bool:
    """Whether ``line``, which opens like a caption, goes on with the sentence ``prev`` left
    unfinished, in its type and leading: a reference in running text wrapped to a line's start
    ("... shown in" over "Supplementary Table 1. The dose ..."). A float that interrupts a
    paragraph stands apart in its type or by a gap, which part the blocks anyway."""
    return (
        line.column == prev.column
        and not _SENTENCE_END.search(prev.text)
        and prev.text[-1:].isalnum()
        and abs(line.x0 - prev.x0) <= 0.3 * line.size
        and line.font == prev.font and abs(line.size - prev.size) <= 0.3
        and 0 < line.top - prev.top <= 1.6 * line.size
    )


INDENT_EM = (0.6, 4.0)  # a paragraph's first line is set in by this much of the size


def _indent_opens(line: Line, prev: Line | None, nxt: Line | None) -> bool:
    """Whether ``line`` opens a paragraph by its first-line indent (no wider gap above it, as
    most journals set paragraphs): set in by INDENT_EM of its size from the line above, in the
    same column and type, with the line below back at that line's left edge (lines that stay
    set in hang under a list item or a reference, a line under an item's text after its
    number or bullet goes on with it). The last line of a column opens one only after a line
    that ends a sentence."""
    if prev is None or line.column != prev.column or abs(line.size - prev.size) > 0.6:
        return False
    if (len(prev.words) > 1 and is_list_label(prev.words[0].text)
            and abs(line.x0 - prev.words[1].box[0]) <= 0.3 * line.size):
        return False
    indent = line.x0 - prev.x0
    if not (INDENT_EM[0] * line.size <= indent <= INDENT_EM[1] * line.size
            and 0 < line.top - prev.top < 2 * line.size):
        return False
    if nxt is not None and nxt.column == line.column and 0 < nxt.top - line.top < 2 * line.size:
        return abs(nxt.x0 - prev.x0) <= 0.3 * line.size
    return _SENTENCE_END.search(prev.text) is not None


def _wraps_item(block: PBlock | None, line: Line, prev: Line | None, leading: float) -> bool:
    """Whether ``line`` goes on with the list item ``block`` opened by a bullet hung left of a
    gutter: it starts where the item's text does, on the next line, in its type."""
    if block is None or prev is None:
        return False
    item_x = block.lines[0].item_x
    return (
        item_x is not None and abs(line.x0 - item_x) <= 1.0
        and 0 < line.top - prev.top <= 1.35 * max(leading, prev.size * 1.25)
        and abs(line.size - prev.size) <= 0.6
    )


def _legend_of(caption: PBlock | None, line: Line, prev: Line | None, body_size: float) -> bool:
    """Whether ``line`` goes on with the caption block above it whatever its weight and column:
    small print set straight under the caption's last line, from its left edge, in its size
    (a figure's legend or notes under a bold title)."""
    return (
        caption is not None and prev is not None and is_caption(caption.lines[0].text)
        and line.size < body_size - 0.5 and abs(line.size - prev.size) <= 0.6
        and 0 < line.top - prev.top <= 1.6 * prev.size
        and abs(line.x0 - caption.lines[0].x0) <= prev.size
        and not is_caption(line.text)
    )


# Small print that is not the article's text: licences, copyright, download stamps, addresses.
_FRONT_MATTER = re.compile(
    r"\b(?:licen[cs]e[ed]?|copyright|creative commons|downloaded from|open access|"
    r"correspondence|e-?mail|published online|received:|accepted:|"
    r"this article is distributed|permits unrestricted)\b|©",
    re.IGNORECASE,
)


# Small print on the first page that names funding, an address or an affiliation: the
# footnotes under the abstract (later pages' small print may be the text's own notes).
_FIRST_PAGE_NOTE = re.compile(
    r"\b(?:funded by|(?:department|university|institute|faculty|school) of)\b|"
    r"[\w.+-]+@[\w-]+\.\w",
    re.IGNORECASE,
)


def _kind(block: PBlock, body_size: float, body_font: str) -> str:
    first = block.lines[0]
    text = " ".join(ln.text for ln in block.lines)
    if _numbers_only(text):
        return "ticks"
    if is_caption(first.text):
        return "caption"  # also in a side column: the figure's title, not a side note
    if first.column == "aside":
        return "aside"
    small = statistics.median(ln.size for ln in block.lines) < body_size - 1.2
    if small and (_FRONT_MATTER.search(text) or (block.page == 1 and _FIRST_PAGE_NOTE.search(text))):
        return "aside"
    if len(block.lines) <= 2 and looks_like_heading(text):
        if first.bold or first.size > body_size + 0.8:
            return "heading"
        letters = [ch for ch in text if ch.isalpha()]
        if len(letters) >= 4 and all(ch.isupper() for ch in letters) and not small:
            return "heading"  # same-size capitals: "METHODS"
        if len(block.lines) == 1 and len(first.words) <= 6:
            label = match_heading(text, keywords=False)
            if label is not None and (not small or normalise_heading(text) in TOP_LEVEL):
                return "heading"  # heading vocabulary standing alone on its line
    return "body"


def _numbers_only(text: str) -> bool:
    """At least NUMBER_RUN figures making up most (NUMBER_SHARE) of the words: a chart's axis
    ticks ("0 2 4 6 8 10 12 Months after treatment")."""
    tokens = text.split()
    numbers = sum(bool(NUMERIC.match(t)) for t in tokens)
    return numbers >= NUMBER_RUN and numbers >= NUMBER_SHARE * len(tokens)


_POINTER = re.compile(r"^\S+\s*[A-Z]?\d+[A-Za-z]?\s+[a-z]")  # "Figure 1 shows", "Table 2 lists"


def _points_to_a_float(block: PBlock) -> bool:
    """A paragraph opening like a caption whose label goes on in lower case: prose about a
    figure or table ("Figure 1 shows a flow diagram of ..."), not its caption."""
    return _POINTER.match(block.lines[0].text) is not None


def _stands_as_heading(block: PBlock, following: list[PBlock], body_font: str) -> bool:
    """A short line alone in italics or in another font than the body's, followed by a
    paragraph of body text in the same column: a subheading."""
    if len(block.lines) != 1 or not following:
        return False
    line, nxt = block.lines[0], following[0]
    if len(line.words) > 9 or not looks_like_heading(line.text):
        return False
    if not (line.italic or line.font != body_font):
        return False
    return (
        (nxt.kind == "body" or nxt.kind == "caption" and _points_to_a_float(nxt))
        and nxt.lines[0].column == line.column
        and sum(len(ln.words) for ln in nxt.lines) >= 8
        and nxt.lines[0].font == body_font
        and not nxt.lines[0].italic
    )


def _with_run_in_split(blocks: list[PBlock], body_font: str) -> list[PBlock]:
    """A paragraph opening with a few bold (or italic, or other-font) words followed by body
    words on the same line: those words are a run-in subheading, split off as a heading."""
    out: list[PBlock] = []
    for block in blocks:
        head = _run_in_words(block, body_font) if block.kind == "body" else 0
        if not head:
            out.append(block)
            continue
        first = block.lines[0]
        heading = make_line(first.words[:head])
        rest = make_line(first.words[head:])
        for line in (heading, rest):
            line.column, line.page = first.column, first.page
        out.append(PBlock("heading", [heading], block.page))
        out.append(PBlock("body", [rest, *block.lines[1:]], block.page))
    return out


def _run_in_words(block: PBlock, body_font: str) -> int:
    """How many words opening the block's first line, set apart from the body text (bold,
    italic or another font), read as a run-in subheading. A paragraph set wholly in bold (some
    journals' summaries) marks its subheadings by another bold font instead."""
    words = block.lines[0].words
    if len(words) < 2:
        return 0
    later = Counter((w.font, w.bold, w.italic) for ln in block.lines[1:] for w in ln.words)
    last = words[-1]
    plain = later.most_common(1)[0][0] if later else (last.font, last.bold, last.italic)
    bold_paragraph = plain[1]
    if bold_paragraph and not (words[0].bold and words[0].font != plain[0]):
        return 0

    def marked(w) -> bool:
        if bold_paragraph:
            return (w.font, w.bold, w.italic) != plain
        return w.bold or w.italic or w.font != body_font

    rest = [w for w in words if not marked(w)]
    if not rest:
        return 0
    count = 0
    for w in words:
        if not marked(w):
            break
        count += 1
    if not 1 <= count <= 10 or count == len(words):
        return 0
    if any(marked(w) for w in words[count:]) and sum(not marked(w) for w in words) < 3:
        return 0
    prefix = " ".join(w.text for w in words[:count])
    if not looks_like_heading(prefix.rstrip(".:")) and run_in_heading(prefix, "methods") is None:
        return 0
    if not words[0].bold and not prefix.endswith((".", ":")) and not abstract_vocabulary(prefix):
        return 0  # italic or other-font words run into a sentence: emphasis, not a heading
    return count


_SENTENCE_END = re.compile(r"[.?!][\"'”’)\]]*$")


def _abstract_run_in_opens(line: Line, prev: Line | None, body_font: str) -> bool:
    """A line opening with a structured abstract's subheading set apart (italic, bold or
    another font: "Methods PCSO-524 or ...") after a line that ends a sentence starts a new
    paragraph, even without a wider gap (its run-in heading is then split off)."""
    if prev is None or not _SENTENCE_END.search(prev.text):
        return False
    head = _run_in_words(PBlock("body", [line], 0), body_font)
    return bool(head) and abstract_vocabulary(" ".join(w.text for w in line.words[:head]))


def _body_font(lines: list[Line], body_size: float) -> str:
    fonts: Counter[str] = Counter()
    for ln in lines:
        if abs(ln.size - body_size) <= 0.6:
            fonts.update(w.font for w in ln.words)
    return fonts.most_common(1)[0][0] if fonts else ""


def _body_size(lines: list[Line]) -> float:
    sizes = Counter(round(ln.size, 1) for ln in lines)
    return sizes.most_common(1)[0][0] if sizes else 0.0


def _table_rows(lines: list[Line]) -> list[list[Line]]:
    rows: list[list[Line]] = []
    for line in sorted(lines, key=lambda ln: (round(ln.bottom), ln.x0)):
        if rows and abs(rows[-1][0].bottom - line.bottom) <= 2.0:
            rows[-1].append(line)
        else:
            rows.append([line])
    out: list[list[Line]] = []
    for row in rows:
        cells = _cells(row)
        held = _wrapped_cell(out[-1], cells) if out else None
        if held is None:
            out.append(cells)
        else:
            out[-1][held] = make_line(out[-1][held].words + cells[0].words)
    return out


def _wrapped_cell(above: list[Line], cells: list[Line]) -> int | None:
    """Which cell of the row above a lone cell goes on (its words wrapped to the next line):
    the one it starts under, within half its type size, straight below it (less than a line
    apart), when that cell ends
    no sentence and the lone cell opens in lower case ("... different from the" over "usual
    sports."). A capital or a figure opens a row of its own."""
    if len(cells) != 1 or not cells[0].text[:1].islower() or len(cells[0].words[0].text) < 2:
        return None  # a note's mark ("a Mean ± SD") opens a note
    lone = cells[0]
    for i, cell in enumerate(above):
        size = max(cell.size, 1.0)
        if (abs(cell.x0 - lone.x0) <= size / 2 and -0.2 * size < lone.top - cell.bottom <= 0.8 * size
                and not _SENTENCE_END.search(cell.text)):
            return i
    return None


JUSTIFIED_CELL_EM = 2.0  # our own setting: notes' spaces reach 1.2 em, column heads' 4 em


def _cells(row: list[Line]) -> list[Line]:
    """Table cells of a row: words split at gaps wider than a few spaces, except a line of
    words set justified (a note under the table), whose spaces are alike and under
    JUSTIFIED_CELL_EM of the size (column heads set at equal distances lie further apart)."""
    words = sorted((w for line in row for w in line.words), key=lambda w: w.box[0])
    spacing = justified_spacing(words) if sum(
        any(ch.isalpha() for ch in w.text) for w in words) * 2 > len(words) else None
    if spacing is not None and spacing >= JUSTIFIED_CELL_EM * words[0].size:
        spacing = None
    cells = [[words[0]]]
    for word in words[1:]:
        gap = word.box[0] - cells[-1][-1].box[2]
        if spacing is not None and abs(gap - spacing) <= JUSTIFIED_SPREAD * spacing:
            cells[-1].append(word)
        elif gap > max(3.5, 0.6 * word.size):
            cells.append([word])
        else:
            cells[-1].append(word)
    return [make_line(cell) for cell in cells]
