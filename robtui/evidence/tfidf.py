"""TF-IDF applied with numpy alone, reproducing scikit-learn's TfidfVectorizer transform.

Training fits scikit-learn's ``TfidfVectorizer`` (lowercase, default token pattern, smooth idf,
sublinear tf, l2 norm) and ships its vocabulary and idf; at suggest time this module turns
text into the same vectors without importing scikit-learn (whose import alone costs over a
second). ``tests/evidence/test_tfidf.py`` checks equality with scikit-learn on sample text.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

import numpy as np

# scikit-learn's default token_pattern for the "word" analyzer is r"(?u)\b\w\w+\b". Scanning
# left to right, findall finds the same maximal runs of two or more word characters without
# the boundary tests, which costs a third less (tests/evidence/test_tfidf.py checks equality).
WORD_TOKEN = re.compile(r"\w\w+")


@dataclass(frozen=True)
class SparseRows:
    """A CSR-like matrix: row i holds ``indices[indptr[i]:indptr[i+1]]`` with ``data``."""

    indptr: np.ndarray
    indices: np.ndarray
    data: np.ndarray
    n_cols: int

    @property
    def n_rows(self) -> int:
        return len(self.indptr) - 1

    def dot(self, weights: np.ndarray) -> np.ndarray:
        """``self @ weights.T`` for a dense (n_models, n_cols) weight matrix -> (n_rows, n_models)."""
        return self.dot_columns(np.ascontiguousarray(weights.T))

    def dot_columns(self, columns: np.ndarray, chunk: int = 8192) -> np.ndarray:
        """``self @ columns`` for a dense (n_cols, n_models) matrix (rows gathered contiguously).

        Rows are taken in blocks of about ``chunk`` stored values, so the gathered block stays
        small (in cache) however many models there are.
        """
        out = np.zeros((self.n_rows, columns.shape[1]), dtype=np.float64)
        if len(self.indices) == 0:
            return out
        indptr = self.indptr
        row = 0
        while row < self.n_rows:
            end = int(np.searchsorted(indptr, indptr[row] + chunk, side="right")) - 1
            end = min(max(end, row + 1), self.n_rows)
            lo, hi = int(indptr[row]), int(indptr[end])
            if hi > lo:
                products = columns[self.indices[lo:hi]]
                products *= self.data[lo:hi, None].astype(columns.dtype)
                starts = indptr[row:end] - lo
                nonempty = np.diff(indptr[row : end + 1]) > 0
                out[row:end][nonempty] = np.add.reduceat(products, starts[nonempty], axis=0)
            row = end
        return out

    def to_scipy(self):
        """The same matrix as scipy CSR (training and tests only)."""
        from scipy.sparse import csr_matrix

        return csr_matrix((self.data, self.indices, self.indptr), shape=(self.n_rows, self.n_cols))


def word_ngrams(text: str, ngram_range: tuple[int, int]) -> list[str]:
    """scikit-learn's word analyzer: lowercase, default token pattern, space-joined n-grams."""
    tokens = WORD_TOKEN.findall(text.lower())
    low, high = ngram_range
    grams: list[str] = list(tokens) if low == 1 else []
    for n in range(max(low, 2), min(high, len(tokens)) + 1):
        # zip of n shifted views joins each window in C (a generator of slices is 3x slower)
        grams.extend(map(" ".join, zip(*(tokens[i:] for i in range(n)))))
    return grams


def char_wb_ngrams_of_word(word: str, ngram_range: tuple[int, int]) -> list[str]:
    """scikit-learn's char_wb n-grams of one whitespace-free word (padded with spaces)."""
    padded = f" {word} "
    length = len(padded)
    grams = []
    for n in range(ngram_range[0], ngram_range[1] + 1):
        offset = 0
        grams.append(padded[offset : offset + n])
        while offset + n < length:
            offset += 1
            grams.append(padded[offset : offset + n])
        if offset == 0:  # a short word is counted once, as scikit-learn does
            break
    return grams


