"""Layout analysis of PDF pages: glyphs to lines, gutters, reading order, headings, asides.

Unit tests build glyphs by hand (an invented page); the real-PDF tests read the shared real
articles (../shared/real-pdfs) and skip with a reason when they are absent.
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from robtui.reading.layout import page as page_module
from robtui.reading.layout.columns import (
    body_size,
    find_gutters,
    geo_blocks,
    reading_order,
    segments,
    text_rows,
)
from robtui.reading.layout.glyphs import Glyph, PageGlyphs
from robtui.reading.layout.lines import font_is_bold, font_is_italic, rows_of, words_of
from robtui.reading.layout.page import analyse_page

# -- glyphs by hand ----------------------------------------------------------------------------


def _glyphs(text: str, x: float, baseline: float, size: float = 10.0, font: str = "Body",
            advance: float | None = None) -> list[Glyph]:
    """Glyphs of ``text`` set from ``x`` on ``baseline``; a space advances without a glyph."""
    step = advance or 0.5 * size
    out = []
    for ch in text:
        if ch != " ":
            out.append(Glyph(ch, x, x + step, baseline - 0.8 * size, baseline + 0.2 * size,
                             baseline, size, font, 0))
        x += step
    return out


def _text(rows) -> list[str]:
    return [" ".join(w.text for w in words_of(row)) for row in rows]


@pytest.mark.parametrize(
    ("font", "bold", "italic"),
    [
        ("AdvTTaf7f9f4f.B", True, False),
        ("AdvTT7329fd89.I", False, True),
        ("Shaker2Lancet-Bold", True, False),
        ("GillSansMT-Bold", True, False),
        ("FranklinGothic-Demi", True, False),
        ("Gotham-Medium", True, False),
        ("AvenirLTStd-Black", True, False),
        ("Helvetica-Bd", True, False),
        ("TimesNewRomanPS-BoldItalicMT", True, True),
        ("AdvTT86d47313", False, False),
        ("TimesNewRomanPSMT", False, False),
        ("AvenirLTStd-Roman", False, False),
        ("SabonLTStd-R", False, False),
    ],
)
def test_weight_and_style_from_font_names(font, bold, italic) -> None:
    assert font_is_bold(font) is bold
    assert font_is_italic(font) is italic


def test_shifted_ligature_and_superscript_stay_in_their_words() -> None:
    # "eff" + "ect": the ligature glyph drawn 2.2 pt higher from a second font; "trial" with a
    # superscript reference 3.5 pt up at 6 pt; the next line 12 pt below.
    glyphs = _glyphs("the e", 10, 100)
    glyphs += [Glyph("\ufb00", 35, 41, 90, 100, 97.8, 10.0, "Body+20", 0)]
    glyphs += _glyphs("ect of the trial", 41, 100)
    glyphs += _glyphs("12", 121, 96.5, size=6.0)
    glyphs += _glyphs("next line here", 10, 112)
    rows = rows_of(glyphs)
    assert _text(rows) == ["the effect of the trial12", "next line here"]


def test_spacing_accent_over_a_letter_is_composed() -> None:
    glyphs = _glyphs("Fagerstro", 10, 100) + [
        Glyph("\u00a8", 50.5, 54.5, 90, 100, 100, 10.0, "Body", 0)
    ] + _glyphs("m", 55, 100)
    assert _text(rows_of(glyphs)) == ["Fagerström"]


def test_footnote_mark_before_a_word_is_its_own_word() -> None:
    glyphs = _glyphs("a", 10, 96.5, size=6.0) + _glyphs("Values are means", 13, 100)
    assert _text(rows_of(glyphs)) == ["a Values are means"]


def test_a_slash_set_between_spaces_parts_the_words_either_side() -> None:
    before = _glyphs("2030", 10, 100, size=8.5, advance=4.2)
    slash = _glyphs("/", before[-1].x1 + 1.8, 100, size=8.5, advance=2.4)
    slash[0].space_before = True  # PDFium's guess from the font's spacing
    after = _glyphs("Accepted", slash[0].x1 + 0.8, 100, size=8.5, advance=4.2)
    tight = _glyphs("and/or", 10, 120, size=8.5, advance=4.2)
    assert _text(rows_of(before + slash + after + tight)) == ["2030 / Accepted", "and/or"]


def _two_column_page(gutter: float, offset: float) -> list[Glyph]:
    """A full-width title, then two columns of prose whose baselines are ``offset`` apart,
    separated by a ``gutter`` (points)."""
    glyphs = _glyphs("An invented full width title over both columns of the page", 40, 60,
                     size=14.0, advance=8.0)
    left_words = "left column words run on here"
    right_words = "right column words run on too"
    width = len(left_words) * 5.0
    for i in range(8):
        glyphs += _glyphs(f"{left_words} {i}", 40, 100 + 12 * i)
        glyphs += _glyphs(f"{right_words} {i}", 40 + width + 10 + gutter, 100 + 12 * i + offset)
    return glyphs


@pytest.mark.parametrize(("gutter", "offset"), [(9.0, 0.0), (9.0, 5.0), (20.0, 3.0)])
def test_narrow_gutters_with_unaligned_baselines_split_the_columns(gutter, offset) -> None:
    glyphs = _two_column_page(gutter, offset)
    page = analyse_page(PageGlyphs(1, 595.0, 842.0, glyphs, [], [], 0))
    texts = [line.text for line in page.lines]
    assert texts[0].startswith("An invented full width title")
    lefts = [t for t in texts if t.startswith("left")]
    rights = [t for t in texts if t.startswith("right")]
    assert len(lefts) == len(rights) == 8  # no line joins words across the gutter
    # read as a reader would: the title, the whole left column, then the right one
    assert texts == [texts[0], *lefts, *rights]
    assert lefts == [f"left column words run on here {i}" for i in range(8)]


def test_rivers_in_justified_text_are_not_gutters() -> None:
    # One column whose word gaps line up for two rows only: no gutter, lines stay whole.
    glyphs = []
    for i in range(10):
        words = "aaaa bbbbbb cc ddddddd" if i in (3, 4) else "aaaa bbbbb ccc dddddddd"
        glyphs += _glyphs(words, 40, 100 + 12 * i, advance=5.0)
    rows = text_rows(rows_of(glyphs))
    assert find_gutters(rows, body_size(rows)) == []


def test_reading_order_full_width_block_between_column_runs() -> None:
    glyphs = []
    for i in range(5):
        glyphs += _glyphs(f"upper left {i} text here", 40, 100 + 12 * i)
        glyphs += _glyphs(f"upper right {i} text here", 300, 100 + 12 * i)
    glyphs += _glyphs("a full width line that crosses the gutter of the page here ok", 40, 180)
    for i in range(5):
        glyphs += _glyphs(f"lower left {i} text here", 40, 210 + 12 * i)
        glyphs += _glyphs(f"lower right {i} text here", 300, 210 + 12 * i)
    rows = text_rows(rows_of(glyphs))
    size = body_size(rows)
    segs = segments(rows, find_gutters(rows, size), 595.0, size)
    order = reading_order(geo_blocks(segs, size))
    firsts = [block.segments[0].line.text.split()[:2] for block in order]
    assert firsts == [["upper", "left"], ["upper", "right"], ["a", "full"],
                      ["lower", "left"], ["lower", "right"]]


def _columns_then_headed_full_width_block(heading_font: str) -> list[Glyph]:
    """Two columns (the left one a line longer), then under them a one-word heading at the left
    margin and a full-width paragraph: the back matter of a two-column article's last page."""
    glyphs = []
    for i in range(6):
        glyphs += _glyphs(f"left column {i} text here", 40, 100 + 12 * i)
        if i < 5:
            glyphs += _glyphs(f"right column {i} text here", 300, 100 + 12 * i)
    glyphs += _glyphs("Acknowledgements", 40, 190, font=heading_font)
    for i in range(2):
        glyphs += _glyphs(f"we thank {i} the invented people who helped with this invented page ok",
                          40, 202 + 12 * i)
    return glyphs


