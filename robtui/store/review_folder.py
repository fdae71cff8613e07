"""A review folder: review.toml, reports/, assessments/<reviewer>/, consensus/, exports/.

Layout::

    DIR/review.toml                                   the review (title, reviewers, results, studies)
    DIR/reports/<study_id>/<file>                     copies of the studies' source documents
    DIR/assessments/<reviewer>/<study>--<result>.json one reviewer's assessment of one result
    DIR/consensus/<study>--<result>.json              the agreed assessment
    DIR/exports/                                      tables and plots
    DIR/rules.toml, DIR/learned/                      answering rules, the review's own ranker

Every write is atomic; a file that cannot be read is reported and never written over.
"""

from __future__ import annotations

import hashlib
import re
from collections.abc import Sequence
from pathlib import Path

from pydantic import BaseModel, ValidationError

from robtui.core.model import (
    Assessment,
    Consensus,
    ReportFile,
    ResultSpec,
    Review,
    Study,
)
from robtui.errors import DataFileError, InputError
from robtui.files import write_bytes_atomic, write_text_atomic
from robtui.store.records import (
    describe_validation,
    read_json_record,
    read_toml_record,
    record_to_json,
    record_to_toml,
)

REVIEW_FILE = "review.toml"
SUBFOLDERS = ("reports", "assessments", "consensus", "exports")
# Same pattern as the model's ids; "--" is kept out because it joins study and result in
# file names.
_ID = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$")
_SEPARATOR = "--"


def check_id(value: str, what: str) -> str:
    """Validate a reviewer, study or result id; InputError says what is allowed."""
    if not isinstance(value, str) or not _ID.match(value) or _SEPARATOR in value:
        raise InputError(
            f"{what} id {value!r} is not allowed: use 1-64 letters, digits, '.', '_' or '-', "
            "starting with a letter or digit, without '--'"
        )
    return value


