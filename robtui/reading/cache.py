"""A cache of parsed documents keyed by the sha256 of the file bytes.

Entries are whole Documents written atomically as JSON, so deleting the folder (or any file in
it) is always safe: the next read parses the file again. A damaged entry is ignored.
"""

from __future__ import annotations

import functools
import hashlib
import os
from pathlib import Path

from pydantic import ValidationError

from robtui.files import write_text_atomic
from robtui.reading.document import DOCUMENT_SCHEMA_VERSION, Document

CACHE_ENV = "ROBTUI_CACHE_DIR"
# Bump when a reader change alters the output for the same bytes, so old entries are not used.
READER_VERSION = 1


def reader_sources() -> list[Path]:
    """Every module of the reading package, subpackages included (the PDF page analysis in
    layout/ decides a document's text as much as the readers beside this file)."""
    here = Path(__file__).resolve().parent
    return sorted(here.rglob("*.py"), key=lambda p: p.relative_to(here).as_posix())


@functools.cache
def reader_fingerprint() -> str:
    """A digest of the reading code itself: any change to a reader retires old entries."""
    digest = hashlib.sha256(str(READER_VERSION).encode())
    here = Path(__file__).resolve().parent
    for source in reader_sources():
        digest.update(source.relative_to(here).as_posix().encode())
        digest.update(source.read_bytes())
    return digest.hexdigest()[:12]


def cache_dir() -> Path:
    """``$ROBTUI_CACHE_DIR`` or the platform's user cache folder for robtui."""
    env = os.environ.get(CACHE_ENV)
    if env:
        return Path(env)
    from platformdirs import user_cache_dir

    return Path(user_cache_dir("robtui")) / "documents"


def _entry(sha256: str, kind: str) -> Path:
    return cache_dir() / f"{sha256}-{kind}-{reader_fingerprint()}-s{DOCUMENT_SCHEMA_VERSION}.json"


def has_cached(sha256: str, kind: str) -> bool:
    """True when an entry for these bytes exists (it may still prove damaged on loading)."""
    return _entry(sha256, kind).is_file()


def load_cached(sha256: str, kind: str, path: str) -> Document | None:
    """The cached Document for these bytes, re-pointed at ``path``; None on a miss or damage."""
    entry = _entry(sha256, kind)
    try:
        raw = entry.read_text(encoding="utf-8")
        document = Document.model_validate_json(raw)
    except (OSError, ValueError, ValidationError):
        return None
    if document.sha256 != sha256 or document.kind != kind:
        return None
    if document.path != path:
        document = document.model_copy(update={"path": path})
    return document


def store_cached(document: Document) -> None:
    """Write a complete Document to the cache; a cache that cannot be written is skipped."""
    try:
        write_text_atomic(_entry(document.sha256, document.kind), document.model_dump_json())
    except OSError:
        pass
