"""Atomic file writes: a leaf module every package may use.

A reader sees the old file or the new one, never half of either (temp file, fsync, rename).
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path


def write_bytes_atomic(path: Path, data: bytes) -> None:
    """Write ``data`` to ``path`` through a temporary file in the same folder, fsync, rename."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    fd, tmp_name = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".tmp", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as handle:
            handle.write(data)
            handle.flush()
            os.fsync(handle.fileno())
        os.replace(tmp_name, path)
    except BaseException:
        try:
            os.unlink(tmp_name)
        except FileNotFoundError:
            pass
        raise
    _fsync_dir(path.parent)


def write_text_atomic(path: Path, text: str) -> None:
    """Write UTF-8 ``text`` to ``path`` atomically (newlines kept as given)."""
    write_bytes_atomic(path, text.encode("utf-8"))


def _fsync_dir(folder: Path) -> None:
    # Makes the rename itself durable; not every platform lets a folder be opened.
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(fd)
    except OSError:
        pass
    finally:
        os.close(fd)
