"""The second stage of the ranker (evidence/adjustment.py), learned on real published PDFs
and the corpus together.

    python -m robtui.evidence.training.real_gold [--folder PATH] [--corpus PATH] [--out FILE]
                                                 [--report-only] [--no-corpus]

Reads the articles of ``../shared/real-pdfs`` with robtui's own reader and labels each
sentence by the gold snippets of ``gold.json`` with the hit rule of that folder's README (the
one ``robtui bench real-pdfs`` scores with); adds the corpus articles of ``../shared/corpus``
labelled by the question-to-item mapping, each scored by a first stage trained without it
(training/corpus_oof.py: the shipped first stage has seen them, and its in-sample scores would
teach the second stage to trust it blindly). One pairwise logistic regression (scikit-learn,
lbfgs) is fitted on within-(article, question) differences between gold sentences and the
rest, over the first stage's scores and a few features (adjustment.BASE_NAMES, plus a copy of
three of them per question); a corpus group weighs ``corpus_weight`` times a real one. Nothing
of the articles is stored: only coefficients.

Grouped cross-validation by article over both collections, as the project's rules ask of
anything tuned on real gold (each real article alone, the corpus in CORPUS_FOLDS folds):
- the setting (C, corpus weight) is chosen among those whose corpus macro recall@1 and @3 are
  not below the first stage's, by the real PDFs' pooled recall@1, then recall@3;
- it serves only the questions whose real-PDF recall@1 + recall@3 it raised and whose corpus
  recall@1 and recall@3 it did not lower (serving); the others keep the first stage;
- two partitions (odd and even places of each collection): the setting and the questions
  chosen within one half, reported on the other half for both collections, and the reverse;
- calibration (Platt scaling) on the grouped-CV scores of both collections, and the "no sentence
  found" cut by Youden's J averaged over the two collections.
``robtui bench evidence`` prints the corpus figures with and without it from the same folds.
"""

from __future__ import annotations

import argparse
import datetime as dt
import os
import re
import sys
import unicodedata
import zlib
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from robtui.evidence.adjustment import (
    DEFAULT_ADJUSTMENT,
    Adjustment,
    base_features,
    design,
    feature_names,
    save_adjustment,
)
from robtui.evidence.training.corpus_oof import CORPUS_PREFIX

FOLDER_ENV = "ROBTUI_REAL_PDFS"
# The scoring the gold's README suggests (../shared/real-pdfs/README.md).
MIN_PARTIAL_RATIO = 90.0
MIN_LENGTH_SHARE = 0.6
QUESTIONS = ("1.1", "1.2", "1.3", "2.1", "2.2", "2.6", "3.1", "4.3", "5.1")
C_GRID = (0.03, 0.3)
# Weight of one corpus group against one real-PDF group (the corpus has some three times as
# many answerable groups): a grid for grouped CV, never set by hand.
CORPUS_WEIGHTS = (0.3, 1.0, 3.0, 10.0)
CORPUS_FOLDS = 4
PAIR_HARD = 30  # as train.Settings.pair_hard
PAIR_RANDOM = 30
SEED = 20261203


# --------------------------------------------------------------------------- gold, hit rule


def default_folder() -> Path | None:
    """``$ROBTUI_REAL_PDFS``, else ``shared/real-pdfs`` in a folder above the repository (a
    checkout's ``../shared``, or a worktree's further up); None if absent."""
    env = os.environ.get(FOLDER_ENV)
    candidates = [Path(env)] if env else []
    candidates += [p / "shared" / "real-pdfs" for p in Path(__file__).resolve().parents[3:6]]
    for candidate in candidates:
        if (candidate / "gold.json").is_file():
            return candidate
    return None


@dataclass(frozen=True)
class GoldSnippet:
    snippet: str
    where: str
    table: bool


def load_gold(folder: Path) -> dict[str, dict[str, list[GoldSnippet]]]:
    """gold.json as {file: {question: [snippet, ...]}}; DataFileError naming what is wrong."""
    from pydantic import BaseModel, ConfigDict, TypeAdapter, ValidationError

    from robtui.errors import DataFileError

    class _Snippet(BaseModel):
        model_config = ConfigDict(extra="ignore")
        snippet: str
        where: str = "other"
        table: bool = False

    path = Path(folder) / "gold.json"
    try:
        raw = TypeAdapter(dict[str, dict[str, list[_Snippet]]]).validate_json(path.read_bytes())
    except OSError as error:
        raise DataFileError(f"{path}: cannot be read ({error.strerror or error})") from error
    except ValidationError as error:
        raise DataFileError(f"{path}: not a gold file of the expected shape ({error})") from error
    return {name: {q: [GoldSnippet(s.snippet, s.where, s.table) for s in items]
                   for q, items in questions.items()}
            for name, questions in raw.items()}


