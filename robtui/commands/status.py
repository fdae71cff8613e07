"""robtui status DIR [--reviewer R] [--json]: progress per study × result (and reviewer)."""

from __future__ import annotations

import argparse
from pathlib import Path

from robtui.commands._common import add_asking


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "status",
        help="progress of a review per study and result",
        description=(
            "Progress per study × result: for each reviewer, not started / draft / complete, "
            "questions answered of those asked, and the final overall judgement; under a row, "
            "each judgement the reviewer overrode, with the proposal and the reason. With "
            "--reviewer only that reviewer's work is shown."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR")
    parser.add_argument("--reviewer", metavar="NAME", help="show one reviewer only")
    parser.add_argument("--json", action="store_true", help="print JSON instead of a table")
    add_asking(parser, unblind=True)
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    import json

    from robtui.core.explaining import override_in_words
    from robtui.core.questions import JUDGEMENT_LABELS
    from robtui.store.ids import check_id
    from robtui.store.progress import progress_json, review_progress
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.open(args.folder)
    if args.reviewer is not None:
        check_id(args.reviewer, "reviewer")
    rows, problems = review_progress(folder, args.reviewer)
    rows, hidden = _blinded(folder, rows, args)
    if args.json:
        print(json.dumps(progress_json(folder, rows, problems), indent=2, ensure_ascii=False))
        return 1 if problems else 0
    print(f"{folder.review.title} ({folder.root})")
    if not rows:
        print(
            "nothing to assess yet: add studies (`robtui study add`) and results (`robtui result add`)"
        )
    header = f"{'study':<16} {'result':<16} {'reviewer':<12} {'status':<16} {'answered':<9} overall"
    if rows:
        print(header)
    for r in rows:
        blind = r.status == "not started" or r.status.endswith("(blind)")
        count = "-" if blind else f"{r.answered}/{r.asked}"
        overall = JUDGEMENT_LABELS[r.overall] if r.overall else "-"
        if r.overall and any(o.key == "overall" for o in r.overrides):
            overall += " (overridden)"
        print(f"{r.study:<16} {r.result:<16} {r.reviewer:<12} {r.status:<16} {count:<9} {overall}")
        for o in r.overrides:
            print("    override " + override_in_words(o.label, o.proposed, o.judgement, o.reason))
    done = sum(r.status.startswith("complete") for r in rows)
    if rows:
        print(f"{done} of {len(rows)} assessments complete")
    if hidden:
        print(
            f"{hidden} row(s) of other reviewers' work show no counts or judgements (blinding): "
            "each reviewer sees their own (--as NAME); the lead sees complete work, and work "
            "not yet complete with --unblind"
        )
    for problem in problems:
        print(f"problem: {problem}")
    return 1 if problems else 0


def _blinded(folder, rows, args):
    """Rows with another reviewer's counts and judgement hidden unless the asker may see them
    (robtui.core.blinding); the number of rows hidden."""
    from dataclasses import replace

    from robtui.commands._common import asker
    from robtui.core.blinding import may_see, require_asker
    from robtui.errors import InputError

    name = asker(args) or args.reviewer
    if name is not None and name != args.reviewer:
        require_asker(name, folder.review, "robtui status")
    if args.reviewer is not None and name not in (args.reviewer, folder.review.lead):
        raise InputError(
            f"status --reviewer {args.reviewer}: only {args.reviewer} or the lead may see that "
            f"reviewer's progress through robtui (you asked as {name})"
        )
    unblind = getattr(args, "unblind", False) and name == folder.review.lead
    shown, hidden = [], 0
    for row in rows:
        visible = row.status in ("not started", "unreadable") or may_see(
            name, row.reviewer, folder.review, complete=row.status == "complete", unblind=unblind
        )
        if not visible:
            row = replace(row, answered=0, asked=0, overall=None, overrides=(),
                          status=f"{row.status} (blind)")
            hidden += 1
        shown.append(row)
    return shown, hidden
