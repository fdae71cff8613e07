"""Shared fixtures for the reading tests: a private cache folder for every test."""

from __future__ import annotations

import pytest


@pytest.fixture(autouse=True)
def private_cache(tmp_path, monkeypatch):
    """Point the document cache at a temporary folder so tests never touch the user's cache."""
    folder = tmp_path / "doc-cache"
    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(folder))
    return folder