def test_a_heading_under_the_columns_is_read_with_the_block_it_heads() -> None:
    """Breuel's rules alone put the heading (left of the right column, nothing between them)
    before the right column, cutting the right column's text off the left column's."""
    page = analyse_page(PageGlyphs(1, 595.0, 842.0,
                                   _columns_then_headed_full_width_block("Body-Bold"), [], [], 0))
    texts = [line.text for line in page.lines]
    assert len(texts) == 14  # nothing lost or doubled
    assert texts[:6] == [f"left column {i} text here" for i in range(6)]
    assert texts[6:11] == [f"right column {i} text here" for i in range(5)]
    assert texts[11] == "Acknowledgements"
    assert texts[12].startswith("we thank 0")


def test_a_plain_short_line_under_the_columns_keeps_breuels_order() -> None:
    # not set apart as a heading: the short line is the left column's last, as before
    page = analyse_page(PageGlyphs(1, 595.0, 842.0,
                                   _columns_then_headed_full_width_block("Body"), [], [], 0))
    texts = [line.text for line in page.lines]
    assert texts.index("Acknowledgements") < texts.index("right column 0 text here")


def test_headings_stacked_over_their_text_stay_in_order() -> None:
    glyphs = _glyphs("Abstract", 40, 100, font="Body-Bold", size=12.0)
    glyphs += _glyphs("Background", 40, 114, font="Body-Bold")
    glyphs += _glyphs("an invented opening line of the abstract under its headings", 40, 128)
    glyphs += _glyphs("and a second invented line of the same paragraph of text", 40, 140)
    blocks = geo_blocks(*_segments_and_size(glyphs))
    size = _segments_and_size(glyphs)[1]
    order = reading_order(blocks, size)
    lines = [seg.line.text for block in order for seg in block.segments]
    assert lines[:2] == ["Abstract", "Background"] and len(lines) == 4


