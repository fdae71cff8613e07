"""Calibration rounds: a scripted two-reviewer calibration, kappas checked against scikit-learn.

Reference library: scikit-learn's cohen_kappa_score (Cohen 1960) on the same pairs, and
comparison.review_agreement (the `robtui agreement` figures) for consistency.
"""

import math
import warnings
from datetime import UTC, datetime, timedelta

import pytest
from sklearn.metrics import cohen_kappa_score

from robtui.core.calibration import (
    NOT_ASKED,
    agreement_by_batch,
    assessment_order,
    build_round,
    compare_agreement,
    describe_versions,
    round_agreement,
    rules_versions_used,
)
from robtui.core.comparison import review_agreement
from robtui.core.rules import add_rule, conditions_from_result
from robtui.devtools.calibration_scenario import REVIEWERS, RULE_QUESTION, run_scripted_calibration
from robtui.errors import InputError
from robtui.store.calibration_rounds import (
    load_round,
    next_round_number,
    save_round,
    set_calibration_set,
)
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set()


def sk_kappa(pairs, labels=None):
    a, b = zip(*pairs)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return cohen_kappa_score(a, b, labels=labels)


def same_kappa(ours, pairs):
    ref = sk_kappa(pairs)
    if ours is None:
        assert math.isnan(ref), f"we say undefined, sklearn says {ref}"
    else:
        assert ours == pytest.approx(ref, abs=1e-12)


@pytest.fixture(scope="module")
def calibrated(tmp_path_factory):
    """Round 1, a rule from the discussion, second look, round 2 — all through the store.

    Built once for the module: the tests below only read it (failed writes change nothing).
    """
    return run_scripted_calibration(tmp_path_factory.mktemp("cal") / "review")


def test_scripted_calibration_before_and_after(calibrated):
    folder, book = calibrated
    r1, r2 = load_round(folder.root, 1), load_round(folder.root, 2)
    assert (r1.rules_version, r2.rules_version) == (0, 1) and book.version == 1
    [rule] = book.rules
    assert rule.question_id == RULE_QUESTION and rule.answer == "N"
    assert rule.when == (("outcome_type", "objective"), ("self_reported", "false"))
    # every assessment in a round records the rules version it was made under
    assert {p.a.rules_version for p in r1.pairs} | {p.b.rules_version for p in r1.pairs} == {0}
    assert {p.a.rules_version for p in r2.pairs} | {p.b.rules_version for p in r2.pairs} == {1}
    assert rules_versions_used(r1) == {0: 8} and rules_versions_used(r2) == {1: 8}
    mixed = type(r2)(**{**r2.__dict__, "pairs": (*r1.pairs[:1], *r2.pairs[1:])})
    assert describe_versions(rules_versions_used(mixed)) == "v0 x2, v1 x6"
    # ben never completed S5: listed in both rounds, not dropped
    for r in (r1, r2):
        assert [(m.study_id, m.result_id) for m in r.missing] == [("S5", "mort")]
        assert "ben" in r.missing[0].problem and "draft" in r.missing[0].problem
        assert [p.study_id for p in r.pairs] == ["S1", "S2", "S3", "S4"]
    before, after = round_agreement(r1.pairs, QSET), round_agreement(r2.pairs, QSET)

    # the question the rule is about is the most disputed in round 1, with both sides kept
    top = before.ranked[0]
    assert top.question_id == "4.4" and len(top.cases) == 2
    case = top.cases[0]
    assert (case.study_id, case.response_a, case.response_b) == ("S1", "N", "PY")
    assert case.answer_a.justification.startswith("ana:")
    assert case.answer_b.justification.startswith("ben:")
    # 4.5 was asked of one reviewer only: shown as a disagreement, not in its kappa
    q45 = next(d for d in before.ranked if d.question_id == "4.5")
    assert {(c.response_a, c.response_b) for c in q45.cases} == {(NOT_ASKED, "PN")}

    # after the rule, domain 4 and overall agree fully
    assert after.domains["4"].percent_agreement == pytest.approx(100.0)
    assert after.domains["overall"].kappa == pytest.approx(1.0)
    assert before.domains["4"].kappa < after.domains["4"].kappa
    assert [d.question_id for d in after.ranked] == ["1.2"]  # only the PY/Y difference is left

    # every reported kappa equals scikit-learn's on the same pairs
    for stats in (
        *before.domains.values(),
        *after.domains.values(),
        *before.questions.values(),
        *after.questions.values(),
    ):
        if stats.n:
            same_kappa(stats.kappa, stats.pairs)
    # and the pairs are the ones the reviewers gave (independent of our pairing)
    d4 = [(p.a.final["4"], p.b.final["4"]) for p in r1.pairs]
    assert before.domains["4"].pairs == d4
    assert before.domains["4"].kappa == pytest.approx(sk_kappa(d4))
    # weighted kappa equals scikit-learn's linear weights with the ordered labels
    labels = ["low", "some_concerns", "high"]
    a, b = zip(*d4)
    assert before.domains["4"].weighted_kappa == pytest.approx(
        cohen_kappa_score(a, b, labels=labels, weights="linear")
    )