_QUOTES = str.maketrans({c: "'" for c in "\u2018\u2019\u201a\u201b\u2032\u00b4`"}
                        | {c: '"' for c in "\u201c\u201d\u201e\u201f\u2033"}
                        | {c: "-" for c in "\u2010\u2011\u2012\u2013\u2014\u2015\u2212\ufe63\uff0d"}
                        | {"\u00ad": None, "\u200b": None, "\ufeff": None})
_LINE_END_HYPHEN = re.compile(r"-[ \t]*\n[ \t]*")
# pdftotext keeps a soft hyphen (U+00AD) where the typesetter broke a word at a line end.
_SOFT_LINE_END = re.compile("\u00ad(?=[ \t]*\n)")
SPACE = re.compile(r"\s+")


def normalise(text: str) -> str:
    """Text as the scoring compares it: NFKC (ligatures spelled out), soft hyphens dropped,
    quotes and dashes unified, hyphens dropped (so a line-end hyphen rejoined either way reads
    the same), combining marks composed, lower case, white space collapsed."""
    text = _SOFT_LINE_END.sub("-", unicodedata.normalize("NFKC", text)).translate(_QUOTES)
    text = _LINE_END_HYPHEN.sub("", text).replace("-", "")
    return SPACE.sub(" ", text).strip().lower()


def contains_snippet(candidate: str, snippet: str) -> bool:
    """The hit rule on normalised texts: the snippet occurs in the candidate, fuzzily, and the
    candidate holds at least MIN_LENGTH_SHARE of the snippet's length."""
    from rapidfuzz import fuzz

    if not snippet or len(candidate) < MIN_LENGTH_SHARE * len(snippet):
        return False
    return fuzz.partial_ratio(snippet, candidate, score_cutoff=MIN_PARTIAL_RATIO) >= MIN_PARTIAL_RATIO


def hit_labels(candidates: Sequence[str], snippets: Sequence[str]) -> np.ndarray:
    """Per normalised candidate, whether it contains any of the normalised snippets."""
    return np.array([any(contains_snippet(c, s) for s in snippets) for c in candidates], dtype=bool)


# --------------------------------------------------------------------------- data


@dataclass
class Group:
    """One (article, question): the first stage's base features and each sentence's label."""

    article: str
    key: str
    base: np.ndarray  # (n, len(BASE_NAMES))
    labels: np.ndarray  # (n,) bool
    keep: np.ndarray  # (n,) what `suggest` may show (ranker.suggestible)
    texts: tuple[str, ...] = ()  # the sentences, for listing misses (never stored)

    @property
    def answerable(self) -> bool:
        return bool(self.labels.any())


def article_groups(name: str, document, questions: dict[str, list[GoldSnippet]],
                   ranker) -> list[Group]:
    """One article's (article, question) groups, with ``ranker``'s first stage."""
    from robtui.evidence.ranker import active_questions, suggestible

    wording = dict(active_questions("assignment"))
    keys = [q for q in questions if q in wording]
    feats = ranker.features(document)
    first = ranker.first_stage(feats, keys, [ranker.weights.question_texts.get(k) or wording[k]
                                             for k in keys])
    texts = [normalise(s.text) for s in document.sentences]
    keep = suggestible(document.sentences)
    out = []
    for key in keys:
        own, transfer, qf = first[key]
        labels = hit_labels(texts, [normalise(g.snippet) for g in questions[key]])
        out.append(Group(name, key, base_features(own, transfer, qf, feats.shared), labels, keep,
                         tuple(s.text for s in document.sentences)))
    return out


def gather(folder: Path, gold: dict, ranker, log=print) -> list[Group]:
    """Every (article, question) of ``gold`` as read by robtui (document cache used)."""
    from robtui.reading.reader import read_document

    groups = []
    for name, questions in gold.items():
        document = read_document(Path(folder) / name)
        groups += article_groups(name, document, questions, ranker)
        log(f"  {name}: {len(document.sentences)} sentences")
    return groups


