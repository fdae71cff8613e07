"""robtui consensus start|settle|override|support|show|complete|reopen|list DIR: the lead's
consensus.

Consensus records live in DIR/consensus/, apart from both reviewers' files. The lead settles
every difference by taking reviewer A's answer, B's, or a new answer, always with a note; the
judgements are recomputed by the algorithm from the agreed answers. Every change goes through
the service layer (robtui.workspace.consensus_changes), as the workbench's do.
"""

from __future__ import annotations

import argparse
import functools
import json
from pathlib import Path

# the keys of robtui.core.model.DIRECTION_LABELS, spelled here so `robtui --help` stays light
DIRECTIONS = (
    "na", "favours_experimental", "favours_comparator", "towards_null", "away_from_null",
    "unpredictable",
)


def under_review_lock(run):
    """Run a command that reads, changes and saves a consensus record under the review's
    lock, so no other writer comes between its read and its save."""

    @functools.wraps(run)
    def locked(args: argparse.Namespace) -> int:
        from robtui.store.review_folder import ReviewFolder

        with ReviewFolder.open(args.folder).locked():
            return run(args)

    return locked


def register(subparsers: argparse._SubParsersAction) -> None:
    from robtui.commands._common import add_asking, add_reviewer_options

    parser = subparsers.add_parser(
        "consensus",
        help="settle two reviewers' differences into a consensus record",
        description="Consensus records: start, settle questions, show, complete.",
    )
    actions = parser.add_subparsers(dest="consensus_action", metavar="ACTION", required=True)

    def target(sub: argparse.ArgumentParser) -> None:
        sub.add_argument("folder", type=Path, metavar="DIR", help="review folder")
        sub.add_argument("--study", required=True, help="study id")
        sub.add_argument("--result", required=True, help="result id")
        add_asking(sub)

    start = actions.add_parser("start", help="start a consensus record from two assessments")
    target(start)
    add_reviewer_options(start)
    start.add_argument("--lead", help="who settles (default: the review's lead)")
    start.set_defaults(func=run_start)

    settle = actions.add_parser("settle", help="settle one signalling question, with a note")
    target(settle)
    settle.add_argument("--question", required=True, help="signalling question id, e.g. 1.2")
    how = settle.add_mutually_exclusive_group(required=True)
    how.add_argument(
        "--take", metavar="SIDE", help="take a reviewer's answer: a, b, or the reviewer's name"
    )
    how.add_argument("--answer", metavar="CODE", help="a new answer (Y, PY, PN, N, NI, NA)")
    settle.add_argument("--note", required=True, help="why (kept in the record)")
    settle.set_defaults(func=run_settle)

    override = actions.add_parser("override", help="override a recomputed judgement, with a reason")
    target(override)
    override.add_argument(
        "--domain", required=True, metavar="KEY",
        help="a domain of the study's question set (1, 2, ... 1b, S), or overall",
    )
    how = override.add_mutually_exclusive_group(required=True)
    how.add_argument("--judgement", choices=("low", "some_concerns", "high"))
    how.add_argument(
        "--remove", action="store_true", help="back to the judgement the algorithm proposes"
    )
    override.add_argument("--reason", help="why (required with --judgement)")
    override.set_defaults(func=run_override)

    support = actions.add_parser(
        "support",
        help="settle the support of a domain judgement and its predicted direction of bias",
        description=(
            "The RoB 2 form's support text of a domain judgement and the optional predicted "
            "direction of bias (of a domain or the overall), as the lead settles them."
        ),
    )
    target(support)
    support.add_argument(
        "--domain", required=True, metavar="KEY",
        help="a domain of the study's question set, or overall (direction only)",
    )
    support.add_argument("--text", help="the agreed support ('' clears it)")
    support.add_argument(
        "--direction", choices=(*DIRECTIONS, "none"),
        help="predicted direction of bias ('none' clears it)",
    )
    support.set_defaults(func=run_support)

    show = actions.add_parser("show", help="show a consensus record and what is still open")
    target(show)
    show.add_argument("--json", action="store_true")
    show.set_defaults(func=run_show)

    complete = actions.add_parser("complete", help="mark a consensus record complete")
    target(complete)
    complete.set_defaults(func=run_complete)

    reopen = actions.add_parser("reopen", help="reopen a completed consensus record")
    target(reopen)
    reopen.set_defaults(func=run_reopen)

    listing = actions.add_parser("list", help="list consensus records and their status")
    listing.add_argument("folder", type=Path, metavar="DIR", help="review folder")
    add_asking(listing)
    listing.set_defaults(func=run_list)


