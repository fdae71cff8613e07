"""Running heads against body text that comes back page after page with other numbers (issue 14:
a long file whose every page opened with such lines was read as "no text found")."""

from __future__ import annotations

import pytest

from robtui.reading.reader import read_document

reportlab = pytest.importorskip("reportlab")

HEAD = "Invented Journal of Trials, volume 3"


def _log_pdf(path, pages: int, lines_per_page: int, *, head: bool) -> list[str]:
    """A PDF whose text is numbered log entries from the top margin to the bottom one; with
    ``head``, a running head and a page number set apart above and below. Returns the
    entries."""
    from reportlab.lib.pagesizes import A4
    from reportlab.pdfgen import canvas

    width, height = A4
    c = canvas.Canvas(str(path), pagesize=A4)
    entries = []
    for page in range(1, pages + 1):
        if head:
            c.setFont("Helvetica", 8)
            c.drawString(72, height - 30, f"{HEAD}, page {page + 40}")
            c.drawString(width / 2, 20, str(page))
        c.setFont("Helvetica", 10)
        first = len(entries) + 1
        entries += _drawn(c, height - 52, [  # the first entry sits in the top margin, as in a log
            f"Entry {n} records that participant {n * 7} was randomised in week {n % 9 + 1}."
            for n in range(first, first + lines_per_page)])
    c.save()
    return entries


def _drawn(c, y: float, lines: list[str]) -> list[str]:
    """Draw ``lines`` from ``y`` (points from the page's foot) down and end the page."""
    for line in lines:
        c.drawString(72, y, line)
        y -= 12.5
    c.showPage()
    return lines


@pytest.mark.parametrize("lines_per_page", [1, 3, 60])
def test_repeating_lines_with_changing_numbers_stay_text(tmp_path, lines_per_page) -> None:
    path = tmp_path / "log.pdf"
    entries = _log_pdf(path, 30, lines_per_page, head=False)
    document = read_document(path, use_cache=False)
    assert [s.text for s in document.sentences if s.block == "body"] == entries


def test_running_head_with_page_numbers_is_still_removed(tmp_path) -> None:
    path = tmp_path / "log.pdf"
    entries = _log_pdf(path, 20, 60, head=True)
    document = read_document(path, use_cache=False)
    assert HEAD not in document.text
    assert [s.text for s in document.sentences if s.block == "body"] == entries


def test_running_head_of_a_page_set_landscape_is_removed(tmp_path) -> None:
    # the head stands as far below the top edge as on the upright pages, which on the shorter
    # landscape page lies beyond the same share of its height
    from reportlab.lib.pagesizes import A4, landscape
    from reportlab.pdfgen import canvas

    path = tmp_path / "landscape.pdf"
    c = canvas.Canvas(str(path), pagesize=A4)
    for page in range(1, 7):
        size = landscape(A4) if page in (3, 4) else A4
        c.setPageSize(size)
        c.setFont("Helvetica", 8)
        c.drawString(72, size[1] - 63, f"Invented Journal of Trials 2030, 3, 12   {page} of 6")
        c.setFont("Helvetica", 10)
        for i in range(30 if size == A4 else 20):
            c.drawString(72, size[1] - 100 - 13 * i,
                         f"Participant {page * 100 + i} walked on most days of week {i + 1}.")
        c.showPage()
    c.save()
    document = read_document(path, use_cache=False)
    assert "Invented Journal of Trials" not in document.text
    assert "Participant 310 walked on most days of week 11." in document.text


def test_first_page_foot_with_its_page_range_and_a_head_in_two_fonts_are_removed(
        tmp_path) -> None:
    """Page 1's foot names the journal with the article's page range where later pages' foot
    has none; on the last pages the head's numbers are set apart in another font."""
    from reportlab.lib.pagesizes import A4
    from reportlab.pdfgen import canvas

    height = A4[1]
    path = tmp_path / "feet.pdf"
    c = canvas.Canvas(str(path), pagesize=A4)
    sentences = []
    for page in range(1, 11):
        if 1 < page < 8:
            c.setFont("Helvetica-Oblique", 10)
            c.drawString(72, height - 30, "Heron et al. Walking Letters (2030) 4:12")
        elif page >= 8:
            c.setFont("Helvetica-Oblique", 10)
            c.drawString(72, height - 30, "Heron et al. Walking Letters")
            c.setFont("Helvetica", 10)
            c.drawString(230, height - 30, "(2030) 4:12")  # in the body's size, set apart
        c.setFont("Helvetica", 8)
        foot = "Invented Journal of Walking 2030:4"
        c.drawString(72, 30, f"{foot} 101–109" if page == 1 else foot)
        c.setFont("Times-Roman", 10)
        sentences += _drawn(c, height - 80, [
            f"On day {day} of week {page} the walkers of the study met at the lake."
            for day in range(1, 41)])
    c.save()
    document = read_document(path, use_cache=False)
    assert "Invented Journal of Walking" not in document.text
    assert "Heron et al." not in document.text and "(2030) 4:12" not in document.text
    assert [s.text for s in document.sentences if s.block == "body"] == sentences
