"""The judgement algorithm (pure): proposed domain and overall judgements from answers.

The rules themselves are data in the question set (see robtui/core/questions.py); this module
only walks them. A domain whose asked questions are not all answered is "incomplete": no
judgement is guessed from a partial path. Overall follows the published rule: the least
favourable domain judgement (Sterne JAC et al. BMJ 2019;366:l4898; RoB 2 full guidance,
22 August 2019). The guidance also lets reviewers judge the overall risk High when several
domains raise some concerns; that is a reviewer's decision, so it is only offered
(`may_raise_overall`), never applied.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from robtui.core.questions import (
    JUDGEMENT_CODES,
    RESPONSE_CODES,
    Domain,
    Question,
    QuestionSet,
    Rule,
    RuleTable,
    condition_phrase,
    first_match,
    is_asked,
)
from robtui.errors import InputError

INCOMPLETE = "incomplete"
PROPOSAL_CODES: tuple[str, ...] = (*JUDGEMENT_CODES, INCOMPLETE)
# Order of favourability, least favourable last (common practice of the method's scale).
_RANK = {"low": 0, "some_concerns": 1, "high": 2}


@dataclass(frozen=True)
class PartResult:
    """Which row of one rule table decided (None while the domain is incomplete)."""

    table: RuleTable
    rule: Rule | None


@dataclass(frozen=True)
class DomainResult:
    judgement: str  # low | some_concerns | high | incomplete
    asked: tuple[Question, ...]
    missing: tuple[Question, ...]  # asked but unanswered
    parts: tuple[PartResult, ...]
    answers: Mapping[str, str]  # the answers used: asked questions only

    def path(self) -> list[str]:
        """The path taken, in question order, as 'ID=CODE' ('ID=?' while unanswered)."""
        return [f"{q.id}={self.answers.get(q.id, '?')}" for q in self.asked]


def asked_questions(domain: Domain, answers: Mapping[str, str]) -> list[Question]:
    """Questions asked given the answers so far (answers to questions not asked are ignored)."""
    effective: dict[str, str] = {}
    asked = []
    for q in domain.questions:
        if is_asked(q, effective):
            asked.append(q)
            if q.id in answers:
                effective[q.id] = answers[q.id]
    return asked


def effective_answers(domain: Domain, answers: Mapping[str, str]) -> dict[str, str]:
    """Only the answers to questions asked on the current path."""
    return {q.id: answers[q.id] for q in asked_questions(domain, answers) if q.id in answers}


def path_answers(qset: QuestionSet, effect: str, answers: Mapping[str, str]) -> dict[str, str]:
    """Only the answers to questions asked on the current path, over every domain of ``qset``
    as asked for ``effect`` (answers off the path, or of the other effect's variant, ignored)."""
    result: dict[str, str] = {}
    for domain_id in qset.domain_ids():
        result.update(effective_answers(qset.domain(domain_id, effect), answers))
    return result


def validate_answers(domain: Domain, answers: Mapping[str, str]) -> list[str]:
    """Problems with ``answers`` for ``domain``: unknown code or question, option not allowed,
    or an answer to a question whose condition is not met. Empty when all is well."""
    problems = []
    known = {q.id: q for q in domain.questions}
    for qid, code in answers.items():
        if qid not in known:
            problems.append(
                f"unknown question {qid!r} for domain {domain.id}"
                f" (questions: {', '.join(known)})"
            )
        elif problem := _code_problem(qid, code, known[qid].options):
            problems.append(problem)
    if problems:
        return problems
    asked = {q.id for q in asked_questions(domain, answers)}
    for qid in answers:
        if qid not in asked:
            q = known[qid]
            problems.append(
                f"{qid} is answered but not asked: its condition ({condition_phrase(q)}) is not"
                " met; leave it out or change the earlier answer"
            )
    return problems


def _check_codes(domain: Domain, answers: Mapping[str, str]) -> None:
    options = {q.id: q.options for q in domain.questions}
    for qid, code in answers.items():
        problem = _code_problem(qid, code, options.get(qid, RESPONSE_CODES))
        if problem:
            raise InputError(problem)


def _code_problem(qid: str, code: object, options: tuple[str, ...]) -> str | None:
    if code not in RESPONSE_CODES:
        return f"{qid}: unknown answer code {code!r} (use {', '.join(RESPONSE_CODES)})"
    if code not in options:
        return f"{qid}: {code} is not an option for this question (options: {', '.join(options)})"
    return None


def explain_domain(domain: Domain, answers: Mapping[str, str]) -> DomainResult:
    """The proposed judgement with the questions asked, those missing and the deciding rows.

    Raises InputError for an answer code the question does not offer. Answers to unknown or
    not-asked questions are ignored (use validate_answers to report them).
    """
    _check_codes(domain, answers)
    asked = asked_questions(domain, answers)
    effective = {q.id: answers[q.id] for q in asked if q.id in answers}
    missing = tuple(q for q in asked if q.id not in effective)
    if missing:
        parts = tuple(PartResult(t, None) for t in domain.rules)
        return DomainResult(INCOMPLETE, tuple(asked), missing, parts, effective)
    parts = []
    for table in domain.rules:
        rule = first_match(table, effective)
        if rule is None:  # the loader proves tables total, so this means a bug, not bad input
            raise AssertionError(f"domain {domain.id}: no rule matches {effective}")
        parts.append(PartResult(table, rule))
    judgement = least_favourable([p.rule.judgement for p in parts if p.rule])
    return DomainResult(judgement, tuple(asked), (), tuple(parts), effective)


def judge_domain(domain: Domain, answers: Mapping[str, str]) -> str:
    """"low" | "some_concerns" | "high" | "incomplete" for ``domain`` given ``answers``."""
    return explain_domain(domain, answers).judgement


def least_favourable(judgements: Sequence[str]) -> str:
    """The least favourable of low/some_concerns/high judgements."""
    return max(judgements, key=_RANK.__getitem__)


def _check_judgements(domain_judgements: Sequence[str]) -> None:
    if isinstance(domain_judgements, str) or not domain_judgements:
        raise InputError("give one judgement per domain (a list such as low, high, ...)")
    for j in domain_judgements:
        if j not in PROPOSAL_CODES:
            raise InputError(f"unknown judgement {j!r} (use {', '.join(PROPOSAL_CODES)})")


def judge_overall(domain_judgements: Sequence[str]) -> str:
    """Overall = the least favourable domain judgement; any "incomplete" gives "incomplete"."""
    _check_judgements(domain_judgements)
    if INCOMPLETE in domain_judgements:
        return INCOMPLETE
    return least_favourable(domain_judgements)


def may_raise_overall(domain_judgements: Sequence[str]) -> bool:
    """True when reviewers may raise the overall judgement to High: at least two domains have
    some concerns and none is high or incomplete (the guidance's "some concerns in multiple
    domains in a way that substantially lowers confidence" is for reviewers to decide)."""
    _check_judgements(domain_judgements)
    if INCOMPLETE in domain_judgements or "high" in domain_judgements:
        return False
    return sum(1 for j in domain_judgements if j == "some_concerns") >= 2


def final_judgement(proposed: str, override: str | None = None) -> str:
    """The judgement that stands: the reviewer's override when there is one, else the proposal."""
    if proposed not in PROPOSAL_CODES:
        raise InputError(f"unknown proposed judgement {proposed!r}")
    if override is None:
        return proposed
    if override not in JUDGEMENT_CODES:
        raise InputError(
            f"an override must be one of {', '.join(JUDGEMENT_CODES)}, not {override!r}"
        )
    return override


def propose_all(qset: QuestionSet, effect: str, answers: Mapping[str, str]) -> dict[str, str]:
    """Proposed judgement per domain id and "overall", from answers keyed by question id."""
    result: dict[str, str] = {}
    for did in qset.domain_ids():
        domain = qset.domain(did, effect)
        own = {qid: code for qid, code in answers.items() if qid in domain.question_ids()}
        result[did] = judge_domain(domain, own)
    result["overall"] = judge_overall([result[did] for did in qset.domain_ids()])
    return result
