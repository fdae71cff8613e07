"""Comparison of two reviewers, agreement over a review, and consensus records."""

from __future__ import annotations

import pytest
from sklearn.metrics import cohen_kappa_score

from robtui.benchmarks.review import FAVOURABLE, answer_everything
from robtui.core import assessing
from robtui.core.algorithm import propose_all
from robtui.core.assessing import path_answers
from robtui.core.comparison import (
    compare_pair,
    differences,
    judgement_rows,
    pair_assessments,
    review_agreement,
)
from robtui.core.consensus import (
    changed_since,
    complete_consensus,
    pending_questions,
    reopen_consensus,
    set_consensus_override,
    settle,
    start_consensus,
)
from robtui.core.model import Quote, ResultSpec, Review, Study
from robtui.errors import InputError
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set()
SHA = "a" * 64
REVIEW = Review(
    title="Invented review of the Larkspur breathing programme",
    reviewers=["ana", "ben"],
    lead="lee",
    studies=[Study(id=f"S{i}", label=f"Study {i}") for i in range(1, 7)],
    results=[ResultSpec(id="pain", outcome="Pain at 6 weeks")],
)
LOW = FAVOURABLE  # answers giving "low" in every domain (effect of assignment)


def make(reviewer, study, answers=None, *, complete=True, note=None):
    chosen = {**LOW, **(answers or {})}
    a = assessing.new_assessment(REVIEW, study, "pain", reviewer, QSET)
    a = answer_everything(a, QSET, lambda q: chosen.get(q.id, q.options[0]))
    if note:
        qid, text = note
        a = assessing.set_justification(a, QSET, qid, text)
        a = assessing.add_quote(
            a, QSET, qid, Quote(document_sha256=SHA, start=5, end=40, page=3, text=text)
        )
    return assessing.mark_complete(a, QSET) if complete else a


def test_all_low_answers_give_low():
    a = make("ana", "S1")
    assert a.final["overall"] == "low"


def test_pairs_list_drafts_and_missing_instead_of_dropping_them():
    a = [make("ana", "S1"), make("ana", "S2"), make("ana", "S3", complete=False)]
    b = [make("ben", "S1"), make("ben", "S3")]
    expected = [(f"S{i}", "pain") for i in range(1, 5)]
    pairs = pair_assessments(a, b, reviewer_a="ana", reviewer_b="ben", expected=expected)
    assert [p.key for p in pairs] == expected
    status = {p.study_id: p.problem for p in pairs}
    assert status["S1"] is None
    assert "ben: no assessment" in status["S2"]
    assert "ana: draft" in status["S3"]
    assert "ana: no assessment" in status["S4"] and "ben: no assessment" in status["S4"]
    with pytest.raises(InputError, match="cannot be compared"):
        differences(pairs[1], QSET)


def test_differences_come_first_with_each_sides_justification_and_quotes():
    a = make("ana", "S1", {"1.2": "Y"}, note=("1.2", "central telephone allocation"))
    b = make("ben", "S1", {"1.2": "NI", "5.2": "PN"}, note=("1.2", "not described"))
    [pair] = pair_assessments([a], [b])
    rows = differences(pair, QSET)
    assert [r.question_id for r in rows[:2]] == ["1.2", "5.2"]
    assert all(r.differs for r in rows[:2]) and not any(r.differs for r in rows[2:])
    first = rows[0]
    assert (first.response_a, first.response_b) == ("Y", "NI")
    assert first.justification_a == "central telephone allocation"
    assert first.quotes_b[0].page == 3 and first.quotes_b[0].text == "not described"
    # every question of the set appears once
    assert sorted(r.question_id for r in rows) == sorted(q.id for q in QSET.questions())


def test_question_asked_of_one_side_only_is_a_difference():
    # 2.3 is asked only when 2.1 or 2.2 is yes-ish; ana says no, ben says yes
    a = make("ana", "S1")
    b = make("ben", "S1", {"2.1": "Y", "2.3": "N"})
    [pair] = pair_assessments([a], [b])
    by_id = {r.question_id: r for r in differences(pair, QSET)}
    assert by_id["2.3"].response_a is None and by_id["2.3"].response_b == "N"
    assert by_id["2.3"].differs


