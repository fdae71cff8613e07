"""Ranked suggestions kept on disk per document and effect, so a prepared report opens at once.

An entry holds, for every signalling question, the suggestions the workbench shows (the best
sentences in reading order) and the question's best score and no-evidence threshold, which the
review-wide evidence map reads. Entries are keyed by the document's sha256, the effect and a
fingerprint of the ranker (weights, cue lexicon, question wording, ranking and reading code),
so a retrained ranker or a changed reader never serves old suggestions. Like the document
cache, the folder is safe to delete: the next preparation ranks again.

Only the shipped model's suggestions are kept: a reviewer's own learned model (which changes as
they quote) is applied on opening, over the cached document.
"""

from __future__ import annotations

import functools
import hashlib
from pathlib import Path

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from robtui.reading.cache import cache_dir, reader_fingerprint

PREPARED_SCHEMA_VERSION = 2
SUGGESTIONS_KEPT = 5  # what the workbench shows per question
# Calibrated score from which a suggestion counts as strong evidence in the evidence map:
# more likely than not to carry the question's evidence (scores are Platt-calibrated, see
# docs/evidence-ranker.md). Our rule of thumb, no source.
STRONG_SCORE = 0.5
DEFAULT_SET = "rob2-parallel"  # what the ranker ranks when no question set is given


class PreparedSuggestion(BaseModel):
    model_config = ConfigDict(extra="forbid")

    sentence_index: int = Field(ge=0)
    start: int = Field(ge=0)
    end: int = Field(ge=0)
    page: int | None = None
    section: str
    score: float
    text: str


class PreparedQuestion(BaseModel):
    model_config = ConfigDict(extra="forbid")

    suggestions: list[PreparedSuggestion] = Field(default_factory=list)
    best: float | None = None  # best score of any suggestible sentence; None: nothing to rank
    threshold: float  # below it: "no sentence found" for this question
    trained: bool  # False: ranked by the transfer model (cue lexicon and wording)

    @property
    def band(self) -> str:
        """'strong', 'some' or 'none' (best below the no-evidence threshold)."""
        if self.best is None or self.best < self.threshold:
            return "none"
        return "strong" if self.best >= STRONG_SCORE else "some"


class PreparedRanking(BaseModel):
    """A document's suggestions for every question of one effect."""

    model_config = ConfigDict(extra="forbid")

    schema_version: int = PREPARED_SCHEMA_VERSION
    sha256: str = Field(pattern=r"^[0-9a-f]{64}$")
    effect: str
    question_set: str = DEFAULT_SET  # the question set whose questions were ranked
    ranker: str  # ranker_fingerprint() at preparation
    pages: int | None = None
    sentences: int = 0
    no_evidence_threshold: float  # the ranker's (trained questions)
    questions: dict[str, PreparedQuestion] = Field(default_factory=dict)


@functools.cache
def ranker_fingerprint() -> str:
    """A digest of everything the suggestions depend on besides the document itself."""
    from robtui.evidence.adjustment import DEFAULT_ADJUSTMENT
    from robtui.evidence.model import DEFAULT_WEIGHTS
    from robtui.paths import bundled_dir

    digest = hashlib.sha256(reader_fingerprint().encode())
    here = Path(__file__).resolve().parent
    parts = [DEFAULT_WEIGHTS, DEFAULT_ADJUSTMENT, here / "cues.toml"]
    parts += sorted(p for p in here.glob("*.py") if p.name not in {"train.py", "train_cli.py"})
    parts += sorted(bundled_dir("signalling_questions").glob("*.toml"))
    for part in parts:
        try:
            digest.update(part.read_bytes())
        except OSError:
            digest.update(b"-")
    return digest.hexdigest()[:12]


def prepared_dir() -> Path:
    return cache_dir() / "prepared"


def _entry(sha256: str, effect: str, question_set: str = DEFAULT_SET) -> Path:
    return prepared_dir() / (f"{sha256}-{effect}-{question_set}-{ranker_fingerprint()}"
                             f"-s{PREPARED_SCHEMA_VERSION}.json")


def has_prepared(sha256: str, effect: str, question_set: str = DEFAULT_SET) -> bool:
    return _entry(sha256, effect, question_set).is_file()


def load_prepared(sha256: str, effect: str, question_set: str = DEFAULT_SET
                  ) -> PreparedRanking | None:
    """The prepared suggestions for these bytes, effect and question set; None on a miss or a
    damaged entry."""
    try:
        entry = PreparedRanking.model_validate_json(
            _entry(sha256, effect, question_set).read_bytes())
    except (OSError, ValueError, ValidationError):
        return None
    if (entry.sha256, entry.effect, entry.question_set, entry.ranker) != (
            sha256, effect, question_set, ranker_fingerprint()):
        return None
    return entry


def store_prepared(entry: PreparedRanking) -> None:
    """Write an entry atomically; a cache that cannot be written is skipped (it only saves time)."""
    from robtui.files import write_text_atomic

    try:
        write_text_atomic(_entry(entry.sha256, entry.effect, entry.question_set),
                          entry.model_dump_json())
    except OSError:
        pass


def rank_for_preparation(ranker, document, effect: str, question_set=None) -> PreparedRanking:
    """Rank ``document`` for every question of ``effect`` (of ``question_set``, default the
    ranker's) as the workbench shows them."""
    ranking = ranker.rank(document, effect=effect, top=SUGGESTIONS_KEPT, spread=True,
                          question_set=question_set)
    questions = {}
    for qid, items in ranking.items():
        questions[qid] = PreparedQuestion(
            suggestions=[
                PreparedSuggestion(sentence_index=s.sentence_index, start=s.start, end=s.end,
                                   page=s.page, section=s.section, score=s.score, text=s.text)
                for s in items
            ],
            # reading order puts the best-scoring sentence first
            best=items[0].score if items else None,
            threshold=float(ranker.threshold_for(qid, effect, origin=document.kind)),
            trained=bool(ranker.is_trained(qid, effect)),
        )
    return PreparedRanking(
        sha256=document.sha256, effect=effect, ranker=ranker_fingerprint(),
        question_set=question_set.id if question_set is not None else DEFAULT_SET,
        pages=document.pages, sentences=len(document.sentences),
        no_evidence_threshold=float(ranker.no_evidence_threshold), questions=questions,
    )


def suggestions_of(entry: PreparedRanking) -> dict[str, list]:
    """The entry's suggestions as the ranker's Suggestion objects, per question id."""
    from robtui.evidence.ranker import Suggestion

    return {
        qid: [Suggestion(qid, s.sentence_index, s.start, s.end, s.page, s.section, s.score, s.text)
              for s in q.suggestions]
        for qid, q in entry.questions.items()
    }
