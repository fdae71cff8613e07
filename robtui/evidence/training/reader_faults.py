"""Documents as a faulty reader gives them, to train and test a ranker that survives it.

Real publisher PDFs defeat the reader's structure finding in ways the corpus text never does
(issue 13: sections found in 9 of 16 real articles). Training on some articles seen that way
keeps the ranker from leaning on sections it will not always have.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from robtui.reading.document import Document


def without_sections(document: Document) -> Document:
    """``document`` as a reader that found no structure gives it: every sentence in section
    "other", headings read as body text."""
    sentences = [s.model_copy(update={"section": "other", "block": "body"}
                              if s.block == "heading" else {"section": "other"})
                 for s in document.sentences]
    return document.model_copy(update={"sentences": sentences})


def faulty_documents(documents: Sequence[Document], section_dropout: float,
                     seed: int) -> list[Document]:
    """``documents`` with a ``section_dropout`` share of them (drawn with ``seed``, so a rerun
    picks the same ones) seen without sections; the others as they are."""
    if section_dropout <= 0.0:
        return list(documents)
    drop = np.random.default_rng(seed).random(len(documents)) < section_dropout
    return [without_sections(d) if gone else d for d, gone in zip(documents, drop)]
