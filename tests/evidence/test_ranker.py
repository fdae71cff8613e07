"""Ranking returns every question, best first, offsets into the text; threshold behaviour."""

import numpy as np
import pytest

from robtui.errors import InputError
from robtui.evidence.ranker import active_questions
from robtui.reading.text import document_from_text


@pytest.mark.parametrize("effect", ["assignment", "adhering"])
def test_every_question_ranked_best_first_offsets_point_at_text(ranker, report_text, effect):
    doc = document_from_text(report_text)
    ranking = ranker.rank(doc, effect=effect, top=3)
    expected = [qid for qid, _ in active_questions(effect)]
    assert list(ranking) == expected
    assert len(expected) >= 21
    for qid, items in ranking.items():
        assert len(items) == 3, qid
        scores = [s.score for s in items]
        assert scores == sorted(scores, reverse=True)
        for s in items:
            assert 0.0 <= s.score <= 1.0
            assert report_text[s.start : s.end] == s.text
            assert s.question_id == qid


def test_the_answering_sentence_comes_first_for_clear_cases(ranker, report_text):
    doc = document_from_text(report_text)
    ranking = ranker.rank(doc, ["1.1", "1.2", "4.3", "5.1"], top=2)
    assert "random number generator" in ranking["1.1"][0].text
    # 1.2 maps to CONSORT items 9 and 10 (concealment, and who generated/enrolled/assigned)
    assert any("sealed, opaque envelopes" in s.text for s in ranking["1.2"])
    assert all(s.section.startswith("methods.randomisation") for s in ranking["1.2"])
    assert "assessors were masked" in ranking["4.3"][0].text
    assert "registered" in ranking["5.1"][0].text


def test_threshold_separates_evidence_from_unrelated_text(ranker, report_text):
    # A report with evidence for allocation concealment scores above the no-evidence threshold;
    # unrelated prose (invented) scores below it, so "no sentence found" can be said.
    doc = document_from_text(report_text)
    best = ranker.rank(doc, ["1.2"], top=1)["1.2"][0]
    assert best.score >= ranker.no_evidence_threshold
    unrelated = document_from_text(
        "The bakery opens at seven.\nBread is baked in a wood oven.\n"
        "Customers may order cakes a week ahead.\nThe shop closes on Sundays.\n"
    )
    top = ranker.rank(unrelated, ["1.2"], top=1)["1.2"][0]
    assert top.score < ranker.no_evidence_threshold
    assert ranker.rank(unrelated, ["1.2"], threshold=ranker.no_evidence_threshold)["1.2"] == []
    kept = ranker.rank(doc, threshold=0.3, top=None)
    assert all(s.score >= 0.3 for items in kept.values() for s in items)


def test_document_without_sentences_gives_empty_rankings(ranker):
    doc = document_from_text("")
    ranking = ranker.rank(doc)
    assert set(ranking) == {q for q, _ in active_questions("assignment")}
    assert all(items == [] for items in ranking.values())


def test_unknown_question_and_bad_top_are_input_errors(ranker, report_text):
    doc = document_from_text(report_text)
    with pytest.raises(InputError, match="9.9"):
        ranker.rank(doc, ["1.1", "9.9"])
    with pytest.raises(InputError, match="2.7"):
        ranker.rank(doc, ["2.7"], effect="adhering")  # 2.7 exists only for assignment
    with pytest.raises(InputError):
        ranker.rank(doc, top=0)


def test_scores_are_platt_calibrated_logits(ranker, report_text):
    # The calibrated score is sigmoid(a*z+b) of the linear score: check against the arrays.
    from robtui.evidence.ranker import sigmoid, suggestible

    doc = document_from_text(report_text)
    feats = ranker.features(doc)
    logits = ranker.logits(feats, ["1.2"], [ranker.weights.question_texts["1.2"]])["1.2"]
    ranking = ranker.rank(doc, ["1.2"], top=None)["1.2"]
    by_index = {s.sentence_index: s.score for s in ranking}
    expected = np.round(sigmoid(logits), 4)
    kept = np.nonzero(suggestible(doc.sentences))[0]  # bare topic headings are left out
    left_out = set(range(len(doc.sentences))) - set(kept.tolist())
    assert left_out and all(doc.sentences[i].block == "heading" for i in left_out)
    assert sorted(by_index) == kept.tolist()
    assert [by_index[i] for i in kept] == expected[kept].tolist()


