"""Blinding: a reviewer's session reads only that reviewer's files and shows only that
reviewer's judgements; only the review's lead reaches the comparison."""

from __future__ import annotations

import pytest

from robtui.errors import InputError
from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.compare import CompareScreen
from robtui.tui.screens.overview import OverviewScreen
from robtui.tui.screens.start import ReviewerScreen
from robtui.tui.session import ReviewSession

from .conftest import SIZE
from .helpers import settle


@pytest.fixture
def spy(monkeypatch):
    """Record whose assessments are read through the review folder."""
    read: list[str | None] = []
    load, every = ReviewFolder.load_assessment, ReviewFolder.assessments

    def load_assessment(self, reviewer, study_id, result_id):
        read.append(reviewer)
        return load(self, reviewer, study_id, result_id)

    def assessments(self, reviewer=None):
        read.append(reviewer)
        return every(self, reviewer)

    monkeypatch.setattr(ReviewFolder, "load_assessment", load_assessment)
    monkeypatch.setattr(ReviewFolder, "assessments", assessments)
    return read


def _two_reviewers(folder: ReviewFolder) -> tuple[str, str]:
    names = [n for n in folder.review.reviewers if n != folder.review.lead]
    assert len(names) >= 2, "the demo review names two reviewers"
    return names[0], names[1]


async def test_a_reviewer_sees_only_their_own_work(demo_dir, spy):
    folder = ReviewFolder.open(demo_dir)
    me, other = _two_reviewers(folder)
    mine, _ = folder.assessments(me)
    theirs, _ = folder.assessments(other)
    spy.clear()
    app = Workbench(demo_dir, me)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        overview = app.screen
        assert isinstance(overview, OverviewScreen)
        # every row shows my final judgements, none of the other reviewer's
        by_key = {f"{a.study_id}--{a.result_id}": a for a in mine}
        differing = 0
        for other_a in theirs:
            key = f"{other_a.study_id}--{other_a.result_id}"
            row = overview.rows[key]
            assert dict(row.final) == dict(by_key[key].final if key in by_key else {})
            differing += dict(other_a.final) != dict(row.final)
        assert differing, "the demo has results where the two reviewers differ"
        # open results (the first few, to keep the suite quick): still only my own files
        for _ in range(3):
            await pilot.press("enter")
            await settle(pilot)
            await pilot.press("escape")
            await pilot.pause()
            await pilot.press("down")
        await pilot.press("v")  # the comparison is the lead's, not mine
        await pilot.pause()
        assert isinstance(app.screen, OverviewScreen)
    assert spy and set(spy) == {me}


def test_only_the_lead_may_compare(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    me, other = _two_reviewers(folder)
    mine = ReviewSession(folder, me)
    with pytest.raises(InputError, match="only the review's lead"):
        mine.comparison_pairs(me, other)
    # Nor the consensus, nor the comparison screen itself.
    study, result = folder.review.studies[0].id, folder.review.results[0].id
    with pytest.raises(InputError, match="only the review's lead"):
        mine.load_consensus(study, result)
    with pytest.raises(InputError, match="only the review's lead"):
        CompareScreen(mine)
    pairs, problems = ReviewSession(folder, folder.review.lead).comparison_pairs(me, other)
    assert pairs and not problems


async def test_enter_on_the_first_screen_takes_the_highlighted_name(demo_dir):
    listed = ReviewFolder.open(demo_dir).review.reviewers
    app = Workbench(demo_dir)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, OverviewScreen)
        assert app.screen.session.reviewer == listed[0]


async def test_enter_on_an_empty_name_says_what_to_do(demo_dir):
    app = Workbench(demo_dir)
    async with app.run_test(size=(80, 24)) as pilot:
        await pilot.pause()
        await pilot.press("tab", "enter")
        await pilot.pause()
        assert isinstance(app.screen, ReviewerScreen)
        said = str(app.screen.query_one("#reviewer-error").render())
        assert "Type your reviewer name, or choose one" in said and "''" not in said


async def test_without_a_name_the_first_screen_asks_who_is_assessing(demo_dir):
    app = Workbench(demo_dir)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        assert isinstance(app.screen, ReviewerScreen)
        await pilot.press("tab", *"bad name", "enter")  # from the list of names to the field
        await pilot.pause()
        assert isinstance(app.screen, ReviewerScreen)  # refused, with the reason shown
        assert "not usable" in str(app.screen.query_one("#reviewer-error").render())
        field = app.screen.query_one("#reviewer-name")
        field.value = ""
        await pilot.press(*"tess", "enter")
        await pilot.pause()
        assert isinstance(app.screen, OverviewScreen)
        assert app.screen.session.reviewer == "tess"


class RecordingRanker:
    """The real ranker, noting which learned model each ranking was given."""

    def __init__(self) -> None:
        from robtui.tui.report_loading import shared_ranker

        self.real = shared_ranker()
        self.no_evidence_threshold = self.real.no_evidence_threshold
        self.models: list[object] = []

    def rank(self, *args, **kwargs):
        self.models.append(kwargs.get("review_model"))
        return self.real.rank(*args, **kwargs)


async def test_ranking_uses_only_the_reviewers_own_learned_model(demo_dir):
    """Another reviewer's learned examples never reach this reviewer's suggestions."""
    from robtui.evidence.review_model import save_review_model, update_review_model

    folder = ReviewFolder.open(demo_dir)
    other, _ = _two_reviewers(folder)
    theirs = update_review_model(None, [("1.2", "a sentence only the other reviewer quoted")], [])
    save_review_model(theirs, folder.learned_dir_for(other))
    recorder = RecordingRanker()
    app = Workbench(demo_dir, "tess", ranker_factory=lambda: recorder)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        await pilot.press("enter", "enter")  # a study the demo reviewers assessed too
        await settle(pilot)
        assert recorder.models, "the report was ranked"
        for model in recorder.models:
            assert model is not None  # tess's own (still empty) model took part
            assert not any("only the other reviewer" in e.text for e in model.examples)
    assert ReviewSession(folder, "tess").learned_dir == folder.learned_dir / "tess"
