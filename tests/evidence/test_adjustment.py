"""The second stage (evidence/adjustment.py): its file, its use by the ranker, and its training
(evidence/training/real_gold.py) on invented groups."""

import numpy as np
import pytest

from robtui.errors import ModelFileError
from robtui.evidence.adjustment import (
    BASE_NAMES,
    PER_QUESTION,
    Adjustment,
    design,
    feature_names,
    load_adjustment,
    save_adjustment,
)
from robtui.evidence.training.real_gold import Group, first_rank, fit, loao_scores, recalls
from robtui.reading.text import document_from_text


def test_design_copies_the_question_block_of_its_own_key_only():
    base = np.arange(2 * len(BASE_NAMES), dtype=float).reshape(2, -1)
    row = design(base, "2.6", ["1.1", "2.6"])
    assert row.shape == (2, len(feature_names(["1.1", "2.6"])))
    assert np.array_equal(row[:, : len(BASE_NAMES)], base)
    own = len(BASE_NAMES) + len(PER_QUESTION)
    assert np.array_equal(row[:, own : own + len(PER_QUESTION)],
                          base[:, [BASE_NAMES.index(n) for n in PER_QUESTION]])
    assert not row[:, len(BASE_NAMES) : own].any()  # 1.1's block stays zero
    assert not design(base, "4.1", ["1.1", "2.6"])[:, len(BASE_NAMES):].any()


def test_file_round_trip_and_refusals(tmp_path):
    keys = ["1.1", "2.6"]
    coef = np.linspace(-1, 1, len(feature_names(keys)))
    path = tmp_path / "adjustment.npz"
    save_adjustment(Adjustment(keys, coef, np.array([0.5, -2.0]), 0.07, {"C": 1.0}, ["2.6"]),
                    path)
    back = load_adjustment(path)
    assert back.keys == keys and np.array_equal(back.coef, coef) and back.serves == ["2.6"]
    assert back.threshold == 0.07 and back.provenance["C"] == 1.0
    assert back.domains == ("pdf",) and np.array_equal(back.first_platt, [1.0, 0.0])
    save_adjustment(Adjustment(keys, coef, np.array([0.5, -2.0]), 0.07, domains=("pdf", "html"),
                               first_platt=np.array([0.6, -1.2])), path)
    back = load_adjustment(path)
    assert back.domains == ("pdf", "html") and np.array_equal(back.first_platt, [0.6, -1.2])
    save_adjustment(Adjustment(keys, coef[:-1], np.array([1.0, 0.0]), 0.1), path)
    with pytest.raises(ModelFileError, match="adjustment.npz"):
        load_adjustment(path)
    path.write_bytes(b"not a zip")
    with pytest.raises(ModelFileError, match="unusable"):
        load_adjustment(path)
    with pytest.raises(ModelFileError, match="no such"):
        load_adjustment(tmp_path / "absent.npz")


def _as_pdf(document):
    """The same sentences as if robtui's PDF reader had read them (only the kind differs)."""
    return document.model_copy(update={"kind": "pdf"})


