"""Operations on one reviewer's assessment (pure): every function returns a new Assessment.

The input is never changed; proposed and final judgements are recomputed by the published
algorithm (robtui.core.algorithm) after every change, never written by hand.

Answers to questions that are no longer asked (an earlier answer changed, or domain 2's
variant switched) stay in the record but are not used: ``effective_answers`` holds only the
questions asked on the current path. Domain 2 answers of the variant not in use are kept
under keys ``"<effect>:<question id>"`` (e.g. ``"adhering:2.3"``) and come back when the
effect is switched back.
"""

from __future__ import annotations

from collections.abc import Mapping

from robtui.core import algorithm
from robtui.core.model import (
    DIRECTION_LABELS,
    JUDGEMENTS,
    OVERALL,
    RESPONSES,
    Answer,
    Assessment,
    Override,
    Quote,
    Review,
    utc_now,
)
from robtui.core.questions import (
    JUDGEMENT_LABELS,
    Domain,
    Question,
    QuestionSet,
    condition_phrase,
    effect_key,
)
from robtui.errors import InputError

_SEVERITY = {"low": 0, "some_concerns": 1, "high": 2}


# -- creating -------------------------------------------------------------------------------
def new_assessment(
    review: Review, study_id: str, result_id: str, reviewer: str, qset: QuestionSet
) -> Assessment:
    """A fresh draft for one result of one study; the effect comes from the result."""
    if review.study(study_id) is None:
        raise InputError(f"no study {study_id!r} in this review: add it first")
    spec = review.result(result_id)
    if spec is None:
        raise InputError(f"no result {result_id!r} in this review: add it first")
    a = Assessment(
        reviewer=reviewer,
        study_id=study_id,
        result_id=result_id,
        question_set=qset.id,
        question_set_version=qset.version,
        effect=spec.effect,
    )
    return recompute(a, qset)


# -- reading ----------------------------------------------------------------------------------
def domain_of(a: Assessment, qset: QuestionSet, domain_id: str) -> Domain:
    """The domain as asked in this assessment (domain 2 follows the effect)."""
    return qset.domain(domain_id, a.effect)


def responses(answers: Mapping[str, Answer]) -> dict[str, str]:
    """The response codes given, by question id (answers without a response left out)."""
    return {qid: ans.response for qid, ans in answers.items() if ans.response is not None}


def path_answers(qset: QuestionSet, effect: str, answers: Mapping[str, Answer]) -> dict[str, str]:
    """Responses to the questions asked on the current path of every domain (answers off the
    path ignored): the one "answers on the path" for assessments and consensus records alike."""
    return algorithm.path_answers(qset, effect, responses(answers))


def effective_answers(a: Assessment, qset: QuestionSet, domain_id: str) -> dict[str, str]:
    """Responses of the questions asked on the current path of one domain."""
    return algorithm.effective_answers(domain_of(a, qset, domain_id), responses(a.answers))


def asked_questions(a: Assessment, qset: QuestionSet, domain_id: str) -> list[Question]:
    """Questions of a domain asked given the current answers."""
    domain = domain_of(a, qset, domain_id)
    return list(algorithm.asked_questions(domain, effective_answers(a, qset, domain_id)))


def unused_answers(a: Assessment, qset: QuestionSet) -> list[str]:
    """Ids of stored answers that the current path does not use (kept, not deleted)."""
    used: set[str] = set()
    for domain_id in qset.domain_ids():
        used.update(effective_answers(a, qset, domain_id))
    return [qid for qid, ans in a.answers.items() if qid not in used and ans.response is not None]


# -- recomputing ------------------------------------------------------------------------------
def recompute(a: Assessment, qset: QuestionSet) -> Assessment:
    """Proposed and final judgements from the answers and overrides."""
    proposed: dict[str, str] = {}
    final: dict[str, str] = {}
    for domain_id in qset.domain_ids():
        domain = domain_of(a, qset, domain_id)
        proposed[domain_id] = algorithm.judge_domain(domain, effective_answers(a, qset, domain_id))
        final[domain_id] = _final(proposed[domain_id], a.overrides.get(domain_id))
    proposed[OVERALL] = algorithm.judge_overall([final[d] for d in qset.domain_ids()])
    final[OVERALL] = _final(proposed[OVERALL], a.overrides.get(OVERALL))
    return a.model_copy(update={"proposed": proposed, "final": final}, deep=True)


def _final(proposal: str, override: Override | None) -> str:
    if override is None or proposal == "incomplete":
        return proposal
    return override.judgement


def _changed(a: Assessment, qset: QuestionSet, **update) -> Assessment:
    update["updated"] = utc_now()
    return recompute(a.model_copy(update=update, deep=True), qset)


def _editable(a: Assessment) -> None:
    if a.status == "complete":
        raise InputError(
            f"the assessment of {a.study_id} / {a.result_id} by {a.reviewer} is marked complete: "
            "reopen it first to change it"
        )


