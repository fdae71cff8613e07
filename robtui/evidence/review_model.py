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
L2 = 0.3  # penalty; 0.03-3 tried in `robtui bench learning`: differences within noise there
BLEND = 1.0  # largest weight of the review model's decision value in the blended log-odds
# The weight grows with the question's full-weight examples (quotes, dismissals): n / (n + HALF),
# so a handful of marks cannot overturn the shipped model (tried in `robtui bench learning`).
BLEND_HALF = 10.0
QUOTE_WEIGHT = 2.0  # a quoted sentence counts as this many examples (a deliberate mark)
# A sentence the reviewer already marked for this question (same words) is moved by this much
# log-odds: a dismissed suggestion should not come back first, a quoted one should stay on top.
MEMORY = 4.0
PASSED_OVER = 20  # best-scored sentences a reviewer passed over count as weak negatives ...
PASSED_OVER_WEIGHT = 0.3  # ... with this weight (tried with `robtui bench learning`; no source)


@dataclass(frozen=True)
class LearnedExample:
    """One sentence a reviewer marked: ``key`` is the question's model key (see cues.model_key)."""

    key: str
    text: str
    positive: bool
    weight: float = 1.0  # a sentence merely left unquoted counts less than a dismissed one
    offset: float = 0.0  # the shipped model's log-odds for it, when known: learn the residual


@dataclass
class ReviewModel:
    examples: list[LearnedExample] = field(default_factory=list)
    weights: dict[str, dict[int, float]] = field(default_factory=dict)

    def count(self, key: str) -> int:
        return sum(1 for e in self.examples if e.key == key)

    def blend(self, key: str) -> float:
        """Weight of the review model for ``key``: grows with its quotes and dismissals."""
        n = sum(1 for e in self.examples if e.key == key and e.weight >= 1.0)
        return BLEND * n / (n + BLEND_HALF) if BLEND_HALF > 0 else BLEND

    def logit(self, key: str, texts: Sequence[str]) -> np.ndarray:
        """The review model's contribution to each text's log-odds for ``key`` (0 if untrained)."""
        out = np.zeros(len(texts))
        marked = {_normal(e.text): e.positive for e in self.examples if e.key == key}
        if not marked:
            return out
        w = self.weights.get(key, {})
        blend = self.blend(key)
        for i, text in enumerate(texts):
            feats = hashed_features(text)
            if w and feats:
                out[i] = blend * sum(w.get(j, 0.0) for j in feats) / np.sqrt(len(feats))
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
    """Weighted L2 logistic regression without intercept, with offsets (L-BFGS, scipy)."""
    from scipy.optimize import minimize
    from scipy.sparse import csr_matrix

    rows = [sorted(hashed_features(e.text)) for e in examples]
    columns = sorted({j for r in rows for j in r})
    if not columns or len({e.positive for e in examples}) < 2:
        return {}
    col = {j: c for c, j in enumerate(columns)}
    data, indices, indptr = [], [], [0]
    for r in rows:
        indices.extend(col[j] for j in r)
        data.extend([1.0 / np.sqrt(len(r))] * len(r))
        indptr.append(len(indices))
    X = csr_matrix((data, indices, indptr), shape=(len(rows), len(columns)))
    y = np.array([1.0 if e.positive else 0.0 for e in examples])
    sw = np.array([e.weight for e in examples])
    offset = np.array([e.offset for e in examples])

    def loss(w):
        z = X @ w + offset
        value = np.sum(sw * (np.logaddexp(0, z) - y * z)) + 0.5 * L2 * w @ w
        grad = X.T @ (sw * (1 / (1 + np.exp(-z)) - y)) + L2 * w
        return value, grad

    result = minimize(loss, np.zeros(len(columns)), jac=True, method="L-BFGS-B",
                      options={"maxiter": 500})
    w = result.x
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
            if isinstance(item, LearnedExample):
                example = LearnedExample(item.key, item.text, positive, item.weight, item.offset)
            else:
                example = LearnedExample(item[0], item[1], positive)
            if example.text.strip():
                merged[(example.key, example.text)] = example
    examples = list(merged.values())
    by_key: dict[str, list[LearnedExample]] = {}
    for e in examples:
        by_key.setdefault(e.key, []).append(e)
    weights = {key: w for key, items in sorted(by_key.items()) if (w := _fit(items))}
    return ReviewModel(examples, weights)