def test_judgement_rows_side_by_side_with_override_reason():
    a = make("ana", "S1", {"1.2": "N"})
    b = assessing.reopen(make("ben", "S1"))
    b = assessing.mark_complete(
        assessing.set_override(b, QSET, "overall", "some_concerns", "small pilot, many gaps"),
        QSET,
    )
    [pair] = pair_assessments([a], [b])
    rows = {r.key: r for r in judgement_rows(pair, QSET)}
    assert list(rows)[-1] == "overall" and len(rows) == 6
    assert (rows["1"].final_a, rows["1"].final_b) == ("high", "low")
    assert rows["1"].differs
    assert rows["overall"].final_b == "some_concerns"
    assert rows["overall"].override_b == "small pilot, many gaps"
    assert compare_pair(pair, QSET).n_differences == 1


def test_review_agreement_shape_and_kappa_equal_scikit_learn():
    variants = [{}, {"1.2": "N"}, {"1.2": "NI", "1.3": "Y"}, {"5.2": "Y"}, {"4.1": "Y"}]
    a = [make("ana", f"S{i + 1}", v) for i, v in enumerate(variants)]
    b_variants = [{}, {"1.2": "N"}, {}, {"5.2": "Y"}, {"1.2": "N"}]
    b = [make("ben", f"S{i + 1}", v) for i, v in enumerate(b_variants)]
    b.append(make("ben", "S6", complete=False))
    pairs = pair_assessments(a, b, reviewer_a="ana", reviewer_b="ben")
    stats = review_agreement(pairs, QSET)
    assert stats["reviewers"] == ["ana", "ben"]
    assert set(stats["domains"]) == {"1", "2", "3", "4", "5", "overall"}
    assert stats["compared"] == 5
    assert stats["not_compared"][0]["study"] == "S6"
    for key in ("1", "overall"):
        s = stats["domains"][key]
        fa = [p.a.final[key] for p in pairs if p.comparable]
        fb = [p.b.final[key] for p in pairs if p.comparable]
        assert s["pairs"] == [list(x) for x in zip(fa, fb)]
        labels = ["low", "some_concerns", "high"]
        # reference: scikit-learn
        assert s["kappa"] == pytest.approx(cohen_kappa_score(fa, fb, labels=labels), abs=1e-6)
        assert s["weighted_kappa"] == pytest.approx(
            cohen_kappa_score(fa, fb, labels=labels, weights="linear"), abs=1e-6
        )
        for field in ("n", "percent_agreement", "kappa_ci", "pabak", "band"):
            assert field in s
    q12 = stats["questions"]["1.2"]
    assert q12["n"] == 5 and q12["percent_agreement"] == pytest.approx(60.0)
    assert list(stats["questions"])[:3] == ["1.1", "1.2", "1.3"]


def test_a_studys_results_count_once_in_the_review_level_agreement():
    # two results per study, answered alike: pooled they would double n and narrow the CI
    review = REVIEW.model_copy(
        update={"results": [*REVIEW.results, ResultSpec(id="func", outcome="Function")]}
    )
    answers = [{}, {"1.2": "N"}, {"1.2": "NI", "1.3": "Y"}, {"5.2": "Y"}]
    mine, theirs = [], []
    for i, v in enumerate(answers):
        for result in ("pain", "func"):
            for who, out in (("ana", mine), ("ben", theirs)):
                chosen = {**LOW, **(v if who == "ana" or i % 2 else {})}
                x = assessing.new_assessment(review, f"S{i + 1}", result, who, QSET)
                x = answer_everything(x, QSET, lambda q, c=chosen: c.get(q.id, q.options[0]))
                out.append(assessing.mark_complete(x, QSET))
    expected = [(f"S{i + 1}", r) for i in range(4) for r in ("pain", "func")]
    pairs = pair_assessments(mine, theirs, reviewer_a="ana", reviewer_b="ben", expected=expected)
    stats = review_agreement(pairs, QSET)
    assert stats["compared"] == 8 and stats["studies"] == 4
    assert stats["analysis"]["unit"] == "study"
    assert "inflate n" in stats["analysis"]["reason"]
    assert stats["analysis"]["results_used"] == {f"S{i + 1}": "pain" for i in range(4)}
    assert stats["domains"]["overall"]["n"] == 4
    assert set(stats["by_result"]) == {"pain", "func"}
    assert stats["by_result"]["func"]["domains"]["overall"]["n"] == 4
    # one result per study: every pair is its own study
    one = review_agreement([p for p in pairs if p.result_id == "pain"], QSET)
    assert one["analysis"]["unit"] == "result" and one["by_result"] == {}


