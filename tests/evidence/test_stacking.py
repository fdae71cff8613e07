"""Stacking on CONSORT item models: features, train/suggest agreement, file round trip."""

import numpy as np
import pytest

from robtui.errors import ModelFileError
from robtui.evidence.features import QUESTION_NAMES, stacked_features
from robtui.evidence.training.corpus import default_corpus_dir
from robtui.evidence.training.train import Settings, stack_plan

CORPUS = default_corpus_dir()
needs_corpus = pytest.mark.skipif(CORPUS is None, reason="../shared/corpus is not present")
MAP = {"1.1": ("8a", "8b"), "1.2": ("9", "10"), "2.1": ("11a",), "5.1": ("23",)}


def test_stacked_features_sentence_neighbours_and_window():
    scores = np.array([[0.1, 0.0], [0.9, 0.2], [0.3, 0.0], [0.2, 0.7], [0.5, 0.0]])
    out = stacked_features(scores)
    assert out.shape == (5, 8)
    # item 0 of sentence 2: itself, previous, next, best of sentences 0, 1, 3, 4
    np.testing.assert_allclose(out[2, :4], [0.3, 0.9, 0.2, 0.9])
    # item 1 of sentence 0: no previous sentence; best within two after it
    np.testing.assert_allclose(out[0, 4:], [0.0, 0.0, 0.2, 0.2])
    np.testing.assert_allclose(out[4, 4:], [0.0, 0.7, 0.0, 0.7])


def test_stack_plan_uses_the_items_of_the_questions_own_domain():
    plan = stack_plan(list(MAP), MAP, Settings())
    assert plan["1.2"] == ["10", "8a", "8b", "9"] == plan["1.1"]
    assert plan["2.1"] == ["11a"] and plan["5.1"] == ["23"]
    assert all(v == [] for v in stack_plan(list(MAP), MAP, Settings(stacking="none")).values())
    with pytest.raises(ValueError, match="stacking"):
        stack_plan(list(MAP), MAP, Settings(stacking="everything"))


@pytest.fixture(scope="module")
def tiny():
    """A model trained with stacking on four corpus articles, and those articles."""
    from robtui.evidence.training.corpus import load_corpus, load_mapping
    from robtui.evidence.training.corpus_docs import labelled_documents
    from robtui.evidence.training.train import fit_weights, prepare, question_texts

    mapping = load_mapping(CORPUS)
    docs = labelled_documents(load_corpus(CORPUS)[:4], mapping, "txt")
    keys, texts = list(mapping.questions), question_texts()
    # no simulated reader faults: the training rows must be the features `suggest` computes
    settings = Settings(C=1.0, calibration_folds=2, item_folds=2, section_dropout=0.0)
    prep = prepare(docs, keys, settings, texts)
    weights = fit_weights(docs, keys, settings, texts, prepared=prep, item_map=mapping.questions)
    return weights, docs, prep, keys, texts, mapping


@needs_corpus
def test_suggest_time_stacking_equals_the_training_code_path(tiny):
    """The ranker's numpy-only log-odds equal those built with the training code (scipy)."""
    from robtui.evidence.ranker import Ranker, sigmoid
    from robtui.evidence.training.train import _per_document, _stack_columns, _with_stack

    weights, docs, prep, keys, texts, mapping = tiny
    assert weights.n_items >= 2 and np.abs(weights.stacked).sum() > 0
    ranker = Ranker(weights)
    doc = docs[0]
    got = ranker.logits(ranker.features(doc.document), weights.keys,
                        [texts.get(k, "") for k in weights.keys])
    rows = prep.groups == 0
    X_items = prep.X[keys[0]][rows][:, : -len(QUESTION_NAMES)]
    item_z = X_items @ np.hstack([weights.item_lexical, weights.item_shared]).T
    stacked = _per_document(sigmoid(item_z + weights.item_intercept), np.zeros(rows.sum()))
    plan = stack_plan(keys, mapping.questions, Settings())
    for r, key in enumerate(weights.keys):
        columns = _stack_columns(plan[key], weights.item_keys)
        X = _with_stack(prep.X[key][rows], stacked, columns)
        coef = np.concatenate([weights.lexical[r].astype(np.float64), weights.shared[r],
                               weights.question[r], weights.stacked[r, columns]])
        a, b = weights.platt[r]
        want = a * (X @ coef + weights.intercept[r]) + b
        np.testing.assert_allclose(got[key], want, rtol=1e-4, atol=1e-4)


@needs_corpus
def test_stacked_weights_round_trip_and_shape_check(tiny, tmp_path):
    import dataclasses

    from robtui.evidence.model import load_weights, save_weights

    weights = dataclasses.replace(tiny[0])
    path = tmp_path / "w.npz"
    save_weights(weights, path)
    again = load_weights(path)
    assert again.item_keys == weights.item_keys
    np.testing.assert_array_equal(again.stacked, weights.stacked)
    np.testing.assert_array_equal(again.item_lexical, weights.item_lexical.astype(np.float32))
    weights.stacked = weights.stacked[:, :-1]
    save_weights(weights, tmp_path / "bad.npz")
    with pytest.raises(ModelFileError, match="stacked weights shape"):
        load_weights(tmp_path / "bad.npz")
