"""Carrying a record to a later version of its question set (pure).

A question set's version goes up when its wording or rules change. A record made with an
earlier version is not used as it is (its judgements came from the old rules), and it is
never thrown away either: :func:`carry_forward` keeps every answer whose question key the
current version has, moves the answers to questions it no longer has into the record's
``set_upgrades`` entry (kept, never used), recomputes every judgement from the answers with
the current rules, and lists what changed. Overrides and their reasons stay; where the
proposal under an override changed, the override is listed for the reviewer to confirm and a
complete record goes back to draft (marking it complete asks for that confirmation).

Earlier versions' question lists are not kept anywhere, so an answer is matched to a current
question by its key alone, and "unanswered" lists every question now asked on the record's
answer path that has no answer (new questions cannot be told apart from ones left open).
"""

from __future__ import annotations

from robtui.core import assessing
from robtui.core.consensus import pending_questions, recompute_consensus
from robtui.core.model import OVERALL, Assessment, Consensus, JudgementChange, SetUpgrade
from robtui.core.questions import QuestionSet, judgement_label, split_effect_key
from robtui.core.review_sets import is_earlier_version
from robtui.errors import InputError


def carry_problem(record: Assessment | Consensus, qset: QuestionSet) -> str | None:
    """Why ``record`` cannot be carried to ``qset``'s version, or None when it can (it names
    ``qset`` and an earlier version of it). A record already at the version is not carried."""
    made = str(record.question_set_version)
    if record.question_set != qset.id:
        return (
            f"it was made with question set {record.question_set}, and its study now uses "
            f"{qset.id}: only a record of the same set is carried to a later version (restore "
            "the study's design, or assess the result again with the new set)"
        )
    if made == str(qset.version):
        return f"it is already at {qset.id} version {qset.version}"
    if not is_earlier_version(made, qset.version):
        return (
            f"its version {made} of {qset.id} is unknown here (the set in use is version "
            f"{qset.version}; a record is carried only from an earlier whole-numbered "
            "version): it may come from a newer robtui or another copy of the set; open it "
            "with that robtui or restore that set file"
        )
    return None


def carry_forward(
    record: Assessment | Consensus, qset: QuestionSet
) -> tuple[Assessment | Consensus, SetUpgrade]:
    """``record`` carried to ``qset``'s version, and what the carry did (also appended to
    the record's ``set_upgrades``). InputError when :func:`carry_problem` finds a reason."""
    problem = carry_problem(record, qset)
    if problem is not None:
        raise InputError(f"cannot carry the record forward: {problem}")
    kept = {k: a for k, a in record.answers.items() if _asks(qset, k, record.effect)}
    retired = {k: a for k, a in record.answers.items() if k not in kept}
    update: dict = {"answers": kept, "question_set_version": str(qset.version)}
    retired_decisions = {}
    if isinstance(record, Consensus):
        retired_decisions = {
            k: d for k, d in record.decisions.items() if not _asks(qset, k, record.effect)
        }
        update["decisions"] = {
            k: d for k, d in record.decisions.items() if k not in retired_decisions
        }
    elif record.last_question is not None and not _asks(qset, record.last_question, record.effect):
        update["last_question"] = None
    moved = record.model_copy(update=update, deep=True)
    if isinstance(moved, Consensus):
        carried = recompute_consensus(moved, qset)
        unanswered = pending_questions(carried, qset)
    else:
        carried = assessing.recompute(moved, qset)
        unanswered = [
            q.id
            for d in qset.domain_ids()
            for q in assessing.asked_questions(carried, qset, d)
            if q.id not in assessing.effective_answers(carried, qset, d)
        ]
    changed = {
        key: JudgementChange(before=record.proposed.get(key), after=after)
        for key, after in carried.proposed.items()
        if record.proposed.get(key) != after
    }
    to_confirm = [k for k in carried.overrides if k in changed]
    note = SetUpgrade(
        from_version=str(record.question_set_version),
        to_version=str(qset.version),
        retired_answers=retired,
        retired_decisions=retired_decisions,
        unanswered=unanswered,
        changed=changed,
        to_confirm=to_confirm,
    )
    status = "draft" if to_confirm else carried.status
    carried = carried.model_copy(
        update={"set_upgrades": [*record.set_upgrades, note], "status": status}, deep=True
    )
    return carried, note


def _asks(qset: QuestionSet, key: str, effect: str) -> bool:
    """True when ``key`` (a question id, or ``effect:id``) names a question of ``qset`` under
    the record's ``effect`` (or the effect the key names)."""
    named, question_id = split_effect_key(key)
    try:
        qset.question(question_id, named or effect)
    except InputError:
        return False
    return True


def describe_upgrade(note: SetUpgrade, status_before: str) -> list[str]:
    """Lines saying what a carry kept aside, left open and changed."""
    lines = [f"version {note.from_version} -> {note.to_version}"]
    if note.retired_answers:
        answers = ", ".join(
            f"{k} = {a.response or 'no answer'}" for k, a in note.retired_answers.items()
        )
        lines.append(
            f"answers to questions version {note.to_version} does not have (kept in the "
            f"record under set_upgrades, not used): {answers}"
        )
    if note.retired_decisions:
        lines.append(
            "consensus decisions on those questions (kept likewise): "
            + ", ".join(note.retired_decisions)
        )
    if note.unanswered:
        lines.append("questions now asked that have no answer: " + ", ".join(note.unanswered))
    for key, change in note.changed.items():
        where = "overall" if key == OVERALL else f"domain {key}"
        lines.append(
            f"{where}: proposed judgement {_label(change.before)} -> {_label(change.after)}"
        )
    for key in note.to_confirm:
        where = "overall" if key == OVERALL else f"domain {key}"
        lines.append(
            f"{where}: the override is kept with its reason; its proposal changed, so confirm "
            "it again (or clear it)"
        )
    if note.to_confirm and status_before == "complete":
        lines.append("status complete -> draft until the override is confirmed")
    if len(lines) == 1:
        lines.append("every answer kept; no judgement changes")
    return lines


def _label(code: str | None) -> str:
    return judgement_label(code) if code else "none (domain not in that version)"
