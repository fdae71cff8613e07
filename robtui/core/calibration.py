"""Calibration rounds and agreement over the review (pure: no file I/O, no UI).

A calibration round is a snapshot of two reviewers' completed, independent assessments of a
chosen set of studies, taken under one answering-rules version. From it come agreement per
signalling question and per domain (Cohen's kappa and friends, robtui.core.agreement), the
questions ranked by disagreement with both sides' answers, and, between two rounds, the
before/after change. Agreement over the whole review is also given by batches of studies in
assessment order, so a team sees whether agreement holds up as the review goes on.

Background: agreement on RoB 2 between reviewers was low without calibration (Fleiss' kappa
0.16 overall, 0.04 to 0.45 per domain; Minozzi S et al., J Clin Epidemiol 2020;126:37-44) and
rose to 0.42 after a calibration exercise and review-specific answering rules (Minozzi S et al.,
J Clin Epidemiol 2022;141:99-105).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass
from datetime import datetime
from typing import Any

from robtui.core.agreement import AgreementStats, agreement
from robtui.core.model import JUDGEMENTS, OVERALL, RESPONSES, Answer, Assessment, Review

NOT_ASKED = "not asked"  # category for a question one reviewer's path did not ask


@dataclass(frozen=True)
class AssessedPair:
    """Both reviewers' completed assessments of one result of one study."""

    study_id: str
    result_id: str
    a: Assessment
    b: Assessment


@dataclass(frozen=True)
class MissingAssessment:
    """An assessment a round or comparison needed but could not use (listed, not dropped)."""

    study_id: str
    result_id: str | None  # None: no result of the study was assessed by anyone
    reviewer: str | None  # None: neither reviewer
    problem: str


@dataclass(frozen=True)
class CalibrationRound:
    number: int
    created: str
    reviewers: tuple[str, str]
    studies: tuple[str, ...]
    rules_version: int
    question_set: str
    question_set_version: str
    pairs: tuple[AssessedPair, ...]
    missing: tuple[MissingAssessment, ...]


@dataclass(frozen=True)
class DisagreementCase:
    """One result on which the two reviewers answered a question differently."""

    study_id: str
    result_id: str
    response_a: str
    response_b: str
    answer_a: Answer | None
    answer_b: Answer | None


@dataclass(frozen=True)
class QuestionDisagreement:
    question_id: str
    domain_id: str
    text: str
    stats: AgreementStats
    cases: tuple[DisagreementCase, ...]


@dataclass(frozen=True)
class RoundAgreement:
    """Agreement of a set of pairs: per domain (and overall) and per signalling question."""

    domains: dict[str, AgreementStats]
    questions: dict[str, AgreementStats]
    ranked: tuple[QuestionDisagreement, ...]  # questions with disagreements, most first
    skipped: tuple[str, ...]  # pairs left out of a figure, with the reason


@dataclass(frozen=True)
class AgreementChange:
    key: str  # domain id, "overall" or question id
    kind: str  # "domain" or "question"
    before: AgreementStats | None
    after: AgreementStats | None


@dataclass(frozen=True)
class BatchAgreement:
    index: int  # 1-based
    studies: tuple[str, ...]
    n_pairs: int
    domains: dict[str, AgreementStats]


# --- pairing -----------------------------------------------------------------------------------


