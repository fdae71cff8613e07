"""Render text as a two-column journal-style PDF (reportlab), for sample reports and benchmarks.

A small layout engine of our own on the reportlab canvas: full-width title, author line and
abstract, then two columns with bold headings, ragged-right paragraphs with hyphenation at line
ends, a running header and page numbers on every page, ruled tables and figure boxes with
captions. Development tool only: reportlab is a dev dependency.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Literal

PAGE_W, PAGE_H = 595.28, 841.89  # A4 in points
MARGIN_X, MARGIN_TOP, MARGIN_BOTTOM = 54.0, 64.0, 64.0
GUTTER = 20.0
COL_W = (PAGE_W - 2 * MARGIN_X - GUTTER) / 2

BlockType = Literal["title", "authors", "heading", "para", "caption", "table", "figure"]

_LIGATURES = (
    ("ffi", "\ufb03"),
    ("ffl", "\ufb04"),
    ("ff", "\ufb00"),
    ("fi", "\ufb01"),
    ("fl", "\ufb02"),
)


@dataclass
class PdfBlock:
    """One block to lay out: a paragraph, a heading, a caption, a table (rows) or a figure."""

    kind: BlockType
    text: str = ""
    rows: list[list[str]] = field(default_factory=list)
    full_width: bool = False


@dataclass
class _Style:
    font: str
    size: float
    leading: float
    before: float
    after: float


def _fonts() -> dict[str, str]:
    """Register a Unicode TrueType family (DejaVu Serif, else reportlab's Vera); return names."""
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    candidates = [
        (
            "/usr/share/fonts/truetype/dejavu/DejaVuSerif.ttf",
            "/usr/share/fonts/truetype/dejavu/DejaVuSerif-Bold.ttf",
            "/usr/share/fonts/truetype/dejavu/DejaVuSerif-Italic.ttf",
        )
    ]
    import reportlab

    vera = Path(reportlab.__file__).parent / "fonts"
    candidates.append((str(vera / "Vera.ttf"), str(vera / "VeraBd.ttf"), str(vera / "VeraIt.ttf")))
    for regular, bold, italic in candidates:
        if all(Path(p).is_file() for p in (regular, bold, italic)):
            names = {"regular": "RtSerif", "bold": "RtSerif-Bold", "italic": "RtSerif-Italic"}
            if "RtSerif" not in pdfmetrics.getRegisteredFontNames():
                pdfmetrics.registerFont(TTFont(names["regular"], regular))
                pdfmetrics.registerFont(TTFont(names["bold"], bold))
                pdfmetrics.registerFont(TTFont(names["italic"], italic))
            return names
    return {"regular": "Times-Roman", "bold": "Times-Bold", "italic": "Times-Italic"}


class _Layout:
    def __init__(self, canvas, fonts: dict[str, str], header: str, ligatures: bool) -> None:
        self.c = canvas
        self.fonts = fonts
        self.header = header
        self.ligatures = ligatures
        self.page = 0
        self.styles = {
            "title": _Style(fonts["bold"], 15, 18, 0, 8),
            "authors": _Style(fonts["regular"], 9.5, 12, 0, 10),
            "heading": _Style(fonts["bold"], 9.5, 12, 7, 2),
            "para": _Style(fonts["regular"], 8.8, 10.8, 0, 4.5),
            "caption": _Style(fonts["italic"], 8, 9.8, 3, 6),
        }
        self._new_page()

    # -- pages and columns -------------------------------------------------------------
    def _new_page(self) -> None:
        if self.page:
            self.c.showPage()
        self.page += 1
        c = self.c
        c.setFont(self.fonts["regular"], 7.5)
        if self.header:
            c.drawString(MARGIN_X, PAGE_H - 40, self.header)
        c.drawCentredString(PAGE_W / 2, 36, str(self.page))
        c.setLineWidth(0.4)
        c.line(MARGIN_X, PAGE_H - 46, PAGE_W - MARGIN_X, PAGE_H - 46)
        self.band_top = PAGE_H - MARGIN_TOP
        self.y = self.band_top
        self.col = 0
        self.full = False
        self.col_used = False

    def _x(self) -> float:
        if self.full:
            return MARGIN_X
        return MARGIN_X + self.col * (COL_W + GUTTER)

    def _width(self) -> float:
        return PAGE_W - 2 * MARGIN_X if self.full else COL_W

    def _need(self, height: float) -> None:
        """Move to the next column or page when ``height`` does not fit here."""
        if self.y - height >= MARGIN_BOTTOM:
            return
        if self.full or self.col == 1:
            self._new_page()
            return
        self.col = 1
        self.y = self.band_top

    def set_full_width(self, full: bool) -> None:
        if full == self.full:
            return
        if full and self.col_used:
            self._new_page()
        elif not full:
            self.band_top = self.y
        self.full = full

    # -- text ----------------------------------------------------------------------------
    def _shape(self, text: str) -> str:
        if not self.ligatures:
            return text
        for plain, lig in _LIGATURES:
            text = text.replace(plain, lig)
        return text

    def _wrap(self, text: str, font: str, size: float, width: float) -> list[str]:
        from reportlab.pdfbase.pdfmetrics import stringWidth

        def w(s: str) -> float:
            return stringWidth(self._shape(s), font, size)

        lines: list[str] = []
        current = ""
        for word in text.split():
            trial = f"{current} {word}" if current else word
            if w(trial) <= width:
                current = trial
                continue
            prefix = f"{current} " if current else ""
            head, tail = _hyphenate(word, lambda part, prefix=prefix: w(prefix + part) <= width)
            if head:
                lines.append(f"{current} {head}" if current else head)
                current = tail
            else:
                if current:
                    lines.append(current)
                current = word
            while w(current) > width and len(current) > 8:
                head, tail = _hyphenate(current, lambda part: w(part) <= width)
                if not head:
                    break
                lines.append(head)
                current = tail
        if current:
            lines.append(current)
        return lines

    def paragraph(self, kind: str, text: str) -> None:
        style = self.styles[kind]
        if self.y < self.band_top:
            self.y -= style.before
        lines = self._wrap(text, style.font, style.size, self._width())
        for i, line in enumerate(lines):
            # Keep a heading with the first two lines that follow it.
            self._need(style.leading * (3 if kind == "heading" and i == 0 else 1))
            self.y -= style.leading
            self.c.setFont(style.font, style.size)
            self.c.drawString(self._x(), self.y, self._shape(line))
            self.col_used = self.col_used or not self.full
        self.y -= style.after

    def table(self, rows: list[list[str]]) -> None:
        from reportlab.pdfbase.pdfmetrics import stringWidth

        size, leading = 7.2, 9.5
        height = leading * (len(rows) + 1) + 6
        self._need(height)
        x, width = self._x(), self._width()
        ncols = max(len(r) for r in rows)
        first = width * 0.4 if ncols > 1 else width
        rest = (width - first) / max(1, ncols - 1)
        self.c.setLineWidth(0.6)
        self.c.line(x, self.y - 2, x + width, self.y - 2)
        self.y -= 2
        for r, row in enumerate(rows):
            self.y -= leading
            self.c.setFont(self.fonts["bold" if r == 0 else "regular"], size)
            for i, cell in enumerate(row):
                cx = x if i == 0 else x + first + (i - 1) * rest
                room = (first if i == 0 else rest) - 6
                font = self.fonts["bold" if r == 0 else "regular"]
                cell_size = size
                while cell_size > 5 and stringWidth(cell, font, cell_size) > room:
                    cell_size -= 0.2
                self.c.setFont(font, cell_size)
                self.c.drawString(cx, self.y, cell)
            if r == 0:
                self.c.line(x, self.y - 3, x + width, self.y - 3)
        self.y -= 4
        self.c.line(x, self.y, x + width, self.y)
        self.y -= 6
        self.col_used = self.col_used or not self.full

    def figure(self) -> None:
        height = 110.0
        self._need(height + 10)
        self.c.setFillGray(0.88)
        self.c.rect(self._x(), self.y - height, self._width(), height - 4, stroke=0, fill=1)
        self.c.setFillGray(0)
        self.y -= height + 2
        self.col_used = self.col_used or not self.full


def _hyphenate(word: str, fits) -> tuple[str, str]:
    """Split ``word`` at the longest prefix that ``fits`` with a hyphen; ("", word) if none."""
    breaks = [
        i + 1
        for i in range(1, len(word) - 1)
        if word[i] == "-" and word[i - 1].isalpha() and word[i + 1].isalpha()
    ]
    for pos in reversed(breaks):
        if fits(word[:pos]):
            return word[:pos], word[pos:]
    letters = sum(ch.isalpha() for ch in word)
    if len(word) < 8 or letters < len(word) - 1:
        return "", word
    for pos in range(len(word) - 3, 3, -1):
        if word[pos - 1].isalpha() and word[pos].isalpha() and fits(word[:pos] + "-"):
            return word[:pos] + "-", word[pos:]
    return "", word


def render_blocks_as_pdf(
    blocks: Sequence[PdfBlock],
    out_path: Path,
    *,
    header: str = "",
    ligatures: bool = True,
    title: str = "",
) -> int:
    """Lay ``blocks`` out as a two-column PDF at ``out_path``; return the number of pages."""
    from reportlab.pdfgen.canvas import Canvas

    out_path = Path(out_path)
    out_path.parent.mkdir(parents=True, exist_ok=True)
    canvas = Canvas(str(out_path), pagesize=(PAGE_W, PAGE_H), invariant=1)
    canvas.setTitle(title)
    layout = _Layout(canvas, _fonts(), header, ligatures)
    for block in blocks:
        layout.set_full_width(block.full_width)
        if block.kind == "table":
            layout.table(block.rows)
        elif block.kind == "figure":
            layout.figure()
        else:
            layout.paragraph(block.kind, block.text)
    canvas.showPage()
    canvas.save()
    return layout.page


def blocks_from_lines(text: str, full_width_lines: int = 0) -> list[PdfBlock]:
    """One block per non-empty line: headings, captions and paragraphs recognised by shape."""
    from robtui.reading.assemble import is_caption, looks_like_heading

    lines = [line.strip() for line in text.splitlines() if line.strip()]
    blocks = []
    for i, line in enumerate(lines):
        if i == 0 and full_width_lines:
            kind = "title"
        elif is_caption(line):
            kind = "caption"
        elif looks_like_heading(line) and i + 1 < len(lines):
            kind = "heading"
        else:
            kind = "para"
        blocks.append(PdfBlock(kind, line, full_width=i < full_width_lines))
    return blocks


def render_text_as_pdf(text: str, out_path: Path, *, full_width_lines: int = 0) -> None:
    """Render plain text (one paragraph or heading per line) as a two-column PDF.

    The first ``full_width_lines`` non-empty lines (title, abstract) run across the page.
    """
    render_blocks_as_pdf(
        blocks_from_lines(text, full_width_lines),
        out_path,
        header="Rendered for reading tests · robtui",
    )
