"""The ranking objective: pairs stay inside an article, hard negatives are the best-scored ones,
and the pairwise part moves a planted evidence sentence to the top of its article."""

import numpy as np
from scipy.sparse import csr_matrix

from robtui.evidence.training.train import Settings, article_pairs, fit_key, fit_question


def test_pairs_stay_within_articles_and_take_the_hardest_negatives():
    y = np.array([1, 0, 0, 0, 0, 1, 0, 0])
    groups = np.array([0, 0, 0, 0, 0, 1, 1, 1])
    z = np.array([0.0, 5.0, 1.0, 4.0, 2.0, 0.0, 3.0, 9.0])
    settings = Settings(pair_hard=2, pair_random=1)
    pos, neg = article_pairs(z, y, groups, settings, np.random.default_rng(0))
    assert (groups[pos] == groups[neg]).all()
    assert y[pos].all() and not y[neg].any()
    first = set(neg[pos == 0].tolist())
    assert {1, 3} <= first and len(first) == 3  # the two best-scored negatives and one drawn
    assert set(neg[pos == 5].tolist()) == {6, 7}  # only two negatives in the second article


def test_without_pairwise_the_question_model_is_the_pointwise_one():
    rng = np.random.default_rng(1)
    X = csr_matrix(rng.random((60, 5)))
    y = (rng.random(60) < 0.2).astype(int)
    groups = np.repeat(np.arange(6), 10)
    plain = Settings(pairwise=False)
    coef, b = fit_question(X, y, groups, plain)
    ref, ref_b = fit_key(X, y, plain)
    np.testing.assert_allclose(coef, ref)
    assert b == ref_b


def test_pairwise_part_orders_evidence_first_within_each_article():
    # Feature 0 marks evidence in every article; feature 1 is high in the article-level noise
    # that pointwise fitting on few positives tends to pick up. The ranked top must be evidence.
    rng = np.random.default_rng(2)
    rows, y, groups = [], [], []
    for g in range(8):
        for i in range(20):
            evidence = i == 0
            rows.append([1.0 if evidence else 0.0, rng.random(), float(g % 2)])
            y.append(int(evidence))
            groups.append(g)
    X = csr_matrix(np.array(rows))
    y, groups = np.array(y), np.array(groups)
    coef, b = fit_question(X, y, groups, Settings(C=1.0))
    z = X @ coef + b
    for g in range(8):
        rows_g = np.nonzero(groups == g)[0]
        assert y[rows_g][np.argmax(z[rows_g])] == 1
    pointwise, _ = fit_key(X, y, Settings(C=1.0))
    assert coef[0] > pointwise[0]  # the pairwise part adds weight to the evidence feature
