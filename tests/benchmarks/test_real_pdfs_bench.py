"""The real-PDF benchmark: its hit rule and normalising (invented strings), and one real article
end to end when ../shared/real-pdfs and poppler's pdftotext are present."""

import shutil

import numpy as np
import pytest

from robtui.benchmarks.real_pdfs import (
    baseline_sentences,
    contains_snippet,
    default_folder,
    first_hit,
    hit_labels,
    load_gold,
    looks_like_table_cell,
    normalise,
    pdftotext,
    recall,
)

FOLDER = default_folder()
needs_real = pytest.mark.skipif(FOLDER is None, reason="../shared/real-pdfs is not present")
needs_poppler = pytest.mark.skipif(shutil.which("pdftotext") is None,
                                   reason="poppler's pdftotext is not installed")


def test_normalise_spells_out_ligatures_quotes_dashes_hyphens_and_space():
    raw = "The e\ufb03cacy of \u2018gel\u2019 \u2013 was partici\u00adpant-\n  based\u00a0and  FAIR"
    assert normalise(raw) == "the efficacy of 'gel' was participantbased and fair"


def test_a_soft_hyphen_ending_a_line_of_the_reference_rejoins_the_word():
    # pdftotext keeps U+00AD where the typesetter broke "imbalance" across two lines
    assert normalise("an imbal\u00ad\nance of flow") == normalise("an imbalance of flow")
    assert normalise("an imbal\u00ad\nance") == "an imbalance"


def test_a_split_word_is_not_the_same_text_as_the_whole_word():
    assert normalise("partici pant") != normalise("participant")


def test_hit_rule_fuzzy_containment_with_a_length_floor():
    snippet = normalise("Allocation was concealed in sealed opaque envelopes")
    longer = normalise("In this invented trial, allocation was concealed in sealed, opaque "
                       "envelopes held by the pharmacy.")
    assert contains_snippet(longer, snippet)
    # a fragment shorter than 0.6 of the snippet is never a hit, however well it matches
    assert not contains_snippet(normalise("sealed opaque envelopes"), snippet)
    # unrelated text is no hit
    assert not contains_snippet(normalise("The gel was well tolerated by most adults in "
                                          "the clinic."), snippet)
    labels = hit_labels([longer, normalise("Nothing here at all, just words.")], [snippet])
    assert labels.tolist() == [True, False]


def test_first_hit_and_recall():
    labels = np.array([False, True, False, True])
    assert first_hit([0, 2, 3, 1], labels) == 3
    assert first_hit([0, 2], labels) is None
    assert recall([1, 3, None, 5], 3) == 0.5


def test_baseline_split_and_table_cell_check():
    text = "Methods were simple. Allo-\ncation was random!\nThen (n = 3) came."
    assert baseline_sentences(text) == ["Methods were simple.", "Allocation was random!",
                                        "Then (n = 3) came."]
    assert looks_like_table_cell("12.3 (4.5) 0.02 17")
    assert not looks_like_table_cell("Outcome assessors were masked to treatment allocation.")
    assert looks_like_table_cell("Total adults 978 494")  # two words: a row label
    assert looks_like_table_cell("Saliva flow rate 0.58 0.19 0.48 0.17 0.14")
    # numbers in a clause are prose that reports them (CONSORT's flow), not a cell
    assert not looks_like_table_cell("Of 4120 adults screened, 1470 (36%) were treated (figure 1).")


@needs_real
@needs_poppler
def test_every_gold_snippet_is_found_in_pdftotexts_reading():
    """The gold was copied from pdftotext: the normaliser and hit rule must find each one there
    (so a miss of robtui's is robtui's, not the scoring's)."""
    gold = load_gold(FOLDER)
    assert len(gold) >= 10
    lost = []
    for name, questions in gold.items():
        text, _ = pdftotext(FOLDER / name)
        sentences = [normalise(s) for s in baseline_sentences(text)]
        for q, items in questions.items():
            for item in items:
                if not hit_labels(sentences, [normalise(item.snippet)]).any():
                    lost.append((name, q, item.snippet))
    assert lost == []