def _rows(groups: Sequence[Group], keys: Sequence[str]) -> list[np.ndarray]:
    return [design(g.base, g.key, keys) for g in groups]


def is_corpus(group: Group) -> bool:
    return group.article.startswith(CORPUS_PREFIX)


def _negatives(g: Group) -> np.ndarray:
    """The negatives a group's positives are paired with: all of them in a small group, else
    the PAIR_HARD best by each first-stage score (own model, transfer model) and PAIR_RANDOM
    others drawn with a seed of the group's own (the same draw in any company and order;
    train.py pairs the corpus models' differences the same way)."""
    neg = np.nonzero(~g.labels & g.keep)[0]
    if len(neg) <= 2 * PAIR_HARD + PAIR_RANDOM:
        return neg
    hard = {int(i) for column in (0, 1)
            for i in neg[np.argsort(-g.base[neg, column], kind="stable")[:PAIR_HARD]]}
    rest = np.array([i for i in neg if int(i) not in hard])
    rng = np.random.default_rng([SEED, zlib.crc32(f"{g.article}\t{g.key}".encode())])
    drawn = rng.choice(rest, size=min(PAIR_RANDOM, len(rest)), replace=False)
    return np.sort(np.concatenate([np.array(sorted(hard)), drawn]))


def fit(groups: Sequence[Group], keys: Sequence[str], C: float,
        corpus_weight: float = 1.0) -> np.ndarray:
    """Pairwise logistic regression (no intercept) on gold-minus-other differences within each
    (article, question); both orders, so the classes balance. Each real-PDF group weighs 1,
    each corpus group ``corpus_weight`` (the corpus has some three times as many)."""
    from sklearn.linear_model import LogisticRegression

    diffs, weights = [], []
    for g, X in zip(groups, _rows(groups, keys)):
        pos = np.nonzero(g.labels & g.keep)[0]
        neg = _negatives(g)
        if not len(pos) or not len(neg):
            continue
        d = (X[pos][:, None, :] - X[neg][None, :, :]).reshape(-1, X.shape[1])
        diffs.append(d)
        weights.append(np.full(len(d), (corpus_weight if is_corpus(g) else 1.0) / len(d)))
    D = np.vstack(diffs)
    # as many units as real groups on each real group (so C means what it meant when the
    # second stage was fitted on the real PDFs alone), ``corpus_weight`` times that on a corpus one
    w = np.concatenate(weights) * max(sum(not is_corpus(g) for g in groups), 1)
    X = np.vstack([D, -D])
    y = np.concatenate([np.ones(len(D)), np.zeros(len(D))])
    model = LogisticRegression(C=C, fit_intercept=False, solver="lbfgs", max_iter=5000,
                               random_state=SEED)
    model.fit(X, y, sample_weight=np.concatenate([w, w]))
    return model.coef_[0]


def first_rank(scores: np.ndarray, g: Group) -> int | None:
    """1-based place of the first gold sentence among the suggestible ones, by score."""
    order = np.argsort(-np.where(g.keep, scores, -np.inf), kind="stable")
    order = order[g.keep[order]]
    hits = np.nonzero(g.labels[order])[0]
    return int(hits[0]) + 1 if len(hits) else None


def cv_folds(groups: Sequence[Group], corpus_folds: int = CORPUS_FOLDS) -> list[set[str]]:
    """The articles of each fold: every real article alone (leave one article out), and the
    corpus articles in ``corpus_folds`` folds by their order (every k-th article)."""
    real = [a for a in dict.fromkeys(g.article for g in groups) if not a.startswith(CORPUS_PREFIX)]
    corpus = [a for a in dict.fromkeys(g.article for g in groups) if a.startswith(CORPUS_PREFIX)]
    folds = [{a} for a in real]
    k = min(corpus_folds, len(corpus))
    folds += [set(corpus[i::k]) for i in range(k)]
    return folds


def cv_scores(groups: Sequence[Group], keys: Sequence[str], C: float, corpus_weight: float = 1.0,
              folds: Sequence[set[str]] | None = None) -> list[np.ndarray]:
    """Each group's scores by a model fitted without its fold's articles (cv_folds)."""
    out: list[np.ndarray | None] = [None] * len(groups)
    for held in folds if folds is not None else cv_folds(groups):
        train = [g for g in groups if g.article not in held]
        coef = fit(train, keys, C, corpus_weight)
        for i, g in enumerate(groups):
            if g.article in held:
                out[i] = design(g.base, g.key, keys) @ coef
    return out  # type: ignore[return-value]


