"""The PDF reader on pages laid out by reportlab's platypus (devtools/platypus_writer.py), a
layout it was not tuned on: justified columns with first-line indents and no space between
paragraphs, Times body, Helvetica-Bold headings, a running header. The text is invented."""

from __future__ import annotations

import itertools
from pathlib import Path

import pytest

pytest.importorskip("reportlab")

from robtui.devtools.platypus_writer import render_text_with_platypus
from robtui.reading.reader import read_document

# Paragraphs that end with a reference number after a year's full stop (which the sentence
# splitter cannot tell from a decimal), or with no full stop at all, run straight on into the
# next paragraph: only the next one's indent tells them apart.
ENDS_WITH_CITATIONS = (
    "Walking groups were run by volunteers in each of the invented Larkfield districts "
    "and met twice a week from March to October, 2011.2"
)
AFTER_CITATIONS = (
    "Nurses at the three Larkfield clinics recorded each visit on a paper form that was "
    "copied into the study database by a second person within a week."
)
GRADE_ONE = (
    "Grade 1: a mild ache after walking that settles with rest within an hour and needs no "
    "painkiller at all"
)
GRADE_TWO = (
    "Grade 2: an ache that stops the walk early and needs a longer rest or a painkiller "
    "before the walker can go on again."
)
# A long word that does not fit at a line's end leaves the words before it spread across the
# column with wide, alike spaces (justified text without hyphenation).
STRETCHED = (
    ("One confirmatory analysis used the last-observation-carried-forward-with-baseline-"
     "adjustment method for walkers who left early."),
    ("The nurses also recorded the walkers' self-reported-pain-interference-with-daily-"
     "activities scores at every visit."),
)
FILLER = (
    "The walkers kept a diary of the minutes walked on each day of the week and handed it "
    "to the study nurse at the next visit, who checked it with them and noted any missing "
    "days before filing it with the other forms of that visit. "
)


def _article() -> str:
    body = [
        "Title",
        "Walking groups for knee pain in the invented Larkfield trial",
        "Abstract",
        "Background",
        "Knee pain limits walking in older adults. " + FILLER,
        "Introduction",
        FILLER * 3,
        ENDS_WITH_CITATIONS,
        AFTER_CITATIONS,
        FILLER * 2,
        "Methods",
        "Randomisation",
        "Participants were randomly assigned to a walking group or to usual care by a "
        "computer-generated list held by the trial statistician. " + FILLER,
        "Outcomes",
        "Pain was rated on four grades by the study nurse at each visit.",
        GRADE_ONE,
        GRADE_TWO,
        FILLER * 2 + STRETCHED[0] + " " + FILLER + STRETCHED[1] + " " + FILLER,
        "Statistical analysis",
        "Analysis was by intention to treat. " + FILLER * 4,
        "Results",
        FILLER * 6,
        "Discussion",
        FILLER * 6,
    ]
    return "\n".join(body)


@pytest.fixture(scope="module")
def platypus_document(tmp_path_factory):
    path = tmp_path_factory.mktemp("platypus") / "larkfield.pdf"
    pages = render_text_with_platypus(_article(), path, full_width_lines=3)
    assert pages >= 2  # the running header repeats
    return read_document(path, use_cache=False)


def _texts(document) -> list[str]:
    return [s.text for s in document.sentences]


def test_indented_paragraphs_are_parted_even_after_citations(platypus_document):
    texts = _texts(platypus_document)
    assert ENDS_WITH_CITATIONS in texts
    assert AFTER_CITATIONS in texts


def test_an_indent_parts_paragraphs_that_end_without_a_full_stop(platypus_document):
    texts = _texts(platypus_document)
    assert GRADE_ONE in texts
    assert GRADE_TWO in texts


def _stretched_rows(path: Path) -> list[list[str]]:
    """Rows of at most five words with a gap wider than 2.2 body sizes (pdfplumber's words):
    lines justified across the column around a long word that went to the next line."""
    import pdfplumber

    rows: dict[tuple[int, int], list[dict]] = {}
    with pdfplumber.open(path) as pdf:
        for number, page in enumerate(pdf.pages):
            for word in page.extract_words():
                rows.setdefault((number, round(word["top"])), []).append(word)
    out = []
    for words in rows.values():
        words.sort(key=lambda w: w["x0"])
        gaps = [b["x0"] - a["x1"] for a, b in itertools.pairwise(words)]
        if gaps and len(words) <= 5 and max(gaps) > 2.2 * 9.5:
            out.append([w["text"] for w in words])
    return out


