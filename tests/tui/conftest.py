"""Fixtures for the workbench tests: the bundled demo review, built fresh in tmp."""

from __future__ import annotations

from pathlib import Path

import pytest

from robtui.store.demo import build_demo_review
from robtui.store.review_folder import ReviewFolder

SIZE = (140, 42)  # fixed terminal size for every Pilot run and snapshot


@pytest.fixture(scope="session")
def _demo_template(tmp_path_factory) -> Path:
    """Built once per test session; each test copies it (building reads the sample reports)."""
    root = tmp_path_factory.mktemp("demo-template") / "review"
    build_demo_review(root)
    return root


@pytest.fixture
def demo_dir(_demo_template: Path, tmp_path: Path) -> Path:
    import shutil

    target = tmp_path / "review"
    shutil.copytree(_demo_template, target)
    return target


@pytest.fixture
def demo_folder(demo_dir: Path) -> ReviewFolder:
    return ReviewFolder.open(demo_dir)


class NoRanker:
    """Stands in for the evidence ranker where the point of a test is its absence."""

    def rank(self, *args, **kwargs):
        from robtui.errors import ModelFileError

        raise ModelFileError("no weights in this test")


@pytest.fixture(autouse=True)
def _quicker_pilot(monkeypatch):
    """Pilot waits for 'idle' after every key in 20 ms slices; 5 ms slices keep the suite
    fast. Pilot still waits until every queued message has been handled."""
    import textual._wait as wait

    monkeypatch.setattr(wait, "SLEEP_GRANULARITY", 1 / 200)
    monkeypatch.setattr(wait, "SLEEP_IDLE", 1 / 200 / 20)