def examples_from_assessment(assessment, documents: Mapping[str, object], ranker=None):
    """Examples from one assessment: quotes (positives), dismissed suggestions (negatives).

    ``documents`` maps a document's sha256 to its Document. With ``ranker`` (the shipped one)
    each example carries the shipped model's log-odds as offset, so the review model learns
    what the shipped model gets wrong; and, for a question with quotes, the document's
    best-scored sentences the reviewer neither quoted nor dismissed are added as weak
    negatives (weight PASSED_OVER_WEIGHT), as ``robtui bench learning`` simulates.
    Returns (positives, negatives) as lists of LearnedExample.
    """
    effect = assessment.effect
    quoted: dict[tuple[str, str], list] = {}
    for qid, answer in assessment.answers.items():
        for quote in answer.quotes:
            quoted.setdefault((quote.document_sha256, qid), []).append(quote)
    dismissed: dict[tuple[str, str], list] = {}
    for d in assessment.dismissed:
        dismissed.setdefault((d.document_sha256, d.question_id), []).append(d)
    positives, negatives = [], []
    for (sha, qid) in sorted(set(quoted) | set(dismissed)):
        key = model_key(qid, effect)
        doc = documents.get(sha)
        base = _shipped_logits(ranker, doc, qid, effect)
        spans_q = [(q.start, q.end, q.text) for q in quoted.get((sha, qid), [])]
        spans_d = [(d.start, d.end, doc.text[d.start : d.end] if doc else "")
                   for d in dismissed.get((sha, qid), [])]
        for spans, out, positive in ((spans_q, positives, True), (spans_d, negatives, False)):
            for start, end, text in spans:
                if text.strip():
                    out.append(LearnedExample(key, text, positive,
                                              QUOTE_WEIGHT if positive else 1.0,
                                              _offset_at(doc, base, start, end)))
        if spans_q and doc is not None and base is not None:
            marked = [(a, b) for a, b, _ in spans_q + spans_d]
            passed = [i for i in np.argsort(-base, kind="stable")
                      if not any(_overlaps(doc.sentences[i], a, b) for a, b in marked)]
            negatives.extend(
                LearnedExample(key, doc.sentences[i].text, False, PASSED_OVER_WEIGHT,
                               float(base[i]))
                for i in passed[:PASSED_OVER]
            )
    return positives, negatives


def _shipped_logits(ranker, doc, qid: str, effect: str) -> np.ndarray | None:
    if ranker is None or doc is None or not doc.sentences:
        return None
    key = model_key(qid, effect)
    text = ranker.weights.question_texts.get(key, "")
    return ranker.logits(ranker.features(doc), [key], [text])[key]


def _overlaps(sentence, start: int, end: int) -> bool:
    return min(sentence.end, end) - max(sentence.start, start) > 0


def _offset_at(doc, base: np.ndarray | None, start: int, end: int) -> float:
    """The shipped log-odds of the sentence that overlaps [start, end) most (0 if unknown)."""
    if doc is None or base is None:
        return 0.0
    best, best_overlap = 0.0, 0
    for i, s in enumerate(doc.sentences):
        overlap = min(s.end, end) - max(s.start, start)
        if overlap > best_overlap:
            best, best_overlap = float(base[i]), overlap
    return best


def load_review_model(folder_learned_dir: Path) -> ReviewModel:
    """The review's model from ``learned/``; an empty model when there is none yet."""
    path = Path(folder_learned_dir) / FILE_NAME
    if not path.exists():
        return ReviewModel()
    try:
        raw = json.loads(path.read_text(encoding="utf-8"))
        if raw.get("schema_version") != SCHEMA_VERSION:
            raise ValueError(f"schema_version {raw.get('schema_version')!r} is not {SCHEMA_VERSION}")
        examples = [LearnedExample(str(e["key"]), str(e["text"]), bool(e["positive"]),
                                   float(e.get("weight", 1.0)), float(e.get("offset", 0.0)))
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
    from robtui.files import write_text_atomic

    path = Path(learned_dir) / FILE_NAME
    payload = {
        "schema_version": SCHEMA_VERSION,
        "about": "examples a review's reviewers marked, and the small ranker learned from them",
        "examples": [{"key": e.key, "text": e.text, "positive": e.positive, "weight": e.weight,
                      "offset": e.offset} for e in model.examples],
        "weights": {k: sorted([j, round(v, 6)] for j, v in w.items())
                    for k, w in sorted(model.weights.items())},
    }
    write_text_atomic(path, json.dumps(payload, indent=2, ensure_ascii=False) + "\n")
    return path


def learn_from_assessment(
    learned_dir: Path, assessment, documents: Mapping[str, object], ranker=None
) -> ReviewModel:
    """Load the review's model, add what ``assessment`` teaches, save it (atomic), return it.

    Call it when a reviewer saves an assessment; a damaged model file raises DataFileError
    and is left untouched.
    """
    from robtui.files import review_lock

    positives, negatives = examples_from_assessment(assessment, documents, ranker)
    Path(learned_dir).mkdir(parents=True, exist_ok=True)
    with review_lock(learned_dir):  # another session's examples are never written over
        model = update_review_model(load_review_model(learned_dir), positives, negatives)
        save_review_model(model, learned_dir)
    return model
