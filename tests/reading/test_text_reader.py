"""Plain text, Markdown and HTML readers: offsets, encodings, bad input."""

from __future__ import annotations

import hashlib

import pytest

from robtui.errors import ReadingError
from robtui.reading.reader import read_document
from robtui.reading.text import document_from_text

TEXT = (
    "Title of an invented trial\n"
    "\n"
    "Methods\n"
    "Sequence generation. A computer made the list (n = 45 per arm, p < 0.001).\n"
    "Allocation was concealed by a central telephone service.\n"
    "\n"
    "Results\n"
    "Participant flow\n"
    "Of 90 randomised, 85 were analysed. Five were lost (Fig. 1).\n"
    "\n"
    "Table 1. Baseline characteristics.\n"
    "Age | 41 | 40\n"
    "Women | 20 | 22\n"
    "\n"
    "References\n"
    "1. Quellmann R, Abeyta S. A survey. Invent Health Rev. 2027;12:44-51.\n"
    "2. Marrow T. Trials in imaginary settings. J Invent Methods. 2026;3:210-218.\n"
)


def test_txt_offsets_are_offsets_into_the_file(tmp_path) -> None:
    path = tmp_path / "report.txt"
    path.write_bytes(TEXT.encode("utf-8"))
    doc = read_document(path)
    content = path.read_text(encoding="utf-8")
    assert doc.text == content
    assert doc.sha256 == hashlib.sha256(path.read_bytes()).hexdigest()
    assert doc.kind == "txt"
    for sentence in doc.sentences:
        assert content[sentence.start : sentence.end] == sentence.text
        assert sentence.page is None and sentence.bbox is None
    texts = [s.text for s in doc.sentences]
    assert "Of 90 randomised, 85 were analysed." in texts
    assert "Five were lost (Fig. 1)." in texts


def test_txt_blocks_and_sections(tmp_path) -> None:
    doc = document_from_text(TEXT)
    by_text = {s.text: s for s in doc.sentences}
    assert by_text["Methods"].block == "heading"
    assert by_text["Allocation was concealed by a central telephone service."].section == (
        "methods.randomisation.sequence_generation"
    )
    assert by_text["Of 90 randomised, 85 were analysed."].section == "results.participant_flow"
    assert by_text["Table 1. Baseline characteristics."].block == "caption"
    assert by_text["Age | 41 | 40"].block == "table"
    refs = [s for s in doc.sentences if s.section == "references" and s.block == "body"]
    assert refs and all(s.text[0].isdigit() for s in refs)


def test_hard_wrapped_paragraphs_are_joined_into_one_block() -> None:
    text = (
        "Methods\n"
        "Patients were randomly assigned with a computer-generated list held by the\n"
        "pharmacy, which dispensed numbered packs. Assessors were masked.\n"
    )
    doc = document_from_text(text)
    texts = [s.text for s in doc.sentences]
    assert texts[1].startswith("Patients were randomly assigned")
    assert texts[1].endswith("numbered packs.")
    assert "\n" in texts[1]  # the file's own characters, line break included
    assert texts[2] == "Assessors were masked."


def test_cp1252_text_is_read_with_a_warning(tmp_path) -> None:
    path = tmp_path / "old.txt"
    path.write_bytes("Méthodes\nThe café trial’s list was hidden. It worked.\n".encode("cp1252"))
    doc = read_document(path)
    assert "café trial’s" in doc.text
    assert any("not UTF-8" in w and "cp1252" in w for w in doc.warnings)


def test_utf8_bom_is_dropped_with_a_warning(tmp_path) -> None:
    path = tmp_path / "bom.txt"
    path.write_bytes(b"\xef\xbb\xbfMethods\nWe randomised people.\n")
    doc = read_document(path)
    assert doc.text.startswith("Methods")
    assert doc.warnings


@pytest.mark.parametrize(
    ("name", "data", "message"),
    [
        ("empty.txt", b"", "empty"),
        ("blank.txt", b"  \n\n ", "empty"),
        ("binary.txt", bytes(range(256)) * 8, "binary"),
        ("nul.txt", b"some text\x00\x00\x00 more", "binary"),
        ("pdf.txt", b"%PDF-1.4 whatever", "PDF"),
        ("report.docx", b"PK\x03\x04", "unsupported"),
    ],
)
def test_bad_text_input_names_file_and_problem(tmp_path, name, data, message) -> None:
    path = tmp_path / name
    path.write_bytes(data)
    with pytest.raises(ReadingError) as caught:
        read_document(path)
    assert str(path) in str(caught.value)
    assert message in str(caught.value)


