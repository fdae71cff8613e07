"""robtui export DIR --format FMT: traffic-light table, summary plot, supporting table, GRADE.

One export per result (RoB 2 judges results). Files go to DIR/exports/; each row says which
source it used (consensus, reviewers agreeing, one reviewer); studies not judged yet (drafts,
missing assessments, unsettled differences) are listed in the export and on stderr.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from robtui.commands._common import add_asking

FORMATS = ("html", "svg", "png", "pdf", "csv", "md", "tex")


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "export",
        help="export the traffic-light table, summary plot and supporting table",
        description=(
            "Export per result: traffic-light table (studies x domains and overall), summary "
            "of judgements per domain (share of studies, or of meta-analysis weight when the "
            "result has weights), supporting table (answers, justifications, quotes with "
            "pages) and a GRADE risk-of-bias suggestion for the panel. Formats html, md, tex "
            "and csv hold the tables; svg, png and pdf hold the two figures."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR", help="review folder")
    parser.add_argument(
        "--format",
        dest="formats",
        action="append",
        required=True,
        choices=(*FORMATS, "all"),
        help="output format (repeat for several)",
    )
    parser.add_argument("--result", help="only this result (default: every result)")
    parser.add_argument(
        "--out",
        metavar="NAME",
        help="file name (without extension) inside DIR/exports/; default: the result id",
    )
    parser.add_argument(
        "--figure-width",
        choices=("page", "column"),
        default="page",
        help="figure width: a journal page's text block (174 mm, default) or one column (84 mm)",
    )
    parser.add_argument(
        "--despite-problems",
        action="store_true",
        help="export even when some records cannot be used (unreadable files, or records for "
        "studies or results review.toml does not list); their rows show as not judged",
    )
    add_asking(parser)
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead, warn
    from robtui.errors import InputError
    from robtui.export.writers import export_outcome

    ws = open_workspace_as_lead(args, "robtui export")
    folder = ws.folder
    if args.result:
        results = [folder.result_or_error(args.result).id]
    else:
        results = [r.id for r in folder.review.results]
    if not results:
        raise InputError("the review has no results yet: add one with `robtui result add`")
    if args.out:
        from robtui.export.safety import export_path

        export_path(
            folder.exports_dir, args.out, folder.root
        )  # refuse a bad name before writing anything
    formats = list(dict.fromkeys(FORMATS if "all" in args.formats else args.formats))
    assessments, problems = ws.assessments()  # each checked against its study's set
    consensus, consensus_problems = folder.consensus_records()
    warn(problems + consensus_problems)
    if folder.unusable_records and not args.despite_problems:
        # An export written now would show these records' rows as not judged and replace
        # earlier, fuller exports: say so instead of writing.
        raise InputError(
            f"{len(folder.unusable_records)} record(s) of the review cannot be used (listed "
            "above): nothing was exported, so earlier exports stay as they are; fix or restore "
            "those files (or review.toml), or export anyway with --despite-problems"
        )
    for result_id in results:
        name = args.out if len(results) == 1 or not args.out else f"{args.out}-{result_id}"
        outcome = None
        for fmt in formats:
            try:
                paths, outcome = export_outcome(
                    folder,
                    ws.sets,
                    result_id,
                    fmt,
                    name=name,
                    assessments=assessments,
                    consensus=consensus,
                    figure_width=args.figure_width,
                )
            except OSError as error:
                raise InputError(
                    f"cannot write the {fmt} export of {result_id} in {folder.exports_dir}: "
                    f"{error.strerror or error}: make sure exports/ is a folder you can write to"
                ) from error
            for path in paths:
                print(path)
        if outcome is not None:
            g = outcome.grade
            print(
                f"{result_id}: GRADE risk of bias, "
                + (f"suggested {g.rating}" if g.rating else f"no suggestion: {g.rationale}")
                + " (a suggestion for the panel; our own rule of thumb)"
            )
            warn([f"{result_id}: not judged or not final: {p}" for p in outcome.problems])
    return 1 if folder.unusable_records else 0
