"""A second stage over the ranker's scores, learned on real published PDFs (numpy only).

The corpus models see clean text with CONSORT annotations; real PDFs come with headings
the reader could not tell apart from prose, figure captions, table cells, lost sections, and
questions whose corpus items are wider than the question (item 12a labels every statistical
methods sentence, 2.6 wants the one on intention to treat). The second stage re-weighs a few
signals the first stage computes anyway: the question's own model, the transfer model, cue
coverage, similarity to the wording, block kind, length and top-level section. It is a
linear model (pairwise logistic regression within each article and question), so its
weights are plain numbers in ``weights/adjustment.npz``; training and its grouped
cross-validation are in ``evidence/training/real_gold.py``.

It applies only to documents of the kinds it was fitted and validated on (``domains``: the
PDFs robtui's PDF reader reads, ``Document.kind == "pdf"``). Text, Markdown, HTML and
registry records keep the first stage, validated on the corpus text, with its calibration and
"no sentence found" cut: fitted on the real PDFs' reviewer-quote gold, the second stage
lowered the corpus figures, whose labels are CONSORT items rather than the sentence a reviewer
quotes (DEVELOPERS.md, retraining; docs/evidence-ranker.md).
In its domain it re-ranks the questions it ``serves``; for its other questions the first
stage ranks, with scores recalibrated on the real PDFs (``first_platt``), so that every
question of the domain is read against one "no sentence found" cut (``threshold``).
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
from robtui.evidence.features import QUESTION_NAMES, SHARED_NAMES, SIGNAL_NAMES

DEFAULT_ADJUSTMENT = Path(__file__).with_name("weights") / "adjustment.npz"
ADJUSTMENT_FORMAT = 2  # 2: domains and the first stage's recalibration
CLIP = 12.0  # log-odds beyond this say nothing more about the order
_SHARED_USED = ("block=heading", "block=caption", "block=table", "short_sentence", "log_length",
                "registry_id", "after_heading", "top=abstract", "top=introduction",
                "top=methods", "top=results", "top=discussion", "top=other")
_QUESTION_USED = ("cue_best", "cue_full", "cue_window", "cue_heading", "question_similarity",
                  "question_similarity_window", "in_expected_section", "in_expected_top_section")
# signals the first stage does not read (features.SIGNAL_NAMES)
_SIGNALS_USED = ("caption_title",)
# Shared features, then per-question copies of the first stage's two scores and best cue.
BASE_NAMES: tuple[str, ...] = ("model", "transfer") + _QUESTION_USED + _SHARED_USED + _SIGNALS_USED
PER_QUESTION = ("model", "transfer", "cue_best")
_Q_COLS = [QUESTION_NAMES.index(n) for n in _QUESTION_USED]
_S_COLS = [SHARED_NAMES.index(n) for n in _SHARED_USED]
_G_COLS = [SIGNAL_NAMES.index(n) for n in _SIGNALS_USED]


def feature_names(keys: tuple[str, ...] | list[str]) -> list[str]:
    return list(BASE_NAMES) + [f"{name}|{key}" for key in keys for name in PER_QUESTION]


def base_features(model: np.ndarray, transfer: np.ndarray, question: np.ndarray,
                  shared: np.ndarray, signals: np.ndarray) -> np.ndarray:
    """(n, len(BASE_NAMES)) for one question: its first-stage log-odds (own model, transfer
    model), its question features, the layout features and the signals used."""
    return np.column_stack([np.clip(model, -CLIP, CLIP), np.clip(transfer, -CLIP, CLIP),
                            question[:, _Q_COLS], shared[:, _S_COLS], signals[:, _G_COLS]])


def design(base: np.ndarray, key: str, keys: list[str] | tuple[str, ...]) -> np.ndarray:
    """The full row of each sentence: the base block, and the per-question block of ``key``
    (zero for every other key, and everywhere when ``key`` has none)."""
    out = np.zeros((base.shape[0], len(BASE_NAMES) + len(PER_QUESTION) * len(keys)))
    out[:, : len(BASE_NAMES)] = base
    if key in keys:
        start = len(BASE_NAMES) + len(PER_QUESTION) * list(keys).index(key)
        out[:, start : start + len(PER_QUESTION)] = base[:, [BASE_NAMES.index(n)
                                                             for n in PER_QUESTION]]
    return out


@dataclass
class Adjustment:
    """Weights of the second stage; score = platt_a * (design @ coef) + platt_b (log-odds)."""

    keys: list[str]
    coef: np.ndarray
    platt: np.ndarray  # (2,)
    threshold: float  # "no sentence found" below this calibrated top score, in its domains
    provenance: dict = field(default_factory=dict)
    # the questions it re-ranks: those whose leave-one-article-out figures it raised (the
    # others keep the first stage); None: every key
    serves: list[str] | None = None
    # the document kinds (reading.document.DocumentKind) it applies to
    domains: tuple[str, ...] = ("pdf",)
    # in its domains, the first stage's log-odds of the keys it does not serve become
    # first_platt[0] * z + first_platt[1] (Platt scaling on the real PDFs); identity by default
    first_platt: np.ndarray = field(default_factory=lambda: np.array([1.0, 0.0]))

    def __post_init__(self):
        if self.serves is None:
            self.serves = list(self.keys)
        self.domains = tuple(self.domains)
        self.first_platt = np.asarray(self.first_platt, dtype=np.float64)

    def applies_to(self, origin: str) -> bool:
        """Whether a document of this kind gets the second stage (and its cut)."""
        return origin in self.domains

    def first_stage_log_odds(self, own: np.ndarray) -> np.ndarray:
        """The first stage's log-odds of a key not served, recalibrated for the domain."""
        return self.first_platt[0] * own + self.first_platt[1]

    def log_odds(self, key: str, model: np.ndarray, transfer: np.ndarray,
                 question: np.ndarray, shared: np.ndarray, signals: np.ndarray) -> np.ndarray:
        z = design(base_features(model, transfer, question, shared, signals), key,
                   self.keys) @ self.coef
        return self.platt[0] * z + self.platt[1]


