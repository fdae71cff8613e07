"""Readers guarded at their entry points: size, encryption, encodings, who is to blame."""

from __future__ import annotations

import pytest

from robtui.errors import ReaderBugError, ReadingError
from robtui.reading import reader
from robtui.reading.reader import read_document

TEXT = "Participants were randomised by a computer list.\nAllocation was concealed.\n"


@pytest.mark.parametrize("codec", ["utf-16", "utf-16-le", "utf-16-be", "utf-32", "utf-32-le",
                                   "utf-32-be", "utf-8-sig"])  # fmt: skip
def test_unicode_text_files_are_read_with_or_without_a_byte_order_mark(tmp_path, codec):
    path = tmp_path / "report.txt"
    path.write_bytes(TEXT.encode(codec))
    document = read_document(path, use_cache=False)
    assert document.text.replace("\r", "") == TEXT
    assert document.sentences[0].text.startswith("Participants were randomised")


def test_binary_data_is_still_refused(tmp_path):
    path = tmp_path / "report.txt"
    path.write_bytes(bytes(range(256)) * 40)
    with pytest.raises(ReadingError, match="binary data"):
        read_document(path, use_cache=False)


def test_a_file_above_the_stated_size_is_refused_before_it_is_read(tmp_path, monkeypatch):
    monkeypatch.setattr(reader, "MAX_TEXT_BYTES", 1000)
    path = tmp_path / "big.txt"
    path.write_text(TEXT * 100, encoding="utf-8")
    with pytest.raises(ReadingError, match=r"more than robtui reads for a txt file"):
        read_document(path, use_cache=False)


def test_a_password_protected_pdf_is_named_as_such(tmp_path):
    pytest.importorskip("reportlab")
    from reportlab.lib import pdfencrypt
    from reportlab.pdfgen import canvas

    path = tmp_path / "locked.pdf"
    pdf = canvas.Canvas(str(path), encrypt=pdfencrypt.StandardEncryption("secret"))
    pdf.drawString(72, 720, "Participants were randomised by a computer list.")
    pdf.save()
    with pytest.raises(ReadingError, match="password protected") as caught:
        read_document(path, use_cache=False)
    assert "download it again" not in str(caught.value)


def test_a_bug_in_robtuis_pdf_code_is_reported_as_a_bug_not_a_damaged_file(tmp_path, monkeypatch):
    from robtui.devtools.pdf_writer import render_text_as_pdf
    from robtui.reading import pdf
    from robtui.reading.normalise import normalise_chars

    path = tmp_path / "fine.pdf"
    render_text_as_pdf(TEXT, path)
    monkeypatch.setattr(pdf, "analyse_page", lambda *a, **k: normalise_chars(None))
    with pytest.raises(ReaderBugError, match="bug in robtui itself") as caught:
        read_document(path, use_cache=False)
    assert "robtui/reading/normalise.py" in str(caught.value)
    assert path.read_bytes().startswith(b"%PDF"), "the file is kept"


def test_markdown_with_a_long_line_of_unclosed_marks_reads(tmp_path):
    path = tmp_path / "report.md"
    path.write_text("Participants were randomised.\n\n" + "*a " * 4000 + "\n", encoding="utf-8")
    document = read_document(path, use_cache=False)
    assert document.sentences[0].text == "Participants were randomised."


def _registry_record(outcomes: int) -> str:
    lines = "".join(f"Outcome number {i}; Time frame: week {i}\n" for i in range(outcomes))
    return (
        "<Trials_downloaded_from_ICTRP><Trial><Main><TrialID>RIT-2030-00001</TrialID>"
        "<Date_registration>2030-02-11</Date_registration>"
        "<Primary_outcome>Pain; Time frame: week 12</Primary_outcome>"
        f"<Secondary_outcome>{lines}</Secondary_outcome></Main></Trial>"
        "</Trials_downloaded_from_ICTRP>"
    )


@pytest.mark.parametrize(
    ("suffix", "content"),
    [
        (".txt", TEXT * 200),
        (".md", ("## Methods\n\n" + TEXT + "\n") * 200),
        (".html", "<html><body>" + f"<p>{TEXT}</p>" * 200 + "</body></html>"),
        (".xml", _registry_record(200)),
    ],
)
def test_more_text_than_robtui_reads_is_refused_with_the_limit(
    tmp_path, monkeypatch, suffix, content
):
    path = tmp_path / f"report{suffix}"
    path.write_text(content, encoding="utf-8")
    assert read_document(path, use_cache=False).sentences  # under the limit: read
    monkeypatch.setattr(reader, "MAX_DOCUMENT_CHARS", 2000)
    with pytest.raises(ReadingError, match=r"more than 0.002 million characters of text") as caught:
        read_document(path, use_cache=False)
    assert str(path) in str(caught.value) and "split it" in str(caught.value)


def test_an_html_page_with_too_much_text_stops_where_the_limit_is_passed(monkeypatch):
    from robtui.reading import markup

    monkeypatch.setattr(reader, "MAX_DOCUMENT_CHARS", 10_000)
    fed: list[int] = []
    feed = markup._HtmlBlocks.feed
    monkeypatch.setattr(
        markup._HtmlBlocks, "feed", lambda self, data: (fed.append(len(data)), feed(self, data))
    )
    page = f"<p>{TEXT}</p>" * 100_000  # 8 MB of paragraphs
    with pytest.raises(ReadingError, match="characters of text"):
        markup.html_blocks(page, "page.html")
    assert sum(fed) <= 1 << 20  # stopped in the first megabyte fed, not after the whole page