def _segments_and_size(glyphs: list[Glyph]):
    rows = text_rows(rows_of(glyphs))
    size = body_size(rows)
    return segments(rows, find_gutters(rows, size), 595.0, size), size


def test_a_page_that_defeats_the_analysis_is_read_in_plain_order(monkeypatch) -> None:
    def broken(page, rows):
        raise ValueError("invented failure")

    monkeypatch.setattr(page_module, "_analysed", broken)
    glyphs = _glyphs("first line", 40, 100) + _glyphs("second line", 40, 112)
    page = analyse_page(PageGlyphs(7, 595.0, 842.0, glyphs, [], [], 0))
    assert [line.text for line in page.lines] == ["first line", "second line"]
    assert page.warnings and "page 7" in page.warnings[0] and "plain order" in page.warnings[0]


def test_soft_hyphen_at_line_end_joins_the_word() -> None:
    from robtui.reading.layout.blocks import PBlock
    from robtui.reading.layout.lines import Line, Word
    from robtui.reading.pdf import TextBuilder

    def line(*texts):
        words = [Word(t, (10.0 * i, 0.0, 10.0 * i + 8, 9.0), False, False, 9.0)
                 for i, t in enumerate(texts)]
        return Line(words, 0.0, 0.0, 10.0 * len(texts), 9.0)

    builder = TextBuilder()
    builder.add(PBlock("body", [line("each", "partici\u00ad"), line("pant", "agreed.")], 1), "body")
    assert builder.text == "each participant agreed."


# -- the shared real articles ------------------------------------------------------------------


def _real_pdfs() -> list[Path]:
    from robtui.benchmarks.real_pdfs import default_folder

    folder = default_folder()
    if folder is None:
        return []
    return sorted(folder.glob("*.pdf")) + sorted((folder / "more").glob("*.pdf"))


REAL = _real_pdfs()
needs_real = pytest.mark.skipif(not REAL, reason="shared real PDFs (../shared/real-pdfs) absent")


@needs_real
def test_every_shared_real_pdf_opens_with_its_sections() -> None:
    from robtui.reading.document import top_section
    from robtui.reading.reader import read_document

    for path in REAL:
        doc = read_document(path, use_cache=False)
        found = {top_section(s.section) for s in doc.sentences}
        assert {"methods", "references"} <= found, path.name
        body = " ".join(s.text for s in doc.sentences if s.block == "body")
        assert "\ufb00" not in body and "\u00ad" not in body, path.name
        split = re.search(r"\b(?:insuf|suf|ef|eff|signi|speci)\s(?:fi|ff)?\s?(?:cien|ect|cacy|cant|c\b)", body)
        assert split is None, (path.name, split and split.group(0))


@needs_real
def test_side_notes_and_stamps_stay_out_of_prose() -> None:
    from robtui.reading.document import top_section
    from robtui.reading.reader import read_document

    for path in REAL:
        doc = read_document(path, use_cache=False)
        prose = [s.text for s in doc.sentences
                 if s.block == "body" and top_section(s.section) != "other"]
        for text in prose:
            if len(text.split()) > 8:
                assert "See Online for appendix" not in text, (path.name, text)
                assert "Downloaded from http" not in text, (path.name, text)


def _spaced(text: str, x: float, baseline: float, letter_gap: float, word_gap: float,
            size: float = 10.0) -> list[Glyph]:
    """Glyphs of ``text`` set letter-spaced: ``letter_gap`` between letters, ``word_gap``
    for a space (points)."""
    out = []
    for ch in text:
        if ch == " ":
            x += word_gap
            continue
        out.append(Glyph(ch, x, x + 5.0, baseline - 0.8 * size, baseline + 0.2 * size,
                         baseline, size, "Body", 0))
        x += 5.0 + letter_gap
    return out


def test_letter_spaced_words_are_joined_and_their_spaces_kept() -> None:
    glyphs = _spaced("RESEARCH ARTICLE", 10, 100, letter_gap=1.5, word_gap=4.0)
    glyphs += _spaced("Commons Attribution 4.0", 10, 120, letter_gap=0.9, word_gap=4.5)
    assert _text(rows_of(glyphs)) == ["RESEARCH ARTICLE", "Commons Attribution 4.0"]


def test_short_words_with_tight_spaces_stay_apart() -> None:
    # "In 11 of 13" and "a 3 x 2" have short pieces and narrow gaps, but few single letters
    glyphs = _spaced("In 11 of 13 foci", 10, 100, letter_gap=0.0, word_gap=1.8)
    glyphs += _spaced("a 3 x 2 design", 10, 120, letter_gap=0.0, word_gap=1.6)
    assert _text(rows_of(glyphs)) == ["In 11 of 13 foci", "a 3 x 2 design"]