def _existing(ws, args):
    from robtui.errors import InputError

    ws.folder.study_or_error(args.study)
    ws.folder.result_or_error(args.result)
    record = ws.load_consensus(args.study, args.result)
    if record is None:
        raise InputError(
            f"no consensus record for {args.study} / {args.result}: start one with "
            f"`robtui consensus start {args.folder} --study {args.study} --result {args.result}`"
        )
    return record


def _pair_of(ws, record):
    return ws.pair_of(record)


def _changed(ws, args: argparse.Namespace, change) -> int:
    """Apply one change to the stored record (service layer, under the lock), then show it."""
    from robtui.workspace.consensus_changes import change_consensus

    record = change_consensus(ws, args.study, args.result, change)
    print("\n".join(_summary(record, ws.question_set_for(args.study), _pair_or_none(ws, record))))
    return 0


def _pair_or_none(ws, record):
    from robtui.errors import RobtuiError

    try:
        return ws.pair_of(record)
    except RobtuiError:
        return None


def _summary(record, qset, pair=None) -> list[str]:
    from robtui.core.consensus import changed_since, pending_questions
    from robtui.core.model import DIRECTION_LABELS
    from robtui.core.questions import judgement_label

    pending = pending_questions(record, qset)
    a, b = record.reviewers
    lines = [
        (
            f"consensus {record.study_id} / {record.result_id} ({a} and {b}, lead "
            f"{record.lead}): {record.status}"
        )
    ]
    for key, value in record.final.items():
        label = "Overall" if key == "overall" else qset.domain_label(key, record.effect)
        proposed = record.proposed.get(key)
        extra = (
            f" (override; algorithm: {judgement_label(proposed)})"
            if key in record.overrides
            else ""
        )
        lines.append(f"  {label:<34} {judgement_label(value)}{extra}")
        if key in record.overrides:
            lines.append(f"      override reason: {record.overrides[key].reason}")
        if record.support.get(key):
            support = record.support[key].replace("\n", "; ")
            lines.append(f"      support: {support}")
        if record.direction.get(key):
            lines.append(f"      predicted direction of bias: {DIRECTION_LABELS[record.direction[key]]}")
    for qid, decision in record.decisions.items():
        if decision.source != "agreed":
            who = {"a": f"took {a}", "b": f"took {b}", "new": "new answer"}[decision.source]
            lines.append(f"  {qid}: {decision.response or 'not asked'} ({who}): {decision.note}")
    lines.append("  to settle: " + (", ".join(pending) if pending else "nothing"))
    changes = changed_since(record, pair, qset)
    if changes:
        lines.append(
            "  STALE: a reviewer changed answers this consensus was built on ("
            + "; ".join(changes)
            + "): reopen it, review, and complete it again"
        )
    return lines


