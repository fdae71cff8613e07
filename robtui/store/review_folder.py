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

This module opens, creates and edits the folder and its review.toml; the rest is in its
own modules, mixed in: ``review_contents`` (reviewers, studies, results), ``report_copies``
(reports/), ``record_files`` (assessments/ and consensus/), ``review_file`` (reading
review.toml) and ``ids`` (the ids that name files).
"""

from __future__ import annotations

from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path

from pydantic import BaseModel

from robtui.core.model import Review
from robtui.errors import InputError
from robtui.files import confined, digest_bytes, refuse_if_changed, review_lock, write_text_atomic
from robtui.store.ids import check_id
from robtui.store.record_files import RecordFiles
from robtui.store.records import read_record_and_digest, record_to_toml, validated
from robtui.store.report_copies import ReportCopies
from robtui.store.review_contents import ReviewContents
from robtui.store.review_file import REVIEW_FILE, read_review

SUBFOLDERS = ("reports", "assessments", "consensus", "exports")


class ReviewFolder(ReviewContents, ReportCopies, RecordFiles):
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
        review = validated(
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
        review, digest = read_review(root / REVIEW_FILE)
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
                read_review(path)  # raises if unreadable: never written over
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
        self.review, self._seen[path] = read_review(path)
        return True

    def edit_review(self, edit: Callable[[Review], Review | None]) -> Review:
        """Change review.toml: under the lock, read it again if another process changed it,
        apply ``edit`` to a copy of the fresh review (it may raise InputError), validate the
        whole review and write it. Another process's additions are never lost."""
        with self.locked():
            self.reload_review()
            draft = self.review.model_copy(deep=True)
            changed = edit(draft) or draft
            checked = validated(Review, changed.model_dump(), "review")
            previous, self.review = self.review, checked
            try:
                self.save_review()
            except BaseException:
                self.review = previous
                raise
        return self.review


def _question_set_version(set_id: str) -> str:
    from robtui.store.question_sets import builtin_question_set

    return builtin_question_set(set_id).version  # InputError names the sets available
