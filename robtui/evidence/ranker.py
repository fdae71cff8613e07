"""Rank a document's sentences for every signalling question with the shipped linear models.

Questions with a trained model (those the corpus mapping covers) use their own weights over
word and character TF-IDF, layout and question features. Questions without training data use
one transfer model, trained on the mapped questions, over question-relative features only (cue
lexicon coverage, similarity to the question's wording, expected section): its scores are
calibrated on the mapped questions, not on the question itself.
Scores are calibrated (Platt scaling on grouped out-of-fold scores), so a best score below
``no_evidence_threshold`` is read as "no sentence found for this question".
"""

from __future__ import annotations

import re
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from robtui.errors import InputError
from robtui.evidence.adjustment import Adjustment, load_adjustment
from robtui.evidence.cues import CueEntry, CueMatcher, load_cues, model_key, tokens
from robtui.evidence.features import (
    QUESTION_NAMES,
    REGISTRY_ID,
    SHARED_NAMES,
    DocumentFeatures,
    document_features,
    lexical_text,
    question_feature_blocks,
    stacked_features,
)
from robtui.evidence.model import RankerWeights, load_weights
from robtui.evidence.sentence_kinds import NOT_EVIDENCE
from robtui.reading.document import CELL_BLOCKS, Document, top_section


@dataclass(frozen=True)
class Suggestion:
    question_id: str
    sentence_index: int
    start: int
    end: int
    page: int | None
    section: str
    score: float  # calibrated, 0..1
    text: str


# Reading order (spread over the report): each of the first SPREAD_SLOTS places after the first
# goes to the best sentence of a section not yet shown, when its log-odds are within
# SPREAD_MARGIN of the best remaining sentence, among the SPREAD_POOL best. Chosen by grouped
# 5-fold CV on two partitions of the development articles (docs/evidence-ranker.md); the idea is
# diversity-based reranking (Carbonell and Goldstein, SIGIR 1998, "maximal marginal relevance").
SPREAD_MARGIN = 1.5
SPREAD_SLOTS = 5
SPREAD_POOL = 50


def reading_order(log_odds: np.ndarray, sections: Sequence[str],
                  headings: Sequence[bool] | None = None, *, margin: float = SPREAD_MARGIN,
                  slots: int = SPREAD_SLOTS, pool: int = SPREAD_POOL) -> np.ndarray:
    """Sentence indices, best first, with the first ``slots`` places spread over sections.

    A sentence of a section not yet shown takes the next place when its log-odds are within
    ``margin`` of the best remaining sentence's; after ``slots`` places the order is by score.
    A heading shown (``headings``) does not count as showing its section: it holds no evidence.
    Sentences at -inf (filtered out) are never moved up.
    """
    order = np.argsort(-log_odds, kind="stable")
    head = [int(i) for i in order[:pool]]
    picked: list[int] = []
    seen: set[str] = set()
    while head and len(picked) < slots:
        best = head[0]
        other = next((i for i in head if sections[i] not in seen), None)
        take = other if other is not None and log_odds[other] >= log_odds[best] - margin else best
        picked.append(take)
        if headings is None or not headings[take]:
            seen.add(sections[take])
        head.remove(take)
    return np.concatenate([np.asarray(picked, dtype=np.int64),
                           np.asarray(head, dtype=np.int64), order[pool:]]).astype(np.int64)


TOPIC_HEADING_MAX_WORDS = 4
QUOTABLE_MIN_WORDS = 3
TAIL_MIN_WORDS = 6
_LETTERS = re.compile(r"[^\W\d_]+")
_WORDS = re.compile(r"[^\W\d_]{3,}")
_CAPTION_WORDS = frozenset({"table", "figure", "fig"})


def _topic_heading(text: str) -> bool:
    """A heading of at most four words, without a digit, that is not a table or figure title
    ("Allocation concealment.", "Masking")."""
    if any(ch.isdigit() for ch in text):
        return False
    words = _LETTERS.findall(text)
    return len(words) <= TOPIC_HEADING_MAX_WORDS and (
        not words or words[0].lower() not in _CAPTION_WORDS)


