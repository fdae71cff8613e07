"""Aligning PDF-read sentences back to the source text, and labelling by the hit rule."""

from robtui.evidence.training.corpus_docs import align_to_source


def test_alignment_ignores_spacing_hyphenation_and_case():
    source = "Methods\nAllocation was concealed\nin sealed envelopes. Follow-up lasted 12 weeks."
    texts = ["Methods", "Allocation was con- cealed in sealed envelopes.",
             "FOLLOW UP lasted 12 weeks.", "Not in the source at all."]
    spans = align_to_source(texts, source)
    assert source[spans[0][0] : spans[0][1]] == "Methods"
    assert source[spans[1][0] : spans[1][1]] == "Allocation was concealed\nin sealed envelopes"
    assert source[spans[2][0] : spans[2][1]] == "Follow-up lasted 12 weeks"
    assert spans[3] is None


def test_alignment_of_a_slightly_changed_long_sentence_uses_both_ends():
    source = ("Participants were assigned by a central web based system that the coordinating "
              "centre ran for every site in the trial.")
    changed = source.replace("web based", "web-based internet")
    (span,) = align_to_source([changed], source)
    assert span == (0, len(source) - 1)  # the final full stop is not a letter or digit
