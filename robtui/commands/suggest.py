"""robtui suggest FILE...: candidate sentences per signalling question, best first.

Many files (several FILEs, a folder, or --list) are ranked in a pool of worker processes and
written as JSON Lines, one object per file in the order given.

Suggestions are candidates for the reviewer to read, never answers: the reviewer decides.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "suggest",
        help="rank a report's sentences for every signalling question",
        description=(
            "Read a trial report (PDF, text, Markdown, HTML) and print, for each signalling "
            "question, the sentences most likely to answer it, best first, with a calibrated "
            "score (0..1). A best score below the ranker's no-evidence threshold is flagged "
            "'no sentence found'. Several files, a folder (its report files, recursively) or "
            "--list give JSON Lines: one object per file, in the order given, ranked on all "
            "cores; a file that cannot be ranked gives {\"path\", \"error\"} and the rest go on."
        ),
    )
    parser.add_argument("files", type=Path, metavar="FILE", nargs="*",
                        help="report files or folders")
    parser.add_argument("--list", dest="lists", type=Path, action="append", default=[],
                        metavar="LISTFILE", help="a text file naming one report file per line")
    parser.add_argument("--workers", type=int, default=None, metavar="N",
                        help="worker processes for many files (default: all cores)")
    parser.add_argument("--json", action="store_true", help="print exactly one JSON object")
    parser.add_argument("--top", type=int, default=5, metavar="K", help="suggestions per question (5)")
    parser.add_argument("--questions", default=None, metavar="IDS",
                        help="comma-separated question ids, e.g. 1.1,1.2 (default: all)")
    parser.add_argument("--threshold", type=float, default=None, metavar="T",
                        help="drop suggestions scoring below T (0..1); lists may then be empty")
    parser.add_argument("--spread", action="store_true",
                        help="reading order, as the workbench shows: after the best sentence, "
                             "one from another section takes a place when it scores nearly as "
                             "well (scores then need not fall steadily)")
    parser.add_argument("--effect", default=None,
                        help="domain 2 variant: an effect the question set offers (default: the "
                             "set's first, the effect of assignment in RoB 2)")
    parser.add_argument("--question-set", default=None, metavar="NAME",
                        help="rank the questions of this bundled set, by design (parallel, "
                        "cluster, crossover) or id (default: the parallel-group set)")
    parser.add_argument("--model", type=Path, default=None, help=argparse.SUPPRESS)
    parser.set_defaults(func=run)


def _parse_questions(raw: str | None) -> list[str] | None:
    from robtui.errors import InputError

    if raw is None:
        return None
    ids = [part.strip() for part in raw.split(",") if part.strip()]
    if not ids:
        raise InputError("--questions is empty: give ids such as 1.1,1.2")
    return ids


def run(args: argparse.Namespace) -> int:
    import gc
    import json

    from robtui.workspace.suggesting import SuggestRequest, payload, rank_file

    # Start-up (imports, the question set, the ranker's tables) makes objects that live as long
    # as the process: the cyclic garbage collector is off meanwhile, then gc.freeze() keeps them
    # out of every later collection (Python's gc documentation), so the many short-lived objects
    # of reading a PDF are collected without walking start-up's again each time.
    gc.disable()
    try:
        files, options, ranker = _start_up(args)
    finally:
        gc.freeze()
        gc.enable()
    many = len(files) > 1 or args.lists or any(Path(f).is_dir() for f in args.files)
    if many:
        return _run_many([SuggestRequest(str(f), **options) for f in files], args, ranker)
    document, ranking = rank_file(SuggestRequest(str(files[0]), **options), ranker)
    if not document.sentences:
        why = "; ".join(document.warnings) or "the reader found no text"
        print(f"robtui: {files[0]}: no sentences to rank ({why})", file=sys.stderr)
    if args.json:
        print(json.dumps(payload(document, ranking), ensure_ascii=False))
        return 0
    thresholds = {qid: ranker.threshold_for(qid, args.effect, origin=document.kind)
                  for qid in ranking}
    untrained = {qid for qid in ranking if not ranker.is_trained(qid, args.effect)}
    print(_render(ranking, thresholds, untrained, document.path))
    return 0


def _start_up(args: argparse.Namespace) -> tuple[list[Path], dict, object]:
    """The options checked, the files listed and the ranker loaded (errors before any reading)."""
    from robtui.errors import InputError
    from robtui.evidence.ranker import load_ranker
    from robtui.workspace.suggesting import SuggestRequest, files_to_suggest

    if args.top < 1:
        raise InputError(f"--top must be at least 1 (got {args.top})")
    if args.threshold is not None and not 0.0 <= args.threshold <= 1.0:
        raise InputError(f"--threshold must be between 0 and 1 (got {args.threshold})")
    if args.workers is not None and args.workers < 0:
        raise InputError(f"--workers must be 0 (in this process) or more (got {args.workers})")
    questions = _parse_questions(args.questions)
    if not args.files and not args.lists:
        raise InputError("name a report file, a folder or --list LISTFILE")
    files = files_to_suggest(args.files, args.lists)
    qset = SuggestRequest("", question_set=args.question_set).resolved_set()  # checked up front
    if qset is None:  # the ranker's default set: the bundled parallel one
        from robtui.store.question_sets import builtin_question_set

        qset = builtin_question_set()
    args.effect = qset.check_effect(args.effect or qset.default_effect())
    options = {"questions": tuple(questions) if questions else None, "effect": args.effect,
               "top": args.top, "threshold": args.threshold, "spread": args.spread,
               "question_set": args.question_set}
    # checks the weights (and the question ids) up front; ranks one document at most here
    ranker = load_ranker(args.model, warm=False)
    if questions:  # checked once here rather than once per file
        from robtui.evidence.ranker import active_questions

        known = [qid for qid, _ in active_questions(args.effect, qset)]
        unknown = [q for q in questions if q not in known]
        if unknown:
            raise InputError(f"unknown question id(s) for the {args.effect} effect: "
                             f"{', '.join(unknown)}; known: {', '.join(known)}")
    return files, options, ranker


def _run_many(requests, args, ranker) -> int:
    """JSON Lines, one object per file in the given order; 1 when any file failed."""
    import json

    from robtui.workspace.suggesting import suggest_many

    if args.model is not None:
        from robtui.errors import InputError

        raise InputError("--model works with one file at a time")
    failed = 0

    def emit(obj: dict) -> None:
        nonlocal failed
        failed += "error" in obj
        print(json.dumps(obj, ensure_ascii=False), flush=True)

    interrupted = suggest_many(requests, emit, workers=args.workers)
    if failed:
        print(f"robtui: {failed} of {len(requests)} file(s) could not be ranked (see their "
              "\"error\")", file=sys.stderr)
    return 1 if failed or interrupted else 0


def _render(ranking: dict, thresholds: dict[str, float], untrained: set[str], path: str) -> str:
    lines = [f"{path}: suggested sentences (candidates to read; the reviewer decides)"]
    for qid, items in ranking.items():
        lines.append("")
        if not items:
            lines.append(f"{qid}  nothing above the threshold")
            continue
        cut = thresholds[qid]
        below = round(items[0].score, 2) < round(cut, 2)  # as printed: 0.40 is not below 0.40
        flag = f"  [no sentence found: best score below {cut:.2f}]" if below else ""
        rough = "  (no training data: ranked by cue lexicon and wording)" if qid in untrained else ""
        lines.append(f"{qid}{flag}{rough}")
        for rank, s in enumerate(items, 1):
            where = f"p{s.page} " if s.page else ""
            text = " ".join(s.text.split())
            if len(text) > 160:
                text = text[:157] + "..."
            lines.append(f"  {rank}. {s.score:.2f}  {where}{s.section}  [{s.start}-{s.end}]  {text}")
    return "\n".join(lines)
