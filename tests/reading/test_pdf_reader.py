"""PDF reading of generated two-column PDFs: order, running heads, hyphens, captions, tables."""

from __future__ import annotations

import pdfplumber
import pytest

from robtui.devtools.pdf_writer import PdfBlock, render_blocks_as_pdf, render_text_as_pdf
from robtui.reading.reader import read_document
from robtui.reading.text import document_from_text

HEADER = "Journal of Invented Clinical Trials · test issue"

# Words chosen so that any hyphen at a line end in the PDF is a soft hyphenation by the writer.
PARAGRAPHS = [
    (
        f"Paragraph {i} describes the interventional pharmacotherapeutic considerations of an "
        "invented treatment programme. Participants received counselling and medication, "
        "and investigators documented the characteristics of every participant carefully. "
        "Radiographically confirmed deterioration was uncommon, and supplementary "
        "questionnaires were administered fortnightly."
    )
    for i in range(1, 41)
]


def _blocks() -> list[PdfBlock]:
    blocks = [
        PdfBlock("title", "An invented trial of the Quillfeather method", full_width=True),
        PdfBlock("authors", "Ada Fictional, Bram Imaginary", full_width=True),
        PdfBlock("heading", "Abstract", full_width=True),
        PdfBlock(
            "para",
            "Background: We studied an invented method in a fictional town. Methods: Adults "
            "were randomly assigned by a central computer. Results: Fewer relapses occurred.",
            full_width=True,
        ),
        PdfBlock("heading", "Methods"),
        PdfBlock("heading", "Randomisation"),
    ]
    for i, text in enumerate(PARAGRAPHS):
        blocks.append(PdfBlock("para", text))
        if i == 6:
            blocks.append(PdfBlock("figure"))
            blocks.append(PdfBlock("caption", "Figure 1. Flow of participants through the trial."))
        if i == 10:
            blocks.append(PdfBlock("caption", "Table 1. Baseline characteristics."))
            blocks.append(
                PdfBlock(
                    "table", rows=[["Group", "A", "B"], ["Age", "41", "40"], ["Women", "20", "22"]]
                )
            )
        if i == 12:
            blocks.append(PdfBlock("heading", "Results"))
    return blocks


@pytest.fixture(scope="module")
def sample_pdf(tmp_path_factory):
    path = tmp_path_factory.mktemp("pdf") / "invented.pdf"
    pages = render_blocks_as_pdf(_blocks(), path, header=HEADER)
    assert pages >= 3  # the test needs running heads on several pages
    return path


@pytest.fixture(scope="module")
def document(sample_pdf):
    return read_document(sample_pdf, use_cache=False)


def test_writer_really_hyphenates_and_uses_ligatures(sample_pdf) -> None:
    with pdfplumber.open(sample_pdf) as pdf:
        raw = "\n".join(page.extract_text() or "" for page in pdf.pages)
        chars = {c["text"] for page in pdf.pages for c in page.chars}
    assert any(line.rstrip().endswith("-") for line in raw.splitlines())
    assert "\ufb01" in chars  # "fi" drawn as a ligature glyph
    assert HEADER in raw


def test_body_sentences_come_back_in_order_and_whole(document) -> None:
    expected = []
    for text in PARAGRAPHS:
        expected += [s.text for s in document_from_text(text).sentences]
    body = [s.text for s in document.sentences if s.block == "body" and s.section != "abstract"]
    body = [t for t in body if not t.startswith(("An invented trial", "Ada Fictional"))]
    assert body == expected


def test_running_heads_and_page_numbers_are_removed(document) -> None:
    assert HEADER not in document.text
    assert all(not s.text.strip().isdigit() for s in document.sentences)
    assert document.pages >= 3


def test_line_end_hyphens_are_joined_and_ligatures_spelled_out(document) -> None:
    assert "\ufb01" not in document.text and "\ufb02" not in document.text
    for word in ("pharmacotherapeutic", "Radiographically", "questionnaires", "characteristics"):
        assert document.text.count(word) >= 20


def test_title_and_abstract_run_across_the_page_above_the_columns(document) -> None:
    first = document.sentences[0]
    assert first.text == "An invented trial of the Quillfeather method"
    assert first.section == "title"
    abstract = [s for s in document.sentences if s.section == "abstract" and s.block == "body"]
    assert abstract and all(s.page == 1 for s in abstract)
    width = max(s.bbox[2] - s.bbox[0] for s in abstract)
    assert width > 300  # wider than one column (about 235 pt)
    methods = next(s for s in document.sentences if s.text == "Methods")
    assert methods.bbox[1] > abstract[-1].bbox[3]  # the columns start below the abstract


def test_both_columns_are_used_and_read_left_first(document) -> None:
    page1 = [s for s in document.sentences if s.page == 1 and s.block == "body" and s.bbox]
    lefts = [i for i, s in enumerate(page1) if s.bbox[2] < 300 and s.section != "abstract"]
    rights = [i for i, s in enumerate(page1) if s.bbox[0] > 300]
    assert lefts and rights
    assert max(lefts) < min(rights)


