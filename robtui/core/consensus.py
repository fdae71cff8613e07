"""Settling two reviewers' assessments into a consensus record (pure).

A consensus record starts from the answers both reviewers gave alike; the lead settles every
other question (take A, take B, or a new answer, always with a note); the domain and overall
judgements are recomputed by the algorithm from the agreed answers.
"""

from __future__ import annotations

from collections.abc import Sequence

from robtui.core.algorithm import asked_questions, propose_all
from robtui.core.assessing import path_answers
from robtui.core.comparison import (
    SOURCES,
    AssessmentPair,
    answer_of,
    judgement_keys,
    require_comparable,
)
from robtui.core.model import (
    DIRECTION_LABELS,
    JUDGEMENTS,
    Answer,
    Consensus,
    Decision,
    Override,
    Quote,
    utc_now,
)
from robtui.errors import InputError


def start_consensus(pair: AssessmentPair, lead: str, qset) -> Consensus:
    """A new consensus record: questions answered alike are agreed; the rest await the lead."""
    require_comparable(pair)
    effect = pair.a.effect
    eff_a = path_answers(qset, effect, pair.a.answers)
    eff_b = path_answers(qset, effect, pair.b.answers)
    answers: dict[str, Answer] = {}
    decisions: dict[str, Decision] = {}
    for question in qset.questions(effect):
        qid = question.id
        if qid in eff_a and eff_a.get(qid) == eff_b.get(qid):
            ans_a, ans_b = answer_of(pair.a, qid), answer_of(pair.b, qid)
            answers[qid] = Answer(
                response=eff_a[qid],
                justification=_joined(pair, ans_a.justification, ans_b.justification),
                quotes=_merged_quotes(ans_a.quotes, ans_b.quotes),
            )
            decisions[qid] = Decision(question_id=qid, source="agreed", response=eff_a[qid])
    consensus = Consensus(
        study_id=pair.study_id,
        result_id=pair.result_id,
        reviewers=(pair.reviewer_a, pair.reviewer_b),
        lead=lead,
        question_set=pair.a.question_set,
        question_set_version=pair.a.question_set_version,
        effect=effect,
        answers=answers,
        decisions=decisions,
        built_on={pair.reviewer_a: eff_a, pair.reviewer_b: eff_b},
        support=_joined_support(pair),
        direction={
            key: d for key, d in pair.a.direction.items() if pair.b.direction.get(key) == d
        },
    )
    return recompute_consensus(consensus, qset)


def _joined_support(pair: AssessmentPair) -> dict[str, str]:
    """Both reviewers' support of each domain judgement, named (one text when alike)."""
    keys = [*pair.a.support, *(k for k in pair.b.support if k not in pair.a.support)]
    return {
        key: _joined(pair, pair.a.support.get(key, ""), pair.b.support.get(key, ""))
        for key in keys
    }


def draft_problem(consensus: Consensus, what: str) -> str | None:
    """Why ``what`` of a consensus cannot change now (it is complete), or None."""
    if consensus.status != "complete":
        return None
    return (
        f"the consensus for {consensus.study_id} / {consensus.result_id} is marked "
        f"complete, so {what} cannot change: reopen it first (c in the comparison, or "
        "`robtui consensus reopen`), then complete it again"
    )


def require_draft(consensus: Consensus, what: str) -> None:
    """Refuse a change to a complete consensus (the same words from every front end)."""
    problem = draft_problem(consensus, what)
    if problem:
        raise InputError(problem)


def settle_support(consensus: Consensus, qset, domain_id: str, text: str) -> Consensus:
    """The lead writes the agreed support of a domain judgement ("" clears it)."""
    require_draft(consensus, "its support text")
    if domain_id not in qset.domain_ids():
        raise InputError(f"no domain {domain_id!r}: use one of {', '.join(qset.domain_ids())}")
    support = {k: v for k, v in consensus.support.items() if k != domain_id}
    if text.strip():
        support[domain_id] = text.strip()
    return recompute_consensus(consensus.model_copy(update={"support": support}), qset)


