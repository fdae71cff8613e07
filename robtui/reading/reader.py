"""Open a trial report of any supported kind as a Document (cached by content)."""

from __future__ import annotations

import hashlib
import threading
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path

from robtui.errors import ReaderBugError, ReadingError
from robtui.reading.cache import load_cached, store_cached
from robtui.reading.document import Document

SUFFIX_KINDS = {
    ".pdf": "pdf",
    ".txt": "txt",
    ".text": "txt",
    ".md": "md",
    ".markdown": "md",
    ".html": "html",
    ".htm": "html",
    ".xhtml": "html",
    ".json": "registry",  # registry records (reading/registry.py)
    ".xml": "registry",
}


def kind_of(path: Path) -> str:
    """The reader kind for ``path`` by its suffix; ReadingError for unsupported files."""
    kind = SUFFIX_KINDS.get(path.suffix.lower())
    if kind is None:
        supported = ", ".join(sorted(SUFFIX_KINDS))
        raise ReadingError(
            f"{path}: unsupported file type {path.suffix or '(none)'}; use {supported}"
        )
    return kind


# The largest files read (stated in the README). A trial report's text is well under 2 MB and
# its PDF rarely above 50 MB; text is held several times over while sentences and features are
# built, so its limit is lower.
MAX_BYTES = {"pdf": 200 * 1024 * 1024, "html": 40 * 1024 * 1024}
MAX_TEXT_BYTES = 20 * 1024 * 1024  # text, Markdown, registry records


# The most characters of text one report may hold once read (txt, Markdown, HTML, registry
# records): 25 times a long trial article (about 200,000 characters). Reading holds about 20
# bytes per character (the sentences), and ranking about 170: at this limit `robtui suggest`
# peaks near 1 GB (`robtui bench robustness` prints the figures). Checked while the text is
# extracted, so a file with more text stops there instead of being read whole.
MAX_DOCUMENT_CHARS = 5_000_000


def check_text_length(path: Path | str, chars: int) -> None:
    """ReadingError when a report holds more text than robtui reads (the limit is in the
    message)."""
    if chars > MAX_DOCUMENT_CHARS:
        raise ReadingError(
            f"{path}: holds more than {MAX_DOCUMENT_CHARS / 1e6:g} million characters of text, "
            "more than robtui reads for one report (a trial report holds well under one "
            "million): split it, or keep only the trial report's text"
        )


def size_limit(kind: str) -> int:
    return MAX_BYTES.get(kind, MAX_TEXT_BYTES)


def check_size(path: Path, kind: str, size: int) -> None:
    """ReadingError when a file is larger than robtui reads (the limit is in the message)."""
    limit = size_limit(kind)
    if size > limit:
        raise ReadingError(
            f"{path}: {size / 1024 / 1024:.0f} MB is more than robtui reads for a {kind} file "
            f"({limit // (1024 * 1024)} MB): split it, or keep only the trial report's pages"
        )


def read_document(
    path: Path, *, use_cache: bool = True, on_page: Callable[[int, float], None] | None = None
) -> Document:
    """Read ``path`` (PDF, text, Markdown, HTML) into a Document.

    Raises ReadingError naming the file and the problem. Only a complete document is cached.
    ``on_page(number, seconds)`` is told each PDF page's time (benchmarks; see read_pdf).
    """
    path = Path(path)
    kind = kind_of(path)
    try:
        check_size(path, kind, path.stat().st_size)
        with open(path, "rb") as handle:  # never more than the limit, even if it grows
            data = handle.read(size_limit(kind) + 1)
        check_size(path, kind, len(data))
    except FileNotFoundError:
        raise ReadingError(f"{path}: no such file") from None
    except IsADirectoryError:
        raise ReadingError(f"{path}: is a folder, not a report file") from None
    except OSError as error:
        raise ReadingError(f"{path}: cannot be read ({error.strerror or error})") from error
    if not data.strip():
        raise ReadingError(f"{path}: the file is empty; nothing to read")
    digest = hashlib.sha256(data).hexdigest()
    if not use_cache:
        return _parsed(path, kind, data, digest, on_page)
    with one_reading_of(digest, kind):
        cached = load_cached(digest, kind, str(path))
        if cached is not None:
            return cached
        document = _parsed(path, kind, data, digest, on_page)
        store_cached(document)
        return document


