"""Training is deterministic and writes plain-data weights with provenance (tiny subset)."""

import numpy as np
import pytest

from robtui.evidence.training.corpus import default_corpus_dir

CORPUS = default_corpus_dir()
needs_corpus = pytest.mark.skipif(CORPUS is None, reason="../shared/corpus is not present")
ONE_SETTING = ({"C": 1.0, "class_weight": None},)


@needs_corpus
def test_rerun_reproduces_identical_weights(tmp_path):
    from robtui.evidence.model import load_weights
    from robtui.evidence.ranker import Ranker
    from robtui.evidence.training.train import train

    paths = [tmp_path / "a.npz", tmp_path / "b.npz"]
    for path in paths:
        train(CORPUS, path, folds=2, articles=4, grid=ONE_SETTING, log=lambda *_: None)
    a, b = (load_weights(p) for p in paths)
    assert a.keys == b.keys and len(a.keys) >= 5
    assert a.word.vocabulary == b.word.vocabulary and a.char.vocabulary == b.char.vocabulary
    assert a.item_keys == b.item_keys and a.n_items >= 2  # stacking on CONSORT item models
    for name in ("lexical", "shared", "question", "intercept", "platt", "generic",
                 "item_lexical", "item_shared", "item_intercept", "stacked"):
        np.testing.assert_array_equal(getattr(a, name), getattr(b, name))
    assert np.abs(a.lexical).sum() > 0
    assert a.no_evidence_threshold == b.no_evidence_threshold
    prov = a.provenance
    assert len(prov["trained_on"]["articles"]) == 4
    assert prov["cross_validation"]["folds"] == 2
    assert prov["settings"]["C"] == 1.0
    # the trained weights rank a corpus-free invented sentence for its question
    from robtui.reading.text import document_from_text

    doc = document_from_text("Methods\nThe weather was mild.\n"
                             "Allocation was concealed in sealed opaque envelopes.\n")
    ranked = Ranker(a).rank(doc, ["1.2"])["1.2"]
    # the bare heading "Methods" is never suggested; the concealment sentence comes first
    assert ranked[0].text.startswith("Allocation was concealed")
    assert len(ranked) == 2 and all(s.text != "Methods" for s in ranked)


@needs_corpus
def test_evidence_benchmark_small_run_ranks_better_than_its_baseline():
    """`robtui bench evidence` end to end on six articles, two folds, text only (about 10 s)."""
    from robtui.benchmarks.evidence import cross_validate
    from robtui.evidence.training.metrics import macro

    result = cross_validate(CORPUS, 2, 6, False)
    figs = result["figures"]
    assert {"model txt", "spread txt", "baseline txt", "transfer txt"} <= set(figs)
    assert set(figs["model txt"]) == set(result["keys"])
    model, baseline = macro(figs["model txt"], "recall1"), macro(figs["baseline txt"], "recall1")
    assert 0.0 <= baseline < model <= 1.0
    # reading order keeps the first place: recall@1 is the same in both orders
    assert macro(figs["spread txt"], "recall1") == model
    assert len(result["thresholds"]) == 2


def test_first_hit_rank_when_the_order_leaves_every_positive_out() -> None:
    from robtui.evidence.training.metrics import first_hit_rank

    labels = np.array([False, True, False])
    scores = np.array([0.1, 0.9, 0.5])
    assert first_hit_rank(scores, labels) == 1
    assert first_hit_rank(scores, labels, np.array([2, 1])) == 2
    # the candidates shown leave the only evidence out (a kind never suggested): a miss
    assert first_hit_rank(scores, labels, np.array([2, 0])) is None
