"""robtui judge: proposed RoB 2 judgements from signalling-question answers.

Single use:  robtui judge --domain 4 4.1=N 4.2=N 4.3=Y 4.4=N   (prints judgement and path)
             robtui judge --overall low,some_concerns,some_concerns,low,low
Batch:       robtui judge --batch < lines.jsonl                 (one JSON line out per line in)

Only the standard library and the pydantic-free core are imported, so the command starts fast.
"""

from __future__ import annotations

import argparse

TOOLS = ("rob2",)  # the method; which of its question sets is "question_set" (default parallel)

from robtui.core.questions import JUDGEMENT_LABELS as _LABELS


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "judge",
        help="propose a domain or overall judgement from answers",
        description=(
            "Propose a RoB 2 judgement from signalling-question answers. The proposal follows "
            "the published algorithm; reviewers decide. Single use: --domain N ID=CODE ... "
            "Batch: --batch reads JSON Lines on stdin and writes one JSON line per input line."
        ),
    )
    parser.add_argument("answers", nargs="*", metavar="ID=CODE",
                        help="answers such as 4.1=N (codes Y, PY, PN, N, NI, NA)")
    parser.add_argument("--domain", help="domain to judge (1 to 5)")
    parser.add_argument("--overall", metavar="J,J,J,J,J",
                        help="overall judgement from domain judgements in domain order, such as "
                        "low,some_concerns,high,low,low")
    parser.add_argument("--effect", default=None,
                        help="effect of interest, one the question set offers; matters for domain "
                             "2 (default: the set's first, the effect of assignment in RoB 2)")
    parser.add_argument("--question-set", default="parallel", metavar="NAME",
                        help="bundled question set, by design (parallel, cluster, crossover) or "
                        "id (default: parallel)")
    parser.add_argument("--batch", action="store_true",
                        help='read JSON Lines on stdin: {"tool": "rob2", "domain": 1, '
                        '"effect": "assignment", "answers": {...}} or {"tool": "rob2", '
                        '"overall": [...]}; write {"judgement": ...} or {"error": ...} per line')
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.errors import InputError

    if args.batch:
        if args.domain or args.answers or args.overall:
            raise InputError("--batch reads its input from stdin: leave out --domain and answers")
        import sys

        return run_batch(sys.stdin, sys.stdout)
    if args.overall:
        if args.domain or args.answers:
            raise InputError("--overall takes domain judgements only: leave out --domain and answers")
        return run_overall(args)
    if not args.domain:
        raise InputError(
            "say what to judge: --domain N ID=CODE ..., --overall J,J,J,J,J, or --batch"
        )
    return run_single(args)


def run_overall(args: argparse.Namespace) -> int:
    from robtui.core.algorithm import judge_overall, may_raise_overall
    from robtui.errors import InputError
    qset = _question_set(args.question_set)
    judgements = [j.strip().lower() for j in args.overall.split(",")]
    n = len(qset.domain_ids())
    if len(judgements) != n:
        raise InputError(f"--overall needs {n} domain judgements separated by commas, "
                         f"got {len(judgements)}")
    print(f"Overall: {_LABELS[judge_overall(judgements)]}")
    if may_raise_overall(judgements):
        print("note: several domains have some concerns; reviewers may judge the overall High "
              "if together they substantially lower confidence (record it as an override with "
              "a reason)")
    return 0


def _parse_pairs(pairs: list[str]) -> dict[str, str]:
    from robtui.errors import InputError

    answers: dict[str, str] = {}
    for pair in pairs:
        qid, sep, code = pair.partition("=")
        if not sep or not qid or not code:
            raise InputError(f"answers are written ID=CODE, such as 4.1=N; got {pair!r}")
        if qid in answers:
            raise InputError(f"question {qid} is answered twice")
        answers[qid] = code.strip().upper()
    return answers


