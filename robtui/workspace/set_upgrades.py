"""Carrying a review's records to the current version of their question sets.

A record made with an earlier version of its study's set is refused on load (its judgements
came from the old rules). :func:`plan_carries` reads every such record and works out what
carrying it forward keeps, sets aside and changes (robtui.core.set_versions), writing nothing;
:func:`apply_carries` writes the planned records under the review's lock, refusing the whole
batch when another process changed any of the files since they were read.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from robtui.core.blinding import require_may_use
from robtui.core.model import Assessment, Consensus, SetUpgrade
from robtui.core.set_versions import carry_forward, carry_problem, describe_upgrade
from robtui.errors import InputError
from robtui.store.derived import code_problems


@dataclass(frozen=True)
class PlannedCarry:
    """One record as read (``before``) and as it would be written (``after``)."""

    path: Path
    before: Assessment | Consensus
    after: Assessment | Consensus
    note: SetUpgrade

    @property
    def title(self) -> str:
        r = self.before
        who = f"{r.reviewer}'s assessment" if isinstance(r, Assessment) else "consensus"
        return f"{who} of {r.study_id} / {r.result_id} ({r.question_set})"

    def describe(self) -> list[str]:
        return describe_upgrade(self.note, self.before.status)


def plan_carries(
    ws,
    study: str | None = None,
    result: str | None = None,
    reviewer: str | None = None,
    *,
    asker: str | None = None,
    unblind: bool = False,
) -> tuple[list[PlannedCarry], list[str]]:
    """The records (of one study, result or reviewer, or all; consensus records unless a
    reviewer is named) made with an earlier version of their study's set, each with what
    carrying it forward would do; and why the others behind their set cannot be carried,
    with the problems of unreadable files. With ``asker``, blinding holds (core/blinding.py):
    a record the asker may not change is named, never shown, and not carried."""
    folder = ws.folder
    if study is not None:
        folder.study_or_error(study)
    if result is not None:
        folder.result_or_error(result)
    records, problems = folder.assessments(reviewer)
    if reviewer is None:
        found, trouble = folder.consensus_records()
        records, problems = [*records, *found], problems + trouble
    plans: list[PlannedCarry] = []
    for record in records:
        if study not in (None, record.study_id) or result not in (None, record.result_id):
            continue
        if ws.sets.set_mismatch(record) is None:
            continue
        path = _path(folder, record)
        hidden = None if asker is None else _not_theirs(ws.review, record, asker, unblind)
        if hidden is not None:
            problems.append(f"{path.relative_to(ws.root.resolve())}: not carried: {hidden}")
            continue
        qset = ws.sets.of(record.study_id)
        problem = carry_problem(record, qset)
        if problem is None:
            after, note = carry_forward(record, qset)
            bad = code_problems(after, qset)
            if bad:
                problem = (
                    f"under version {qset.version} {'; '.join(bad)}: fix the answer in the "
                    "file, then carry it"
                )
            else:
                plans.append(PlannedCarry(path, record, after, note))
                continue
        problems.append(f"{path}: not carried: {problem}")
    return plans, problems


def apply_carries(ws, plans: list[PlannedCarry]) -> list[Path]:
    """Write every planned record (StaleFileError, with nothing written, when any file
    changed since :func:`plan_carries` read it)."""
    folder = ws.folder
    with folder.locked():
        folder.refuse_changed_since_read([p.path for p in plans])
        for plan in plans:
            if isinstance(plan.after, Consensus):
                folder.save_consensus(plan.after)
            else:
                folder.save_assessment(plan.after)
    return [p.path for p in plans]


def _not_theirs(review, record: Assessment | Consensus, asker: str, unblind: bool) -> str | None:
    """Why ``asker`` may not carry ``record`` (InputError's words), or None."""
    if isinstance(record, Consensus):
        return None if not review.lead or asker == review.lead else (
            f"a consensus record is the lead's ({review.lead}) to carry"
        )
    try:
        require_may_use(asker, record.reviewer, review, complete=record.status == "complete",
                        unblind=unblind, changing=True)
    except InputError as refusal:
        return str(refusal)
    return None


def _path(folder, record: Assessment | Consensus) -> Path:
    if isinstance(record, Consensus):
        return folder.inside(folder.consensus_path(record.study_id, record.result_id))
    return folder.inside(folder.assessment_path(record.reviewer, record.study_id, record.result_id))
