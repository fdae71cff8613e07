"""robtui result add|list DIR: the results being assessed (RoB 2 judges results, not trials)."""

from __future__ import annotations

import argparse
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "result", help="add and list results to assess", description="Results being assessed."
    )
    actions = parser.add_subparsers(dest="result_action", metavar="ACTION", required=True)

    add = actions.add_parser("add", help="add a result (outcome, time point, effect of interest)")
    add.add_argument("folder", type=Path, metavar="DIR")
    add.add_argument("--result", dest="result_id", metavar="RESULT", help="short result id, e.g. pain12")
    add.add_argument("--id", dest="old_id", help=argparse.SUPPRESS)  # old spelling: refused
    add.add_argument("--outcome", required=True, help="the outcome, e.g. 'Pain score (0-10)'")
    add.add_argument("--time-point", default="", help="e.g. '12 weeks'")
    add.add_argument(
        "--effect",
        default=None,
        help="effect of interest, one the review's question sets offer (default: their first, "
             "of assignment to the intervention in RoB 2; or of adhering to it)",
    )
    add.add_argument("--outcome-type", choices=("objective", "subjective"))
    add.add_argument(
        "--self-reported", choices=("yes", "no"), help="is the outcome reported by participants"
    )
    add.add_argument(
        "--weight",
        action="append",
        default=[],
        metavar="STUDY=W",
        help="meta-analysis weight of a study for this result (repeat)",
    )
    add.set_defaults(func=run_add)

    effect = actions.add_parser(
        "set-effect",
        help="the lead changes a result's effect of interest (every reviewer follows it)",
    )
    effect.add_argument("folder", type=Path, metavar="DIR")
    effect.add_argument("--result", required=True, dest="result_id", metavar="RESULT")
    effect.add_argument("--effect", required=True,
                        help="an effect of interest the review's question sets offer")
    effect.add_argument("--reviewer", required=True, metavar="NAME", help="the review's lead")
    effect.set_defaults(func=run_set_effect)

    listing = actions.add_parser("list", help="list the results")
    listing.add_argument("folder", type=Path, metavar="DIR")
    listing.set_defaults(func=run_list)


def _weights(items: list[str]) -> dict[str, float]:
    from robtui.errors import InputError

    weights: dict[str, float] = {}
    for item in items:
        study, sep, value = item.partition("=")
        try:
            weights[study] = float(value)
        except ValueError:
            sep = ""
        if not sep or not study:
            raise InputError(f"--weight {item!r}: write STUDY=NUMBER, e.g. --weight Lind2021=12.5")
    return weights


def run_add(args: argparse.Namespace) -> int:
    from pydantic import ValidationError

    from robtui.core.model import ResultSpec
    from robtui.errors import InputError

    example = "robtui result add DIR --result pain12 --outcome 'Pain' --effect assignment"
    if args.old_id is not None:
        raise InputError(f"--id is now --result (the same in every command): {example}")
    if not args.result_id:
        raise InputError(f"say which result with --result: {example}")
    from robtui.store.ids import check_id
    from robtui.store.records import describe_validation
    from robtui.store.review_folder import ReviewFolder

    check_id(args.result_id, "result")  # the message every id gets, the value shown quoted
    folder = ReviewFolder.open(args.folder)
    fields = {
        "id": args.result_id,
        "outcome": args.outcome,
        "time_point": args.time_point,
        "effect": args.effect or folder.question_sets().default_effect(folder.study_ids()),
        "outcome_type": args.outcome_type,
        "weights": _weights(args.weight),
    }
    if args.self_reported is not None:
        fields["self_reported"] = args.self_reported == "yes"
    try:
        spec = ResultSpec.model_validate(fields)
    except ValidationError as error:
        raise InputError(f"result {args.result_id}: {describe_validation(error)}") from None
    folder.add_result(spec)
    print(f"added result {spec.id}: {_describe(spec)}")
    return 0


def _describe(spec) -> str:
    parts = [spec.outcome]
    if spec.time_point:
        parts.append(f"at {spec.time_point}")
    parts.append(f"(effect of {spec.effect})")
    return " ".join(parts)


def run_set_effect(args: argparse.Namespace) -> int:
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.open(args.folder)
    folder.set_result_effect(args.result_id, args.effect, args.reviewer)
    spec = folder.review.result(args.result_id)
    print(
        f"result {spec.id}: {_describe(spec)}; drafts follow it when next opened (answers to "
        "both variants are kept), complete assessments when reopened"
    )
    return 0


def run_list(args: argparse.Namespace) -> int:
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.open(args.folder)
    for spec in folder.review.results:
        extra = f", {spec.outcome_type}" if spec.outcome_type else ""
        print(f"{spec.id}  {_describe(spec)}{extra}")
    if not folder.review.results:
        print("no results yet: add one with `robtui result add`")
    return 0
