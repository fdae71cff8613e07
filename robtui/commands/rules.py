"""robtui rules add|list|check|retire|changes DIR: the review's answering rules (rules.toml).

A rule says how this review answers one signalling question, optionally only for results with
given attributes (outcome_type, self_reported, time_point, outcome, effect). Every change
raises the rules version; assessments made under an older version are listed by
`robtui calibrate stale`.
"""

from __future__ import annotations

import argparse
from pathlib import Path

ATTRIBUTE_HELP = "outcome_type=objective|subjective, self_reported=true|false, time_point=TEXT, " \
    "outcome=TEXT, effect=assignment|adhering"  # fmt: skip


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "rules",
        help="write, list and check the review's answering rules",
        description=(
            "Answering rules: how this review answers a signalling question, optionally only "
            "for results with given attributes. Stored in DIR/rules.toml, versioned."
        ),
    )
    actions = parser.add_subparsers(dest="rules_action", metavar="ACTION", required=True)

    add = actions.add_parser(
        "add",
        help="add a rule (one step from a calibration discussion with --from-result)",
        description=(
            "Add a rule, e.g. `robtui rules add DIR --question 4.4 --when outcome_type=objective "
            '--text "Deaths are counted from records: answer N."`. With --from-result the '
            "conditions are pre-filled from that result (outcome type, self-reported, and the "
            "effect for domain 2 questions); --when adds to them or changes them."
        ),
    )
    add.add_argument("folder", type=Path, metavar="DIR")
    add.add_argument(
        "--question", required=True, metavar="ID", help="signalling question, e.g. 4.4"
    )
    add.add_argument("--text", required=True, help="how the review answers it, and why")
    add.add_argument(
        "--when", action="append", default=[], metavar="ATTR=VALUE", help=ATTRIBUTE_HELP
    )
    add.add_argument("--from-result", metavar="RESULT", help="pre-fill conditions from a result")
    add.add_argument(
        "--answer", metavar="CODE", help="the response the rule leads to (Y/PY/PN/N/NI/NA)"
    )
    add.add_argument(
        "--note", default="", help="where the rule came from, e.g. 'calibration round 1'"
    )
    add.add_argument("--author", metavar="NAME", help="who wrote it (default: the review's lead)")
    add.set_defaults(func=run_add)

    listing = actions.add_parser("list", help="list the rules in force (or all, or at a version)")
    listing.add_argument("folder", type=Path, metavar="DIR")
    listing.add_argument("--question", metavar="ID", help="only rules for this question")
    listing.add_argument("--result", metavar="RESULT", help="only rules that apply to this result")
    listing.add_argument(
        "--at-version", type=int, metavar="N", help="the rules in force at version N"
    )
    listing.add_argument("--all", action="store_true", help="include withdrawn rules")
    listing.set_defaults(func=run_list)

    check = actions.add_parser("check", help="validate rules.toml against the question set")
    check.add_argument("folder", type=Path, metavar="DIR")
    check.set_defaults(func=run_check)

    retire = actions.add_parser("retire", help="withdraw a rule (kept in the file's history)")
    retire.add_argument("folder", type=Path, metavar="DIR")
    retire.add_argument("rule_id", metavar="RULE", help="rule id, e.g. R3")
    retire.set_defaults(func=run_retire)

    changes = actions.add_parser("changes", help="rules added and withdrawn since a version")
    changes.add_argument("folder", type=Path, metavar="DIR")
    changes.add_argument("--since", type=int, required=True, metavar="N")
    changes.add_argument("--to", type=int, metavar="M", help="default: the current version")
    changes.set_defaults(func=run_changes)


def describe_rule(rule) -> str:
    return rule.summary()


def _open(folder_path: Path):
    from robtui.workspace import Workspace

    ws = Workspace.open(folder_path)
    return ws.folder, ws.qset, ws.rules()


def _save(folder, qset, book, new) -> None:
    from robtui.store.rules_file import save_rulebook

    return save_rulebook(folder.rules_path, new, expected_version=book.version, qset=qset)


