"""The second stage (evidence/adjustment.py): its file, its use by the ranker, and its training
(evidence/training/real_gold.py) on invented groups."""

import numpy as np
import pytest

from robtui.errors import ModelFileError
from robtui.evidence.adjustment import (
    BASE_NAMES,
    PER_QUESTION,
    Adjustment,
    design,
    feature_names,
    load_adjustment,
    save_adjustment,
)
from robtui.evidence.training.real_gold import Group, first_rank, fit, loao_scores, recalls
from robtui.reading.text import document_from_text


def test_design_copies_the_question_block_of_its_own_key_only():
    base = np.arange(2 * len(BASE_NAMES), dtype=float).reshape(2, -1)
    row = design(base, "2.6", ["1.1", "2.6"])
    assert row.shape == (2, len(feature_names(["1.1", "2.6"])))
    assert np.array_equal(row[:, : len(BASE_NAMES)], base)
    own = len(BASE_NAMES) + len(PER_QUESTION)
    assert np.array_equal(row[:, own : own + len(PER_QUESTION)],
                          base[:, [BASE_NAMES.index(n) for n in PER_QUESTION]])
    assert not row[:, len(BASE_NAMES) : own].any()  # 1.1's block stays zero
    assert not design(base, "4.1", ["1.1", "2.6"])[:, len(BASE_NAMES):].any()


def test_file_round_trip_and_refusals(tmp_path):
    keys = ["1.1", "2.6"]
    coef = np.linspace(-1, 1, len(feature_names(keys)))
    path = tmp_path / "adjustment.npz"
    save_adjustment(Adjustment(keys, coef, np.array([0.5, -2.0]), 0.07, {"C": 1.0}, ["2.6"]),
                    path)
    back = load_adjustment(path)
    assert back.keys == keys and np.array_equal(back.coef, coef) and back.serves == ["2.6"]
    assert back.threshold == 0.07 and back.provenance["C"] == 1.0
    save_adjustment(Adjustment(keys, coef[:-1], np.array([1.0, 0.0]), 0.1), path)
    with pytest.raises(ModelFileError, match="adjustment.npz"):
        load_adjustment(path)
    path.write_bytes(b"not a zip")
    with pytest.raises(ModelFileError, match="unusable"):
        load_adjustment(path)
    with pytest.raises(ModelFileError, match="no such"):
        load_adjustment(tmp_path / "absent.npz")


def test_the_ranker_applies_the_second_stage_to_the_questions_it_serves(ranker, report_text):
    from robtui.evidence.adjustment import base_features
    from robtui.evidence.ranker import Ranker

    keys = ["1.1", "2.6"]
    coef = np.zeros(len(feature_names(keys)))
    coef[BASE_NAMES.index("model")] = 2.0
    coef[BASE_NAMES.index("cue_best")] = 3.0
    adjusted = Ranker(ranker.weights, ranker.cues,
                      adjustment=Adjustment(keys, coef, np.array([0.5, -1.0]), 0.2))
    first = Ranker(ranker.weights, ranker.cues)
    doc = document_from_text(report_text)
    feats = first.features(doc)
    texts = [ranker.weights.question_texts[k] for k in keys]
    stage_one = first.first_stage(feats, keys, texts)
    plain = first.logits(feats, keys, texts)
    both = adjusted.logits(feats, keys, texts)
    for key in keys:
        own, transfer, qf = stage_one[key]
        assert np.allclose(plain[key], own)
        expected = 0.5 * (design(base_features(own, transfer, qf, feats.shared), key, keys)
                          @ coef) - 1.0
        assert np.allclose(both[key], expected)
    assert adjusted.threshold_for("1.1") == 0.2
    # a question it does not serve keeps the first stage
    narrow = Ranker(ranker.weights, ranker.cues,
                    adjustment=Adjustment(keys, coef, np.array([0.5, -1.0]), 0.2, serves=["2.6"]))
    assert np.allclose(narrow.logits(feats, keys, texts)["1.1"], plain["1.1"])
    assert np.allclose(narrow.logits(feats, keys, texts)["2.6"], both["2.6"])
    assert narrow.threshold_for("1.1") == first.threshold_for("1.1")
    # a question the second stage was not fitted on keeps the first stage and its threshold
    assert adjusted.threshold_for("4.1") == first.threshold_for("4.1") != 0.2
    other = ranker.weights.question_texts["4.1"]
    assert np.allclose(adjusted.logits(feats, ["4.1"], [other])["4.1"],
                       first.logits(feats, ["4.1"], [other])["4.1"])


def _group(article, key, signal, labels):
    base = np.zeros((len(labels), len(BASE_NAMES)))
    base[:, BASE_NAMES.index("cue_best")] = signal
    base[:, BASE_NAMES.index("model")] = np.linspace(0, 1, len(labels))  # misleading order
    return Group(article, key, base, np.asarray(labels, bool), np.ones(len(labels), bool))


def test_training_learns_a_signal_that_the_first_stage_misses_and_scores_out_of_fold():
    rng = np.random.default_rng(0)
    groups = []
    for a in range(4):
        labels = np.zeros(30, bool)
        labels[rng.integers(0, 10)] = True  # gold early, where the first stage scores low
        signal = rng.random(30) * 0.3 + labels * 0.7
        groups.append(_group(f"art{a}", "2.6", signal, labels))
    coef = fit(groups, ["2.6"], C=1.0)
    assert coef[BASE_NAMES.index("cue_best")] > 0 > coef[BASE_NAMES.index("model")]
    scores = loao_scores(groups, ["2.6"], C=1.0)
    ranks = [first_rank(s, g) for g, s in zip(groups, scores)]
    assert recalls(ranks)[0] == 1.0
    assert [first_rank(g.base[:, 0], g) for g in groups] != [1, 1, 1, 1]


def test_first_rank_counts_only_suggestible_sentences():
    g = Group("a", "1.1", np.zeros((4, len(BASE_NAMES))), np.array([False, False, True, False]),
              np.array([True, False, True, True]))
    assert first_rank(np.array([0.9, 0.95, 0.5, 0.1]), g) == 2
    assert first_rank(np.array([0.9, 0.95, 0.5, 0.1]),
                      Group("a", "1.1", g.base, np.zeros(4, bool), g.keep)) is None