def settle_direction(consensus: Consensus, qset, key: str, direction: str | None) -> Consensus:
    """The lead settles the predicted direction of bias of a domain or the overall."""
    require_draft(consensus, "its predicted direction of bias")
    keys = [k for k, _ in judgement_keys(qset)]
    if key not in keys:
        raise InputError(f"direction key must be one of {', '.join(keys)}")
    if direction is not None and direction not in DIRECTION_LABELS:
        raise InputError(f"direction must be one of {', '.join(DIRECTION_LABELS)}")
    directions = {k: v for k, v in consensus.direction.items() if k != key}
    if direction is not None:
        directions[key] = direction
    return recompute_consensus(consensus.model_copy(update={"direction": directions}), qset)


def _joined(pair: AssessmentPair, text_a: str, text_b: str) -> str:
    if text_a.strip() == text_b.strip():
        return text_a
    parts = [
        f"{name}: {t.strip()}"
        for name, t in ((pair.reviewer_a, text_a), (pair.reviewer_b, text_b))
        if t.strip()
    ]
    return "\n".join(parts)


def _merged_quotes(first: Sequence[Quote], second: Sequence[Quote]) -> list[Quote]:
    seen, merged = set(), []
    for q in [*first, *second]:
        key = (q.document_sha256, q.start, q.end)
        if key not in seen:
            seen.add(key)
            merged.append(q)
    return merged


def settle(
    consensus: Consensus,
    qset,
    question_id: str,
    source: str,
    response: str | None = None,
    note: str = "",
    *,
    pair: AssessmentPair | None = None,
) -> Consensus:
    """Settle one question: take A's answer, B's answer, or a new ``response``; with a note.

    Taking a side copies that side's response, justification and quotes (``pair`` needed);
    a side that was never asked the question cannot be taken. A new answer is the lead's own:
    its justification is the note, and no reviewer's quotes are kept. Only questions asked on
    the agreed path can be settled (settle earlier questions first).
    """
    require_draft(consensus, "an answer")
    question = _question(qset, consensus.effect, question_id)
    if source not in SOURCES:
        raise InputError(f"source must be one of {', '.join(SOURCES)} (take A, take B, new)")
    if not note.strip():
        raise InputError(f"settling {question_id} needs a note saying why: add one")
    if question_id not in asked_on_path(consensus, qset):
        raise InputError(
            f"{question_id} is not asked on the agreed path of {consensus.study_id} / "
            f"{consensus.result_id} (its condition: {question.condition_text or 'none'}); "
            f"settle the questions listed to settle first: "
            f"{', '.join(pending_questions(consensus, qset)) or 'none left'}"
        )
    if source in ("a", "b"):
        if response is not None:
            raise InputError("give a response only with source 'new'")
        if pair is None or pair.key != (consensus.study_id, consensus.result_id):
            raise InputError(f"taking a side needs the two assessments of {consensus.study_id}")
        if pair.problem:
            raise InputError(
                f"cannot take a side for {consensus.study_id} / {consensus.result_id}: "
                f"{pair.problem}; give a new answer instead, or have it marked complete again"
            )
        side = pair.a if source == "a" else pair.b
        effective = path_answers(qset, consensus.effect, side.answers)
        if question_id not in effective:
            raise InputError(
                f"{side.reviewer} was never asked {question_id} (it is off their answer path), "
                "so there is no answer to take: take the other side or give a new answer"
            )
        taken = answer_of(side, question_id)
        answer = Answer(
            response=effective[question_id],
            justification=taken.justification,
            quotes=list(taken.quotes),
        )
    else:
        if response is None or response not in question.options:
            raise InputError(
                f"a new answer to {question_id} must be one of {', '.join(question.options)}"
            )
        answer = Answer(response=response, justification=note.strip())
    answers = dict(consensus.answers)
    answers[question_id] = answer
    decisions = dict(consensus.decisions)
    decisions[question_id] = Decision(
        question_id=question_id, source=source, response=answer.response, note=note.strip()
    )
    changed = consensus.model_copy(update={"answers": answers, "decisions": decisions})
    return recompute_consensus(changed, qset)


def _question(qset, effect: str, question_id: str):
    for question in qset.questions(effect):
        if question.id == question_id:
            return question
    known = ", ".join(q.id for q in qset.questions(effect))
    raise InputError(f"no signalling question {question_id!r} (questions: {known})")