def test_the_second_stage_applies_to_pdfs_only_and_the_threshold_follows(ranker, report_text):
    from robtui.evidence.adjustment import base_features
    from robtui.evidence.ranker import Ranker

    keys = ["1.1", "2.6"]
    coef = np.zeros(len(feature_names(keys)))
    coef[BASE_NAMES.index("model")] = 2.0
    coef[BASE_NAMES.index("cue_best")] = 3.0
    adjusted = Ranker(ranker.weights, ranker.cues,
                      adjustment=Adjustment(keys, coef, np.array([0.5, -1.0]), 0.2))
    first = Ranker(ranker.weights, ranker.cues)
    text = document_from_text(report_text)
    texts = [ranker.weights.question_texts[k] for k in keys]
    on_text = adjusted.features(text)
    on_pdf = adjusted.features(_as_pdf(text))
    assert (on_text.origin, on_pdf.origin) == ("txt", "pdf")
    stage_one = first.first_stage(on_pdf, keys, texts)
    plain = first.logits(on_text, keys, texts)
    # a text report never gets the second stage, nor its cut
    assert all(np.allclose(adjusted.logits(on_text, keys, texts)[k], plain[k]) for k in keys)
    assert adjusted.threshold_for("1.1", origin="txt") == first.threshold_for("1.1", origin="txt")
    assert adjusted.threshold_for("1.1", origin="txt") != 0.2
    # a PDF does
    both = adjusted.logits(on_pdf, keys, texts)
    for key in keys:
        own, transfer, qf = stage_one[key]
        assert np.allclose(plain[key], own)
        expected = 0.5 * (design(base_features(own, transfer, qf, on_pdf.shared,
                                                          on_pdf.signals), key, keys)
                          @ coef) - 1.0
        assert np.allclose(both[key], expected)
    assert adjusted.threshold_for("1.1", origin="pdf") == 0.2
    # the ranking the user sees follows: the same sentences, other scores for a PDF
    assert ([s.score for s in adjusted.rank(text, ["2.6"])["2.6"]]
            == [s.score for s in first.rank(text, ["2.6"])["2.6"]])
    assert ([s.score for s in adjusted.rank(_as_pdf(text), ["2.6"])["2.6"]]
            != [s.score for s in first.rank(text, ["2.6"])["2.6"]])
    # in a PDF, a question it does not serve keeps the first stage's order, recalibrated,
    # and the domain's cut
    narrow = Ranker(ranker.weights, ranker.cues,
                    adjustment=Adjustment(keys, coef, np.array([0.5, -1.0]), 0.2, serves=["2.6"],
                                          first_platt=np.array([0.7, -1.5])))
    assert np.allclose(narrow.logits(on_pdf, keys, texts)["1.1"], 0.7 * plain["1.1"] - 1.5)
    assert np.allclose(narrow.logits(on_pdf, keys, texts)["2.6"], both["2.6"])
    assert np.allclose(narrow.logits(on_text, keys, texts)["1.1"], plain["1.1"])
    assert narrow.threshold_for("1.1", origin="pdf") == 0.2
    # a question the second stage was not fitted on keeps the first stage and its threshold
    for origin in ("txt", "pdf"):
        assert (adjusted.threshold_for("4.1", origin=origin)
                == first.threshold_for("4.1", origin=origin) != 0.2)
    other = ranker.weights.question_texts["4.1"]
    assert np.allclose(adjusted.logits(on_pdf, ["4.1"], [other])["4.1"],
                       first.logits(on_pdf, ["4.1"], [other])["4.1"])
    # a second stage fitted for other kinds leaves PDFs alone
    for_html = Ranker(ranker.weights, ranker.cues,
                      adjustment=Adjustment(keys, coef, np.array([0.5, -1.0]), 0.2,
                                            domains=("html",)))
    assert np.allclose(for_html.logits(on_pdf, keys, texts)["2.6"], plain["2.6"])


def test_a_weights_file_of_the_old_format_is_refused_with_what_to_do(tmp_path):
    """Format 1 had no domains: read as it was, it would rank text reports with the second
    stage again."""
    keys = ["1.1", "2.6"]
    coef = np.linspace(-1, 1, len(feature_names(keys)))
    path = tmp_path / "adjustment.npz"
    def blob(items):
        return np.frombuffer("\n".join(items).encode(), dtype=np.uint8)

    np.savez_compressed(path, format_version=np.array([1]), names=blob(feature_names(keys)),
                        keys=blob(keys), serves=blob(["2.6"]), coef=coef,
                        platt=np.array([1.0, 0.0]), threshold=np.array([0.1]))
    with pytest.raises(ModelFileError, match=r"format 1, this robtui reads 2.*retrain it"):
        load_adjustment(path)


def test_a_weights_file_naming_an_unknown_document_kind_is_refused(tmp_path):
    keys = ["2.6"]
    path = tmp_path / "adjustment.npz"
    save_adjustment(Adjustment(keys, np.zeros(len(feature_names(keys))), np.array([1.0, 0.0]),
                               0.1, domains=("scan",)), path)
    with pytest.raises(ModelFileError, match="scan"):
        load_adjustment(path)


