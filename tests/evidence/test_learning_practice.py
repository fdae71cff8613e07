"""The learning benchmark's simulated reviewers: the broad practice widens exactly the labels
it names (corpus sentences of the listed items whose wording matches), nothing else."""

import numpy as np

from robtui.benchmarks.learning import PRACTICES, with_practice
from robtui.evidence.training.corpus import Article, GoldSentence
from robtui.evidence.training.corpus_docs import LabelledDocument
from robtui.reading.text import document_from_text

SENTENCES = [
    ("This was a double-blind, randomised trial.", ("3a",)),
    ("This was a randomised, parallel-group trial.", ("3a",)),
    ("Allocation was by a central telephone service.", ("8a",)),
    ("A computer generated the sequence.", ("8a",)),
    ("Participants and assessors were masked.", ("11a",)),
]


def _article_and_doc():
    text = " ".join(t for t, _ in SENTENCES)
    gold, at = [], 0
    for t, items in SENTENCES:
        gold.append(GoldSentence(at, at + len(t), t, items))
        at += len(t) + 1
    article = Article("invented", text, tuple(gold))
    doc = document_from_text(text)
    assert [s.text for s in doc.sentences] == [t for t, _ in SENTENCES]
    spans = [(s.start, s.end) for s in doc.sentences]
    labels = {"2.1": np.array([0, 0, 0, 0, 1], bool), "1.2": np.zeros(5, bool),
              "1.1": np.array([0, 0, 1, 1, 0], bool)}
    present = {k: bool(v.any()) for k, v in labels.items()}
    return article, LabelledDocument("invented", doc, spans, labels, present)


def test_broad_practice_adds_blinding_design_and_concealment_sentences_only():
    article, doc = _article_and_doc()
    wide = with_practice(doc, article, PRACTICES["broad"])
    assert wide.labels["2.1"].tolist() == [True, False, False, False, True]
    assert wide.labels["1.2"].tolist() == [False, False, True, False, False]
    assert wide.present["1.2"] and not doc.present["1.2"]
    assert wide.labels["1.1"].tolist() == doc.labels["1.1"].tolist()  # not part of the practice
    assert doc.labels["2.1"].tolist() == [False] * 4 + [True]  # the input is left as it was


def test_consort_practice_changes_nothing():
    article, doc = _article_and_doc()
    same = with_practice(doc, article, PRACTICES["consort"])
    assert all((same.labels[k] == doc.labels[k]).all() for k in doc.labels)
    assert same.present == doc.present


def test_rotations_evaluate_each_part_once_and_learn_the_rest_in_order():
    from robtui.benchmarks.learning import rotations

    review = list(range(10))
    turns = rotations(review, 4)
    assert len(turns) == 4
    assert sorted(i for _, evaluated in turns for i in evaluated) == review
    for learned, evaluated in turns:
        assert learned == [i for i in review if i not in evaluated]  # article order kept
        assert evaluated == sorted(evaluated) and evaluated