def loao_scores(groups: Sequence[Group], keys: Sequence[str], C: float,
                corpus_weight: float = 1.0) -> list[np.ndarray]:
    """Each group's scores by a model fitted on the other articles (corpus folds as cv_folds)."""
    return cv_scores(groups, keys, C, corpus_weight)


def recalls(ranks: Sequence[int | None]) -> list[float]:
    return [sum(r is not None and r <= k for r in ranks) / len(ranks) if ranks else float("nan")
            for k in (1, 3, 5)]


@dataclass(frozen=True)
class Figures:
    """Recall@1/3/5 of one collection: the real PDFs pooled over answerable pairs (as `bench
    real-pdfs`), the corpus macro-averaged over questions (as `bench evidence`); per key."""

    real: list[float]
    corpus: list[float]
    real_per_key: dict[str, list[float]]
    corpus_per_key: dict[str, list[float]]
    real_n: dict[str, int]
    corpus_n: dict[str, int]


def figures(groups: Sequence[Group], scores: Sequence[np.ndarray],
            serves: Sequence[str] | None = None) -> Figures:
    """Recall of ``scores`` (the first stage's own where ``serves`` leaves a key out)."""
    ranks: dict[tuple[bool, str], list] = {}
    for g, s in zip(groups, scores):
        if g.answerable:
            use = s if serves is None or g.key in serves else g.base[:, 0]
            ranks.setdefault((is_corpus(g), g.key), []).append(first_rank(use, g))
    real = {k: recalls(r) for (c, k), r in ranks.items() if not c}
    corpus = {k: recalls(r) for (c, k), r in ranks.items() if c}
    pooled = recalls([r for (c, _), rs in ranks.items() if not c for r in rs])
    macro = ([float(np.mean([v[i] for v in corpus.values()])) for i in range(3)] if corpus
             else [float("nan")] * 3)
    return Figures(pooled, macro, real, corpus,
                   {k: len(r) for (c, k), r in ranks.items() if not c},
                   {k: len(r) for (c, k), r in ranks.items() if c})


def first_stage_scores(groups: Sequence[Group]) -> list[np.ndarray]:
    return [g.base[:, 0] for g in groups]


def _raised(mine: list[float], theirs: list[float]) -> float:
    return mine[0] + mine[1] - theirs[0] - theirs[1]


def serving(first: Figures, second: Figures, keys: Sequence[str]) -> list[str]:
    """The keys the second stage serves: recall@1 + recall@3 raised on the real PDFs, and
    neither recall@1 nor recall@3 lowered on the corpus (a key without corpus groups is judged
    on the real PDFs alone)."""
    out = []
    for k in keys:
        if k not in second.real_per_key or _raised(second.real_per_key[k],
                                                   first.real_per_key[k]) <= 1e-9:
            continue
        if k in second.corpus_per_key and any(
                second.corpus_per_key[k][i] < first.corpus_per_key[k][i] - 1e-9 for i in (0, 1)):
            continue
        out.append(k)
    return out


def choose_setting(groups: Sequence[Group], keys: Sequence[str], grid=C_GRID,
                   weights=CORPUS_WEIGHTS, log=None) -> tuple[tuple[float, float], list]:
    """(C, corpus weight) by grouped CV over both collections: among the settings whose corpus
    macro recall@1 and recall@3 are not below the first stage's, the best real-PDF pooled
    recall@1, then recall@3, where it serves (serving); no such setting: the best corpus
    figure. With no corpus groups, the weight is moot and the real figures decide."""
    first = figures(groups, first_stage_scores(groups))
    has_corpus = any(is_corpus(g) for g in groups)
    folds = cv_folds(groups)
    table = []
    for C in grid:
        for w in (weights if has_corpus else (1.0,)):
            scores = cv_scores(groups, keys, C, w, folds)
            served = figures(groups, scores, serving(first, figures(groups, scores), keys))
            table.append((C, w, served.real[0], served.real[1], served.corpus[0],
                          served.corpus[1]))
            if log:
                log(f"    C={C:<5} corpus weight {w:<5} real R@1 {served.real[0]:.3f} "
                    f"R@3 {served.real[1]:.3f} | corpus R@1 {served.corpus[0]:.3f} "
                    f"R@3 {served.corpus[1]:.3f}")
    keeps = [r for r in table if not has_corpus or (r[4] >= first.corpus[0] - 1e-9
                                                     and r[5] >= first.corpus[1] - 1e-9)]
    if keeps:
        best = max(keeps, key=lambda r: (r[2], r[3], r[4], -r[0]))
    else:
        best = max(table, key=lambda r: (r[4], r[5], r[2], -r[0]))
    return (best[0], best[1]), table


