"""robtui compare DIR: two reviewers' assessments side by side, differences first.

Only assessments marked complete are compared; drafts and missing ones are listed.
Also holds the loading helpers shared by the consensus, agreement and export commands.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path


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
    parser.set_defaults(func=run)


def add_reviewer_options(parser: argparse.ArgumentParser) -> None:
    parser.add_argument(
        "--reviewers",
        nargs=2,
        metavar=("A", "B"),
        help="the two reviewers to compare (default: the review's two reviewers)",
    )


# -- shared helpers ------------------------------------------------------------------------------
def open_review(folder_path: Path):
    """(ReviewFolder, QuestionSet) for a review folder."""
    from robtui.store.question_sets import builtin_question_set
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.open(folder_path)
    return folder, builtin_question_set(folder.review.question_set)


def choose_reviewers(folder, named: list[str] | None) -> tuple[str, str]:
    """The two reviewers: as named (each must be in the review), else the review's two."""
    from robtui.errors import InputError

    known = list(dict.fromkeys([*folder.review.reviewers, *folder.reviewers_on_disk()]))
    if named:
        a, b = named
        if a == b:
            raise InputError(f"--reviewers names {a} twice: name two different reviewers")
        unknown = [r for r in (a, b) if r not in known]
        if unknown:
            raise InputError(
                f"reviewer {', '.join(unknown)} is not in this review (reviewers: "
                f"{', '.join(known) or 'none yet'}): check the spelling"
            )
        return a, b
    lead = folder.review.lead
    listed = [r for r in folder.review.reviewers if r != lead]
    candidates = listed if len(listed) >= 2 else [r for r in known if r != lead]
    if len(candidates) != 2:
        raise InputError(
            f"this review has {len(candidates)} reviewers ({', '.join(candidates) or 'none'}): "
            "name the two to compare with --reviewers A B"
        )
    return candidates[0], candidates[1]


def load_pairs(
    folder, reviewers: tuple[str, str], study: str | None = None, result: str | None = None
):
    """Pairs of the two reviewers' assessments for every study x result (filtered),
    plus problems with unreadable files (reported, never hidden)."""
    from robtui.core.comparison import pair_assessments

    if study is not None:
        folder.study_or_error(study)
    if result is not None:
        folder.result_or_error(result)
    a, problems_a = folder.assessments(reviewers[0])
    b, problems_b = folder.assessments(reviewers[1])
    expected = [
        (s.id, r.id)
        for s in folder.review.studies
        for r in folder.review.results
        if (study is None or s.id == study) and (result is None or r.id == result)
    ]
    wanted = set(expected)
    a = [x for x in a if (x.study_id, x.result_id) in wanted]
    b = [x for x in b if (x.study_id, x.result_id) in wanted]
    pairs = pair_assessments(
        a, b, reviewer_a=reviewers[0], reviewer_b=reviewers[1], expected=expected
    )
    return pairs, problems_a + problems_b


def warn(lines: list[str]) -> None:
    for line in lines:
        print(f"robtui: {line}", file=sys.stderr)


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

    folder, qset = open_review(args.folder)
    reviewers = choose_reviewers(folder, args.reviewers)
    pairs, problems = load_pairs(folder, reviewers, args.study, args.result)
    comparisons = [compare_pair(p, qset) for p in pairs if p.comparable]
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
        + ([f"{len(skipped)} result(s) not compared (drafts or missing)"] if skipped else [])
    )
    return 0
