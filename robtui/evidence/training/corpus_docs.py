"""Corpus articles as the ranker sees them: read by robtui's own readers, labelled by the mapping.

Training and benchmarks only. The text route passes the article's text to
``robtui.reading.text.document_from_text`` (offsets are the article's own); the PDF route
(benchmarks only: robtui.benchmarks._corpus_pdf) renders the text as a two-column PDF and reads
it back with ``read_document``, then aligns each sentence to the article text (letters and
digits only), so gold spans can be compared.
Corpus: Kilicoglu et al., J Biomed Inform 2021;116:103717 (CONSORT-TM).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field

import numpy as np

from robtui.evidence.training.corpus import Article, ItemMapping, gold_spans, is_hit
from robtui.reading.document import Document


@dataclass
class LabelledDocument:
    article_id: str
    document: Document
    spans: list[tuple[int, int] | None]  # each sentence's span in the article text (None: lost)
    labels: dict[str, np.ndarray]  # question id -> bool per sentence
    present: dict[str, bool]  # question id -> the article has gold evidence
    items: dict[str, np.ndarray] = field(default_factory=dict)  # CONSORT item -> bool per sentence


def _normalised(text: str) -> tuple[str, list[int]]:
    chars, positions = [], []
    for i, c in enumerate(text):
        if c.isalnum():
            chars.append(c.lower())
            positions.append(i)
    return "".join(chars), positions


def align_to_source(texts: Sequence[str], source: str) -> list[tuple[int, int] | None]:
    """Span in ``source`` of each text, matching letters and digits only, in reading order."""
    norm, positions = _normalised(source)
    cursor = 0
    spans: list[tuple[int, int] | None] = []
    for text in texts:
        key, _ = _normalised(text)
        if not key:
            spans.append(None)
            continue
        at = norm.find(key, max(0, cursor - 3000))
        if at < 0:
            at = norm.find(key)
        end = at + len(key)
        if at < 0 and len(key) > 60:  # a few characters changed: anchor on both ends
            head = norm.find(key[:30], max(0, cursor - 3000))
            tail = norm.find(key[-30:], head) if head >= 0 else -1
            if head >= 0 and 0 < tail - head < 2 * len(key):
                at, end = head, tail + 30
        if at < 0:
            spans.append(None)
            continue
        spans.append((positions[at], positions[end - 1] + 1))
        cursor = end
    return spans


def label_document(
    article: Article, document: Document, mapping: ItemMapping, *, aligned: bool
) -> LabelledDocument:
    """Labels per mapped question: a sentence is positive when it hits a gold sentence."""
    if aligned:
        spans = align_to_source([s.text for s in document.sentences], article.text)
    else:
        spans = [(s.start, s.end) for s in document.sentences]
    def hits(items) -> tuple[bool, np.ndarray]:
        gold = gold_spans(article, items)
        return bool(gold), np.array(
            [span is not None and any(is_hit(span, g) for g in gold) for span in spans], dtype=bool
        )

    labels, present, item_labels = {}, {}, {}
    for qid, items in mapping.questions.items():
        present[qid], labels[qid] = hits(items)
    for item in sorted({i for items in mapping.questions.values() for i in items}):
        item_labels[item] = hits((item,))[1]  # one model per item feeds the questions' models
    return LabelledDocument(article.id, document, spans, labels, present, item_labels)


def text_document(article: Article) -> Document:
    from robtui.reading.text import document_from_text

    return document_from_text(article.text, path=f"{article.id}.txt", kind="txt")


def labelled_documents(
    articles: Sequence[Article], mapping: ItemMapping, source: str = "txt"
) -> list[LabelledDocument]:
    """Read and label every article through the text route (benchmarks add the PDF route:
    robtui.benchmarks._corpus_pdf.labelled_pdf_documents)."""
    if source != "txt":
        raise ValueError(f"unknown source {source!r}")
    return [label_document(a, text_document(a), mapping, aligned=False) for a in articles]
