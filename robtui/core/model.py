"""The review's records (pydantic): what is stored on disk and passed between front ends.

Judgement codes are lower-case identifiers: ``low``, ``some_concerns``, ``high``; a domain
whose required questions are not all answered is ``incomplete``. Responses are the method's
codes: Y, PY, PN, N, NI, and NA for questions asked "if applicable".
"""

from __future__ import annotations

from datetime import UTC, datetime
from typing import Annotated, Literal

from pydantic import (
    BaseModel,
    ConfigDict,
    Field,
    StringConstraints,
    field_validator,
    model_validator,
)

from robtui.core.questions import DEFAULT_EFFECT, EFFECT_ID_PATTERN

SCHEMA_VERSION = 1

Response = Literal["Y", "PY", "PN", "N", "NI", "NA"]
RESPONSES: tuple[str, ...] = ("Y", "PY", "PN", "N", "NI", "NA")
Judgement = Literal["low", "some_concerns", "high"]
JUDGEMENTS: tuple[str, ...] = ("low", "some_concerns", "high")
Proposal = Literal["low", "some_concerns", "high", "incomplete"]
# An effect of interest: an id its question set declares (QuestionSet.effects()); checked
# against the study's set where it is used. Records that name none were made for the effect
# of assignment (questions.DEFAULT_EFFECT).
Effect = Annotated[str, StringConstraints(pattern=f"^{EFFECT_ID_PATTERN}$")]
# The optional predicted direction of bias of the RoB 2 form, per domain and overall (option
# wording of the RoB 2 template of 22 August 2019, from memory).
Direction = Literal[
    "na",
    "favours_experimental",
    "favours_comparator",
    "towards_null",
    "away_from_null",
    "unpredictable",
]
DIRECTION_LABELS: dict[str, str] = {
    "na": "NA",
    "favours_experimental": "Favours experimental",
    "favours_comparator": "Favours comparator",
    "towards_null": "Towards null",
    "away_from_null": "Away from null",
    "unpredictable": "Unpredictable",
}
Status = Literal["draft", "complete"]
OVERALL = "overall"

_ID_PATTERN = r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$"


def utc_now() -> datetime:
    """Current time in UTC, to the second (stable in files)."""
    return datetime.now(UTC).replace(microsecond=0)


class Record(BaseModel):
    """Base: unknown fields are refused, so a typo in a hand-edited file is reported."""

    model_config = ConfigDict(extra="forbid", validate_assignment=True)


class ResultSpec(Record):
    """A result being assessed: RoB 2 judges results, not whole trials."""

    id: str = Field(pattern=_ID_PATTERN)
    outcome: str = Field(min_length=1)
    time_point: str = ""
    effect: Effect = DEFAULT_EFFECT
    outcome_type: Literal["objective", "subjective"] | None = None
    self_reported: bool | None = None
    # Meta-analysis weight per study id (any positive scale); empty means "count studies".
    weights: dict[str, float] = Field(default_factory=dict)

    @field_validator("weights")
    @classmethod
    def _positive_weights(cls, value: dict[str, float]) -> dict[str, float]:
        bad = [k for k, w in value.items() if not w >= 0]
        if bad:
            raise ValueError(f"weights must be zero or positive (study {', '.join(bad)})")
        return value


# What a study's source document is, in words (set at `study add`, shown in the workbench).
REPORT_KINDS: dict[str, str] = {
    "report": "report",
    "protocol": "protocol",
    "registry": "registry record",
    "analysis_plan": "statistical analysis plan",
    "supplement": "supplement",
    "other": "other document",
}


class ReportFile(Record):
    """One source document of a study, kept in the review's reports/ folder."""

    path: str = Field(min_length=1)  # relative to the review's reports/ folder
    sha256: str = Field(pattern=r"^[0-9a-f]{64}$")
    kind: Literal["report", "protocol", "registry", "analysis_plan", "supplement", "other"] = (
        "report"
    )


class Study(Record):
    id: str = Field(pattern=_ID_PATTERN)
    label: str = Field(min_length=1)
    # The trial's design, which chooses its question set: a design a set declares
    # ("parallel", "cluster", "crossover") or a set id; None: the review's question_set.
    design: str | None = Field(default=None, pattern=_ID_PATTERN)
    reports: list[ReportFile] = Field(default_factory=list)


class Review(Record):
    """The review as described by review.toml."""

    schema_version: int = SCHEMA_VERSION
    title: str = Field(min_length=1)
    question_set: str = "rob2-parallel"
    question_set_version: str = "1"
    lead: str | None = None
    reviewers: list[str] = Field(default_factory=list)
    results: list[ResultSpec] = Field(default_factory=list)
    studies: list[Study] = Field(default_factory=list)
    calibration_studies: list[str] = Field(default_factory=list)

    @model_validator(mode="after")
    def _unique_ids(self) -> Review:
        for name, ids in (
            ("result", [r.id for r in self.results]),
            ("study", [s.id for s in self.studies]),
        ):
            dupes = sorted({i for i in ids if ids.count(i) > 1})
            if dupes:
                raise ValueError(f"{name} id used twice: {', '.join(dupes)}")
        known = {s.id for s in self.studies}
        unknown = [s for s in self.calibration_studies if s not in known]
        if unknown:
            raise ValueError(f"calibration_studies names unknown studies: {', '.join(unknown)}")
        return self

    def study(self, study_id: str) -> Study | None:
        return next((s for s in self.studies if s.id == study_id), None)

    def result(self, result_id: str) -> ResultSpec | None:
        return next((r for r in self.results if r.id == result_id), None)


