"""The lead's changes to a consensus record, for both front ends (the CLI and the workbench).

Every change is one pure function of core.consensus applied to the record as stored, under the
review's lock: read it, change it, save it. When no record is stored yet, the change starts
from the record the lead was shown (``unsaved``: the workbench's preview of a new consensus).
So a change made in the workbench while another process saved the record lands on top of
theirs, and a complete record refuses every change with the same words from both front ends
(core.consensus.require_draft).
"""

from __future__ import annotations

from collections.abc import Callable

from robtui.core import consensus as core
from robtui.core.comparison import AssessmentPair
from robtui.core.model import Consensus
from robtui.core.questions import QuestionSet
from robtui.errors import InputError
from robtui.workspace.workspace import Workspace

Change = Callable[[Consensus, QuestionSet], Consensus]


def change_consensus(
    ws: Workspace, study_id: str, result_id: str, change: Change,
    *, unsaved: Consensus | None = None,
) -> Consensus:
    """Apply ``change`` to the stored consensus of a result and save it; the saved record."""
    ws.folder.study_or_error(study_id)
    ws.folder.result_or_error(result_id)
    qset = ws.question_set_for(study_id)
    with ws.folder.locked():
        record = ws.load_consensus(study_id, result_id)
        if record is None:
            if unsaved is None:
                raise InputError(
                    f"no consensus record for {study_id} / {result_id}: start one with "
                    f"`robtui consensus start DIR --study {study_id} --result {result_id}`"
                )
            record = unsaved
        changed = change(record, qset)
        ws.folder.save_consensus(changed)
    return changed


def settling(question_id: str, source: str, response: str | None, note: str,
             pair: AssessmentPair | None = None) -> Change:
    """Settle one question: take a side (``a`` / ``b``: ``pair`` is the two assessments the
    lead compared) or give a new answer (``response``), always with a note."""
    return lambda record, qset: core.settle(
        record, qset, question_id, source, response, note, pair=pair
    )


def supporting(key: str, text: str | None, direction: str | None, *,
               set_direction: bool = True) -> Change:
    """The agreed support of a domain judgement (``text``; None: left as it is) and the
    predicted direction of bias of a domain or the overall (None clears it, unless
    ``set_direction`` is False)."""

    def change(record: Consensus, qset: QuestionSet) -> Consensus:
        core.require_draft(record, "its support and direction of bias")
        if text is not None:
            record = core.settle_support(record, qset, key, text)
        if set_direction:
            record = core.settle_direction(record, qset, key, direction)
        return record

    return change


def overriding(key: str, judgement: str | None, reason: str = "") -> Change:
    """Override a recomputed judgement with a reason (``judgement`` None: back to the
    algorithm's proposal)."""

    def change(record: Consensus, qset: QuestionSet) -> Consensus:
        if judgement is None:
            return core.remove_consensus_override(record, qset, key)
        return core.set_consensus_override(record, qset, key, judgement, reason)

    return change


def completing(pair: AssessmentPair | None) -> Change:
    """Mark complete (refused while a question is open); the answers of ``pair`` (the two
    assessments the lead compared) become the ones the consensus is built on."""
    return lambda record, qset: core.complete_consensus(record, qset, pair)


def reopening() -> Change:
    return lambda record, qset: core.reopen_consensus(record)
