"""robtui status DIR [--reviewer R] [--json]: progress per study × result (and reviewer)."""

from __future__ import annotations

import argparse
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "status",
        help="progress of a review per study and result",
        description=(
            "Progress per study × result: for each reviewer, not started / draft / complete, "
            "questions answered of those asked, and the final overall judgement. With "
            "--reviewer only that reviewer's work is shown."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR")
    parser.add_argument("--reviewer", metavar="NAME", help="show one reviewer only")
    parser.add_argument("--json", action="store_true", help="print JSON instead of a table")
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    import json

    from robtui.core.questions import JUDGEMENT_LABELS
    from robtui.store.progress import progress_json, review_progress
    from robtui.store.review_folder import ReviewFolder, check_id

    folder = ReviewFolder.open(args.folder)
    if args.reviewer is not None:
        check_id(args.reviewer, "reviewer")
    rows, problems = review_progress(folder, args.reviewer)
    if args.json:
        print(json.dumps(progress_json(folder, rows, problems), indent=2, ensure_ascii=False))
        return 0
    print(f"{folder.review.title} ({folder.root})")
    if not rows:
        print(
            "nothing to assess yet: add studies (`robtui study add`) and results (`robtui result add`)"
        )
    header = f"{'study':<16} {'result':<16} {'reviewer':<12} {'status':<12} {'answered':<9} overall"
    if rows:
        print(header)
    for r in rows:
        count = f"{r.answered}/{r.asked}" if r.status != "not started" else "-"
        overall = JUDGEMENT_LABELS[r.overall] if r.overall else "-"
        print(f"{r.study:<16} {r.result:<16} {r.reviewer:<12} {r.status:<12} {count:<9} {overall}")
    done = sum(r.status == "complete" for r in rows)
    if rows:
        print(f"{done} of {len(rows)} assessments complete")
    for problem in problems:
        print(f"problem: {problem}")
    return 1 if problems else 0
