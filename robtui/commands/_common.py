"""What several commands share: the two-reviewer option, opening a review, warnings."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


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


def warn(lines: list[str]) -> None:
    for line in lines:
        print(f"robtui: {line}", file=sys.stderr)
