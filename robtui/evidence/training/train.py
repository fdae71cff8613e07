"""Train the shipped evidence ranker from the development corpus (scikit-learn, fixed seeds).

    python -m robtui.evidence.training.train [--corpus PATH] [--out FILE] [--folds 5] [--articles N]
    robtui train-ranker ...   (the same)

Articles are read with robtui's own text reader (what the ranker sees in use) and labelled by
the question-to-item mapping. Settings (regularisation C, class weighting) are chosen by
cross-validation grouped by article (GroupKFold; macro recall@1, then MRR). Scores are
calibrated by Platt scaling fitted on out-of-fold scores (grouped too), and the
"no evidence" threshold is the top-score cut that best separates articles with and without
gold evidence out of fold (Youden's J). Everything is deterministic: liblinear with a fixed
random_state, GroupKFold over articles sorted by id; rerunning gives identical weights.
Corpus: Kilicoglu H, Rosemblat G, Hoang L, et al. Toward assessing clinical trial publications
for reporting transparency. J Biomed Inform 2021;116:103717.
"""

from __future__ import annotations

import argparse
import datetime as dt
import platform
import sys
from collections.abc import Sequence
from dataclasses import asdict, dataclass, field
from functools import cached_property
from pathlib import Path

import numpy as np

from robtui.evidence.features import QUESTION_NAMES, SHARED_NAMES, lexical_text
from robtui.evidence.model import DEFAULT_WEIGHTS, GENERIC_NAMES, RankerWeights, save_weights
from robtui.evidence.ranker import (
    Ranker,
    active_questions,
    generic_block,
    sigmoid,
)
from robtui.evidence.sentence_kinds import is_pointer, is_software_statement
from robtui.evidence.tfidf import TfidfTable
from robtui.evidence.training.corpus_docs import LabelledDocument
from robtui.evidence.training.metrics import QuestionFigures, first_hit_rank, macro

CITATION = (
    "Kilicoglu H, Rosemblat G, Hoang L, Wadhwa S, Peng Z, Malicki M, Schneider J, ter Riet G. "
    "Toward assessing clinical trial publications for reporting transparency. "
    "J Biomed Inform 2021;116:103717."
)
SEED = 20210401


@dataclass(frozen=True)
class Settings:
    C: float = 1.0
    class_weight: str | None = "balanced"
    word_ngrams: tuple[int, int] = (1, 2)
    char_ngrams: tuple[int, int] = (3, 5)
    word_max_features: int = 20000
    char_max_features: int = 30000
    word_min_df: int = 2
    char_min_df: int = 3
    calibration_folds: int = 3
    seed: int = SEED
    # Stacking: per-item models (C=item_C, balanced), scored out of fold on the training
    # articles (item_folds, grouped), feed each question's model the scores of its own RoB 2
    # domain's items ("domain"), or nothing ("none").
    stacking: str = "domain"
    item_C: float = 1.0
    item_folds: int = 3
    # Ranking objective: each question's pointwise coefficients plus those of a pairwise
    # logistic regression on (positive - negative) differences within an article, against
    # the pointwise model's pair_hard best-scored negatives and pair_random others.
    pairwise: bool = True
    pair_C: float = 1.0
    pair_hard: int = 30
    pair_random: int = 30
    # Feature block scales for the questions' models: a column multiplied by s is penalised
    # 1/s**2 as much by the L2 term, so a few dense, informative features (cue coverage,
    # stacked item scores) need not compete on equal terms with tens of thousands of n-grams.
    # Training only: the stored coefficients are on the unscaled features.
    # 0.5 chosen by grouped 5-fold CV on two partitions of the articles (docs/evidence-ranker.md).
    scale_shared: float = 0.5
    scale_question: float = 0.5
    scale_stacked: float = 0.5
    # Reader faults: this share of the training articles (drawn with the seed) is seen as a
    # reader that found no structure gives it (reader_faults.without_sections), so the wording
    # has to carry the evidence when a real PDF's sections are lost. 0.25: the one value tried
    # (grouped CV on the corpus, two partitions; bench real-pdfs; docs/evidence-ranker.md).
    section_dropout: float = 0.25
    # The corpus annotates no methods item in abstracts (abstract sentences carry 1b, 23, 25,
    # 3a, 4b, 8b only): "Analysis was by intention to treat." in an abstract is unannotated, not
    # a counter-example. True: a question's (or item's) abstract sentences are left out of its
    # training rows when its positives are rarer there than ABSTRACT_RATE_SHARE of its rate
    # elsewhere; they are still ranked and scored.
    abstract_unlabelled: bool = False
    # A sentence that only points to a figure (sentence_kinds.is_pointer: "Figure 1 Trial profile",
    # "Figure 1 shows the trial profile.") names where the numbers are, one that only names the
    # statistical program (sentence_kinds.is_software_statement: "Analyses were done with Stata
    # 10.1.") what computed them: the corpus annotates the first with the items the figure
    # reports (13a, 13b, 16), the second as a statistical method (12a); a reviewer quotes the
    # prose that gives the numbers or the analysis. "below_prose": such a sentence is taught
    # as a counter-example wherever its article has another sentence annotated for the
    # question (or item), and kept as annotated where it is the article's only one;
    # "labelled": as annotated. Training only: evaluation keeps the corpus's labels. Table
    # titles stay as annotated: taught below the prose too, the corpus's 1.3 (baseline table)
    # fell (docs/evidence-ranker.md).
    pointers: str = "below_prose"


