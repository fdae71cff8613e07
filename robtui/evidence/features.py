"""Sentence features of the evidence ranker, computed with numpy (no scikit-learn).

Blocks, in the order the weights are stored:
- word TF-IDF (uni- and bigrams) and character TF-IDF (char_wb 3-5 grams) of the sentence;
- shared layout features: canonical section (full label, its parent for a three-level label,
  and top level), block kind, length,
  registry identifier, first sentence after a heading (no position in the document: it stands in
  for the section in articles and misleads on protocols, registry records and short texts);
- per-question features: cue-lexicon coverage of the sentence and of its neighbours, TF-IDF
  cosine between the question's wording and the sentence (and its neighbours), and whether the
  sentence sits in a section where the question's evidence usually sits.

Beside them, signals only the second stage reads (``SIGNAL_NAMES``, evidence/adjustment.py): the
first stage's weights have no column for them, so adding one needs no retraining of it.
"""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from robtui.evidence.cues import CueEntry, CueMatcher, tokens
from robtui.evidence.sentence_kinds import DIGIT
from robtui.evidence.tfidf import SparseRows, TfidfTable
from robtui.reading.document import SECTION_LABELS, Sentence, top_section

BLOCKS = ("body", "heading", "caption", "table")
# Block kinds the weights have no column of, scored as the kind they are most like: a
# figure's text (flowchart boxes, chart labels) is read like a table's cells.
BLOCK_ALIASES = {"figure": "table"}
TOP_SECTIONS = tuple(dict.fromkeys(top_section(label) for label in SECTION_LABELS))
NEIGHBOUR_WINDOW = 2
# A trial registry's identifier as registries print it (formats from memory, no source):
# ClinicalTrials.gov NCT + 8 digits, ISRCTN + 8, ANZCTR ACTRN + 14, DRKS + 8, UMIN + 9,
# ChiCTR-..., CTRI/yyyy/mm/n, Netherlands NTR/NL + digits, IRCT..., PACTR + digits,
# EU Clinical Trials Register (EudraCT) yyyy-nnnnnn-nn.
REGISTRY_ID = re.compile(
    r"\b(?:NCT\s?\d{8}|ISRCTN\s?\d{8}|ACTRN\s?\d{14}|DRKS\s?\d{8}|UMIN\s?\d{9}"
    r"|ChiCTR[-A-Z]*\d{6,}|CTRI/\d{4}/\d+/\d+|NTR\s?\d{4,5}|NL\d{4,}|IRCT\w*\d{6,}"
    r"|PACTR\s?\d{12,}|\d{4}-\d{6}-\d{2})\b",
    re.IGNORECASE,
)

SHARED_NAMES: tuple[str, ...] = (
    tuple(f"section={label}" for label in SECTION_LABELS)
    + tuple(f"top={label}" for label in TOP_SECTIONS)
    + tuple(f"block={b}" for b in BLOCKS)
    + ("log_length", "short_sentence", "registry_id", "after_heading")
)
# Read by the second stage only (see the module docstring).
SIGNAL_NAMES: tuple[str, ...] = ("caption_title",)
QUESTION_NAMES: tuple[str, ...] = (
    "cue_best",
    "cue_full",
    "cue_previous",
    "cue_next",
    "cue_window",
    "cue_heading",
    "question_similarity",
    "question_similarity_window",
    "in_expected_section",
    "in_expected_top_section",
)


@dataclass
class DocumentFeatures:
    """Everything about a document's sentences that does not depend on the question."""

    word: SparseRows
    char: SparseRows
    shared: np.ndarray  # (n, len(SHARED_NAMES))
    coverage: np.ndarray  # (n, n_cues) cue coverage
    section_names: tuple[str, ...]  # the distinct sections, in order of first appearance
    section_codes: np.ndarray  # (n,) each sentence's index into section_names
    signals: np.ndarray  # (n, len(SIGNAL_NAMES)), for the second stage
    # the kind of report the sentences were read from (reading.document.DocumentKind): which
    # stages and cuts apply (evidence/adjustment.py); text unless the caller says otherwise
    origin: str = "txt"

    @property
    def n(self) -> int:
        return self.shared.shape[0]


