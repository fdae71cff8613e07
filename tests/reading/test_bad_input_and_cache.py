"""Bad PDFs give a ReadingError naming file and problem; the cache keeps only whole documents."""

from __future__ import annotations

import json

import pytest

from robtui.cli import main as cli_main
from robtui.devtools.pdf_writer import render_text_as_pdf
from robtui.errors import ReadingError
from robtui.reading import reader as reader_module
from robtui.reading.cache import cache_dir
from robtui.reading.reader import read_document

TEXT = "An invented report\nMethods\n" + "\n".join(
    f"Paragraph {i}: participants were randomly assigned by a central office. It worked."
    for i in range(30)
)


@pytest.fixture
def good_pdf(tmp_path):
    path = tmp_path / "good.pdf"
    render_text_as_pdf(TEXT, path, full_width_lines=1)
    return path


def _assert_reading_error(path, *words):
    with pytest.raises(ReadingError) as caught:
        read_document(path)
    message = str(caught.value)
    assert str(path) in message
    for word in words:
        assert word in message
    return message


def _cache_files(folder):
    return sorted(folder.glob("*.json")) if folder.exists() else []


def test_encrypted_pdf(tmp_path, private_cache) -> None:
    from reportlab.lib.pdfencrypt import StandardEncryption
    from reportlab.pdfgen.canvas import Canvas

    path = tmp_path / "locked.pdf"
    canvas = Canvas(str(path), encrypt=StandardEncryption("secret", canPrint=0))
    canvas.drawString(72, 720, "Participants were randomised centrally.")
    canvas.showPage()
    canvas.save()
    _assert_reading_error(path, "encrypted")
    assert _cache_files(private_cache) == []


