"""Heading mapping onto the CONSORT 2010 canonical sections, and section tracking."""

from __future__ import annotations

import pytest

from robtui.reading.document import SECTION_LABELS
from robtui.reading.sections import SectionTracker, match_heading, normalise_heading
from robtui.reading.text import document_from_text


@pytest.mark.parametrize(
    ("title", "current", "expected"),
    [
        ("Methods", "introduction", "methods"),
        ("Patients and methods", "introduction", "methods"),
        ("MATERIALS AND METHODS", "introduction", "methods"),
        ("2. Methods", "introduction", "methods"),
        ("Masking", "methods", "methods.blinding"),
        ("Statistical analysis", "methods", "methods.statistical_methods"),
        ("Statistical analyses", "methods", "methods.statistical_methods"),
        ("Statistical Analysis.", "methods", "methods.statistical_methods"),
        ("Randomization", "methods", "methods.randomisation"),
        ("Allocation concealment", "methods", "methods.randomisation.allocation_concealment"),
        ("Sequence generation", "methods", "methods.randomisation.sequence_generation"),
        ("Sample size calculation", "methods", "methods.sample_size"),
        ("Outcomes", "methods", "methods.outcomes"),
        ("Outcomes", "results", "results.outcomes"),
        ("Adverse events", "results", "results.harms"),
        ("Participant flow", "results", "results.participant_flow"),
        ("Baseline characteristics", "results", "results.baseline_data"),
        ("Role of the funding source", "discussion", "funding"),
        ("Trial registration", "discussion", "registration"),
        ("References", "discussion", "references"),
        ("Blinding of outcome assessors", "methods", "methods.blinding"),
        ("New ulcers at week 12", "results", None),
    ],
)
def test_heading_mapping(title: str, current: str, expected: str | None) -> None:
    assert match_heading(title, current) == expected


def test_fuzzy_match_catches_misspelt_headings() -> None:
    # Not in the vocabulary verbatim; rapidfuzz ratio against "statistical methods".
    assert match_heading("Statistcal methods", "methods") == "methods.statistical_methods"
    assert match_heading("Particpants", "methods") == "methods.participants"


def test_every_label_returned_is_canonical() -> None:
    titles = ["Masking", "Trial design", "Interventions", "Harms", "Funding", "Protocol"]
    for where in ("methods", "results", "front"):
        for title in titles:
            label = match_heading(title, where)
            assert label is None or label in SECTION_LABELS


def test_normalise_heading_drops_numbering_and_spelling_variants() -> None:
    assert normalise_heading("2.3 Randomization & Masking:") == "randomisation and masking"


def test_structured_abstract_subheadings_stay_in_the_abstract() -> None:
    tracker = SectionTracker()
    assert tracker.heading("Abstract") == "abstract"
    assert tracker.heading("Methods") == "abstract"
    assert tracker.heading("Results") == "abstract"
    assert tracker.heading("Introduction") == "introduction"
    assert tracker.heading("Methods") == "methods"


def test_abstract_ends_when_a_subheading_repeats() -> None:
    tracker = SectionTracker()
    tracker.heading("Abstract")
    tracker.heading("Background")
    tracker.heading("Methods")
    assert tracker.heading("Background") == "introduction"


@pytest.mark.parametrize("joined", ["Abstract Objectives", "Summary Background",
                                    "Abstract OBJECTIVES:", "Abstract Background"])
def test_abstract_heading_joined_to_its_first_subheading(joined: str) -> None:
    """In a PDF column "Abstract" and "Objectives" on consecutive lines read as one heading;
    the structured abstract must still be recognised (it was lost in 26 of the 32 corpus
    articles rendered as two-column PDFs)."""
    tracker = SectionTracker()
    assert tracker.heading(joined) == "abstract"
    assert tracker.heading("Methods") == "abstract"
    assert tracker.heading("Findings") == "abstract"
    assert tracker.text(120) == "abstract"
    assert tracker.heading("Introduction") == "introduction"
    assert tracker.heading("Methods") == "methods"
    # the subheading that came joined counts as seen: a second one ends the abstract
    again = SectionTracker()
    again.heading(joined)
    again.heading("Methods")
    assert again.in_abstract
    again.heading(joined.split()[1])
    assert not again.in_abstract