def _question(a: Assessment, qset: QuestionSet, question_id: str) -> Question:
    known = [q.id for q in qset.questions(a.effect)]
    if question_id not in known:
        raise InputError(
            f"unknown question {question_id!r} for effect of {a.effect}: "
            f"questions are {', '.join(known)}"
        )
    return qset.question(question_id, a.effect)


def _domain_id_of(question: Question) -> str:
    return question.domain


# -- answering --------------------------------------------------------------------------------
def set_response(
    a: Assessment, qset: QuestionSet, question_id: str, response: str | None
) -> Assessment:
    """Answer a signalling question (None clears the response, keeping justification)."""
    _editable(a)
    question = _question(a, qset, question_id)
    if response is not None:
        if response not in RESPONSES:
            raise InputError(
                f"unknown response {response!r} for {question_id}: use one of "
                f"{', '.join(question.options)}"
            )
        if response not in question.options:
            raise InputError(
                f"{question_id} does not offer {response!r}: choose one of "
                f"{', '.join(question.options)}"
            )
        asked = {q.id for q in asked_questions(a, qset, _domain_id_of(question))}
        if question_id not in asked:
            condition = condition_phrase(question) or "its condition is not met"
            raise InputError(
                f"{question_id} is not asked with the answers so far ({condition}): "
                "answer or change the earlier questions first"
            )
    return _with_answer(a, qset, question_id, response=response)


def _with_answer(a: Assessment, qset: QuestionSet, question_id: str, **update) -> Assessment:
    """A copy of ``a`` whose answer to ``question_id`` has the fields in ``update`` changed."""
    answers = dict(a.answers)
    answers[question_id] = answers.get(question_id, Answer()).model_copy(update=update)
    return _changed(a, qset, answers=answers, last_question=question_id)


def set_justification(a: Assessment, qset: QuestionSet, question_id: str, text: str) -> Assessment:
    """Set the free-text justification of an answer."""
    _editable(a)
    _question(a, qset, question_id)
    return _with_answer(a, qset, question_id, justification=text)


def add_quote(a: Assessment, qset: QuestionSet, question_id: str, quote: Quote) -> Assessment:
    """Attach a supporting quote to an answer (a quote already attached is not repeated)."""
    _editable(a)
    _question(a, qset, question_id)
    old = a.answers.get(question_id, Answer())
    if quote in old.quotes:
        return a
    quotes = [*old.quotes, Quote.model_validate(quote.model_dump())]
    return _with_answer(a, qset, question_id, quotes=quotes)


def remove_quote(a: Assessment, qset: QuestionSet, question_id: str, index: int) -> Assessment:
    """Remove the quote at ``index`` (0-based) from an answer."""
    _editable(a)
    _question(a, qset, question_id)
    old = a.answers.get(question_id, Answer())
    if not 0 <= index < len(old.quotes):
        raise InputError(
            f"{question_id} has {len(old.quotes)} quote(s); there is no quote number {index + 1}"
        )
    quotes = [q for i, q in enumerate(old.quotes) if i != index]
    return _with_answer(a, qset, question_id, quotes=quotes)


def set_effect(a: Assessment, qset: QuestionSet, effect: str) -> Assessment:
    """Switch the domains with effect variants to ``effect``; the other variant's answers are
    kept under ``"<effect>:<id>"`` keys (questions.effect_key) and come back on switching back."""
    _editable(a)
    if effect not in qset.effects():
        raise InputError(
            f"unknown effect {effect!r}: use {' or '.join(qset.effects()) or 'none (this set has none)'}"
        )
    if effect == a.effect:
        return a
    answers = dict(a.answers)
    varying = [d for d in qset.domain_ids() if qset.has_effect_variants(d)]
    for domain_id in varying:
        for q in qset.domain(domain_id, a.effect).questions:
            if q.id in answers:
                answers[effect_key(q.id, a.effect)] = answers.pop(q.id)
    for domain_id in varying:
        for q in qset.domain(domain_id, effect).questions:
            stashed = answers.pop(effect_key(q.id, effect), None)
            if stashed is not None:
                answers[q.id] = stashed
    return _changed(a, qset, answers=answers, effect=effect)