def test_affiliation_mark_in_small_print_beside_body_text_is_its_own_word() -> None:
    # a footnote line in 7.5 pt shares its baseline with 10 pt body text in the other column
    glyphs = _glyphs("body text of the left column", 10, 100)
    glyphs += _glyphs("1", 300, 96.5, size=5.0, advance=2.7)
    glyphs += _glyphs("School of Invented Studies", 302.7, 100, size=7.5, advance=3.4)
    assert _text(rows_of(glyphs)) == ["body text of the left column 1 School of Invented Studies"]


def test_short_lines_beside_the_other_column_leave_no_gutter_in_their_own() -> None:
    # A left column whose paragraph ends in a short line and two short headings, beside a full
    # right column: the white right of the short lines is no gutter inside the left column.
    # The paragraph's last full line is justified with wide spaces (as "recovery  and  lung").
    glyphs = _glyphs("the patients quality recovery", 54, 100, advance=6.4)
    glyphs += _glyphs("and", 248, 100, advance=4.6) + _glyphs("lung", 273, 100, advance=4.6)
    glyphs += _glyphs("right column text runs on and on here", 305, 100, advance=6.4)
    y = 114.0
    for text in ["protection of", "Patients and Methods", "General Information", "Procedures"]:
        glyphs += _glyphs(text, 54, y, advance=4.6)
        glyphs += _glyphs("right column text runs on and on here", 305, y, advance=6.4)
        y += 14
    glyphs += _glyphs("This study was a single centre prospective trial", 54, y, advance=4.8)
    glyphs += _glyphs("right column text runs on and on here", 305, y, advance=6.4)
    rows = text_rows(rows_of(glyphs))
    size = body_size(rows)
    lefts = [g for g in find_gutters(rows, size) if g.x1 < 300]
    assert lefts == []


# -- style changes between lines ---------------------------------------------------------------


def _mixed_line(pieces: list[tuple[str, str]], x: float, baseline: float) -> list[Glyph]:
    """One line set from (text, font) pieces, a space between them."""
    glyphs = []
    for text, font in pieces:
        glyphs += _glyphs(text, x, baseline, font=font)
        x += (len(text) + 1) * 5.0
    return glyphs


def _page_texts_by_block(glyphs: list[Glyph]) -> list[list[str]]:
    from robtui.reading.layout.blocks import page_blocks

    page = analyse_page(PageGlyphs(1, 595.0, 842.0, glyphs, [], [], 0))
    return [[line.text for line in block.lines] for block in page_blocks(page)]


def test_a_line_of_statistics_with_italic_letters_stays_in_its_paragraph() -> None:
    """Counted by word, "(p = 0.01; d = 0.70) and oppo-" is mostly italic and once parted
    from its paragraph, leaving "oppo-" / "sitional" unjoined."""
    glyphs = _glyphs("an invented paragraph line that runs on to the", 40, 100)
    italic, roman = "Body-Italic", "Body"
    glyphs += _mixed_line([("(p", italic), ("=", italic), ("0.01;", roman), ("d", italic),
                           ("=", italic), ("0.70),", roman), ("conduct", roman), ("(p", italic),
                           ("<", italic), ("0.01)", roman), ("oppo-", roman)], 40, 112)
    glyphs += _glyphs("sitional part of the same invented sentence here.", 40, 124)
    assert len(_page_texts_by_block(glyphs)) == 1


def test_a_phrase_in_italics_for_emphasis_stays_in_its_paragraph() -> None:
    glyphs = _glyphs("in the second term we conducted", 40, 100)
    # 37 of the line's 52 letters in italics; a line nearly all in italics (STYLE_THROUGHOUT)
    # still parts, as an italic subheading must
    glyphs += _mixed_line([("a", "Body"), ("cluster-randomised controlled pilot trial",
                                           "Body-Italic"), ("in", "Body"), ("three", "Body"),
                           ("schools", "Body")], 40, 112)
    glyphs += _glyphs("of the invented region.", 40, 124)
    assert len(_page_texts_by_block(glyphs)) == 1


def test_an_italic_subheading_still_opens_a_block() -> None:
    glyphs = _glyphs("the end of an invented paragraph.", 40, 100)
    glyphs += _glyphs("Invented Rating Scale (IRS)", 40, 112, font="Body-Italic")
    glyphs += _glyphs("A new paragraph of invented text follows here", 40, 124)
    glyphs += _glyphs("and goes on over a second line of text.", 40, 136)
    blocks = _page_texts_by_block(glyphs)
    assert ["Invented Rating Scale (IRS)"] in blocks