def test_a_justified_line_of_few_words_is_prose_not_a_table(platypus_document):
    assert _stretched_rows(Path(platypus_document.path))  # the layout under test is there
    sentences = platypus_document.sentences
    for text in STRETCHED:
        whole = [s for s in sentences if s.text == text]
        assert whole, [s.text for s in sentences if text[:12] in s.text]
        assert whole[0].block == "body"
    assert not [s.text for s in sentences if s.block == "table"]


def test_headings_sections_and_running_header(platypus_document):
    by_text = {s.text: s for s in platypus_document.sentences}
    first = next(t for t in by_text if t.startswith("Participants were randomly assigned"))
    assert by_text[first].section == "methods.randomisation"
    itt = "Analysis was by intention to treat."
    assert by_text[itt].section == "methods.statistical_methods"
    assert by_text["Results"].block == "heading"
    assert "Journal of Invented Trials" not in platypus_document.text
    # the page numbers in the foot ("— 2 —") are no text either
    assert not any(s.text.startswith("—") for s in platypus_document.sentences)


def test_every_paragraph_sentence_comes_back_whole(platypus_document):
    texts = set(_texts(platypus_document))
    expected = [
        "Knee pain limits walking in older adults.",
        "Pain was rated on four grades by the study nurse at each visit.",
        ("Participants were randomly assigned to a walking group or to usual care by a "
         "computer-generated list held by the trial statistician."),
    ]
    missing = [t for t in expected if t not in texts]
    assert not missing


def test_hanging_list_items_are_not_parted_at_their_second_line(tmp_path):
    """A bulleted item whose second line hangs under its text (not under the bullet) goes on
    with the item: the indent rule parts paragraphs, not list items."""
    from reportlab.lib.styles import ParagraphStyle
    from reportlab.platypus import Paragraph, SimpleDocTemplate

    style = ParagraphStyle("item", fontName="Times-Roman", fontSize=10, leading=12,
                           leftIndent=14, bulletIndent=0, bulletFontName="Times-Roman")
    items = [
        ("Walkers who missed two sessions in a row were phoned by the group leader the "
         "following morning."),
        ("Leaders who could not come asked another trained volunteer to take the group that "
         "day."),
    ]
    path = tmp_path / "items.pdf"
    doc = SimpleDocTemplate(str(path), invariant=1)
    doc.build([Paragraph(text, style, bulletText="\u2022") for text in items])
    texts = " ".join(s.text for s in read_document(path, use_cache=False).sentences)
    for text in items:
        assert text in texts


def _draw(path: Path, rows: list[tuple[str, str, float]]) -> None:
    """Draw (text, font, top) rows at the left margin of one A4 page, 10 pt."""
    from reportlab.pdfgen.canvas import Canvas

    canvas = Canvas(str(path), pagesize=(595.0, 842.0), invariant=1)
    for text, font, top in rows:
        canvas.setFont(font, 10)
        canvas.drawString(72, 842.0 - top, text)
    canvas.showPage()
    canvas.save()


def _paragraph(path: Path, lines: list[str]) -> list:
    """Draw ``lines`` as one paragraph (Times 10 pt, 12 pt leading); read its sentences."""
    _draw(path, [(text, "Times-Roman", 100 + 12 * i) for i, text in enumerate(lines)])
    return read_document(path, use_cache=False).sentences


def test_a_figure_reference_wrapped_to_a_line_start_is_no_caption(tmp_path):
    lines = [
        "The walkers' diaries were compared with the step counters (see",
        "Figure 3) and the two agreed within ten minutes on most days of",
        "the study for all but four walkers of the Larkfield groups.",
    ]
    sentences = _paragraph(tmp_path / "reference.pdf", lines)
    assert [s.text for s in sentences] == [" ".join(lines)]
    assert sentences[0].block == "body"


