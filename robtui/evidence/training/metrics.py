"""Ranking figures: recall@k, mean reciprocal rank, sentences read before the first hit, AUROC."""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np


def first_hit_rank(scores: np.ndarray, labels: np.ndarray,
                   order: np.ndarray | None = None) -> int | None:
    """1-based rank of the first positive sentence in ``order`` (default: by score, stable on
    ties); None if there is none."""
    if not labels.any():
        return None
    if order is None:
        order = np.argsort(-scores, kind="stable")
    hits = np.nonzero(labels[order])[0]  # none when the order leaves every positive out
    return int(hits[0]) + 1 if len(hits) else None


def auroc(scores: Sequence[float], positive: Sequence[bool]) -> float | None:
    """Area under the ROC curve (Mann-Whitney U with mid-ranks for ties); None if one class."""
    s = np.asarray(scores, dtype=float)
    y = np.asarray(positive, dtype=bool)
    n_pos, n_neg = int(y.sum()), int((~y).sum())
    if n_pos == 0 or n_neg == 0:
        return None
    order = np.argsort(s, kind="mergesort")
    ranks = np.empty(len(s))
    sorted_s = s[order]
    i = 0
    while i < len(s):
        j = i
        while j + 1 < len(s) and sorted_s[j + 1] == sorted_s[i]:
            j += 1
        ranks[order[i : j + 1]] = (i + j) / 2 + 1
        i = j + 1
    return float((ranks[y].sum() - n_pos * (n_pos + 1) / 2) / (n_pos * n_neg))


@dataclass
class QuestionFigures:
    n: int  # articles with gold evidence
    recall1: float
    recall3: float
    recall5: float
    mrr: float
    read_before: float  # mean sentences read before the first hit (all sentences when no hit)
    auroc: float | None  # evidence present vs absent, from the top score

    @classmethod
    def from_ranks(
        cls, ranks: Sequence[int | None], lengths: Sequence[int], top_scores: Sequence[float],
        present: Sequence[bool],
    ) -> QuestionFigures:
        scored = [(r, n) for r, n, p in zip(ranks, lengths, present) if p]
        n = len(scored)
        if n == 0:
            return cls(0, float("nan"), float("nan"), float("nan"), float("nan"), float("nan"),
                       auroc(top_scores, present))

        def recall(k: int) -> float:
            return sum(1 for r, _ in scored if r is not None and r <= k) / n

        return cls(
            n,
            recall(1),
            recall(3),
            recall(5),
            sum(1.0 / r for r, _ in scored if r is not None) / n,
            float(np.mean([(r - 1) if r is not None else m for r, m in scored])),
            auroc(top_scores, present),
        )


def macro(figures: dict[str, QuestionFigures], attribute: str) -> float:
    values = [getattr(f, attribute) for f in figures.values() if f.n and getattr(f, attribute) is not None]
    return float(np.mean(values)) if values else float("nan")
