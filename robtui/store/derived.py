"""One source of truth: judgements in a loaded record are derived from its answers.

A file keeps ``proposed`` and ``final`` for people reading it, but robtui never trusts them:
on every load they are computed again from the answers (and overrides) with the question set.
A stored judgement that disagrees is reported (file, domain, stored vs computed) and the
computed one is what every front end and export sees. An answer code the question does not
offer (``1.1 = NA`` where 1.1 is not asked "if applicable") makes the file unreadable, with
the file and the question named, wherever it is loaded.
"""

from __future__ import annotations

from pathlib import Path

from robtui.core import assessing
from robtui.core.model import OVERALL, Assessment, Consensus
from robtui.core.questions import judgement_label, split_effect_key
from robtui.errors import DataFileError, InputError


def _question_set(folder, path: Path, record):
    """The set the record was made with (the review's own sets first, then the bundled), or
    None when that set's version has changed since (the workspace reports that, with what to
    do: nothing is derived from a set the record was not made with)."""
    from robtui.store.question_sets import review_catalogue

    if folder.set_catalogue is None:
        folder.set_catalogue = review_catalogue(folder.root)
    try:
        qset = folder.set_catalogue.resolve(record.question_set)
    except InputError as error:
        raise DataFileError(f"{path}: question_set: {error}") from None
    return qset if str(qset.version) == str(record.question_set_version) else None


def code_problems(record: Assessment | Consensus, qset) -> list[str]:
    """Answers whose code their question does not offer."""
    problems = []
    for key, answer in record.answers.items():
        if answer.response is None:
            continue
        effect, qid = split_effect_key(key)
        effect = effect or record.effect
        try:
            question = qset.question(qid, effect)
        except InputError:
            continue  # not a question of the set: kept in the file, never used
        if answer.response not in question.options:
            problems.append(
                f"question {key}: answer {answer.response} is not offered (options: "
                f"{', '.join(question.options)})"
            )
    return problems


def _refuse_codes(path: Path, record, qset) -> None:
    bad = code_problems(record, qset)
    if bad:
        raise DataFileError(
            f"{path}: {'; '.join(bad)}: fix the answer in the file (or restore it from git); "
            "the record is not used until then"
        )


def _label(code: str | None) -> str:
    return judgement_label(code) if code else "none"


def _where(key: str) -> str:
    return "overall" if key == OVERALL else f"domain {key}"


def disagreements(path: Path, stored, computed) -> list[str]:
    """Sentences naming each stored judgement that differs from the computed one."""
    problems = []
    for field in ("proposed", "final"):
        before, after = getattr(stored, field), getattr(computed, field)
        for key in sorted(set(before) | set(after)):
            if key in before and before.get(key) != after.get(key):
                problems.append(
                    f"{path}: {_where(key)}: stored {field} judgement "
                    f"{_label(before.get(key))} disagrees with {_label(after.get(key))} computed "
                    "from its answers: the computed one is used and the stored one is never "
                    "shown or exported; saving the record again writes the computed one"
                )
    return problems


def derived_assessment(folder, path: Path, record: Assessment) -> tuple[Assessment, list[str]]:
    """The assessment with judgements recomputed, and the disagreements found."""
    qset = _question_set(folder, path, record)
    if qset is None:
        return record, []
    _refuse_codes(path, record, qset)
    computed = assessing.recompute(record, qset)
    return computed, disagreements(path, record, computed)


def derived_consensus(folder, path: Path, record: Consensus) -> tuple[Consensus, list[str]]:
    """The consensus record with judgements recomputed, and the disagreements found."""
    from robtui.core.consensus import recompute_consensus

    qset = _question_set(folder, path, record)
    if qset is None:
        return record, []
    _refuse_codes(path, record, qset)
    computed = recompute_consensus(record, qset).model_copy(update={"updated": record.updated})
    return computed, disagreements(path, record, computed)
