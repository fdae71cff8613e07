"""Agreement between two reviewers on categorical answers (pure; no file I/O, no sklearn).

Statistics, for pairs ``(answer of reviewer A, answer of reviewer B)``:

- percent agreement: share of pairs with the same answer, as a percentage (0-100);
- Cohen's kappa (Cohen 1960, Educ Psychol Meas 20:37-46) with a 95% confidence interval
  ``kappa +/- 1.96 * SE`` where SE is the large-sample (non-null) standard error of
  Fleiss, Cohen & Everitt (1969), Psychol Bull 72:323-327, as given in Fleiss, Levin & Paik,
  Statistical Methods for Rates and Proportions, 3rd ed. (2003), ch. 18; the interval is
  clipped to [-1, 1];
- linearly weighted kappa (Cohen 1968, Psychol Bull 70:213-220) for ordered categories,
  agreement weights ``1 - |i - j| / (k - 1)``;
- PABAK, the prevalence- and bias-adjusted kappa of Byrt, Bishop & Carlin (1993),
  J Clin Epidemiol 46:423-429: ``(k * p_o - 1) / (k - 1)``, which for two categories is
  ``2 * p_o - 1``; ``k`` is the number of declared categories;
- the descriptive bands of Landis & Koch (1977), Biometrics 33:159-174.

Degenerate cases give ``None`` with a reason in ``notes``, never an exception: no pairs at
all, or chance agreement equal to 1 (both reviewers always gave the one same answer), where
kappa is 0/0 and undefined.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

from robtui.core.model import JUDGEMENTS
from robtui.errors import InputError

Z_95 = 1.959963984540054  # standard normal quantile for a two-sided 95% interval

# Landis & Koch (1977), Biometrics 33:159-174, p. 165: upper bound (inclusive) and label.
# Below 0 the label is "poor".
_BANDS: tuple[tuple[float, str], ...] = (
    (0.20, "slight"),
    (0.40, "fair"),
    (0.60, "moderate"),
    (0.80, "substantial"),
    (1.0, "almost perfect"),
)


@dataclass(frozen=True)
class AgreementStats:
    """Agreement figures for one set of pairs; ``None`` where a figure is undefined."""

    n: int
    pairs: list[tuple[str, str]]
    categories: list[str]
    percent_agreement: float | None
    kappa: float | None
    kappa_se: float | None
    kappa_ci: tuple[float, float] | None
    weighted_kappa: float | None
    pabak: float | None
    band: str
    notes: list[str] = field(default_factory=list)

    def to_dict(self) -> dict:
        """The JSON shape of ``robtui agreement --json`` for one domain or question."""
        return {
            "n": self.n,
            "pairs": [list(p) for p in self.pairs],
            "percent_agreement": _round(self.percent_agreement),
            "kappa": _round(self.kappa),
            "kappa_ci": [_round(v) for v in self.kappa_ci] if self.kappa_ci else None,
            "weighted_kappa": _round(self.weighted_kappa),
            "pabak": _round(self.pabak),
            "band": self.band,
            "kappa_se": _round(self.kappa_se),
            "categories": list(self.categories),
            "notes": list(self.notes),
        }


def _round(value: float | None) -> float | None:
    return None if value is None else round(value, 6)


def landis_koch_band(kappa: float | None) -> str:
    """Landis & Koch (1977) label: poor (< 0), slight, fair, moderate, substantial, almost
    perfect; "undefined" when kappa is None."""
    if kappa is None or math.isnan(kappa):
        return "undefined"
    if kappa < 0:
        return "poor"
    for upper, label in _BANDS:
        if kappa <= upper + 1e-12:
            return label
    return "almost perfect"


def _resolve_categories(
    pairs: Sequence[tuple[str, str]], categories: Sequence[str] | None
) -> list[str]:
    seen = {v for pair in pairs for v in pair}
    if categories is None:
        if seen <= set(JUDGEMENTS):
            return list(JUDGEMENTS)  # judgements have a natural order
        return sorted(seen)
    cats = list(dict.fromkeys(categories))
    unknown = sorted(seen - set(cats))
    if unknown:
        raise InputError(
            f"answers {', '.join(unknown)} are not among the categories {', '.join(cats)}; "
            "pass every category the reviewers could use"
        )
    return cats


def _table(pairs: Sequence[tuple[str, str]], cats: list[str]) -> list[list[float]]:
    """Proportions p[i][j]: reviewer A answered cats[i], reviewer B cats[j]."""
    index = {c: i for i, c in enumerate(cats)}
    k = len(cats)
    table = [[0.0] * k for _ in range(k)]
    share = 1.0 / len(pairs)
    for a, b in pairs:
        table[index[a]][index[b]] += share
    return table


def _kappa_and_se(p: list[list[float]], n: int) -> tuple[float | None, float | None, str | None]:
    k = len(p)
    rows = [sum(p[i]) for i in range(k)]
    cols = [sum(p[i][j] for i in range(k)) for j in range(k)]
    p_o = sum(p[i][i] for i in range(k))
    p_e = sum(rows[i] * cols[i] for i in range(k))
    if 1.0 - p_e <= 1e-12:
        return (
            None,
            None,
            (
                "kappa undefined: both reviewers gave one same answer throughout, so chance "
                "agreement is 1 (percent agreement and PABAK still apply)"
            ),
        )
    kappa = (p_o - p_e) / (1.0 - p_e)
    # Fleiss, Cohen & Everitt (1969) large-sample variance of kappa.
    a_term = sum(p[i][i] * (1.0 - (rows[i] + cols[i]) * (1.0 - kappa)) ** 2 for i in range(k))
    b_term = (1.0 - kappa) ** 2 * sum(
        p[i][j] * (cols[i] + rows[j]) ** 2 for i in range(k) for j in range(k) if i != j
    )
    c_term = (kappa - p_e * (1.0 - kappa)) ** 2
    variance = (a_term + b_term - c_term) / (n * (1.0 - p_e) ** 2)
    se = math.sqrt(max(variance, 0.0))
    return kappa, se, None


def _weighted_kappa(p: list[list[float]]) -> float | None:
    k = len(p)
    if k < 2:
        return None
    rows = [sum(p[i]) for i in range(k)]
    cols = [sum(p[i][j] for i in range(k)) for j in range(k)]
    weight = [[1.0 - abs(i - j) / (k - 1) for j in range(k)] for i in range(k)]
    p_o = sum(weight[i][j] * p[i][j] for i in range(k) for j in range(k))
    p_e = sum(weight[i][j] * rows[i] * cols[j] for i in range(k) for j in range(k))
    if 1.0 - p_e <= 1e-12:
        return None
    return (p_o - p_e) / (1.0 - p_e)


def agreement(
    pairs: Sequence[tuple[str, str]],
    categories: Sequence[str] | None = None,
    *,
    ordered: bool = False,
) -> AgreementStats:
    """Agreement statistics for ``pairs`` of answers (A, B).

    ``categories`` lists every answer the reviewers could give, in order when ``ordered``
    (weighted kappa is then computed, and PABAK's k is their number). When omitted, the
    judgement codes low < some_concerns < high are used if the pairs hold only those, else
    the sorted set of answers seen. Answers outside ``categories`` raise InputError.
    """
    pairs = [(str(a), str(b)) for a, b in pairs]
    cats = _resolve_categories(pairs, categories)
    n = len(pairs)
    notes: list[str] = []
    if n == 0:
        notes.append("no pairs: nothing to compare yet")
        return AgreementStats(0, [], cats, None, None, None, None, None, None, "undefined", notes)
    p = _table(pairs, cats)
    p_o = sum(p[i][i] for i in range(len(cats)))
    kappa, se, why = _kappa_and_se(p, n)
    if why:
        notes.append(why)
    ci = None
    if kappa is not None and se is not None and se >= 1e-6:
        ci = (max(-1.0, kappa - Z_95 * se), min(1.0, kappa + Z_95 * se))
    weighted = None
    if ordered:
        weighted = _weighted_kappa(p)
        if weighted is None:
            notes.append("weighted kappa undefined: chance agreement is 1")
    k = len(cats)
    pabak = (k * p_o - 1.0) / (k - 1.0) if k >= 2 else None
    if k < 2:
        notes.append("PABAK needs at least two categories")
    constant = [
        name
        for name, side in (("reviewer A", 0), ("reviewer B", 1))
        if len({pair[side] for pair in pairs}) == 1
    ]
    if kappa is not None and len(constant) == 1:
        notes.append(
            f"kappa is 0 by construction: {constant[0]} gave one same answer throughout, so "
            "chance agreement equals observed agreement whatever it is; read percent agreement "
            "and PABAK"
        )
    if se is not None and se < 1e-6:
        notes.append(
            "no confidence interval: the large-sample standard error is 0 here (perfect or "
            "degenerate agreement), and a zero-width interval would say nothing about sampling "
            "uncertainty"
        )
    if n < 10 and kappa is not None:
        notes.append(f"only {n} pairs: the interval is a rough large-sample approximation")
    return AgreementStats(
        n=n,
        pairs=pairs,
        categories=cats,
        percent_agreement=100.0 * p_o,
        kappa=kappa,
        kappa_se=se,
        kappa_ci=ci,
        weighted_kappa=weighted,
        pabak=pabak,
        band=landis_koch_band(kappa),
        notes=notes,
    )