def test_missing_file_and_folder(tmp_path) -> None:
    with pytest.raises(ReadingError, match="no such file"):
        read_document(tmp_path / "absent.txt")
    folder = tmp_path / "dir.txt"
    folder.mkdir()
    with pytest.raises(ReadingError, match="folder"):
        read_document(folder)


def test_markdown_reader(tmp_path) -> None:
    path = tmp_path / "report.md"
    path.write_text(
        "# An invented trial\n\n## Methods\n\n### Masking\n\nParticipants were **masked** to "
        "[allocation](http://example.invalid). Assessors too.\n\n| Group | n |\n|---|---|\n"
        "| A | 10 |\n\n## Results\n\n- Ten were analysed.\n",
        encoding="utf-8",
    )
    doc = read_document(path)
    by_text = {s.text: s for s in doc.sentences}
    assert doc.kind == "md"
    assert by_text["Participants were masked to allocation."].section == "methods.blinding"
    assert by_text["Group | n"].block == "table"
    assert by_text["Ten were analysed."].section == "results"
    for s in doc.sentences:
        assert doc.text[s.start : s.end] == s.text


def test_html_reader(tmp_path) -> None:
    path = tmp_path / "report.html"
    path.write_text(
        "<html><head><title>x</title><script>var a = 1;</script></head><body>"
        "<h1>An invented trial</h1><h2>Methods</h2><h3>Randomisation</h3>"
        "<p>Allocation used sealed&nbsp;envelopes. They were opaque.</p>"
        "<figure><figcaption>Figure 1. Flow of participants.</figcaption></figure>"
        "<table><tr><th>Group</th><th>n</th></tr><tr><td>A</td><td>10</td></tr></table>"
        "<h2>Discussion</h2><p>It worked.</p></body></html>",
        encoding="utf-8",
    )
    doc = read_document(path)
    by_text = {s.text: s for s in doc.sentences}
    assert "var a" not in doc.text
    assert by_text["Allocation used sealed envelopes."].section == "methods.randomisation"
    assert by_text["Figure 1. Flow of participants."].block == "caption"
    assert by_text["Group | n"].block == "table"
    assert by_text["It worked."].section == "discussion"


def test_byline_and_affiliations_of_a_text_report_are_not_headings() -> None:
    """Between the title and the first section the short capitalised lines are the authors
    and their institutions; the title and the named sections stay headings."""
    text = (
        "Walking groups for low mood: a randomised trial (TEAL)\n\n"
        "Mara Quist, Olu Benedetti-Kaye, Ян Коваль\n\n"
        "Department of Community Health, Saltmarsh University (fictional)\n\n"
        "Abstract\n\n"
        "Background: Walking may lift mood.\n\n"
        "Methods\n\n"
        "Study design\n\n"
        "Participants were randomised by a central web service.\n"
    )
    doc = document_from_text(text)
    kinds = {s.text: s.block for s in doc.sentences}
    assert kinds["Walking groups for low mood: a randomised trial (TEAL)"] == "heading"
    assert kinds["Mara Quist, Olu Benedetti-Kaye, Ян Коваль"] == "body"
    assert kinds["Department of Community Health, Saltmarsh University (fictional)"] == "body"
    assert kinds["Abstract"] == "heading"
    assert kinds["Methods"] == "heading"
    assert kinds["Study design"] == "heading"  # after the first section, headings as before
    sections = {s.text: s.section for s in doc.sentences}
    assert sections["Mara Quist, Olu Benedetti-Kaye, Ян Коваль"] == "front"


def test_a_report_opening_with_a_section_keeps_its_subheadings() -> None:
    doc = document_from_text("Abstract\n\nKey findings\n\nWalking lifted mood a little.\n")
    kinds = {s.text: s.block for s in doc.sentences}
    assert kinds["Abstract"] == "heading" and kinds["Key findings"] == "heading"


@pytest.mark.parametrize("opening", ["Table 1 shows", "Figure 2 presents", "Table 2 and figure 1 give"])
def test_a_paragraph_that_speaks_of_a_table_is_prose_not_its_caption(opening: str) -> None:
    """"Table 1 shows baseline characteristics..." opens a paragraph of results, and was read
    as a caption (kept apart from the prose and weighed as one by the ranker)."""
    text = ("Results\n\n"
            f"{opening} the invented baseline data of both groups. The groups were similar.\n\n"
            "Table 1. Baseline data of the invented groups.\n")
    by_text = {s.text: s for s in document_from_text(text).sentences}
    assert by_text["The groups were similar."].block == "body"
    assert by_text["Table 1. Baseline data of the invented groups."].block == "caption"
