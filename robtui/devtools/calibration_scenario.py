"""A scripted two-reviewer calibration on an invented review (for tests, docs and benchmarks).

The scenario is our own: trials of the fictional "Corvane" breathing programme, reviewers
"ana" and "ben", lead "lea". In round 1 the reviewers disagree on 4.4 (could knowing the
intervention have influenced counting deaths?) and on 1.2; the lead writes a rule for 4.4
for objective outcomes; after a second look they agree in round 2.
"""

from __future__ import annotations

from collections.abc import Mapping
from datetime import UTC, datetime, timedelta
from pathlib import Path

from robtui.core import assessing
from robtui.core.model import Assessment, ResultSpec
from robtui.store.question_sets import review_question_set

REVIEWERS = ("ana", "ben")
LEAD = "lea"
CALIBRATION_STUDIES = ("S1", "S2", "S3", "S4", "S5")

# A path through every domain that the algorithm judges Low.
LOW_PATH: dict[str, str] = {
    "1.1": "Y", "1.2": "Y", "1.3": "N",
    "2.1": "N", "2.2": "N", "2.6": "Y",
    "3.1": "Y",
    "4.1": "N", "4.2": "N", "4.3": "Y", "4.4": "N",
    "5.1": "Y", "5.2": "N", "5.3": "N",
}  # fmt: skip

# Round 1 departures from LOW_PATH, per reviewer and study.
ROUND_1: dict[str, dict[str, dict[str, str]]] = {
    "ana": {
        "S3": {"4.4": "PY", "4.5": "PN"},
        "S4": {"4.1": "Y", "1.2": "NI"},
    },
    "ben": {
        "S1": {"4.4": "PY", "4.5": "PN"},
        "S2": {"4.4": "PY", "4.5": "PN", "1.2": "PY"},
        "S3": {"4.4": "PY", "4.5": "PN"},
        "S4": {"4.1": "Y"},
    },
}
# After the rule on 4.4: both answer N for the objective outcome where 4.4 is asked.
ROUND_2: dict[str, dict[str, dict[str, str]]] = {
    "ana": {"S4": {"4.1": "Y", "1.2": "NI"}},
    "ben": {"S2": {"1.2": "PY"}, "S4": {"4.1": "Y", "1.2": "NI"}},
}
RULE_QUESTION = "4.4"
RULE_TEXT = (
    "Deaths from any cause are counted from registry records; knowing the allocation cannot "
    "change the count: answer N."
)
START = datetime(2026, 3, 2, 9, 0, tzinfo=UTC)


def build_calibration_review(root: Path):
    """A review folder with five studies, one objective result, calibration set S1..S5."""
    from robtui.store.calibration_rounds import set_calibration_set
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.create(
        root, "Corvane breathing programme for chronic cough", lead=LEAD, reviewers=REVIEWERS
    )
    for i, study_id in enumerate(CALIBRATION_STUDIES, start=1):
        report = root.parent / f"{root.name}-{study_id}.txt"
        report.write_text(f"Corvane trial {i}. Participants were randomised.\n", encoding="utf-8")
        folder.add_study(study_id, f"Corvane trial {i}", [report])
    folder.add_result(
        ResultSpec(
            id="mort",
            outcome="All-cause mortality",
            time_point="12 months",
            outcome_type="objective",
            self_reported=False,
        )
    )
    set_calibration_set(folder, CALIBRATION_STUDIES)
    return folder


def scripted_assessment(
    folder,
    reviewer: str,
    study_id: str,
    departures: Mapping[str, str],
    *,
    minutes: int,
    complete: bool = True,
) -> Assessment:
    """Answer every asked question from LOW_PATH with ``departures``, justify, mark complete."""
    qset = review_question_set(folder)
    wanted = {**LOW_PATH, **departures}
    a = assessing.new_assessment(folder.review, study_id, "mort", reviewer, qset)
    a = a.model_copy(update={"created": START + timedelta(minutes=minutes)})
    for question in qset.questions(a.effect):
        asked = {q.id for q in assessing.asked_questions(a, qset, question.domain)}
        if question.id in asked and question.id in wanted:
            a = assessing.set_response(a, qset, question.id, wanted[question.id])
            a = assessing.set_justification(
                a, qset, question.id, f"{reviewer}: {question.short} -> {wanted[question.id]}"
            )
    if complete:
        a = assessing.mark_complete(a, qset)
    return a


def assess_round(
    folder, plan: Mapping[str, Mapping[str, Mapping[str, str]]], *, round_no: int, rulebook
) -> list[Assessment]:
    """Both reviewers assess S1..S5 and save (stamped with the rules version); ben leaves S5
    as a draft (never completed)."""
    from robtui.core.rules import stamp_rules_version

    qset = review_question_set(folder)

    saved = []
    for r_index, reviewer in enumerate(REVIEWERS):
        for s_index, study_id in enumerate(CALIBRATION_STUDIES):
            draft = reviewer == "ben" and study_id == "S5"
            a = scripted_assessment(
                folder,
                reviewer,
                study_id,
                plan.get(reviewer, {}).get(study_id, {}),
                minutes=1000 * round_no + 10 * s_index + r_index,
                complete=not draft,
            )
            if draft:
                a = assessing.recompute(
                    a.model_copy(update={"answers": dict(list(a.answers.items())[:3])}), qset
                )
            old = folder.load_assessment(reviewer, study_id, "mort")
            if old is not None:
                a = a.model_copy(update={"created": old.created})
            a = stamp_rules_version(a, rulebook)
            folder.save_assessment(a)
            saved.append(a)
    return saved


def run_scripted_calibration(root: Path):
    """The whole scenario through the store: round 1, the rule on 4.4, second look, round 2.

    Returns the ReviewFolder and the rule book as saved (version 1).
    """
    from robtui.core.calibration import build_round
    from robtui.core.rules import add_rule, conditions_from_result
    from robtui.store.calibration_rounds import save_round
    from robtui.store.question_sets import review_question_set
    from robtui.store.rules_file import load_folder_rules, save_rulebook

    folder = build_calibration_review(root)
    book = load_folder_rules(folder)
    for number, plan in ((1, ROUND_1), (2, ROUND_2)):
        if number == 2:
            result = folder.review.result("mort")
            changed = add_rule(
                book,
                RULE_QUESTION,
                RULE_TEXT,
                when=conditions_from_result(result),
                answer="N",
                note="calibration round 1",
            )
            book = save_rulebook(
                folder.rules_path,
                changed,
                expected_version=book.version,
                qset=review_question_set(folder),
            )
        assess_round(folder, plan, round_no=number, rulebook=book)
        found, _ = folder.assessments()
        created = (START + timedelta(days=number)).isoformat().replace("+00:00", "Z")
        save_round(
            folder.root,
            build_round(
                number, folder.review, REVIEWERS, found, rules_version=book.version, created=created
            ),
        )
    return folder, book
