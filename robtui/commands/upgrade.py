"""robtui upgrade DIR [--study S] [--result R] [--reviewer NAME] [--apply]: carry records made
with an earlier version of their question set to the current one."""

from __future__ import annotations

import argparse
from pathlib import Path

from robtui.commands._common import add_asking


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "upgrade",
        help="carry assessments made with an earlier question-set version to the current one",
        description=(
            "Assessments and consensus records made with an earlier version of their study's "
            "question set are not used until they are carried to the current version. This "
            "shows, for each, the answers kept aside (questions the current version does not "
            "have: kept in the record, never dropped), the questions now asked without an "
            "answer, and every judgement the current rules propose differently; overrides "
            "are kept, and those whose proposal changed are to be confirmed again. Nothing is "
            "written without --apply. Blinding holds: a reviewer carries their own "
            "assessments; the lead the consensus records and, with --unblind, the reviewers'."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR")
    parser.add_argument("--study", metavar="STUDY", help="only this study's records")
    parser.add_argument("--result", metavar="RESULT", help="only this result's records")
    parser.add_argument(
        "--reviewer", metavar="NAME", help="only this reviewer's assessments (no consensus)"
    )
    parser.add_argument(
        "--apply", action="store_true", help="write the records (default: show what changes)"
    )
    add_asking(parser, unblind=True)
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.commands._common import asker
    from robtui.core.blinding import require_asker
    from robtui.store.ids import check_id
    from robtui.workspace import Workspace
    from robtui.workspace.set_upgrades import apply_carries, plan_carries

    if args.reviewer is not None:
        check_id(args.reviewer, "reviewer")
    ws = Workspace.open(args.folder)
    # blinding: a reviewer carries their own work; the lead the consensus records and, as
    # for any change to a reviewer's work, theirs with --unblind
    who = require_asker(asker(args), ws.review, "robtui upgrade")
    plans, problems = plan_carries(
        ws, args.study, args.result, args.reviewer, asker=who, unblind=args.unblind
    )
    for plan in plans:
        print(f"{plan.title}: {plan.path.relative_to(ws.root.resolve())}")
        for line in plan.describe():
            print(f"    {line}")
    if not plans:
        print("no record needs carrying to a later question-set version")
    elif args.apply:
        written = apply_carries(ws, plans)
        print(f"carried {len(written)} record(s) to the current question-set version")
    else:
        print(
            f"{len(plans)} record(s) to carry; nothing written (dry run): run again with "
            "--apply to write them"
        )
    for problem in problems:
        print(f"problem: {problem}")
    return 1 if problems else 0
