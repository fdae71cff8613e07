"""The corpus articles as the second stage sees them: first-stage scores out of fold.

The second stage (evidence/adjustment.py) re-weighs the first stage's scores. On the corpus
the shipped first stage has seen every article's labels, so its in-sample scores are far
better than on an unseen article and would teach the second stage to trust them blindly.
Here each corpus article is scored by a first stage trained without it: the folds of
``robtui bench evidence`` (GroupKFold by article over the articles in corpus order, the
shipped first stage's settings), so the second stage is fitted on the very scores that
benchmark evaluates it on. Groups are cached (plain arrays) under the document cache folder,
keyed by the corpus files, the settings and the code of the evidence and reading packages.
Corpus: Kilicoglu et al., J Biomed Inform 2021;116:103717 (CONSORT-TM development split).
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Sequence
from dataclasses import asdict
from pathlib import Path

import numpy as np

CORPUS_PREFIX = "corpus:"  # article names of corpus groups, apart from the real PDFs' file names
FOLDS = 5  # as `robtui bench evidence` (its default)
# modules that only consume these groups (the second stage's own training, benchmarks' figures)
_NOT_FINGERPRINTED = frozenset({"real_gold.py", "metrics.py", "cli.py"})


def _fingerprint(corpus_dir: Path, folds: int, articles: int | None, keys: Sequence[str],
                 settings) -> str:
    from robtui import evidence, reading

    digest = hashlib.sha256(json.dumps([folds, articles, list(keys), asdict(settings)],
                                       sort_keys=True, default=str).encode())
    for package in (evidence, reading):
        root = Path(package.__file__).resolve().parent
        for source in sorted(p for p in root.rglob("*") if p.suffix in (".py", ".toml")):
            if "weights" in source.parts or source.name in _NOT_FINGERPRINTED:
                continue
            digest.update(source.relative_to(root).as_posix().encode())
            digest.update(source.read_bytes())
    for source in sorted((Path(corpus_dir) / "consort-tm").glob("*.xml")) + [
            Path(corpus_dir) / "rob2-consort-map.json"]:
        digest.update(source.name.encode())
        digest.update(hashlib.sha256(source.read_bytes()).digest())
    return digest.hexdigest()[:16]


def _cache_path(fingerprint: str) -> Path:
    from robtui.reading.cache import cache_dir

    return cache_dir().parent / "second-stage" / f"corpus-oof-{fingerprint}.npz"


def _save(path: Path, groups) -> None:
    import io

    from robtui.files import write_bytes_atomic

    buffer = io.BytesIO()
    np.savez_compressed(
        buffer,
        names=np.frombuffer("\n".join(f"{g.article}\t{g.key}" for g in groups).encode(),
                            dtype=np.uint8),
        sizes=np.array([len(g.labels) for g in groups]),
        base=np.vstack([g.base for g in groups]),
        labels=np.concatenate([g.labels for g in groups]),
        keep=np.concatenate([g.keep for g in groups]))
    path.parent.mkdir(parents=True, exist_ok=True)
    write_bytes_atomic(path, buffer.getvalue())


def _load(path: Path):
    import zipfile

    from robtui.evidence.training.real_gold import Group

    try:
        with np.load(path, allow_pickle=False) as npz:
            names = npz["names"].tobytes().decode().split("\n")
            sizes, base, labels, keep = npz["sizes"], npz["base"], npz["labels"], npz["keep"]
    except (OSError, ValueError, KeyError, EOFError, zipfile.BadZipFile, UnicodeDecodeError):
        return None  # a damaged entry is computed again
    bounds = np.concatenate([[0], np.cumsum(sizes)])
    out = []
    for i, name in enumerate(names):
        article, key = name.split("\t")
        rows = slice(bounds[i], bounds[i + 1])
        out.append(Group(article, key, base[rows], labels[rows].astype(bool),
                         keep[rows].astype(bool)))
    return out


def oof_groups(ranker, doc, keys: Sequence[str], texts: dict[str, str]) -> list:
    """One corpus article's groups (real_gold.Group) under ``ranker``'s first stage (one
    trained without the article), for the ``keys`` its mapping labels."""
    from robtui.evidence.adjustment import base_features
    from robtui.evidence.ranker import suggestible
    from robtui.evidence.training.real_gold import Group

    wanted = [k for k in keys if k in doc.labels]
    feats = ranker.features(doc.document)
    first = ranker.first_stage(feats, wanted, [texts.get(k, "") for k in wanted])
    keep = suggestible(doc.document.sentences)
    return [Group(CORPUS_PREFIX + doc.article_id, key,
                  base_features(own, transfer, qf, feats.shared),
                  doc.labels[key].astype(bool), keep)
            for key, (own, transfer, qf) in first.items()]


def corpus_groups(corpus_dir: Path, keys: Sequence[str], *, folds: int = FOLDS,
                  articles: int | None = None, use_cache: bool = True, log=print) -> list:
    """Every (corpus article, key) with the mapping's labels and the base features of a first
    stage trained on the other folds (real_gold.Group; article ``corpus:<id>``)."""
    from sklearn.model_selection import GroupKFold

    from robtui.evidence.ranker import Ranker
    from robtui.evidence.training.corpus import load_corpus, load_mapping
    from robtui.evidence.training.corpus_docs import labelled_documents
    from robtui.evidence.training.train import (
        fit_weights,
        prepare,
        question_texts,
        shipped_settings,
    )

    settings = shipped_settings()
    mapping = load_mapping(corpus_dir)
    wanted = [k for k in keys if k in mapping.questions]
    path = _cache_path(_fingerprint(corpus_dir, folds, articles, wanted, settings))
    if use_cache and path.is_file():
        cached = _load(path)
        if cached is not None:
            log(f"corpus: out-of-fold first-stage scores from {path}")
            return cached
    corpus = load_corpus(corpus_dir)
    corpus = corpus[:articles] if articles else corpus
    mapped = list(mapping.questions)
    texts = question_texts()
    docs = labelled_documents(corpus, mapping, "txt")
    log(f"corpus: {len(docs)} articles, first stage trained on {folds - 1} of {folds} "
        "folds for each (grouped by article, as `robtui bench evidence`) ...")
    found: dict[int, list] = {}
    split = GroupKFold(n_splits=folds).split(docs, groups=np.arange(len(docs)))
    for fold, (train, test) in enumerate(split, 1):
        train_docs = [docs[i] for i in train]
        prep = prepare(train_docs, mapped, settings, texts)
        ranker = Ranker(fit_weights(train_docs, mapped, settings, texts, prepared=prep,
                                    item_map=mapping.questions))
        for i in test:
            found[int(i)] = oof_groups(ranker, docs[i], wanted, texts)
        log(f"  fold {fold}/{folds} done")
    groups = [g for i in sorted(found) for g in found[i]]
    if use_cache:
        _save(path, groups)
    return groups
