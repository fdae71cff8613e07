"""Corpus articles rendered as two-column PDFs and read back with robtui's PDF reader."""

from __future__ import annotations

import tempfile
from collections.abc import Sequence
from pathlib import Path

from robtui.devtools.pdf_writer import render_text_as_pdf
from robtui.evidence.training.corpus import Article, ItemMapping
from robtui.evidence.training.corpus_docs import LabelledDocument, label_document
from robtui.reading.document import Document
from robtui.reading.reader import read_document

PDF_FULL_WIDTH_LINES = 3  # title and abstract heading run across the page


def pdf_document(article: Article, folder: Path | None = None) -> Document:
    """Render the article as a two-column PDF and read it with robtui's PDF reader."""
    with tempfile.TemporaryDirectory() as tmp:
        out = Path(folder or tmp) / f"{article.id}.pdf"
        if not out.is_file():
            render_text_as_pdf(article.text, out, full_width_lines=PDF_FULL_WIDTH_LINES)
        return read_document(out, use_cache=False)


def labelled_pdf_documents(
    articles: Sequence[Article], mapping: ItemMapping, folder: Path | None = None
) -> list[LabelledDocument]:
    """Render, read and label every article (sentences aligned to the article text)."""
    return [label_document(a, pdf_document(a, folder), mapping, aligned=True) for a in articles]
