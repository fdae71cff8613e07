"""robtui assess DIR --reviewer R --study S --result T [Q=CODE ...]: answer from the shell.

Applies the given answers, justifications, quotes and overrides to the reviewer's assessment,
saves it once (atomically) and prints the proposed and final judgements and what is missing.
Any bad input stops the command before anything is written, except a quote that is not in the
reports: the rest of the command is saved, and the quote's closest passage is named (exit 1).
A pasted quote need not be byte-exact: case, quote marks, dashes, spacing and line breaks are
folded, and a near copy is matched fuzzily (robtui.store.quotes); the matched passage is shown.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from robtui.commands._common import add_asking
from robtui.commands._parsing import IntermixedParser
from robtui.core.model import DIRECTION_LABELS


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "assess",
        help="answer signalling questions, override, mark complete (one reviewer's assessment)",
        description=(
            "Answer signalling questions of one result of one study as one reviewer, e.g. "
            "`robtui assess DIR --reviewer ana --study Lind2021 --result pain12 1.1=Y 1.2=PY "
            "--why 1.1='computer list'`. Without answers it shows the assessment as it stands."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR")
    parser.add_argument("--reviewer", required=True, metavar="NAME")
    parser.add_argument("--study", required=True, metavar="STUDY")
    parser.add_argument("--result", required=True, metavar="RESULT")
    parser.add_argument(
        "answers", nargs="*", metavar="Q=CODE", help="e.g. 1.1=Y 2.3=NA; Q= clears an answer"
    )
    parser.add_argument(
        "--why", action="append", default=[], metavar="Q=TEXT", help="justification of an answer"
    )
    parser.add_argument(
        "--quote",
        action="append",
        default=[],
        metavar="Q=TEXT",
        help="attach a passage of the study's report to an answer (pasted as the PDF viewer "
        "copies it: case, quote marks, spacing and line breaks do not matter)",
    )
    parser.add_argument(
        "--remove-quote",
        action="append",
        default=[],
        metavar="Q=N",
        help="remove quote N (1-based)",
    )
    parser.add_argument(
        "--support",
        action="append",
        default=[],
        metavar="D=TEXT",
        help="support for a domain's judgement, as the RoB 2 form asks (D= clears it)",
    )
    parser.add_argument(
        "--direction",
        action="append",
        default=[],
        metavar="KEY=DIRECTION",
        help="optional predicted direction of bias of a domain or overall: "
        + ", ".join(DIRECTION_LABELS)
        + " (KEY= clears it)",
    )
    parser.add_argument("--effect", help=argparse.SUPPRESS)  # refused with the reason below
    parser.add_argument(
        "--override",
        action="append",
        default=[],
        metavar="KEY=JUDGEMENT",
        help="override a domain (1..5) or overall: low, some_concerns or high; needs --reason",
    )
    parser.add_argument(
        "--reason", action="append", default=[], help="reason for each --override, in order"
    )
    parser.add_argument("--clear-override", action="append", default=[], metavar="KEY")
    state = parser.add_mutually_exclusive_group()
    state.add_argument("--complete", action="store_true", help="mark complete (checks first)")
    state.add_argument("--reopen", action="store_true", help="back to draft, to change it")
    parser.add_argument(
        "--add-reviewer",
        action="store_true",
        help="list the reviewer in review.toml if not yet there",
    )
    parser.add_argument(
        "--questions",
        action="store_true",
        help="list the questions asked on the current path, with their text and answers",
    )
    parser.add_argument("--json", action="store_true", help="print the assessment as JSON")
    add_asking(parser, unblind=True)
    parser.set_defaults(func=run)
    parser.__class__ = IntermixedParser


def split_pairs(items: list[str], option: str, example: str) -> list[tuple[str, str]]:
    """'KEY=VALUE' items as pairs; InputError for an item without '='."""
    from robtui.errors import InputError

    pairs = []
    for item in items:
        key, sep, value = item.partition("=")
        if not sep or not key.strip():
            raise InputError(f"{option} {item!r}: write it as {example}")
        pairs.append((key.strip(), value))
    return pairs


def apply_changes(a, qset, folder, args, notes: list[str] | None = None):
    """The assessment after every change asked for on the command line (nothing saved).

    Quotes that are not in the reports do not stop the rest: each is added to ``notes`` with
    the closest passage, as is the passage each pasted quote matched.
    """
    from robtui.core import assessing
    from robtui.errors import InputError
    from robtui.store.quotes import QuoteNotFound, locate_quote

    notes = [] if notes is None else notes
    if args.effect:
        result = folder.result_or_error(a.result_id)
        raise InputError(
            f"--effect is not a reviewer's choice: the effect of interest belongs to the result "
            f"({a.result_id}: effect of {result.effect}), so every reviewer answers the same "
            f"questions; the review's lead changes it with `robtui result set-effect`"
        )
    if args.reopen:
        a = assessing.reopen(a)
    order = {q.id: i for i, q in enumerate(qset.questions(a.effect))}
    answers = split_pairs(args.answers, "answer", "Q=CODE, e.g. 1.1=Y")
    # Question order, so a condition's earlier answers are in place before it is checked.
    for qid, code in sorted(answers, key=lambda p: order.get(p[0], -1)):
        code = code.strip().upper() or None
        a = assessing.set_response(a, qset, qid, code)
    for qid, text in split_pairs(args.why, "--why", "Q=TEXT, e.g. --why 1.1='computer list'"):
        a = assessing.set_justification(a, qset, qid, text.strip())
    for qid, text in split_pairs(args.quote, "--quote", "Q=TEXT (the passage)"):
        try:
            quote, score, path = locate_quote(folder, a.study_id, text)
        except QuoteNotFound as error:
            notes.append(f"{qid}: quote not attached: {error}")
            continue
        a = assessing.add_quote(a, qset, qid, quote)
        page = f", p.{quote.page}" if quote.page else ""
        how = "" if score >= 100 else f", a near copy (similarity {score:.0f} of 100)"
        shown = " ".join(quote.text.split())
        notes.append(f"{qid}: quote matched in {path}{page}{how}: {shown[:120]!r}")
    for domain_id, text in split_pairs(args.support, "--support", "D=TEXT, e.g. --support 1='…'"):
        a = assessing.set_support(a, qset, domain_id, text)
    for key, code in split_pairs(args.direction, "--direction", "KEY=DIRECTION, e.g. 4=towards_null"):
        code = code.strip().lower().replace(" ", "_").replace("-", "_") or None
        a = assessing.set_direction(a, qset, key, code)
    for qid, number in split_pairs(args.remove_quote, "--remove-quote", "Q=N, e.g. 1.1=1"):
        if not number.strip().isdigit():
            raise InputError(f"--remove-quote {qid}={number}: N is the quote's number, from 1")
        a = assessing.remove_quote(a, qset, qid, int(number) - 1)
    for key in args.clear_override:
        a = assessing.clear_override(a, qset, key)
    overrides = split_pairs(args.override, "--override", "KEY=JUDGEMENT, e.g. overall=high")
    if len(args.reason) != len(overrides):
        raise InputError(
            f"{len(overrides)} --override but {len(args.reason)} --reason: "
            "every override needs its own reason"
        )
    for (key, judgement), reason in zip(overrides, args.reason):
        a = assessing.set_override(
            a, qset, key, judgement.strip().lower().replace(" ", "_").replace("-", "_"), reason
        )
    if args.complete:
        a = assessing.mark_complete(a, qset)
    return a


def describe(a, qset) -> list[str]:
    """Lines showing the judgements per domain and overall, and what is still missing."""
    from robtui.core import assessing
    from robtui.core.model import OVERALL
    from robtui.core.questions import JUDGEMENT_LABELS

    lines = [
        f"{a.study_id} / {a.result_id} by {a.reviewer}: {a.status}, effect of {a.effect}",
    ]
    keys = [*qset.domain_ids(), OVERALL]
    for key in keys:
        if key == OVERALL:
            name = "Overall"
        else:
            name = f"D{key} {assessing.domain_of(a, qset, key).name}"
        proposed = JUDGEMENT_LABELS[a.proposed[key]]
        final = JUDGEMENT_LABELS[a.final[key]]
        line = f"  {name:<58} proposed {proposed:<14} final {final}"
        override = a.overrides.get(key)
        if override is not None:
            line += f"  (override: {override.reason})"
        lines.append(line)
        if a.direction.get(key):
            lines.append(f"      predicted direction of bias: {DIRECTION_LABELS[a.direction[key]]}")
        if a.support.get(key):
            lines.append(f"      support: {a.support[key]}")
    unused = assessing.unused_answers(a, qset)
    if unused:
        lines.append(f"  kept but not used on the current path: {', '.join(unused)}")
    problems = assessing.completion_problems(a, qset)
    if problems and a.status != "complete":
        lines.append("  still missing:")
        lines.extend(f"    - {p}" for p in problems)
    elif not problems and a.status != "complete":
        lines.append("  nothing missing: mark it complete with --complete")
    return lines


def question_lines(a, qset) -> list[str]:
    """The questions asked on the current path, each with its answer (or '--')."""
    from robtui.core import assessing

    lines = []
    for domain_id in qset.domain_ids():
        domain = assessing.domain_of(a, qset, domain_id)
        lines.append(f"D{domain_id} {domain.name}")
        answers = assessing.effective_answers(a, qset, domain_id)
        for q in assessing.asked_questions(a, qset, domain_id):
            code = answers.get(q.id, "--")
            lines.append(f"  {q.id:<5} {code:<3} {q.text}  [{'/'.join(q.options)}]")
    return lines


def run(args: argparse.Namespace) -> int:
    from robtui.core import assessing
    from robtui.core.rules import stamp_rules_version
    from robtui.store.ids import check_id
    from robtui.store.records import record_to_json
    from robtui.workspace import Workspace

    ws = Workspace.open(args.folder)
    folder = ws.folder
    check_id(args.reviewer, "reviewer")
    folder.study_or_error(args.study)
    folder.result_or_error(args.result)
    known = [*folder.review.reviewers, *([folder.review.lead] if folder.review.lead else [])]
    add_reviewer = args.reviewer not in known
    # A review that names its reviewers refuses a misspelt one; an open review takes anyone.
    if not args.add_reviewer:
        folder.refuse_unlisted_reviewer(args.reviewer)
    qset = ws.question_set_for(args.study)
    rules = ws.rules_safely()[0]
    asks_change = any(
        (args.answers, args.why, args.quote, args.remove_quote, args.override),
    ) or any((args.clear_override, args.effect, args.complete, args.reopen))
    _check_asker(ws, args, changing=asks_change)
    found: list = []
    shown: list = []
    notes: list[str] = []

    def change(stored):
        # Runs under the review's lock on the file as it is now: another process's answers,
        # saved while this command started, are the ones these changes are applied to.
        if stored is not None:  # made with its study's question set, as it is now
            path = folder.assessment_path(args.reviewer, args.study, args.result)
            ws.require_usable(stored, path)
        found.append(stored)
        notes.clear()
        a = stored or assessing.new_assessment(
            folder.review, args.study, args.result, args.reviewer, qset
        )
        a = assessing.recompute(a, qset)
        changed = apply_changes(a, qset, folder, args, notes)
        if changed.model_dump(exclude={"updated"}) == a.model_dump(exclude={"updated"}):
            shown.append(changed)
            return None  # nothing to write
        # Record the answering-rules version the change was made under (None: unreadable).
        return stamp_rules_version(changed, rules)

    with folder.locked():
        if add_reviewer and asks_change:
            folder.add_reviewer(args.reviewer)
        changed, written = folder.update_assessment(
            args.reviewer, args.study, args.result, change
        )
    stored = found[-1]
    changed = changed if written else shown[-1]
    if written:
        saved = f"saved {folder.assessment_path(args.reviewer, args.study, args.result)}"
    else:
        saved = "nothing changed" if stored else "nothing saved yet (no answers given)"
    if args.json:
        print(record_to_json(changed), end="")
    else:
        if args.questions:
            print("\n".join(question_lines(changed, qset)))
        print("\n".join(describe(changed, qset)))
        print(saved)
    missed = [n for n in notes if "quote not attached" in n]
    for note in notes:
        if note not in missed and not args.json:
            print(note)
    for note in missed:
        print(f"robtui: {note}", file=sys.stderr)
    return 1 if missed else 0


def _check_asker(ws, args: argparse.Namespace, *, changing: bool) -> None:
    """Blinding: acting on another reviewer's assessment is refused unless the lead asks,
    with --unblind (robtui.core.blinding); without --as, the reviewer named is the asker."""
    from robtui.commands._common import asker
    from robtui.core.blinding import require_asker, require_may_use

    name = asker(args)
    if name is None or name == args.reviewer:
        return
    require_asker(name, ws.review, "robtui assess")
    existing = ws.folder.load_assessment(args.reviewer, args.study, args.result)
    require_may_use(
        name,
        args.reviewer,
        ws.review,
        complete=existing is not None and existing.status == "complete",
        unblind=getattr(args, "unblind", False),
        changing=changing,
    )