def test_spaced_short_lines_in_another_font_do_not_set_the_leading(tmp_path):
    """A page whose short lines in bold, spaced wider than the body's leading, outnumber its
    body lines (a list of abbreviations set as headings) keeps them apart: the leading that
    parts blocks is the body font's."""
    body = [
        "The walkers kept a diary of the minutes walked on each day of the",
        "week and handed it to the study nurse at the next visit, who checked",
        "it with them and noted any missing days before filing it with the",
        "other forms of that visit in the locked cabinet of the clinic.",
    ]
    terms = ["Abbreviations", "KPS", "Knee pain score", "WGR", "Walking group rate",
             "LDS", "Larkfield diary sheet", "SNV", "Study nurse visit", "MWD",
             "Minutes walked per day", "CAB", "Cabinet"]
    rows = [(text, "Times-Roman", 100 + 12 * i) for i, text in enumerate(body)]
    rows += [(text, "Helvetica-Bold", 170 + 22 * i) for i, text in enumerate(terms)]
    path = tmp_path / "abbreviations.pdf"
    _draw(path, rows)
    texts = [s.text for s in read_document(path, use_cache=False).sentences]
    assert " ".join(body) in texts
    for term in ("Knee pain score", "Walking group rate", "Minutes walked per day"):
        assert term in texts


@pytest.mark.parametrize(("text", "caption"), [
    ("Figure 3) and the two agreed", False),
    ("Table 2, which lists the walkers", False),
    ("Table 2; the walkers", False),
    ("Table 2, continued", True),
    ("Table 2 Walkers at baseline", True),
    ("Figure 1. Flow of walkers", True),
    ("Fig. 2 (a) Minutes walked", True),
])
def test_a_label_that_running_text_goes_on_from_is_no_caption(text, caption):
    from robtui.reading.assemble import is_caption

    assert is_caption(text) is caption


def test_a_table_label_opening_a_line_of_an_unfinished_sentence_goes_on_with_it(tmp_path):
    lines = [
        "The walkers' baseline answers are shown in Table 1, and the clinics",
        "they came from are shown in",
        "Supplementary Table 1. The median walk lasted forty minutes in",
        "both groups of the invented Larkfield trial.",
    ]
    sentences = _paragraph(tmp_path / "label.pdf", lines)
    assert [s.text for s in sentences] == [
        ("The walkers' baseline answers are shown in Table 1, and the clinics they came from "
         "are shown in Supplementary Table 1."),
        "The median walk lasted forty minutes in both groups of the invented Larkfield trial.",
    ]
    assert {s.block for s in sentences} == {"body"}


def test_stretched_lines_are_judged_against_their_own_column(tmp_path):
    """Two justified columns set in different leadings, so their baselines do not line up:
    the rows just above and below a stretched line of one column belong to the other, and
    its neighbours are looked for in its own column."""
    from reportlab.lib.enums import TA_JUSTIFY
    from reportlab.lib.styles import ParagraphStyle
    from reportlab.platypus import BaseDocTemplate, Frame, FrameBreak, PageTemplate, Paragraph

    left_style = ParagraphStyle("left", fontName="Times-Roman", fontSize=9.5, leading=11.4,
                                alignment=TA_JUSTIFY)
    right_style = ParagraphStyle("right", parent=left_style, leading=13.3)
    path = tmp_path / "columns.pdf"
    doc = BaseDocTemplate(str(path), pagesize=(595.28, 841.89), invariant=1)
    doc.addPageTemplates([PageTemplate("two", [
        Frame(50, 60, 240, 720, id="left"), Frame(305, 60, 240, 720, id="right")])])
    left = FILLER + " ".join((*STRETCHED, FILLER, *STRETCHED, FILLER, *STRETCHED, FILLER))
    doc.build([Paragraph(left, left_style), FrameBreak(),
               Paragraph(FILLER * 4, right_style)])
    assert _stretched_rows(path)
    sentences = read_document(path, use_cache=False).sentences
    assert not [s.text for s in sentences if s.block == "table"]
    texts = [s.text for s in sentences]
    for text in STRETCHED:
        assert texts.count(text) == 3