def _fragment(text: str) -> bool:
    """A piece of a sentence or a cell, no statement: fewer than three words of three letters
    or more and no registry number ("protocol", "registered on 10 January 2008."), or the short
    tail of a sentence that a float or a page cut, starting in lower case ("are shown in
    table 1."; fewer than six such words: chosen by eye, and no gold sentence of the corpus or
    of the real PDFs is such a piece)."""
    words = len(_WORDS.findall(text))
    if words < QUOTABLE_MIN_WORDS and not REGISTRY_ID.search(text):
        return True
    first = text.lstrip()[:1]
    return first.isalpha() and first.islower() and words < TAIL_MIN_WORDS


def suggestible(sentences: Sequence, never: Sequence[str] = ()) -> np.ndarray:
    """Per sentence, whether it may be suggested (for a question whose cue entry's ``never``
    lists kinds of sentence, sentence_kinds.NOT_EVIDENCE). Never suggested:
    - a bare topic heading (:func:`_topic_heading`): it tells where evidence may be but holds
      none a reviewer could quote; the sentences under it are suggested. (In the corpus no such
      heading carries a mapped item; headings that do are titles of tables and figures or hold
      a registry number.)
    - the reference list (top-level section "references"): other studies' titles, never this
      trial's evidence;
    - table cells (block "table") and a figure's text (block "figure": flowchart boxes, chart
      labels): the reader keeps them searchable and quotable, but a row of a table or a box of
      a flowchart is not the sentence that reports what it shows;
    - fragments (:func:`_fragment`);
    - a sentence of a kind in ``never`` (a figure pointer, a sentence that only names the
      statistical program, an analyst's blinding for the questions on awareness).
    If a document has nothing else, every sentence stays suggestible."""
    return SuggestibleMasks(sentences)(never)


class SuggestibleMasks:
    """:func:`suggestible` for the questions of one document: the rules that do not depend on
    the question are applied once, and each kind of sentence is tested once."""

    def __init__(self, sentences: Sequence):
        self.sentences = sentences
        self.base = np.ones(len(sentences), dtype=bool)
        for i, s in enumerate(sentences):
            if s.block == "heading":
                self.base[i] = not _topic_heading(s.text)
            else:
                self.base[i] = not (s.block in CELL_BLOCKS or top_section(s.section) == "references"
                                    or _fragment(s.text))
        self._kinds: dict[str, np.ndarray] = {}

    def __call__(self, never: Sequence[str] = ()) -> np.ndarray:
        keep = self.base.copy()
        for name in never:
            if name not in self._kinds:
                test = NOT_EVIDENCE[name]
                self._kinds[name] = np.array([test(s.text) for s in self.sentences], dtype=bool)
            keep &= ~self._kinds[name]
        return keep if keep.any() else np.ones(len(self.sentences), dtype=bool)


def candidate_order(log_odds: np.ndarray, keep: np.ndarray, sections: Sequence[str],
                    headings: Sequence[bool], *, spread: bool) -> np.ndarray:
    """Indices of the sentences to suggest (``keep``, from :func:`suggestible`), best first:
    by score, or (``spread``) in reading order. Sentences at -inf come last."""
    shown = np.where(keep, log_odds, -np.inf)
    if spread:
        order = reading_order(shown, sections, headings)
    else:
        order = np.argsort(-shown, kind="stable")
    return order[keep[order]]


def layout_of(sentences: Sequence) -> tuple[list[str], list[bool]]:
    """Each sentence's section and whether it is a heading: what reading_order needs."""
    return [s.section for s in sentences], [s.block == "heading" for s in sentences]


def sigmoid(z: np.ndarray) -> np.ndarray:
    return 1.0 / (1.0 + np.exp(-np.clip(z, -40, 40)))