def pair_complete(
    assessments: Iterable[Assessment],
    reviewers: tuple[str, str],
    review: Review,
    study_ids: Sequence[str] | None = None,
) -> tuple[list[AssessedPair], list[MissingAssessment]]:
    """Pair the two reviewers' complete assessments; list every one that is absent or draft.

    A (study, result) is expected when either reviewer has an assessment of it. A study of
    ``study_ids`` that nobody has assessed at all is listed too.
    """
    ra, rb = reviewers
    by_key: dict[tuple[str, str, str], Assessment] = {}
    for a in assessments:
        if a.reviewer in reviewers:
            by_key[(a.reviewer, a.study_id, a.result_id)] = a
    wanted = (
        list(dict.fromkeys(study_ids)) if study_ids is not None else [s.id for s in review.studies]
    )
    result_order = {r.id: i for i, r in enumerate(review.results)}
    pairs: list[AssessedPair] = []
    missing: list[MissingAssessment] = []
    for study_id in wanted:
        results = sorted(
            {k[2] for k in by_key if k[1] == study_id},
            key=lambda r: (result_order.get(r, len(result_order)), r),
        )
        if not results:
            if study_ids is not None:
                missing.append(
                    MissingAssessment(study_id, None, None, "not assessed by either reviewer")
                )
            continue
        for result_id in results:
            got = {r: by_key.get((r, study_id, result_id)) for r in reviewers}
            problems = False
            for reviewer, record in got.items():
                if record is None:
                    missing.append(MissingAssessment(study_id, result_id, reviewer, "not started"))
                    problems = True
                elif record.status != "complete":
                    missing.append(
                        MissingAssessment(
                            study_id, result_id, reviewer, "draft: not marked complete"
                        )
                    )
                    problems = True
            if not problems:
                pairs.append(AssessedPair(study_id, result_id, got[ra], got[rb]))
    return pairs, missing


def build_round(
    number: int,
    review: Review,
    reviewers: tuple[str, str],
    assessments: Iterable[Assessment],
    *,
    rules_version: int,
    created: str,
    studies: Sequence[str] | None = None,
) -> CalibrationRound:
    """Snapshot a calibration round of ``studies`` (default: the review's calibration set)."""
    chosen = tuple(studies if studies is not None else review.calibration_studies)
    if not chosen:
        raise ValueError("no calibration set: choose studies with `robtui calibrate set`")
    if reviewers[0] == reviewers[1]:
        raise ValueError("a calibration round needs two different reviewers")
    pairs, missing = pair_complete(assessments, reviewers, review, chosen)
    return CalibrationRound(
        number=number,
        created=created,
        reviewers=reviewers,
        studies=chosen,
        rules_version=rules_version,
        question_set=review.question_set,
        question_set_version=review.question_set_version,
        pairs=tuple(pairs),
        missing=tuple(missing),
    )


# --- agreement ---------------------------------------------------------------------------------

EffectiveAnswers = Callable[[Assessment, Any, str], Mapping[str, str]]


def _default_effective(assessment: Assessment, qset: Any, domain_id: str) -> Mapping[str, str]:
    from robtui.core.assessing import effective_answers

    return effective_answers(assessment, qset, domain_id)


def effective_responses(
    assessment: Assessment, qset: Any, effective: EffectiveAnswers | None = None
) -> dict[str, str]:
    """Responses to the questions asked on the assessment's path, all domains."""
    effective = effective or _default_effective
    out: dict[str, str] = {}
    for domain_id in qset.domain_ids():
        out.update({q: r for q, r in effective(assessment, qset, domain_id).items() if r})
    return out


def domain_agreement(pairs: Sequence[AssessedPair], domain_ids: Sequence[str]):
    """Agreement on the final judgement per domain and overall (ordered low < some < high)."""
    stats: dict[str, AgreementStats] = {}
    skipped: list[str] = []
    for key in (*domain_ids, OVERALL):
        values = []
        for p in pairs:
            ja, jb = p.a.final.get(key), p.b.final.get(key)
            if ja in JUDGEMENTS and jb in JUDGEMENTS:
                values.append((ja, jb))
            else:
                skipped.append(
                    f"{p.study_id}/{p.result_id} domain {key}: judgement {ja or 'none'} / "
                    f"{jb or 'none'} left out"
                )
        stats[key] = agreement(values, JUDGEMENTS, ordered=True)
    return stats, skipped


