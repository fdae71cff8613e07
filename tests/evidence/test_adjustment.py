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


def _signal_group(article, signal_column, labels, rng):
    """A group whose gold is marked by ``signal_column`` alone (the other columns are noise)."""
    base = rng.random((len(labels), len(BASE_NAMES))) * 0.3
    base[:, BASE_NAMES.index(signal_column)] += np.asarray(labels) * 0.7
    return Group(article, "2.6", base, np.asarray(labels, bool), np.ones(len(labels), bool))


def test_the_corpus_weight_decides_which_collection_the_joint_fit_follows():
    from robtui.evidence.training.corpus_oof import CORPUS_PREFIX

    rng = np.random.default_rng(1)
    groups = []
    for a in range(6):
        labels = np.zeros(20, bool)
        labels[rng.integers(0, 20)] = True
        groups.append(_signal_group(f"real{a}.pdf", "cue_best", labels, rng))
        labels = np.zeros(20, bool)
        labels[rng.integers(0, 20)] = True
        groups.append(_signal_group(f"{CORPUS_PREFIX}{a}", "transfer", labels, rng))
    light = fit(groups, ["2.6"], C=1.0, corpus_weight=0.01)
    heavy = fit(groups, ["2.6"], C=1.0, corpus_weight=100.0)
    cue, transfer = BASE_NAMES.index("cue_best"), BASE_NAMES.index("transfer")
    assert light[cue] > light[transfer]
    assert heavy[transfer] > heavy[cue]


def test_cross_validation_folds_hold_each_real_article_alone_and_the_corpus_in_four():
    from robtui.evidence.training.corpus_oof import CORPUS_PREFIX
    from robtui.evidence.training.real_gold import cv_folds

    empty = np.zeros((1, len(BASE_NAMES)))
    articles = [f"r{i}.pdf" for i in range(3)] + [f"{CORPUS_PREFIX}{i}" for i in range(10)]
    groups = [Group(a, k, empty, np.ones(1, bool), np.ones(1, bool))
              for a in articles for k in ("1.1", "2.6")]
    folds = cv_folds(groups)
    assert folds[:3] == [{"r0.pdf"}, {"r1.pdf"}, {"r2.pdf"}]
    assert len(folds) == 7 and sorted(len(f) for f in folds[3:]) == [2, 2, 3, 3]
    assert sorted(a for f in folds for a in f) == sorted(articles)  # each article once


def test_a_question_is_served_only_where_the_real_pdfs_gain_and_the_corpus_loses_nothing():
    from robtui.evidence.training.real_gold import Figures, serving

    def figs(real, corpus):
        return Figures([0.0] * 3, [0.0] * 3, real, corpus, {}, {})

    first = figs({"1.1": [0.5, 0.8, 0.9], "2.6": [0.2, 0.4, 0.6], "3.1": [0.3, 0.6, 0.7],
                  "5.1": [0.9, 1.0, 1.0]},
                 {"1.1": [0.9, 0.95, 1.0], "2.6": [0.7, 0.9, 1.0], "3.1": [0.8, 0.9, 1.0]})
    second = figs({"1.1": [0.6, 0.8, 0.9],   # raised on the real PDFs ...
                   "2.6": [0.5, 0.8, 0.9],   # raised, and the corpus keeps its figures
                   "3.1": [0.4, 0.7, 0.8],   # raised, but corpus recall@3 falls
                   "5.1": [0.9, 1.0, 1.0]},  # no corpus groups: the real PDFs decide (no gain)
                  {"1.1": [0.85, 0.99, 1.0],  # ... but corpus recall@1 falls
                   "2.6": [0.75, 0.9, 1.0], "3.1": [0.9, 0.85, 1.0]})
    assert serving(first, second, ["1.1", "2.6", "3.1", "5.1"]) == ["2.6"]


def test_the_flag_cut_balances_the_two_collections():
    from robtui.evidence.training.real_gold import balanced_threshold

    # real PDFs: answerable tops 0.3-0.5, unanswerable 0.1; corpus: 0.8-0.9 and 0.2 (many more)
    tops = [0.3, 0.4, 0.5, 0.1, 0.1] + [0.8, 0.85, 0.9] * 10 + [0.2] * 10
    present = [True, True, True, False, False] + [True] * 30 + [False] * 10
    corpus = [False] * 5 + [True] * 40
    cut = balanced_threshold(tops, present, corpus)
    assert 0.2 < cut <= 0.3  # separates both; the corpus alone would put it anywhere to 0.8
    assert balanced_threshold(tops[:5], present[:5], corpus[:5]) == 0.3


def test_figures_pool_the_real_pdfs_and_average_the_corpus_over_questions():
    from robtui.evidence.training.corpus_oof import CORPUS_PREFIX
    from robtui.evidence.training.real_gold import figures

    base = np.zeros((3, len(BASE_NAMES)))
    base[:, 0] = [0.0, 1.0, 2.0]  # the first stage ranks sentence 2 first
    def g(article, key, gold):
        labels = np.zeros(3, bool)
        labels[gold] = True
        return Group(article, key, base, labels, np.ones(3, bool))
    groups = [g("a.pdf", "1.1", 2), g("b.pdf", "1.1", 0), g("a.pdf", "2.6", 0),
              g(CORPUS_PREFIX + "x", "1.1", 2), g(CORPUS_PREFIX + "y", "1.1", 2),
              g(CORPUS_PREFIX + "x", "2.6", 0)]
    f = figures(groups, [x.base[:, 0] for x in groups])
    assert f.real[0] == 1 / 3  # pooled over the three real pairs
    assert f.corpus[0] == 0.5  # (1.0 for 1.1 + 0.0 for 2.6) / 2
    second = [-x.base[:, 0] for x in groups]  # ranks sentence 0 first
    assert figures(groups, second, serves=["2.6"]).corpus[0] == 1.0