def set_consensus_override(
    consensus: Consensus, qset, key: str, judgement: str, reason: str
) -> Consensus:
    """The lead overrides a recomputed judgement (domain id or "overall") with a reason."""
    require_draft(consensus, "a judgement")
    keys = [k for k, _ in judgement_keys(qset)]
    if key not in keys:
        raise InputError(f"override key must be one of {', '.join(keys)}")
    if judgement not in JUDGEMENTS:
        raise InputError(f"judgement must be one of {', '.join(JUDGEMENTS)}")
    if not reason.strip():
        raise InputError("an override needs a reason: add one")
    current = recompute_consensus(consensus, qset)
    overrides = dict(current.overrides)
    overrides[key] = Override(
        judgement=judgement, reason=reason.strip(), proposed=current.proposed.get(key, "incomplete")
    )
    return recompute_consensus(current.model_copy(update={"overrides": overrides}), qset)


def remove_consensus_override(consensus: Consensus, qset, key: str) -> Consensus:
    """Back to the algorithm's proposal for ``key`` (domain id or "overall")."""
    require_draft(consensus, "a judgement")
    overrides = {k: v for k, v in consensus.overrides.items() if k != key}
    return recompute_consensus(consensus.model_copy(update={"overrides": overrides}), qset)


def recompute_consensus(consensus: Consensus, qset) -> Consensus:
    """Proposals from the agreed answers by the algorithm; final = proposal unless overridden."""
    effective = path_answers(qset, consensus.effect, consensus.answers)
    proposed = dict(propose_all(qset, consensus.effect, effective))
    final = dict(proposed)
    for key, override in consensus.overrides.items():
        final[key] = override.judgement
    return Consensus.model_validate(
        {**consensus.model_dump(), "proposed": proposed, "final": final, "updated": utc_now()}
    )


def asked_on_path(consensus: Consensus, qset) -> list[str]:
    """Questions asked on the consensus's current path, answered or not, in order."""
    effective = path_answers(qset, consensus.effect, consensus.answers)
    asked = []
    for domain_id in qset.domain_ids():
        domain = qset.domain(domain_id, consensus.effect)
        asked += [q.id for q in asked_questions(domain, effective)]
    return asked


def pending_questions(consensus: Consensus, qset) -> list[str]:
    """Questions asked on the consensus's current path that have no agreed response yet."""
    effective = path_answers(qset, consensus.effect, consensus.answers)
    return [qid for qid in asked_on_path(consensus, qset) if qid not in effective]


def changed_since(consensus: Consensus, pair: AssessmentPair | None, qset) -> list[str]:
    """What a reviewer changed since the lead last took up their answers ("tobias: 2.3 N ->
    PN"); empty when nothing changed or the record predates this check (no ``built_on``)."""
    if pair is None or not consensus.built_on:
        return []
    changes = []
    for side in (pair.a, pair.b):
        if side is None or side.reviewer not in consensus.built_on:
            continue
        before = consensus.built_on[side.reviewer]
        now = path_answers(qset, consensus.effect, side.answers)
        for qid in dict.fromkeys([*before, *now]):
            if before.get(qid) != now.get(qid):
                was, is_ = before.get(qid) or "not asked", now.get(qid) or "not asked"
                changes.append(f"{side.reviewer}: {qid} {was} -> {is_}")
    return changes


def complete_consensus(consensus: Consensus, qset, pair: AssessmentPair | None = None) -> Consensus:
    """Mark complete; InputError lists the questions still to settle. With ``pair``, the
    reviewers' current answers become the ones the consensus is built on (the lead has
    seen them)."""
    current = recompute_consensus(consensus, qset)
    pending = pending_questions(current, qset)
    incomplete = [k for k, v in current.final.items() if v == "incomplete"]
    if pending or incomplete:
        raise InputError(
            f"consensus for {consensus.study_id} / {consensus.result_id} is not finished: "
            f"settle {', '.join(pending) or 'the open questions'}"
            + (f" (domains still incomplete: {', '.join(incomplete)})" if incomplete else "")
        )
    update: dict = {"status": "complete"}
    if pair is not None and pair.comparable:
        update["built_on"] = {
            side.reviewer: path_answers(qset, consensus.effect, side.answers)
            for side in (pair.a, pair.b)
        }
    return current.model_copy(update=update)


def reopen_consensus(consensus: Consensus) -> Consensus:
    return consensus.model_copy(update={"status": "draft", "updated": utc_now()})
