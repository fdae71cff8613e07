"""review.toml: its name and reading it with the checks a hand-edited file needs (reviewer,
study and result ids; report paths that stay inside reports/)."""

from __future__ import annotations

from pathlib import Path

from robtui.core.model import Review
from robtui.errors import DataFileError, InputError
from robtui.store.ids import check_id
from robtui.store.records import read_record_and_digest

REVIEW_FILE = "review.toml"


def read_review(path: Path) -> tuple[Review, str]:
    """The review in ``path`` and the sha256 of the bytes read; DataFileError when unusable."""
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
