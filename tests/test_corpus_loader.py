"""The corpus loader reads the shared CONSORT-TM articles (skips when ../shared is absent)."""

import pytest

from robtui.evidence.training.corpus import default_corpus_dir, is_hit, load_corpus, load_mapping

CORPUS = default_corpus_dir()
needs_corpus = pytest.mark.skipif(CORPUS is None, reason="../shared/corpus is not present")


def test_hit_rule_half_of_shorter_span():
    # Rule stated in ../shared/corpus/rob2-consort-map.json
    assert is_hit((0, 10), (5, 100))  # overlap 5 = half of the shorter (10)
    assert not is_hit((0, 10), (6, 100))
    assert not is_hit((0, 0), (0, 10))


@needs_corpus
def test_offsets_point_at_sentence_text():
    articles = load_corpus(CORPUS)
    assert len(articles) >= 30
    for article in articles:
        for s in article.sentences:
            assert article.text[s.start : s.end] == s.text
    mapping = load_mapping(CORPUS)
    assert mapping.questions["1.2"] == ("9", "10")
