"""Corpus checks on a few development articles (CONSORT-TM; Kilicoglu et al., J Biomed Inform
2021;116:103717). Skipped without ../shared. Targets are asserted only where they are reliably
met on these articles; the full figures come from `robtui bench reading`."""

from __future__ import annotations

import statistics

import pytest

from robtui.benchmarks.reading import GOLD_METHODS_SUBHEADINGS, label_ok, measure_article
from robtui.evidence.training.corpus import default_corpus_dir, load_corpus

CORPUS = default_corpus_dir()
pytestmark = pytest.mark.skipif(CORPUS is None, reason="shared corpus (../shared/corpus) absent")
FIRST = 4


@pytest.fixture(scope="module")
def figures(tmp_path_factory):
    articles = load_corpus(CORPUS)[:FIRST]
    workdir = tmp_path_factory.mktemp("corpus-pdf")
    return [measure_article(article, workdir) for article in articles]


def test_first_articles_meet_the_pdf_recovery_target(figures) -> None:
    assert statistics.mean(f.recovered for f in figures) >= 0.97


def test_first_articles_meet_the_methods_section_target_on_text(figures) -> None:
    total = sum(f.methods_total for f in figures)
    assert total > 100
    assert sum(f.methods_right_txt for f in figures) / total >= 0.9


def test_first_articles_text_sentence_boundaries(figures) -> None:
    # Measured 0.994 on these four; asserted with a margin below that.
    assert statistics.mean(f.txt_f1 for f in figures) >= 0.97


def test_gold_mapping_check_can_fail() -> None:
    accepted = GOLD_METHODS_SUBHEADINGS["masking"]
    assert label_ok("methods.blinding", accepted)
    assert not label_ok("methods.randomisation", accepted)
    assert label_ok("methods.randomisation.allocation_concealment", ("methods.randomisation",))
    assert not label_ok("results", None)


def test_first_articles_keep_their_abstract_in_a_two_column_pdf(figures) -> None:
    # "Abstract" and "Objectives" on consecutive lines of a column read as one heading; all
    # four of these articles lost their whole abstract to the methods that way before the fix.
    total = sum(f.abstract_total for f in figures)
    assert total > 50
    assert sum(f.abstract_right_pdf_columns for f in figures) / total >= 0.9
    assert sum(f.abstract_right_txt for f in figures) / total >= 0.9
