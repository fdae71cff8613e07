"""The service layer both front ends call: a review opened with its question set(s), answering
rules and rankers, and what the CLI and the workbench both need from it (choose reviewers,
load pairs, prepare reports, ...). Commands and screens stay thin callers of this package.

``Workspace``, ``check_reviewer_name`` and ``choose_reviewers`` are imported on first use, so
that a worker importing ``robtui.workspace.preparing`` does not pay for the rest.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from robtui.workspace.reviewers import check_reviewer_name, choose_reviewers
    from robtui.workspace.workspace import Workspace

__all__ = ["Workspace", "check_reviewer_name", "choose_reviewers"]


def __getattr__(name: str):
    if name == "Workspace":
        from robtui.workspace.workspace import Workspace

        return Workspace
    if name in ("check_reviewer_name", "choose_reviewers"):
        from robtui.workspace import reviewers

        return getattr(reviewers, name)
    raise AttributeError(f"module 'robtui.workspace' has no attribute {name!r}")
