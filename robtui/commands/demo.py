"""robtui demo [--copy-to DIR] [--reviewer NAME]: the bundled demo review (invented trials)."""

from __future__ import annotations

import argparse
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "demo",
        help="build the demo review (invented trials, two reviewers' finished work) and open it",
        description=(
            "Build the bundled demo review: seven invented trial reports (parallel-group, one "
            "cluster-randomised and one crossover trial, each assessed with its design's "
            "question set), the results to assess "
            "and two reviewers' complete assessments. Without --copy-to it is built in a fresh "
            "folder and opened in the workbench."
        ),
    )
    parser.add_argument(
        "--copy-to", type=Path, metavar="DIR", help="only build the demo in DIR (new or empty)"
    )
    parser.add_argument("--reviewer", metavar="NAME", help="open the workbench as this reviewer")
    parser.set_defaults(func=run)


def fresh_demo_dir() -> Path:
    """A new folder for the demo under the user data folder (a temporary one as fallback)."""
    import tempfile
    from datetime import UTC, datetime

    stamp = datetime.now(UTC).strftime("%Y%m%d-%H%M%S")
    try:
        from platformdirs import user_data_dir

        base = Path(user_data_dir("robtui")) / "demo"
        base.mkdir(parents=True, exist_ok=True)
        return Path(tempfile.mkdtemp(prefix=f"review-{stamp}-", dir=base))
    except OSError:
        return Path(tempfile.mkdtemp(prefix=f"robtui-demo-{stamp}-"))


def run(args: argparse.Namespace) -> int:
    from robtui.errors import InputError
    from robtui.store.demo import build_demo_review
    from robtui.store.ids import check_id

    if args.reviewer is not None:
        check_id(args.reviewer, "reviewer")
    dest = args.copy_to if args.copy_to is not None else fresh_demo_dir()
    try:
        folder = build_demo_review(dest)
    except OSError as error:
        raise InputError(
            f"cannot build the demo in {dest}: {error.strerror or error}: "
            "give a new or empty folder you can write to"
        ) from error
    reviewers = ", ".join(folder.review.reviewers)
    print(
        f"demo review built in {folder.root} (reviewers: {reviewers}; lead: {folder.review.lead})"
    )
    who = args.reviewer or folder.review.reviewers[0]
    if args.copy_to is not None:
        print(f"next: {_next_command(folder.root, who)}")
        return 0
    try:
        from robtui.tui.app import run_workbench
    except ImportError as error:
        print(f"the workbench is not available in this build ({error})")
        print(f"see the review with: robtui status {folder.root}")
        return 0
    return int(run_workbench(folder.root, reviewer=args.reviewer) or 0)


def _next_command(root: Path, reviewer: str) -> str:
    from importlib.util import find_spec

    if find_spec("robtui.commands.open") is not None:
        return f"robtui open {root} --reviewer {reviewer}"
    return f"robtui status {root}"