def test_reading_order_spreads_the_first_places_over_sections():
    from robtui.evidence.ranker import reading_order

    z = np.array([5.0, 4.8, 4.6, 4.0, 1.0, 0.5])
    sections = ["methods", "methods", "methods", "discussion", "results", "methods"]
    # 0 is best; 3 (another section, 1.0 below the best remaining) takes second place; then
    # no unseen section is within 1.5 of the best remaining (4.8 vs results 1.0)
    assert reading_order(z, sections, margin=1.5, slots=5).tolist() == [0, 3, 1, 2, 4, 5]
    # a margin of 0 is the score order; a huge one takes every unseen section first
    assert reading_order(z, sections, margin=0.0).tolist() == [0, 1, 2, 3, 4, 5]
    assert reading_order(z, sections, margin=1e9).tolist()[:3] == [0, 3, 4]
    # only the first `slots` places are spread; the rest follow the score
    assert reading_order(z, sections, margin=1.5, slots=1).tolist() == [0, 1, 2, 3, 4, 5]
    # a permutation, and filtered sentences (-inf) never move up
    z2 = np.array([2.0, -np.inf, 1.9, -np.inf])
    order = reading_order(z2, ["a", "b", "a", "c"], margin=10.0)
    assert sorted(order.tolist()) == [0, 1, 2, 3] and order.tolist()[:2] == [0, 2]
    assert reading_order(np.zeros(0), []).tolist() == []


def test_spread_ranking_keeps_the_best_first_and_respects_the_threshold(ranker, report_text):
    doc = document_from_text(report_text)
    plain = ranker.rank(doc, top=5)
    spread = ranker.rank(doc, top=5, spread=True)
    for qid in plain:
        assert spread[qid][0] == plain[qid][0], qid
        assert len(spread[qid]) == len(plain[qid])
    kept = ranker.rank(doc, threshold=0.3, top=None, spread=True)
    by_score = ranker.rank(doc, threshold=0.3, top=None)
    for qid in kept:
        assert {s.sentence_index for s in kept[qid]} == {s.sentence_index for s in by_score[qid]}


def test_a_heading_shown_does_not_count_as_showing_its_section():
    from robtui.evidence.ranker import reading_order

    z = np.array([5.0, 4.9, 4.5, 4.4])
    sections = ["randomisation", "concealment", "concealment", "interventions"]
    headings = [False, True, False, False]
    # without the heading rule the concealment paragraph loses its place to another section
    assert reading_order(z, sections, margin=1.0).tolist() == [0, 1, 3, 2]
    assert reading_order(z, sections, headings, margin=1.0).tolist() == [0, 1, 2, 3]


def test_evidence_benchmark_refuses_contradictory_speed_flags():
    from robtui.benchmarks.evidence import main as bench
    from robtui.errors import InputError

    with pytest.raises(InputError, match="exclude each other"):
        bench(["--corpus", ".", "--speed-only", "--no-speed"])


