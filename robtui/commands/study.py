"""robtui study add|report|list DIR: the studies of a review and their report files.

Every file is given with its kind (--report, --protocol, --registry, --analysis-plan,
--supplement) and the study with --study, the same spellings as every other command.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from robtui.commands._parsing import IntermixedParser

# option -> kind stored in review.toml (robtui.core.model.REPORT_KINDS says it in words)
FILE_OPTIONS = {
    "--report": "report",
    "--protocol": "protocol",
    "--registry": "registry",
    "--analysis-plan": "analysis_plan",
    "--supplement": "supplement",
}


def _with_article(noun: str) -> str:
    """'a protocol', 'an analysis plan'."""
    return f"{'an' if noun[:1] in 'aeiou' else 'a'} {noun}"


def _file_options(parser: argparse.ArgumentParser) -> None:
    for option, kind in FILE_OPTIONS.items():
        parser.add_argument(
            option,
            action="append",
            default=[],
            type=Path,
            metavar="FILE",
            dest=f"files_{kind}",
            help=f"{_with_article(kind.replace('_', ' '))} file of the study (repeat for several)",
        )
    # Old spellings, refused with a hint (see refuse_old_spellings).
    parser.add_argument("--id", dest="old_id", help=argparse.SUPPRESS)
    parser.add_argument("--kind", dest="old_kind", help=argparse.SUPPRESS)


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "study", help="add and list studies", description="Studies of a review and their files."
    )
    actions = parser.add_subparsers(dest="study_action", metavar="ACTION", required=True)

    add = actions.add_parser(
        "add",
        help="add a study with its files (copied in), each with its kind",
        description="Add a study: robtui study add DIR --study Lind2021 --label 'Lind 2021' "
        "--report lind.pdf --protocol lind-protocol.pdf --registry NCT01234567.json",
    )
    add.add_argument("folder", type=Path, metavar="DIR")
    add.add_argument("--study", dest="study_id", metavar="STUDY", help="short study id")
    add.add_argument("--label", required=True, help="label shown in tables")
    _file_options(add)
    add.add_argument(
        "--design",
        metavar="DESIGN",
        help="the trial's design, which chooses its question set: parallel, cluster, crossover "
        "(the designs the sets declare) or a question-set id, also of the review's own sets in "
        "DIR/question_sets/ (default: the review's question set)",
    )
    add.set_defaults(func=run_add)

    more = actions.add_parser("report", help="add more files to a study, each with its kind")
    more.add_argument("folder", type=Path, metavar="DIR")
    more.add_argument("--study", dest="study_id", metavar="STUDY")
    more.add_argument("old_file", nargs="?", type=Path, help=argparse.SUPPRESS)
    _file_options(more)
    more.set_defaults(func=run_report)
    more.__class__ = IntermixedParser  # an old-style FILE after the options is still caught

    listing = actions.add_parser("list", help="list studies and check their report files")
    listing.add_argument("folder", type=Path, metavar="DIR")
    listing.set_defaults(func=run_list)


def refuse_old_spellings(args: argparse.Namespace, example: str) -> None:
    """Old option spellings say what replaced them (nothing is done)."""
    from robtui.errors import InputError

    if args.old_id is not None:
        raise InputError(f"--id is now --study (the same in every command): {example}")
    if args.old_kind is not None:
        raise InputError(
            "--kind is gone: give each file with its kind, --report, --protocol, --registry, "
            f"--analysis-plan or --supplement FILE: {example}"
        )
    if getattr(args, "old_file", None) is not None:
        raise InputError(f"give the file with its kind, e.g. --protocol FILE: {example}")
    if not args.study_id:
        raise InputError(f"say which study with --study: {example}")


def _files(args: argparse.Namespace) -> list[tuple[Path, str]]:
    return [(path, kind) for kind in FILE_OPTIONS.values() for path in getattr(args, f"files_{kind}")]


def run_add(args: argparse.Namespace) -> int:
    from robtui.store.review_folder import ReviewFolder

    refuse_old_spellings(args, "robtui study add DIR --study ID --label LABEL --report FILE")
    folder = ReviewFolder.open(args.folder)
    study = folder.add_study(args.study_id, args.label, _files(args), design=args.design)
    design = f", design {study.design}" if study.design else ""
    print(f"added study {study.id} ({study.label}{design}) with {_counted(study.reports)}")
    return 0


def _counted(reports) -> str:
    from robtui.core.model import REPORT_KINDS

    if not reports:
        return "no files"
    return ", ".join(f"{REPORT_KINDS[r.kind]} {Path(r.path).name}" for r in reports)


def run_report(args: argparse.Namespace) -> int:
    from robtui.errors import InputError
    from robtui.store.review_folder import ReviewFolder

    refuse_old_spellings(args, "robtui study report DIR --study ID --protocol FILE")
    files = _files(args)
    if not files:
        raise InputError("give the file with its kind: --report, --protocol, --registry, "
                         "--analysis-plan or --supplement FILE")
    folder = ReviewFolder.open(args.folder)
    added = folder.add_reports(args.study_id, files)
    print(f"added to {args.study_id}: {_counted(added)}")
    return 0


def run_list(args: argparse.Namespace) -> int:
    from robtui.core.model import REPORT_KINDS
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
            print(f"    {REPORT_KINDS[report.kind]:<26} {report.path}  {problem or 'ok'}")
    if not folder.review.studies:
        print("no studies yet: add one with `robtui study add`")
    return 1 if problems else 0