def save_adjustment(adjustment: Adjustment, path: Path) -> None:
    from robtui.files import write_bytes_atomic, write_text_atomic

    buffer = io.BytesIO()
    np.savez_compressed(
        buffer, format_version=np.array([ADJUSTMENT_FORMAT]),
        names=np.frombuffer("\n".join(feature_names(adjustment.keys)).encode(), dtype=np.uint8),
        keys=np.frombuffer("\n".join(adjustment.keys).encode(), dtype=np.uint8),
        serves=np.frombuffer("\n".join(adjustment.serves).encode(), dtype=np.uint8),
        domains=np.frombuffer("\n".join(adjustment.domains).encode(), dtype=np.uint8),
        first_platt=adjustment.first_platt.astype(np.float64),
        coef=adjustment.coef.astype(np.float64), platt=adjustment.platt.astype(np.float64),
        threshold=np.array([adjustment.threshold]))
    write_bytes_atomic(path, buffer.getvalue())
    provenance = path.with_name(path.stem + "-provenance.json")
    write_text_atomic(provenance, json.dumps(adjustment.provenance, indent=2, sort_keys=True) + "\n")
    for written in (path, provenance):
        os.chmod(written, 0o644)


def load_adjustment(path: Path | None = None) -> Adjustment | None:
    """The shipped second stage (or the one at ``path``); None when the default file is
    absent (the first stage alone then ranks); ModelFileError when a file is unusable."""
    path = Path(path) if path else DEFAULT_ADJUSTMENT
    hint = ("retrain it with `python -m robtui.evidence.training.real_gold` (needs "
            "../shared/real-pdfs) or reinstall robtui")
    if not path.is_file():
        if path == DEFAULT_ADJUSTMENT:
            return None
        raise ModelFileError(f"{path}: no such second-stage weights file; {hint}")
    try:
        with np.load(path, allow_pickle=False) as npz:
            data = {name: npz[name] for name in npz.files}
        if int(data["format_version"][0]) != ADJUSTMENT_FORMAT:
            raise ValueError(f"format {int(data['format_version'][0])}, this robtui reads "
                             f"{ADJUSTMENT_FORMAT} (format 2 names the document kinds it "
                             "applies to)")
        keys = [k for k in data["keys"].tobytes().decode().split("\n") if k]
        serves = [k for k in data["serves"].tobytes().decode().split("\n") if k]
        if not set(serves) <= set(keys):
            raise ValueError("it serves questions it has no weights for")
        names = data["names"].tobytes().decode().split("\n")
        if names != feature_names(keys):
            raise ValueError("its features are not the ones this robtui computes")
        from robtui.reading.document import DOCUMENT_KINDS

        domains = tuple(k for k in data["domains"].tobytes().decode().split("\n") if k)
        if not domains or not set(domains) <= set(DOCUMENT_KINDS):
            raise ValueError(f"document kinds {list(domains)} are not among {list(DOCUMENT_KINDS)}")
        coef, platt, first_platt = data["coef"], data["platt"], data["first_platt"]
        if coef.shape != (len(names),) or platt.shape != (2,) or first_platt.shape != (2,) or not (
                np.all(np.isfinite(coef)) and np.all(np.isfinite(platt))
                and np.all(np.isfinite(first_platt))):
            raise ValueError("coefficients of the wrong shape or not finite")
        threshold = float(data["threshold"][0])
    except (OSError, ValueError, KeyError, EOFError, zipfile.BadZipFile,
            UnicodeDecodeError) as error:
        raise ModelFileError(f"{path}: the second-stage weights file is unusable ({error}); "
                             f"{hint}") from error
    prov = path.with_name(path.stem + "-provenance.json")
    try:
        provenance = json.loads(prov.read_text(encoding="utf-8")) if prov.is_file() else {}
    except (OSError, json.JSONDecodeError):
        provenance = {"problem": f"{prov.name} unreadable"}
    return Adjustment(keys, coef, platt, threshold, provenance, serves, domains, first_platt)