def test_round_figures_match_the_agreement_command(calibrated):
    folder, _ = calibrated
    r1 = load_round(folder.root, 1)
    ours = round_agreement(r1.pairs, QSET)
    theirs = review_agreement(list(r1.pairs), QSET)
    for key, stats in ours.domains.items():
        assert theirs["domains"][key]["kappa"] == (
            None if stats.kappa is None else round(stats.kappa, 6)
        )
    assert set(theirs["questions"]) == set(ours.questions)
    for key, d in theirs["questions"].items():
        assert d["n"] == ours.questions[key].n


def test_before_after_rows(calibrated):
    folder, _ = calibrated
    before = round_agreement(load_round(folder.root, 1).pairs, QSET)
    after = round_agreement(load_round(folder.root, 2).pairs, QSET)
    rows = {(c.kind, c.key): c for c in compare_agreement(before, after)}
    d4 = rows[("domain", "4")]
    assert d4.before.percent_agreement == pytest.approx(
        50.0
    ) and d4.after.percent_agreement == pytest.approx(100.0)
    assert rows[("question", "4.4")].after.percent_agreement == pytest.approx(100.0)


def test_rounds_are_never_replaced_and_numbers_go_up(calibrated):
    folder, _ = calibrated
    r1 = load_round(folder.root, 1)
    path = folder.root / "calibration" / "round-1.json"
    text = path.read_text()
    with pytest.raises(InputError, match="never replaced"):
        save_round(folder.root, r1)
    assert path.read_text() == text
    assert next_round_number(folder.root) == 3
    with pytest.raises(InputError, match="no calibration round 7"):
        load_round(folder.root, 7)


def test_round_needs_a_set_and_two_reviewers(calibrated):
    folder, _ = calibrated
    found, _ = folder.assessments()
    with pytest.raises(ValueError, match="two different reviewers"):
        build_round(3, folder.review, ("ana", "ana"), found, rules_version=1, created="x")
    with pytest.raises(ValueError, match="no calibration set"):
        build_round(3, folder.review, REVIEWERS, found, rules_version=1, created="x", studies=())
    with pytest.raises(InputError, match="S9"):
        set_calibration_set(folder, ["S1", "S9"])
    assert folder.review.calibration_studies == ["S1", "S2", "S3", "S4", "S5"]


def test_study_nobody_assessed_is_listed(calibrated):
    folder, _ = calibrated
    found, _ = folder.assessments()
    found = [a for a in found if a.study_id != "S2"]
    r = build_round(3, folder.review, REVIEWERS, found, rules_version=1, created="x")
    assert ("S2", None) in [(m.study_id, m.result_id) for m in r.missing]


