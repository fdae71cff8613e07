"""Glyphs a typesetter draws out of the line's order: accents set back over their letter,
marks stacked into one sign, symbol fonts whose boxes reach into the next line. Small invented
PDFs are drawn with reportlab in its bundled Vera font (it holds the marks); the real-PDF tests
read the shared articles (../shared/real-pdfs) and skip with a reason when they are absent.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from robtui.reading.reader import read_document

WIDTH, HEIGHT = 595.0, 842.0
LEFT, RIGHT = 50.0, 315.0
SIZE = 9.0
LEADING = 11.5
FILLER = [
    "Walkers in the invented Heron trial kept a diary of",
    "their walks on most days of the week and handed it",
    "to the study nurse at each of the planned visits to",
    "the clinic, where the nurse read it with them again.",
]
CLINSCI = "more/clinsci2014_ace_ndomain_inhibitor_design.pdf"


def _font() -> str:
    """reportlab's bundled Vera, registered once (a TrueType font holding the marks)."""
    import reportlab
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    if "HeronVera" not in pdfmetrics.getRegisteredFontNames():
        pdfmetrics.registerFont(TTFont("HeronVera", str(Path(reportlab.__file__).parent / "fonts"
                                                         / "Vera.ttf")))
    return "HeronVera"


def _canvas(path: Path):
    from reportlab.pdfgen.canvas import Canvas

    canvas = Canvas(str(path), pagesize=(WIDTH, HEIGHT))
    canvas.setFont(_font(), SIZE)
    return canvas


def _draw(canvas, x: float, top: float, text: str) -> float:
    """Draw ``text`` at ``x`` on the baseline ``top`` points from the page's top; its right end."""
    canvas.drawString(x, HEIGHT - top, text)
    return x + canvas.stringWidth(text, _font(), SIZE)


def _filler(canvas, x: float, top: float, lines: list[str]) -> float:
    for line in lines:
        _draw(canvas, x, top, line)
        top += LEADING
    return top


def _texts(canvas, path: Path) -> list[str]:
    canvas.showPage()
    canvas.save()
    return [s.text for s in read_document(path, use_cache=False).sentences]


def test_an_accent_drawn_after_its_line_over_a_letter_is_composed_in_place(tmp_path) -> None:
    # "2.2 Å": the A set at a line's start, the ring drawn back over it after the line's first
    # half, 1.4 pt higher, and the line going on after it (how one publisher sets the angstrom)
    path = tmp_path / "ring.pdf"
    c = _canvas(path)
    top = _filler(c, LEFT, 100, FILLER)
    _draw(c, LEFT, top, "The invented walking sensor was set at 2.2")
    top += LEADING
    end = _draw(c, LEFT, top, "A above the ankle of")
    ring_x = LEFT + (c.stringWidth("A", _font(), SIZE) - c.stringWidth("\u02da", _font(), SIZE)) / 2
    _draw(c, ring_x, top - 1.4, "\u02da")
    _draw(c, end + c.stringWidth(" ", _font(), SIZE), top, "each walker in the trial.")
    _filler(c, LEFT, top + LEADING, FILLER)
    _filler(c, RIGHT, 100, FILLER * 3)
    texts = _texts(c, path)
    assert ("The invented walking sensor was set at 2.2 \u00c5 above the ankle of each walker "
            "in the trial.") in texts


def _real(name: str) -> list:
    """The sentences of a shared real PDF (ROBTUI_REAL_PDFS or ../shared/real-pdfs), or a skip."""
    from robtui.benchmarks.real_pdfs import default_folder

    folder = default_folder()
    if folder is None or not (folder / name).exists():
        pytest.skip(f"shared real PDF {name} (../shared/real-pdfs) absent")
    return read_document(folder / name, use_cache=False).sentences


def test_real_angstroms_set_as_a_ring_over_an_a_are_composed() -> None:
    body = [s.text for s in _real(CLINSCI) if s.block == "body"]
    assert not any("\u02da" in text for text in body)  # no ring standing apart in the prose
    assert sum("\u00c5" in text for text in body) >= 3


def _deep_font(folder: Path) -> str:
    """Vera with the declared descent of a math font (nearly an em below the baseline): PDFium's
    loose boxes of its glyphs reach into the next line."""
    font_tools = pytest.importorskip("fontTools.ttLib")
    import reportlab
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    if "HeronDeep" not in pdfmetrics.getRegisteredFontNames():
        font = font_tools.TTFont(str(Path(reportlab.__file__).parent / "fonts" / "Vera.ttf"))
        deep = int(0.95 * font["head"].unitsPerEm)
        font["hhea"].descent = font["OS/2"].sTypoDescender = font["head"].yMin = -deep
        font["OS/2"].usWinDescent = deep
        for record in font["name"].names:  # a name of its own: not taken for Vera itself
            if record.nameID in (1, 3, 4, 6):
                record.string = "HeronDeep"
        font.save(str(folder / "deep.ttf"))
        pdfmetrics.registerFont(TTFont("HeronDeep", str(folder / "deep.ttf")))
    return "HeronDeep"


