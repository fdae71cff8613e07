"""The workbench takes a study's domains and their keys from the study's question set."""

from __future__ import annotations

import pytest

from robtui.store.question_sets import available_question_sets, builtin_question_set
from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.keys import domain_bindings, keys_label
from robtui.tui.screens.assessment import AssessmentScreen

from .conftest import SIZE
from .helpers import open_selected

SCREEN_KEYS = {k.strip() for b in AssessmentScreen.BINDINGS for k in b.key.split(",")}


@pytest.mark.parametrize("set_id", available_question_sets())
def test_every_bundled_domain_key_is_free_on_the_assessment_screen(set_id):
    qset = builtin_question_set(set_id)
    assert domain_bindings(qset, SCREEN_KEYS) == qset.domain_keys()
    assert set(qset.domain_keys().values()) == set(qset.domain_ids())  # every domain has a key


def test_footer_label_of_the_domain_keys():
    assert keys_label(["1", "2", "3", "4", "5"]) == "1-5"
    assert keys_label(["1", "b", "2", "3", "4", "5"]) == "1-5 b"
    assert keys_label(["1", "S", "2", "3", "4", "5"]) == "1-5 S"
    assert keys_label(["1", "3"]) == "1/3"


async def test_a_cluster_study_shows_its_own_domains_and_keys(demo_dir):
    folder = ReviewFolder.open(demo_dir)
    study = folder.review.studies[0]
    changed = folder.review.model_copy(deep=True)
    changed.study(study.id).design = "cluster"
    folder.review = changed
    folder.save_review()
    result = folder.review.results[0]
    app = Workbench(demo_dir, "tess")  # a reviewer with no files yet
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        overview = app.screen
        columns = [str(c.label) for c in overview.query_one("#results").columns.values()]
        assert "D1b" in columns  # every domain in use, blank where a study's set has none
        keys = list(overview.rows)
        overview.query_one("#results").move_cursor(row=keys.index(f"{study.id}--{result.id}"))
        screen = await open_selected(pilot)
        assert screen.session.qset.id == "rob2-cluster"
        assert screen.session.domain_ids() == ["1", "1b", "2", "3", "4", "5"]
        await pilot.press("b")
        assert screen.domain_id == "1b"
        shown = [o.id for o in screen.query_one("#questions").options]
        assert shown and all(q.startswith("1b.") for q in shown)
        await pilot.press("4")
        assert screen.domain_id == "4"
        await pilot.press("question_mark")  # help names this study's own keys
        await pilot.pause()
        rows = {(k.keys, k.what) for k in app.screen.key_map if k.screen == "assessment"}
        assert ("1-5 b", next(w for k, w in rows if k == "1-5 b")) in rows
        what = next(w for k, w in rows if k == "1-5 b")
        assert "b: D1b" in what and "1: D1 " in what and "… 5" not in what
        assert not any(k == "domain keys" for k, _ in rows)
    saved = ReviewFolder.open(demo_dir).load_assessment("tess", study.id, result.id)
    assert saved is None or saved.question_set == "rob2-cluster"


def test_help_from_the_overview_names_the_keys_of_every_set_in_use():
    from robtui.tui.keys import key_map_for

    sets = [builtin_question_set(i) for i in ("rob2-cluster", "rob2-crossover")]
    rows = [k for k in key_map_for(sets, SCREEN_KEYS) if k.screen == "assessment"]
    labels = [k.keys for k in rows]
    assert "1-5 b" in labels and "1-5 S" in labels
    crossover = rows[labels.index("1-5 S")]
    assert "S: DS" in crossover.what and sets[1].title in crossover.what