def round_agreement(
    pairs: Sequence[AssessedPair], qset: Any, effective: EffectiveAnswers | None = None
) -> RoundAgreement:
    """Agreement per domain and per signalling question, questions ranked by disagreement.

    A question counts for a pair when at least one reviewer's path asked it; the side whose
    path did not ask it is recorded as "not asked" (a disagreement, usually from an earlier one).
    """
    domains, skipped = domain_agreement(pairs, qset.domain_ids())
    responses = [
        (p, effective_responses(p.a, qset, effective), effective_responses(p.b, qset, effective))
        for p in pairs
    ]
    info: dict[str, Any] = {}
    for effect in ("assignment", "adhering"):
        for q in qset.questions(effect):
            info.setdefault(q.id, q)
    questions: dict[str, AgreementStats] = {}
    ranked: list[QuestionDisagreement] = []
    for qid, question in info.items():
        values, cases = [], []
        for p, ra, rb in responses:
            xa, xb = ra.get(qid, NOT_ASKED), rb.get(qid, NOT_ASKED)
            if xa == NOT_ASKED and xb == NOT_ASKED:
                continue
            values.append((xa, xb))
            if xa != xb:
                cases.append(
                    DisagreementCase(
                        p.study_id, p.result_id, xa, xb, p.a.answers.get(qid), p.b.answers.get(qid)
                    )
                )
        if not values:
            continue
        options = list(getattr(question, "options", None) or RESPONSES)
        cats = [*options, *sorted({v for pair in values for v in pair} - set(options))]
        stats = agreement(values, cats)
        questions[qid] = stats
        if cases:
            ranked.append(
                QuestionDisagreement(qid, str(question.domain), question.text, stats, tuple(cases))
            )
    order = {qid: i for i, qid in enumerate(info)}
    ranked.sort(
        key=lambda d: (-len(d.cases), d.stats.percent_agreement or 0.0, order[d.question_id])
    )
    return RoundAgreement(domains, questions, tuple(ranked), tuple(skipped))


def compare_agreement(before: RoundAgreement, after: RoundAgreement) -> list[AgreementChange]:
    """Before/after figures per domain (then overall) and per question, in a stable order."""
    changes = [
        AgreementChange(k, "domain", before.domains.get(k), after.domains.get(k))
        for k in dict.fromkeys([*before.domains, *after.domains])
    ]
    changes += [
        AgreementChange(k, "question", before.questions.get(k), after.questions.get(k))
        for k in dict.fromkeys([*before.questions, *after.questions])
    ]
    return changes


# --- agreement over the review -----------------------------------------------------------------


def _created(a: Assessment) -> datetime:
    return a.created


def assessment_order(pairs: Sequence[AssessedPair]) -> list[str]:
    """Study ids in the order they were taken up: the earliest start (Assessment.created) of any
    of the study's assessments, ties by study id."""
    first: dict[str, datetime] = {}
    for p in pairs:
        start = min(_created(p.a), _created(p.b))
        if p.study_id not in first or start < first[p.study_id]:
            first[p.study_id] = start
    return sorted(first, key=lambda s: (first[s], s))


def agreement_by_batch(
    pairs: Sequence[AssessedPair], domain_ids: Sequence[str], batch_size: int
) -> list[BatchAgreement]:
    """Kappa per domain and overall for consecutive batches of ``batch_size`` studies."""
    if batch_size < 1:
        raise ValueError(f"batch size must be 1 or more, not {batch_size}")
    order = assessment_order(pairs)
    batches: list[BatchAgreement] = []
    for start in range(0, len(order), batch_size):
        studies = tuple(order[start : start + batch_size])
        chosen = [p for p in pairs if p.study_id in studies]
        stats, _ = domain_agreement(chosen, domain_ids)
        batches.append(BatchAgreement(len(batches) + 1, studies, len(chosen), stats))
    return batches


def format_figure(value: float | None, digits: int = 2) -> str:
    """A statistic for a table: fixed digits, an en dash when undefined."""
    return "\u2013" if value is None else f"{value:.{digits}f}"
