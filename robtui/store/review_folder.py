"""A review folder: review.toml, reports/, assessments/<reviewer>/, consensus/, exports/.

Layout::

    DIR/review.toml                                   the review (title, reviewers, results, studies)
    DIR/reports/<study_id>/<file>                     copies of the studies' source documents
    DIR/assessments/<reviewer>/<study>--<result>.json one reviewer's assessment of one result
    DIR/consensus/<study>--<result>.json              the agreed assessment
    DIR/exports/                                      tables and plots
    DIR/rules.toml, DIR/learned/                      answering rules, the review's own ranker

Every write is atomic and made under the review's lock (robtui.files.review_lock); a file
that cannot be read is reported and never written over, and a file that changed on disk since
this process read it is never replaced (StaleFileError: reload and change it again).
"""

from __future__ import annotations

import hashlib
import re
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
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
from robtui.files import (
    confined,
    digest_bytes,
    refuse_if_changed,
    remove_leftovers,
    review_lock,
    write_bytes_atomic,
    write_text_atomic,
)
from robtui.store.records import (
    describe_validation,
    read_record_and_digest,
    record_to_json,
    record_to_toml,
)

REVIEW_FILE = "review.toml"
SUBFOLDERS = ("reports", "assessments", "consensus", "exports")
# Same pattern as the model's ids, matched in full (a trailing newline is refused); "--" is
# kept out because it joins study and result in file names.
_ID = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.-]{0,63}")
_SEPARATOR = "--"
# Names Windows reserves for devices, with or without an extension (Microsoft, "Naming Files,
# Paths, and Namespaces"): a review folder may be shared with or copied to Windows.
_RESERVED = re.compile(r"(CON|PRN|AUX|NUL|COM[0-9¹²³]|LPT[0-9¹²³])(\..*)?", re.IGNORECASE)


def is_valid_id(value: object) -> bool:
    """True when ``value`` can name a reviewer, study or result (and so a file)."""
    return (
        isinstance(value, str)
        and _ID.fullmatch(value) is not None
        and _SEPARATOR not in value
        and not value.endswith(".")
        and _RESERVED.fullmatch(value) is None
    )


