"""Agreement statistics against outside references (each named beside its check)."""

from __future__ import annotations

import math
import random

import numpy as np
import pytest
from sklearn.metrics import cohen_kappa_score

from robtui.core.agreement import agreement, landis_koch_band
from robtui.errors import InputError

JUDGEMENTS = ["low", "some_concerns", "high"]


def _expand(cells: dict[tuple[str, str], int]) -> list[tuple[str, str]]:
    return [pair for pair, count in cells.items() for _ in range(count)]


def test_published_example_with_standard_error():
    # Source: documentation of the R package statpsych (D. G. Bonett), ci.kappa example,
    # which cites Fleiss & Paik (2003), Statistical Methods for Rates and Proportions, 3rd ed.:
    # counts f00=31, f01=12, f10=4, f11=58 give Cohen kappa 0.6756757, SE 0.07344761,
    # 95% CI 0.5317210 to 0.8196303.
    pairs = _expand({("0", "0"): 31, ("0", "1"): 12, ("1", "0"): 4, ("1", "1"): 58})
    stats = agreement(pairs)
    assert stats.kappa == pytest.approx(0.6756757, abs=1e-7)
    assert stats.kappa_se == pytest.approx(0.07344761, abs=1e-8)
    assert stats.kappa_ci[0] == pytest.approx(0.5317210, abs=1e-7)
    assert stats.kappa_ci[1] == pytest.approx(0.8196303, abs=1e-7)


def test_textbook_two_by_two_example():
    # Worked example of the Wikipedia article "Cohen's kappa" (50 applications read by two
    # readers: 20 yes/yes, 5 yes/no, 10 no/yes, 15 no/no; p_o = 0.7, p_e = 0.5, kappa = 0.4).
    # Numbers from memory of that article.
    pairs = _expand({("Y", "Y"): 20, ("Y", "N"): 5, ("N", "Y"): 10, ("N", "N"): 15})
    stats = agreement(pairs, ["Y", "N"])
    assert stats.percent_agreement == pytest.approx(70.0)
    assert stats.kappa == pytest.approx(0.4)


@pytest.mark.parametrize("seed", range(60))
def test_kappa_and_linear_weighted_kappa_equal_scikit_learn(seed):
    # Reference: scikit-learn cohen_kappa_score (plain and weights="linear").
    rng = random.Random(seed)
    n = rng.randint(3, 80)
    bias = rng.random()
    a = [rng.choice(JUDGEMENTS) for _ in range(n)]
    b = [x if rng.random() < bias else rng.choice(JUDGEMENTS) for x in a]
    stats = agreement(list(zip(a, b)), JUDGEMENTS, ordered=True)
    plain = cohen_kappa_score(a, b, labels=JUDGEMENTS)
    linear = cohen_kappa_score(a, b, labels=JUDGEMENTS, weights="linear")
    if math.isnan(plain):
        assert stats.kappa is None
    else:
        assert stats.kappa == pytest.approx(plain, abs=1e-12)
    if math.isnan(linear):
        assert stats.weighted_kappa is None
    else:
        assert stats.weighted_kappa == pytest.approx(linear, abs=1e-12)


@pytest.mark.parametrize("seed", range(20))
def test_kappa_on_signalling_answers_equals_scikit_learn(seed):
    rng = random.Random(1000 + seed)
    codes = ["Y", "PY", "PN", "N", "NI", "NA"]
    n = rng.randint(5, 60)
    a = [rng.choice(codes[: rng.randint(2, 6)]) for _ in range(n)]
    b = [x if rng.random() < 0.6 else rng.choice(codes) for x in a]
    stats = agreement(list(zip(a, b)), codes)
    assert stats.weighted_kappa is None  # not ordered
    reference = cohen_kappa_score(a, b, labels=codes)
    assert stats.kappa == pytest.approx(reference, abs=1e-12)


def test_pabak_by_definition():
    # Byrt, Bishop & Carlin (1993), J Clin Epidemiol 46:423-429: PABAK = 2 p_o - 1 for two
    # categories; (k p_o - 1) / (k - 1) for k categories.
    two = _expand({("Y", "Y"): 40, ("Y", "N"): 3, ("N", "Y"): 5, ("N", "N"): 2})
    assert agreement(two, ["Y", "N"]).pabak == pytest.approx(2 * 42 / 50 - 1)
    three = _expand({("low", "low"): 7, ("low", "high"): 2, ("high", "high"): 1})
    stats = agreement(three, JUDGEMENTS, ordered=True)
    assert stats.pabak == pytest.approx((3 * 0.8 - 1) / 2)


