"""The review's own model: learns from quotes and dismissals, blends, saves atomically."""

import json

import pytest

from robtui.errors import DataFileError
from robtui.evidence.review_model import (
    FILE_NAME,
    LearnedExample,
    ReviewModel,
    load_review_model,
    save_review_model,
    update_review_model,
)
from robtui.reading.text import document_from_text

# Invented: a review whose reports name an unusual device ("zorblat token box") for
# concealment, where the shipped model expects envelopes or central systems.
DOC = """Methods
Each participant drew a token from the zorblat box at the front desk.
An earlier trial concealed allocation with sequentially numbered, sealed, opaque envelopes.
The randomisation list was generated and kept by the coordinating centre.
Assignments were concealed until participants had consented.
Participants were enrolled by the ward doctors.
"""


# The next report of the same invented review: a new sentence about the zorblat box.
NEXT = """Methods
A previous trial of our group concealed allocation with sealed, opaque envelopes.
Here each child took one token from the zorblat box kept at reception.
Height was measured with a stadiometer.
"""


def _rank_of(ranking, needle):
    return next(i for i, s in enumerate(ranking) if needle in s.text) + 1


def _assessment_marking(doc, quote_needle, dismiss_needle):
    from robtui.core.model import Answer, Assessment, DismissedSuggestion, Quote

    quote = next(s for s in doc.sentences if quote_needle in s.text)
    dismiss = next(s for s in doc.sentences if dismiss_needle in s.text)
    return Assessment(
        reviewer="ana", study_id="S1", result_id="R1",
        answers={"1.2": Answer(response="Y", quotes=[Quote(
            document_sha256=doc.sha256, start=quote.start, end=quote.end, text=quote.text)])},
        dismissed=[DismissedSuggestion(question_id="1.2", document_sha256=doc.sha256,
                                       start=dismiss.start, end=dismiss.end)],
    )


def test_review_model_learned_on_one_report_helps_on_the_next(ranker):
    from robtui.evidence.review_model import examples_from_assessment

    first, nxt = document_from_text(DOC), document_from_text(NEXT)
    assessment = _assessment_marking(first, "zorblat box", "sealed, opaque envelopes")
    positives, negatives = examples_from_assessment(assessment, {first.sha256: first}, ranker)
    assert [e.text for e in positives] == [s.text for s in first.sentences if "zorblat" in s.text]
    assert negatives[0].text.startswith("An earlier trial") and negatives[0].weight == 1.0
    assert all(e.weight < 1.0 for e in negatives[1:])  # passed over: weak negatives
    assert all(e.offset != 0.0 for e in positives + negatives)  # shipped log-odds as offsets
    model = update_review_model(None, positives, negatives)
    before = ranker.rank(nxt, ["1.2"], top=None)["1.2"]
    after = ranker.rank(nxt, ["1.2"], top=None, review_model=model)["1.2"]
    target_before = next(s for s in before if "zorblat" in s.text)
    target_after = next(s for s in after if "zorblat" in s.text)
    assert target_after.score > target_before.score
    distractor_before = next(s for s in before if "envelopes" in s.text)
    distractor_after = next(s for s in after if "envelopes" in s.text)
    assert distractor_after.score < distractor_before.score  # like what was dismissed
    # a question without examples is ranked by the shipped model alone
    assert ranker.rank(nxt, ["1.1"], review_model=model) == ranker.rank(nxt, ["1.1"])


def test_a_dismissed_sentence_does_not_come_back_first(ranker):
    doc = document_from_text(DOC)
    before = ranker.rank(doc, ["1.2"], top=None)["1.2"]
    model = update_review_model(None, [("1.2", "Tokens came from a zorblat box.")],
                                [LearnedExample("1.2", before[0].text, False)])
    after = ranker.rank(doc, ["1.2"], top=None, review_model=model)["1.2"]
    assert after[0].text != before[0].text
    assert _rank_of(after, before[0].text) > 1


def test_latest_label_wins_and_untrained_keys_add_nothing():
    model = update_review_model(None, [("1.1", "alpha beta")], [("1.1", "gamma delta")])
    model = update_review_model(model, [], [("1.1", "alpha beta")])
    assert [e.positive for e in model.examples if e.text == "alpha beta"] == [False]
    assert model.logit("4.3", ["alpha beta"]).tolist() == [0.0]


def test_save_and_load_round_trip(tmp_path):
    model = update_review_model(ReviewModel(), [("1.2", "sealed pouch")], [("1.2", "the weather")])
    path = save_review_model(model, tmp_path / "learned")
    assert path.name == FILE_NAME
    loaded = load_review_model(tmp_path / "learned")
    assert loaded.examples == model.examples
    assert loaded.logit("1.2", ["sealed pouch"])[0] == pytest.approx(
        model.logit("1.2", ["sealed pouch"])[0], abs=1e-4)
    assert loaded.logit("1.2", ["sealed pouch"])[0] > 0 > loaded.logit("1.2", ["the weather"])[0]


def test_missing_file_is_an_empty_model_and_a_damaged_one_is_reported_not_replaced(tmp_path):
    assert load_review_model(tmp_path).examples == []
    bad = tmp_path / FILE_NAME
    bad.write_text("{not json", encoding="utf-8")
    with pytest.raises(DataFileError, match=FILE_NAME):
        load_review_model(tmp_path)
    assert bad.read_text(encoding="utf-8") == "{not json"
    bad.write_text(json.dumps({"schema_version": 99}), encoding="utf-8")
    with pytest.raises(DataFileError, match="schema_version"):
        load_review_model(tmp_path)


def test_learn_from_assessment_saves_and_reloads(tmp_path, ranker):
    from robtui.evidence.review_model import learn_from_assessment

    doc = document_from_text(DOC)
    assessment = _assessment_marking(doc, "zorblat box", "sealed, opaque envelopes")
    learned = tmp_path / "learned"
    model = learn_from_assessment(learned, assessment, {doc.sha256: doc}, ranker)
    reloaded = load_review_model(learned)
    assert reloaded.examples == model.examples and reloaded.count("1.2") >= 2
    again = learn_from_assessment(learned, assessment, {doc.sha256: doc}, ranker)
    assert len(again.examples) == len(model.examples)  # the same marks are not counted twice


def test_blend_weight_grows_with_the_questions_marks_and_ignores_weak_negatives():
    from robtui.evidence.review_model import BLEND, BLEND_HALF

    few = update_review_model(None, [("1.2", "zorblat box")], [("1.2", "weather mild")])
    more = update_review_model(
        few, [("1.2", f"zorblat token {i}") for i in range(8)],
        [("1.2", f"height measured {i}") for i in range(8)],
    )
    weak = update_review_model(
        few, [], [LearnedExample("1.2", f"passed over {i}", False, 0.3) for i in range(30)]
    )
    assert few.blend("1.2") == pytest.approx(BLEND * 2 / (2 + BLEND_HALF))
    assert few.blend("1.2") < more.blend("1.2") < BLEND
    assert weak.blend("1.2") == few.blend("1.2")  # passed-over sentences do not count
    assert few.blend("2.1") == 0.0
