"""What an export holds, per result: judgement rows, summary shares, supporting answers (pure).

Which judgements a study's row uses (its ``source``):
- "consensus": a consensus record marked complete (the final judgement of the result);
  "consensus (stale)" when a reviewer has since changed an answer it was built on (listed in
  ``problems`` with the changes, so the lead reopens and reviews it);
- "agreed by A, B": no complete consensus, but every complete assessment has the same
  domain and overall judgements;
- "A only": exactly one reviewer's assessment is complete;
- otherwise the row is not judged, and the reason is listed in ``problems`` (drafts,
  missing assessments, reviewers who differ without a complete consensus) - never skipped.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field, replace

from robtui.core.assessing import path_answers
from robtui.core.comparison import AssessmentPair
from robtui.core.consensus import changed_since
from robtui.core.grade import GradeSuggestion, suggest_rob_rating
from robtui.core.model import (
    DIRECTION_LABELS,
    JUDGEMENTS,
    OVERALL,
    Assessment,
    Consensus,
    Quote,
    Review,
)
from robtui.core.questions import QuestionSet, judgement_label
from robtui.core.review_sets import ReviewSets, review_sets


@dataclass(frozen=True)
class JudgementRow:
    study_id: str
    study_label: str
    judgements: dict[str, str | None]  # domain ids and "overall" -> code, None = not judged
    source: str  # "consensus", "consensus (stale)", "agreed by a, b", "a only", "not judged"
    weight: float | None
    overrides: tuple[str, ...] = ()  # "D3 High (proposed Some concerns): reason"


@dataclass(frozen=True)
class SupportingRow:
    study_id: str
    source: str
    domain_id: str
    question_id: str
    question: str
    response: str | None
    justification: str
    quotes: tuple[Quote, ...]
    settled: str = ""  # how the lead settled a difference, with the note ("" when agreed)


@dataclass(frozen=True)
class OutcomeExport:
    review_title: str
    result_id: str
    outcome: str
    time_point: str
    effect: str
    columns: list[tuple[str, str]]  # (key, header) for domains then overall
    rows: list[JudgementRow]
    shares: dict[str, dict[str, float]]  # key -> judgement code (and "incomplete") -> share
    basis: str  # "studies" or "weight"
    supporting: list[SupportingRow]
    grade: GradeSuggestion
    problems: list[str] = field(default_factory=list)
    coverage: dict[str, int] = field(default_factory=dict)  # key -> studies having the domain


def _columns(domain_ids: Sequence[str]) -> list[tuple[str, str]]:
    cols = [(d, f"D{d}") for d in domain_ids]
    return cols + [(OVERALL, "Overall")]


def column_titles(qset, effect: str | None = None) -> dict[str, str]:
    """Domain key -> "D1 Randomisation" style title (our short names) for ``effect``."""
    titles = {d: qset.domain_label(d, effect) for d in qset.domain_ids()}
    titles[OVERALL] = "Overall"
    return titles


def build_outcome_export(
    review: Review,
    result_id: str,
    sets: QuestionSet | ReviewSets,
    assessments: Sequence[Assessment],
    consensus: Sequence[Consensus],
    unusable: frozenset[tuple[str, str]] = frozenset(),
) -> OutcomeExport:
    """Assemble every table of one result's export from the stored records.

    ``unusable``: (reviewer, study) pairs whose assessment file of this result exists but could
    not be used; the export says so rather than "no assessment".

    ``sets`` gives each study's question set (one QuestionSet: the same for all). In a review
    mixing designs the columns are every domain of the sets in use; a study's row holds only
    its own set's domains (no cell for the others), and each column's summary counts only the
    studies that have the domain.
    """
    sets = review_sets(sets)
    spec = review.result(result_id)
    columns = _columns(sets.domain_ids([s.id for s in review.studies]))
    rows: list[JudgementRow] = []
    supporting: list[SupportingRow] = []
    problems: list[str] = []
    by_study: dict[str, list[Assessment]] = {}
    for a in assessments:
        if a.result_id == result_id:
            by_study.setdefault(a.study_id, []).append(a)
    agreed = {c.study_id: c for c in consensus if c.result_id == result_id}
    for study in review.studies:
        qset = sets.of(study.id)
        keys = [*qset.domain_ids(), OVERALL]  # the study's own columns
        own = sorted(by_study.get(study.id, []), key=lambda a: a.reviewer)
        bad = {name for name, sid in unusable if sid == study.id}
        record, source, problem = _choose(study.id, own, agreed.get(study.id), review, keys, bad)
        if source == "consensus":
            changes = changed_since(record, _pair_of(record, own), qset)
            if changes:
                source = "consensus (stale)"
                problem = (
                    f"consensus built on answers a reviewer has since changed "
                    f"({'; '.join(changes)}): reopen it in the comparison screen and review"
                )
        if problem:
            problems.append(f"{study.id}: {problem}")
        judgements = {k: (record.final.get(k) if record else None) for k in keys}
        judgements = {k: (v if v in JUDGEMENTS else None) for k, v in judgements.items()}
        weight = spec.weights.get(study.id) if spec and spec.weights else None
        overrides = _overrides(record, qset) if record is not None else ()
        rows.append(JudgementRow(study.id, study.label, judgements, source, weight, overrides))
        if record is not None:
            lead = source.startswith("consensus")
            whose = source if lead else f"answers of {record.reviewer}; {source}"
            supporting += _supporting(study.id, whose, record, qset)
    if not review.studies:
        problems.append("no studies in the review yet: add them with `robtui study add`")
    shares, basis = _shares(rows, [k for k, _ in columns], spec.weights if spec else {})
    if spec and spec.weights and basis == "studies":
        unweighted = [r.study_id for r in rows if r.study_id not in spec.weights]
        problems.append(
            f"{', '.join(unweighted)}: no meta-analysis weight given, so the summary counts "
            "studies; add the weights to the result to weight it"
        )
    overall = {r.study_id: r.judgements[OVERALL] for r in rows}
    grade = suggest_rob_rating(overall, spec.weights if spec and spec.weights else None)
    study_ids = [s.id for s in review.studies]
    if sets.is_mixed(study_ids):
        used = ", ".join(
            f"{qset.id} ({', '.join(s for s in study_ids if sets.of(s).id == qset.id)})"
            for qset in sets.in_use(study_ids)
        )
        note = (
            f"Studies of different designs were assessed with different question sets: {used}. "
            "Each overall judgement covers the domains of its own set (an extra domain counts only "
            "for the studies that have it); the rating pools the overall judgements."
        )
        grade = replace(grade, notes=[*grade.notes, note])
    return OutcomeExport(
        review_title=review.title,
        result_id=result_id,
        outcome=spec.outcome if spec else result_id,
        time_point=spec.time_point if spec else "",
        effect=spec.effect if spec else "assignment",
        columns=columns,
        rows=rows,
        shares=shares,
        basis=basis,
        supporting=supporting,
        grade=grade,
        problems=problems,
        coverage={k: sum(k in r.judgements for r in rows) for k, _ in columns},
    )


def _choose(
    study_id, own: list[Assessment], cons: Consensus | None, review: Review, keys, bad=frozenset()
):
    """(record, source, problem): the record whose judgements the row shows; ``bad``: the
    reviewers whose file could not be used."""
    if cons is not None and cons.status == "complete":
        return cons, "consensus", None
    complete = [a for a in own if a.status == "complete"]
    notes = []
    if cons is not None:
        notes.append("consensus started but not complete")
    drafts = [a.reviewer for a in own if a.status != "complete"]
    if drafts:
        notes.append(f"draft by {', '.join(drafts)}")
    assessed = {a.reviewer for a in own}
    # the lead may be listed among the reviewers without assessing anything
    missing = [r for r in review.reviewers if r not in assessed and r != review.lead]
    if [r for r in missing if r in bad]:
        notes.append(f"assessment file of {', '.join(r for r in missing if r in bad)} cannot be used")
    if [r for r in missing if r not in bad]:
        notes.append(f"no assessment by {', '.join(r for r in missing if r not in bad)}")
    if not complete:
        return None, "not judged", "; ".join(notes) or "no assessment"
    finals = {tuple(a.final.get(k) for k in keys) for a in complete}
    if len(finals) > 1:
        names = ", ".join(a.reviewer for a in complete)
        notes.insert(0, f"reviewers {names} differ and no consensus is complete")
        return None, "not judged", "; ".join(notes)
    names = ", ".join(a.reviewer for a in complete)
    source = f"agreed by {names}" if len(complete) > 1 else f"{names} only"
    return complete[0], source, ("; ".join(notes) if notes else None)


def _pair_of(record: Consensus, own: list[Assessment]) -> AssessmentPair | None:
    by_name = {a.reviewer: a for a in own}
    a, b = record.reviewers
    if a not in by_name and b not in by_name:
        return None
    return AssessmentPair(record.study_id, record.result_id, a, b, by_name.get(a), by_name.get(b))


def _overrides(record, qset) -> tuple[str, ...]:
    """Each overridden judgement in words, with the proposal it replaced and the reason."""
    titles = column_titles(qset, record.effect)
    return tuple(
        f"{titles.get(key, key)}: {judgement_label(o.judgement)} "
        f"(proposed {judgement_label(o.proposed)}): {o.reason}"
        for key, o in record.overrides.items()
    )


def _settled(record, question_id: str) -> str:
    decision = getattr(record, "decisions", {}).get(question_id)
    if decision is None or decision.source == "agreed":
        return ""
    if decision.source == "new":
        how = "new answer by the lead"
    else:
        how = f"took {record.reviewers[0 if decision.source == 'a' else 1]}'s answer"
    return f"{how}: {decision.note}" if decision.note else how


def _domain_supporting(study_id: str, source: str, record, qset) -> list[SupportingRow]:
    """The RoB 2 form's support of each domain judgement and the predicted directions of bias,
    as rows of the supporting table (question column: "D1 support", "Overall direction")."""
    titles = column_titles(qset, record.effect)
    rows = []
    for key in [*qset.domain_ids(), OVERALL]:
        support = record.support.get(key, "")
        direction = record.direction.get(key)
        if not support and direction is None:
            continue
        text = support
        if direction is not None:
            text += ("\n" if text else "") + (
                f"Predicted direction of bias: {DIRECTION_LABELS[direction]}"
            )
        rows.append(
            SupportingRow(
                study_id=study_id,
                source=source,
                domain_id=key,
                question_id=f"{titles.get(key, key)} support",
                question=f"Support for the judgement of {titles.get(key, key)}",
                response=None,
                justification=text,
                quotes=(),
            )
        )
    return rows


def _supporting(study_id: str, source: str, record, qset) -> list[SupportingRow]:
    effective = path_answers(qset, record.effect, record.answers)
    rows = []
    for question in qset.questions(record.effect):
        if question.id not in effective:
            continue
        answer = record.answers[question.id]
        rows.append(
            SupportingRow(
                study_id=study_id,
                source=source,
                domain_id=question.domain,
                question_id=question.id,
                question=question.text,
                response=effective[question.id],
                justification=answer.justification,
                quotes=tuple(answer.quotes),
                settled=_settled(record, question.id),
            )
        )
    return rows + _domain_supporting(study_id, source, record, qset)


def _shares(rows: list[JudgementRow], keys: list[str], weights: dict[str, float]):
    """Per key, the share of studies (or of weight) at each judgement, incomplete included,
    among the studies that have the domain."""
    use_weight = bool(weights) and all(r.study_id in weights for r in rows)
    basis = "weight" if use_weight else "studies"
    shares: dict[str, dict[str, float]] = {}
    for key in keys:
        counts = {code: 0.0 for code in (*JUDGEMENTS, "incomplete")}
        for row in rows:
            if key not in row.judgements:
                continue  # the study's design has no such domain
            w = weights[row.study_id] if use_weight else 1.0
            counts[row.judgements[key] or "incomplete"] += w
        total = sum(counts.values())
        shares[key] = {c: (v / total if total else 0.0) for c, v in counts.items()}
    return shares, basis