def run_single(args: argparse.Namespace) -> int:
    from robtui.core.algorithm import explain_domain, validate_answers
    from robtui.core.explaining import explain_in_words
    from robtui.errors import InputError
    qset = _question_set(args.question_set)
    domain = qset.domain(str(args.domain), qset.check_effect(args.effect or qset.default_effect()))
    answers = _parse_pairs(args.answers)
    problems = validate_answers(domain, answers)
    if problems:
        raise InputError("; ".join(problems))
    result = explain_domain(domain, answers)
    words = explain_in_words(domain, answers)
    variant = f", effect of {domain.effect}" if domain.effect else ""
    verdict = _LABELS[result.judgement]
    if words.early:
        verdict = f"{_LABELS[words.determined]} (already decided by the answers given)"
    print(f"Domain {domain.id} ({domain.name}{variant}): {verdict}")
    print("path: " + " ".join(result.path()))
    if result.missing:
        still = ", ".join(f"{q.id} ({q.short})" for q in result.missing)
        print(f"still to answer: {still}")
    for line in words.lines():
        print(f"why: {line}")
    return 0


def judge_line(line: str) -> dict[str, str]:
    """The output object for one batch input line."""
    import json

    from robtui.errors import RobtuiError

    try:
        request = json.loads(line)
    except ValueError as error:
        return {"error": f"not valid JSON ({error})"}
    if not isinstance(request, dict):
        return {"error": "each line must be a JSON object"}
    try:
        return {"judgement": _judge_request(request)}
    except RobtuiError as error:
        return {"error": str(error)}


def _judge_request(request: dict) -> str:
    from robtui.core.algorithm import judge_domain, judge_overall, validate_answers
    from robtui.errors import InputError
    tool = request.get("tool")
    if tool is None:
        raise InputError(f"missing 'tool' (use {', '.join(TOOLS)})")
    if tool not in TOOLS:
        raise InputError(f"unknown tool {tool!r} (use {', '.join(TOOLS)})")
    name = request.get("question_set", "parallel")
    if not isinstance(name, str):
        raise InputError("'question_set' must be a design or a set id, as text")
    qset = _question_set(name)
    if "overall" in request:
        extra = sorted(set(request) - {"tool", "question_set", "overall"})
        if extra:
            raise InputError(f"unexpected key {extra[0]!r} beside 'overall'")
        judgements = request["overall"]
        n = len(qset.domain_ids())
        if not isinstance(judgements, list) or len(judgements) != n:
            raise InputError(f"'overall' must be a list of {n} domain judgements")
        if not all(isinstance(j, str) for j in judgements):
            raise InputError("'overall' must hold judgement codes as strings")
        return judge_overall(judgements)
    extra = sorted(set(request) - {"tool", "question_set", "domain", "effect", "answers"})
    if extra:
        raise InputError(
            f"unexpected key {extra[0]!r} (use tool, question_set, domain, effect, answers)"
        )
    domain_id = request.get("domain")
    if isinstance(domain_id, bool) or not isinstance(domain_id, (int, str)):
        raise InputError("give 'domain' (1 to 5) or 'overall'")
    effect = request.get("effect") or qset.default_effect()
    if not isinstance(effect, str):
        raise InputError(f"'effect' must be an effect id such as {qset.default_effect()!r}")
    domain = qset.domain(str(domain_id), qset.check_effect(effect))
    answers = request.get("answers", {})
    if not isinstance(answers, dict) or not all(
        isinstance(k, str) and isinstance(v, str) for k, v in answers.items()
    ):
        raise InputError("'answers' must be an object of question id to answer code")
    problems = validate_answers(domain, answers)
    if problems:
        raise InputError("; ".join(problems))
    return judge_domain(domain, answers)


def run_batch(stdin, stdout) -> int:
    """Answer each input line in order; a bad line gets an error object and the rest go on."""
    import json

    for line in stdin:
        if not line.strip():
            out = {"error": "empty line: each line must be a JSON object"}
        else:
            out = judge_line(line)
        stdout.write(json.dumps(out) + "\n")
        stdout.flush()
    return 0


def _question_set(name: str):
    """A bundled question set by design or id (InputError listing both)."""
    from robtui.store.question_sets import bundled_catalogue

    return bundled_catalogue().resolve(name)
