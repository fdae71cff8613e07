"""Every answer path of a domain: what the loader's totality proof and the tests walk."""

from __future__ import annotations

from collections.abc import Iterator

from robtui.core.questions import AnswerIs, Condition, Domain, is_asked


def _leaves(condition: Condition | None) -> Iterator[AnswerIs]:
    if condition is None:
        return
    if isinstance(condition, AnswerIs):
        yield condition
    else:
        for item in condition.items:
            yield from _leaves(item)


def representative_codes(domain: Domain) -> dict[str, tuple[str, ...]]:
    """Per question, one code for each group of codes that no condition or rule tells apart.

    Every condition is built from "answer is one of these codes" tests, so two codes that sit
    in exactly the same tests behave identically everywhere; enumerating one of them is enough.
    """
    leaves = [leaf for q in domain.questions for leaf in _leaves(q.asked_if)]
    leaves += [leaf for t in domain.rules for row in t.rows for leaf in _leaves(row.when)]
    chosen: dict[str, tuple[str, ...]] = {}
    for q in domain.questions:
        tests = [leaf.codes for leaf in leaves if leaf.question == q.id]
        seen: dict[tuple[bool, ...], str] = {}
        for code in q.options:
            seen.setdefault(tuple(code in codes for codes in tests), code)
        chosen[q.id] = tuple(seen.values())
    return chosen


def answer_paths(domain: Domain, *, representatives: bool = False) -> Iterator[dict[str, str]]:
    """Every complete set of answers a reviewer can give in ``domain``, asked questions only.

    With ``representatives`` only one code of each group that no rule tells apart is used
    (the same behaviours, far fewer paths: this is what the loader's proof walks).
    """
    codes_of = (
        representative_codes(domain)
        if representatives
        else {q.id: q.options for q in domain.questions}
    )

    def walk(index: int, answers: dict[str, str]) -> Iterator[dict[str, str]]:
        if index == len(domain.questions):
            yield dict(answers)
            return
        q = domain.questions[index]
        if not is_asked(q, answers):
            yield from walk(index + 1, answers)
            return
        for code in codes_of[q.id]:
            answers[q.id] = code
            yield from walk(index + 1, answers)
            del answers[q.id]

    yield from walk(0, {})
