"""robtui open [DIR] [--reviewer NAME]: assess a review's results in the terminal workbench."""

from __future__ import annotations

import argparse
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "open",
        help="open a review in the workbench to assess its results",
        description=(
            "Open the review folder DIR (default: the review folder you are in) in the "
            "keyboard-driven workbench. Without --reviewer the first screen asks who is "
            "assessing. Every change is saved at once. Suggested sentences are candidates: "
            "you decide."
        ),
    )
    parser.add_argument(
        "folder", nargs="?", type=Path, metavar="DIR", help="review folder (default: here)"
    )
    parser.add_argument("--reviewer", metavar="NAME", help="who is assessing (e.g. maria)")
    parser.add_argument(
        "--add-reviewer",
        action="store_true",
        help="NAME is not on the review yet: list them as a reviewer and open",
    )
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.store.review_folder import ReviewFolder
    from robtui.tui.app import run_workbench
    from robtui.workspace import check_reviewer_name

    if args.folder is None:
        folder = ReviewFolder.find(Path.cwd()).root
    else:
        folder = args.folder
    if args.reviewer is not None:
        name = check_reviewer_name(args.reviewer)
        opened = ReviewFolder.open(Path(folder))
        if args.add_reviewer:
            if opened.is_unlisted_reviewer(name):
                opened.add_reviewer(name)
        else:
            opened.refuse_unlisted_reviewer(name)
    return run_workbench(folder, args.reviewer)
