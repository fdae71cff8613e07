"""robtui prespecified DIR --study ID --result ID: what was planned beside what was reported."""

from __future__ import annotations

import argparse
import json
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "prespecified",
        help="a result's outcome against the registry's and protocol's pre-specified outcomes",
        description=(
            "Compare the result's outcome and time point with the outcomes pre-specified in the "
            "study's registry records (their JSON or XML export, kind registry) and protocol "
            "(kind protocol): registration date against first enrolment (prospective or "
            "retrospective), the outcome's status (primary, secondary, not pre-specified, "
            "changed), outcomes switched, added or dropped, and the sentences side by side. "
            "Findings are for the reviewer to read; --attach puts one as a quote on a "
            "signalling question (5.1-5.3 usually). It answers nothing."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR", help="review folder")
    parser.add_argument("--study", default=None,
                        help="study id (default: one line per study of the review)")
    parser.add_argument("--result", required=True, help="result id")
    parser.add_argument("--json", action="store_true", help="print one JSON object")
    parser.add_argument("--attach", type=int, default=None, metavar="N",
                        help="attach finding N's passage as a quote (with --question, "
                             "--reviewer; --passage picks one of several)")
    parser.add_argument("--passage", type=int, default=1, metavar="K",
                        help="which passage of the finding (1)")
    parser.add_argument("--question", default=None, metavar="ID", help="e.g. 5.2")
    parser.add_argument("--reviewer", default=None, metavar="NAME")
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.errors import InputError
    from robtui.store.review_folder import ReviewFolder
    from robtui.workspace.prespecifying import attach_passage, prespecification

    folder = ReviewFolder.open(args.folder)
    if args.study is None:
        if args.attach is not None:
            raise InputError("--attach needs --study: findings belong to one study")
        return _review_wide(folder, args)
    found, sources = prespecification(folder, args.study, args.result)
    if args.attach is not None:
        if not args.question or not args.reviewer:
            raise InputError("--attach needs --question (e.g. 5.2) and --reviewer NAME")
        if not 1 <= args.attach <= len(found.findings):
            raise InputError(f"--attach {args.attach}: there are {len(found.findings)} findings,"
                             " numbered from 1")
        passages = found.findings[args.attach - 1].passages
        if not 1 <= args.passage <= len(passages):
            raise InputError(f"finding {args.attach} has {len(passages)} passage(s); "
                             f"--passage {args.passage} is not one of them")
        path = attach_passage(folder, args.reviewer, args.study, args.result, args.question,
                              passages[args.passage - 1])
        print(f"attached to {args.question} for {args.reviewer}: saved {path}")
        return 0
    if args.json:
        print(json.dumps(to_json(found, sources), ensure_ascii=False, indent=2))
    else:
        print(render(found, sources, args.study, args.result))
    return 0


TOPICS = ("switched", "added", "dropped", "changed", "time point")


def _review_wide(folder, args) -> int:
    """One line per study: status, registration, and how many findings of each kind."""
    from robtui.workspace.prespecifying import prespecification

    folder.result_or_error(args.result)
    rows = []
    for study in folder.review.studies:
        found, _sources = prespecification(folder, study.id, args.result)
        counts = {t: sum(f.topic == t for f in found.findings) for t in TOPICS}
        rows.append((study.id, found.status, found.timing, counts))
    if args.json:
        print(json.dumps([{"study": sid, "status": status, "registration": timing, **counts}
                          for sid, status, timing, counts in rows], indent=2))
        return 0
    width = max([len(r[0]) for r in rows] + [5])
    print(f"{'study'.ljust(width)}  {'status':<17} {'registration':<13} "
          + " ".join(f"{t:>8}" for t in TOPICS))
    for sid, status, timing, counts in rows:
        print(f"{sid.ljust(width)}  {status:<17} {timing:<13} "
              + " ".join(f"{counts[t]:>8}" for t in TOPICS))
    print("\nFindings per study: robtui prespecified DIR --study ID --result "
          f"{args.result}. They are for the reviewers to read; they answer nothing.")
    return 0


def _passage(p) -> dict | None:
    if p is None:
        return None
    return {"source": p.source, "document_sha256": p.document_sha256, "start": p.start,
            "end": p.end, "page": p.page, "text": p.text}


def to_json(found, sources) -> dict:
    return {
        "outcome": found.outcome, "time_point": found.time_point, "status": found.status,
        "registration": found.timing,
        "findings": [{"topic": f.topic, "text": f.text,
                      "passages": [_passage(p) for p in f.passages]} for f in found.findings],
        "side_by_side": [{"planned": _passage(a), "reported": _passage(b)}
                         for a, b in found.side_by_side],
        "notes": sources.notes,
    }


def render(found, sources, study_id: str, result_id: str) -> str:
    lines = [f"{study_id} / {result_id}: what was planned beside what was reported",
             f"outcome (report's words): {found.outcome}",
             f"status: {found.status}    registration: {found.timing}", ""]
    for number, finding in enumerate(found.findings, 1):
        lines.append(f"{number}. [{finding.topic}] {finding.text}")
        for k, p in enumerate(finding.passages, 1):
            where = f" p{p.page}" if p.page else ""
            lines.append(f"     {k}) {p.source}{where}: \"{p.text}\"")
    if found.side_by_side:
        lines += ["", "planned | reported"]
        for planned, reported in found.side_by_side:
            lines.append(f"  {planned.text if planned else '(no match)'}")
            lines.append(f"  | {reported.text if reported else '(the report names no match)'}")
    for note in sources.notes:
        lines.append(f"note: {note}")
    lines += ["", ("Findings are for the reviewer to read; they answer no signalling question. "
                   "Attach one as a quote: --attach N --question 5.2 --reviewer NAME")]
    return "\n".join(lines)
