"""robtui study add|report|list DIR: the studies of a review and their report files."""

from __future__ import annotations

import argparse
from pathlib import Path

KINDS = ("report", "protocol", "registry", "other")


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "study", help="add and list studies", description="Studies of a review and their files."
    )
    actions = parser.add_subparsers(dest="study_action", metavar="ACTION", required=True)

    add = actions.add_parser("add", help="add a study with its report files (copied in)")
    add.add_argument("folder", type=Path, metavar="DIR")
    add.add_argument("--id", required=True, dest="study_id", help="short study id, e.g. Lind2021")
    add.add_argument("--label", required=True, help="label shown in tables")
    add.add_argument(
        "--report", action="append", default=[], type=Path, metavar="FILE", help="report file"
    )
    add.add_argument(
        "--kind", choices=KINDS, default="report", help="kind of the given files (default report)"
    )
    add.add_argument(
        "--design",
        metavar="DESIGN",
        help="the trial's design, which chooses its question set: parallel, cluster, crossover "
        "(the designs the sets declare) or a question-set id, also of the review's own sets in "
        "DIR/question_sets/ (default: the review's question set)",
    )
    add.set_defaults(func=run_add)

    more = actions.add_parser("report", help="add one more file to a study")
    more.add_argument("folder", type=Path, metavar="DIR")
    more.add_argument("--id", required=True, dest="study_id")
    more.add_argument("file", type=Path, metavar="FILE")
    more.add_argument("--kind", choices=KINDS, default="report")
    more.set_defaults(func=run_report)

    listing = actions.add_parser("list", help="list studies and check their report files")
    listing.add_argument("folder", type=Path, metavar="DIR")
    listing.set_defaults(func=run_list)


def run_add(args: argparse.Namespace) -> int:
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.open(args.folder)
    study = folder.add_study(
        args.study_id, args.label, args.report, kind=args.kind, design=args.design
    )
    design = f", design {study.design}" if study.design else ""
    print(f"added study {study.id} ({study.label}{design}) with {len(study.reports)} file(s)")
    return 0


def run_report(args: argparse.Namespace) -> int:
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.open(args.folder)
    report = folder.add_report(args.study_id, args.file, kind=args.kind)
    print(f"added {report.kind} {report.path} (sha256 {report.sha256[:12]}...)")
    return 0


def run_list(args: argparse.Namespace) -> int:

    from robtui.workspace import Workspace

    ws = Workspace.open(args.folder)
    folder = ws.folder
    problems = 0
    for study in folder.review.studies:
        qset = ws.question_set_for(study.id)
        print(f"{study.id}  {study.label}  [{qset.id} v{qset.version}]")
        for report in study.reports:
            problem = folder.check_report(report)
            problems += problem is not None
            print(f"    {report.kind:<8} {report.path}  {problem or 'ok'}")
    if not folder.review.studies:
        print("no studies yet: add one with `robtui study add`")
    return 1 if problems else 0
