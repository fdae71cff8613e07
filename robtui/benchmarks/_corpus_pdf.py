"""Corpus articles rendered as two-column PDFs and read back with robtui's PDF reader.

Two writers: robtui's own (devtools/pdf_writer.py) and reportlab's platypus
(devtools/platypus_writer.py), an independent layout the reader was not tuned on.
"""

from __future__ import annotations

import tempfile
from collections.abc import Callable, Sequence
from pathlib import Path

from robtui.evidence.training.corpus import Article, ItemMapping
from robtui.evidence.training.corpus_docs import LabelledDocument, label_document
from robtui.reading.document import Document
from robtui.reading.reader import read_document

PDF_FULL_WIDTH_LINES = 3  # title and abstract heading run across the page
WRITERS = ("robtui", "platypus")


def _writer(name: str) -> Callable[..., object]:
    if name == "robtui":
        from robtui.devtools.pdf_writer import render_text_as_pdf

        return render_text_as_pdf
    if name == "platypus":
        from robtui.devtools.platypus_writer import render_text_with_platypus

        return render_text_with_platypus
    raise ValueError(f"unknown PDF writer {name!r}: use one of {', '.join(WRITERS)}")


def render_article(article: Article, out: Path, writer: str = "robtui",
                   full_width_lines: int = PDF_FULL_WIDTH_LINES) -> None:
    """Draw the article's text as a two-column PDF at ``out`` with ``writer``."""
    _writer(writer)(article.text, out, full_width_lines=full_width_lines)


def pdf_document(article: Article, folder: Path | None = None, writer: str = "robtui") -> Document:
    """Render the article as a two-column PDF and read it with robtui's PDF reader."""
    with tempfile.TemporaryDirectory() as tmp:
        name = article.id if writer == "robtui" else f"{article.id}-{writer}"
        out = Path(folder or tmp) / f"{name}.pdf"
        if not out.is_file():
            render_article(article, out, writer)
        return read_document(out, use_cache=False)


def labelled_pdf_documents(
    articles: Sequence[Article], mapping: ItemMapping, folder: Path | None = None,
    writer: str = "robtui",
) -> list[LabelledDocument]:
    """Render, read and label every article (sentences aligned to the article text)."""
    return [label_document(a, pdf_document(a, folder, writer), mapping, aligned=True)
            for a in articles]