# A table or figure title ("Table 2 Baseline characteristics", "Figure 1: Trial profile"), not
# a sentence about one ("Table 2 shows ...", "Figure 1 presents ..."): a verb of showing right
# after the number makes it prose (common English usage, no source). The reader does not always
# set a title apart as a caption (a title standing alone above a figure reads as body text).
CAPTION_TITLE = re.compile(
    r"^\s*(?:supplementary\s+|additional\s+)?(?:table|figure|fig\.?)\s*[a-z]?\d+[a-z]?[.:]?\s+"
    r"(?!(?:also\s+)?(?:shows?|presents?|summari[sz]es|lists?|gives?|describes?|displays?|"
    r"illustrates?|reports?|depicts?|provides?|contains?|compares?|details?|outlines?|"
    r"includes?|indicates?|demonstrates?|and|or|to|in|of|for|was|were|is|are)\b)",
    re.IGNORECASE)


def lexical_text(text: str) -> str:
    """A sentence as the TF-IDF tables see it: every digit folded to 0, so "n = 30" and
    "n = 45", or two registry numbers, share their n-grams (grouped CV: macro recall@3 up
    0.005 with the rest unchanged; see docs/evidence-ranker.md)."""
    return DIGIT.sub("0", text)


def shared_features(
    sentences: Sequence[Sentence], words: Sequence[list[str]] | None = None,
    folded: Sequence[str] | None = None,
) -> np.ndarray:
    """Layout features: section one-hots, block kind, length, registry number,
    first sentence after a heading. ``words`` (cues.tokens) and ``folded`` (lexical_text) of
    each sentence may be passed when already computed."""
    n = len(sentences)
    if words is None:
        words = [tokens(s.text) for s in sentences]
    if folded is None:
        folded = [lexical_text(s.text) for s in sentences]
    out = np.zeros((n, len(SHARED_NAMES)), dtype=np.float64)
    section_col = {label: i for i, label in enumerate(SECTION_LABELS)}
    base = len(SECTION_LABELS)
    top_col = {label: base + i for i, label in enumerate(TOP_SECTIONS)}
    base += len(TOP_SECTIONS)
    block_col = {b: base + i for i, b in enumerate(BLOCKS)}
    base += len(BLOCKS)
    for row, sentence in enumerate(sentences):
        label = sentence.section if sentence.section in section_col else "other"
        out[row, section_col[label]] = 1.0
        if label.count(".") == 2:  # a randomisation sub-item's section is also randomisation's
            out[row, section_col[label.rsplit(".", 1)[0]]] = 1.0
        out[row, top_col[top_section(label)]] = 1.0
        kind = BLOCK_ALIASES.get(sentence.block, sentence.block)
        out[row, block_col.get(kind, block_col["body"])] = 1.0
        count = len(words[row])
        out[row, base] = np.log1p(count) / 5.0
        out[row, base + 1] = 1.0 if count < 5 else 0.0
        # every identifier has four digits in a row: a substring test spares most regex runs
        has_id = "0000" in folded[row] and REGISTRY_ID.search(sentence.text)
        out[row, base + 2] = 1.0 if has_id else 0.0
        after = row > 0 and sentences[row - 1].block == "heading" and sentence.block != "heading"
        out[row, base + 3] = 1.0 if after else 0.0
    return out


def signal_features(sentences: Sequence[Sentence]) -> np.ndarray:
    """(n, len(SIGNAL_NAMES)): whether each sentence is a table or figure title
    (CAPTION_TITLE). The real PDFs' gold never quotes a title: a reviewer quotes the prose that
    reports the numbers or the balance, while the corpus annotates titles of flow diagrams and
    baseline tables as evidence (items 13a, 15), so only the second stage, fitted on the real
    PDFs, reads this."""
    out = np.zeros((len(sentences), len(SIGNAL_NAMES)))
    for row, sentence in enumerate(sentences):
        out[row, 0] = 1.0 if CAPTION_TITLE.match(sentence.text) else 0.0
    return out


def document_features(
    sentences: Sequence[Sentence], word: TfidfTable, char: TfidfTable, matcher: CueMatcher,
    origin: str = "txt",
) -> DocumentFeatures:
    folded = [lexical_text(s.text) for s in sentences]
    words = [tokens(s.text) for s in sentences]  # cues are matched on the text as written
    names: dict[str, int] = {}
    codes = np.fromiter((names.setdefault(s.section, len(names)) for s in sentences),
                        dtype=np.int64, count=len(sentences))
    return DocumentFeatures(
        word=word.transform(folded),
        char=char.transform(folded),
        shared=shared_features(sentences, words, folded),
        coverage=matcher.coverage(words),
        section_names=tuple(names),
        section_codes=codes,
        signals=signal_features(sentences),
        origin=origin,
    )


