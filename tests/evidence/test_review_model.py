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


def _rank_of(ranking, needle):
    return next(i for i, s in enumerate(ranking) if needle in s.text) + 1


def test_review_model_raises_the_reviewers_kind_of_sentence(ranker):
    doc = document_from_text(DOC)
    before = ranker.rank(doc, ["1.2"], top=None)["1.2"]
    start_rank = _rank_of(before, "zorblat box")
    assert start_rank > 1  # the shipped model alone does not put it first
    score_before = before[start_rank - 1].score
    model = update_review_model(
        None,
        positives=[LearnedExample("1.2", "Allocation used a zorblat box per site.", True),
                   ("1.2", "Tokens were drawn from the zorblat box by the nurse."),
                   ("1.2", "The zorblat box held one token per participant.")],
        negatives=[LearnedExample("1.2", before[0].text, False)],
    )
    after = ranker.rank(doc, ["1.2"], top=None, review_model=model)["1.2"]
    # the dismissed sentence drops out of first place; the unseen zorblat sentence (learned
    # words, not an exact repeat) gains score and comes first
    assert after[0].text != before[0].text
    assert _rank_of(after, "zorblat box") == 1
    assert after[0].score > score_before
    # a question without examples is ranked by the shipped model alone
    assert ranker.rank(doc, ["1.1"], review_model=model) == ranker.rank(doc, ["1.1"])


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