def test_consensus_starts_from_agreed_answers_and_recomputes_by_the_algorithm():
    a = make("ana", "S1", {"1.2": "N"}, note=("1.2", "sealed envelopes, not opaque"))
    b = make("ben", "S1", {"1.2": "PY", "5.2": "PN"})
    [pair] = pair_assessments([a], [b])
    c = start_consensus(pair, "lee", QSET)
    assert c.reviewers == ("ana", "ben") and c.status == "draft"
    assert c.decisions["1.1"].source == "agreed"
    assert set(pending_questions(c, QSET)) == {"1.2", "5.2"}
    assert c.final["1"] == "incomplete"
    with pytest.raises(InputError, match="not finished"):
        complete_consensus(c, QSET)
    with pytest.raises(InputError, match="note"):
        settle(c, QSET, "1.2", "a", pair=pair)
    c = settle(c, QSET, "1.2", "a", note="envelopes could be read against light", pair=pair)
    assert c.answers["1.2"].response == "N"
    assert c.answers["1.2"].justification == "sealed envelopes, not opaque"
    assert c.answers["1.2"].quotes[0].page == 3
    with pytest.raises(InputError, match="one of"):
        settle(c, QSET, "5.2", "new", "maybe", note="x")
    c = settle(c, QSET, "5.2", "new", "N", note="only one scale was planned")
    assert c.decisions["5.2"].source == "new" and c.decisions["5.2"].note
    done = complete_consensus(c, QSET)
    assert done.status == "complete"
    # judgements recomputed by the algorithm from the agreed answers
    expected = propose_all(QSET, "assignment", path_answers(QSET, "assignment", done.answers))
    assert done.final == expected and done.final["1"] == "high"
    with pytest.raises(InputError, match="reopen"):
        settle(done, QSET, "1.1", "b", note="x", pair=pair)


def test_questions_off_the_agreed_path_cannot_be_settled():
    a = make("ana", "S1")
    b = make("ben", "S1", {"2.1": "Y", "2.3": "N"})
    [pair] = pair_assessments([a], [b])
    c = start_consensus(pair, "lee", QSET)
    c = settle(c, QSET, "2.1", "a", note="blinding described", pair=pair)
    assert "2.3" not in pending_questions(c, QSET)
    for source in ("a", "b"):
        with pytest.raises(InputError, match="2.3 is not asked on the agreed path"):
            settle(c, QSET, "2.3", source, note="off the path", pair=pair)
    with pytest.raises(InputError, match="not asked on the agreed path"):
        settle(c, QSET, "2.3", "new", "Y", note="off the path")
    assert complete_consensus(c, QSET).final["2"] == "low"


def test_a_side_never_asked_cannot_be_taken():
    a = make("ana", "S1")  # 2.1 N: 2.3 is not asked of ana
    b = make("ben", "S1", {"2.1": "Y", "2.3": "N"})
    [pair] = pair_assessments([a], [b])
    c = start_consensus(pair, "lee", QSET)
    c = settle(c, QSET, "2.1", "b", note="participants knew", pair=pair)
    assert "2.3" in pending_questions(c, QSET)
    with pytest.raises(InputError, match="ana was never asked 2.3"):
        settle(c, QSET, "2.3", "a", note="take ana", pair=pair)
    c = settle(c, QSET, "2.3", "b", note="no deviations", pair=pair)
    assert c.answers["2.3"].response == "N"


def test_a_new_answer_is_justified_by_the_leads_note_not_a_sides_text():
    a = make("ana", "S1")
    b = make("ben", "S1", {"2.1": "Y", "2.3": "N"})
    a = assessing.mark_complete(
        assessing.set_justification(assessing.reopen(a), QSET, "2.1", "ana's reasons"), QSET
    )
    [pair] = pair_assessments([a], [b])
    c = start_consensus(pair, "lee", QSET)
    c = settle(c, QSET, "2.1", "a", note="take ana", pair=pair)
    assert c.answers["2.1"].justification == "ana's reasons"
    c = settle(c, QSET, "2.1", "new", "PN", note="only the nurses knew")
    assert c.answers["2.1"].justification == "only the nurses knew"
    assert c.answers["2.1"].quotes == []


