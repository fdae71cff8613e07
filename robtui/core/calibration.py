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

from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from datetime import datetime
from typing import Any

from robtui.core.agreement import AgreementStats, agreement
from robtui.core.assessing import path_answers
from robtui.core.comparison import AssessmentPair, pair_assessments
from robtui.core.model import JUDGEMENTS, OVERALL, RESPONSES, Answer, Assessment, Review

NOT_ASKED = "not asked"  # category for a question one reviewer's path did not ask


@dataclass(frozen=True)
class MissingAssessment:
    """An assessment a round or comparison needed but could not use (listed, not dropped)."""

    study_id: str
    result_id: str | None  # None: no result of the study was assessed by anyone
    problem: str  # names the reviewer(s) concerned


@dataclass(frozen=True)
class CalibrationRound:
    number: int
    created: str
    reviewers: tuple[str, str]
    studies: tuple[str, ...]
    rules_version: int
    question_set: str
    question_set_version: str
    pairs: tuple[AssessmentPair, ...]
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
) -> tuple[list[AssessmentPair], list[MissingAssessment]]:
    """Pair the two reviewers' complete assessments; list every pair that cannot be compared.

    A (study, result) is expected when either reviewer has an assessment of it; a study of
    ``study_ids`` that nobody has assessed at all is listed too.
    """
    ra, rb = reviewers
    wanted = list(dict.fromkeys(study_ids)) if study_ids is not None else None
    chosen = [
        x
        for x in assessments
        if x.reviewer in reviewers and (wanted is None or x.study_id in wanted)
    ]
    order = {s.id: i for i, s in enumerate(review.studies)}
    results = {r.id: i for i, r in enumerate(review.results)}
    keys = sorted(
        {(x.study_id, x.result_id) for x in chosen},
        key=lambda k: (order.get(k[0], len(order)), k[0], results.get(k[1], len(results)), k[1]),
    )
    all_pairs = pair_assessments(
        [x for x in chosen if x.reviewer == ra],
        [x for x in chosen if x.reviewer == rb],
        reviewer_a=ra,
        reviewer_b=rb,
        expected=keys,
    )
    pairs = [p for p in all_pairs if p.comparable]
    missing = [
        MissingAssessment(p.study_id, p.result_id, p.problem) for p in all_pairs if p.problem
    ]
    for study_id in wanted or ():
        if not any(k[0] == study_id for k in keys):
            missing.append(MissingAssessment(study_id, None, "not assessed by either reviewer"))
    return pairs, missing


def rules_versions_used(r: CalibrationRound) -> dict[int | None, int]:
    """How many of the round's paired assessments were made under each rules version."""
    counts: dict[int | None, int] = {}
    for p in r.pairs:
        for a in (p.a, p.b):
            counts[a.rules_version] = counts.get(a.rules_version, 0) + 1
    return dict(sorted(counts.items(), key=lambda kv: -1 if kv[0] is None else kv[0]))


def describe_versions(counts: dict[int | None, int]) -> str:
    """E.g. "v0 x4, v1 x4" ("not recorded" for assessments without a version)."""
    return (
        ", ".join(f"{'not recorded' if v is None else f'v{v}'} x{n}" for v, n in counts.items())
        or "none"
    )


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


def domain_agreement(pairs: Sequence[AssessmentPair], domain_ids: Sequence[str]):
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


def round_agreement(pairs: Sequence[AssessmentPair], qset: Any) -> RoundAgreement:
    """Agreement per domain and per signalling question, questions ranked by disagreement.

    Kappa for a question counts the pairs where both reviewers' paths asked it (as in
    robtui.core.comparison.review_agreement); a question asked of one reviewer only is still
    shown among the disagreements, with the other side "not asked".
    """
    domains, skipped = domain_agreement(pairs, qset.domain_ids())
    values: dict[str, list[tuple[str, str]]] = {}
    cases: dict[str, list[DisagreementCase]] = {}
    info: dict[str, Any] = {}
    for p in pairs:
        effect = p.a.effect
        ra = path_answers(qset, effect, p.a.answers)
        rb = path_answers(qset, effect, p.b.answers)
        for q in qset.questions(effect):
            xa, xb = ra.get(q.id), rb.get(q.id)
            if xa is None and xb is None:
                continue
            key = qset.question_key(q.id, effect)
            info.setdefault(key, q)
            if xa is not None and xb is not None:
                values.setdefault(key, []).append((xa, xb))
            if xa != xb:
                cases.setdefault(key, []).append(
                    DisagreementCase(
                        p.study_id,
                        p.result_id,
                        xa or NOT_ASKED,
                        xb or NOT_ASKED,
                        p.a.answers.get(q.id),
                        p.b.answers.get(q.id),
                    )
                )
    questions: dict[str, AgreementStats] = {}
    for key, q in info.items():
        pairs_q = values.get(key, [])
        seen = {v for pair in pairs_q for v in pair}
        cats = list(dict.fromkeys([*q.options, *[c for c in RESPONSES if c in seen]]))
        questions[key] = agreement(pairs_q, cats)
    order = {key: i for i, key in enumerate(_question_order(qset))}
    ranked = [
        QuestionDisagreement(key, str(info[key].domain), info[key].text, questions[key], tuple(c))
        for key, c in cases.items()
    ]
    ranked.sort(
        key=lambda d: (
            -len(d.cases),
            d.stats.percent_agreement if d.stats.percent_agreement is not None else 0.0,
            order.get(d.question_id, len(order)),
        )
    )
    questions = dict(sorted(questions.items(), key=lambda kv: order.get(kv[0], len(order))))
    return RoundAgreement(domains, questions, tuple(ranked), tuple(skipped))


def _question_order(qset: Any) -> list[str]:
    return qset.question_keys()


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


def assessment_order(pairs: Sequence[AssessmentPair]) -> list[str]:
    """Study ids in the order they were taken up: the earliest start (Assessment.created) of any
    of the study's assessments, ties by study id."""
    first: dict[str, datetime] = {}
    for p in pairs:
        start = min(_created(p.a), _created(p.b))
        if p.study_id not in first or start < first[p.study_id]:
            first[p.study_id] = start
    return sorted(first, key=lambda s: (first[s], s))


def agreement_by_batch(
    pairs: Sequence[AssessmentPair], domain_ids: Sequence[str], batch_size: int
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