def sha256_of(path: Path) -> str:
    """Hex sha256 of a file's bytes."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 16), b""):
            digest.update(block)
    return digest.hexdigest()


def record_file_name(study_id: str, result_id: str) -> str:
    return f"{study_id}{_SEPARATOR}{result_id}.json"


def _validated(model: type[BaseModel], data: dict, what: str):
    try:
        return model.model_validate(data)
    except ValidationError as error:
        raise InputError(f"{what}: {describe_validation(error)}") from None


def _with_kinds(files: Sequence[Path | tuple[Path, str]]) -> list[tuple[Path, str]]:
    """Files as (path, kind); a bare path is a report."""
    return [(Path(f[0]), f[1]) if isinstance(f, tuple) else (Path(f), "report") for f in files]


class ReviewFolder:
    """One review on disk. ``review`` is the in-memory Review; ``save_review`` writes it."""

    def __init__(self, root: Path, review: Review) -> None:
        self.root = Path(root)
        self.review = review

    # -- paths -----------------------------------------------------------------------------
    @property
    def review_path(self) -> Path:
        return self.root / REVIEW_FILE

    @property
    def reports_dir(self) -> Path:
        return self.root / "reports"

    @property
    def assessments_dir(self) -> Path:
        return self.root / "assessments"

    @property
    def consensus_dir(self) -> Path:
        return self.root / "consensus"

    @property
    def exports_dir(self) -> Path:
        return self.root / "exports"

    @property
    def rules_path(self) -> Path:
        return self.root / "rules.toml"

    @property
    def learned_dir(self) -> Path:
        return self.root / "learned"

    def learned_dir_for(self, reviewer: str) -> Path:
        """The folder of ``reviewer``'s own learned ranker.

        Each reviewer's model learns only from that reviewer's quotes and dismissals, so the
        suggestions one reviewer sees never carry another reviewer's choices (blinding).
        """
        return self.learned_dir / check_id(reviewer, "reviewer")

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

    # -- creating and opening ----------------------------------------------------------------
    @classmethod
    def create(
        cls,
        root: Path,
        title: str,
        *,
        question_set: str = "rob2-parallel",
        lead: str | None = None,
        reviewers: Sequence[str] = (),
    ) -> ReviewFolder:
        """Make a new review folder (refuses a folder that already holds a review)."""
        root = Path(root)
        if (root / REVIEW_FILE).exists():
            raise InputError(f"{root} already holds a review ({REVIEW_FILE}): open it instead")
        if root.exists() and not root.is_dir():
            raise InputError(f"{root} is a file, not a folder: choose another path")
        if lead is not None:
            check_id(lead, "lead")
        names = [check_id(r, "reviewer") for r in reviewers]
        if len(set(names)) != len(names):
            raise InputError("a reviewer is named twice: name each reviewer once")
        version = _question_set_version(question_set)
        review = _validated(
            Review,
            {
                "title": title,
                "question_set": question_set,
                "question_set_version": version,
                "lead": lead,
                "reviewers": names,
            },
            "review",
        )
        folder = cls(root, review)
        root.mkdir(parents=True, exist_ok=True)
        for name in SUBFOLDERS:
            (root / name).mkdir(exist_ok=True)
        folder.save_review()
        return folder

    @classmethod
    def open(cls, root: Path) -> ReviewFolder:
        """Open an existing review folder; errors say what is wrong and what to do."""
        root = Path(root)
        if not root.exists():
            raise InputError(
                f"review folder not found: {root}: check the path, or make one with "
                f"`robtui init {root} --title TITLE`"
            )
        if not (root / REVIEW_FILE).is_file():
            raise InputError(
                f"not a review folder: {root} (no {REVIEW_FILE}): run `robtui init {root} "
                "--title TITLE` to make one, or give the folder that holds review.toml"
            )
        review = read_toml_record(Review, root / REVIEW_FILE)
        for name in [*review.reviewers, *([review.lead] if review.lead else [])]:
            try:
                check_id(name, "reviewer")
            except InputError as error:
                raise DataFileError(f"{root / REVIEW_FILE}: {error}") from None
        return cls(root, review)

    @classmethod
    def find(cls, start: Path) -> ReviewFolder:
        """Open the review folder at ``start`` or the nearest folder above it holding one."""
        start = Path(start).resolve()
        for candidate in (start, *start.parents):
            if (candidate / REVIEW_FILE).is_file():
                return cls.open(candidate)
        return cls.open(start)

    def save_review(self) -> None:
        """Write review.toml atomically (refuses to replace one it cannot read)."""
        path = self.review_path
        if path.exists():
            read_toml_record(Review, path)  # raises if unreadable: never written over
        write_text_atomic(path, record_to_toml(self.review))

    def _commit_review(self, changed: Review) -> None:
        # Validate the whole review before anything is written, then keep it.
        checked = _validated(Review, changed.model_dump(), "review")
        previous, self.review = self.review, checked
        try:
            self.save_review()
        except BaseException:
            self.review = previous
            raise

    # -- reviewers, studies, results -------------------------------------------------------------
    def is_unlisted_reviewer(self, name: str) -> bool:
        """True when the review names its reviewers (or a lead) and ``name`` is not one."""
        known = [*self.review.reviewers, *([self.review.lead] if self.review.lead else [])]
        return bool(known) and name not in known

    def refuse_unlisted_reviewer(self, name: str) -> None:
        """Refuse a name the review does not list: a misspelt one would start new files."""
        if self.is_unlisted_reviewer(name):
            raise InputError(
                f"reviewer {name!r} is not on this review (reviewers: "
                f"{', '.join(self.review.reviewers) or 'none'}): check the spelling, or add "
                "--add-reviewer to list them"
            )

    def add_reviewer(self, name: str) -> None:
        """List a reviewer in review.toml (no change when already listed)."""
        check_id(name, "reviewer")
        if name in self.review.reviewers:
            return
        changed = self.review.model_copy(deep=True)
        changed.reviewers.append(name)
        self._commit_review(changed)

    def add_study(
        self,
        study_id: str,
        label: str,
        files: Sequence[Path | tuple[Path, str]],
        design: str | None = None,
    ) -> Study:
        """Add a study, copying its files into reports/<study_id>/ with their sha256; each file
        is a path (a report) or (path, kind).

        ``design`` (a design a question set declares, or a set id) chooses the study's
        question set; it must name a set the review can use.
        """
        check_id(study_id, "study")
        if self.review.study(study_id) is not None:
            raise InputError(
                f"study {study_id!r} is already in the review: choose another id, or add a "
                "report to it with `robtui study report`"
            )
        fields = {"id": study_id, "label": label}
        if design is not None:
            from robtui.store.question_sets import review_catalogue

            review_catalogue(self.root).resolve(design)  # InputError lists what can be used
            fields["design"] = design
        study = _validated(Study, fields, f"study {study_id}")
        reports = self._copy_reports(study_id, _with_kinds(files), existing=[])
        study.reports = reports
        changed = self.review.model_copy(deep=True)
        changed.studies.append(study)
        self._commit_review(changed)
        return self.review.study(study_id)

    def add_report(self, study_id: str, file: Path, kind: str = "report") -> ReportFile:
        """Add one more source document to an existing study."""
        return self.add_reports(study_id, [(file, kind)])[0]

    def add_reports(
        self, study_id: str, files: Sequence[Path | tuple[Path, str]]
    ) -> list[ReportFile]:
        """Add more source documents to an existing study (path, or (path, kind))."""
        study = self.study_or_error(study_id)
        added = self._copy_reports(study_id, _with_kinds(files), existing=study.reports)
        changed = self.review.model_copy(deep=True)
        changed.study(study_id).reports.extend(added)
        self._commit_review(changed)
        return added

    def _copy_reports(
        self, study_id: str, given: Sequence[tuple[Path, str]], existing: Sequence[ReportFile]
    ) -> list[ReportFile]:
        kinds = {Path(f): kind for f, kind in given}
        files = [Path(f) for f, _ in given]
        names = [f.name for f in files]
        taken = {Path(r.path).name for r in existing}
        for f in files:
            if not f.is_file():
                raise InputError(f"report file not found: {f}: check the path")
        for name in names:
            if names.count(name) > 1 or name in taken:
                raise InputError(
                    f"two reports of study {study_id} are named {name!r}: rename one first"
                )
        planned = []
        for f in files:
            data = f.read_bytes()
            sha = hashlib.sha256(data).hexdigest()
            rel = f"{study_id}/{f.name}"
            report = _validated(
                ReportFile, {"path": rel, "sha256": sha, "kind": kinds[f]}, f"report {f}"
            )
            target = self.reports_dir / rel
            if target.exists() and sha256_of(target) != sha:
                raise InputError(
                    f"{target} already exists with other content: it was not overwritten; "
                    "move it aside or rename the new file"
                )
            planned.append((target, data, report))
        for target, data, _ in planned:
            if not target.exists():
                write_bytes_atomic(target, data)
        return [report for _, _, report in planned]

    def add_result(self, spec: ResultSpec) -> None:
        """Add a result to assess (refuses an id already used)."""
        check_id(spec.id, "result")
        if self.review.result(spec.id) is not None:
            raise InputError(f"result {spec.id!r} is already in the review: choose another id")
        spec = _validated(ResultSpec, spec.model_dump(), f"result {spec.id}")
        unknown = [s for s in spec.weights if self.review.study(s) is None]
        if unknown:
            raise InputError(
                f"result {spec.id}: weights name unknown studies ({', '.join(unknown)}): "
                "add the studies first"
            )
        changed = self.review.model_copy(deep=True)
        changed.results.append(spec)
        self._commit_review(changed)

    def set_result_effect(self, result_id: str, effect: str, by: str) -> None:
        """The lead changes a result's effect of interest (nobody else: every reviewer answers
        the same questions). Assessments follow it when next opened; answers are kept."""
        lead = self.review.lead
        if not lead or by != lead:
            raise InputError(
                f"only the review's lead ({lead or 'none named'}) changes a result's effect of "
                f"interest; {by!r} may not: ask the lead"
            )
        self.result_or_error(result_id)
        changed = self.review.model_copy(deep=True)
        spec = changed.result(result_id)
        changed.results[changed.results.index(spec)] = _validated(
            ResultSpec, {**spec.model_dump(), "effect": effect}, f"result {result_id}"
        )
        self._commit_review(changed)

    def study_or_error(self, study_id: str) -> Study:
        study = self.review.study(study_id)
        if study is None:
            known = ", ".join(s.id for s in self.review.studies) or "none yet"
            raise InputError(
                f"no study {study_id!r} in this review (studies: {known}): add it with "
                "`robtui study add`"
            )
        return study

    def result_or_error(self, result_id: str) -> ResultSpec:
        result = self.review.result(result_id)
        if result is None:
            known = ", ".join(r.id for r in self.review.results) or "none yet"
            raise InputError(
                f"no result {result_id!r} in this review (results: {known}): add it with "
                "`robtui result add`"
            )
        return result

    # -- report files ---------------------------------------------------------------------------
    def report_path(self, report: ReportFile) -> Path:
        return self.reports_dir / report.path

    def check_report(self, report: ReportFile) -> str | None:
        """The problem with a report's copy (missing, or changed since it was added), or None."""
        path = self.report_path(report)
        if not path.is_file():
            return f"report file missing: {path}: restore it (e.g. from git) or add it again"
        actual = sha256_of(path)
        if actual != report.sha256:
            return (
                f"report file changed since it was added: {path} (sha256 {actual[:12]}..., "
                f"recorded {report.sha256[:12]}...): restore the original, or add the new "
                "version as another report"
            )
        return None

    # -- assessments ----------------------------------------------------------------------------
    def load_assessment(self, reviewer: str, study_id: str, result_id: str) -> Assessment | None:
        """The stored assessment, None when absent; DataFileError when unreadable."""
        path = self.assessment_path(reviewer, study_id, result_id)
        if not path.exists():
            return None
        record = read_json_record(Assessment, path)
        _check_names(path, record, reviewer=reviewer)
        return record

    def save_assessment(self, assessment: Assessment) -> Path:
        """Write an assessment atomically; refuses to replace a file it cannot read."""
        self.study_or_error(assessment.study_id)
        self.result_or_error(assessment.result_id)
        path = self.assessment_path(assessment.reviewer, assessment.study_id, assessment.result_id)
        return self._save_record(path, assessment, Assessment)

    def assessments(self, reviewer: str | None = None) -> tuple[list[Assessment], list[str]]:
        """All readable assessments (of one reviewer or all) and the problems with the rest."""
        found: list[Assessment] = []
        problems: list[str] = []
        names = [reviewer] if reviewer is not None else self.reviewers_on_disk()
        for name in names:
            check_id(name, "reviewer")
            for path in _record_files(self.assessments_dir / name):
                try:
                    record = read_json_record(Assessment, path)
                    _check_names(path, record, reviewer=name)
                except DataFileError as error:
                    problems.append(str(error))
                    continue
                found.append(record)
        return found, problems

    def reviewers_on_disk(self) -> list[str]:
        """Reviewers with a folder under assessments/ (sorted)."""
        if not self.assessments_dir.is_dir():
            return []
        return sorted(
            p.name
            for p in self.assessments_dir.iterdir()
            if p.is_dir() and _ID.match(p.name) and _SEPARATOR not in p.name
        )

    # -- consensus ------------------------------------------------------------------------------
    def load_consensus(self, study_id: str, result_id: str) -> Consensus | None:
        path = self.consensus_path(study_id, result_id)
        if not path.exists():
            return None
        record = read_json_record(Consensus, path)
        _check_names(path, record)
        return record

    def save_consensus(self, c: Consensus) -> Path:
        self.study_or_error(c.study_id)
        self.result_or_error(c.result_id)
        return self._save_record(self.consensus_path(c.study_id, c.result_id), c, Consensus)

    def consensus_records(self) -> tuple[list[Consensus], list[str]]:
        found: list[Consensus] = []
        problems: list[str] = []
        for path in _record_files(self.consensus_dir):
            try:
                record = read_json_record(Consensus, path)
                _check_names(path, record)
            except DataFileError as error:
                problems.append(str(error))
                continue
            found.append(record)
        return found, problems

    # -- shared -----------------------------------------------------------------------------------
    def _save_record(self, path: Path, record: BaseModel, model: type[BaseModel]) -> Path:
        if path.exists():
            try:
                read_json_record(model, path)
            except DataFileError as error:
                raise type(error)(
                    f"{error} (not saved: the unreadable file was left as it is; "
                    "fix or move it aside, then save again)"
                ) from None
        # Validate once more: a record changed in memory with model_construct must not reach disk.
        _validated(model, record.model_dump(), str(path))
        write_text_atomic(path, record_to_json(record))
        return path


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


def _question_set_version(set_id: str) -> str:
    from robtui.store.question_sets import builtin_question_set

    return builtin_question_set(set_id).version  # InputError names the sets available
