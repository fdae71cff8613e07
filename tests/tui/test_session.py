"""The workbench's session layer without the screen: saving, quotes, dismissals, blinding."""

from __future__ import annotations

import pytest

from robtui.core.model import Quote
from robtui.errors import InputError
from robtui.store.review_folder import ReviewFolder
from robtui.tui.session import ReviewSession
from robtui.workspace import check_reviewer_name


def test_reviewer_names_are_checked():
    assert check_reviewer_name(" maria ") == "maria"
    for bad in ("", "two words", "../up", "-dash-first"):
        with pytest.raises(InputError):
            check_reviewer_name(bad)


def test_every_change_is_on_disk_at_once(demo_folder):
    study, result = demo_folder.review.studies[0], demo_folder.review.results[0]
    session = ReviewSession(demo_folder, "tess")
    work = session.start(study.id, result.id)

    def on_disk():
        return ReviewFolder.open(demo_folder.root).load_assessment("tess", study.id, result.id)

    work.set_response("1.1", "Y")
    assert on_disk().answers["1.1"].response == "Y"
    quote = Quote(document_sha256=study.reports[0].sha256, start=0, end=5, page=1, text="Hello")
    assert work.toggle_quote("1.1", quote) is True
    assert on_disk().answers["1.1"].quotes == [quote]
    assert work.toggle_quote("1.1", quote) is False  # the same passage again detaches it
    assert on_disk().answers["1.1"].quotes == []
    work.dismiss("1.2", study.reports[0].sha256, 10, 20)
    work.dismiss("1.2", study.reports[0].sha256, 10, 20)  # recorded once
    assert [(d.question_id, d.start, d.end) for d in on_disk().dismissed] == [("1.2", 10, 20)]
    work.remember_position("1.3")
    assert on_disk().last_question == "1.3"
    with pytest.raises(InputError, match="NA"):
        work.set_response("1.1", "NA")  # 1.1 is not asked "if applicable"
    with pytest.raises(InputError, match="reason"):
        work.set_override("1", "high", "   ")
    with pytest.raises(InputError, match="already started"):
        session.start(study.id, result.id)


def test_rows_show_only_this_reviewers_judgements(demo_folder):
    names = [n for n in demo_folder.review.reviewers if n != demo_folder.review.lead]
    me = names[0]
    mine, _ = demo_folder.assessments(me)
    rows = {r.key: r for r in ReviewSession(demo_folder, me).rows()}
    for a in mine:
        assert dict(rows[f"{a.study_id}--{a.result_id}"].final) == dict(a.final)
    fresh = {r.key: r for r in ReviewSession(demo_folder, "tess").rows()}
    assert all(r.status == "not started" and not r.final for r in fresh.values())