def balanced_threshold(tops: Sequence[float], present: Sequence[bool],
                       corpus: Sequence[bool]) -> float:
    """The top-score cut with the best Youden's J averaged over the two collections (each
    counts the same, however many pairs it has); one collection alone: its J."""
    s, y, c = np.asarray(tops), np.asarray(present, bool), np.asarray(corpus, bool)
    parts = [m for m in (c, ~c) if m.any() and y[m].any() and (~y[m]).any()]
    if not parts:
        return 0.5
    best, best_cut = -2.0, 0.5
    for cut in np.unique(s):
        j = np.mean([(s[m & y] >= cut).mean() + (s[m & ~y] < cut).mean() - 1 for m in parts])
        if j > best:
            best, best_cut = j, float(cut)
    return best_cut


def calibrate(groups: Sequence[Group], oof: Sequence[np.ndarray],
              log=print) -> tuple[np.ndarray, float, dict]:
    """Platt scaling on the grouped-CV scores of both collections, and the "no sentence found"
    cut on the calibrated top scores of every (article, question), each collection counting
    the same (balanced_threshold). Every question, not only those served: one model scores
    them all, and the served ones alone have too few unanswerable pairs to place a cut (one
    per collection for 2.6 and 3.1). Returns (platt, cut, figures)."""
    from robtui.evidence.training.metrics import auroc
    from robtui.evidence.training.train import _fit_platt

    z = np.concatenate(oof)
    y = np.concatenate([g.labels & g.keep for g in groups]).astype(int)
    platt = np.array(_fit_platt(z, y, SEED))
    tops = [float(1 / (1 + np.exp(-np.max(platt[0] * s[g.keep] + platt[1]))))
            for g, s in zip(groups, oof)]
    present = [g.answerable for g in groups]
    in_corpus = [is_corpus(g) for g in groups]
    cut = balanced_threshold(tops, present, in_corpus)
    figs = {}
    for name, pick in (("real PDFs", False), ("corpus", True)):
        t = [x for x, c in zip(tops, in_corpus) if c == pick]
        p = [x for x, c in zip(present, in_corpus) if c == pick]
        if not t:
            continue
        a = auroc(t, p)
        hits = sum(x < cut for x, q in zip(t, p) if q), sum(x < cut for x, q in zip(t, p) if not q)
        log(f"{name}, every question, second stage by grouped CV: AUROC of the top score "
            f"{'-' if a is None else f'{a:.2f}'}; 'no sentence found' ({cut:.3f}) on "
            f"{hits[0]}/{sum(p)} answerable and {hits[1]}/{len(p) - sum(p)} unanswerable pairs")
        figs[f"flag_{'corpus' if pick else 'real'}"] = {
            "auroc": a, "flagged_answerable": [hits[0], sum(p)],
            "flagged_unanswerable": [hits[1], len(p) - sum(p)]}
    figs["threshold"] = cut
    return platt, cut, figs


# --------------------------------------------------------------------------- report, train


def _line(label: str, values: Sequence[float]) -> str:
    return f"  {label:<44}" + " ".join(f"{x:5.2f}" for x in values)


def _both(label: str, f: Figures) -> list[str]:
    return [_line(f"{label}, real PDFs (pooled)", f.real),
            _line(f"{label}, corpus (macro)", f.corpus)]


def _halves(groups: Sequence[Group]) -> list[set[str]]:
    """Two partitions of the articles: odd and even places (gold.json order for the real
    PDFs, corpus order for the corpus), both collections split alike."""
    halves: list[set[str]] = [set(), set()]
    for collection in (False, True):
        articles = [a for a in dict.fromkeys(g.article for g in groups)
                    if a.startswith(CORPUS_PREFIX) == collection]
        halves[0] |= set(articles[0::2])
        halves[1] |= set(articles[1::2])
    return halves