@under_review_lock
def run_start(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead
    from robtui.core.consensus import start_consensus
    from robtui.errors import InputError

    ws = open_workspace_as_lead(args, "robtui consensus")
    folder, qset = ws.folder, ws.question_set_for(args.study)
    reviewers = ws.choose_reviewers(args.reviewers)
    lead = args.lead or folder.review.lead
    if not lead:
        raise InputError("the review names no lead: give --lead NAME")
    if folder.review.lead and lead != folder.review.lead:
        raise InputError(
            f"--lead {lead}: the review's lead is {folder.review.lead}; only the lead settles "
            "(change the lead in review.toml if the team has agreed to)"
        )
    existing = ws.load_consensus(args.study, args.result)
    if existing is not None:
        raise InputError(
            f"a consensus record for {args.study} / {args.result} exists already "
            f"({existing.status}): see it with `robtui consensus show`"
        )
    [pair], problems = ws.pairs(reviewers, args.study, args.result)
    if problems:
        raise InputError("; ".join(problems))
    record = start_consensus(pair, lead, qset)
    path = folder.save_consensus(record)
    print(f"started {path}")
    print("\n".join(_summary(record, qset)))
    return 0


def run_settle(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead
    from robtui.errors import InputError
    from robtui.workspace.consensus_changes import settling

    ws = open_workspace_as_lead(args, "robtui consensus")
    record = _existing(ws, args)
    if args.take is not None:
        side = {"a": "a", "b": "b", record.reviewers[0]: "a", record.reviewers[1]: "b"}.get(
            args.take if args.take in record.reviewers else args.take.lower()
        )
        if side is None:
            raise InputError(
                f"--take {args.take!r}: use a, b, {record.reviewers[0]} or {record.reviewers[1]}"
            )
        change = settling(args.question, side, None, args.note, _pair_of(ws, record))
    else:
        change = settling(args.question, "new", args.answer.upper(), args.note)
    return _changed(ws, args, change)


def run_override(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead
    from robtui.errors import InputError
    from robtui.workspace.consensus_changes import overriding

    ws = open_workspace_as_lead(args, "robtui consensus")
    if args.remove:
        if args.reason:
            raise InputError("--remove takes no --reason: the algorithm's proposal needs none")
        return _changed(ws, args, overriding(args.domain, None))
    if not (args.reason or "").strip():
        raise InputError("an override needs a reason: add --reason TEXT")
    return _changed(ws, args, overriding(args.domain, args.judgement, args.reason))


def run_support(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead
    from robtui.errors import InputError
    from robtui.workspace.consensus_changes import supporting

    if args.text is None and args.direction is None:
        raise InputError("give --text (the agreed support), --direction, or both")
    if args.text is not None and args.domain == "overall":
        raise InputError(
            "the overall judgement has a predicted direction of bias but no support text: "
            "give --direction only"
        )
    ws = open_workspace_as_lead(args, "robtui consensus")
    direction = None if args.direction in (None, "none") else args.direction
    change = supporting(args.domain, args.text, direction, set_direction=args.direction is not None)
    return _changed(ws, args, change)


def run_show(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead
    from robtui.core.consensus import pending_questions

    ws = open_workspace_as_lead(args, "robtui consensus")
    qset = ws.question_set_for(args.study)
    record = _existing(ws, args)
    pair = _pair_of(ws, record)
    if args.json:
        from robtui.core.consensus import changed_since

        data = record.model_dump(mode="json")
        data["pending"] = pending_questions(record, qset)
        data["changed_since"] = changed_since(record, pair, qset)
        print(json.dumps(data, indent=2, ensure_ascii=False))
    else:
        print("\n".join(_summary(record, qset, pair)))
    return 0


def run_complete(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead
    from robtui.workspace.consensus_changes import completing

    ws = open_workspace_as_lead(args, "robtui consensus")
    return _changed(ws, args, completing(_pair_of(ws, _existing(ws, args))))


def run_reopen(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead
    from robtui.workspace.consensus_changes import reopening

    ws = open_workspace_as_lead(args, "robtui consensus")
    return _changed(ws, args, reopening())


def run_list(args: argparse.Namespace) -> int:
    from robtui.commands._common import open_workspace_as_lead, warn
    from robtui.core.consensus import pending_questions

    ws = open_workspace_as_lead(args, "robtui consensus")
    records, problems = ws.folder.consensus_records()
    for r in records:
        pending = pending_questions(r, ws.question_set_for(r.study_id))
        print(
            f"{r.study_id:<20} {r.result_id:<16} {r.status:<9} "
            f"{len(pending)} to settle  lead {r.lead}"
        )
    if not records:
        print("no consensus records yet")
    warn(problems)
    return 0
