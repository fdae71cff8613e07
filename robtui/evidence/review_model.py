"""The review's own small ranker, learned from what its reviewers do.

Quotes a reviewer attaches to an answer are positives for that question; suggestions a
reviewer dismisses are negatives. Per question key, an L2-regularised logistic regression
without intercept over hashed word uni- and bigrams (binary, l2-normalised) is refitted from
all examples at each update. Its decision value is added to the shipped model's calibrated
log-odds, so a question with no examples is ranked by the shipped model alone, and words the
shipped vocabulary never saw (a review's own drug names, registries) can still count.

Stored as ``<review>/learned/evidence-review-model.json`` (examples and weights, atomic
write). A damaged file raises DataFileError and is never replaced.
"""

from __future__ import annotations

import json
import zlib
from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from robtui.errors import DataFileError
from robtui.evidence.cues import model_key
from robtui.evidence.tfidf import word_ngrams

FILE_NAME = "evidence-review-model.json"
SCHEMA_VERSION = 1
HASH_BITS = 18
L2 = 0.3  # penalty of the review model; chosen with `robtui bench learning` (simulated review)
BLEND = 1.0  # weight of the review model's decision value in the blended log-odds
# A sentence the reviewer already marked for this question (same words) is moved by this much
# log-odds: a dismissed suggestion should not come back first, a quoted one should stay on top.
MEMORY = 4.0


@dataclass(frozen=True)
class LearnedExample:
    """One sentence a reviewer marked: ``key`` is the question's model key (see cues.model_key)."""

    key: str
    text: str
    positive: bool


@dataclass
class ReviewModel:
    examples: list[LearnedExample] = field(default_factory=list)
    weights: dict[str, dict[int, float]] = field(default_factory=dict)

    def count(self, key: str) -> int:
        return sum(1 for e in self.examples if e.key == key)

    def logit(self, key: str, texts: Sequence[str]) -> np.ndarray:
        """The review model's contribution to each text's log-odds for ``key`` (0 if untrained)."""
        out = np.zeros(len(texts))
        marked = {_normal(e.text): e.positive for e in self.examples if e.key == key}
        if not marked:
            return out
        w = self.weights.get(key, {})
        for i, text in enumerate(texts):
            feats = hashed_features(text)
            if w and feats:
                out[i] = BLEND * sum(w.get(j, 0.0) for j in feats) / np.sqrt(len(feats))
            seen = marked.get(_normal(text))
            if seen is not None:
                out[i] += MEMORY if seen else -MEMORY
        return out


def _normal(text: str) -> str:
    return " ".join(word_ngrams(text, (1, 1)))


def hashed_features(text: str) -> set[int]:
    """Hashed (CRC-32) word uni- and bigrams of ``text``: stable across runs and machines."""
    return {zlib.crc32(g.encode("utf-8")) & ((1 << HASH_BITS) - 1)
            for g in word_ngrams(text, (1, 2))}


def _fit(examples: list[LearnedExample]) -> dict[int, float]:
    """L2 logistic regression without intercept by Newton steps on the used columns only."""
    rows = [sorted(hashed_features(e.text)) for e in examples]
    columns = sorted({j for r in rows for j in r})
    if not columns or len({e.positive for e in examples}) < 2:
        return {}
    col = {j: c for c, j in enumerate(columns)}
    X = np.zeros((len(rows), len(columns)))
    for i, r in enumerate(rows):
        if r:
            X[i, [col[j] for j in r]] = 1.0 / np.sqrt(len(r))
    y = np.array([1.0 if e.positive else 0.0 for e in examples])
    w = np.zeros(len(columns))
    for _ in range(30):
        p = 1.0 / (1.0 + np.exp(-(X @ w)))
        grad = X.T @ (p - y) + L2 * w
        # Newton step through the n-by-n system (Woodbury): few examples, many words.
        A = X * np.sqrt(p * (1 - p))[:, None]
        inner = np.linalg.solve(L2 * np.eye(len(rows)) + A @ A.T, A @ grad)
        step = (grad - A.T @ inner) / L2
        w -= step
        if np.max(np.abs(step)) < 1e-6:
            break
    return {j: float(w[col[j]]) for j in columns if abs(w[col[j]]) > 1e-9}


