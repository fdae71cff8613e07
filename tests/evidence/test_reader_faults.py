"""Training for a faulty reader: documents without sections, abstract rows the corpus leaves
unannotated (invented text only)."""

import numpy as np

from robtui.evidence.training.reader_faults import faulty_documents, without_sections
from robtui.evidence.training.train import Settings, labelled_rows
from robtui.reading.text import document_from_text

TEXT = """Abstract
Methods Adults were randomly assigned to an invented gel or placebo.
Methods
Randomisation
A statistician generated the allocation sequence with a computer.
Statistical analysis
Analysis was by intention to treat.
"""


def test_without_sections_reads_like_a_reader_that_found_no_structure():
    doc = document_from_text(TEXT)
    assert {s.section for s in doc.sentences} - {"other"}  # the reader found sections
    assert any(s.block == "heading" for s in doc.sentences)
    bare = without_sections(doc)
    assert [s.text for s in bare.sentences] == [s.text for s in doc.sentences]
    assert {s.section for s in bare.sentences} == {"other"}
    assert all(s.block != "heading" for s in bare.sentences)
    assert {s.section for s in doc.sentences} - {"other"}  # the original is left as it was


def test_faulty_documents_drop_a_seeded_share():
    docs = [document_from_text(TEXT) for _ in range(40)]
    assert faulty_documents(docs, 0.0, 1) == docs
    first = faulty_documents(docs, 0.25, 1)
    again = faulty_documents(docs, 0.25, 1)
    dropped = [all(s.section == "other" for s in d.sentences) for d in first]
    assert dropped == [all(s.section == "other" for s in d.sentences) for d in again]
    assert 3 <= sum(dropped) <= 18  # about a quarter of 40
    assert all(faulty_documents(docs, 1.0, 1)[i].sentences[0].section == "other" for i in range(40))


def test_abstract_rows_left_out_only_where_the_labels_are_absent_there():
    abstract = np.array([True] * 10 + [False] * 90)
    y = np.zeros(100, int)
    y[[20, 40, 60]] = 1  # evidence annotated in the body only
    off = Settings()
    on = Settings(abstract_unlabelled=True)
    assert labelled_rows(y, abstract, off) is None
    rows = labelled_rows(y, abstract, on)
    assert rows is not None and rows.tolist() == (~abstract).tolist()
    y[[1, 2]] = 1  # annotated in abstracts as often as elsewhere: keep them
    assert labelled_rows(y, abstract, on) is None
    assert labelled_rows(y, np.zeros(100, bool), on) is None
