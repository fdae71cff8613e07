"""Assessment and consensus records: one JSON file per reviewer, study and result (and one
per study and result for the lead's consensus), read with their judgements derived from the
answers, listed with the problems of the unusable ones, and saved only over a file this
process read and understood. Mixed into ReviewFolder."""

from __future__ import annotations

from collections.abc import Callable, Sequence
from pathlib import Path

from pydantic import BaseModel

from robtui.core.model import Assessment, Consensus
from robtui.errors import DataFileError
from robtui.files import refuse_if_changed, remove_leftovers
from robtui.store.ids import check_id, is_valid_id, record_file_name
from robtui.store.records import read_record_and_digest, record_to_json, validated


class RecordFiles:
    """The assessments/ and consensus/ folders of a ReviewFolder (uses its root, lock,
    ``_read``/``_write``, the review and ``study_or_error``/``result_or_error``)."""

    @property
    def assessments_dir(self) -> Path:
        return self.root / "assessments"

    @property
    def consensus_dir(self) -> Path:
        return self.root / "consensus"

    def assessment_path(self, reviewer: str, study_id: str, result_id: str) -> Path:
        check_id(reviewer, "reviewer")
        return (
            self.assessments_dir
            / reviewer
            / record_file_name(check_id(study_id, "study"), check_id(result_id, "result"))
        )

    def consensus_path(self, study_id: str, result_id: str) -> Path:
        return self.consensus_dir / record_file_name(
            check_id(study_id, "study"), check_id(result_id, "result")
        )

    # -- assessments ----------------------------------------------------------------------------
    def load_assessment(self, reviewer: str, study_id: str, result_id: str) -> Assessment | None:
        """The stored assessment, None when absent; DataFileError when unreadable."""
        path = self.inside(self.assessment_path(reviewer, study_id, result_id))
        if not path.exists():
            self._seen[path] = None
            return None
        record = self._read(Assessment, path)
        _check_names(path, record, reviewer=reviewer)
        return self._checked(path, record)

    def save_assessment(self, assessment: Assessment) -> Path:
        """Write an assessment atomically; refuses to replace a file it cannot read, or one
        another process changed since this one read it (StaleFileError)."""
        self.study_or_error(assessment.study_id)
        self.result_or_error(assessment.result_id)
        path = self.assessment_path(assessment.reviewer, assessment.study_id, assessment.result_id)
        return self._save_record(path, self._derived(path, assessment), Assessment)

    def update_assessment(
        self,
        reviewer: str,
        study_id: str,
        result_id: str,
        change: Callable[[Assessment | None], Assessment | None],
    ) -> tuple[Assessment | None, bool]:
        """Read-modify-write under the lock: ``change`` gets the assessment as it is on disk
        now (None when there is none) and returns the new one (None: nothing to write), which
        is saved when it differs. Returns the assessment and whether it was written."""
        with self.locked():
            current = self.load_assessment(reviewer, study_id, result_id)
            changed = change(current)
            if changed is None or (current is not None and _same_content(current, changed)):
                return current, False
            self.save_assessment(changed)
            return changed, True

    def _checked(self, path: Path, record):
        """The record with its judgements derived from its answers (one source of truth)."""
        from robtui.store.derived import derived_assessment, derived_consensus

        derive = derived_consensus if isinstance(record, Consensus) else derived_assessment
        record, problems = derive(self, path, record)
        self.judgement_problems.extend(p for p in problems if p not in self.judgement_problems)
        return record

    def assessments(self, reviewer: str | None = None) -> tuple[list[Assessment], list[str]]:
        """All readable assessments (of one reviewer or all) and the problems with the rest."""
        found: list[Assessment] = []
        problems: list[str] = []
        names = [reviewer] if reviewer is not None else self.reviewers_on_disk()
        for name in names:
            check_id(name, "reviewer")
            for path in _record_files(self.assessments_dir / name):
                self._read_listed(Assessment, path, name, found, problems)
        return found, self._with_unlisted(found, problems)

    def unlisted_record_problems(self, records: Sequence[Assessment | Consensus]) -> list[str]:
        """Records for studies or results review.toml does not list (said loudly: a cut or
        hand-edited review.toml must not make work disappear in silence)."""
        problems = []
        for r in records:
            missing = []
            if self.review.study(r.study_id) is None:
                missing.append(f"study {r.study_id}")
            if self.review.result(r.result_id) is None:
                missing.append(f"result {r.result_id}")
            if missing:
                owner = f" by {r.reviewer}" if isinstance(r, Assessment) else " (consensus)"
                problems.append(
                    f"{r.study_id} / {r.result_id}{owner}: {' and '.join(missing)} not in "
                    f"{self.review_path}: the record is left out; check that review.toml is "
                    "complete (restore it from git or a backup) or remove the record"
                )
        return problems

    def reviewers_on_disk(self) -> list[str]:
        """Reviewers with a folder under assessments/ (sorted)."""
        if not self.assessments_dir.is_dir():
            return []
        return sorted(
            p.name for p in self.assessments_dir.iterdir() if p.is_dir() and is_valid_id(p.name)
        )

    # -- consensus ------------------------------------------------------------------------------
    def load_consensus(self, study_id: str, result_id: str) -> Consensus | None:
        path = self.inside(self.consensus_path(study_id, result_id))
        if not path.exists():
            self._seen[path] = None
            return None
        record = self._read(Consensus, path)
        _check_names(path, record)
        return self._checked(path, record)

    def save_consensus(self, c: Consensus) -> Path:
        self.study_or_error(c.study_id)
        self.result_or_error(c.result_id)
        path = self.consensus_path(c.study_id, c.result_id)
        return self._save_record(path, self._derived(path, c), Consensus)

    def _derived(self, path: Path, record):
        """What is written: judgements derived from the answers, codes checked."""
        from robtui.store.derived import derived_assessment, derived_consensus

        derive = derived_consensus if isinstance(record, Consensus) else derived_assessment
        return derive(self, path, record)[0]

    def consensus_records(self) -> tuple[list[Consensus], list[str]]:
        found: list[Consensus] = []
        problems: list[str] = []
        for path in _record_files(self.consensus_dir):
            self._read_listed(Consensus, path, None, found, problems)
        return found, self._with_unlisted(found, problems)

    def _read_listed(self, model, path: Path, reviewer: str | None, found: list, problems: list):
        """Read one listed record into ``found``, or its problem into ``problems`` (an
        unreadable record is also kept in ``unusable_records``)."""
        try:
            record = self._read(model, self.inside(path))
            _check_names(path, record, reviewer=reviewer)
            before = len(self.judgement_problems)
            record = self._checked(path, record)
            problems.extend(self.judgement_problems[before:])
        except DataFileError as error:
            problems.append(str(error))
            self.unusable_records.append(str(error))
            return
        found.append(record)

    def _with_unlisted(self, found: Sequence, problems: list[str]) -> list[str]:
        """``problems`` plus the records review.toml does not list (kept as unusable too)."""
        unlisted = self.unlisted_record_problems(found)
        self.unusable_records.extend(unlisted)
        return problems + unlisted

    # -- shared -----------------------------------------------------------------------------------
    def refuse_changed_since_read(self, paths: Sequence[Path]) -> None:
        """StaleFileError when any of ``paths`` is no longer what this process read (checked
        together, under the caller's lock, before a batch of saves writes any of them)."""
        for path in paths:
            path = self.inside(path)
            refuse_if_changed(path, self._seen.get(path))

    def _save_record(self, path: Path, record: BaseModel, model: type[BaseModel]) -> Path:
        path = self.inside(path)
        # Validate once more: a record changed in memory with model_construct must not reach disk.
        validated(model, record.model_dump(), str(path))
        with self.locked():
            if path.exists():
                try:
                    read_record_and_digest(model, path)
                except DataFileError as error:
                    raise type(error)(
                        f"{error} (not saved: the unreadable file was left as it is; "
                        "fix or move it aside, then save again)"
                    ) from None
            self._write(path, record_to_json(record))
        return path

    def sweep_leftovers(self) -> list[Path]:
        """Remove temp files that killed saves left in the review's record folders (under
        the lock, so none belongs to a save still running)."""
        removed: list[Path] = []
        with self.locked():
            folders = [self.root, self.consensus_dir, self.assessments_dir]
            if self.assessments_dir.is_dir():
                folders += [p for p in self.assessments_dir.iterdir() if p.is_dir()]
            for folder in folders:
                if not folder.is_dir() or folder.is_symlink():
                    continue
                for leftover in folder.glob(".*.tmp"):
                    name = leftover.name[1:].rsplit(".", 2)[0]
                    removed += remove_leftovers(folder / name, 0.0)
        return removed



def _same_content(a: BaseModel, b: BaseModel) -> bool:
    return a.model_dump(exclude={"updated"}) == b.model_dump(exclude={"updated"})


def _record_files(folder: Path) -> list[Path]:
    if not folder.is_dir():
        return []
    return sorted(p for p in folder.glob("*.json") if not p.name.startswith("."))


def _check_names(path: Path, record, reviewer: str | None = None) -> None:
    expected = record_file_name(record.study_id, record.result_id)
    if path.name != expected or (reviewer is not None and record.reviewer != reviewer):
        owner = f" by {record.reviewer}" if reviewer is not None else ""
        raise DataFileError(
            f"{path}: holds study {record.study_id}, result {record.result_id}{owner}, "
            f"which does not match its place: move it to the right name"
        )