def update_review_model(
    model: ReviewModel | None,
    positives: Iterable[LearnedExample | tuple[str, str]],
    negatives: Iterable[LearnedExample | tuple[str, str]],
) -> ReviewModel:
    """A new model with these examples added (latest label of a repeated text wins), refitted.

    Examples may be LearnedExample or (key, text) pairs; keys as from cues.model_key.
    """
    merged: dict[tuple[str, str], LearnedExample] = {}
    for e in model.examples if model else ():
        merged[(e.key, e.text)] = e
    for items, positive in ((positives, True), (negatives, False)):
        for item in items:
            key, text = (item.key, item.text) if isinstance(item, LearnedExample) else item
            if text.strip():
                merged[(key, text)] = LearnedExample(key, text, positive)
    examples = list(merged.values())
    by_key: dict[str, list[LearnedExample]] = {}
    for e in examples:
        by_key.setdefault(e.key, []).append(e)
    weights = {key: w for key, items in sorted(by_key.items()) if (w := _fit(items))}
    return ReviewModel(examples, weights)


def examples_from_assessment(assessment, documents: Mapping[str, object]):
    """Positives from an assessment's quotes, negatives from its dismissed suggestions.

    ``documents`` maps a document's sha256 to its Document (for the text of dismissed spans).
    Returns (positives, negatives) as lists of LearnedExample.
    """
    effect = assessment.effect
    positives = [
        LearnedExample(model_key(qid, effect), quote.text, True)
        for qid, answer in assessment.answers.items()
        for quote in answer.quotes
    ]
    negatives = []
    for d in assessment.dismissed:
        doc = documents.get(d.document_sha256)
        if doc is not None and d.end <= len(doc.text):
            negatives.append(LearnedExample(model_key(d.question_id, effect),
                                            doc.text[d.start : d.end], False))
    return positives, negatives


def load_review_model(folder_learned_dir: Path) -> ReviewModel:
    """The review's model from ``learned/``; an empty model when there is none yet."""
    path = Path(folder_learned_dir) / FILE_NAME
    if not path.exists():
        return ReviewModel()
    try:
        raw = json.loads(path.read_text(encoding="utf-8"))
        if raw.get("schema_version") != SCHEMA_VERSION:
            raise ValueError(f"schema_version {raw.get('schema_version')!r} is not {SCHEMA_VERSION}")
        examples = [LearnedExample(str(e["key"]), str(e["text"]), bool(e["positive"]))
                    for e in raw["examples"]]
        weights = {str(k): {int(j): float(v) for j, v in pairs} for k, pairs in raw["weights"].items()}
    except (OSError, ValueError, KeyError, TypeError) as error:
        raise DataFileError(
            f"{path}: the review's learned ranker cannot be read ({error}); it was left as it "
            "is: move it aside to start learning afresh"
        ) from error
    return ReviewModel(examples, weights)


def save_review_model(model: ReviewModel, learned_dir: Path) -> Path:
    """Write the model atomically to ``learned_dir``; returns the file written."""
    from robtui.store.atomic import write_text_atomic

    path = Path(learned_dir) / FILE_NAME
    payload = {
        "schema_version": SCHEMA_VERSION,
        "about": "examples a review's reviewers marked, and the small ranker learned from them",
        "examples": [{"key": e.key, "text": e.text, "positive": e.positive} for e in model.examples],
        "weights": {k: sorted([j, round(v, 6)] for j, v in w.items())
                    for k, w in sorted(model.weights.items())},
    }
    write_text_atomic(path, json.dumps(payload, indent=2, ensure_ascii=False) + "\n")
    return path