@dataclass
class TfidfTable:
    """A fitted vocabulary and idf, applied as scikit-learn's transform would be."""

    analyzer: str  # "word" or "char_wb"
    ngram_range: tuple[int, int]
    vocabulary: dict[str, int]
    idf: np.ndarray
    sublinear_tf: bool = True
    _word_cache: dict[str, np.ndarray] = field(default_factory=dict, repr=False)

    def _word_hits(self, texts: list[str]) -> tuple[np.ndarray, list[int]]:
        """Vocabulary indices of every text's word n-grams, flat, and how many per text."""
        get = self.vocabulary.get
        flat: list[int] = []
        lengths = []
        for text in texts:
            found = [i for i in map(get, word_ngrams(text, self.ngram_range)) if i is not None]
            lengths.append(len(found))
            flat.extend(found)
        return np.fromiter(flat, dtype=np.int64, count=len(flat)), lengths

    def _char_wb_hits(self, texts: list[str]) -> tuple[np.ndarray, list[int]]:
        """The same for char_wb n-grams, gathered per word from a cache of index arrays."""
        cache = self._word_cache
        pieces: list[np.ndarray] = []
        lengths = []
        for text in texts:
            n = 0
            for word in text.lower().split():
                hit = cache.get(word)
                if hit is None:
                    hit = np.asarray(self._char_hits(word), dtype=np.int64)
                    if len(cache) < 200_000:
                        cache[word] = hit
                pieces.append(hit)
                n += len(hit)
            lengths.append(n)
        flat = np.concatenate(pieces) if pieces else np.zeros(0, dtype=np.int64)
        return flat, lengths

    def _char_hits(self, word: str) -> list[int]:
        """Vocabulary indices of a word's char_wb n-grams (same n-grams as scikit-learn's)."""
        padded = f" {word} "
        length = len(padded)
        low, high = self.ngram_range
        if length < high:  # a short word: scikit-learn's loop, which counts it once
            grams = char_wb_ngrams_of_word(word, self.ngram_range)
        else:
            grams = [padded[i : i + n] for n in range(low, high + 1) for i in range(length - n + 1)]
        get = self.vocabulary.get
        return [i for i in map(get, grams) if i is not None]

    def transform(self, texts: list[str]) -> SparseRows:
        """TF-IDF rows (sublinear tf, idf, l2-normalised) for ``texts``."""
        n_cols = len(self.idf)
        if self.analyzer == "word":
            flat, lengths = self._word_hits(texts)
        else:
            flat, lengths = self._char_wb_hits(texts)
        # (row, column) pairs as one integer key; 32 bits sort about twice as fast when they fit
        key_type = np.int32 if len(texts) * n_cols < 2**31 else np.int64
        rows = np.repeat(np.arange(len(texts), dtype=key_type), lengths)
        keys, counts = np.unique(rows * key_type(n_cols) + flat.astype(key_type),
                                 return_counts=True)
        row_of, col_of = np.divmod(keys.astype(np.int64), n_cols)
        tf = counts.astype(np.float64)
        if self.sublinear_tf:
            tf = np.log(tf) + 1.0
        values = tf * self.idf[col_of]
        norms = np.sqrt(np.bincount(row_of, weights=values * values, minlength=len(texts)))
        if len(values):
            values = values / norms[row_of]
        indptr = np.zeros(len(texts) + 1, dtype=np.int64)
        np.cumsum(np.bincount(row_of, minlength=len(texts)), out=indptr[1:])
        return SparseRows(indptr, col_of, values, n_cols)


def vocabulary_to_bytes(vocabulary: dict[str, int]) -> np.ndarray:
    """The vocabulary in index order as UTF-8 bytes joined by newlines (plain data for NPZ)."""
    terms = sorted(vocabulary, key=vocabulary.__getitem__)
    if any("\n" in t for t in terms):
        raise ValueError("a vocabulary term contains a newline")
    return np.frombuffer("\n".join(terms).encode("utf-8"), dtype=np.uint8)


def vocabulary_from_bytes(raw: np.ndarray) -> dict[str, int]:
    """Inverse of :func:`vocabulary_to_bytes`."""
    text = raw.tobytes().decode("utf-8")
    terms = text.split("\n") if text else []
    return dict(zip(terms, range(len(terms))))
