"""The ranker's weights as plain arrays, and their NPZ file (no pickle) with a provenance file.

``weights/ranker.npz`` holds vocabularies (UTF-8 bytes), idf vectors and coefficients;
``weights/ranker-provenance.json`` says what they were trained on and how. Loading checks every
array's presence and shape and raises ModelFileError naming the file and how to retrain.
"""

from __future__ import annotations

import io
import json
import os
import zipfile
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from robtui.errors import ModelFileError
from robtui.evidence.features import QUESTION_NAMES, SHARED_NAMES
from robtui.evidence.tfidf import TfidfTable, vocabulary_from_bytes, vocabulary_to_bytes

WEIGHTS_DIR = Path(__file__).with_name("weights")
DEFAULT_WEIGHTS = WEIGHTS_DIR / "ranker.npz"
# 2: digits folded before TF-IDF, registry and heading features; 3: no position features
FORMAT_VERSION = 3
RETRAIN_HINT = "retrain it with `robtui train-ranker` (needs ../shared/corpus) or reinstall robtui"
GENERIC_NAMES: tuple[str, ...] = QUESTION_NAMES + ("block=heading", "log_length")


@dataclass
class RankerWeights:
    """Everything needed to score sentences; arrays only, so the file is plain data."""

    word: TfidfTable
    char: TfidfTable
    keys: list[str]  # question keys with a trained model, row order of the matrices
    lexical: np.ndarray  # (len(keys), n_word + n_char)
    shared: np.ndarray  # (len(keys), len(SHARED_NAMES))
    question: np.ndarray  # (len(keys), len(QUESTION_NAMES))
    intercept: np.ndarray  # (len(keys),)
    platt: np.ndarray  # (len(keys), 2): calibrated = sigmoid(a * z + b)
    generic: np.ndarray  # (len(GENERIC_NAMES),) transfer model for questions without training data
    generic_intercept: float
    generic_platt: np.ndarray  # (2,)
    no_evidence_threshold: float
    question_texts: dict[str, str] = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)
    generic_no_evidence_threshold: float | None = None  # None: use no_evidence_threshold
    warm_words: list[str] = field(default_factory=list)  # frequent words, cached at load
    # Stacking (optional): one model per CONSORT item over the same lexical and layout
    # features; its scores (sigmoid) and their neighbours feed the questions' models.
    item_keys: list[str] = field(default_factory=list)
    item_lexical: np.ndarray | None = None  # (len(item_keys), n_word + n_char)
    item_shared: np.ndarray | None = None  # (len(item_keys), len(SHARED_NAMES))
    item_intercept: np.ndarray | None = None  # (len(item_keys),)
    stacked: np.ndarray | None = None  # (len(keys), 4 * len(item_keys)); zero: item not used

    @property
    def n_items(self) -> int:
        return len(self.item_keys)


def save_weights(weights: RankerWeights, path: Path) -> None:
    """Write the NPZ and its provenance JSON beside it, both atomically."""
    from robtui.files import write_bytes_atomic, write_text_atomic

    arrays = {
        "format_version": np.array([FORMAT_VERSION]),
        "word_vocabulary": vocabulary_to_bytes(weights.word.vocabulary),
        "word_idf": weights.word.idf.astype(np.float64),
        "word_ngram_range": np.array(weights.word.ngram_range),
        "char_vocabulary": vocabulary_to_bytes(weights.char.vocabulary),
        "char_idf": weights.char.idf.astype(np.float64),
        "char_ngram_range": np.array(weights.char.ngram_range),
        "keys": np.frombuffer("\n".join(weights.keys).encode(), dtype=np.uint8),
        "lexical": weights.lexical.astype(np.float32),
        "shared": weights.shared.astype(np.float64),
        "question": weights.question.astype(np.float64),
        "intercept": weights.intercept.astype(np.float64),
        "platt": weights.platt.astype(np.float64),
        "generic": weights.generic.astype(np.float64),
        "generic_intercept": np.array([weights.generic_intercept]),
        "generic_platt": weights.generic_platt.astype(np.float64),
        "no_evidence_threshold": np.array([weights.no_evidence_threshold]),
        "generic_no_evidence_threshold": np.array(
            [weights.generic_no_evidence_threshold
             if weights.generic_no_evidence_threshold is not None
             else weights.no_evidence_threshold]
        ),
        "warm_words": np.frombuffer("\n".join(weights.warm_words).encode(), dtype=np.uint8),
        "question_texts": np.frombuffer(
            json.dumps(weights.question_texts, sort_keys=True).encode(), dtype=np.uint8
        ),
    }
    if weights.n_items:
        arrays.update({
            "item_keys": np.frombuffer("\n".join(weights.item_keys).encode(), dtype=np.uint8),
            "item_lexical": weights.item_lexical.astype(np.float32),
            "item_shared": weights.item_shared.astype(np.float64),
            "item_intercept": weights.item_intercept.astype(np.float64),
            "stacked": weights.stacked.astype(np.float64),
        })
    buffer = io.BytesIO()
    np.savez_compressed(buffer, **arrays)
    write_bytes_atomic(path, buffer.getvalue())
    provenance = dict(weights.provenance)
    provenance["weights_file"] = path.name
    write_text_atomic(
        provenance_path(path), json.dumps(provenance, indent=2, sort_keys=True) + "\n"
    )
    for written in (path, provenance_path(path)):  # package data: readable by everyone
        os.chmod(written, 0o644)


