"""What several commands share: the two-reviewer option, opening a review, warnings."""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from robtui.core.blinding import ASKER_ENV


def add_reviewer_options(parser: argparse.ArgumentParser) -> None:
    """``--reviewers A B``: the one spelling of every command that takes two reviewers."""
    parser.add_argument(
        "--reviewers",
        nargs=2,
        metavar=("A", "B"),
        help="the two reviewers to compare (default: the review's two)",
    )


def open_workspace(folder: Path):
    """The review at ``folder`` opened with its question set and rules (robtui.workspace)."""
    from robtui.workspace import Workspace

    return Workspace.open(folder)


def add_asking(parser: argparse.ArgumentParser, *, unblind: bool = False) -> None:
    """``--as NAME`` (default $ROBTUI_REVIEWER) and, where the lead may override, --unblind."""
    parser.add_argument(
        "--as",
        dest="asker",
        metavar="NAME",
        default=None,
        help=f"who is asking: a reviewer or the lead (default: ${ASKER_ENV})",
    )
    if unblind:
        parser.add_argument(
            "--unblind",
            action="store_true",
            help="the lead only: see or change a reviewer's work that is not complete",
        )


def asker(args: argparse.Namespace) -> str | None:
    """Who is asking: --as, else $ROBTUI_REVIEWER (stripped), else None."""
    name = getattr(args, "asker", None) or os.environ.get(ASKER_ENV, "")
    return name.strip() or None


def open_workspace_as_lead(args: argparse.Namespace, what: str):
    """``open_workspace`` for a command that shows both reviewers' work: the lead's
    (robtui.core.blinding)."""
    from robtui.core.blinding import require_lead

    ws = open_workspace(args.folder)
    require_lead(asker(args), ws.review, what)
    return ws


def warn(lines: list[str]) -> None:
    for line in lines:
        print(f"robtui: {line}", file=sys.stderr)