POINTERS_NOTE = ("sentences that only point to a figure or only name the statistical program "
                 "(sentence_kinds.is_pointer, is_software_statement) taught as "
                 "counter-examples where their article has another sentence annotated for the "
                 "question or item")

# Our rule, no source: an item annotated in abstracts at under a tenth of its rate in the rest
# of the article is taken as not annotated there (8b: one abstract sentence in the corpus).
ABSTRACT_RATE_SHARE = 0.1

GRID: tuple[dict, ...] = tuple(
    {"C": c, "class_weight": cw} for cw in ("balanced", None) for c in (0.3, 1.0, 3.0, 10.0)
)


@dataclass
class Prepared:
    """Feature matrices of a set of documents under one fitted vocabulary."""

    space: Ranker
    keys: list[str]
    X: dict[str, object]  # key -> scipy CSR over all sentences of all documents
    y: dict[str, np.ndarray]
    generic_X: dict[str, np.ndarray]
    groups: np.ndarray  # document number of each row
    docs: list[LabelledDocument] = field(default_factory=list)
    abstract: np.ndarray | None = None  # per row: the reader put the sentence in the abstract
    pointer: np.ndarray | None = None  # per row: a pointer (Settings.pointers)

    @cached_property
    def _suggestible(self) -> list:
        return [self.space.suggestible(d.document.sentences) for d in self.docs]

    def suggestible(self, number: int, key: str) -> np.ndarray:
        """The sentences of document ``number`` that `suggest` may show for ``key``
        (Ranker.suggestible)."""
        return self._suggestible[number](key)


def fit_tables(texts: list[str], settings: Settings) -> tuple[TfidfTable, TfidfTable]:
    """Fit word and char_wb TF-IDF vocabularies with scikit-learn."""
    from sklearn.feature_extraction.text import TfidfVectorizer

    tables = []
    for analyzer, ngrams, max_features, min_df in (
        ("word", settings.word_ngrams, settings.word_max_features, settings.word_min_df),
        ("char_wb", settings.char_ngrams, settings.char_max_features, settings.char_min_df),
    ):
        vec = TfidfVectorizer(analyzer=analyzer, ngram_range=ngrams, max_features=max_features,
                              min_df=min_df, sublinear_tf=True, dtype=np.float64)
        vec.fit(texts)
        vocab = {term: int(i) for term, i in vec.vocabulary_.items()}
        tables.append(TfidfTable(analyzer, ngrams, vocab, vec.idf_.astype(np.float64)))
    return tables[0], tables[1]


def question_texts() -> dict[str, str]:
    """Wording of every question of both effects, keyed like the cue lexicon."""
    from robtui.evidence.cues import model_key

    texts = {}
    for effect in ("assignment", "adhering"):
        for qid, text in active_questions(effect):
            texts.setdefault(model_key(qid, effect), text)
    return texts


def empty_space(word: TfidfTable, char: TfidfTable, texts: dict[str, str]) -> Ranker:
    """A ranker with fitted vocabularies and no coefficients: the feature extractor."""
    n_lex = len(word.idf) + len(char.idf)
    weights = RankerWeights(
        word=word, char=char, keys=[], lexical=np.zeros((0, n_lex)),
        shared=np.zeros((0, len(SHARED_NAMES))), question=np.zeros((0, len(QUESTION_NAMES))),
        intercept=np.zeros(0), platt=np.zeros((0, 2)), generic=np.zeros(len(GENERIC_NAMES)),
        generic_intercept=0.0, generic_platt=np.array([1.0, 0.0]), no_evidence_threshold=0.5,
        question_texts=texts,
    )
    return Ranker(weights)