def test_batches_in_assessment_order_match_sklearn(calibrated):
    folder, _ = calibrated
    pairs = list(load_round(folder.root, 1).pairs)
    # reverse the start times: S4 was taken up first
    start = datetime(2026, 1, 1, tzinfo=UTC)
    shifted = []
    for p in pairs:
        offset = timedelta(days=10 - int(p.study_id[1:]))
        a = p.a.model_copy(update={"created": start + offset})
        b = p.b.model_copy(update={"created": start + offset + timedelta(hours=1)})
        shifted.append(type(p)(p.study_id, p.result_id, p.reviewer_a, p.reviewer_b, a, b))
    assert assessment_order(shifted) == ["S4", "S3", "S2", "S1"]
    batches = agreement_by_batch(shifted, QSET.domain_ids(), 2)
    assert [b.studies for b in batches] == [("S4", "S3"), ("S2", "S1")]
    for batch in batches:
        chosen = [p for p in shifted if p.study_id in batch.studies]
        for key, stats in batch.domains.items():
            pairs_k = [(p.a.final[key], p.b.final[key]) for p in chosen]
            assert stats.pairs == pairs_k
            same_kappa(stats.kappa, pairs_k)
    with pytest.raises(ValueError, match="batch size"):
        agreement_by_batch(shifted, QSET.domain_ids(), 0)


def _adopt_domain(b, a, domain_id, qset):
    """Reviewer B's second look: B takes A's answers for one domain (a scripted discussion)."""
    from robtui.core import assessing

    b = assessing.reopen(b)
    for key in (domain_id, "overall"):
        if key in b.overrides:
            b = assessing.clear_override(b, qset, key)
    domain = assessing.domain_of(b, qset, domain_id)
    for q in reversed(domain.questions):
        if b.answers.get(q.id) and b.answers[q.id].response is not None:
            b = assessing.set_response(b, qset, q.id, None)
    wanted = assessing.effective_answers(a, qset, domain_id)
    for q in domain.questions:
        if q.id in wanted:
            b = assessing.set_response(b, qset, q.id, wanted[q.id])
    return assessing.mark_complete(b, qset)


def test_calibration_on_the_demo_review(tmp_path):
    from robtui.store.demo import DEMO_FILE, build_demo_review, demo_source_dir

    if not (demo_source_dir() / DEMO_FILE).exists():
        pytest.skip("the bundled demo description (sample_reports/demo) is not written yet")
    from robtui.core.rules import stamp_rules_version
    from robtui.store.rules_file import load_folder_rules, save_rulebook

    folder = build_demo_review(tmp_path / "demo")
    reviewers = tuple(folder.review.reviewers[:2])
    set_calibration_set(folder, [s.id for s in folder.review.studies])
    book = load_folder_rules(folder)
    found, _ = folder.assessments()
    r1 = build_round(1, folder.review, reviewers, found, rules_version=0, created="t1")
    before = round_agreement(r1.pairs, QSET)
    assert before.ranked, "the demo's reviewers disagree somewhere"
    top = before.ranked[0]
    qid = top.question_id.split("@")[0]
    result = folder.review.result(top.cases[0].result_id)
    new = add_rule(
        book, qid, "Agreed in calibration.", when=conditions_from_result(result, question_id=qid)
    )
    book = save_rulebook(folder.rules_path, new, expected_version=0, qset=QSET)
    domain_id = top.domain_id
    for case in top.cases:
        a = folder.load_assessment(reviewers[0], case.study_id, case.result_id)
        b = folder.load_assessment(reviewers[1], case.study_id, case.result_id)
        folder.save_assessment(stamp_rules_version(_adopt_domain(b, a, domain_id, QSET), book))
    found, _ = folder.assessments()
    r2 = build_round(2, folder.review, reviewers, found, rules_version=1, created="t2")
    after = round_agreement(r2.pairs, QSET)
    assert top.question_id not in [d.question_id for d in after.ranked]
    assert after.questions[top.question_id].percent_agreement == pytest.approx(100.0)
    for stats in (
        *before.domains.values(),
        *after.domains.values(),
        *before.questions.values(),
        *after.questions.values(),
    ):
        if stats.n:
            same_kappa(stats.kappa, stats.pairs)