def test_corpus_groups_cache_round_trips(tmp_path):
    from robtui.evidence.training.corpus_oof import _load, _save

    rng = np.random.default_rng(2)
    groups = [Group(f"corpus:A{i}", k, rng.random((n, len(BASE_NAMES))), rng.random(n) < 0.2,
                    rng.random(n) < 0.9) for i, n in enumerate((5, 7)) for k in ("1.1", "2.6")]
    path = tmp_path / "oof.npz"
    _save(path, groups)
    back = _load(path)
    assert [(g.article, g.key) for g in back] == [(g.article, g.key) for g in groups]
    for a, b in zip(back, groups):
        assert np.array_equal(a.base, b.base) and np.array_equal(a.labels, b.labels)
        assert np.array_equal(a.keep, b.keep)
    path.write_bytes(b"damaged")
    assert _load(path) is None


def test_the_fit_does_not_depend_on_the_order_of_the_groups():
    """Each group draws its random negatives with a seed of its own, so the corpus groups
    before or after the real ones (training, bench evidence) give the same weights."""
    rng = np.random.default_rng(3)
    groups = []
    for a in range(5):
        labels = np.zeros(200, bool)  # large enough that negatives are drawn
        labels[rng.integers(0, 200, size=2)] = True
        groups.append(_signal_group(f"a{a}.pdf", "cue_best", labels, rng))
    forward = fit(groups, ["2.6"], C=1.0)
    backward = fit(groups[::-1], ["2.6"], C=1.0)
    assert np.allclose(forward, backward, rtol=1e-3, atol=1e-5)


def test_bench_evidence_prints_the_corpus_with_and_without_the_second_stage(capsys, monkeypatch):
    """The table of `bench evidence` with the shipped second stage, the first stage alone and
    the second stage refitted without each fold (stubbed here: it needs the real PDFs)."""
    from robtui.benchmarks import evidence
    from robtui.evidence.training.metrics import QuestionFigures

    def figs(ranks):
        return {k: QuestionFigures.from_ranks(r, [10] * len(r), [0.5] * len(r), [True] * len(r))
                for k, r in ranks.items()}

    first = figs({"1.1": [1, 1], "2.6": [2, 4]})
    shipped = figs({"1.1": [1, 1], "2.6": [1, 4]})
    adjustment = Adjustment(["1.1", "2.6"], np.zeros(len(feature_names(["1.1", "2.6"]))),
                            np.array([1.0, 0.0]), 0.2, {"C": 0.3, "corpus_weight": 3.0},
                            serves=["2.6"])
    monkeypatch.setattr(evidence, "_second_stage_cv", lambda result: {"2.6": [3, 3]})
    out = evidence.second_stage_table({"figures": {"first txt": first, "model txt": shipped},
                                       "keys": ["1.1", "2.6"], "adjustment": adjustment})
    printed = capsys.readouterr().out
    assert "it serves 2.6" in printed
    assert out["first stage alone"]["macro"][0] == 0.5  # (1.0 + 0.0) / 2
    assert out["with the shipped second stage *"]["macro"][0] == 0.75
    refitted = out["second stage refitted without the fold"]
    assert refitted["per_question"]["1.1"] == out["first stage alone"]["per_question"]["1.1"]
    assert refitted["macro"][:2] == [0.5, 1.0]  # 2.6 refitted: recall@1 0, recall@3 1


def test_document_features_stand_each_score_against_the_documents_best():
    from robtui.evidence.adjustment import base_features
    from robtui.evidence.features import QUESTION_NAMES, SHARED_NAMES

    model, transfer = np.array([2.0, -1.0, 0.5]), np.array([-3.0, 1.0, 0.0])
    question = np.zeros((3, len(QUESTION_NAMES)))
    question[:, QUESTION_NAMES.index("cue_best")] = [1.0, 0.0, 0.5]
    base = base_features(model, transfer, question, np.zeros((3, len(SHARED_NAMES))))
    col = {n: base[:, BASE_NAMES.index(n)] for n in ("model_gap", "transfer_gap",
                                                      "model_x_transfer", "model_x_cue")}
    assert col["model_gap"].tolist() == [0.0, -3.0, -1.5]
    assert col["transfer_gap"].tolist() == [-4.0, 0.0, -1.0]
    p = 1 / (1 + np.exp(-model))
    assert np.allclose(col["model_x_transfer"], p / (1 + np.exp(-transfer)))
    assert np.allclose(col["model_x_cue"], p * [1.0, 0.0, 0.5])
    assert base_features(np.zeros(0), np.zeros(0), question[:0],
                         np.zeros((0, len(SHARED_NAMES)))).shape == (0, len(BASE_NAMES))


def test_equal_figures_summed_in_another_order_are_no_gain():
    """1/3 + 7/9 - (1/3 + 7/9) can come out as 1e-16: that is not a raise."""
    from robtui.evidence.training.real_gold import Figures, serving

    same = [3 / 9, 7 / 9, 1.0]
    first = Figures([0.0] * 3, [0.0] * 3, {"3.1": [0.3333333333333333, 0.7777777777777778, 1.0]},
                    {}, {}, {})
    second = Figures([0.0] * 3, [0.0] * 3, {"3.1": same}, {}, {}, {})
    assert serving(first, second, ["3.1"]) == []