def prepare(
    docs: list[LabelledDocument], keys: list[str], settings: Settings, texts: dict[str, str],
    space: Ranker | None = None, *, training: bool = True,
) -> Prepared:
    """Fit vocabularies on ``docs`` (unless ``space`` is given) and build the design matrices.
    ``training``: apply the settings' simulated reader faults (never to evaluation articles)."""
    from scipy.sparse import csr_matrix, hstack

    from robtui.evidence.training.reader_faults import faulty_documents
    from robtui.reading.document import top_section

    if space is None:
        texts_seen = [lexical_text(s.text) for d in docs for s in d.document.sentences]
        word, char = fit_tables(texts_seen, settings)
        space = empty_space(word, char, texts)
    parts: dict[str, list] = {k: [] for k in keys}
    generic_parts: dict[str, list] = {k: [] for k in keys}
    groups = []
    abstract: list[bool] = []
    pointer: list[bool] = []
    seen = faulty_documents([d.document for d in docs],
                            settings.section_dropout if training else 0.0, settings.seed)
    for number, (doc, document) in enumerate(zip(docs, seen)):
        feats = space.features(document)
        blocks = space.question_blocks(feats, keys, [texts.get(k, "") for k in keys])
        lexical = hstack([feats.word.to_scipy(), feats.char.to_scipy()]).tocsr()
        for key in keys:
            parts[key].append(hstack([lexical, csr_matrix(feats.shared),
                                      csr_matrix(blocks[key])]).tocsr())
            generic_parts[key].append(generic_block(blocks[key], feats.shared))
        groups.extend([number] * feats.n)
        abstract.extend(top_section(s.section) == "abstract" for s in doc.document.sentences)
        pointer.extend(is_pointer(s.text) or is_software_statement(s.text)
                       for s in doc.document.sentences)
    from scipy.sparse import vstack

    X = {k: vstack(parts[k]).tocsr() for k in keys}
    y = {k: np.concatenate([d.labels[k] for d in docs]).astype(int) for k in keys}
    pointers = np.asarray(pointer, dtype=bool)
    if training:
        y = {k: training_labels(v, pointers, np.asarray(groups), settings) for k, v in y.items()}
    generic_X = {k: np.vstack(generic_parts[k]) for k in keys}
    return Prepared(space, keys, X, y, generic_X, np.asarray(groups), docs,
                    np.asarray(abstract, dtype=bool), pointers)


def training_labels(y: np.ndarray, pointer: np.ndarray | None, groups: np.ndarray,
                    settings: Settings) -> np.ndarray:
    """``y`` (0/1 per row; ``groups``: each row's article) as training reads it: with
    Settings.pointers "below_prose", a ``pointer`` row is 0 where its article has another
    positive."""
    if settings.pointers == "labelled" or pointer is None:
        return y
    if settings.pointers != "below_prose":
        raise ValueError(f"unknown pointers {settings.pointers!r}: use below_prose or labelled")
    out = y.copy()
    for g in np.unique(groups[(y > 0) & pointer]):
        rows = groups == g
        if (y[rows] > 0)[~pointer[rows]].any():
            out[rows & pointer] = 0
    return out


def labelled_rows(y: np.ndarray, abstract: np.ndarray | None, settings: Settings) -> np.ndarray | None:
    """Rows whose label the corpus vouches for (see Settings.abstract_unlabelled); None: all."""
    if not settings.abstract_unlabelled or abstract is None or not abstract.any() or abstract.all():
        return None
    inside, outside = y[abstract].mean(), y[~abstract].mean()
    return ~abstract if inside < ABSTRACT_RATE_SHARE * outside else None


def fit_key(X, y: np.ndarray, settings: Settings) -> tuple[np.ndarray, float]:
    """One question's logistic regression (liblinear, fixed random_state)."""
    from sklearn.linear_model import LogisticRegression

    # The dual problem: far more features than sentences, ten times faster here.
    model = LogisticRegression(C=settings.C, class_weight=settings.class_weight,
                               solver="liblinear", dual=True, max_iter=5000,
                               random_state=settings.seed)
    model.fit(X, y)
    return model.coef_[0].astype(np.float64), float(model.intercept_[0])


