"""robtui compare DIR: two reviewers' assessments side by side, differences first.

Only assessments marked complete are compared; drafts and missing ones are listed.
Also holds the loading helpers shared by the consensus, agreement and export commands.
"""

from __future__ import annotations

import argparse
import json
from pathlib import Path

from robtui.commands._common import (
    add_asking,
    add_reviewer_options,
    open_workspace_as_lead,
    warn,
)


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "compare",
        help="compare two reviewers' assessments, differences first",
        description=(
            "For each study and result: both reviewers' answers per signalling question "
            "(differences first, with justifications and quotes) and their domain and overall "
            "judgements. Only assessments marked complete are compared; the rest are listed."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR", help="review folder")
    add_reviewer_options(parser)
    parser.add_argument("--study", help="only this study")
    parser.add_argument("--result", help="only this result")
    parser.add_argument(
        "--all-questions",
        action="store_true",
        help="show agreed answers in full too (default: one line each)",
    )
    parser.add_argument("--json", action="store_true", help="print JSON")
    add_asking(parser)
    parser.set_defaults(func=run)


def _response(code: str | None) -> str:
    return code if code is not None else "not asked"


def _quotes(quotes) -> list[str]:
    return [
        f"      \u201c{q.text}\u201d " + (f"(p. {q.page})" if q.page else "(page not known)")
        for q in quotes
    ]


def format_comparison(comparison, all_questions: bool = False) -> list[str]:
    """Human-readable lines for one pair."""
    from robtui.core.questions import judgement_label

    pair = comparison.pair
    a, b = pair.reviewer_a, pair.reviewer_b
    lines = [
        (
            f"== {pair.study_id} / {pair.result_id}: {comparison.n_differences} "
            f"difference(s) in signalling questions"
        )
    ]
    lines.append(f"   {'judgement':<34} {a:<20} {b:<20}")
    for j in comparison.judgements:
        mark = "\u2260" if j.differs else " "
        lines.append(
            f" {mark} {j.label:<34} {judgement_label(j.final_a):<20} "
            f"{judgement_label(j.final_b):<20}"
        )
        for name, reason in ((a, j.override_a), (b, j.override_b)):
            if reason:
                lines.append(f"      override by {name}: {reason}")
    for q in comparison.questions:
        if q.differs:
            lines.append(
                f" \u2260 {q.question_id} {q.short}: {a} {_response(q.response_a)}"
                f" | {b} {_response(q.response_b)}"
            )
            lines.append(f"    {q.text}")
            for name, resp, just, quotes in (
                (a, q.response_a, q.justification_a, q.quotes_a),
                (b, q.response_b, q.justification_b, q.quotes_b),
            ):
                lines.append(f"    {name} ({_response(resp)}): {just or '(no justification)'}")
                lines += _quotes(quotes)
        elif all_questions:
            lines.append(f" = {q.question_id} {q.short}: both {_response(q.response_a)}")
            for name, just, quotes in (
                (a, q.justification_a, q.quotes_a),
                (b, q.justification_b, q.quotes_b),
            ):
                if just or quotes:
                    lines.append(f"    {name}: {just}")
                    lines += _quotes(quotes)
    agreed = [
        f"{q.question_id}={_response(q.response_a)}" for q in comparison.questions if not q.differs
    ]
    if agreed and not all_questions:
        lines.append("   agreed: " + " ".join(agreed))
    return lines


def run(args: argparse.Namespace) -> int:
    from robtui.core.comparison import compare_pair

    ws = open_workspace_as_lead(args, "robtui compare")
    reviewers = ws.choose_reviewers(args.reviewers)
    pairs, problems = ws.pairs(reviewers, args.study, args.result)
    comparisons = [compare_pair(p, ws.question_set_for(p.study_id)) for p in pairs if p.comparable]
    stale = ws.stale_consensus(pairs)
    problems = problems + [
        f"{study} / {result}: consensus is stale, built on answers since changed "
        f"({'; '.join(changes)}): reopen it and review"
        for (study, result), changes in stale.items()
    ]
    skipped = [
        f"{p.study_id} / {p.result_id} not compared: {p.problem}" for p in pairs if not p.comparable
    ]
    if args.json:
        print(
            json.dumps(
                {
                    "reviewers": list(reviewers),
                    "pairs": [c.to_dict() for c in comparisons],
                    "not_compared": [
                        {"study": p.study_id, "result": p.result_id, "problem": p.problem}
                        for p in pairs
                        if not p.comparable
                    ],
                    "problems": problems,
                },
                indent=2,
                ensure_ascii=False,
            )
        )
    else:
        ordered = sorted(comparisons, key=lambda c: -c.n_differences)
        for c in ordered:
            print("\n".join(format_comparison(c, args.all_questions)))
            print()
        print(
            f"{len(comparisons)} compared, {len(skipped)} not compared "
            f"({reviewers[0]} vs {reviewers[1]})"
        )
        for line in skipped:
            print(f"  {line}")
    warn(
        problems
        + ([f"{len(skipped)} result(s) not compared (drafts, missing or unusable files)"] if skipped else [])
    )
    return 0
