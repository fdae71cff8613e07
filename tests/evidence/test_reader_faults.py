"""Training for a faulty reader: documents without sections, abstract rows the corpus leaves
unannotated, pointers taught below the prose (invented text only)."""

import numpy as np

from robtui.evidence.sentence_kinds import is_pointer, is_software_statement
from robtui.evidence.training.reader_faults import faulty_documents, without_sections
from robtui.evidence.training.train import Settings, labelled_rows, training_labels
from robtui.reading.text import document_from_text

TEXT = """Abstract
Methods Adults were randomly assigned to an invented gel or placebo.
Methods
Randomisation
A statistician generated the allocation sequence with a computer.
Statistical analysis
Analysis was by intention to treat.
"""


def test_without_sections_reads_like_a_reader_that_found_no_structure():
    doc = document_from_text(TEXT)
    assert {s.section for s in doc.sentences} - {"other"}  # the reader found sections
    assert any(s.block == "heading" for s in doc.sentences)
    bare = without_sections(doc)
    assert [s.text for s in bare.sentences] == [s.text for s in doc.sentences]
    assert {s.section for s in bare.sentences} == {"other"}
    assert all(s.block != "heading" for s in bare.sentences)
    assert {s.section for s in doc.sentences} - {"other"}  # the original is left as it was


def test_faulty_documents_drop_a_seeded_share():
    docs = [document_from_text(TEXT) for _ in range(40)]
    assert faulty_documents(docs, 0.0, 1) == docs
    first = faulty_documents(docs, 0.25, 1)
    again = faulty_documents(docs, 0.25, 1)
    dropped = [all(s.section == "other" for s in d.sentences) for d in first]
    assert dropped == [all(s.section == "other" for s in d.sentences) for d in again]
    assert 3 <= sum(dropped) <= 18  # about a quarter of 40
    assert all(faulty_documents(docs, 1.0, 1)[i].sentences[0].section == "other" for i in range(40))


def test_abstract_rows_left_out_only_where_the_labels_are_absent_there():
    abstract = np.array([True] * 10 + [False] * 90)
    y = np.zeros(100, int)
    y[[20, 40, 60]] = 1  # evidence annotated in the body only
    off = Settings()
    on = Settings(abstract_unlabelled=True)
    assert labelled_rows(y, abstract, off) is None
    rows = labelled_rows(y, abstract, on)
    assert rows is not None and rows.tolist() == (~abstract).tolist()
    y[[1, 2]] = 1  # annotated in abstracts as often as elsewhere: keep them
    assert labelled_rows(y, abstract, on) is None
    assert labelled_rows(y, np.zeros(100, bool), on) is None


def test_a_pointer_is_taught_below_its_articles_prose_and_kept_where_it_is_alone():
    # rows 0-4: article 0 (a figure title and a sentence pointing to it, both annotated, prose
    # with the numbers, a table title); rows 5-6: article 1, whose only annotated sentence is
    # its figure title
    texts = ["Figure 1 Flow of participants", "Figure 1 shows the flow of participants.",
             "Of 120 randomised, 112 were analysed.", "Figure 2 Outcome over time",
             "Table 1 Baseline characteristics", "Figure 1 Trial profile", "Adults were enrolled."]
    pointer = np.array([is_pointer(t) for t in texts])
    assert pointer.tolist() == [True, True, False, True, False, True, False]
    groups = np.array([0, 0, 0, 0, 0, 1, 1])
    y = np.array([1, 1, 1, 0, 1, 1, 0])
    below = training_labels(y, pointer, groups, Settings())
    assert below.tolist() == [0, 0, 1, 0, 1, 1, 0]
    assert y.tolist() == [1, 1, 1, 0, 1, 1, 0]  # the corpus labels themselves are untouched
    assert training_labels(y, pointer, groups, Settings(pointers="labelled")).tolist() == y.tolist()


def test_a_pointer_opens_with_a_figure_reference_and_reports_no_number_itself():
    assert is_pointer("Fig. 2: Patient disposition.")
    assert is_pointer("Supplementary figure S1 shows the flow of participants.")
    assert not is_pointer("Table 1 Baseline characteristics")  # a table's rows are quotable
    assert not is_pointer("Figure 1 shows the trial profile; 529 patients entered the trial.")
    assert not is_pointer("Baseline characteristics were similar (table 1).")
    assert not is_pointer("Figures were drawn by the trial statistician.")


def test_a_software_statement_names_the_program_and_nothing_of_the_analysis():
    assert is_software_statement("Analyses were done with Stata 10.1.")
    assert is_software_statement(
        "Statistical analysis was performed using the Statistical Package for Social Science "
        "(SPSS 16.0).")
    assert not is_software_statement(
        "Efficacy analyses were performed on all treated patients using SAS software.")
    assert not is_software_statement(
        "We used the intention to treat principle and undertook analyses with SAS.")
    assert not is_software_statement("Analysis was by intention to treat.")  # no program named
    assert not is_software_statement("The sas of the sail was measured.")  # acronyms in capitals
