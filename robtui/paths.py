"""Where bundled data lives, for an editable checkout and for an installed wheel alike."""

from __future__ import annotations

from pathlib import Path

_PACKAGE_DIR = Path(__file__).resolve().parent
_REPO_ROOT = _PACKAGE_DIR.parent


def bundled_dir(name: str) -> Path:
    """Return the folder of bundled data ``name`` ("signalling_questions", "sample_reports").

    A wheel carries it under ``robtui/_bundled``; a source checkout has it at the top level.
    """
    inside = _PACKAGE_DIR / "_bundled" / name
    if inside.is_dir():
        return inside
    return _REPO_ROOT / name