# -- overrides ----------------------------------------------------------------------------------
def set_override(
    a: Assessment, qset: QuestionSet, key: str, judgement: str, reason: str
) -> Assessment:
    """Replace the proposal of a domain ("1".."5") or the overall with a reasoned judgement."""
    _editable(a)
    keys = [*qset.domain_ids(), OVERALL]
    if key not in keys:
        raise InputError(f"cannot override {key!r}: use one of {', '.join(keys)}")
    if judgement not in JUDGEMENTS:
        raise InputError(f"unknown judgement {judgement!r}: use low, some_concerns or high")
    if not reason or not reason.strip():
        raise InputError(f"an override of {_what(key)} needs a reason: give it with the override")
    current = recompute(a, qset)
    proposal = current.proposed[key]
    if proposal == "incomplete":
        raise InputError(
            f"{_what(key)} is incomplete: answer its questions before overriding the judgement"
        )
    if judgement == proposal:
        raise InputError(
            f"the proposal for {_what(key)} is already {JUDGEMENT_LABELS[proposal]}: "
            "no override needed"
        )
    if key == OVERALL:
        worst = max((current.final[d] for d in qset.domain_ids()), key=_SEVERITY.__getitem__)
        if _SEVERITY[judgement] < _SEVERITY[worst]:
            # RoB 2 overall rule (Sterne et al., BMJ 2019;366:l4898; wording from memory): the
            # overall is at least as severe as the least favourable domain.
            raise InputError(
                f"the overall cannot be {JUDGEMENT_LABELS[judgement]} while a domain is "
                f"{JUDGEMENT_LABELS[worst]}: override that domain instead"
            )
    overrides = dict(a.overrides)
    overrides[key] = Override(judgement=judgement, reason=reason.strip(), proposed=proposal)
    return _changed(a, qset, overrides=overrides)


def clear_override(a: Assessment, qset: QuestionSet, key: str) -> Assessment:
    """Remove an override; the proposal applies again."""
    _editable(a)
    if key not in a.overrides:
        raise InputError(f"{_what(key)} has no override to clear")
    overrides = {k: v for k, v in a.overrides.items() if k != key}
    return _changed(a, qset, overrides=overrides)


def set_support(a: Assessment, qset: QuestionSet, domain_id: str, text: str) -> Assessment:
    """The free-text support of a domain's judgement (the RoB 2 form's box); "" clears it."""
    _editable(a)
    if domain_id not in qset.domain_ids():
        raise InputError(
            f"no domain {domain_id!r} to support: use one of {', '.join(qset.domain_ids())}"
        )
    support = {k: v for k, v in a.support.items() if k != domain_id}
    if text.strip():
        support[domain_id] = text.strip()
    return _changed(a, qset, support=support)


def set_direction(a: Assessment, qset: QuestionSet, key: str, direction: str | None) -> Assessment:
    """The optional predicted direction of bias of a domain or the overall (None clears it)."""
    _editable(a)
    keys = [*qset.domain_ids(), OVERALL]
    if key not in keys:
        raise InputError(f"no judgement {key!r} to give a direction: use one of {', '.join(keys)}")
    if direction is not None and direction not in DIRECTION_LABELS:
        raise InputError(
            f"unknown direction of bias {direction!r}: use one of {', '.join(DIRECTION_LABELS)}"
        )
    directions = {k: v for k, v in a.direction.items() if k != key}
    if direction is not None:
        directions[key] = direction
    return _changed(a, qset, direction=directions)


def may_raise_overall(a: Assessment, qset: QuestionSet) -> bool:
    """True when the method lets reviewers raise the overall to High (several some concerns)."""
    current = recompute(a, qset)
    return algorithm.may_raise_overall([current.final[d] for d in qset.domain_ids()])


def _what(key: str) -> str:
    return "the overall judgement" if key == OVERALL else f"domain {key}"


# -- completing ---------------------------------------------------------------------------------
def completion_problems(a: Assessment, qset: QuestionSet) -> list[str]:
    """What stops the assessment from being complete (empty when it can be marked complete)."""
    current = recompute(a, qset)
    problems: list[str] = []
    for domain_id in qset.domain_ids():
        domain = domain_of(current, qset, domain_id)
        answers = effective_answers(current, qset, domain_id)
        for problem in algorithm.validate_answers(domain, answers):
            problems.append(f"domain {domain_id}: {problem}")
        missing = [q.id for q in algorithm.asked_questions(domain, answers) if q.id not in answers]
        if missing:
            problems.append(f"domain {domain_id}: not answered: {', '.join(missing)}")
        elif current.proposed[domain_id] == "incomplete":
            problems.append(f"domain {domain_id}: the algorithm cannot judge it yet")
    for key, override in current.overrides.items():
        if not override.reason.strip():
            problems.append(f"{_what(key)}: the override has no reason")
        now = current.proposed.get(key)
        if now not in (None, "incomplete") and now != override.proposed:
            problems.append(
                f"{_what(key)}: the proposal changed since the override was made "
                f"(then {JUDGEMENT_LABELS[override.proposed]}, now {JUDGEMENT_LABELS[now]}): "
                "set the override again or clear it"
            )
    return problems


def mark_complete(a: Assessment, qset: QuestionSet) -> Assessment:
    """Mark complete; InputError lists everything still missing."""
    problems = completion_problems(a, qset)
    if problems:
        raise InputError("cannot mark complete: " + "; ".join(problems))
    if a.status == "complete":
        return a
    return _changed(a, qset, status="complete")


def reopen(a: Assessment) -> Assessment:
    """Back to draft, so it can be changed."""
    if a.status == "draft":
        return a
    return a.model_copy(update={"status": "draft", "updated": utc_now()}, deep=True)