def test_signs_from_a_font_with_a_deep_descent_keep_the_lines_in_order(tmp_path) -> None:
    # "=" and a "±" drawn as "+" over "-" (the "+" 0.9 pt up, the "-" 3 pt down) in a math font
    # whose declared descent is nearly an em, on two lines of a column of text
    path = tmp_path / "signs.pdf"
    deep = _deep_font(tmp_path)
    c = _canvas(path)
    top = _filler(c, LEFT, 100, FILLER)
    lines = [("The invented walkers covered a mean of", "4.5", "0.3 km a day (walking group)"),
             ("and", "3.1", "0.4 km a day in the control group in"),
             ("the first of the weeks, and", "4.8", "0.2 km in the last.")]
    for head, mean, rest in lines:
        x = _draw(c, LEFT, top, head + " ")
        c.setFont(deep, SIZE)
        c.drawString(x, HEIGHT - top, "=")
        x += c.stringWidth("= ", deep, SIZE)
        c.setFont(_font(), SIZE)
        x = _draw(c, x, top, mean + " ")
        c.setFont(deep, SIZE)
        c.drawString(x, HEIGHT - top + 0.9, "+")
        c.drawString(x, HEIGHT - top - 3.0, "\u2212")
        x += c.stringWidth("+ ", deep, SIZE)
        c.setFont(_font(), SIZE)
        _draw(c, x, top, rest)
        top += LEADING
    _filler(c, LEFT, top, FILLER)
    _filler(c, RIGHT, 100, FILLER * 3)
    texts = _texts(c, path)
    assert ("The invented walkers covered a mean of = 4.5 \u00b1 0.3 km a day (walking group) and "
            "= 3.1 \u00b1 0.4 km a day in the control group in the first of the weeks, and = 4.8 "
            "\u00b1 0.2 km in the last.") in texts


def _plain_pdf(path: Path, lines: list[bytes]) -> None:
    """A one-page PDF written by hand in Helvetica whose encoding gives code 1 a glyph name of
    our own, which maps to no character (as a bullet or a prime from a symbol font may)."""
    content = b"BT /F1 10 Tf 14 TL 72 720 Td " + b" ".join(b"(%s) '" % line for line in lines)
    content += b" ET"
    objects = [
        b"<< /Type /Catalog /Pages 2 0 R >>",
        b"<< /Type /Pages /Kids [3 0 R] /Count 1 >>",
        (b"<< /Type /Page /Parent 2 0 R /MediaBox [0 0 595 842] /Resources << /Font << /F1 5 0 R"
         b" >> >> /Contents 4 0 R >>"),
        b"<< /Length %d >>\nstream\n" % len(content) + content + b"\nendstream",
        (b"<< /Type /Font /Subtype /Type1 /BaseFont /Helvetica /Encoding << /Type /Encoding"
         b" /BaseEncoding /WinAnsiEncoding /Differences [1 /heronmark] >> >>"),
    ]
    out, offsets = b"%PDF-1.4\n", []
    for number, body in enumerate(objects, 1):
        offsets.append(len(out))
        out += b"%d 0 obj\n" % number + body + b"\nendobj\n"
    xref = len(out)
    out += b"xref\n0 %d\n0000000000 65535 f \n" % (len(objects) + 1)
    out += b"".join(b"%010d 00000 n \n" % offset for offset in offsets)
    out += b"trailer\n<< /Size %d /Root 1 0 R >>\nstartxref\n%d\n%%%%EOF\n" % (len(objects) + 1,
                                                                            xref)
    path.write_bytes(out)


def test_a_glyph_mapped_to_no_character_reads_as_the_replacement_character(tmp_path) -> None:
    path = tmp_path / "unmapped.pdf"
    _plain_pdf(path, [b"Walkers kept a diary of their walks on most days.",
                      b"\001 Diaries were read at each visit to the clinic.",
                      b"The nurse counted the minutes in the diaries."])
    document = read_document(path, use_cache=False)
    assert not any(ch < " " and ch not in "\t\n" for ch in document.text)
    assert any("\ufffd Diaries were read at each visit" in s.text for s in document.sentences)