def check_id(value: str, what: str) -> str:
    """Validate a reviewer, study or result id; InputError says what is allowed."""
    if not is_valid_id(value):
        raise InputError(
            f"{what} id {value!r} is not allowed: use 1-64 letters, digits, '.', '_' or '-', "
            "starting with a letter or digit, not ending with '.', without '--', and not a "
            "name Windows reserves (CON, PRN, AUX, NUL, COM1-9, LPT1-9)"
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

    def __init__(self, root: Path, review: Review, review_digest: str | None = None) -> None:
        self.root = Path(root)
        self.review = review
        # sha256 of each file as this process last read or wrote it (None: it did not exist);
        # a save compares the file on disk with it under the lock.
        self._seen: dict[Path, str | None] = {self.inside(self.review_path): review_digest}
        # Stored judgements that disagree with the answers, found while loading (reported).
        self.judgement_problems: list[str] = []
        self.set_catalogue = None  # the question sets records name (store.derived reads it)
        # Records that could not be used (unreadable, or for studies/results review.toml does
        # not list), found by the listings: an export refuses to leave them out silently.
        self.unusable_records: list[str] = []

    @contextmanager
    def locked(self) -> Iterator[None]:
        """Hold the review's lock (every read-modify-write of a review file does)."""
        with review_lock(self.root):
            yield

    def inside(self, path: Path) -> Path:
        """``path`` checked to stay inside the review (no symlinks, no '..')."""
        return confined(self.root, path)

    def _read(self, model: type[BaseModel], path: Path):
        record, digest = read_record_and_digest(model, path)
        self._seen[path] = digest
        return record

    def _write(self, path: Path, text: str) -> None:
        """Write a review file under the lock, refusing when it changed since it was read."""
        path = self.inside(path)
        with self.locked():
            refuse_if_changed(path, self._seen.get(path))
            write_text_atomic(path, text, locked=True)
            self._seen[path] = digest_bytes(text.encode("utf-8"))

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
        review, digest = _read_review(root / REVIEW_FILE)
        return cls(root, review, digest)

    @classmethod
    def find(cls, start: Path) -> ReviewFolder:
        """Open the review folder at ``start`` or the nearest folder above it holding one."""
        start = Path(start).resolve()
        for candidate in (start, *start.parents):
            if (candidate / REVIEW_FILE).is_file():
                return cls.open(candidate)
        return cls.open(start)

    def save_review(self) -> None:
        """Write review.toml atomically: refuses to replace one it cannot read, or one that
        changed since this process read it (StaleFileError)."""
        path = self.review_path
        with self.locked():
            if path.exists():
                _read_review(path)  # raises if unreadable: never written over
            self._write(path, record_to_toml(self.review))

    def reload_review(self) -> bool:
        """Read review.toml again when it changed on disk; True when it had."""
        path = self.inside(self.review_path)
        try:
            current = digest_bytes(path.read_bytes())
        except FileNotFoundError:
            current = None
        if current == self._seen.get(path):
            return False
        self.review, self._seen[path] = _read_review(path)
        return True

    def edit_review(self, edit: Callable[[Review], Review | None]) -> Review:
        """Change review.toml: under the lock, read it again if another process changed it,
        apply ``edit`` to a copy of the fresh review (it may raise InputError), validate the
        whole review and write it. Another process's additions are never lost."""
        with self.locked():
            self.reload_review()
            draft = self.review.model_copy(deep=True)
            changed = edit(draft) or draft
            checked = _validated(Review, changed.model_dump(), "review")
            previous, self.review = self.review, checked
            try:
                self.save_review()
            except BaseException:
                self.review = previous
                raise
        return self.review

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
        if name in self.review.reviewers and not self.reload_review():
            return

        def add(review: Review) -> None:
            if name not in review.reviewers:
                review.reviewers.append(name)

        self.edit_review(add)

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
        fields = {"id": study_id, "label": label}
        if design is not None:
            from robtui.store.question_sets import review_catalogue

            review_catalogue(self.root).resolve(design)  # InputError lists what can be used
            fields["design"] = design
        study = _validated(Study, fields, f"study {study_id}")

        def add(review: Review) -> None:
            if review.study(study_id) is not None:
                raise InputError(
                    f"study {study_id!r} is already in the review: choose another id, or add "
                    "a report to it with `robtui study report`"
                )
            study.reports = self._copy_reports(study_id, _with_kinds(files), existing=[])
            review.studies.append(study)

        self.edit_review(add)
        return self.review.study(study_id)

    def add_report(self, study_id: str, file: Path, kind: str = "report") -> ReportFile:
        """Add one more source document to an existing study."""
        return self.add_reports(study_id, [(file, kind)])[0]

    def add_reports(
        self, study_id: str, files: Sequence[Path | tuple[Path, str]]
    ) -> list[ReportFile]:
        """Add more source documents to an existing study (path, or (path, kind)), under the
        lock on review.toml as it is now."""
        added: list[ReportFile] = []

        def add(review: Review) -> None:
            study = review.study(study_id)
            if study is None:
                self.study_or_error(study_id)  # raises with the list of studies
            added[:] = self._copy_reports(study_id, _with_kinds(files), existing=study.reports)
            study.reports.extend(added)

        self.edit_review(add)
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
            target = self.inside(self.reports_dir / rel)
            if target.exists() and sha256_of(target) != sha:
                raise InputError(
                    f"{target} already exists with other content: it was not overwritten; "
                    "move it aside or rename the new file"
                )
            planned.append((target, data, report))
        for target, data, _ in planned:
            if not target.exists():
                with self.locked():
                    write_bytes_atomic(target, data, locked=True)
        return [report for _, _, report in planned]

    def add_result(self, spec: ResultSpec) -> None:
        """Add a result to assess (refuses an id already used)."""
        check_id(spec.id, "result")
        spec = _validated(ResultSpec, spec.model_dump(), f"result {spec.id}")

        def add(review: Review) -> None:
            if review.result(spec.id) is not None:
                raise InputError(
                    f"result {spec.id!r} is already in the review: choose another id"
                )
            unknown = [s for s in spec.weights if review.study(s) is None]
            if unknown:
                raise InputError(
                    f"result {spec.id}: weights name unknown studies ({', '.join(unknown)}): "
                    "add the studies first"
                )
            review.results.append(spec)

        self.edit_review(add)

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

        def change(review: Review) -> None:
            spec = review.result(result_id)
            if spec is None:
                self.result_or_error(result_id)
            review.results[review.results.index(spec)] = _validated(
                ResultSpec, {**spec.model_dump(), "effect": effect}, f"result {result_id}"
            )

        self.edit_review(change)

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
        """Where a report's copy is (OutsideReviewError when review.toml points outside)."""
        return self.inside(self.reports_dir / report.path)

    def check_report(self, report: ReportFile) -> str | None:
        """The problem with a report's copy (missing, or changed since it was added), or None."""
        try:
            path = self.report_path(report)
        except DataFileError as error:
            return f"{self.review_path}: report {report.path!r}: {error}"
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
                try:
                    record = self._read(Assessment, self.inside(path))
                    _check_names(path, record, reviewer=name)
                    before = len(self.judgement_problems)
                    record = self._checked(path, record)
                    problems.extend(self.judgement_problems[before:])
                except DataFileError as error:
                    problems.append(str(error))
                    self.unusable_records.append(str(error))
                    continue
                found.append(record)
        unlisted = self.unlisted_record_problems(found)
        self.unusable_records.extend(unlisted)
        problems.extend(unlisted)
        return found, problems

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
            try:
                record = self._read(Consensus, self.inside(path))
                _check_names(path, record)
                before = len(self.judgement_problems)
                record = self._checked(path, record)
                problems.extend(self.judgement_problems[before:])
            except DataFileError as error:
                problems.append(str(error))
                self.unusable_records.append(str(error))
                continue
            found.append(record)
        unlisted = self.unlisted_record_problems(found)
        self.unusable_records.extend(unlisted)
        problems.extend(unlisted)
        return found, problems

    # -- shared -----------------------------------------------------------------------------------
    def _save_record(self, path: Path, record: BaseModel, model: type[BaseModel]) -> Path:
        path = self.inside(path)
        # Validate once more: a record changed in memory with model_construct must not reach disk.
        _validated(model, record.model_dump(), str(path))
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


def _read_review(path: Path) -> tuple[Review, str]:
    review, digest = read_record_and_digest(Review, path)
    for name in [*review.reviewers, *([review.lead] if review.lead else [])]:
        try:
            check_id(name, "reviewer")
        except InputError as error:
            raise DataFileError(f"{path}: {error}") from None
    for ident, what in [*((s.id, "study") for s in review.studies),
                        *((r.id, "result") for r in review.results)]:
        try:
            check_id(ident, what)
        except InputError as error:
            raise DataFileError(f"{path}: {error}") from None
    for study in review.studies:
        for report in study.reports:
            rel = Path(report.path)
            if rel.is_absolute() or ".." in rel.parts or "\\" in report.path:
                raise DataFileError(
                    f"{path}: study {study.id}: report path {report.path!r} leads outside the "
                    "review's reports/ folder: give it as STUDY/FILE inside reports/"
                )
    return review, digest


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


def _question_set_version(set_id: str) -> str:
    from robtui.store.question_sets import builtin_question_set

    return builtin_question_set(set_id).version  # InputError names the sets available
