"""Feature block scales: training-only reweighting of the L2 penalty, stored unscaled."""

import numpy as np
from scipy.sparse import csr_matrix

from robtui.evidence.features import QUESTION_NAMES, SHARED_NAMES
from robtui.evidence.training.train import (
    Settings,
    block_scale,
    fit_key,
    fit_question,
    fit_scaled,
    scaled,
)


def test_block_scale_layout():
    settings = Settings(scale_shared=0.5, scale_question=0.25, scale_stacked=2.0)
    s = block_scale(7, 3, settings)
    n_sh, n_q = len(SHARED_NAMES), len(QUESTION_NAMES)
    assert len(s) == 7 + n_sh + n_q + 3
    assert (s[:7] == 1.0).all()
    assert (s[7 : 7 + n_sh] == 0.5).all()
    assert (s[7 + n_sh : 7 + n_sh + n_q] == 0.25).all()
    assert (s[-3:] == 2.0).all()


def _data(seed=3):
    rng = np.random.default_rng(seed)
    X = rng.random((120, 6))
    y = (X[:, 0] + 0.3 * rng.standard_normal(120) > 0.7).astype(int)
    return csr_matrix(X), y, np.repeat(np.arange(12), 10)


def test_stored_coefficients_score_the_unscaled_features_as_the_scaled_fit_does():
    X, y, groups = _data()
    scale = np.array([1.0, 1.0, 0.5, 0.5, 0.25, 3.0])
    settings = Settings(C=1.0)
    coef, b = fit_scaled(fit_question, X, scale, y, groups, settings)
    ref, ref_b = fit_question(scaled(X, scale), y, groups, settings)
    np.testing.assert_allclose(X @ coef + b, scaled(X, scale) @ ref + ref_b, rtol=1e-10)
    assert b == ref_b


def test_scaling_a_column_down_shrinks_its_share_under_the_same_penalty():
    X, y, _ = _data()
    settings = Settings(C=0.3)
    plain, _ = fit_key(X, y, settings)
    down, _ = fit_scaled(fit_key, X, np.array([0.2, 1, 1, 1, 1, 1.0]), y, settings)
    # the informative column 0 costs 25 times as much to use: its weight falls
    assert abs(down[0]) < abs(plain[0])
    # unit scales change nothing
    same, _ = fit_scaled(fit_key, X, np.ones(6), y, settings)
    np.testing.assert_allclose(same, plain)