def test_a_reviewer_changing_an_answer_makes_the_consensus_stale():
    a = make("ana", "S1")
    b = make("ben", "S1", {"2.1": "Y", "2.3": "N"})
    [pair] = pair_assessments([a], [b])
    c = start_consensus(pair, "lee", QSET)
    c = settle(c, QSET, "2.1", "a", note="take ana", pair=pair)
    c = complete_consensus(c, QSET, pair)
    assert changed_since(c, pair, QSET) == []
    b2 = assessing.reopen(b)
    b2 = assessing.mark_complete(assessing.set_response(b2, QSET, "1.1", "N"), QSET)
    [later] = pair_assessments([a], [b2])
    assert changed_since(c, later, QSET) == ["ben: 1.1 Y -> N"]
    # completing again with the pair takes up the reviewers' current answers
    c2 = complete_consensus(reopen_consensus(c), QSET, later)
    assert changed_since(c2, later, QSET) == []


def test_consensus_override_needs_a_reason():
    a, b = make("ana", "S1"), make("ben", "S1")
    [pair] = pair_assessments([a], [b])
    c = start_consensus(pair, "lee", QSET)
    with pytest.raises(InputError, match="reason"):
        set_consensus_override(c, QSET, "overall", "high", "  ")
    c = set_consensus_override(c, QSET, "overall", "some_concerns", "funder ran the analysis")
    assert c.final["overall"] == "some_concerns" and c.proposed["overall"] == "low"


def test_different_effects_are_not_compared():
    a = make("ana", "S1")
    b = assessing.reopen(make("ben", "S1"))
    b = assessing.set_effect(b, QSET, "adhering")
    b = assessing.mark_complete(answer_everything(b, QSET, lambda q: q.options[0]), QSET)
    [pair] = pair_assessments([a], [b])
    assert "effects differ" in pair.problem


def test_support_and_direction_are_compared_and_settled_by_the_lead():
    from robtui.core.consensus import settle_direction, settle_support

    a = make("ana", "S1").model_copy(
        update={"support": {"1": "central allocation"}, "direction": {"1": "towards_null",
                                                                        "overall": "unpredictable"}}
    )
    b = make("ben", "S1").model_copy(
        update={"support": {"1": "web service"}, "direction": {"1": "away_from_null",
                                                                "overall": "unpredictable"}}
    )
    [pair] = pair_assessments([a], [b])
    rows = {r.key: r for r in judgement_rows(pair, QSET)}
    assert rows["1"].direction_differs and not rows["overall"].direction_differs
    assert (rows["1"].support_a, rows["1"].support_b) == ("central allocation", "web service")
    assert not rows["2"].direction_differs  # neither gave one: optional, no difference
    c = start_consensus(pair, "lee", QSET)
    assert c.direction == {"overall": "unpredictable"}  # only what both said alike
    assert c.support == {"1": "ana: central allocation\nben: web service"}
    c = settle_direction(c, QSET, "1", "towards_null")
    c = settle_support(c, QSET, "1", "central web allocation service")
    assert c.direction["1"] == "towards_null" and c.support["1"] == "central web allocation service"
    with pytest.raises(InputError, match="direction must be one of"):
        settle_direction(c, QSET, "1", "sideways")


def test_a_complete_consensus_refuses_every_change_in_the_same_words():
    from robtui.core.consensus import (
        remove_consensus_override,
        settle_direction,
        settle_support,
    )

    a, b = make("ana", "S1"), make("ben", "S1")
    [pair] = pair_assessments([a], [b])
    c = complete_consensus(start_consensus(pair, "lee", QSET), QSET, pair)
    refusals = [
        lambda: set_consensus_override(c, QSET, "overall", "high", "funder ran it"),
        lambda: remove_consensus_override(c, QSET, "overall"),
        lambda: settle_support(c, QSET, "1", "text"),
        lambda: settle_direction(c, QSET, "1", "towards_null"),
        lambda: settle(c, QSET, "1.1", "new", "N", "note"),
    ]
    for change in refusals:
        with pytest.raises(InputError, match=r"S1 / pain is marked complete, .* reopen it first"):
            change()
    reopened = reopen_consensus(c)
    assert set_consensus_override(reopened, QSET, "overall", "high", "x").final["overall"] == "high"
