from __future__ import annotations

import pytest


@pytest.fixture(autouse=True)
def own_cache(tmp_path, monkeypatch):
    """Every test reads and writes a cache of its own (worker processes inherit it)."""
    folder = tmp_path / "cache"
    monkeypatch.setenv("ROBTUI_CACHE_DIR", str(folder))
    return folder