def _stale_count(folder, book) -> int:
    from robtui.core.rules import stale_assessments

    found, _ = folder.assessments()
    results = {r.id: r for r in folder.review.results}
    return len(stale_assessments(found, book, results))


def run_add(args: argparse.Namespace) -> int:
    from robtui.core.rules import (
        add_rule,
        conditions_from_result,
        parse_condition,
        validate_rulebook,
    )
    from robtui.errors import InputError

    folder, qset, book = _open(args.folder)
    when: dict[str, str] = {}
    if args.from_result:
        result = folder.result_or_error(args.from_result)
        when.update(conditions_from_result(result, question_id=args.question))
    try:
        for item in args.when:
            key, value = parse_condition(item)
            when[key] = value
        answer = args.answer.strip().upper() if args.answer else None
        new = add_rule(
            book,
            args.question,
            args.text,
            when=when.items(),
            answer=answer,
            note=args.note,
            author=args.author or folder.review.lead,
        )
    except ValueError as error:
        raise InputError(f"rule not added: {error}") from None
    # The book on disk was valid, so any problem is the new rule's: refused before writing.
    problems = validate_rulebook(new, qset)
    if problems:
        raise InputError(
            "rule not added: "
            + "; ".join(p.message for p in problems)
            + f" (question ids of {qset.id}: see `robtui assess DIR ... --questions`)"
        )
    saved = _save(folder, qset, book, new)
    rule = saved.rules[-1]
    print(f"added {describe_rule(rule)}")
    print(f"rules version {book.version} -> {saved.version} ({folder.rules_path})")
    stale = _stale_count(folder, saved)
    if stale:
        print(
            f"{stale} assessment(s) made under an older rules version: "
            f"robtui calibrate stale {args.folder}"
        )
    return 0


def run_list(args: argparse.Namespace) -> int:
    from robtui.core.rules import rule_applies

    folder, _, book = _open(args.folder)
    if args.at_version is not None and not 0 <= args.at_version <= book.version:
        from robtui.errors import InputError

        raise InputError(f"--at-version must be between 0 and {book.version} (the current version)")
    rules = list(book.rules) if args.all else book.active(args.at_version)
    if args.question:
        rules = [r for r in rules if r.question_id == args.question]
    if args.result:
        result = folder.result_or_error(args.result)
        rules = [r for r in rules if rule_applies(r, result)]
    version = book.version if args.at_version is None else args.at_version
    print(f"answering rules, version {version} of {book.version}: {len(rules)} shown")
    for rule in rules:
        print(describe_rule(rule))
    return 0


def run_check(args: argparse.Namespace) -> int:
    from robtui.store.rules_file import hand_edit_warning

    folder, _, book = _open(args.folder)  # raises with every problem named
    where = folder.rules_path if folder.rules_path.exists() else f"{folder.rules_path} (absent)"
    print(f"{where}: valid; version {book.version}, {len(book.active())} rule(s) in force")
    warning = hand_edit_warning(folder.rules_path, book)
    if warning:
        print(f"warning: {warning}")
    return 0


def run_retire(args: argparse.Namespace) -> int:
    from robtui.core.rules import retire_rule
    from robtui.errors import InputError

    folder, qset, book = _open(args.folder)
    try:
        new = retire_rule(book, args.rule_id)
    except ValueError as error:
        raise InputError(str(error)) from None
    saved = _save(folder, qset, book, new)
    print(f"withdrew {args.rule_id}; rules version {book.version} -> {saved.version}")
    return 0


def run_changes(args: argparse.Namespace) -> int:
    from robtui.core.rules import changes_between
    from robtui.errors import InputError

    _, _, book = _open(args.folder)
    to = book.version if args.to is None else args.to
    if not 0 <= args.since <= to <= book.version:
        raise InputError(f"versions must satisfy 0 <= --since <= --to <= {book.version}")
    change = changes_between(book, args.since, to)
    print(f"rules from version {args.since} to {to}:")
    for rule in change.added:
        print(f"  added     {describe_rule(rule)}")
    for rule in change.retired:
        print(f"  withdrawn {describe_rule(rule)}")
    if not change.added and not change.retired:
        print("  no change")
    return 0
