"""Open a trial report of any supported kind as a Document (cached by content)."""

from __future__ import annotations

import hashlib
from pathlib import Path

from robtui.errors import ReadingError
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


def read_document(path: Path, *, use_cache: bool = True) -> Document:
    """Read ``path`` (PDF, text, Markdown, HTML) into a Document.

    Raises ReadingError naming the file and the problem. Only a complete document is cached.
    """
    path = Path(path)
    kind = kind_of(path)
    try:
        data = path.read_bytes()
    except FileNotFoundError:
        raise ReadingError(f"{path}: no such file") from None
    except IsADirectoryError:
        raise ReadingError(f"{path}: is a folder, not a report file") from None
    except OSError as error:
        raise ReadingError(f"{path}: cannot be read ({error.strerror or error})") from error
    if not data.strip():
        raise ReadingError(f"{path}: the file is empty; nothing to read")
    digest = hashlib.sha256(data).hexdigest()
    if use_cache:
        cached = load_cached(digest, kind, str(path))
        if cached is not None:
            return cached
    document = _parse(path, kind, data, digest)
    if not document.sentences:
        raise ReadingError(f"{path}: no text found in the file")
    if use_cache:
        store_cached(document)
    return document


def _parse(path: Path, kind: str, data: bytes, digest: str) -> Document:
    try:
        if kind == "pdf":
            from robtui.reading.pdf import read_pdf

            return read_pdf(path, data, digest)
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
    except Exception as error:  # a reader bug must not crash the caller; say what happened
        raise ReadingError(
            f"{path}: could not be read ({type(error).__name__}: {error}); "
            "please report this file to the robtui developers"
        ) from error
