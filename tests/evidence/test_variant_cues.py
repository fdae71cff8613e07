"""Suggestions for the questions of the cluster-randomised and crossover sets.

The new questions have no training data: each has cues in robtui/evidence/cues.toml (transfer
model) or borrows a trained question's model with `same_as`. The sample report
sample_reports/fir-handwashing (an invented cluster trial) states when pupils joined and how
many clusters gave data, and sample_reports/hazel-cough (an invented crossover trial) how many
were randomised to each sequence, how period was analysed and how long the washout was; those
sentences should come first for the new questions.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from robtui.evidence.cues import load_cues
from robtui.reading.reader import read_document
from robtui.store.question_sets import available_question_sets, builtin_question_set

SAMPLES = Path(__file__).resolve().parents[2] / "sample_reports"


@pytest.mark.parametrize("set_id", available_question_sets())
def test_every_question_of_every_bundled_set_has_a_model_or_cues(ranker, set_id):
    cues = load_cues()
    qset = builtin_question_set(set_id)
    for effect in qset.effects():
        for q in qset.questions(effect):
            key = qset.question_key(q.id, effect)
            entry = cues.get(key)
            assert ranker.is_trained(q.id, effect) or (entry and entry.cues), (set_id, key)


def test_borrowed_models_are_for_questions_that_ask_the_same():
    cues = load_cues()
    cluster = builtin_question_set("rob2-cluster")
    parallel = builtin_question_set("rob2-parallel")
    for qid, base in (("2.1b", "2.1"), ("3.1b", "3.1"), ("4.3b", "4.3")):
        assert cues[qid].same_as == base
        # same wording (2.1b, 4.3b) or the same question narrowed to participants in clusters
        assert cluster.question(qid).text.split()[:4] == parallel.question(base).text.split()[:4]


@pytest.fixture(scope="module")
def fir_ranking():
    from robtui.evidence.ranker import load_ranker

    document = read_document(SAMPLES / "fir-handwashing.txt")
    ranking = load_ranker().rank(
        document, ["1b.1", "1b.2", "3.1a"], question_set=builtin_question_set("rob2-cluster"),
        top=3,
    )
    return {qid: [s.text for s in items] for qid, items in ranking.items()}


def test_recruitment_after_allocation_is_suggested_first(fir_ranking):
    assert "after the allocation of their school was known" in fir_ranking["1b.1"][0]
    assert any("learned of their school's allocation" in t for t in fir_ranking["1b.2"])


def test_data_from_every_cluster_is_suggested(fir_ranking):
    assert fir_ranking["3.1a"][0] == "All 24 schools provided register data."


@pytest.mark.parametrize("name", ["hazel-cough.txt", "hazel-cough.pdf"])
def test_crossover_questions_find_sequences_period_and_washout(name):
    from robtui.evidence.ranker import load_ranker

    document = read_document(SAMPLES / name)
    ranking = load_ranker().rank(
        document, ["S.1", "S.2", "S.3"], question_set=builtin_question_set("rob2-crossover"),
        top=1,
    )
    first = {qid: " ".join(items[0].text.split()) for qid, items in ranking.items()}
    assert first["S.1"].startswith("Thirty-four participants were randomised to Nocturnel first")
    assert "fixed effects for treatment, period and sequence" in first["S.2"]
    assert "separated by a washout period of 7 days" in first["S.3"]
