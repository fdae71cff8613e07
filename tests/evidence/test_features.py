"""Cue lexicon matching, layout and question features."""

import numpy as np

from robtui.evidence.cues import CueEntry, CueMatcher, load_cues, model_key, tokens
from robtui.evidence.features import (
    QUESTION_NAMES,
    SHARED_NAMES,
    _shift,
    _window_max,
    shared_features,
)
from robtui.reading.document import Sentence


def test_cue_lexicon_covers_every_question_of_both_effects():
    from robtui.evidence.ranker import active_questions

    cues = load_cues()
    for effect in ("assignment", "adhering"):
        for qid, _ in active_questions(effect):
            entry = cues[model_key(qid, effect)]
            assert entry.cues and entry.sections, (effect, qid)


def test_model_key_prefixes_domain_two_when_adhering():
    assert model_key("2.3", "adhering") == "adhering:2.3"
    assert model_key("2.3", "assignment") == "2.3"
    assert model_key("3.1", "adhering") == "3.1"


def test_fuzzy_cue_matching_tolerates_spelling_variants():
    matcher = CueMatcher({"1.2": CueEntry("1.2", ("sealed opaque envelopes",), ())})
    sentences = [
        tokens("Allocation used sealed, opaque envelopes."),
        tokens("Allocation used seald opaque envelops."),  # misspelt: fuzzy match
        tokens("Envelopes were sealed."),  # two of three words
        tokens("The weather was fine."),
    ]
    best, full = matcher.key_features(matcher.coverage(sentences), "1.2")
    assert best[0] == 1.0 and full[0] > 0
    assert 0.8 < best[1] < 1.0
    assert abs(best[2] - 2 / 3) < 1e-9
    assert best[3] == 0.0


def test_shared_features_one_hot_section_block_position():
    sentences = [
        Sentence(index=0, start=0, end=7, text="Methods", section="methods", block="heading"),
        Sentence(index=1, start=8, end=40, text="Envelopes were sealed and opaque.",
                 section="methods.randomisation"),
    ]
    X = shared_features(sentences)
    assert X.shape == (2, len(SHARED_NAMES))
    assert X[0, SHARED_NAMES.index("section=methods")] == 1
    assert X[1, SHARED_NAMES.index("section=methods.randomisation")] == 1
    assert X[1, SHARED_NAMES.index("top=methods")] == 1
    assert X[0, SHARED_NAMES.index("block=heading")] == 1
    assert not any(name.startswith(("position", "relative_position")) for name in SHARED_NAMES)
    assert X[0, SHARED_NAMES.index("short_sentence")] == 1.0


def test_a_figures_text_is_scored_as_a_table_cell():
    sentences = [Sentence(index=0, start=0, end=24, text="Randomly assigned (n=240)",
                          section="results", block="figure")]
    X = shared_features(sentences)
    assert X[0, SHARED_NAMES.index("block=table")] == 1
    assert X[0, SHARED_NAMES.index("block=body")] == 0


def test_neighbour_shifts_and_window():
    v = np.array([0.0, 1.0, 0.0, 0.0, 0.5])
    assert _shift(v, 1).tolist() == [0.0, 0.0, 1.0, 0.0, 0.0]  # previous sentence's value
    assert _shift(v, -1).tolist() == [1.0, 0.0, 0.0, 0.5, 0.0]  # next sentence's value
    assert _window_max(v, 2).tolist() == [1.0, 1.0, 1.0, 1.0, 0.5]


def test_question_features_of_a_document(ranker, report_text):
    from robtui.reading.text import document_from_text

    doc = document_from_text(report_text)
    feats = ranker.features(doc)
    blocks = ranker.question_blocks(feats, ["1.2"], ["Was the allocation sequence concealed?"])
    qf = blocks["1.2"]
    assert qf.shape == (len(doc.sentences), len(QUESTION_NAMES))
    envelope = next(i for i, s in enumerate(doc.sentences) if "envelopes" in s.text)
    cue = QUESTION_NAMES.index("cue_best")
    assert qf[envelope, cue] == qf[:, cue].max() > 0.9
    assert qf[envelope + 1, QUESTION_NAMES.index("cue_previous")] == qf[envelope, cue]