def _shift(values: np.ndarray, by: int) -> np.ndarray:
    out = np.zeros_like(values)
    if by > 0:
        out[by:] = values[:-by]
    elif by < 0:
        out[:by] = values[-by:]
    return out


def _window_max(values: np.ndarray, width: int) -> np.ndarray:
    """Per row, the largest value within ``width`` rows either side, itself included."""
    return np.maximum(values, neighbour_max(values, width))


def _in_sections(
    names: Sequence[str], codes: np.ndarray, expected: tuple[str, ...]
) -> tuple[np.ndarray, np.ndarray]:
    """Per sentence, 1 when its section (``names[codes]``) is one of ``expected`` (or under
    one), and 1 when its top-level section is one of theirs."""
    wanted_tops = {top_section(e) for e in expected}
    exact = np.array([float(any(label == e or label.startswith(e + ".") for e in expected))
                      for label in names])
    top = np.array([float(top_section(label) in wanted_tops) for label in names])
    return exact[codes], top[codes]


def neighbour_max(values: np.ndarray, width: int = NEIGHBOUR_WINDOW) -> np.ndarray:
    """Per row, the largest value among the ``width`` sentences before and after (not itself)."""
    out = np.zeros_like(values)
    for by in range(1, width + 1):
        out = np.maximum(out, np.maximum(_shift(values, by), _shift(values, -by)))
    return out


STACK_PARTS = ("score", "previous", "next", "window")


def stacked_features(item_scores: np.ndarray) -> np.ndarray:
    """(n, 4 * n_items): each CONSORT item model's score (0..1) of the sentence, of the previous
    and next sentences, and the best within two sentences either side (item-major order).

    Computed for one document at a time, at training and when ranking alike.
    """
    n, k = item_scores.shape
    parts = np.stack(
        [item_scores, _shift(item_scores, 1), _shift(item_scores, -1), neighbour_max(item_scores)],
        axis=2,
    )  # (n, items, parts): item-major once flattened
    return parts.reshape(n, len(STACK_PARTS) * k)


def under_heading(values: np.ndarray, is_heading: np.ndarray) -> np.ndarray:
    """Per row, the value (or row of values) of the nearest heading above it (0 before the
    first heading)."""
    n = len(values)
    last = np.where(is_heading, np.arange(n), -1)
    last = np.maximum.accumulate(_shift(last + 1, 1)) - 1  # nearest heading strictly above
    above = values[np.maximum(last, 0)]
    return np.where((last >= 0).reshape((-1,) + (1,) * (values.ndim - 1)), above, 0.0)


def question_features(
    doc: DocumentFeatures, key: str, entry: CueEntry | None, matcher: CueMatcher,
    similarity: np.ndarray,
) -> np.ndarray:
    """(n, len(QUESTION_NAMES)) features of every sentence for one question.

    ``similarity`` is the cosine of each sentence with the question's wording.
    """
    return question_feature_blocks(doc, [key], [entry], matcher, similarity[:, None])[key]


def question_feature_blocks(
    doc: DocumentFeatures, keys: Sequence[str], entries: Sequence[CueEntry | None],
    matcher: CueMatcher, similarity: np.ndarray,
) -> dict[str, np.ndarray]:
    """Per key, the (n, len(QUESTION_NAMES)) features of every sentence, computed for all
    keys at once (one shift per neighbour for the whole (n, keys) matrix).

    ``similarity`` is (n, len(keys)): each sentence's cosine with each question's wording.
    """
    n, k = doc.n, len(keys)
    if n == 0:
        return {key: np.zeros((0, len(QUESTION_NAMES))) for key in keys}
    best, full = np.zeros((n, k)), np.zeros((n, k))
    in_exact, in_top = np.zeros((n, k)), np.zeros((n, k))
    for j, (key, entry) in enumerate(zip(keys, entries)):
        best[:, j], full[:, j] = matcher.key_features(doc.coverage, key)
        in_exact[:, j], in_top[:, j] = _in_sections(
            doc.section_names, doc.section_codes, entry.sections if entry else ())
    is_heading = doc.shared[:, SHARED_NAMES.index("block=heading")] > 0
    stacked = np.stack(
        [
            best,
            full,
            _shift(best, 1),
            _shift(best, -1),
            _window_max(best, NEIGHBOUR_WINDOW),
            under_heading(best, is_heading),
            similarity,
            _window_max(similarity, NEIGHBOUR_WINDOW),
            in_exact,
            in_top,
        ],
        axis=2,
    )  # (n, keys, features)
    return {key: stacked[:, j, :] for j, key in enumerate(keys)}