@needs_real
@needs_poppler
def test_bench_runs_on_one_real_article(capsys, tmp_path):
    import json

    from robtui.benchmarks.real_pdfs import main

    out = tmp_path / "figures.json"
    assert main(["--articles", "trials2015_oral", "--no-process", "--misses",
                 "--json", str(out)]) == 0
    printed = capsys.readouterr().out
    assert "Pooled over" in printed and "baseline: pdftotext + TF-IDF" in printed
    figures = json.loads(out.read_text())
    gold = load_gold(FOLDER)["trials2015_oral_malodor_hygiene_rct.pdf"]
    pairs = figures["pairs"]
    assert [p["question"] for p in pairs] == list(gold)
    assert [p["answerable"] for p in pairs] == [bool(v) for v in gold.values()]
    answerable = figures["figures"]["answerable"]
    assert answerable == sum(bool(v) for v in gold.values())
    ranks = [p["rank"] for p in pairs if p["answerable"]]
    assert figures["figures"]["rank"]["recall@3"] == recall(ranks, 3)
    # this article's reference list and tables once reached its top threes (2.2, 3.1, 4.3):
    # references, table cells and fragments are never suggested (ranker.suggestible)
    assert figures["figures"]["top3_reference_pairs"] == 0
    assert figures["figures"]["top3_table_pairs"] == 0
    assert 0.0 < figures["figures"]["per_article"]["trials2015_oral_malodor_hygiene_rct.pdf"][
        "integrity"] <= 1.0


@needs_real
def test_speed_only_times_a_cold_suggest_and_reading_per_page(capsys, tmp_path):
    import json

    from robtui.benchmarks.real_pdfs import bytecode_note, main

    out = tmp_path / "speed.json"
    assert main(["--articles", "trials2015_oral", "--speed-only", "--cold-runs", "1",
                 "--json", str(out)]) == 0
    printed = capsys.readouterr().out
    assert "load average" in printed and "cold `robtui suggest --json`" in printed
    [row] = json.loads(out.read_text())["figures"]["articles"]
    assert row["article"] == "trials2015_oral_malodor_hygiene_rct.pdf" and row["pages"] > 0
    assert 0 < row["slowest_page_s"] <= row["read_s"]
    assert row["suggest_s"] > 0 and row["suggest_cpu_s"] > 0
    # where no bytecode is written, the runs from compiled modules are timed beside
    if bytecode_note() is not None:
        assert row["compiled_suggest_s"] > 0 and row["compiled_suggest_cpu_s"] > 0
        assert "the same from compiled modules" in printed
    else:
        assert row["compiled_suggest_s"] is None and "compiled modules" not in printed


def test_page_profile_prints_the_slowest_page_and_memory_along_the_file(capsys) -> None:
    from robtui.benchmarks.reading import print_page_profile

    print_page_profile("x.pdf", {"pages": 4, "seconds": 1.0, "base_kb": 1024,
                                 "page_seconds": [0.1, 0.5, 0.2, 0.2],
                                 "page_rss_kb": [2048, 2048, 3072, 3072],
                                 "sentences": 10, "text_chars": 100, "pdftotext_seconds": 0.1})
    out = capsys.readouterr().out
    assert "slowest page 2 0.500 s; pages over 0.3 s: 1" in out
    assert "robtui / pdftotext = 10x" in out
    assert "p1 2, p2 2, p3 3, p4 3" in out