def test_journal_abstract_subheadings_keep_the_abstract_together() -> None:
    # a structured abstract in the style of several journals (invented order of subheadings)
    tracker = SectionTracker()
    tracker.heading("Abstract")
    for sub in ("Objective", "Design", "Setting", "Population", "Main outcome measure",
                "Results", "Conclusions"):
        assert tracker.heading(sub) == "abstract", sub
    assert tracker.heading("Introduction") == "introduction"


def test_a_protocol_abstract_keeps_its_methods_design_subheading() -> None:
    tracker = SectionTracker()
    tracker.heading("Abstract")
    tracker.heading("Background")
    assert tracker.heading("Methods/Design") == "abstract"
    assert tracker.heading("Discussion") == "abstract"
    assert tracker.heading("Trial registration") == "abstract"
    assert tracker.heading("Background") == "introduction"
    assert tracker.heading("Methods/Design") == "methods"


def test_a_heading_that_only_starts_with_summary_is_not_an_abstract() -> None:
    tracker = SectionTracker()
    tracker.heading("Methods")
    assert tracker.heading("Summary of the findings") != "abstract"
    assert tracker.heading("Abstract") == "abstract"  # the plain heading still opens it


def test_a_second_study_opens_methods_again_at_a_joined_heading() -> None:
    """An article reporting a feasibility study and then the trial has a second "Methods"
    after the first "Results"; printed on one line with its first subheading ("METHODS
    Recruitment and randomisation") it once read as a results subheading, and the trial's
    methods (blinding, analysis) as results."""
    tracker = SectionTracker()
    for heading in ("Methods", "Statistical analysis", "Results"):
        tracker.heading(heading)
    assert tracker.heading("METHODS Recruitment and randomisation") == "methods.randomisation"
    assert tracker.heading("Statistical analysis") == "methods.statistical_methods"
    assert tracker.heading("Results Participant flow") == "results.participant_flow"
    assert tracker.heading("DISCUSSION Principal findings") == "discussion"


@pytest.mark.parametrize("heading", ["Results of the feasibility study", "Methods used",
                                     "methods in brief"])
def test_headings_that_only_start_with_a_section_name_are_not_joined(heading: str) -> None:
    tracker = SectionTracker()
    tracker.heading("Results")
    tracker.heading("Recruitment")
    assert tracker.heading(heading) == "results"


REPORT = """A fictional trial of something

Abstract
Background: We tested a thing.

Introduction
People suffer. We wanted to know.

Patients and methods
Randomisation and masking. Patients were randomly assigned by a central web system. The list was made by a statistician.
Allocation concealment. Envelopes were opaque and sealed.
Participants and outcome assessors were masked.

Statistical analysis
We used intention to treat.

Results
Of 40 randomised, 38 were analysed.

Funding This study was funded by the Imaginary Trust.
"""


def test_run_in_headings_open_their_section() -> None:
    doc = document_from_text(REPORT)
    by_text = {s.text: s for s in doc.sentences}
    run_in = by_text["Randomisation and masking."]
    assert run_in.block == "heading"
    assert run_in.section == "methods.randomisation"
    assert by_text["Patients were randomly assigned by a central web system."].section == (
        "methods.randomisation"
    )
    assert by_text["Envelopes were opaque and sealed."].section == (
        "methods.randomisation.allocation_concealment"
    )
    assert by_text["We used intention to treat."].section == "methods.statistical_methods"
    assert by_text["Of 40 randomised, 38 were analysed."].section == "results"
    assert by_text["Funding This study was funded by the Imaginary Trust."].section == "funding"


def test_title_and_abstract_sections() -> None:
    doc = document_from_text(REPORT)
    assert doc.sentences[0].text == "A fictional trial of something"
    assert doc.sentences[0].section == "title"
    assert next(s for s in doc.sentences if s.text.startswith("Background:")).section == "abstract"
    assert next(s for s in doc.sentences if s.text == "People suffer.").section == "introduction"


def test_a_structured_abstract_without_its_heading_opens_at_its_first_subheading() -> None:
    tracker = SectionTracker()
    assert tracker.heading("Purpose:") == "abstract"
    for sub in ("Patients and Methods:", "Results:", "Conclusion:"):
        assert tracker.heading(sub) == "abstract"
    assert tracker.heading("Introduction") == "introduction"
    assert tracker.heading("Methods") == "methods"
    # once a section has been seen, the same words are a subheading, not a new abstract
    assert tracker.heading("Objectives") != "abstract"
    # "Background" first on a page opens an introduction, as before
    other = SectionTracker()
    assert other.heading("Background") == "introduction"