def _partition(groups: Sequence[Group], keys: Sequence[str], choose: set[str], test: set[str],
               h: int, log) -> dict:
    """One partition: the setting and questions chosen within ``choose``, reported on ``test``."""
    inner = [g for g in groups if g.article in choose]
    held = [g for g in groups if g.article in test]
    (C, w), _ = choose_setting(inner, keys)
    inner_first = figures(inner, first_stage_scores(inner))
    serves = serving(inner_first, figures(inner, cv_scores(inner, keys, C, w)), keys)
    coef = fit(inner, keys, C, w)
    first = figures(held, first_stage_scores(held))
    second = figures(held, [design(g.base, g.key, keys) @ coef for g in held], serves)
    log(f"  partition {h}: chose C={C}, corpus weight {w}, serving {', '.join(serves)}")
    for line in _both("held-out half, first stage", first) + _both(
            "held-out half, with second stage", second):
        log(line)
    return {"C": C, "corpus_weight": w, "serves": serves,
            "first_stage": {"real": first.real, "corpus": first.corpus},
            "second_stage": {"real": second.real, "corpus": second.corpus}}


def report_and_train(folder: Path, out: Path | None, log=print, *,
                     corpus_dir: Path | None = None,
                     setting: tuple[float, float] | None = None) -> dict:
    """Print the grouped CV and (``out``) write the weights. ``setting``: (C, corpus weight)
    given rather than chosen, and no partitions (a quick refit after a change of the reader
    or the candidates; the questions served, the calibration and the cut are still chosen by
    grouped CV over both collections)."""
    from robtui.evidence.ranker import load_ranker
    from robtui.evidence.training.corpus_oof import corpus_groups

    gold = load_gold(folder)
    ranker = load_ranker(first_stage_only=True)
    keys = list(QUESTIONS)
    log(f"reading {len(gold)} real articles ({folder}) ...")
    groups = gather(folder, gold, ranker, log)
    if corpus_dir is not None:
        groups += corpus_groups(corpus_dir, keys, log=log)
    real = [g for g in groups if not is_corpus(g)]
    corpus = [g for g in groups if is_corpus(g)]
    log(f"{len(real)} real (article, question) pairs, {sum(g.answerable for g in real)} "
        f"answerable; {len(corpus)} corpus pairs, {sum(g.answerable for g in corpus)} answerable")
    figs: dict = {}

    if setting is None:
        log("\nTwo partitions (articles at odd / even places of each collection): the setting "
            "chosen by grouped CV within one half, fitted on it, recall@1/3/5 on the other half")
        halves = _halves(groups)
        for h, (choose, test) in enumerate([(halves[0], halves[1]), (halves[1], halves[0])], 1):
            figs[f"partition_{h}"] = _partition(groups, keys, choose, test, h, log)
        log("\nAll articles: the setting by grouped CV (each real article alone, the corpus in "
            f"{CORPUS_FOLDS} folds)")
        (C, w), table = choose_setting(groups, keys, log=log)
    else:
        (C, w), table = setting, []
        log(f"\nSetting given: C={C}, corpus weight {w} (not chosen here; no partitions)")
        figs["setting_given"] = True
    oof = cv_scores(groups, keys, C, w)
    first = figures(groups, first_stage_scores(groups))
    every = figures(groups, oof)
    serves = serving(first, every, keys)
    served = figures(groups, oof, serves)
    log(f"chosen: C={C}, corpus weight {w}; serves {', '.join(serves)} (recall@1 + @3 raised on "
        "the real PDFs, not lowered on the corpus); the others keep the first stage")
    log("Grouped CV per question      real PDFs: first | second      corpus: first | second"
        "   (R@1 R@3 R@5)")
    for key in keys:
        row = f"  {key:<5}{'*' if key in serves else ' '}"
        for f_first, f_second, n in ((first.real_per_key, every.real_per_key, first.real_n),
                                     (first.corpus_per_key, every.corpus_per_key, first.corpus_n)):
            if key in f_first:
                row += (f" n={n[key]:<3}" + " ".join(f"{x:.2f}" for x in f_first[key]) + " |"
                        + " ".join(f"{x:.2f}" for x in f_second[key]) + "  ")
        log(row)
    for line in (_both("first stage alone", first) + _both("second stage everywhere", every)
                 + _both("second stage where it serves", served)):
        log(line)
    figs.update(C=C, corpus_weight=w, grid=table, serves=serves,
                first_stage={"real": first.real, "corpus": first.corpus},
                second_stage={"real": every.real, "corpus": every.corpus},
                served={"real": served.real, "corpus": served.corpus},
                per_question={k: {"real_first": first.real_per_key.get(k),
                                  "real_second": every.real_per_key.get(k),
                                  "corpus_first": first.corpus_per_key.get(k),
                                  "corpus_second": every.corpus_per_key.get(k)} for k in keys})

    platt, cut, flags = calibrate(groups, oof, log)
    figs.update(flags)
    figs["threshold"] = cut
    if out is not None:
        coef = fit(groups, keys, C, w)
        articles = list(dict.fromkeys(g.article for g in groups))
        provenance = {
            "trained_on": {"folder": "../shared/real-pdfs (gold.json)",
                           "articles": [a for a in articles if not a.startswith(CORPUS_PREFIX)],
                           "corpus": ("../shared/corpus (CONSORT-TM development split, "
                                      "Kilicoglu et al., J Biomed Inform 2021;116:103717): "
                                      "first-stage scores out of fold (training/corpus_oof.py)"
                                      if corpus else None),
                           "corpus_articles": [a[len(CORPUS_PREFIX):] for a in articles
                                               if a.startswith(CORPUS_PREFIX)],
                           "reader": "robtui.reading.reader.read_document"},
            "model": "pairwise logistic regression (scikit-learn lbfgs, no intercept) on "
                     "gold-minus-other differences within each (article, question); each real "
                     "group weighs 1, each corpus group the corpus weight; negatives: the "
                     f"{PAIR_HARD} best by each first-stage score and {PAIR_RANDOM} drawn",
            "features": feature_names(keys),
            "coefficients": dict(zip(feature_names(keys), [round(float(c), 4) for c in coef])),
            "C": C, "corpus_weight": w, "cross_validation": figs,
            "calibration": "Platt scaling on grouped-CV scores of both collections; threshold "
                           "by Youden's J averaged over the two collections, on every "
                           "question's calibrated top score (calibrate)",
            "first_stage": ranker.provenance.get("settings", {}),
            "date": dt.date.today().isoformat(), "seed": SEED,
        }
        save_adjustment(Adjustment(list(keys), coef, platt, cut, provenance, serves), out)
        log(f"wrote {out}")
    return figs


