"""robtui init DIR --title TITLE: make a new review folder."""

from __future__ import annotations

import argparse
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "init",
        help="make a new review folder",
        description=(
            "Make a review folder: review.toml plus reports/, assessments/, consensus/ and "
            "exports/. Add studies with `robtui study add` and results with `robtui result add`."
        ),
    )
    parser.add_argument(
        "folder", type=Path, metavar="DIR", help="folder to make (may exist, empty)"
    )
    parser.add_argument("--title", required=True, help="title of the review")
    parser.add_argument("--lead", metavar="NAME", help="id of the lead reviewer")
    parser.add_argument(
        "--reviewer",
        action="append",
        default=[],
        metavar="NAME",
        help="id of a reviewer (repeat for each)",
    )
    parser.add_argument(
        "--question-set", default="rob2-parallel", metavar="ID", help="question set id"
    )
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.errors import InputError
    from robtui.store.review_folder import ReviewFolder

    try:
        folder = ReviewFolder.create(
            args.folder,
            args.title,
            question_set=args.question_set,
            lead=args.lead,
            reviewers=args.reviewer,
        )
    except OSError as error:
        raise InputError(
            f"cannot make the review folder {args.folder}: {error.strerror or error}: "
            "choose a folder you can write to"
        ) from error
    print(f"made review folder {folder.root}")
    print(f"next: robtui study add {folder.root} --study STUDY --label LABEL --report FILE")
    return 0
