"""Render text as a two-column PDF with reportlab's own layout engine (platypus).

A second, independent layout beside pdf_writer.py, so the PDF reader is measured on pages it
was not tuned on: platypus places and justifies the lines (BaseDocTemplate, Frames,
Paragraph styles), Times-Roman body, Helvetica-Bold headings, Times-Italic captions, a
full-width title block (the page split into two columns under it by platypus's FrameSplitter)
and a running header and page number drawn in onPage. Development tool only: reportlab is a
dev dependency. The text is cut into blocks by pdf_writer.blocks_from_lines, the same way
render_text_as_pdf cuts it.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from xml.sax.saxutils import escape

from robtui.devtools.pdf_writer import PdfBlock, blocks_from_lines

PAGE_W, PAGE_H = 595.28, 841.89  # A4 in points
MARGIN_X, MARGIN_TOP, MARGIN_BOTTOM = 50.0, 62.0, 56.0
GUTTER = 18.0
HEADER = "Journal of Invented Trials · rendered for reading tests"


def _styles() -> dict:
    from reportlab.lib.enums import TA_JUSTIFY, TA_LEFT
    from reportlab.lib.styles import ParagraphStyle

    body = ParagraphStyle("body", fontName="Times-Roman", fontSize=9.5, leading=11.4,
                          alignment=TA_JUSTIFY, firstLineIndent=10, spaceAfter=1.5)
    return {
        "title": ParagraphStyle("title", fontName="Helvetica-Bold", fontSize=15, leading=18,
                                alignment=TA_LEFT, spaceAfter=10),
        "authors": ParagraphStyle("authors", parent=body, firstLineIndent=0,
                                  alignment=TA_LEFT, spaceAfter=8),
        "heading": ParagraphStyle("heading", fontName="Helvetica-Bold", fontSize=9.5,
                                  leading=11.5, spaceBefore=8, spaceAfter=3, keepWithNext=1,
                                  alignment=TA_LEFT),
        "para": body,
        # across the page, or one of a long run of short lines (a list of abbreviations):
        # kept with nothing
        "heading-loose": ParagraphStyle("heading-loose", fontName="Helvetica-Bold",
                                        fontSize=9.5, leading=11.5, spaceBefore=8,
                                        spaceAfter=3, alignment=TA_LEFT),
        "caption": ParagraphStyle("caption", parent=body, fontName="Times-Italic",
                                  fontSize=8.5, leading=10, firstLineIndent=0,
                                  spaceBefore=4, spaceAfter=6),
    }


def _flowable(block: PdfBlock, styles: dict, keep: bool = True):
    from reportlab.platypus import Paragraph, Spacer, Table, TableStyle

    if block.kind == "table":
        table = Table([[escape(c) for c in row] for row in block.rows], repeatRows=1)
        table.setStyle(TableStyle([("FONT", (0, 0), (-1, -1), "Times-Roman", 7.5),
                                   ("FONT", (0, 0), (-1, 0), "Times-Bold", 7.5),
                                   ("LINEABOVE", (0, 0), (-1, 0), 0.6, "black"),
                                   ("LINEBELOW", (0, 0), (-1, 0), 0.4, "black"),
                                   ("LINEBELOW", (0, -1), (-1, -1), 0.6, "black")]))
        return table
    if block.kind == "figure":
        return Spacer(1, 100)
    loose = block.full_width or not keep
    kind = "heading-loose" if block.kind == "heading" and loose else block.kind
    return Paragraph(escape(block.text), styles.get(kind, styles["para"]))


def _page_decor(header: str):
    def draw(canvas, doc) -> None:
        canvas.saveState()
        canvas.setFont("Times-Italic", 8)
        canvas.drawString(MARGIN_X, PAGE_H - 40, header)
        canvas.drawRightString(PAGE_W - MARGIN_X, PAGE_H - 40, str(doc.page))
        canvas.setLineWidth(0.5)
        canvas.line(MARGIN_X, PAGE_H - 45, PAGE_W - MARGIN_X, PAGE_H - 45)
        canvas.setFont("Times-Roman", 8)
        canvas.drawCentredString(PAGE_W / 2, 34, f"— {doc.page} —")
        canvas.restoreState()

    return draw


def render_blocks_with_platypus(blocks: Sequence[PdfBlock], out_path: Path, *,
                                header: str = HEADER, title: str = "") -> int:
    """Lay ``blocks`` out with platypus at ``out_path``: the leading full-width blocks across
    the page, the rest in two justified columns. Return the number of pages."""
    from reportlab.platypus import BaseDocTemplate, Frame, PageTemplate
    from reportlab.platypus.flowables import FrameSplitter

    out_path = Path(out_path)
    out_path.parent.mkdir(parents=True, exist_ok=True)
    width, height = PAGE_W - 2 * MARGIN_X, PAGE_H - MARGIN_TOP - MARGIN_BOTTOM
    col = (width - GUTTER) / 2
    decor = _page_decor(header)
    doc = BaseDocTemplate(str(out_path), pagesize=(PAGE_W, PAGE_H), title=title,
                          invariant=1, leftMargin=MARGIN_X, rightMargin=MARGIN_X,
                          topMargin=MARGIN_TOP, bottomMargin=MARGIN_BOTTOM)
    doc.addPageTemplates([
        PageTemplate("full", [Frame(MARGIN_X, MARGIN_BOTTOM, width, height, id="full")],
                     onPage=decor),
        PageTemplate("columns", [Frame(MARGIN_X + i * (col + GUTTER), MARGIN_BOTTOM, col,
                                       height, id=side)
                                 for i, side in enumerate(("left", "right"))], onPage=decor),
    ])
    styles = _styles()
    story = []
    split = False
    kinds = [b.kind for b in blocks] + ["", ""]
    for i, block in enumerate(blocks):
        if not block.full_width and not split:
            story.append(FrameSplitter("columns", ["left", "right"], gap=8, required=60))
            split = True
        # a heading keeps with what follows when a paragraph comes within two blocks
        keep = kinds[i + 1] != "heading" or kinds[i + 2] != "heading"
        story.append(_flowable(block, styles, keep))
    doc.build(story)
    return doc.page


def render_text_with_platypus(text: str, out_path: Path, *, full_width_lines: int = 0,
                              header: str = HEADER) -> int:
    """Render plain text (one paragraph or heading per line) with platypus; the first
    ``full_width_lines`` non-empty lines (title, abstract) run across the page."""
    return render_blocks_with_platypus(blocks_from_lines(text, full_width_lines), out_path,
                                       header=header)
