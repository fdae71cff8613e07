"""Progress of a review: per study × result × reviewer, how far the assessment has got."""

from __future__ import annotations

from dataclasses import asdict, dataclass

from robtui.core import assessing
from robtui.core.model import OVERALL, Assessment
from robtui.core.questions import QuestionSet
from robtui.core.review_sets import ReviewSets
from robtui.store.question_sets import review_question_sets
from robtui.store.review_folder import ReviewFolder


@dataclass(frozen=True)
class OverrideNote:
    """A judgement the reviewer overrode: which, the algorithm's proposal, theirs, why."""

    key: str  # domain id or "overall"
    label: str  # "D2 Deviations (assignment)", "Overall"
    proposed: str
    judgement: str
    reason: str


@dataclass(frozen=True)
class ProgressRow:
    study: str
    result: str
    reviewer: str
    status: str  # "not started" | "draft" | "complete"
    answered: int
    asked: int
    overall: str | None  # final overall judgement, None when not started
    overrides: tuple[OverrideNote, ...] = ()


def override_notes(a: Assessment, qset: QuestionSet) -> tuple[OverrideNote, ...]:
    """The assessment's overrides in the set's domain order, the overall last."""
    order = [*qset.domain_ids(), OVERALL]
    return tuple(
        OverrideNote(
            key,
            "Overall" if key == OVERALL else qset.domain_label(key, a.effect),
            o.proposed,
            o.judgement,
            o.reason,
        )
        for key, o in sorted(a.overrides.items(), key=lambda kv: order.index(kv[0])
                             if kv[0] in order else len(order))
    )


def assessment_progress(a: Assessment, qset: QuestionSet) -> tuple[int, int]:
    """(answered, asked) signalling questions on the current path of every domain."""
    answered = asked = 0
    for domain_id in qset.domain_ids():
        answered += len(assessing.effective_answers(a, qset, domain_id))
        asked += len(assessing.asked_questions(a, qset, domain_id))
    return answered, asked


def review_progress(
    folder: ReviewFolder, reviewer: str | None = None, sets: ReviewSets | None = None
) -> tuple[list[ProgressRow], list[str]]:
    """One row per study × result × reviewer (the review's reviewers and those on disk), each
    counted with its study's question set (``sets``; default: as review.toml chooses them)."""
    sets = sets or review_question_sets(folder)
    found, problems = folder.assessments(reviewer)
    by_key = {(a.reviewer, a.study_id, a.result_id): a for a in found}
    if reviewer is not None:
        reviewers = [reviewer]
    else:
        reviewers = list(folder.review.reviewers)
        reviewers += [r for r in folder.reviewers_on_disk() if r not in reviewers]
    rows = []
    for study in folder.review.studies:
        for report in study.reports:
            problem = folder.check_report(report)
            if problem:
                problems.append(problem)
        for result in folder.review.results:
            for name in reviewers:
                a = by_key.get((name, study.id, result.id))
                if a is None:
                    # a file that exists but did not load is unreadable (listed in problems)
                    there = folder.assessment_path(name, study.id, result.id).exists()
                    state = "unreadable" if there else "not started"
                    rows.append(ProgressRow(study.id, result.id, name, state, 0, 0, None))
                    continue
                qset = sets.of(study.id)
                mismatch = sets.set_mismatch(a)
                if mismatch is not None:
                    problems.append(f"{name}'s assessment of {study.id} / {result.id} {mismatch}")
                    rows.append(ProgressRow(study.id, result.id, name, "unreadable", 0, 0, None))
                    continue
                a = assessing.recompute(a, qset)
                answered, asked = assessment_progress(a, qset)
                rows.append(
                    ProgressRow(
                        study.id, result.id, name, a.status, answered, asked, a.final[OVERALL],
                        override_notes(a, qset),
                    )
                )
    return rows, problems


def progress_json(folder: ReviewFolder, rows: list[ProgressRow], problems: list[str]) -> dict:
    """The `robtui status --json` shape."""
    return {
        "review": folder.review.title,
        "folder": str(folder.root),
        "rows": [asdict(r) for r in rows],
        "problems": problems,
    }
