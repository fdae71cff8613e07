"""Kinds of sentence never suggested for some questions (sentence_kinds.NOT_EVIDENCE and the cue
lexicon's `never` lists). Invented sentences only."""

from __future__ import annotations

import pytest

from robtui.errors import ModelFileError
from robtui.evidence.cues import load_cues
from robtui.evidence.ranker import suggestible
from robtui.evidence.sentence_kinds import NOT_EVIDENCE, is_analyst_blinding
from robtui.reading.document import Sentence
from robtui.reading.text import document_from_text


def test_an_analysts_blinding_is_told_from_anyone_elses():
    assert is_analyst_blinding(
        "The data were analysed by a statistician who was not aware of the assigned patient group.")
    assert is_analyst_blinding("An independent statistician, blinded to allocation, did the analysis.")
    assert is_analyst_blinding("Data analysts were masked to the treatment arm.")
    assert is_analyst_blinding("An independent data monitoring committee saw unblinded data.")
    assert is_analyst_blinding("The DSMB reviewed the safety data unmasked.")
    # another party named: the sentence may answer a question on awareness
    assert not is_analyst_blinding("Patients and the statistician were blinded to allocation.")
    assert not is_analyst_blinding("Outcome assessors and the data analyst were masked.")
    assert not is_analyst_blinding("The trial statistician generated the allocation sequence.")
    assert not is_analyst_blinding("Participants were unaware of group assignment.")
    assert not is_analyst_blinding("The data monitoring committee met twice a year.")  # no blinding
    assert not is_analyst_blinding("Participants were unblinded after the final visit.")


def test_the_lexicon_excludes_pointers_and_programs_everywhere_and_analysts_for_awareness():
    cues = load_cues()
    for key, entry in cues.items():
        assert {"figure_pointer", "software_statement"} <= set(entry.never), key
        assert set(entry.never) <= set(NOT_EVIDENCE), key
    for key in ("2.1", "2.2", "4.3", "adhering:2.1", "adhering:2.2", "4.3b"):
        assert "analyst_blinding" in cues[key].never, key  # own list or borrowed by same_as
    assert "analyst_blinding" not in cues["1.1"].never


def test_an_unknown_kind_in_the_lexicon_is_refused_with_the_file_named(tmp_path):
    path = tmp_path / "cues.toml"
    path.write_text('never_evidence = ["horoscope"]\n[questions."1.1"]\ncues = ["random"]\n',
                    encoding="utf-8")
    with pytest.raises(ModelFileError, match="horoscope") as error:
        load_cues(path)
    assert str(path) in str(error.value)


def test_suggestible_leaves_out_the_kinds_named_and_only_those():
    texts = ["Analyses were done with Stata 17.",
             "Figure 1 shows the flow of participants.",
             "The statistician was blinded to allocation.",
             "All participants were analysed as randomised."]
    sentences = [Sentence(index=i, start=0, end=len(t), text=t, section="methods", block="body")
                 for i, t in enumerate(texts)]
    assert suggestible(sentences).tolist() == [True, True, True, True]
    assert suggestible(sentences, ("figure_pointer", "software_statement")).tolist() == [
        False, False, True, True]
    assert suggestible(sentences, ("analyst_blinding",)).tolist() == [True, True, False, True]


def test_the_ranker_does_not_suggest_them_yet_the_document_keeps_them(ranker):
    text = ("Statistical analysis was performed using SPSS version 28.\n\n"
            "The data were analysed by a statistician who was unaware of the assigned groups.\n\n"
            "Participants and nurses were blinded to allocation with an identical placebo.\n\n"
            "All randomised participants were analysed in the groups to which they were assigned.")
    doc = document_from_text(text)
    assert len(doc.sentences) == 4
    ranked = ranker.rank(doc, ["2.1", "2.6", "1.1"], top=None)
    assert 1 not in [s.sentence_index for s in ranked["2.1"]]
    assert 0 not in [s.sentence_index for s in ranked["2.6"]]
    assert 1 in [s.sentence_index for s in ranked["1.1"]]  # no question on awareness there
    assert ranked["2.1"][0].sentence_index == 2
    assert "SPSS" in doc.sentences[0].text  # still in the document: searchable and quotable
