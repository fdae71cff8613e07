"""robtui agreement DIR: how well two reviewers agreed (kappa, weighted kappa, PABAK, bands)."""

from __future__ import annotations

import argparse
import json
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    from robtui.commands._common import add_asking, add_reviewer_options

    parser = subparsers.add_parser(
        "agreement",
        help="agreement statistics between two reviewers",
        description=(
            "Per domain, overall judgement and signalling question: percent agreement, Cohen's "
            "kappa with a 95% confidence interval (Fleiss, Cohen & Everitt 1969 standard error), "
            "linearly weighted kappa for the ordered judgements, PABAK (Byrt, Bishop & Carlin "
            "1993) and the Landis & Koch (1977) band. Only assessments marked complete count."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR", help="review folder")
    add_reviewer_options(parser)
    parser.add_argument("--result", help="only this result")
    parser.add_argument("--json", action="store_true", help="print JSON")
    add_asking(parser)
    parser.set_defaults(func=run)


def _num(value, pattern: str = "{:.2f}") -> str:
    return "-" if value is None else pattern.format(value)


def format_table(stats: dict, qset) -> list[str]:
    """The agreement tables as text; each row's notes are numbered beside it and listed under
    the table, so a note is read with the figure it concerns."""
    notes: list[str] = []
    lines = [f"Unit of analysis: {stats['analysis']['unit']}: {stats['analysis']['reason']}."]
    lines += _tables(stats, qset, notes)
    for result, part in stats.get("by_result", {}).items():
        lines += ["", f"Result {result} on its own ({part['compared']} pair(s), one per study):"]
        lines += _tables(part, qset, notes)
    if notes:
        lines += ["", "Notes:"] + [f"  [{i}] {n}" for i, n in enumerate(notes, start=1)]
    return lines


def _tables(stats: dict, qset, notes: list[str]) -> list[str]:
    head = (
        f"{'':<28} {'n':>4} {'agree%':>7} {'kappa':>6} {'95% CI':>15} {'w.kappa':>7} "
        f"{'PABAK':>6}  band"
    )

    def row(label: str, s: dict) -> str:
        ci = s["kappa_ci"]
        ci_text = f"[{ci[0]:.2f}, {ci[1]:.2f}]" if ci else "-"
        marks = []
        for note in s["notes"]:
            if note not in notes:
                notes.append(note)
            marks.append(str(notes.index(note) + 1))
        return (
            f"{label:<28} {s['n']:>4} {_num(s['percent_agreement'], '{:.1f}'):>7} "
            f"{_num(s['kappa']):>6} {ci_text:>15} {_num(s['weighted_kappa']):>7} "
            f"{_num(s['pabak']):>6}  {s['band']}" + (f"  [{','.join(marks)}]" if marks else "")
        )

    lines = [head]
    for key, s in stats["domains"].items():
        label = "Overall" if key == "overall" else qset.domain_label(key)
        lines.append(row(label[:28], s))
    lines.append("")
    lines.append("Signalling questions (pairs where both reviewers were asked):")
    for key, s in stats["questions"].items():
        lines.append(row(key, s))
    return lines


def run(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead, warn
    from robtui.core.comparison import review_agreement

    ws = open_workspace_as_lead(args, "robtui agreement")
    qset = ws.sets.combined()  # names of every domain in use (a review may mix designs)
    reviewers = ws.choose_reviewers(args.reviewers)
    pairs, problems = ws.pairs(reviewers, result=args.result)
    stats = review_agreement(pairs, ws.sets)
    stats["reviewers"] = list(reviewers)
    if args.json:
        print(json.dumps(stats, indent=2, ensure_ascii=False))
    else:
        print(
            f"Agreement of {reviewers[0]} and {reviewers[1]}: {stats['compared']} result(s) "
            f"of {stats['studies']} studies compared"
        )
        print("\n".join(format_table(stats, qset)))
    skipped = [
        f"{x['study']} / {x['result']} not counted: {x['problem']}" for x in stats["not_compared"]
    ]
    warn(problems + skipped)
    return 0