# Threads of one process that ask for the same bytes at once (the workbench's report and
# pre-specification workers open a result's report together) wait for the first reading and
# take it from the cache, rather than parsing it twice and competing for the interpreter.
_readings_lock = threading.Lock()
_readings: dict[tuple[str, str], tuple[threading.Lock, int]] = {}

# PDFium is not thread-safe: no two of its calls may run at once in one process, even on
# different documents (pypdfium2's documentation, "Incompatibility with Threading"); PDFs are
# read one at a time in a process (processes run in parallel).
PDFIUM_LOCK = threading.RLock()


@contextmanager
def one_reading_of(digest: str, kind: str) -> Iterator[None]:
    """Held while the document of these bytes is read (or prepared elsewhere) and cached: a
    thread asking for the same bytes waits, then finds it in the cache."""
    key = (digest, kind)
    with _readings_lock:
        lock, users = _readings.get(key, (threading.Lock(), 0))
        _readings[key] = (lock, users + 1)
    try:
        with lock:
            yield
    finally:
        with _readings_lock:
            lock, users = _readings[key]
            if users == 1:
                del _readings[key]
            else:
                _readings[key] = (lock, users - 1)


def _parsed(path: Path, kind: str, data: bytes, digest: str,
            on_page: Callable[[int, float], None] | None) -> Document:
    document = _parse(path, kind, data, digest, on_page)
    if not document.sentences:
        raise ReadingError(f"{path}: no text found in the file")
    return document


def _parse(
    path: Path, kind: str, data: bytes, digest: str, on_page: Callable[[int, float], None] | None
) -> Document:
    try:
        if kind == "pdf":
            from robtui.reading.pdf import read_pdf

            with PDFIUM_LOCK:
                return read_pdf(path, data, digest, on_page=on_page)
        if kind == "registry":
            from robtui.reading.registry import read_registry_document

            return read_registry_document(path, data, digest)
        if kind == "txt":
            from robtui.reading.text import read_text_file

            return read_text_file(path, data, digest)
        from robtui.reading.markup import read_markup

        return read_markup(path, data, digest, kind)
    except ReadingError:
        raise
    except RecursionError as error:
        raise ReadingError(f"{path}: the file is too deeply nested to read") from error
    except MemoryError as error:
        raise ReadingError(f"{path}: too large to read in the memory available") from error
    except Exception as error:  # a reader bug must not crash the caller; say what happened
        raise reader_failure(path, error) from error


def reader_failure(path: Path, error: BaseException) -> ReadingError:
    """A ReadingError for an unexpected exception: a bug in robtui's own code (the innermost
    frame is robtui's) is reported as one, never as a damaged file."""
    where = robtui_frame(error)
    if where is not None:
        return ReaderBugError(
            f"{path}: robtui could not read this file because of a bug in robtui itself "
            f"({type(error).__name__} at {where}: {error}); the file is probably fine and was "
            "left as it is: please report this message with the file to the robtui developers"
        )
    return ReadingError(
        f"{path}: could not be read ({type(error).__name__}: {error}); the file may be "
        "damaged: check it opens in a viewer, or report it to the robtui developers"
    )


def robtui_frame(error: BaseException) -> str | None:
    """'robtui/x.py:LINE' when the exception was raised in robtui's own code, else None."""
    import traceback

    package = Path(__file__).resolve().parents[1]
    frames = traceback.extract_tb(error.__traceback__)
    if not frames:
        return None
    innermost = Path(frames[-1].filename).resolve()
    if package in innermost.parents:
        return f"{innermost.relative_to(package.parent)}:{frames[-1].lineno}"
    return None