def test_bare_topic_headings_are_never_suggested():
    from robtui.evidence.ranker import candidate_order, layout_of, suggestible
    from robtui.reading.document import Sentence

    rows = [
        ("Allocation concealment.", "heading"),   # a topic: left out
        ("Randomisation and masking", "heading"),  # three words: left out
        ("Table 2 Baseline characteristics", "heading"),  # a table title: kept
        ("Figure Trial profile", "heading"),  # a figure title without a number: kept
        ("Registration NCT01234567", "heading"),  # holds a registry number: kept
        ("Outcome assessors and participants were masked to the allocated group", "heading"),
        ("Envelopes were opened by a nurse not involved in recruitment.", "body"),
    ]
    sentences = [Sentence(index=i, start=0, end=len(t), text=t, section="methods", block=b)
                 for i, (t, b) in enumerate(rows)]
    keep = suggestible(sentences)
    assert keep.tolist() == [False, False, True, True, True, True, True]
    z = np.array([9.0, 8.0, 1.0, 0.5, 0.2, 2.0, 3.0])
    for spread in (False, True):
        order = candidate_order(z, keep, *layout_of(sentences), spread=spread)
        assert order.tolist()[:2] == [6, 5] and 0 not in order and 1 not in order
    # a document of nothing but bare headings still gets suggestions
    only = sentences[:2]
    assert suggestible(only).tolist() == [True, True]


def test_the_ranker_leaves_a_topic_heading_out_of_its_suggestions(ranker):
    text = ("Methods\n\nAllocation concealment.\n"
            "Allocation was concealed with sequentially numbered, sealed, opaque envelopes.\n")
    doc = document_from_text(text)
    for spread in (False, True):
        texts = [s.text for s in ranker.rank(doc, ["1.2"], spread=spread)["1.2"]]
        assert texts and texts[0].startswith("Allocation was concealed")
        assert "Allocation concealment." not in texts and "Methods" not in texts


def test_references_table_cells_and_fragments_are_never_suggested():
    from robtui.evidence.ranker import suggestible
    from robtui.reading.document import Sentence

    rows = [  # (text, section, block, suggestible)
        ("Participants were randomly assigned by a central computer.", "methods", "body", True),
        ("Smith A, Jones B. A masked trial of a gel. J Invented Med 2031;12:34-9.",
         "references", "body", False),  # an entry of the reference list
        ("Double-blind trials of invented gels reconsidered.", "references.extra", "body",
         False),  # anything under the reference list
        ("Age, years | 41.2 (9.8) | 40.7 (10.1)", "results", "table", False),  # a table row
        ("Randomly assigned to the walking group (n=120)", "results", "figure",
         False),  # a flowchart's box
        ("protocol", "results", "body", False),  # a fragment of one word
        ("registered on 10 May 2031.", "registration", "body", False),  # two words: a piece
        ("Registry: NCT01234567", "registration", "body", True),  # short, but a registry id
        ("All seven enrolled adults completed.", "results", "body", True),  # short, a statement
        ("are shown in table 1.", "results", "body", False),  # the tail of a cut sentence
        ("were examined weekly by an investigator who was blinded to the group.", "methods",
         "body", True),  # a longer tail still says something
        ("Table 1 Baseline characteristics", "results", "caption", True),  # a caption stays
    ]
    sentences = [Sentence(index=i, start=0, end=len(t), text=t, section=sec, block=b)
                 for i, (t, sec, b, _) in enumerate(rows)]
    assert suggestible(sentences).tolist() == [want for *_, want in rows]


def test_the_ranker_suggests_no_table_cell_or_reference_yet_the_document_keeps_them(ranker):
    rows = [
        ("Participants were randomly assigned by a central computer.", "methods", "body"),
        ("Randomly assigned by computer | 120 | 118", "results", "table"),
        ("Randomly assigned participants in a computer trial, J Invented Med 2031;1:2-3",
         "references", "body"),
    ]
    read = document_from_text("\n\n".join(t for t, _, _ in rows))
    assert len(read.sentences) == len(rows)
    doc = read.model_copy(update={"sentences": [
        s.model_copy(update={"section": sec, "block": b})
        for s, (_, sec, b) in zip(read.sentences, rows)]})
    for spread in (False, True):
        picked = ranker.rank(doc, ["1.1"], top=None, spread=spread)["1.1"]
        assert [s.sentence_index for s in picked] == [0]
    # the cell and the entry stay in the document: searchable and quotable
    assert [s.block for s in doc.sentences] == ["body", "table", "body"]