class Quote(Record):
    """A passage of a source document that supports an answer."""

    document_sha256: str = Field(pattern=r"^[0-9a-f]{64}$")
    start: int = Field(ge=0)
    end: int = Field(ge=0)
    page: int | None = Field(default=None, ge=1)
    text: str = Field(min_length=1)

    @model_validator(mode="after")
    def _ordered(self) -> Quote:
        if self.end <= self.start:
            raise ValueError(f"quote end ({self.end}) must be after its start ({self.start})")
        return self


class Answer(Record):
    response: Response | None = None
    justification: str = ""
    quotes: list[Quote] = Field(default_factory=list)


class Override(Record):
    """A reviewer's judgement that replaces the algorithm's proposal, with the reason."""

    judgement: Judgement
    reason: str = Field(min_length=1)
    proposed: Proposal  # the algorithm's proposal when the override was made

    @field_validator("reason")
    @classmethod
    def _reason_not_blank(cls, value: str) -> str:
        if not value.strip():
            raise ValueError("an override needs a reason")
        return value


class DismissedSuggestion(Record):
    """A suggested sentence the reviewer marked as not answering a question."""

    question_id: str
    document_sha256: str = Field(pattern=r"^[0-9a-f]{64}$")
    start: int = Field(ge=0)
    end: int = Field(ge=0)


class Decision(Record):
    """How the lead settled one signalling question for a consensus record."""

    question_id: str
    source: Literal["a", "b", "new", "agreed"]
    response: Response | None
    note: str = ""


class JudgementChange(Record):
    """A domain's proposed judgement before and after a record changed question-set version."""

    before: Proposal | None  # as stored in the record (None: the domain was not there)
    after: Proposal


class SetUpgrade(Record):
    """A record carried from the question-set version it was made with to a later one: what
    the carry kept aside, left open and changed, so nothing is lost and the reviewer can check
    it (robtui.core.set_versions)."""

    from_version: str
    to_version: str
    at: datetime = Field(default_factory=utc_now)
    # answers (and a consensus's decisions) to questions the later version does not have:
    # kept here, never used for a judgement
    retired_answers: dict[str, Answer] = Field(default_factory=dict)
    retired_decisions: dict[str, Decision] = Field(default_factory=dict)
    # questions asked on the answer path under the later version that have no answer
    unanswered: list[str] = Field(default_factory=list)
    changed: dict[str, JudgementChange] = Field(default_factory=dict)
    # overridden judgements whose proposal changed: the reviewer confirms or clears them
    to_confirm: list[str] = Field(default_factory=list)


class Assessment(Record):
    """One reviewer's assessment of one result of one study."""

    schema_version: int = SCHEMA_VERSION
    reviewer: str = Field(pattern=_ID_PATTERN)
    study_id: str = Field(pattern=_ID_PATTERN)
    result_id: str = Field(pattern=_ID_PATTERN)
    question_set: str = "rob2-parallel"
    question_set_version: str = "1"
    effect: Effect = DEFAULT_EFFECT
    answers: dict[str, Answer] = Field(default_factory=dict)
    # keys: domain ids ("1".."5") and "overall"
    proposed: dict[str, Proposal] = Field(default_factory=dict)
    overrides: dict[str, Override] = Field(default_factory=dict)
    final: dict[str, Proposal] = Field(default_factory=dict)
    # The RoB 2 form's free-text support of each domain judgement (keys: domain ids) and the
    # optional predicted direction of bias (keys: domain ids and "overall").
    support: dict[str, str] = Field(default_factory=dict)
    direction: dict[str, Direction] = Field(default_factory=dict)
    status: Status = "draft"
    rules_version: int | None = None
    dismissed: list[DismissedSuggestion] = Field(default_factory=list)
    last_question: str | None = None  # where the reviewer left off
    # each carry to a later version of the question set, oldest first (what it kept aside)
    set_upgrades: list[SetUpgrade] = Field(default_factory=list)
    created: datetime = Field(default_factory=utc_now)
    updated: datetime = Field(default_factory=utc_now)


class Consensus(Record):
    """The agreed assessment of one result of one study, kept apart from both reviewers'."""

    schema_version: int = SCHEMA_VERSION
    study_id: str = Field(pattern=_ID_PATTERN)
    result_id: str = Field(pattern=_ID_PATTERN)
    reviewers: tuple[str, str]
    lead: str = Field(pattern=_ID_PATTERN)
    question_set: str = "rob2-parallel"
    question_set_version: str = "1"
    effect: Effect = DEFAULT_EFFECT
    answers: dict[str, Answer] = Field(default_factory=dict)
    decisions: dict[str, Decision] = Field(default_factory=dict)
    proposed: dict[str, Proposal] = Field(default_factory=dict)
    overrides: dict[str, Override] = Field(default_factory=dict)
    final: dict[str, Proposal] = Field(default_factory=dict)
    # The RoB 2 form's free-text support of each domain judgement (keys: domain ids) and the
    # optional predicted direction of bias (keys: domain ids and "overall").
    support: dict[str, str] = Field(default_factory=dict)
    direction: dict[str, Direction] = Field(default_factory=dict)
    status: Status = "draft"
    # each reviewer's responses on their answer path when the lead last took them up (at the
    # start and at completion): a later change by a reviewer makes the consensus stale
    built_on: dict[str, dict[str, str]] = Field(default_factory=dict)
    set_upgrades: list[SetUpgrade] = Field(default_factory=list)
    updated: datetime = Field(default_factory=utc_now)