def article_pairs(z: np.ndarray, y: np.ndarray, groups: np.ndarray, settings: Settings,
                  rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
    """(positive rows, negative rows) paired within each article: every positive against the
    article's ``pair_hard`` best-scored negatives (by ``z``) and ``pair_random`` others."""
    pos_rows: list[np.ndarray] = []
    neg_rows: list[np.ndarray] = []
    for g in np.unique(groups):
        rows = np.nonzero(groups == g)[0]
        pos, neg = rows[y[rows] == 1], rows[y[rows] == 0]
        if not len(pos) or not len(neg):
            continue
        hard = neg[np.argsort(-z[neg], kind="stable")[: settings.pair_hard]]
        rest = np.setdiff1d(neg, hard)
        drawn = rng.choice(rest, size=min(settings.pair_random, len(rest)), replace=False)
        chosen = np.concatenate([hard, np.sort(drawn)])
        pos_rows.append(np.repeat(pos, len(chosen)))
        neg_rows.append(np.tile(chosen, len(pos)))
    if not pos_rows:
        return np.zeros(0, int), np.zeros(0, int)
    return np.concatenate(pos_rows), np.concatenate(neg_rows)


def fit_question(X, y: np.ndarray, groups: np.ndarray,
                 settings: Settings) -> tuple[np.ndarray, float]:
    """A question's model: pointwise logistic regression, plus (``settings.pairwise``) the
    coefficients of a pairwise one that orders each article's evidence above its other
    sentences. The sum stays one linear model; its intercept is the pointwise one."""
    from scipy.sparse import diags
    from sklearn.linear_model import LogisticRegression

    coef, intercept = fit_key(X, y, settings)
    if not settings.pairwise:
        return coef, intercept
    rng = np.random.default_rng(settings.seed)
    pos, neg = article_pairs(X @ coef + intercept, y, groups, settings, rng)
    if not len(pos):
        return coef, intercept
    # half the differences flipped, so both classes are present and the model stays symmetric
    flip = rng.random(len(pos)) < 0.5
    diffs = diags(np.where(flip, -1.0, 1.0)) @ (X[pos] - X[neg])
    model = LogisticRegression(C=settings.pair_C, fit_intercept=False, solver="liblinear",
                               dual=True, max_iter=5000, random_state=settings.seed)
    model.fit(diffs, (~flip).astype(int))
    return coef + model.coef_[0].astype(np.float64), intercept


def _fit_platt(z: np.ndarray, y: np.ndarray, seed: int) -> tuple[float, float]:
    from sklearn.linear_model import LogisticRegression

    model = LogisticRegression(C=1e4, solver="lbfgs", max_iter=1000, random_state=seed)
    model.fit(z.reshape(-1, 1), y)
    return float(model.coef_[0, 0]), float(model.intercept_[0])


def _out_of_fold(X, y: np.ndarray, groups: np.ndarray, settings: Settings,
                 folds: int, *, question: bool = False, rows: np.ndarray | None = None) -> np.ndarray:
    """Out-of-fold decision values, folds grouped by document (vocabulary shared; see notes).
    ``question``: the question models' fit (fit_question), else the plain one (fit_key).
    ``rows``: fit on these rows only (labelled_rows); every row is scored."""
    from sklearn.model_selection import GroupKFold

    z = np.zeros(len(y))
    n_groups = len(set(groups.tolist()))
    for train, test in GroupKFold(n_splits=min(folds, n_groups)).split(y, groups=groups):
        if rows is not None:
            train = train[rows[train]]
        if y[train].sum() == 0:
            continue
        if question:
            coef, intercept = fit_question(X[train], y[train], groups[train], settings)
        else:
            coef, intercept = fit_key(X[train], y[train], settings)
        z[test] = X[test] @ coef + intercept
    return z


def stack_plan(keys: Sequence[str], item_map: dict[str, Sequence[str]] | None,
               settings: Settings) -> dict[str, list[str]]:
    """Per question, the CONSORT items whose models feed it: those mapped to the questions of
    its own RoB 2 domain (1.2 thus sees the sequence-generation items of 1.1)."""
    if not item_map or settings.stacking == "none":
        return {k: [] for k in keys}
    if settings.stacking != "domain":
        raise ValueError(f"unknown stacking {settings.stacking!r}: use domain or none")
    domain = {k: k.split(".")[0] for k in keys}
    return {k: sorted({i for o in keys if domain[o] == domain[k] for i in item_map.get(o, ())})
            for k in keys}


@dataclass
class ItemModels:
    keys: list[str]
    coef: np.ndarray  # (len(keys), n_lex + n_shared)
    intercept: np.ndarray
    oof_stacked: np.ndarray  # (rows, 4 * len(keys)): stacked features from out-of-fold scores


def _per_document(values: np.ndarray, groups: np.ndarray) -> np.ndarray:
    """stacked_features of each document's rows (rows of a document are contiguous)."""
    from robtui.evidence.features import stacked_features

    out = np.zeros((values.shape[0], 4 * values.shape[1]))
    for g in np.unique(groups):
        rows = np.nonzero(groups == g)[0]
        out[rows] = stacked_features(values[rows])
    return out


def fit_items(prep: Prepared, items: list[str], settings: Settings) -> ItemModels:
    """One model per CONSORT item over lexical and layout features, with out-of-fold scores."""
    X = prep.X[prep.keys[0]][:, : -len(QUESTION_NAMES)]
    item_settings = Settings(**{**asdict(settings), "C": settings.item_C,
                                "class_weight": "balanced"})
    coef = np.zeros((len(items), X.shape[1]))
    intercept = np.zeros(len(items))
    oof = np.zeros((X.shape[0], len(items)))
    for j, item in enumerate(items):
        y = np.concatenate([d.items[item] for d in prep.docs]).astype(int)
        y = training_labels(y, prep.pointer, prep.groups, settings)
        rows = labelled_rows(y, prep.abstract, settings)
        fit_X, fit_y = (X, y) if rows is None else (X[rows], y[rows])
        coef[j], intercept[j] = fit_key(fit_X, fit_y, item_settings)
        oof[:, j] = sigmoid(_out_of_fold(X, y, prep.groups, item_settings, settings.item_folds,
                                         rows=rows))
    return ItemModels(items, coef, intercept, _per_document(oof, prep.groups))


def _with_stack(X, stacked: np.ndarray | None, columns: list[int]):
    from scipy.sparse import csr_matrix, hstack

    if stacked is None or not columns:
        return X
    return hstack([X, csr_matrix(stacked[:, columns])]).tocsr()


def _stack_columns(plan_items: list[str], item_keys: list[str]) -> list[int]:
    return [4 * item_keys.index(i) + p for i in plan_items if i in item_keys for p in range(4)]


def block_scale(n_lex: int, n_stacked: int, settings: Settings) -> np.ndarray:
    """Column scales of a question's design matrix: lexical | shared | question | stacked."""
    return np.concatenate([
        np.ones(n_lex), np.full(len(SHARED_NAMES), settings.scale_shared),
        np.full(len(QUESTION_NAMES), settings.scale_question),
        np.full(n_stacked, settings.scale_stacked),
    ])


def scaled(X, scale: np.ndarray):
    """``X`` with column j multiplied by ``scale[j]``."""
    from scipy.sparse import diags

    return X if np.all(scale == 1.0) else (X @ diags(scale)).tocsr()


def fit_scaled(fit, X, scale: np.ndarray, *args) -> tuple[np.ndarray, float]:
    """``fit(scaled(X, scale), *args)`` with its coefficients mapped back to the unscaled X."""
    coef, intercept = fit(scaled(X, scale), *args)
    return coef * scale, intercept


def youden_threshold(top_scores: list[float], present: list[bool]) -> float:
    """The top-score cut with the best sensitivity + specificity - 1 (ties: the lower cut)."""
    s = np.asarray(top_scores)
    y = np.asarray(present, dtype=bool)
    if y.all() or (~y).all():
        return 0.5
    best, best_cut = -1.0, 0.5
    for cut in np.unique(s):
        j = (s[y] >= cut).mean() + (s[~y] < cut).mean() - 1
        if j > best:
            best, best_cut = j, float(cut)
    return best_cut


def fit_weights(
    docs: list[LabelledDocument], keys: list[str], settings: Settings, texts: dict[str, str],
    *, calibrate: bool = True, prepared: Prepared | None = None, provenance: dict | None = None,
    item_map: dict[str, Sequence[str]] | None = None,
) -> RankerWeights:
    """Train every mapped question's model (and the transfer model) on ``docs``.

    With ``item_map`` (question -> CONSORT items) and stacking on, per-item models are trained
    first and their out-of-fold scores feed the questions' models (see stack_plan).
    """
    prep = prepared or prepare(docs, keys, settings, texts)
    plan = stack_plan(keys, item_map, settings)
    wanted = sorted({i for its in plan.values() for i in its})
    y_of = {i: np.concatenate([d.items.get(i, np.zeros(0, bool)) for d in prep.docs])
            for i in wanted}
    usable = [i for i in wanted if len(y_of[i]) == len(prep.groups) and y_of[i].sum() > 0]
    items = fit_items(prep, usable, settings) if usable else None
    space = prep.space.weights
    n_lex = len(space.word.idf) + len(space.char.idf)
    n_sh = len(SHARED_NAMES)
    trained = [k for k in keys if prep.y[k].sum() > 0]
    lexical = np.zeros((len(trained), n_lex))
    shared = np.zeros((len(trained), n_sh))
    question = np.zeros((len(trained), len(QUESTION_NAMES)))
    intercept = np.zeros(len(trained))
    platt = np.tile([1.0, 0.0], (len(trained), 1))
    item_keys = items.keys if items else []
    stacked = np.zeros((len(trained), 4 * len(item_keys)))
    tops: list[float] = []
    present: list[bool] = []
    n_q = len(QUESTION_NAMES)
    for r, key in enumerate(trained):
        columns = _stack_columns(plan[key], item_keys)
        X = _with_stack(prep.X[key], items.oof_stacked if items else None, columns)
        scale = block_scale(n_lex, len(columns), settings)
        y, groups = prep.y[key], prep.groups
        rows = labelled_rows(y, prep.abstract, settings)
        if rows is None:
            coef, b = fit_scaled(fit_question, X, scale, y, groups, settings)
        else:
            coef, b = fit_scaled(fit_question, X[rows], scale, y[rows], groups[rows], settings)
        # a fresh scaled copy for the calibration below: reusing the one the fit was given
        # changes the Platt values in the 15th digit, and the shipped weights reproduce to the bit
        X = scaled(X, scale)
        lexical[r], shared[r] = coef[:n_lex], coef[n_lex : n_lex + n_sh]
        question[r], intercept[r] = coef[n_lex + n_sh : n_lex + n_sh + n_q], b
        stacked[r, columns] = coef[n_lex + n_sh + n_q :]
        if calibrate:
            z = _out_of_fold(X, y, groups, settings, settings.calibration_folds,
                             question=True, rows=rows)
            platt[r] = (_fit_platt(z, y, settings.seed) if rows is None
                        else _fit_platt(z[rows], y[rows], settings.seed))
            p = sigmoid(platt[r, 0] * z + platt[r, 1])
            for number, doc in enumerate(prep.docs):
                rows = prep.groups == number
                if rows.any():  # the best suggestion, as `suggest` would show it
                    tops.append(float(p[rows][prep.suggestible(number, key)].max()))
                    present.append(doc.present[key])
    generic, generic_b, generic_platt, generic_cut = _fit_generic(prep, trained, settings,
                                                                  calibrate)
    return RankerWeights(
        word=space.word, char=space.char, keys=trained, lexical=lexical, shared=shared,
        question=question, intercept=intercept, platt=platt,
        generic=generic, generic_intercept=generic_b, generic_platt=generic_platt,
        no_evidence_threshold=youden_threshold(tops, present) if tops else 0.5,
        question_texts=dict(texts), provenance=provenance or {},
        generic_no_evidence_threshold=generic_cut,
        warm_words=_frequent_words(prep.docs),
        item_keys=list(item_keys),
        item_lexical=items.coef[:, :n_lex] if items else None,
        item_shared=items.coef[:, n_lex:] if items else None,
        item_intercept=items.intercept if items else None,
        stacked=stacked if items else None,
    )


def _frequent_words(docs: list[LabelledDocument], n: int = 6000) -> list[str]:
    """The training text's most frequent words (ties by first appearance): cached at load."""
    from collections import Counter

    counts = Counter(w for d in docs for s in d.document.sentences for w in s.text.lower().split())
    return [w for w, _ in counts.most_common(n) if "\n" not in w]


def _generic_model(X: np.ndarray, y: np.ndarray, seed: int):
    from sklearn.linear_model import LogisticRegression

    return LogisticRegression(C=1.0, solver="liblinear", max_iter=2000, random_state=seed).fit(X, y)


def _fit_generic(prep: Prepared, keys: list[str], settings: Settings, calibrate: bool):
    """The transfer model pooled over the mapped questions, Platt-calibrated out of fold."""
    from sklearn.model_selection import GroupKFold

    gx = np.vstack([prep.generic_X[k] for k in keys])
    gy = np.concatenate([prep.y[k] for k in keys])
    groups = np.concatenate([prep.groups for _ in keys])
    model = _generic_model(gx, gy, settings.seed)
    platt, cut = np.array([1.0, 0.0]), None
    n_groups = len(set(prep.groups.tolist()))
    if calibrate and n_groups >= 2:
        z = np.zeros(len(gy))
        for train, test in GroupKFold(n_splits=min(settings.calibration_folds, n_groups)).split(
            gy, groups=groups
        ):
            z[test] = _generic_model(gx[train], gy[train], settings.seed).decision_function(gx[test])
        platt = np.array(_fit_platt(z, gy, settings.seed))
        p = sigmoid(platt[0] * z + platt[1])
        tops, present = [], []
        offset = 0
        for key in keys:
            n = len(prep.y[key])
            for number, doc in enumerate(prep.docs):
                rows = np.nonzero(prep.groups == number)[0] + offset
                if len(rows):
                    tops.append(float(p[rows][prep.suggestible(number, key)].max()))
                    present.append(doc.present[key])
            offset += n
        cut = youden_threshold(tops, present)
    return model.coef_[0].astype(np.float64), float(model.intercept_[0]), platt, cut


def _fold_ranks(prep_test: Prepared, coefs: dict[str, tuple[np.ndarray, float]]) -> dict:
    ranks: dict[str, list] = {}
    for key, (coef, b) in coefs.items():
        z = prep_test.X[key] @ coef + b
        for number, doc in enumerate(prep_test.docs):
            if doc.present[key]:
                rows = prep_test.groups == number
                ranks.setdefault(key, []).append(first_hit_rank(z[rows], doc.labels[key]))
    return ranks


def select_settings(
    docs: list[LabelledDocument], keys: list[str], base: Settings, texts: dict[str, str],
    folds: int, grid: Sequence[dict] = GRID, log=print,
) -> tuple[Settings, list[dict]]:
    """Pick C and class weighting by GroupKFold over articles: macro recall@1, then MRR."""
    from sklearn.model_selection import GroupKFold

    groups = np.arange(len(docs))
    results = {i: {} for i in range(len(grid))}
    for fold, (train, test) in enumerate(GroupKFold(n_splits=folds).split(docs, groups=groups)):
        train_docs = [docs[i] for i in train]
        prep_train = prepare(train_docs, keys, base, texts)
        prep_test = prepare([docs[i] for i in test], keys, base, texts, space=prep_train.space,
                            training=False)
        for g, params in enumerate(grid):
            settings = Settings(**{**asdict(base), **params})
            space = prep_train.space.weights
            scale = block_scale(len(space.word.idf) + len(space.char.idf), 0, settings)
            coefs = {}
            for k in keys:
                X, y = prep_train.X[k], prep_train.y[k]
                if y.sum() == 0:
                    continue
                rows = labelled_rows(y, prep_train.abstract, settings)
                coefs[k] = fit_scaled(fit_key, *((X, scale, y) if rows is None
                                                 else (X[rows], scale, y[rows])), settings)
            for key, ranks in _fold_ranks(prep_test, coefs).items():
                results[g].setdefault(key, []).extend(ranks)
        log(f"  fold {fold + 1}/{folds} done")
    table = []
    for g, params in enumerate(grid):
        figures = {k: QuestionFigures.from_ranks(r, [0] * len(r), [], [True] * len(r))
                   for k, r in results[g].items()}
        table.append({**params, "recall1": round(macro(figures, "recall1"), 4),
                      "mrr": round(macro(figures, "mrr"), 4)})
    best = max(range(len(grid)), key=lambda g: (table[g]["recall1"], table[g]["mrr"], -g))
    return Settings(**{**asdict(base), **grid[best]}), table


def _versions() -> dict[str, str]:
    import rapidfuzz
    import scipy
    import sklearn

    return {"python": platform.python_version(), "numpy": np.__version__,
            "scikit-learn": sklearn.__version__, "scipy": scipy.__version__,
            "rapidfuzz": rapidfuzz.__version__}


def train(
    corpus_dir: Path, out: Path, *, folds: int = 5, articles: int | None = None,
    grid: Sequence[dict] = GRID, log=print,
) -> RankerWeights:
    """Train on the corpus (optionally its first ``articles`` articles) and save to ``out``."""
    from robtui.evidence.training.corpus import load_corpus, load_mapping
    from robtui.evidence.training.corpus_docs import labelled_documents

    mapping = load_mapping(corpus_dir)
    corpus = load_corpus(corpus_dir)[:articles] if articles else load_corpus(corpus_dir)
    keys = list(mapping.questions)
    texts = question_texts()
    log(f"reading {len(corpus)} articles with robtui's text reader ...")
    docs = labelled_documents(corpus, mapping, "txt")
    base = Settings()
    log(f"choosing settings by {folds}-fold cross-validation grouped by article ...")
    settings, table = select_settings(docs, keys, base, texts, folds, grid, log)
    for row in table:
        log(f"  C={row['C']:<5} class_weight={row['class_weight']!s:<8} "
            f"macro recall@1={row['recall1']:.3f} MRR={row['mrr']:.3f}")
    log(f"chosen: C={settings.C} class_weight={settings.class_weight}; fitting on all articles")
    provenance = {
        "trained_on": {
            "corpus": "CONSORT-TM development split (../shared/corpus/consort-tm)",
            "citation": CITATION,
            "articles": [d.article_id for d in docs],
            "reader": "robtui.reading.text.document_from_text",
        },
        "item_mapping": {"file": "rob2-consort-map.json", "questions": mapping.questions},
        "settings": asdict(settings),
        "cross_validation": {"method": "GroupKFold by article", "folds": folds,
                             "selection": "macro recall@1, then MRR", "grid": table},
        "calibration": f"Platt scaling on {settings.calibration_folds}-fold grouped "
                       "out-of-fold scores (vocabulary of the full training set)",
        "ranking": ("pointwise plus pairwise (within-article) logistic regressions summed; "
                    f"pairs: each positive against {settings.pair_hard} best-scored and "
                    f"{settings.pair_random} random negatives, pair_C={settings.pair_C}"
                    if settings.pairwise else "pointwise"),
        "stacking": (f"{settings.stacking}: per-CONSORT-item logistic regressions (C="
                     f"{settings.item_C}, balanced) over the same lexical and layout features; "
                     f"their {settings.item_folds}-fold grouped out-of-fold scores (sentence, "
                     "previous, next, best within 2) feed each question's model, the items of "
                     "the questions of its own RoB 2 domain; the settings grid above is scored "
                     "without stacking"),
        "text": "digits folded to 0 before the TF-IDF tables (features.lexical_text); cues "
                "matched on the text as written",
        "block_scales": (f"layout x{settings.scale_shared}, question x{settings.scale_question}, "
                         f"stacked x{settings.scale_stacked} in training (heavier L2 on them); "
                         "coefficients stored for the unscaled features"),
        "reader_faults": (f"{settings.section_dropout:.0%} of the training articles (seeded) "
                          "seen without sections (reader_faults.without_sections); abstract "
                          "sentences " + ("left out of the training rows of items the corpus "
                                          "does not annotate in abstracts"
                                          if settings.abstract_unlabelled else "kept as labelled")),
        "pointers": (POINTERS_NOTE if settings.pointers == "below_prose" else "kept as annotated"),
        "untrained_questions": "transfer model over question-relative features "
                               "(cue lexicon, question wording similarity, expected section)",
        "libraries": _versions(),
        "date": dt.date.today().isoformat(),
        "seed": settings.seed,
    }
    weights = fit_weights(docs, keys, settings, texts, provenance=provenance,
                          item_map=mapping.questions)
    save_weights(weights, out)
    log(f"wrote {out} (no-evidence threshold {weights.no_evidence_threshold:.3f})")
    return weights


def build_parser() -> argparse.ArgumentParser:
    from robtui.evidence.training.cli import add_arguments

    return add_arguments(argparse.ArgumentParser(
        prog="python -m robtui.evidence.training.train", description=__doc__.split("\n\n")[0]))


def run_from_args(args: argparse.Namespace) -> int:
    from robtui.errors import InputError
    from robtui.evidence.training.corpus import default_corpus_dir

    corpus = args.corpus or default_corpus_dir()
    if corpus is None:
        raise InputError("no corpus found: pass --corpus PATH (the folder holding consort-tm/)")
    if args.folds < 2:
        raise InputError("--folds must be at least 2")
    train(Path(corpus), args.out or DEFAULT_WEIGHTS, folds=args.folds, articles=args.articles)
    return 0


def main(argv: Sequence[str] | None = None) -> int:
    from robtui.errors import RobtuiError

    try:
        return run_from_args(build_parser().parse_args(argv))
    except RobtuiError as error:
        print(f"robtui: {error}", file=sys.stderr)
        return 2


if __name__ == "__main__":
    sys.exit(main())