def provenance_path(path: Path) -> Path:
    return path.with_name(path.stem + "-provenance.json")


def load_weights(path: Path | None = None) -> RankerWeights:
    """Read weights; ModelFileError naming the file (and how to retrain) on any problem."""
    path = Path(path) if path else DEFAULT_WEIGHTS
    try:
        with np.load(path, allow_pickle=False) as npz:
            data = {name: npz[name] for name in npz.files}
    except FileNotFoundError as error:
        raise ModelFileError(f"{path}: the ranker's weights file is missing; {RETRAIN_HINT}") from error
    except (OSError, ValueError, EOFError, zipfile.BadZipFile, KeyError) as error:
        raise ModelFileError(
            f"{path}: the ranker's weights file is damaged ({error}); {RETRAIN_HINT}"
        ) from error
    try:
        return _from_arrays(data, path)
    except (KeyError, ValueError, IndexError, UnicodeDecodeError, TypeError) as error:
        raise ModelFileError(
            f"{path}: the ranker's weights file is incomplete or inconsistent ({error}); "
            f"{RETRAIN_HINT}"
        ) from error


def _check(condition: bool, what: str) -> None:
    if not condition:
        raise ValueError(what)


def _from_arrays(data: dict[str, np.ndarray], path: Path) -> RankerWeights:
    version = int(data["format_version"][0])
    _check(version == FORMAT_VERSION,
           f"weights format {version}, this robtui reads format {FORMAT_VERSION}")
    word_vocab = vocabulary_from_bytes(data["word_vocabulary"])
    char_vocab = vocabulary_from_bytes(data["char_vocabulary"])
    word = TfidfTable("word", tuple(int(x) for x in data["word_ngram_range"]), word_vocab,
                      data["word_idf"])
    char = TfidfTable("char_wb", tuple(int(x) for x in data["char_ngram_range"]), char_vocab,
                      data["char_idf"])
    _check(len(word_vocab) == len(word.idf), "word vocabulary and idf differ in length")
    _check(len(char_vocab) == len(char.idf), "char vocabulary and idf differ in length")
    keys_text = data["keys"].tobytes().decode()
    keys = keys_text.split("\n") if keys_text else []
    n = len(keys)
    lexical = data["lexical"].astype(np.float32)
    _check(lexical.shape == (n, len(word_vocab) + len(char_vocab)), "lexical weights shape")
    shared, question = data["shared"], data["question"]
    _check(shared.shape == (n, len(SHARED_NAMES)), "shared weights shape")
    _check(question.shape == (n, len(QUESTION_NAMES)), "question weights shape")
    _check(data["intercept"].shape == (n,) and data["platt"].shape == (n, 2), "intercepts")
    _check(data["generic"].shape == (len(GENERIC_NAMES),), "generic weights shape")
    for name in ("lexical", "shared", "question", "generic", "platt"):
        _check(bool(np.all(np.isfinite(data[name]))), f"{name} holds non-finite values")
    item_keys, items = [], {}
    if "item_keys" in data:
        item_keys = [k for k in data["item_keys"].tobytes().decode().split("\n") if k]
        m = len(item_keys)
        items = {name: data[name] for name in ("item_lexical", "item_shared", "item_intercept",
                                                "stacked")}
        _check(items["item_lexical"].shape == (m, lexical.shape[1]), "item lexical weights shape")
        _check(items["item_shared"].shape == (m, len(SHARED_NAMES)), "item shared weights shape")
        _check(items["item_intercept"].shape == (m,), "item intercepts shape")
        _check(items["stacked"].shape == (n, 4 * m), "stacked weights shape")
        for name, values in items.items():
            _check(bool(np.all(np.isfinite(values))), f"{name} holds non-finite values")
        items["item_lexical"] = items["item_lexical"].astype(np.float32)
    provenance = {}
    prov_file = provenance_path(path)
    if prov_file.is_file():
        try:
            provenance = json.loads(prov_file.read_text(encoding="utf-8"))
        except (OSError, json.JSONDecodeError):
            provenance = {"problem": f"{prov_file.name} unreadable"}
    return RankerWeights(
        word=word,
        char=char,
        keys=keys,
        lexical=lexical,
        shared=shared,
        question=question,
        intercept=data["intercept"],
        platt=data["platt"],
        generic=data["generic"],
        generic_intercept=float(data["generic_intercept"][0]),
        generic_platt=data["generic_platt"],
        no_evidence_threshold=float(data["no_evidence_threshold"][0]),
        question_texts=json.loads(data["question_texts"].tobytes().decode() or "{}"),
        provenance=provenance,
        generic_no_evidence_threshold=float(
            data.get("generic_no_evidence_threshold", data["no_evidence_threshold"])[0]
        ),
        warm_words=[w for w in data["warm_words"].tobytes().decode().split("\n") if w]
        if "warm_words" in data else [],
        item_keys=item_keys,
        **items,
    )