def test_the_shipped_second_stage_applies_to_pdfs_only():
    shipped = load_adjustment()
    assert shipped is not None and shipped.domains == ("pdf",)
    assert shipped.serves and set(shipped.serves) <= set(shipped.keys)
    assert 0.0 < shipped.threshold < 1.0


def test_a_title_signal_reaches_the_second_stage_and_moves_a_title_down(ranker):
    """The second stage reads features.SIGNAL_NAMES, which the first stage has no column for:
    a negative caption_title weight ranks a table title below the prose about the same table."""
    from robtui.evidence.ranker import Ranker

    text = ("Results\n\nTable 1 Baseline characteristics of the orchard workers\n\n"
            "Baseline characteristics of the orchard workers were similar in the two arms.\n")
    doc = _as_pdf(document_from_text(text))  # the second stage applies to PDFs
    keys = ["1.3"]
    texts = [ranker.weights.question_texts["1.3"]]
    title = next(i for i, s in enumerate(doc.sentences) if s.text.startswith("Table 1"))
    feats = ranker.features(doc)
    assert feats.signals[title].tolist() == [1.0]
    assert feats.signals[:, 0].sum() == 1.0
    coef = np.zeros(len(feature_names(keys)))
    coef[BASE_NAMES.index("model")] = 1.0
    plain = Ranker(ranker.weights, ranker.cues,
                   adjustment=Adjustment(keys, coef, np.array([1.0, 0.0]), 0.2))
    coef = coef.copy()
    coef[BASE_NAMES.index("caption_title")] = -5.0
    penalised = Ranker(ranker.weights, ranker.cues,
                       adjustment=Adjustment(keys, coef, np.array([1.0, 0.0]), 0.2))
    before = plain.logits(feats, keys, texts)["1.3"]
    after = penalised.logits(feats, keys, texts)["1.3"]
    assert np.isclose(before[title] - after[title], 5.0)
    others = np.arange(len(before)) != title
    assert np.allclose(before[others], after[others])


def _group(article, key, signal, labels):
    base = np.zeros((len(labels), len(BASE_NAMES)))
    base[:, BASE_NAMES.index("cue_best")] = signal
    base[:, BASE_NAMES.index("model")] = np.linspace(0, 1, len(labels))  # misleading order
    return Group(article, key, base, np.asarray(labels, bool), np.ones(len(labels), bool))


def test_training_learns_a_signal_that_the_first_stage_misses_and_scores_out_of_fold():
    rng = np.random.default_rng(0)
    groups = []
    for a in range(4):
        labels = np.zeros(30, bool)
        labels[rng.integers(0, 10)] = True  # gold early, where the first stage scores low
        signal = rng.random(30) * 0.3 + labels * 0.7
        groups.append(_group(f"art{a}", "2.6", signal, labels))
    coef = fit(groups, ["2.6"], C=1.0)
    assert coef[BASE_NAMES.index("cue_best")] > 0 > coef[BASE_NAMES.index("model")]
    scores = loao_scores(groups, ["2.6"], C=1.0)
    ranks = [first_rank(s, g) for g, s in zip(groups, scores)]
    assert recalls(ranks)[0] == 1.0
    assert [first_rank(g.base[:, 0], g) for g in groups] != [1, 1, 1, 1]


def test_first_rank_counts_only_suggestible_sentences():
    g = Group("a", "1.1", np.zeros((4, len(BASE_NAMES))), np.array([False, False, True, False]),
              np.array([True, False, True, True]))
    assert first_rank(np.array([0.9, 0.95, 0.5, 0.1]), g) == 2
    assert first_rank(np.array([0.9, 0.95, 0.5, 0.1]),
                      Group("a", "1.1", g.base, np.zeros(4, bool), g.keep)) is None


