"""What is not the article's prose on a PDF page: download cover sheets, a chart's axis ticks,
boxed text between rules (not a table), a caption set high on the page (kept)."""

from __future__ import annotations

import pytest

from robtui.reading.reader import read_document

pytest.importorskip("reportlab")

PROSE = (
    "Participants were recruited from three invented clinics in the town of Quillmoor and "
    "were followed for twelve weeks after the start of the programme."
)


def _pdf(path, pages: list[list[tuple[float, float, str, float]]], rules=()) -> None:
    """Each page a list of (x, y from the top, text, size); ``rules`` (page, x0, x1, y)."""
    from reportlab.lib.pagesizes import A4
    from reportlab.pdfgen import canvas

    height = A4[1]
    c = canvas.Canvas(str(path), pagesize=A4)
    for number, items in enumerate(pages, 1):
        for x, y, text, size in items:
            c.setFont("Helvetica", size)
            c.drawString(x, height - y, text)
        for page, x0, x1, y in rules:
            if page == number:
                c.line(x0, height - y, x1, height - y)
        c.showPage()
    c.save()


def _prose_lines(top: float, count: int, x: float = 72) -> list[tuple[float, float, str, float]]:
    words = PROSE.split()
    lines, out = [], []
    for i in range(0, len(words), 9):
        lines.append(" ".join(words[i : i + 9]))
    for i in range(count):
        out.append((x, top + 13 * i, lines[i % len(lines)], 10))
    return out


def test_a_download_cover_sheet_is_left_out_with_a_warning(tmp_path) -> None:
    cover = [(72, 120 + 30 * i, text, 10) for i, text in enumerate([
        "Invented Journal of Trials",
        "To cite this article: A. Author (2030) An invented trial.",
        "To link to this article: https://example.org/invented",
        "Submit your article to this journal",
        "View related articles",
        "Full Terms & Conditions of access and use can be found online",
    ])]
    path = tmp_path / "cover.pdf"
    _pdf(path, [cover, [(72, 100, PROSE, 9)]])
    document = read_document(path, use_cache=False)
    assert "cite this article" not in document.text
    assert "Quillmoor" in document.text
    assert any("cover sheet" in w for w in document.warnings)


def test_a_first_page_naming_how_to_cite_once_is_read(tmp_path) -> None:
    page = [(72, 100, "To cite this article: A. Author (2030) An invented trial.", 10),
            (72, 130, PROSE, 9)]
    path = tmp_path / "article.pdf"
    _pdf(path, [page])
    document = read_document(path, use_cache=False)
    assert "To cite this article" in document.text
    assert not document.warnings


def test_axis_ticks_of_a_chart_are_not_text(tmp_path) -> None:
    page = _prose_lines(100, 6)
    page += [(100, 260, "0    2    4    6    8    10    12    14    16", 8),
             (150, 272, "Weeks after the start", 8)]
    page += _prose_lines(320, 6)
    path = tmp_path / "chart.pdf"
    _pdf(path, [page])
    document = read_document(path, use_cache=False)
    assert "10 12 14" not in document.text
    assert document.text.count("Quillmoor") >= 2


def test_boxed_lines_between_rules_are_text_not_a_table(tmp_path) -> None:
    box = [(72, 120, "Trial registration: Invented Registry", 10),
           (72, 134, "Pilot one: IR-0042", 10),
           (72, 148, "registered on 3 May 2029.", 10),
           (72, 162, "Pilot two: IR-0057", 10),
           (72, 176, "registered 9 June 2030.", 10)]
    path = tmp_path / "box.pdf"
    _pdf(path, [box + _prose_lines(220, 8)], rules=[(1, 66, 530, 105), (1, 66, 530, 185)])
    document = read_document(path, use_cache=False)
    registered = [s for s in document.sentences if "IR-0042" in s.text]
    assert registered and all(s.block == "body" for s in registered)


def test_a_caption_at_the_top_of_a_page_is_kept(tmp_path) -> None:
    pages = []
    for n in range(4):
        page = [(72, 30, "Invented Journal of Trials 2030", 8)]
        page += [(72, 62, f"Figure {n + 1} Flow of participants through the", 8),
                 (72, 72, "invented trial.", 8)]
        page += _prose_lines(120, 30)
        pages.append(page)
    path = tmp_path / "captions.pdf"
    _pdf(path, pages)
    document = read_document(path, use_cache=False)
    captions = [s.text for s in document.sentences if s.block == "caption"]
    assert captions == [f"Figure {n + 1} Flow of participants through the invented trial."
                        for n in range(4)]
    assert "Invented Journal of Trials" not in document.text