def generic_block(question_block: np.ndarray, shared: np.ndarray) -> np.ndarray:
    """Features of the transfer model (see model.GENERIC_NAMES)."""
    heading = shared[:, SHARED_NAMES.index("block=heading")]
    log_length = shared[:, SHARED_NAMES.index("log_length")]
    return np.column_stack([question_block, heading, log_length])


def active_questions(effect: str = "assignment", question_set=None) -> list[tuple[str, str]]:
    """(id, wording) of every question of ``question_set`` (default: the bundled parallel set)
    as asked for ``effect``."""
    if question_set is None:
        from robtui.store.question_sets import builtin_question_set

        question_set = builtin_question_set()
    question_set.check_effect(effect)  # InputError names the set's effects
    return [(q.id, q.text) for q in question_set.questions(effect)]


class Ranker:
    """Scores sentences per question; build with :func:`load_ranker`."""

    def __init__(self, weights: RankerWeights, cues: dict[str, CueEntry] | None = None,
                 adjustment: Adjustment | None = None, *, warm: bool = True):
        self.weights = weights
        self.adjustment = adjustment  # the second stage learned on real PDFs (adjustment.py)
        self.cues = cues if cues is not None else load_cues()
        self.matcher = CueMatcher(self.cues)
        self.no_evidence_threshold = weights.no_evidence_threshold
        self._row = {key: i for i, key in enumerate(weights.keys)}
        self._n_word = len(weights.word.idf)
        # question and item models share one product with the sentences' TF-IDF rows
        lexical = weights.lexical
        if weights.n_items:
            lexical = np.vstack([lexical, weights.item_lexical])
        self._lexical_t = np.ascontiguousarray(lexical.T, dtype=np.float32)
        self._shared_t = np.ascontiguousarray(
            np.vstack([weights.shared, weights.item_shared]) if weights.n_items else weights.shared
        ).T
        self._question_cache: dict[tuple[str, ...], np.ndarray] = {}
        # Fill the per-word caches now, so the first document is fast (``warm=False`` for a
        # process that ranks one document: it would only pay for the words it does not have).
        if warm and weights.warm_words:
            weights.char.transform([lexical_text(" ".join(weights.warm_words))])
            self.matcher.coverage([tokens(" ".join(weights.warm_words))])

    @property
    def provenance(self) -> dict:
        return self.weights.provenance

    def trained_key(self, key: str) -> str | None:
        """The key whose trained model serves ``key`` (itself or its same_as), if any."""
        if key in self._row:
            return key
        entry = self.cues.get(key)
        if entry and entry.same_as in self._row:
            return entry.same_as
        return None

    def _adjustment_key(self, key: str, pool: Sequence[str]) -> str | None:
        """``key`` or its same_as when it is in ``pool``, else None."""
        if key in pool:
            return key
        entry = self.cues.get(key)
        return entry.same_as if entry and entry.same_as in pool else None

    def adjusted_key(self, key: str, origin: str) -> str | None:
        """The key whose second stage serves ``key`` (itself or its same_as) in a report of
        kind ``origin``, if any: the second stage is used only in the document kinds it was
        fitted on (Adjustment.domains) and for the questions it raised there in
        leave-one-article-out cross-validation (Adjustment.serves)."""
        if self.adjustment is None or not self.adjustment.applies_to(origin):
            return None
        return self._adjustment_key(key, self.adjustment.serves)

    def recalibrated_key(self, key: str, origin: str) -> str | None:
        """The key (itself or its same_as) whose score the second stage's domain calibrates
        in a report of kind ``origin`` (every question it was fitted on, served or not)."""
        if self.adjustment is None or not self.adjustment.applies_to(origin):
            return None
        return self._adjustment_key(key, self.adjustment.keys)

    def never(self, key: str) -> tuple[str, ...]:
        """The kinds of sentence never suggested for ``key`` (its cue entry's ``never``)."""
        entry = self.cues.get(key)
        return entry.never if entry is not None else ()

    def suggestible(self, sentences: Sequence) -> Callable[[str], np.ndarray]:
        """Per key, :func:`suggestible` for its question: the rules shared by every question
        applied once, each kind of sentence tested once."""
        masks = SuggestibleMasks(sentences)
        return lambda key: masks(self.never(key))

    def is_trained(self, question_id: str, effect: str = "assignment") -> bool:
        """True when the question has a model of its own (else the transfer model ranks it)."""
        return self.trained_key(model_key(question_id, effect)) is not None

    def threshold_for(self, question_id: str, effect: str = "assignment", *,
                      origin: str) -> float:
        """The no-evidence threshold of a question in a report of kind ``origin``: in the
        second stage's domain, its cut (fitted on the real PDFs) for the questions it was
        fitted on; else the first stage's (the transfer model has its own)."""
        if self.recalibrated_key(model_key(question_id, effect), origin) is not None:
            return self.adjustment.threshold
        if self.is_trained(question_id, effect):
            return self.no_evidence_threshold
        generic = self.weights.generic_no_evidence_threshold
        return self.no_evidence_threshold if generic is None else generic

    def features(self, document: Document) -> DocumentFeatures:
        w = self.weights
        return document_features(document.sentences, w.word, w.char, self.matcher,
                                 origin=document.kind)

    def _question_vectors(self, texts: list[str]) -> np.ndarray:
        """(n_word, len(texts)) word TF-IDF of the question wordings, cached per wording list."""
        key = tuple(texts)
        cached = self._question_cache.get(key)
        if cached is None:
            rows = self.weights.word.transform([lexical_text(t) for t in texts])
            cached = np.zeros((rows.n_cols, rows.n_rows))
            for r in range(rows.n_rows):
                sl = slice(rows.indptr[r], rows.indptr[r + 1])
                cached[rows.indices[sl], r] = rows.data[sl]
            self._question_cache[key] = cached
        return cached

    def question_blocks(
        self, doc: DocumentFeatures, keys: Sequence[str], texts: Sequence[str]
    ) -> dict[str, np.ndarray]:
        """Per key, the (n, len(QUESTION_NAMES)) question features of every sentence."""
        if doc.n == 0:
            return {key: np.zeros((0, len(QUESTION_NAMES))) for key in keys}
        similarity = doc.word.dot_columns(self._question_vectors(list(texts)))  # (n, keys)
        entries = [self.cues.get(key) for key in keys]
        return question_feature_blocks(doc, keys, entries, self.matcher, similarity)

    def first_stage(
        self, doc: DocumentFeatures, keys: Sequence[str], texts: Sequence[str]
    ) -> dict[str, tuple[np.ndarray, np.ndarray, np.ndarray]]:
        """Per key: the calibrated log-odds of every sentence by the question's own model (the
        transfer model's for a question without one), by the transfer model, and the question
        features both were computed from."""
        w = self.weights
        if doc.n == 0:
            return {key: (np.zeros(0), np.zeros(0), np.zeros((0, len(QUESTION_NAMES))))
                    for key in keys}
        blocks = self.question_blocks(doc, keys, texts)
        trained = {key: self.trained_key(key) for key in keys}
        lexical = {}
        if any(t is not None for t in trained.values()):
            base = (
                doc.word.dot_columns(self._lexical_t[: self._n_word])
                + doc.char.dot_columns(self._lexical_t[self._n_word :])
                + doc.shared @ self._shared_t
            )
            n_keys = len(w.keys)
            if w.n_items:
                stacked = stacked_features(sigmoid(base[:, n_keys:] + w.item_intercept))
                base = base[:, :n_keys] + stacked @ w.stacked.T
            lexical = {row: base[:, row] for row in range(n_keys)}
        out = {}
        ga, gb = w.generic_platt
        for key in keys:
            qf = blocks[key]
            transfer = ga * (generic_block(qf, doc.shared) @ w.generic + w.generic_intercept) + gb
            source = trained[key]
            if source is not None:
                row = self._row[source]
                a, b = w.platt[row]
                own = a * (lexical[row] + qf @ w.question[row] + w.intercept[row]) + b
            else:
                own = transfer
            out[key] = (own, transfer, qf)
        return out

    def logits(
        self, doc: DocumentFeatures, keys: Sequence[str], texts: Sequence[str]
    ) -> dict[str, np.ndarray]:
        """Calibrated log-odds of every sentence for each key (before any review model): the
        first stage's; in the second stage's domain (``doc.origin``), re-weighed by it for the
        questions it serves and recalibrated for its other questions."""
        first = self.first_stage(doc, keys, texts)
        if doc.n == 0:
            return {key: own for key, (own, _, _) in first.items()}
        out = {}
        for key, (own, transfer, qf) in first.items():
            served = self.adjusted_key(key, doc.origin)
            if served is not None:
                out[key] = self.adjustment.log_odds(served, own, transfer, qf, doc.shared,
                                                    doc.signals)
            elif self.recalibrated_key(key, doc.origin) is not None:
                out[key] = self.adjustment.first_stage_log_odds(own)
            else:
                out[key] = own
        return out

    def rank(
        self,
        document: Document,
        questions: Sequence[str] | None = None,
        *,
        effect: str = "assignment",
        top: int | None = 5,
        threshold: float | None = None,
        review_model=None,
        question_set=None,
        spread: bool = False,
    ) -> dict[str, list[Suggestion]]:
        """Suggested sentences per question id, best first (every requested question present).

        ``spread``: in reading order (see :func:`reading_order`) rather than by score alone.
        Bare topic headings are never suggested (see :func:`suggestible`).
        """
        active = active_questions(effect, question_set)
        wording = dict(active)
        if questions is None:
            wanted = [qid for qid, _ in active]
        else:
            unknown = [q for q in questions if q not in wording]
            if unknown:
                raise InputError(
                    f"unknown question id(s) for the {effect} effect: {', '.join(unknown)}; "
                    f"known: {', '.join(wording)}"
                )
            wanted = list(dict.fromkeys(questions))
        if top is not None and top < 1:
            raise InputError(f"top must be at least 1 (got {top})")
        # the set's own key spelling ("adhering:2.3"), so a new set's questions find their cues
        key_of = question_set.question_key if question_set is not None else model_key
        keys = [key_of(q, effect) for q in wanted]
        texts = [self.weights.question_texts.get(k) or wording[q] for k, q in zip(keys, wanted)]
        doc = self.features(document)
        logits = self.logits(doc, keys, texts)
        if review_model is not None and doc.n:
            sentence_texts = [s.text for s in document.sentences]
            for key in keys:
                logits[key] = logits[key] + review_model.logit(key, sentence_texts)
        result: dict[str, list[Suggestion]] = {}
        sections, headings = layout_of(document.sentences)
        suggestible_for = self.suggestible(document.sentences)
        for qid, key in zip(wanted, keys):
            keep = suggestible_for(key)
            scores = sigmoid(logits[key])
            shown = logits[key] if threshold is None else np.where(
                scores >= threshold, logits[key], -np.inf)
            order = candidate_order(shown, keep, sections, headings, spread=spread)
            picked = []
            for i in order:
                if threshold is not None and scores[i] < threshold:
                    break
                s = document.sentences[int(i)]
                picked.append(
                    Suggestion(qid, s.index, s.start, s.end, s.page, s.section,
                               round(float(scores[i]), 4), s.text)
                )
                if top is not None and len(picked) >= top:
                    break
            result[qid] = picked
        return result


def load_ranker(path: Path | None = None, adjustment: Path | None = None, *,
                first_stage_only: bool = False, warm: bool = True) -> Ranker:
    """The ranker with the shipped weights (or those at ``path``) and second stage (or the one
    at ``adjustment``; none with ``first_stage_only``); ModelFileError if unusable. ``warm``:
    see :class:`Ranker` (the same suggestions either way, only sooner or later)."""
    ranker = Ranker(load_weights(path),
                    adjustment=None if first_stage_only else load_adjustment(adjustment),
                    warm=warm)
    active_questions("assignment")  # reads (and caches) the question set now, not when ranking
    return ranker