def test_truncated_pdf(tmp_path, good_pdf, private_cache) -> None:
    path = tmp_path / "cut.pdf"
    path.write_bytes(good_pdf.read_bytes()[: good_pdf.stat().st_size // 2])
    _assert_reading_error(path, "truncated")
    assert _cache_files(private_cache) == []


def test_corrupt_pdf(tmp_path, private_cache) -> None:
    path = tmp_path / "corrupt.pdf"
    path.write_bytes(b"%PDF-1.4\n" + bytes(range(256)) * 40 + b"\n%%EOF\n")
    message = _assert_reading_error(path)
    assert "PDF" in message and ("corrupt" in message or "no pages" in message)
    assert _cache_files(private_cache) == []


def test_not_a_pdf_at_all(tmp_path) -> None:
    path = tmp_path / "fake.pdf"
    path.write_text("just some words", encoding="utf-8")
    _assert_reading_error(path, "not a PDF")


def test_empty_pdf_file(tmp_path) -> None:
    path = tmp_path / "empty.pdf"
    path.write_bytes(b"")
    _assert_reading_error(path, "empty")


def test_image_only_pdf_says_ocr_is_needed(tmp_path, private_cache) -> None:
    from PIL import Image
    from reportlab.lib.utils import ImageReader
    from reportlab.pdfgen.canvas import Canvas

    picture = Image.new("RGB", (60, 40), (200, 200, 200))
    path = tmp_path / "scan.pdf"
    canvas = Canvas(str(path))
    for _ in range(2):
        canvas.drawImage(ImageReader(picture), 72, 400, width=300, height=200)
        canvas.showPage()
    canvas.save()
    _assert_reading_error(path, "no text layer", "OCR")
    assert _cache_files(private_cache) == []


def test_cache_miss_then_hit(good_pdf, private_cache, monkeypatch) -> None:
    first = read_document(good_pdf)
    entries = _cache_files(private_cache)
    assert len(entries) == 1 and first.sha256 in entries[0].name
    assert cache_dir() == private_cache

    def no_parsing(*args, **kwargs):
        raise AssertionError("the cached document should have been used")

    monkeypatch.setattr(reader_module, "_parse", no_parsing)
    second = read_document(good_pdf)
    assert second == first


def test_cache_follows_content_not_name(good_pdf, tmp_path) -> None:
    first = read_document(good_pdf)
    copy = tmp_path / "renamed.pdf"
    copy.write_bytes(good_pdf.read_bytes())
    second = read_document(copy)
    assert second.path == str(copy)
    assert second.sentences == first.sentences


def test_corrupt_cache_entry_is_ignored_and_replaced(good_pdf, private_cache) -> None:
    first = read_document(good_pdf)
    (entry,) = _cache_files(private_cache)
    entry.write_text('{"schema_version": 1, "path": "x", "sentences": [', encoding="utf-8")
    again = read_document(good_pdf)
    assert again == first
    json.loads(entry.read_text(encoding="utf-8"))  # a whole document again


def test_cache_entry_for_other_bytes_is_not_trusted(good_pdf, private_cache, tmp_path) -> None:
    read_document(good_pdf)
    (entry,) = _cache_files(private_cache)
    data = json.loads(entry.read_text(encoding="utf-8"))
    data["sha256"] = "0" * 64  # an entry whose content claims other bytes
    entry.write_text(json.dumps(data), encoding="utf-8")
    assert read_document(good_pdf).sha256 != "0" * 64


def test_no_cache_option_writes_nothing(good_pdf, private_cache) -> None:
    read_document(good_pdf, use_cache=False)
    assert _cache_files(private_cache) == []


def test_deleting_the_cache_is_safe(good_pdf, private_cache) -> None:
    import shutil

    first = read_document(good_pdf)
    shutil.rmtree(private_cache)
    assert read_document(good_pdf) == first


def test_the_cache_key_covers_the_page_analysis_too() -> None:
    """A change to reading/layout/ (how a PDF page is read) must retire cached documents, as a
    change to the readers beside the cache does."""
    from robtui.reading.cache import reader_sources

    names = {p.relative_to(p.parents[1]).as_posix() for p in reader_sources()
             if p.parent.name == "layout"}
    assert {"layout/page.py", "layout/columns.py"} <= names
    assert any(p.name == "pdf.py" for p in reader_sources())


def test_cli_read_prints_the_sentence_map(good_pdf, capsys) -> None:
    assert cli_main(["read", str(good_pdf)]) == 0
    out = capsys.readouterr().out
    assert "[methods]" in out and "p1 " in out and "sha256" in out
    assert cli_main(["read", str(good_pdf), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert data["kind"] == "pdf" and data["sentences"][0]["page"] == 1


def test_cli_read_bad_file_exits_2_with_a_message(tmp_path, capsys) -> None:
    path = tmp_path / "empty.txt"
    path.write_bytes(b"")
    assert cli_main(["read", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("robtui: ") and "empty" in err


def test_pdf_with_some_scanned_pages_warns(tmp_path) -> None:
    from PIL import Image
    from reportlab.lib.utils import ImageReader
    from reportlab.pdfgen.canvas import Canvas

    path = tmp_path / "mixed.pdf"
    canvas = Canvas(str(path))
    canvas.drawString(72, 720, "Participants were randomised by a central office.")
    canvas.showPage()
    canvas.drawImage(ImageReader(Image.new("RGB", (20, 20))), 72, 400, width=200, height=200)
    canvas.showPage()
    canvas.save()
    doc = read_document(path)
    assert doc.sentences[0].text == "Participants were randomised by a central office."
    assert any("pages 2" in w and "OCR" in w for w in doc.warnings)


def test_two_threads_reading_the_same_file_parse_it_once(good_pdf, private_cache,
                                                         monkeypatch) -> None:
    """The second thread waits for the first reading and takes it from the cache."""
    import threading

    parse = reader_module._parse
    calls, inside, release = [], threading.Event(), threading.Event()

    def slow_parse(*args, **kwargs):
        calls.append(args[0])
        inside.set()
        release.wait(10)
        return parse(*args, **kwargs)

    monkeypatch.setattr(reader_module, "_parse", slow_parse)
    results = []
    first = threading.Thread(target=lambda: results.append(read_document(good_pdf)))
    first.start()
    assert inside.wait(10)
    second = threading.Thread(target=lambda: results.append(read_document(good_pdf)))
    second.start()
    second.join(0.2)
    assert second.is_alive()  # waiting for the first reading, not parsing
    release.set()
    first.join(10)
    second.join(10)
    assert len(calls) == 1 and len(results) == 2 and results[0] == results[1]
    assert not reader_module._readings  # nothing left behind
