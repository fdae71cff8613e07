"""The invented sample reports: present, readable, and saying what each is meant to show."""

from __future__ import annotations

from pathlib import Path

import pytest

from robtui.paths import bundled_dir
from robtui.reading.reader import read_document

SAMPLES = bundled_dir("sample_reports")
SHORT = [
    "alder-migraine",
    "birch-knee",
    "cedar-sleep",
    "dogwood-eczema",
    "elm-copd",
    "fir-handwashing",
    "hazel-cough",
]

# What a reviewer should find in each report, and the section it should be found in.
SIGNALS = {
    "alder-migraine": ("central web-based randomisation service", "methods.randomisation"),
    "birch-knee": ("randomly assigned to the app or the leaflet", "methods.randomisation"),
    "cedar-sleep": ("Participants knew which group they were in", "methods.blinding"),
    "dogwood-eczema": ("participants who completed 16 weeks of treatment", "methods.statistical"),
    "elm-copd": ("primary outcome listed at registration was FEV1", "registration"),
    "fir-handwashing": (
        "cluster randomised trial with schools as clusters",
        "methods.trial_design",
    ),
    "hazel-cough": ("two-period, two-sequence crossover trial", "methods.trial_design"),
}


def test_at_least_six_reports_with_pdf_and_text() -> None:
    names = {p.stem for p in SAMPLES.glob("*.pdf")}
    assert set(SHORT) <= names
    for name in names:
        assert (SAMPLES / f"{name}.txt").is_file()


@pytest.mark.parametrize("name", SHORT)
def test_pdf_and_text_versions_agree(name: str) -> None:
    pdf = read_document(SAMPLES / f"{name}.pdf", use_cache=False)
    txt = read_document(SAMPLES / f"{name}.txt", use_cache=False)
    assert 3 <= pdf.pages <= 6
    txt_sentences = [s.text for s in txt.sentences]
    pdf_sentences = {s.text for s in pdf.sentences}
    same = sum(t in pdf_sentences for t in txt_sentences)
    # A few sentences may differ where a compound word was hyphenated at a line end.
    assert same / len(txt_sentences) >= 0.95
    phrase, section = SIGNALS[name]
    for doc in (pdf, txt):
        hits = [s for s in doc.sentences if phrase in " ".join(s.text.split())]
        assert hits, f"{name}: {phrase!r} not found"
        assert hits[0].section.startswith(section)


def test_each_report_has_a_table_a_caption_and_methods_subsections() -> None:
    for name in SHORT:
        doc = read_document(SAMPLES / f"{name}.txt", use_cache=False)
        kinds = {s.block for s in doc.sentences}
        assert {"table", "caption", "heading", "body"} <= kinds
        sections = {s.section for s in doc.sentences}
        assert {"title", "abstract", "introduction", "results.participant_flow"} <= sections
        assert {"methods.outcomes", "methods.statistical_methods", "discussion"} <= sections
        assert {"registration", "funding", "references"} <= sections


def test_the_long_report_is_about_fifteen_pages() -> None:
    import pdfplumber

    with pdfplumber.open(Path(SAMPLES / "grove-neuropathy.pdf")) as pdf:
        assert 12 <= len(pdf.pages) <= 18


def test_sample_reports_have_no_article_or_word_slips() -> None:
    """Generated text reads as written English: no "the an advice leaflet group", no word
    doubled ("the the"), no paragraph printed twice."""
    import re

    slips = re.compile(r"\b(?:the|a|an) (?:a|an|the)\b|\b([a-z]+) \1\b", re.IGNORECASE)
    for path in sorted(Path(SAMPLES).glob("*.txt")):
        text = path.read_text(encoding="utf-8")
        found = [m.group(0) for m in slips.finditer(text)]
        assert not found, (path.name, found)
        paragraphs = [p for p in text.split("\n\n") if len(p) > 80]
        repeated = sorted({p for p in paragraphs if paragraphs.count(p) > 1})
        assert not repeated, (path.name, repeated[:1])