def main(argv: Sequence[str] | None = None) -> int:
    from robtui.errors import InputError, RobtuiError
    from robtui.evidence.training.corpus import default_corpus_dir

    p = argparse.ArgumentParser(prog="python -m robtui.evidence.training.real_gold",
                                description=__doc__.split("\n\n")[0])
    p.add_argument("--folder", type=Path, default=None,
                   help="folder holding the PDFs and gold.json (default ../shared/real-pdfs)")
    p.add_argument("--corpus", type=Path, default=None,
                   help="the development corpus (default ../shared/corpus or $ROBTUI_CORPUS)")
    p.add_argument("--no-corpus", action="store_true",
                   help="fit on the real PDFs alone (for comparison; its weights lower the "
                        "corpus figures)")
    p.add_argument("--out", type=Path, default=DEFAULT_ADJUSTMENT,
                   help="where to write the weights (default: the shipped file)")
    p.add_argument("--report-only", action="store_true",
                   help="print the cross-validation, write nothing")
    p.add_argument("--setting", nargs=2, type=float, metavar=("C", "WEIGHT"), default=None,
                   help="use this C and corpus weight (an earlier run's choice) instead of "
                        "choosing them, and skip the partitions: a quick refit")
    args = p.parse_args(argv)
    try:
        folder = args.folder or default_folder()
        if folder is None:
            raise InputError(f"no real-PDF folder found: pass --folder PATH or set ${FOLDER_ENV}")
        corpus = None if args.no_corpus else (args.corpus or default_corpus_dir())
        if corpus is None and not args.no_corpus:
            raise InputError("no corpus found: pass --corpus PATH (the folder holding "
                             "consort-tm/) or --no-corpus")
        report_and_train(folder, None if args.report_only else args.out, corpus_dir=corpus,
                         setting=tuple(args.setting) if args.setting else None)
    except RobtuiError as error:
        print(f"robtui: {error}", file=sys.stderr)
        return 2
    return 0


if __name__ == "__main__":
    sys.exit(main())