def test_a_pdf_read_by_the_reader_gets_the_second_stage_and_its_cut_in_preparation(
        ranker, report_text, tmp_path, monkeypatch):
    """End to end: the kind comes from the reader, the prepared entry keeps each question's cut."""
    from robtui.devtools.pdf_writer import render_text_as_pdf
    from robtui.evidence.prepared import rank_for_preparation
    from robtui.evidence.ranker import Ranker
    from robtui.reading.reader import read_document

    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(tmp_path / "cache"))
    keys = ["1.1", "2.6"]
    coef = np.zeros(len(feature_names(keys)))
    coef[BASE_NAMES.index("cue_best")] = 3.0
    adjusted = Ranker(ranker.weights, ranker.cues,
                      adjustment=Adjustment(keys, coef, np.array([1.0, -2.0]), 0.2,
                                            serves=["2.6"]))
    first = Ranker(ranker.weights, ranker.cues)
    render_text_as_pdf(report_text, tmp_path / "report.pdf", full_width_lines=1)
    pdf = read_document(tmp_path / "report.pdf")
    text = document_from_text(report_text)
    assert pdf.kind == "pdf" and text.kind == "txt"
    texts = [ranker.weights.question_texts[k] for k in keys]
    feats = adjusted.features(pdf)
    assert not np.allclose(adjusted.logits(feats, keys, texts)["2.6"],
                           first.logits(feats, keys, texts)["2.6"])
    on_pdf = rank_for_preparation(adjusted, pdf, "assignment")
    on_text = rank_for_preparation(adjusted, text, "assignment")
    assert on_pdf.questions["2.6"].threshold == on_pdf.questions["1.1"].threshold == 0.2
    assert on_text.questions["2.6"].threshold == first.threshold_for("2.6", origin="txt") != 0.2
    # a question it was not fitted on keeps the first stage's cut in a PDF too
    assert on_pdf.questions["4.1"].threshold == first.threshold_for("4.1", origin="pdf")


def _calibration_groups(seed=0):
    rng = np.random.default_rng(seed)
    groups, scores = [], []
    for a in range(5):
        for key in ("1.1", "2.6"):
            labels = np.zeros(20, bool)
            if (a, key) != (1, "2.6"):  # one unanswerable pair
                labels[rng.integers(0, 20)] = True
            g = _group(f"art{a}", key, rng.random(20), labels)
            g.base[:, 0] = rng.normal(size=20) + 2 * labels
            groups.append(g)
            scores.append(rng.normal(size=20) + 3 * labels)
    return groups, scores


def test_the_flag_cut_leaves_the_set_share_of_answerable_top_scores_below_it():
    from robtui.evidence.training.real_gold import flag_cut

    tops = [i / 10 for i in range(1, 11)] + [0.01, 0.02]
    present = [True] * 10 + [False, False]
    assert flag_cut(tops, present, share=0.1) == 0.2  # one answerable pair (0.1) below it
    assert flag_cut(tops, present, share=0.0) == 0.1
    assert flag_cut([0.3], [False]) == 0.0  # nothing answerable: never flag


def test_calibration_and_cut_are_refitted_without_the_article_they_judge():
    from robtui.evidence.training.real_gold import nested_flag_check

    groups, scores = _calibration_groups()
    check = nested_flag_check(groups, scores, serves=["2.6"])
    assert len(check.cuts) == 5 and len(check.tops) == len(groups)
    # change everything about article 0: its own cut cannot move, the others' do
    changed = [s * 5 + 4 if g.article == "art0" else s for g, s in zip(groups, scores)]
    for g in groups:
        if g.article == "art0":
            g.base[:, 0] = g.base[:, 0] * 5 + 4
    again = nested_flag_check(groups, changed, serves=["2.6"])
    assert again.cuts[0] == check.cuts[0]
    assert again.cuts[1:] != check.cuts[1:]
    # and each top score is the calibrated best suggestible score, flagged below its cut
    for g, top, flagged in zip(groups, again.tops, again.flagged):
        cut = again.cuts[int(g.article[-1])]
        assert 0.0 <= top <= 1.0 and flagged == (top < cut)
    counts = again.counts(groups, [1] * len(groups))
    assert counts["unanswerable"][1] == 1 and counts["answerable"][1] == 9
