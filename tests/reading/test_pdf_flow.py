"""Paragraph flow across floats, notes and pages; tables parted by prose; run-in subheadings of
summaries and structured abstracts. Small invented PDFs are drawn with reportlab; the
real-PDF tests read the shared articles (../shared/real-pdfs) and skip when they are absent.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from robtui.reading.reader import read_document

WIDTH, HEIGHT = 595.0, 842.0
LEFT, RIGHT = 50.0, 315.0  # the two columns' left edges
FILLER = [
    "Participants in the invented Heron trial kept a diary of",
    "their walking on most days of the week and returned it",
    "to the study nurse at each of the planned clinic visits.",
    "The team counted the minutes walked in all the weeks of",
    "the study without asking the participants twice about",
    "the same days or the same visits to the clinic nurse.",
]


def _canvas(path: Path):
    from reportlab.pdfgen.canvas import Canvas

    return Canvas(str(path), pagesize=(WIDTH, HEIGHT))


def _lines(canvas, x: float, top: float, lines: list[str], font: str = "Times-Roman",
           size: float = 10.0, leading: float = 12.0) -> float:
    """Draw ``lines`` from ``top`` (points from the page's top); the next free top."""
    canvas.setFont(font, size)
    for line in lines:
        canvas.drawString(x, HEIGHT - top, line)
        top += leading
    return top


def _sentences(path: Path) -> list:
    return read_document(path, use_cache=False).sentences


def _texts(path: Path, block: str | None = None) -> list[str]:
    return [s.text for s in _sentences(path) if block is None or s.block == block]


def _sentences_of_finished(canvas, path: Path) -> list:
    """End the page, save the PDF and read its sentences."""
    canvas.showPage()
    canvas.save()
    return _sentences(path)


def _finished(canvas, path: Path) -> list[str]:
    """End the page, save the PDF and read its sentences' texts."""
    return [s.text for s in _sentences_of_finished(canvas, path)]


def test_a_caption_on_the_next_page_does_not_end_the_paragraph(tmp_path) -> None:
    path = tmp_path / "float.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 100, FILLER * 4)
    top = _lines(c, RIGHT, 100, FILLER * 3)
    _lines(c, RIGHT, top, ["The diaries of the women who took part in the"])
    c.showPage()
    _lines(c, LEFT, 100, ["Figure 1 Flow of participants through the invented trial."],
           font="Helvetica", size=8.0)
    _lines(c, LEFT, 140, ["walking group were complete for most of the weeks.", *FILLER * 3])
    _lines(c, RIGHT, 140, FILLER * 4)
    texts = _finished(c, path)
    assert ("The diaries of the women who took part in the walking group were complete for "
            "most of the weeks.") in texts
    assert any(t.startswith("Figure 1 Flow of participants") for t in texts)


def test_a_footnote_between_a_paragraphs_two_columns_floats_after_it(tmp_path) -> None:
    path = tmp_path / "footnote.pdf"
    c = _canvas(path)
    top = _lines(c, LEFT, 100, FILLER * 4)
    _lines(c, LEFT, top, ["Improvements were seen in attention (p = 0.02), learning"])
    _lines(c, LEFT, 720, ["The study was funded by an invented charity for walkers.",
                          "* Corresponding author: heron@example.org"], size=7.5, leading=9)
    _lines(c, RIGHT, 100, ["(p = 0.05) and mood (p = 0.04) in the walking group.",
                           *FILLER * 4])
    texts = _finished(c, path)
    assert ("Improvements were seen in attention (p = 0.02), learning (p = 0.05) and mood "
            "(p = 0.04) in the walking group.") in texts
    assert "The study was funded by an invented charity for walkers." in texts


def test_body_text_under_a_bold_title_read_as_a_paragraph_is_no_footnote(tmp_path) -> None:
    """A two-line bold title set larger than the text (its first line broken at a hyphen, so
    read as a paragraph) held the paragraphs under it as small print, and the last of them was
    not joined to its end on the next page (a one-column manuscript)."""
    wide = ["The team counted the minutes walked in all the weeks of the study without asking",
            "the participants twice about the same days or the same visits to the nurse."]
    path = tmp_path / "title.pdf"
    c = _canvas(path)
    top = _lines(c, LEFT, 100, wide * 2, size=12.0, leading=14.0)
    top = _lines(c, LEFT, top + 12, ["Second study: an invented randomised trial of walking in sub-",
                                     "urban adults who walk little"], font="Times-Bold",
                 size=13.5, leading=16.0)
    top = _lines(c, LEFT, top + 6, wide * 2, size=12.0, leading=14.0)
    _lines(c, LEFT, top, ["The sample size was set to show a fall from 50% in the"], size=12.0)
    c.showPage()
    _lines(c, LEFT, 100, ["control group to 34% in the walking group.", *wide], size=12.0,
           leading=14.0)
    texts = _finished(c, path)
    assert ("The sample size was set to show a fall from 50% in the control group to 34% in "
            "the walking group.") in texts


def _paragraph_texts(path: Path, lines: list[str]) -> list[str]:
    """Sentences of a page whose left column ends with ``lines`` after two filler paragraphs."""
    c = _canvas(path)
    top = _lines(c, LEFT, 100, FILLER * 2)
    _lines(c, LEFT, top, lines)
    _lines(c, RIGHT, 100, FILLER * 3)
    return _finished(c, path)


def test_a_dash_set_against_its_word_at_a_line_end_joins_without_a_space(tmp_path) -> None:
    texts = _paragraph_texts(tmp_path / "dashes.pdf", [
        "Dizziness on standing up\u2014", "which passed within the hour\u2014was seen",
        "in two walkers (see figure 2a\u2013", "c) and in none of the others."])
    assert ("Dizziness on standing up\u2014which passed within the hour\u2014was seen in two walkers "
            "(see figure 2a\u2013c) and in none of the others.") in texts


def test_a_word_broken_at_a_line_end_joins_though_its_halves_were_seen_apart(tmp_path) -> None:
    texts = _paragraph_texts(tmp_path / "hyphens.pdf", [
        "Walkers were asked whether they agree with the plan of the",
        "study and were given a written docu-",
        "ment about the walks. Despite their initial agree-",
        "ment, two walkers stopped in the first week."])
    assert "Despite their initial agreement, two walkers stopped in the first week." in texts


def test_a_justified_line_with_wide_spaces_keeps_its_word_order(tmp_path) -> None:
    path = tmp_path / "justified.pdf"
    c = _canvas(path)
    top = _lines(c, LEFT, 100, FILLER * 3)
    c.setFont("Times-Roman", 10)
    x = LEFT
    for word in ["the", "walking", "group", "and", "their", "nurses."]:  # spaces of 24 pt
        c.drawString(x, HEIGHT - top, word)
        x += c.stringWidth(word, "Times-Roman", 10) + 24
    _lines(c, LEFT, top + 12, ["Diaries were kept by all of them.", *FILLER * 2])
    _lines(c, RIGHT, 100, FILLER * 4)
    texts = _finished(c, path)
    assert "clinic nurse. the walking group and their nurses. Diaries were kept" in " ".join(texts)


def test_a_figure_title_in_the_side_column_is_a_caption_with_its_legend(tmp_path) -> None:
    path = tmp_path / "side_caption.pdf"
    c = _canvas(path)
    _lines(c, 150, 80, FILLER * 5)
    _lines(c, 20, 200, ["Figure 1: Flow of walkers"], font="Helvetica-Bold", size=7.0)
    _lines(c, 20, 208.5, ["*Two walkers moved away", "before the last visit of",
                          "the invented study."], font="Helvetica", size=7.0, leading=8.5)
    c.showPage()
    c.save()
    sentences = _sentences(path)
    title = next(s for s in sentences if s.text.startswith("Figure 1: Flow of walkers"))
    legend = next(s for s in sentences if "Two walkers moved away" in s.text)
    assert title.block == "caption" and title.section != "other"  # not a side note
    assert legend.block == "caption"
    assert title.text == "Figure 1: Flow of walkers"  # the bold title is a sentence of its own


def test_a_line_opening_with_the_text_naming_a_table_is_no_caption(tmp_path) -> None:
    sentences = _paragraph_texts(tmp_path / "table_named.pdf", [
        "The parts of the invented programme are listed in",
        "table 1. The walkers met their nurse once a week",
        "at the clinic in the town."])
    assert "The parts of the invented programme are listed in table 1." in sentences
    assert "The walkers met their nurse once a week at the clinic in the town." in sentences


def test_a_shaded_table_of_terms_and_their_descriptions_is_a_table(tmp_path) -> None:
    path = tmp_path / "framed_table.pdf"
    c = _canvas(path)
    c.setFillGray(0.9)
    c.rect(LEFT - 6, HEIGHT - 250, 510, 160, stroke=0, fill=1)
    c.setFillGray(0.0)
    _lines(c, LEFT, 100, ["Table 1 Parts of the invented walking programme"], font="Helvetica",
           size=9.0)
    c.setLineWidth(0.5)
    for y in (106, 122, 240):
        c.line(LEFT, HEIGHT - y, 545, HEIGHT - y)
    _lines(c, LEFT, 116, ["Part"], font="Helvetica-Bold", size=9.0)
    _lines(c, 130, 116, ["What happens"], font="Helvetica-Bold", size=9.0)
    rows = [("Walks", ["The walkers meet twice a week and walk together for an hour around the",
                       "lake in the invented park of the town."]),
            ("Diaries", ["Each walker writes down the minutes walked on every day of the week."]),
            ("Visits", ["A nurse sees each walker at the clinic once a month and reads the diary",
                        "with them before the next walk."]),
            ("Prizes", ["Walkers who keep their diary for a whole month get a small prize."])]
    top = 134.0
    for part, lines in rows:
        _lines(c, LEFT, top, [part], font="Helvetica", size=9.0)
        top = _lines(c, 130, top, lines, font="Helvetica", size=9.0, leading=11.0)
    _lines(c, LEFT, 270, FILLER)
    _lines(c, RIGHT, 270, FILLER)
    c.showPage()
    c.save()
    sentences = _sentences(path)
    rows = [s.text for s in sentences if s.block == "table"]
    assert ("Walks | The walkers meet twice a week and walk together for an hour around the lake "
            "in the invented park of the town.") in rows
    assert "Part | What happens" in rows
    assert not any(s.block in ("figure", "body") and "walkers meet twice" in s.text
                   for s in sentences)


def test_a_ruled_table_on_a_page_turned_landscape_keeps_its_rules(tmp_path) -> None:
    """The table's text and rules are drawn turned (the page reads landscape): rows broken by a
    wrapped cell and a group's label stay one table, as its rules say."""
    path = tmp_path / "landscape.pdf"
    c = _canvas(path)
    c.translate(WIDTH, 0)
    c.rotate(90)  # from here on x runs up the page: a landscape page HEIGHT wide, WIDTH tall

    def row(top: float, cells: list[str]) -> None:
        c.setFont("Times-Roman", 9.0)
        for x, cell in zip((60.0, 160.0, 260.0, 360.0, 460.0), cells, strict=False):
            c.drawString(x, WIDTH - top, cell)

    c.setFont("Times-Bold", 11.0)
    c.drawString(60, WIDTH - 80, "Table 2 Walks of the invented study by walker")
    tops = [110.0, 124.0, 138.0, 152.0]
    row(tops[0], ["Walker", "Week", "Minutes", "Place", "Notes"])
    row(tops[1], ["1", "3", "45", "Lake", "Walked with"])
    row(tops[2], ["2", "4", "50", "Park", "Alone"])
    row(tops[3], ["3", "5", "35", "Lake", "Alone"])
    row(163.0, ["", "", "", "", "a friend of the family"])
    row(178.0, ["Walkers of the second town:"])
    tops += [192.0, 206.0, 220.0]
    row(tops[4], ["4", "2", "55", "Hill", "Alone"])
    row(tops[5], ["5", "6", "40", "Lake", "Alone"])
    row(tops[6], ["6", "1", "30", "Park", "Alone"])
    c.setLineWidth(0.5)
    for y in (101.0, 114.0, 128.0, 142.0, 168.0, 182.0, 196.0, 210.0, 224.0):
        c.line(60, WIDTH - y, 600, WIDTH - y)
    sentences = _sentences_of_finished(c, path)
    body = [s.text for s in sentences if s.block == "body"]
    assert not any("second town" in t or "a friend" in t for t in body)
    assert any("second town" in s.text for s in sentences if s.block == "table")


def _ruled_table(c, top: float, caption: str, rows: list[tuple[str, str, str]]) -> float:
    _lines(c, LEFT, top, [caption], font="Helvetica-Bold", size=9.0)
    top += 10
    c.setLineWidth(0.5)
    c.line(LEFT, HEIGHT - top, 545, HEIGHT - top)
    top += 12
    for row in rows:
        c.setFont("Helvetica", 8.0)
        for x, cell in zip((LEFT, 250.0, 400.0), row, strict=True):
            c.drawString(x, HEIGHT - top, cell)
        top += 12
    c.line(LEFT, HEIGHT - top + 8, 545, HEIGHT - top + 8)
    return top + 10


def test_prose_between_two_ruled_tables_is_read_as_prose(tmp_path) -> None:
    path = tmp_path / "tables.pdf"
    rows = [("Walking, min", "120 (30)", "118 (29)"), ("Sitting, h", "7.1 (1.2)", "7.3 (1.1)"),
            ("Sleep, h", "6.9 (0.8)", "7.0 (0.9)"), ("Steps", "5400 (800)", "5300 (780)")]
    c = _canvas(path)
    top = _ruled_table(c, 90, "Table 1 Activity at trial entry", rows)
    prose_top = top + 10
    _lines(c, LEFT, prose_top, FILLER[:4])
    _lines(c, RIGHT, prose_top, FILLER[2:6])
    _ruled_table(c, prose_top + 4 * 12 + 20, "Table 2 Activity at four months", rows)
    c.showPage()
    c.save()
    sentences = _sentences(path)
    body = " ".join(s.text for s in sentences if s.block == "body")
    assert "Participants in the invented Heron trial kept a diary" in body
    table = [s.text for s in sentences if s.block == "table"]
    assert not any("diary" in t for t in table)


def test_notes_under_a_table_without_a_mark_belong_to_the_table(tmp_path) -> None:
    path = tmp_path / "notes.pdf"
    c = _canvas(path)
    rows = [("Walkers", "12.1 (3.4)", "11.9 (2.8)"), ("Nurses", "10.2 (2.2)", "9.8 (3.1)")]
    top = _ruled_table(c, 90, "Table 1 Minutes walked a day", rows)
    top = _lines(c, LEFT, top - 6, [
        "Notes: Data are mean (SD) minutes a day over the twelve weeks of the invented trial.",
        "Abbreviations: SD, standard deviation; the walkers kept their diaries every day."],
        font="Helvetica", size=7.0, leading=8.5)
    top = _ruled_table(c, top + 40, "Table 2 Visits to the clinic", rows)
    _lines(c, LEFT, top - 6, ["Visits were counted by the study nurse at each of the visits."],
           font="Helvetica", size=6.5, leading=8.0)  # small print, no mark: a note too
    _lines(c, LEFT, 320, FILLER * 3)
    c.showPage()
    c.save()
    sentences = _sentences(path)
    block = {s.text: s.block for s in sentences}
    assert block["Notes: Data are mean (SD) minutes a day over the twelve weeks of the invented "
                 "trial."] == "table"
    assert block["Abbreviations: SD, standard deviation; the walkers kept their diaries every "
                 "day."] == "table"
    assert block["Visits were counted by the study nurse at each of the visits."] == "table"
    assert all(s.block == "body" for s in sentences if s.text.startswith("Participants in"))


def test_an_unruled_table_under_its_caption_across_the_columns_gutter_is_a_table(tmp_path) -> None:
    # labels under the left column, figures under the right: the columns' gutter runs on
    # through the table's empty middle, so each row is cut in two there
    path = tmp_path / "captioned.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 100, FILLER * 4)
    _lines(c, RIGHT, 100, FILLER * 4)
    _lines(c, LEFT, 400, ["Table 3 Predictors of walking in the invented trial"],
           font="Helvetica-Bold", size=9.0)
    c.setFont("Helvetica", 8.0)
    rows = [("Variables", "Ratio", "95% CI", "P"), ("Group, walkers/others", "", "", "0.925"),
            ("Age, under 60/over 60", "1.52", "1.10-2.10", "0.012"),
            ("Diary kept, daily/weekly", "", "", "0.360"), ("Season, summer/winter", "", "", "0.076")]
    for i, row in enumerate(rows):
        for x, cell in zip((LEFT, 360.0, 420.0, 500.0), row, strict=True):
            c.drawString(x, HEIGHT - (414 + 14 * i), cell)
    texts = _finished(c, path)
    sentences = _sentences(path)
    assert not [s.text for s in sentences if s.block == "body" and "Diary kept" in s.text]
    assert any(s.block == "table" and s.text.startswith("Age, under 60/over 60 | 1.52")
               for s in sentences), texts


def test_column_heads_set_just_below_the_caption_belong_to_the_table(tmp_path) -> None:
    # The heads sit 6 pt under the caption, in smaller type: not the caption's next line.
    path = tmp_path / "heads.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 90, ["Table 3 Diet quality by group"], font="Helvetica-Bold", size=9.0)
    c.setFont("Helvetica", 8.0)
    for x, head in zip((LEFT, 250.0, 400.0), ("Outcome Time point", "Walking group", "Resting group"),
                       strict=True):
        c.drawString(x, HEIGHT - 104, head)
    c.setLineWidth(0.5)
    c.line(LEFT, HEIGHT - 110, 545, HEIGHT - 110)
    top = 122.0
    for row in (("Fruit, servings", "2.1 (0.8)", "1.9 (0.7)"), ("Vegetables", "3.0 (1.1)", "2.8 (1.0)"),
                ("Fibre, g", "24.1 (6.0)", "22.9 (5.8)"), ("Sugar, g", "41.0 (9.9)", "43.2 (10.4)")):
        for x, cell in zip((LEFT, 250.0, 400.0), row, strict=True):
            c.drawString(x, HEIGHT - top, cell)
        top += 12
    c.line(LEFT, HEIGHT - top + 8, 545, HEIGHT - top + 8)
    _lines(c, LEFT, top + 30, FILLER * 2)
    _lines(c, RIGHT, top + 30, FILLER * 2)
    c.showPage()
    c.save()
    sentences = _sentences(path)
    table = [s.text for s in sentences if s.block == "table"]
    assert any("Walking group" in t for t in table)
    assert not any("Walking group" in s.text for s in sentences if s.block in ("body", "heading"))


def _run_in(c, top: float, head: str, rest: str, *, head_font: str, font: str,
            size: float) -> None:
    """A subheading in ``head_font`` and its text running on after it on one line."""
    c.setFont(head_font, size)
    c.drawString(LEFT, HEIGHT - top, head)
    c.setFont(font, size)
    c.drawString(LEFT + c.stringWidth(head + " ", head_font, size), HEIGHT - top, rest)


def test_run_in_subheadings_of_a_summary_set_wholly_in_bold(tmp_path) -> None:
    path = tmp_path / "summary.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 80, ["Summary"], font="Helvetica-Bold", size=12.0)
    top = 100.0
    for head, rest in (("Background", "Walking is good for invented herons and their keepers."),
                       ("Methods", "We randomly assigned 120 keepers to walk or to rest."),
                       ("Findings", "Keepers who walked slept longer than those who rested.")):
        _run_in(c, top, head, rest, head_font="Helvetica-Bold", font="Times-Bold", size=9.0)
        _lines(c, LEFT, top + 11, FILLER[:2], font="Times-Bold", size=9.0, leading=11.0)
        top += 44
    _lines(c, LEFT, top + 20, ["Introduction"], font="Helvetica-Bold", size=12.0)
    _lines(c, LEFT, top + 40, FILLER * 3)
    c.showPage()
    c.save()
    sentences = _sentences(path)
    heads = [s.text for s in sentences if s.block == "heading"]
    assert {"Background", "Methods", "Findings"} <= set(heads)
    methods = next(s for s in sentences if s.text.startswith("We randomly assigned"))
    assert methods.section == "abstract" and methods.block == "body"


def test_structured_abstract_headings_in_italics_are_split_off(tmp_path) -> None:
    # A structured abstract whose subheadings run into their text in italics, with no stop
    # and no wider gap before them: each opens a paragraph and is split off as a heading.
    path = tmp_path / "abstract.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 80, ["Abstract"], font="Helvetica-Bold", size=10.0)
    top = 95.0
    for head, rest in (("Introduction", "This invented study asked whether herons walk."),
                       ("Methods", "Heron keepers were randomly assigned to two groups."),
                       ("Results", "Keepers who walked slept longer (p = 0.02)."),
                       ("Conclusions", "Walking may help. Participants were followed up.")):
        _run_in(c, top, head, rest, head_font="Times-Italic", font="Times-Roman", size=10.0)
        top += 12
    _lines(c, LEFT, 170, ["Introduction"], font="Helvetica-Bold", size=12.0)
    _lines(c, LEFT, 190, FILLER * 3)
    c.showPage()
    c.save()
    sentences = _sentences(path)
    heads = [(s.text, s.section) for s in sentences if s.block == "heading"]
    for name in ("Introduction", "Methods", "Results", "Conclusions"):
        assert (name, "abstract") in heads
    texts = [s.text for s in sentences]
    assert "Heron keepers were randomly assigned to two groups." in texts
    assert "Participants were followed up." in texts
    later = next(s for s in sentences if s.text.startswith("Participants in the invented"))
    assert later.section == "introduction"


def test_an_italic_term_opening_a_line_is_no_heading(tmp_path) -> None:
    path = tmp_path / "emphasis.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 95, ["Herons were counted at dawn on every day of the trial."])
    c.setFont("Times-Italic", 10.0)
    c.drawString(LEFT, HEIGHT - 107, "Ardea")
    c.setFont("Times-Roman", 10.0)
    c.drawString(LEFT + c.stringWidth("Ardea ", "Times-Italic", 10.0), HEIGHT - 107,
                 "cinerea was the most common of the birds counted.")
    _lines(c, LEFT, 119, FILLER)
    c.showPage()
    c.save()
    texts = _texts(path, block="body")
    assert "Ardea cinerea was the most common of the birds counted." in texts


# -- the shared real articles ------------------------------------------------------------------


def _real(name: str) -> Path | None:
    from robtui.benchmarks.real_pdfs import default_folder

    folder = default_folder()
    path = folder / name if folder is not None else None
    return path if path is not None and path.exists() else None


def _needs(name: str):
    return pytest.mark.skipif(_real(name) is None,
                              reason=f"shared real PDF {name} (../shared/real-pdfs) absent")


LANCET = "lancet2018_moxidectin.pdf"
SPRINGER = "psychopharm2017_marineoil.pdf"
BMC = "bmcmed2014_limit.pdf"


@_needs(LANCET)
def test_real_bold_summary_subheadings_are_headings() -> None:
    sentences = _sentences(_real(LANCET))
    methods = next(s for s in sentences if s.text.startswith("This double-blind, parallel group"))
    assert methods.section == "abstract"
    assert sentences[methods.index - 1].text == "Methods"
    assert sentences[methods.index - 1].block == "heading"


@_needs(SPRINGER)
def test_real_abstract_run_ins_in_the_text_type_and_a_footnote_beside_them() -> None:
    sentences = _sentences(_real(SPRINGER))
    texts = [s.text for s in sentences]
    placebo = next(s for s in sentences if s.text.startswith("PCSO-524® or a matched placebo"))
    assert placebo.section == "abstract"
    assert sentences[placebo.index - 1].text == "Methods"
    joined = next(t for t in texts if t.startswith("Repeated measures ANOVA on post hoc"))
    assert "learning (p = 0.05) and probability of ADHD" in joined


@_needs(BMC)
def test_real_paragraphs_run_on_past_a_figure_and_between_two_tables() -> None:
    texts = _texts(_real(BMC), block="body")
    assert any(t.startswith("Baseline characteristics of the women who completed any "
                            "questionnaires were similar") for t in texts)
    assert any(t.startswith("These differences may reflect variations in baseline") for t in texts)


DOVE = "dddt2021_lidocaine_thoracoscopic_lung_cancer_rct.pdf"
JMIR = "jmir2011_handhygiene.pdf"


@_needs(LANCET)
def test_real_dash_at_a_line_end_joins_without_a_space() -> None:
    assert ("Severe symptomatic postural hypotension\u2014which resolves quickly without "
            "treatment\u2014was the only") in " ".join(_texts(_real(LANCET), block="body"))


@_needs(JMIR)
def test_real_justified_line_with_wide_spaces_reads_in_order() -> None:
    assert ("more details of the intervention development and content, and http"
            in " ".join(_texts(_real(JMIR), block="body")))


@_needs(DOVE)
def test_real_table_notes_without_a_mark_are_no_body_text() -> None:
    sentences = _sentences(_real(DOVE))
    notes = [s for s in sentences if s.text.startswith(("Notes: ", "Abbreviations: "))]
    assert len(notes) >= 5
    assert all(s.block in ("table", "caption") for s in notes)  # under tables and figures
    assert not any(s.block == "body" and "Group C= the control group" in s.text
                   for s in sentences)


BMC_CANCER = "bmccancer2021_prophylactic_hipec_gastric_randomised_phase2.pdf"


@_needs(BMC_CANCER)
def test_real_unruled_table_under_its_caption_is_no_prose() -> None:
    sentences = _sentences(_real(BMC_CANCER))
    assert not [s.text for s in sentences if s.block == "body" and "N stage, N0/N1" in s.text]
    assert any(s.block == "table" and s.text.startswith("T stage, T1 ~ 3/T4 | 15.071")
               for s in sentences)
    assert any(s.block == "body" and s.text.startswith("HIPEC with cisplatin did not prolong")
               for s in sentences)


# -- figures drawn in vector graphics --------------------------------------------------------


def _box(c, x: float, top: float, w: float, h: float, lines: list[str]) -> None:
    c.setLineWidth(0.6)
    c.rect(x, HEIGHT - top - h, w, h)
    _lines(c, x + 4, top + 10, lines, font="Helvetica", size=7.0, leading=8.5)


def test_flowchart_box_text_is_a_figure_block_and_a_boxed_panel_stays_prose(tmp_path) -> None:
    path = tmp_path / "flowchart.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 80, FILLER)
    _box(c, 120, 160, 150, 24, ["Assessed for eligibility (n=310)"])
    _box(c, 300, 200, 170, 34, ["Excluded (n=70)", "Did not meet inclusion criteria (n=52)"])
    _box(c, 120, 250, 150, 24, ["Randomly assigned (n=240)"])
    _box(c, 60, 310, 150, 24, ["Allocated to walking (n=120)"])
    _box(c, 260, 310, 150, 24, ["Allocated to resting (n=120)"])
    for x0, t0, x1, t1 in ((195, 184, 195, 250), (195, 274, 135, 310), (195, 274, 335, 310),
                           (270, 217, 300, 217)):
        c.line(x0, HEIGHT - t0, x1, HEIGHT - t1)
    _lines(c, LEFT, 350, ["Figure 1 Flow of participants through the invented trial."],
           font="Helvetica", size=8.0)
    c.setFillGray(0.9)
    c.rect(LEFT - 4, HEIGHT - 470, 500, 90, stroke=0, fill=1)
    c.setFillGray(0.0)
    _lines(c, LEFT, 395, ["Panel: what this invented study adds to what was known before it",
                          "Keepers who walked with their herons every day slept longer than",
                          "keepers who rested, and the effect lasted for the whole of the",
                          "twelve weeks of the trial in both of the invented sites."])
    _lines(c, LEFT, 500, FILLER)
    c.showPage()
    c.save()
    sentences = _sentences(path)
    figure = [s.text for s in sentences if s.block == "figure"]
    assert "Randomly assigned (n=240)" in figure
    assert "Excluded (n=70) Did not meet inclusion criteria (n=52)" in figure
    body = " ".join(s.text for s in sentences if s.block == "body")
    assert "Randomly assigned" not in body and "Allocated to walking" not in body
    assert "Keepers who walked with their herons every day slept longer" in body
    assert any(s.block == "caption" and s.text.startswith("Figure 1") for s in sentences)


def test_a_flowchart_placed_as_a_form_is_a_figure_block(tmp_path) -> None:
    # the same boxes, lines and labels drawn inside a form XObject the page places once
    path = tmp_path / "flowchart-form.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 80, FILLER)
    c.beginForm("heronflow")
    _box(c, 120, 160, 150, 24, ["Assessed for eligibility (n=310)"])
    _box(c, 300, 200, 170, 34, ["Excluded (n=70)", "Did not meet inclusion criteria (n=52)"])
    _box(c, 120, 250, 150, 24, ["Randomly assigned (n=240)"])
    _box(c, 60, 310, 150, 24, ["Allocated to walking (n=120)"])
    _box(c, 260, 310, 150, 24, ["Allocated to resting (n=120)"])
    for x0, t0, x1, t1 in ((195, 184, 195, 250), (195, 274, 135, 310), (195, 274, 335, 310)):
        c.line(x0, HEIGHT - t0, x1, HEIGHT - t1)
    c.endForm()
    c.doForm("heronflow")
    _lines(c, LEFT, 350, ["Figure 1 Flow of participants through the invented trial."],
           font="Helvetica", size=8.0)
    _lines(c, LEFT, 400, FILLER)
    sentences = _sentences_of_finished(c, path)
    figure = [s.text for s in sentences if s.block == "figure"]
    assert "Randomly assigned (n=240)" in figure
    body = " ".join(s.text for s in sentences if s.block == "body")
    assert "Randomly assigned" not in body and "Allocated to walking" not in body


@_needs(LANCET)
def test_real_flowchart_is_a_figure_not_prose() -> None:
    sentences = _sentences(_real(LANCET))
    boxes = [s for s in sentences if "randomly allocated treatment" in s.text]
    assert boxes and all(s.block == "figure" for s in boxes)


@_needs(SPRINGER)
def test_real_chart_titles_are_no_headings() -> None:
    heads = [s.text for s in _sentences(_real(SPRINGER)) if s.block == "heading"]
    assert not any("Picture Recogni" in h for h in heads)


BMJ_OPEN = "bmjopen2017_goactive.pdf"
TRIALS_LANDSCAPE = "trials2014_pge1_provisional.pdf"


@_needs(LANCET)
@_needs(SPRINGER)
def test_real_figure_titles_in_a_side_column_are_captions() -> None:
    lancet = _sentences(_real(LANCET))
    title = next(s for s in lancet if s.text.startswith("Figure 1: Trial profile"))
    assert title.block == "caption" and title.text == "Figure 1: Trial profile"
    springer = _sentences(_real(SPRINGER))
    assert all(s.block == "caption" for s in springer if s.text.startswith("Fig. 3 "))
    assert any(s.text.startswith("Fig. 3 ") for s in springer)
    assert "Received: 30 March 2016 / Accepted: 28 October 2016 /" in " ".join(
        s.text for s in springer)


@_needs(BMJ_OPEN)
def test_real_framed_table_of_descriptions_is_a_table_and_words_rejoin() -> None:
    sentences = _sentences(_real(BMJ_OPEN))
    rows = {s.text: s.block for s in sentences if s.text.startswith("Choice | ")}
    assert rows and set(rows.values()) == {"table"}
    assert not any(s.block == "figure" and "tutor group chooses" in s.text for s in sentences)
    body = " ".join(s.text for s in sentences if s.block == "body")
    assert "are presented in table 1. Briefly," in body
    assert "Despite initial agreement," in body


@_needs(DOVE)
@_needs(TRIALS_LANDSCAPE)
def test_real_first_page_foot_and_a_landscape_tables_rows_are_no_prose() -> None:
    dove = _sentences(_real(DOVE))
    assert not any("Development and Therapy 2021:15 1485" in s.text for s in dove)
    landscape = _sentences(_real(TRIALS_LANDSCAPE))
    cells = [s for s in landscape if "matter signal" in s.text]
    assert cells and all(s.block == "table" for s in cells)


MDPI_EMBEDDED = "more/nutrients2018_protein_exercise_frailty_metaanalysis.pdf"


@_needs(MDPI_EMBEDDED)
def test_real_text_hidden_by_an_embedded_figures_clip_is_not_read() -> None:
    # each figure is placed from an embedded page whose other text the clip hides: it had been
    # read too, so the page's sentences came twice, one copy offset into the other
    body = [s.text for s in _sentences(_real(MDPI_EMBEDDED)) if s.block == "body"]
    twice = "In addition, one RCT reported changes in global frailty scores [54]."
    assert body.count(twice) == 1
    assert ("The effects of PS plus exercise training on the frailty indices at each "
            "follow-up duration are shown in Figure 3.") in body


def test_a_cycle_in_the_page_head_leaves_the_columns_in_order(tmp_path) -> None:
    # the journal's name set high at the right, a title under it, and a note in small print
    # beside the title's last line, left of the name: each comes before the next by Breuel's
    # rules, the last before the first (an author's raised mark does it on the real page). That cycle had the whole page sorted by height, so a right
    # column starting a point higher than the left one was read first (Medicine 2020, more/)
    path = tmp_path / "cycle.pdf"
    c = _canvas(path)
    _lines(c, 300, 40, ["Journal"], "Helvetica-Bold", 16, 18)
    _lines(c, 50, 60, ["Study protocol"], "Helvetica", 9)
    _lines(c, 50, 100, ["A walking diary kept in the invented Heron trial",
                        "and its nurses"], "Helvetica-Bold", 16, 20)
    _lines(c, 250, 118, ["(protocol)"], "Helvetica", 8)
    _lines(c, LEFT, 300, ["Introduction"], "Times-Bold", 11)
    _lines(c, LEFT, 318, FILLER + ["The diaries were read by two nurses who knew the"])
    _lines(c, RIGHT, 299, ["allocation of each participant in the two groups."] + FILLER)
    texts = _finished(c, path)
    whole = " ".join(texts)
    assert "who knew the allocation of each participant in the two groups." in whole
    assert whole.index("Introduction") < whole.index("allocation of each participant")


def test_a_side_note_set_higher_in_small_type_beside_a_line_is_not_read_into_it(tmp_path) -> None:
    # a side note in 6.5 pt a narrow 9 pt beside the text column (too few rows for a gutter);
    # its leading is tighter than the text's, so its second line sits 3 pt higher than the line
    # beside it: the note is not read into that line's sentence
    path = tmp_path / "side-note.pdf"
    c = _canvas(path)
    text = ["The invented Heron trial asked each walker to wear a pedometer",
            "(Pacer 2, Stepworks, Quillmoor) on every day of the study. The",
            "trial was registered with the invented registry of walking studies,",
            "number HR-0042, before the first walker was enrolled in it."]
    top = _lines(c, LEFT, 100, FILLER, font="Times-Roman", size=9.0, leading=11.0)
    _lines(c, LEFT, top, text, font="Times-Roman", size=9.0, leading=11.0)
    side = LEFT + c.stringWidth(text[2], "Times-Roman", 9.0) + 9.0
    _lines(c, side, top + 11.0, ["For the pedometer's maker see", "https://stepworks.example.org/"],
           font="Times-Roman", size=6.5, leading=8.0)
    _lines(c, LEFT, top + 4 * 11.0, FILLER, font="Times-Roman", size=9.0, leading=11.0)
    texts = _finished(c, path)
    assert ("The trial was registered with the invented registry of walking studies, number "
            "HR-0042, before the first walker was enrolled in it.") in texts


LANCET_HAEMATOL = "more/lancethaematol2021_marietta_single_arm_phase2.pdf"


@_needs(LANCET_HAEMATOL)
def test_real_side_notes_set_higher_stay_out_of_the_registration_sentence() -> None:
    registration = [s.text for s in _sentences(_real(LANCET_HAEMATOL))
                    if s.block == "body" and "ClinicalTrials" in s.text]
    assert len(registration) >= 2  # the summary's and the methods'
    assert not any("http" in text for text in registration)


def test_a_charts_number_in_small_type_beside_a_column_is_no_label_of_its_line(tmp_path) -> None:
    # the last cell of a chart's row ("(10)", 6.5 pt) ends just left of the gutter, 4 pt above
    # the baseline of a line of the right-hand column: it is not that line's list number
    path = tmp_path / "chart-cell.pdf"
    c = _canvas(path)
    _lines(c, LEFT, 100, FILLER * 2)
    for x, cell in zip((LEFT, 110, 170, 230, 292), ("at relapse", "(0)", "(2)", "(7)", "(10)")):
        _lines(c, x, 100 + 12 * 15 - 4, [cell], size=6.5)  # 4 pt above the line beside it
    _lines(c, LEFT, 100 + 12 * 17, FILLER * 2)
    right = ["Of the walkers who kept a diary in the first weeks, most went on",
             "walking to the end of the invented study, and the nurses counted",
             "their minutes at each visit. Nine (60%) of the fifteen walkers",
             "who missed a visit came to the next one."]
    _lines(c, RIGHT, 100, FILLER * 2 + right + FILLER * 2)
    texts = _finished(c, path)
    assert "Nine (60%) of the fifteen walkers who missed a visit came to the next one." in texts


def _bullet_font() -> str:
    """reportlab's bundled Vera, registered once: a font holding the bullet."""
    import reportlab
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    if "HeronVeraB" not in pdfmetrics.getRegisteredFontNames():
        pdfmetrics.registerFont(TTFont("HeronVeraB", str(Path(reportlab.__file__).parent / "fonts"
                                                          / "Vera.ttf")))
    return "HeronVeraB"


def test_bulleted_items_hung_left_of_a_gutter_read_one_by_one(tmp_path) -> None:
    # eligibility criteria after bullets set in a strip of their own, 9 pt left of the items'
    # text (a gutter between them); two items wrap onto a second line under their text
    font = _bullet_font()
    path = tmp_path / "items.pdf"
    c = _canvas(path)
    top = _lines(c, LEFT, 100, FILLER * 2, font=font, size=8.0, leading=11.0)
    top = _lines(c, LEFT, top + 6, ["Conditions for taking part"], font=font, size=8.0)
    items = [["Aged 60 years or more"], ["Able to walk for ten minutes without a stick or", "a frame"],
             ["Living within five miles of the clinic"],
             ["Willing to keep a diary of the walks for all of", "the twelve weeks"]]
    for item in items:
        _lines(c, LEFT + 4, top, ["\u2022"], font=font, size=8.0)
        top = _lines(c, LEFT + 16, top, item, font=font, size=8.0, leading=11.0)
    _lines(c, LEFT, top + 6, FILLER, font=font, size=8.0, leading=11.0)
    _lines(c, RIGHT, 100, FILLER * 4, font=font, size=8.0, leading=11.0)
    texts = _finished(c, path)
    assert "\u2022 Aged 60 years or more" in texts
    assert "\u2022 Able to walk for ten minutes without a stick or a frame" in texts
    assert "\u2022 Living within five miles of the clinic" in texts
    assert "\u2022 Willing to keep a diary of the walks for all of the twelve weeks" in texts


VOCAL = "more/bmccancer2021_vocal_laryngeal_radiation_rct_protocol.pdf"


@_needs(VOCAL)
def test_real_items_after_unmapped_bullets_are_read_one_by_one() -> None:
    # the protocol sets its eligibility criteria and assessments after bullets drawn from a
    # symbol font that maps them to no character, in a strip left of the items' text
    body = [s.text for s in _sentences(_real(VOCAL)) if s.block == "body"]
    assert sum(text.startswith("\ufffd ") for text in body) >= 25  # each item opens a sentence


def test_bullets_standing_apart_open_list_items_of_their_own(tmp_path) -> None:
    # a box of changes made after the invented pilot: items set after bullets, run on in one
    # paragraph, most without a full stop; a bullet after a number (a degree sign some
    # typesetters draw with a bullet glyph) stays in its sentence
    font = _bullet_font()
    path = tmp_path / "bullets.pdf"
    c = _canvas(path)
    box = ["Changes after the pilot: \u2022 Shorter diaries for the walkers",
           "\u2022 A second nurse at each clinic \u2022 Walks kept under 25 \u2022 C on",
           "summer days. \u2022 Reminders by text message."]
    _lines(c, LEFT, 100, FILLER * 2 + box + FILLER, font=font, size=8.0)
    _lines(c, RIGHT, 100, FILLER * 3, font=font, size=8.0)
    texts = _finished(c, path)
    assert "\u2022 Shorter diaries for the walkers" in texts
    assert "\u2022 A second nurse at each clinic" in texts
    assert "\u2022 Walks kept under 25 \u2022 C on summer days." in texts
    assert "\u2022 Reminders by text message." in texts


def test_an_italic_subheading_over_prose_that_opens_with_a_figure_is_a_heading(tmp_path) -> None:
    # "3.1. Walker Flow" in italics, the body's size, over a paragraph opening "Figure 1 shows"
    path = tmp_path / "subheading.pdf"
    c = _canvas(path)
    top = _lines(c, LEFT, 100, FILLER)
    _lines(c, LEFT, top + 6, ["3.1. Walker Flow"], font="Times-Italic")
    _lines(c, LEFT, top + 24, ["Figure 1 shows how the walkers went through the invented",
                               "trial from the first visit to the last one, and how many of",
                               "them walked in each of the twelve weeks of the study."])
    _lines(c, LEFT, top + 70, FILLER)
    _lines(c, RIGHT, 100, FILLER * 3)
    sentences = _sentences_of_finished(c, path)
    assert any(s.block == "heading" and s.text == "3.1. Walker Flow" for s in sentences)