def test_a_tables_column_heads_and_notes_stay_with_the_table(tmp_path) -> None:
    page = _prose_lines(80, 4)
    page += [(72, 150, "Table 2 Outcomes at twelve weeks in the invented trial", 9)]
    page += [(72, 170, "Measure", 8), (250, 170, "Quill group", 8), (400, 170, "Usual care", 8)]
    for i, (name, a, b) in enumerate([("Relapse", "12", "19"), ("Visits", "3.1", "3.4"),
                                      ("Falls", "4", "6"), ("Weight", "71.2", "70.9")]):
        y = 192 + 14 * i
        page += [(72, y, name, 8), (250, y, a, 8), (400, y, b, 8)]
    page += [(72, 262, "a Counts of participants with one event or more.", 7),
             (72, 271, "Values are numbers unless stated otherwise.", 7)]
    page += _prose_lines(300, 5)
    rules = [(1, 66, 530, 182), (1, 66, 530, 250)]
    path = tmp_path / "table.pdf"
    _pdf(path, [page], rules=rules)
    document = read_document(path, use_cache=False)
    by_text = {s.text: s.block for s in document.sentences}
    table_text = " ".join(s.text for s in document.sentences if s.block == "table")
    for piece in ("Quill group", "Usual care", "Counts of participants", "unless stated"):
        assert piece in table_text, piece
    assert not any(b == "body" and ("Usual care" in t or "Counts of" in t) for t, b in by_text.items())
    assert sum(b == "body" and "Quillmoor" in t for t, b in by_text.items()) >= 2


def test_first_page_small_print_naming_funding_an_address_or_an_affiliation_is_an_aside(
        tmp_path) -> None:
    notes = [(72, 700, "The study was funded by an invented walking charity.", 7.5),
             (72, 730, "* A. Author a.author@example.org", 7.5),
             (72, 760, "1 Department of Walking, Invented University, Quillmoor", 7.5)]
    path = tmp_path / "notes.pdf"
    _pdf(path, [_prose_lines(100, 12) + notes])
    sections = {s.text: s.section for s in read_document(path, use_cache=False).sentences}
    assert sections["The study was funded by an invented walking charity."] == "other"
    assert sections["* A. Author a.author@example.org"] == "other"
    assert sections["1 Department of Walking, Invented University, Quillmoor"] == "other"
    assert sections[PROSE] != "other"


def _embedded_figure_pdf(path, shift: tuple[float, float] = (0.0, 0.0)) -> None:
    """A page of prose, and a figure placed from a form (as a page embedded from another PDF
    is): the form holds the figure's label inside its clip and an earlier page's text outside
    it, which the clip hides; the form is placed moved by ``shift``."""
    from reportlab.lib.pagesizes import A4
    from reportlab.pdfgen import canvas

    height = A4[1]
    c = canvas.Canvas(str(path), pagesize=A4)
    c.setFont("Helvetica", 10)
    for i, (x, y, text, size) in enumerate(_prose_lines(400, 8)):
        c.drawString(x, height - y, text)
    c.beginForm("embedded")
    c.saveState()
    clip = c.beginPath()
    clip.rect(72, height - 300, 450, 200)  # the figure's frame, 100-300 pt from the top
    c.clipPath(clip, stroke=0, fill=0)
    c.setFont("Helvetica", 9)
    c.drawString(100, height - 200, "Forest plot of the invented outcome")
    c.setFont("Helvetica", 10)
    for i in range(6):  # an older page's prose, far below the frame: drawn, never seen
        c.drawString(72, height - 600 - 13 * i,
                     "Hidden sentence of an earlier version about the Ravelston cohort.")
    c.restoreState()
    c.endForm()
    c.saveState()
    c.translate(*shift)
    c.doForm("embedded")
    c.restoreState()
    c.showPage()
    c.save()


@pytest.mark.parametrize("shift", [(0.0, 0.0), (7.0, -40.0)])
def test_text_a_clip_hides_is_not_read(tmp_path, shift) -> None:
    # MDPI's Nutrients 2018 article places each figure from an embedded page whose other text,
    # clipped away, poppler and the reader both read: every sentence of the page came twice
    path = tmp_path / "embedded.pdf"
    _embedded_figure_pdf(path, shift)
    document = read_document(path, use_cache=False)
    assert "Ravelston" not in document.text
    assert "Forest plot of the invented outcome" in document.text
    assert "Quillmoor" in document.text


def test_a_foot_of_the_left_hand_pages_alone_is_a_running_foot(tmp_path) -> None:
    # the Biochemical Society's journal sets its compilation line at the foot of the
    # left-hand (even) pages only, and not on its last pages: on 4 of 12 pages, under the
    # share of all pages that a running line needs, it had stayed in the body text
    foot = "Invented Society journal compilation of the year 2030 and its members"
    pages = []
    for number in range(1, 13):
        items = _prose_lines(90, 40)
        if number % 2 == 0 and number <= 8:
            items.append((72, 800, foot, 8))
        pages.append(items)
    path = tmp_path / "facing.pdf"
    _pdf(path, pages)
    document = read_document(path, use_cache=False)
    assert "Invented Society" not in document.text
    assert "Quillmoor" in document.text