def test_captions_and_tables_are_their_own_blocks(document) -> None:
    captions = [s for s in document.sentences if s.block == "caption"]
    assert [c.text for c in captions] == [
        "Figure 1. Flow of participants through the trial.",
        "Table 1. Baseline characteristics.",
    ]
    for s in document.sentences:
        if s.block == "body":
            assert "Figure 1." not in s.text and "Table 1." not in s.text
    rows = [s.text for s in document.sentences if s.block == "table"]
    assert rows == ["Group | A | B", "Age | 41 | 40", "Women | 20 | 22"]


def test_sections_and_provenance(document) -> None:
    for s in document.sentences:
        assert document.text[s.start : s.end] == s.text
        assert s.page is not None and s.bbox is not None
        x0, top, x1, bottom = s.bbox
        assert 0 <= x0 < x1 <= 596 and 0 <= top < bottom <= 842
    sections = {s.section for s in document.sentences if s.text.startswith("Paragraph 3 ")}
    assert sections == {"methods.randomisation"}
    sections = {s.section for s in document.sentences if s.text.startswith("Paragraph 30 ")}
    assert sections == {"results"}


def test_paragraphs_continue_across_columns_and_pages(document) -> None:
    # Every paragraph's opening sentence is whole, wherever the column or page broke it.
    openings = [s for s in document.sentences if s.text.startswith("Paragraph ")]
    assert len(openings) == len(PARAGRAPHS)
    assert len({s.page for s in openings}) >= 2


def test_render_text_as_pdf_round_trip(tmp_path) -> None:
    text = "An invented title\nAbstract\nWe tested it. It worked.\nMethods\n" + "\n".join(
        PARAGRAPHS[:20]
    )
    path = tmp_path / "plain.pdf"
    render_text_as_pdf(text, path, full_width_lines=3)
    doc = read_document(path, use_cache=False)
    assert doc.kind == "pdf"
    assert [s.text for s in doc.sentences][:5] == [
        "An invented title",
        "Abstract",
        "We tested it.",
        "It worked.",
        "Methods",
    ]


def _line(*words: str):
    from robtui.reading.layout.lines import Line, Word

    boxes = [
        Word(w, (10.0 * i, 0.0, 10.0 * i + 8, 9.0), False, False, 9.0) for i, w in enumerate(words)
    ]
    return Line(boxes, 0.0, 0.0, 10.0 * len(words), 9.0)


@pytest.mark.parametrize(
    ("first", "second", "expected"),
    [
        (("treat-",), ("ment", "works."), "treatment works."),
        (("C-",), ("reactive", "protein."), "C-reactive protein."),
        (("IL-",), ("6", "fell."), "IL-6 fell."),
        (("RAPIDS-",), ("2", "trial."), "RAPIDS-2 trial."),
        (("(-",), ("1.4", "days)."), "(-1.4 days)."),
        (("the",), ("trial.",), "the trial."),
    ],
)
def test_line_joins(first, second, expected) -> None:
    from robtui.reading.pdf import PBlock, TextBuilder

    builder = TextBuilder()
    builder.add(PBlock("body", [_line(*first), _line(*second)], 1), "body")
    assert builder.text == expected
    assert [s.text for s in builder.maker.sentences] == [expected]


def test_compound_seen_before_keeps_its_hyphen() -> None:
    from robtui.reading.pdf import PBlock, TextBuilder

    builder = TextBuilder()
    builder.add(PBlock("body", [_line("A", "double-blind", "trial.")], 1), "body")
    builder.add(PBlock("body", [_line("It", "was", "double-"), _line("blind", "too.")], 1), "body")
    assert builder.text.endswith("It was double-blind too.")


def test_one_column_pages_read_top_to_bottom(tmp_path) -> None:
    blocks = [PdfBlock("title", "A one-column invented report", full_width=True)]
    blocks.append(PdfBlock("heading", "Methods", full_width=True))
    blocks += [PdfBlock("para", text, full_width=True) for text in PARAGRAPHS[:30]]
    path = tmp_path / "one-column.pdf"
    assert render_blocks_as_pdf(blocks, path, header=HEADER) >= 2
    doc = read_document(path, use_cache=False)
    expected = []
    for text in PARAGRAPHS[:30]:
        expected += [s.text for s in document_from_text(text).sentences]
    assert [s.text for s in doc.sentences if s.block == "body"] == expected
    assert HEADER not in doc.text
    assert {s.section for s in doc.sentences if s.block == "body"} == {"methods"}


def test_every_page_is_timed_for_the_benchmarks(sample_pdf) -> None:
    seen: dict[int, float] = {}

    def on_page(number: int, seconds: float) -> None:
        assert seconds >= 0
        seen[number] = seen.get(number, 0.0) + seconds

    document = read_document(sample_pdf, use_cache=False, on_page=on_page)
    assert sorted(seen) == list(range(1, document.pages + 1))
