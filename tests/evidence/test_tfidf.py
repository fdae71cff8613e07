"""The numpy TF-IDF transform equals scikit-learn's TfidfVectorizer on sample text."""

import numpy as np
import pytest

from robtui.evidence.tfidf import TfidfTable, vocabulary_from_bytes, vocabulary_to_bytes

# Invented sentences in the style of trial reports (no corpus text).
SAMPLE = [
    "Participants were randomly assigned (1:1) by a computer-generated list to Velorin or placebo.",
    "Allocation was concealed with sequentially numbered, sealed, opaque envelopes.",
    "Outcome assessors were masked to group; the analysis followed intention-to-treat.",
    "Twelve patients were lost to follow-up — randomized, randomised: café naïve résumé.",
    "The trial was registered at an invented registry (XR-2031-0042).",
    "",
    "a b c",
]
UNSEEN = ["Envelopes were opened by a nurse not involved in recruitment.", "ÉTUDE — double-blind"]


@pytest.mark.parametrize(
    "analyzer, ngrams", [("word", (1, 2)), ("char_wb", (3, 5)), ("word", (1, 1))]
)
def test_transform_equals_sklearn(analyzer, ngrams):
    from sklearn.feature_extraction.text import TfidfVectorizer

    vec = TfidfVectorizer(analyzer=analyzer, ngram_range=ngrams, sublinear_tf=True)
    vec.fit(SAMPLE)
    table = TfidfTable(analyzer, ngrams, dict(vec.vocabulary_), vec.idf_)
    texts = SAMPLE + UNSEEN
    ours = table.transform(texts).to_scipy().toarray()
    theirs = vec.transform(texts).toarray()
    assert ours.shape == theirs.shape
    np.testing.assert_allclose(ours, theirs, atol=1e-12)
    assert ours[:5].sum() > 0  # not an all-zero comparison


def test_vocabulary_round_trip_through_bytes():
    vocab = {"sealed": 0, "opaque envelopes": 1, " ra": 2, "naïve": 3}
    assert vocabulary_from_bytes(vocabulary_to_bytes(vocab)) == vocab


def test_sparse_dot_matches_dense():
    from sklearn.feature_extraction.text import TfidfVectorizer

    vec = TfidfVectorizer(sublinear_tf=True).fit(SAMPLE)
    table = TfidfTable("word", (1, 1), dict(vec.vocabulary_), vec.idf_)
    rows = table.transform(SAMPLE)
    weights = np.random.default_rng(0).normal(size=(3, rows.n_cols))
    np.testing.assert_allclose(rows.dot(weights), rows.to_scipy().toarray() @ weights.T)


def test_dot_columns_in_row_blocks_equals_scipy():
    import numpy as np
    from scipy.sparse import random as sparse_random

    from robtui.evidence.tfidf import SparseRows

    matrix = sparse_random(60, 300, density=0.05, format="lil", random_state=3)
    matrix[4, :] = 0  # an empty row
    matrix = matrix.tocsr()
    rows = SparseRows(matrix.indptr.astype(np.int64), matrix.indices.astype(np.int64),
                      matrix.data, 300)
    columns = np.random.default_rng(3).normal(size=(300, 7)).astype(np.float32)
    for chunk in (1, 5, 64, 10**6):
        np.testing.assert_allclose(rows.dot_columns(columns, chunk=chunk), matrix @ columns,
                                   rtol=1e-5, atol=1e-5)


def test_word_tokens_are_scikit_learns():
    """Our faster token pattern finds exactly what scikit-learn's default pattern finds."""
    import random
    import re

    from sklearn.feature_extraction.text import TfidfVectorizer

    from robtui.evidence.tfidf import WORD_TOKEN

    theirs = re.compile(TfidfVectorizer().token_pattern)
    alphabet = "ab1_ -.,'é\u0301ß中\n(0)·"  # letters, digits, underscore, combining mark, CJK
    rng = random.Random(7)
    texts = SAMPLE + UNSEEN + ["".join(rng.choice(alphabet) for _ in range(rng.randint(0, 40)))
                               for _ in range(2000)]
    found = 0
    for text in texts:
        expected = theirs.findall(text.lower())
        assert WORD_TOKEN.findall(text.lower()) == expected, text
        found += len(expected)
    assert found > 1000  # the comparison saw many tokens
