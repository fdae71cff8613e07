"""The cue lexicon (cues.toml) and its fuzzy, word-by-word matching against sentences.

A cue is a short phrase ("sealed opaque envelopes"). Each of its words is matched to the
sentence's words: exactly for short words, by rapidfuzz's normalised Indel ratio (>= 80) for
words of five letters or more, so "randomized" meets "randomised" and "concealment" meets
"concealed". A cue's coverage in a sentence is the mean, over its words, of the best match.
"""

from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from robtui.errors import ModelFileError
from robtui.evidence.sentence_kinds import NOT_EVIDENCE

CUES_PATH = Path(__file__).with_name("cues.toml")
TOKEN = re.compile(r"[a-z0-9]+")
FUZZY_MIN_LENGTH = 5
FUZZY_CUTOFF = 80.0  # rapidfuzz ratio, 0..100; chosen by eye on spelling variants (no source)


@dataclass(frozen=True)
class CueEntry:
    key: str
    cues: tuple[str, ...]
    sections: tuple[str, ...]
    same_as: str | None = None
    # kinds of sentence never suggested for the question (sentence_kinds.NOT_EVIDENCE names): the
    # lexicon's `never_evidence` for every question, then the entry's own `never`
    never: tuple[str, ...] = ()


def model_key(question_id: str, effect: str = "assignment") -> str:
    """The lexicon/model key of a question: domain 2 under the adhering effect is prefixed."""
    if effect == "adhering" and question_id.split(".", 1)[0] == "2":
        return f"adhering:{question_id}"
    return question_id


def load_cues(path: Path | None = None) -> dict[str, CueEntry]:
    """Read the cue lexicon; ModelFileError naming the file when it cannot be used."""
    path = path or CUES_PATH
    try:
        raw = tomllib.loads(path.read_text(encoding="utf-8"))
        everywhere = tuple(str(k) for k in raw.get("never_evidence", ()))
        entries = {}
        for key, body in raw["questions"].items():
            entries[key] = CueEntry(
                key=key,
                cues=tuple(str(c) for c in body.get("cues", ())),
                sections=tuple(str(s) for s in body.get("sections", ())),
                same_as=body.get("same_as"),
                never=tuple(str(k) for k in body.get("never", ())),
            )
    except (OSError, tomllib.TOMLDecodeError, KeyError, TypeError, AttributeError) as error:
        raise ModelFileError(
            f"{path}: the cue lexicon cannot be read ({error}); restore it from the robtui "
            "package (reinstall robtui or `git checkout` the file)"
        ) from error
    unknown = sorted({k for k in everywhere if k not in NOT_EVIDENCE}
                     | {k for e in entries.values() for k in e.never if k not in NOT_EVIDENCE})
    if unknown:
        raise ModelFileError(
            f"{path}: unknown kind(s) of sentence in `never`/`never_evidence`: "
            f"{', '.join(unknown)}; known: {', '.join(NOT_EVIDENCE)}")
    # An entry that only says same_as borrows the other entry's cues, sections and kinds.
    for key, entry in list(entries.items()):
        if entry.same_as and entry.same_as in entries:
            base = entries[entry.same_as]
            entries[key] = CueEntry(
                key,
                entry.cues or base.cues,
                entry.sections or base.sections,
                entry.same_as,
                entry.never or base.never,
            )
    return {key: replace(entry, never=tuple(dict.fromkeys(everywhere + entry.never)))
            for key, entry in entries.items()}


def tokens(text: str) -> list[str]:
    return TOKEN.findall(text.lower())


class CueMatcher:
    """Coverage of every cue of the lexicon in each sentence, computed in one pass."""

    def __init__(self, entries: dict[str, CueEntry]):
        self.keys = list(entries)
        self.cue_owner: list[str] = []
        words: dict[str, int] = {}
        cue_words: list[list[int]] = []
        for key, entry in entries.items():
            for cue in entry.cues:
                ids = [words.setdefault(w, len(words)) for w in tokens(cue)]
                if ids:
                    cue_words.append(ids)
                    self.cue_owner.append(key)
        self.words = list(words)
        self.word_index = words
        self.long_words = [w for w in self.words if len(w) >= FUZZY_MIN_LENGTH]
        weights = np.zeros((len(cue_words), len(self.words)), dtype=np.float64)
        for c, ids in enumerate(cue_words):
            for i in ids:
                weights[c, i] += 1.0 / len(ids)
        self.weights = weights
        self.owner_rows = {
            key: np.array([c for c, k in enumerate(self.cue_owner) if k == key], dtype=np.int64)
            for key in self.keys
        }
        self._cache: dict[str, tuple[np.ndarray, np.ndarray]] = {}

    def _resolve(self, new_words: list[str]) -> None:
        from rapidfuzz import fuzz, process

        long_new = [w for w in new_words if len(w) >= FUZZY_MIN_LENGTH]
        fuzzy: dict[str, list[tuple[int, float]]] = {}
        if long_new and self.long_words:
            scores = process.cdist(
                long_new, self.long_words, scorer=fuzz.ratio, score_cutoff=FUZZY_CUTOFF,
                dtype=np.uint8, workers=-1,
            )
            for r, word in enumerate(long_new):
                cols = np.nonzero(scores[r])[0]
                fuzzy[word] = [
                    (self.word_index[self.long_words[c]], float(scores[r, c]) / 100.0) for c in cols
                ]
        for word in new_words:
            matches = dict(fuzzy.get(word, ()))
            exact = self.word_index.get(word)
            if exact is not None:
                matches[exact] = 1.0
            self._cache[word] = (
                np.fromiter(matches.keys(), dtype=np.int64, count=len(matches)),
                np.fromiter(matches.values(), dtype=np.float64, count=len(matches)),
            )

    def coverage(self, sentences: list[list[str]]) -> np.ndarray:
        """(n_sentences, n_cues): mean best word match of each cue in each sentence."""
        new = {w for words in sentences for w in words if w not in self._cache}
        if new:
            self._resolve(sorted(new))
        sim = np.zeros((len(sentences), len(self.words)), dtype=np.float64)
        cache = self._cache
        hits = [(row, cache[w]) for row, words in enumerate(sentences) for w in set(words)
                if len(cache[w][0])]
        if hits:
            rows = np.repeat([r for r, _ in hits], [len(m[0]) for _, m in hits])
            cols = np.concatenate([m[0] for _, m in hits])
            vals = np.concatenate([m[1] for _, m in hits])
            np.maximum.at(sim, (rows, cols), vals)
        return sim @ self.weights.T

    def key_features(self, coverage: np.ndarray, key: str) -> tuple[np.ndarray, np.ndarray]:
        """Per sentence: best cue coverage of ``key`` and the share of its cues fully present."""
        rows = self.owner_rows.get(key)
        if rows is None or len(rows) == 0:
            zeros = np.zeros(coverage.shape[0])
            return zeros, zeros
        sub = coverage[:, rows]
        best = sub.max(axis=1)
        full = np.minimum((sub >= 0.99).sum(axis=1), 3) / 3.0
        return best, full