def test_a_sentence_interrupted_by_poppler_counts_only_on_the_second_figure() -> None:
    from robtui.benchmarks.real_pdfs import intact_across_interruption, normalise, shingles

    reference = normalise("the women were followed up for twelve weeks page 3 of 12 smith et "
                          "al. trials 2030 after randomisation by the team. other text")
    whole = normalise("The women were followed up for twelve weeks after randomisation by the team.")
    assert whole not in reference
    assert intact_across_interruption(whole, reference)
    # text of ours the reference does not hold (a label glued in) is never forgiven
    glued = normalise("The women were followed up 0 2 4 6 for twelve weeks after randomisation.")
    assert not intact_across_interruption(glued, reference)
    # a float of any length may interrupt, as long as none of our own body text lies in it
    table = normalise("the women were followed up for twelve weeks table 2 outcomes at "
                      + "12.1 (3.4) 11.9 (2.8) " * 40 + "after randomisation by the team.")
    assert intact_across_interruption(whole, table)
    # but prose we read elsewhere never may: that is a sentence joined across to the wrong
    # column or page, however near its pieces lie
    own = shingles([normalise("The nurses visited each of the homes twice a week.")])
    across = normalise("the women were followed up for twelve weeks the nurses visited each of "
                       "the homes twice a week. after randomisation by the team.")
    assert intact_across_interruption(whole, across)
    assert not intact_across_interruption(whole, across, own)


def test_misses_are_listed_by_the_fair_rank_when_the_bench_has_it(capsys):
    """The shipped second stage has seen every article's gold, so --misses lists the misses of
    the leave-one-article-out ranks, with the shipped rank beside them."""
    from robtui.benchmarks.real_pdfs import Pair, print_misses

    def pair(question, rank, loao):
        return Pair(article="invented2030", question=question, answerable=True, rank=rank,
                    spread_rank=rank, no_sections_rank=rank, top_score=0.5, flagged=False,
                    top3_reference=0, top3_table=0, baseline_rank=4, baseline_top=0.1,
                    loao_rank=loao, top_text="A sentence that came first.", snippets=("gold",))

    print_misses([pair("1.1", 1, 3), pair("1.2", 2, 1), pair("1.3", 1, 1)])
    printed = capsys.readouterr().out
    assert "leave one article out" in printed
    assert "invented2030 1.1: rank 3 (as shipped 1)" in printed
    assert "invented2030 1.2" not in printed and "invented2030 1.3" not in printed

    print_misses([pair("2.1", 2, None), pair("2.2", 1, None)])
    printed = capsys.readouterr().out
    assert "as shipped;" in printed
    assert "invented2030 2.1: rank 2," in printed and "invented2030 2.2" not in printed


@needs_real
@needs_poppler
def test_other_layouts_table_reads_more_without_gold(capsys, tmp_path):
    import json

    from robtui.benchmarks.real_pdfs import main

    if not (FOLDER / "more").is_dir():
        pytest.skip("../shared/real-pdfs/more is not present")
    out = tmp_path / "more.json"
    assert main(["--more", "only", "--articles", "medicine2020", "--broken", "5",
                 "--json", str(out)]) == 0
    printed = capsys.readouterr().out
    assert "Other layouts, no gold" in printed and "Pooled over" not in printed
    figures = json.loads(out.read_text())["figures"]["other_layouts"]
    [(name, row)] = figures["per_article"].items()
    assert name.startswith("medicine2020") and row["prose"] > 0
    assert 0.0 < row["integrity"] <= row["integrity_across_interruptions"] <= 1.0
    assert "methods" in row["sections"]


def test_other_layouts_only_without_a_more_folder_says_so(tmp_path):
    from robtui.benchmarks.real_pdfs import main
    from robtui.errors import InputError

    with pytest.raises(InputError, match="more"):
        main(["--folder", str(tmp_path), "--more", "only"])


def test_a_sentence_that_differs_only_in_white_space_is_told_apart() -> None:
    from robtui.benchmarks.real_pdfs import spaced_apart

    reference = normalise("binding with Tyr369 . The dose was 40 mg/m2 ) daily and more")
    sentences = ["binding with Tyr369.", "The dose was 40 mg/m2) daily",
                 "The dose was 45 mg/m2) daily"]
    assert spaced_apart(sentences, reference) == sentences[:2]