def test_registry_identifier_and_after_heading_features():
    from robtui.evidence.features import REGISTRY_ID

    texts = [
        ("Trial registration", "heading"),
        ("The trial was registered (NCT01234567) before enrolment.", "body"),
        ("Registered as ISRCTN12345678 and EudraCT 2011-001234-56.", "body"),
        ("We enrolled 120 participants between 2011 and 2013.", "body"),
    ]
    sentences = [Sentence(index=i, start=0, end=len(t), text=t, section="registration", block=b)
                 for i, (t, b) in enumerate(texts)]
    X = shared_features(sentences)
    assert X[:, SHARED_NAMES.index("registry_id")].tolist() == [0.0, 1.0, 1.0, 0.0]
    assert X[:, SHARED_NAMES.index("after_heading")].tolist() == [0.0, 1.0, 0.0, 0.0]
    # formats as registries print them (from memory); a year or a count is not an identifier
    for text in ("ACTRN12610000123456", "DRKS00012345", "UMIN000012345", "CTRI/2015/03/005678"):
        assert REGISTRY_ID.search(text), text
    for text in ("NCT123", "in 2011-2013", "12345678 participants"):
        assert not REGISTRY_ID.search(text), text


def test_under_heading_carries_the_nearest_heading_above():
    from robtui.evidence.features import under_heading

    values = np.array([0.1, 0.9, 0.2, 0.3, 0.8, 0.4])
    heading = np.array([False, True, False, False, True, False])
    # the heading row itself sees the heading above it, not its own value
    assert under_heading(values, heading).tolist() == [0.0, 0.0, 0.9, 0.9, 0.9, 0.8]
    assert under_heading(np.zeros(0), np.zeros(0, bool)).tolist() == []


def test_digits_fold_before_tfidf():
    from robtui.evidence.features import lexical_text

    assert lexical_text("n = 30 (NCT01234567)") == "n = 00 (NCT00000000)"
    assert lexical_text("no digits") == "no digits"


def test_question_blocks_of_many_keys_equal_each_key_alone(ranker, report_text):
    """The features of all questions are computed together; no question's columns leak into
    another's (each key is recomputed alone and compared)."""
    from robtui.evidence.features import question_features
    from robtui.reading.text import document_from_text

    doc = document_from_text(report_text)
    feats = ranker.features(doc)
    keys = ["1.1", "1.2", "2.1", "4.3", "5.1"]
    texts = [f"wording of {k}" for k in keys]
    together = ranker.question_blocks(feats, keys, texts)
    similarity = feats.word.dot_columns(ranker._question_vectors(texts))
    for j, key in enumerate(keys):
        alone = question_features(feats, key, ranker.cues.get(key), ranker.matcher,
                                  similarity[:, j])
        np.testing.assert_array_equal(together[key], alone)
    # and the questions do differ, so the comparison can tell them apart
    assert not np.array_equal(together["1.2"], together["5.1"])
    sections = QUESTION_NAMES.index("in_expected_section")
    assert together["5.1"][:, sections].tolist() != together["1.2"][:, sections].tolist()


def test_a_randomisation_sub_item_also_counts_as_the_randomisation_section():
    """The corpus never yields the sub-item sections (8a/9/10 headings), so their own columns
    have no weight; they also set their parent's column, which has."""
    rows = [("Allocation was concealed.", "methods.randomisation.allocation_concealment"),
            ("Participants were randomly assigned.", "methods.randomisation"),
            ("Pain was scored 0 to 10.", "methods.outcomes")]
    sentences = [Sentence(index=i, start=0, end=len(t), text=t, section=sec)
                 for i, (t, sec) in enumerate(rows)]
    X = shared_features(sentences)

    def col(name):
        return X[:, SHARED_NAMES.index(name)].tolist()

    assert col("section=methods.randomisation.allocation_concealment") == [1.0, 0.0, 0.0]
    assert col("section=methods.randomisation") == [1.0, 1.0, 0.0]
    assert col("section=methods") == [0.0, 0.0, 0.0]  # only the direct parent
    assert col("section=methods.outcomes") == [0.0, 0.0, 1.0]


def test_caption_title_signal_tells_a_title_from_prose_about_a_table():
    from robtui.evidence.features import SIGNAL_NAMES, signal_features

    texts = {
        "Table 2 Characteristics of the orchard workers at enrolment": 1.0,
        "Figure 1: Flow of the schools through the study": 1.0,
        "Fig. 3 Weekly step counts by arm.": 1.0,
        "Supplementary Table S1. Reasons for leaving the study": 1.0,
        "Table 2 shows the characteristics of the orchard workers.": 0.0,
        "Figure 1 presents the flow of schools through the study.": 0.0,
        "Tables 2 and 3 list the outcomes.": 0.0,
        "Table 2 and Figure 3 give the outcomes by arm.": 0.0,
        "Of 212 workers screened, 180 were randomised (figure 1).": 0.0,
        "The table was set in the canteen.": 0.0,
    }
    sentences = [Sentence(index=i, start=0, end=len(t), text=t) for i, t in enumerate(texts)]
    signals = signal_features(sentences)
    assert signals.shape == (len(texts), len(SIGNAL_NAMES))
    assert signals[:, SIGNAL_NAMES.index("caption_title")].tolist() == list(texts.values())
