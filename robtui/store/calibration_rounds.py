"""Calibration rounds on disk: DIR/calibration/round-<N>.json, one snapshot per round.

A round file holds copies of both reviewers' completed assessments of the calibration set as
they were when the round was recorded, the answering-rules version they were made under, and
the assessments that were missing or still draft. A round is written once (atomically) and
never replaced; an unreadable round file is reported, never written over.
"""

from __future__ import annotations

import json
import re
from collections.abc import Sequence
from pathlib import Path

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from robtui.core.calibration import CalibrationRound, MissingAssessment
from robtui.core.comparison import AssessmentPair
from robtui.core.model import SCHEMA_VERSION, Assessment, Review
from robtui.errors import DataFileError, InputError
from robtui.files import review_lock, write_text_atomic
from robtui.store.records import check_schema, describe_validation, record_to_json

ROUNDS_DIR = "calibration"
_NAME = re.compile(r"^round-(\d+)\.json$")


class _Pair(BaseModel):
    model_config = ConfigDict(extra="forbid")
    study_id: str
    result_id: str
    a: Assessment
    b: Assessment


class _Missing(BaseModel):
    model_config = ConfigDict(extra="forbid")
    study_id: str
    result_id: str | None = None
    problem: str


class RoundRecord(BaseModel):
    """The file form of a calibration round."""

    model_config = ConfigDict(extra="forbid")
    schema_version: int = SCHEMA_VERSION
    round: int = Field(ge=1)
    created: str
    reviewers: tuple[str, str]
    studies: list[str]
    rules_version: int = Field(ge=0)
    question_set: str
    question_set_version: str
    pairs: list[_Pair] = Field(default_factory=list)
    missing: list[_Missing] = Field(default_factory=list)


def rounds_dir(root: Path) -> Path:
    return Path(root) / ROUNDS_DIR


def round_path(root: Path, number: int) -> Path:
    return rounds_dir(root) / f"round-{number}.json"


def _to_record(r: CalibrationRound) -> RoundRecord:
    return RoundRecord(
        round=r.number,
        created=r.created,
        reviewers=r.reviewers,
        studies=list(r.studies),
        rules_version=r.rules_version,
        question_set=r.question_set,
        question_set_version=r.question_set_version,
        pairs=[_Pair(study_id=p.study_id, result_id=p.result_id, a=p.a, b=p.b) for p in r.pairs],
        missing=[
            _Missing(study_id=m.study_id, result_id=m.result_id, problem=m.problem)
            for m in r.missing
        ],
    )


def _from_record(rec: RoundRecord) -> CalibrationRound:
    return CalibrationRound(
        number=rec.round,
        created=rec.created,
        reviewers=tuple(rec.reviewers),
        studies=tuple(rec.studies),
        rules_version=rec.rules_version,
        question_set=rec.question_set,
        question_set_version=rec.question_set_version,
        pairs=tuple(
            AssessmentPair(p.study_id, p.result_id, rec.reviewers[0], rec.reviewers[1], p.a, p.b)
            for p in rec.pairs
        ),
        missing=tuple(MissingAssessment(m.study_id, m.result_id, m.problem) for m in rec.missing),
    )


def read_round(path: Path) -> CalibrationRound:
    """Read one round file (DataFileError naming the file and the problem)."""
    path = Path(path)
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except json.JSONDecodeError as error:
        raise DataFileError(
            f"{path}: not valid JSON ({error.msg} at line {error.lineno}): restore it from git"
        ) from None
    except (OSError, UnicodeDecodeError) as error:
        raise DataFileError(f"{path}: cannot be read ({error})") from None
    check_schema(data, path)
    try:
        record = RoundRecord.model_validate(data)
    except ValidationError as error:
        raise DataFileError(f"{path}: {describe_validation(error)}") from None
    match = _NAME.match(path.name)
    if match and int(match.group(1)) != record.round:
        raise DataFileError(f"{path}: holds round {record.round}, which does not match its name")
    return _from_record(record)


def round_numbers(root: Path) -> list[int]:
    """Numbers of the round files present, ascending."""
    folder = rounds_dir(root)
    if not folder.is_dir():
        return []
    found = (_NAME.match(p.name) for p in folder.iterdir())
    return sorted(int(m.group(1)) for m in found if m)


def load_round(root: Path, number: int) -> CalibrationRound:
    path = round_path(root, number)
    if not path.exists():
        have = ", ".join(str(n) for n in round_numbers(root)) or "none yet"
        raise InputError(
            f"no calibration round {number} (rounds recorded: {have}); record one with "
            "`robtui calibrate record`"
        )
    return read_round(path)


def load_rounds(root: Path) -> tuple[list[CalibrationRound], list[str]]:
    """All readable rounds and the problems with the rest (listed, not raised)."""
    rounds, problems = [], []
    for n in round_numbers(root):
        try:
            rounds.append(read_round(round_path(root, n)))
        except DataFileError as error:
            problems.append(str(error))
    return rounds, problems


def save_round(root: Path, r: CalibrationRound) -> Path:
    """Write a new round file atomically; an existing round is never replaced."""
    path = round_path(root, r.number)
    with review_lock(root):  # two rounds recorded at once never take the same file
        if path.exists():
            raise InputError(
                f"{path} already exists: rounds are never replaced; record a new round"
            )
        write_text_atomic(path, record_to_json(_to_record(r)), locked=True)
    return path


def next_round_number(root: Path) -> int:
    return max(round_numbers(root), default=0) + 1


def set_calibration_set(folder, study_ids: Sequence[str]) -> list[str]:
    """Record the calibration set in review.toml (InputError naming unknown studies)."""
    chosen = [s.strip() for s in study_ids if s.strip()]
    if not chosen:
        raise InputError("name at least one study for the calibration set, e.g. --studies S1,S2")
    unknown = [s for s in chosen if folder.review.study(s) is None]
    if unknown:
        known = ", ".join(s.id for s in folder.review.studies) or "none yet"
        raise InputError(
            f"not studies of this review: {', '.join(unknown)} (studies: {known}); "
            "nothing was changed"
        )
    chosen = list(dict.fromkeys(chosen))

    def choose(review: Review) -> None:
        review.calibration_studies = chosen

    folder.edit_review(choose)  # under the lock, on review.toml as it is now
    return chosen
