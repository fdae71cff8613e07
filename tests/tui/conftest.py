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


class FixedRanker:
    """Suggests the same sentences with the same scores every time, whatever the shipped
    weights: for snapshots, whose point is the screen's layout (the real ranker is used by
    the other tests). For each question: body sentences containing a word of its short
    label, best first by a fixed rule."""

    no_evidence_threshold = 0.3

    def rank(self, document, questions=None, *, effect="assignment", top=5, **_):
        from robtui.evidence.ranker import Suggestion
        from robtui.store.question_sets import builtin_question_set

        result = {}
        for question in builtin_question_set().questions(effect):
            words = {w.casefold() for w in question.short.split() if len(w) > 4}
            hits = [
                s
                for s in document.sentences
                if s.block == "body" and any(w[:6] in s.text.casefold() for w in words)
            ][:top]
            result[question.id] = [
                Suggestion(
                    question.id,
                    s.index,
                    s.start,
                    s.end,
                    s.page,
                    s.section,
                    round(0.9 - 0.15 * rank, 2),
                    s.text,
                )
                for rank, s in enumerate(hits)
            ]
        return result


@pytest.fixture(autouse=True)
def _quicker_pilot(monkeypatch):
    """Pilot waits for 'idle' after every key in 20 ms slices; 5 ms slices keep the suite
    fast. Pilot still waits until every queued message has been handled."""
    import textual._wait as wait

    monkeypatch.setattr(wait, "SLEEP_GRANULARITY", 1 / 200)
    monkeypatch.setattr(wait, "SLEEP_IDLE", 1 / 200 / 20)