@pytest.mark.parametrize("seed", range(10))
def test_standard_error_equals_delta_method(seed):
    # The Fleiss-Cohen-Everitt large-sample variance is the delta-method variance of kappa
    # under multinomial sampling; check it numerically (independent derivation).
    rng = np.random.default_rng(seed)
    k = int(rng.integers(2, 5))
    counts = rng.integers(1, 30, size=(k, k)) + np.diag(rng.integers(5, 40, size=k))
    n = int(counts.sum())
    cats = [f"c{i}" for i in range(k)]
    pairs = [(cats[i], cats[j]) for i in range(k) for j in range(k) for _ in range(counts[i, j])]
    se = agreement(pairs, cats).kappa_se

    def kappa_of(vec):
        p = vec.reshape(k, k)
        p_o = np.trace(p)
        p_e = float(p.sum(axis=1) @ p.sum(axis=0))
        return (p_o - p_e) / (1 - p_e)

    p = (counts / n).ravel()
    grad = np.zeros_like(p)
    h = 1e-7
    for i in range(p.size):
        up, down = p.copy(), p.copy()
        up[i] += h
        down[i] -= h
        grad[i] = (kappa_of(up) - kappa_of(down)) / (2 * h)
    cov = (np.diag(p) - np.outer(p, p)) / n
    assert se == pytest.approx(math.sqrt(grad @ cov @ grad), rel=1e-5)


def test_all_one_category_gives_undefined_kappa_with_reason():
    stats = agreement([("low", "low")] * 12, JUDGEMENTS, ordered=True)
    assert stats.kappa is None and stats.kappa_ci is None and stats.weighted_kappa is None
    assert stats.band == "undefined"
    assert any("undefined" in note for note in stats.notes)
    assert stats.percent_agreement == pytest.approx(100.0)
    assert stats.pabak == pytest.approx(1.0)


def test_no_pairs():
    stats = agreement([], JUDGEMENTS)
    assert stats.n == 0 and stats.kappa is None and stats.percent_agreement is None
    assert stats.notes


def test_unknown_category_is_refused():
    with pytest.raises(InputError, match="maybe"):
        agreement([("low", "maybe")], JUDGEMENTS)


def test_interval_is_clipped():
    stats = agreement([("low", "low"), ("high", "high"), ("low", "high")], JUDGEMENTS)
    assert -1.0 <= stats.kappa_ci[0] <= stats.kappa <= stats.kappa_ci[1] <= 1.0


@pytest.mark.parametrize(
    "kappa, band",
    [
        (-0.1, "poor"),
        (0.0, "slight"),
        (0.2, "slight"),
        (0.21, "fair"),
        (0.4, "fair"),
        (0.41, "moderate"),
        (0.6, "moderate"),
        (0.61, "substantial"),
        (0.8, "substantial"),
        (0.81, "almost perfect"),
        (1.0, "almost perfect"),
        (None, "undefined"),
    ],
)
def test_landis_koch_bands(kappa, band):
    # Landis & Koch (1977), Biometrics 33:159-174: <0 poor, 0-.20 slight, .21-.40 fair,
    # .41-.60 moderate, .61-.80 substantial, .81-1 almost perfect.
    assert landis_koch_band(kappa) == band


def test_to_dict_has_the_agreed_keys():
    d = agreement([("low", "high"), ("low", "low")], ordered=True).to_dict()
    for key in (
        "n",
        "pairs",
        "percent_agreement",
        "kappa",
        "kappa_ci",
        "weighted_kappa",
        "pabak",
        "band",
    ):
        assert key in d
    assert d["pairs"] == [["low", "high"], ["low", "low"]]


def test_one_reviewer_constant_gives_kappa_0_with_the_reason_and_no_interval():
    stats = agreement([("low", "low"), ("low", "some_concerns"), ("low", "low")], JUDGEMENTS)
    assert stats.kappa == pytest.approx(0.0)
    assert stats.kappa_ci is None  # a zero-width interval would be misleading
    notes = " ".join(stats.notes)
    assert "kappa is 0 by construction: reviewer A gave one same answer throughout" in notes
    assert "no confidence interval" in notes
