"""Source documents of a review's studies: copies under reports/<study>/ with their sha256,
and the check that a copy is still there and unchanged. Mixed into ReviewFolder."""

from __future__ import annotations

import hashlib
from collections.abc import Sequence
from pathlib import Path

from robtui.core.model import ReportFile
from robtui.errors import DataFileError, InputError
from robtui.files import write_bytes_atomic
from robtui.store.records import validated


def sha256_of(path: Path) -> str:
    """Hex sha256 of a file's bytes."""
    digest = hashlib.sha256()
    with open(path, "rb") as handle:
        for block in iter(lambda: handle.read(1 << 16), b""):
            digest.update(block)
    return digest.hexdigest()



def with_kinds(files: Sequence[Path | tuple[Path, str]]) -> list[tuple[Path, str]]:
    """Files as (path, kind); a bare path is a report."""
    return [(Path(f[0]), f[1]) if isinstance(f, tuple) else (Path(f), "report") for f in files]



class ReportCopies:
    """The reports/ folder of a ReviewFolder (uses its root, ``inside`` and lock)."""

    @property
    def reports_dir(self) -> Path:
        return self.root / "reports"

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
            report = validated(
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
