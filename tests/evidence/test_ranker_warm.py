"""A ranker that skips filling its per-word caches at load ranks exactly the same."""

from robtui.evidence.ranker import load_ranker
from robtui.paths import bundled_dir
from robtui.reading.reader import read_document


def test_an_unwarmed_ranker_gives_the_same_suggestions(tmp_path, monkeypatch) -> None:
    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(tmp_path))
    document = read_document(bundled_dir("sample_reports") / "birch-knee.txt")
    cold = load_ranker(warm=False)
    assert not cold.weights.char._word_cache  # nothing computed ahead
    warm = load_ranker()
    assert warm.weights.char._word_cache
    got, expected = cold.rank(document, top=None), warm.rank(document, top=None)
    assert got == expected
