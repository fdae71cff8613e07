"""Many hands on one review: locks, stale writers, concurrent processes, killed saves."""

from __future__ import annotations

import os
import stat

import pytest

from robtui.core import assessing
from robtui.devtools import stress
from robtui.files import StaleFileError, umask_mode
from robtui.store.question_sets import builtin_question_set
from robtui.store.review_folder import ReviewFolder

QSET = builtin_question_set("rob2-parallel")


@pytest.fixture
def root(tmp_path):
    return stress.make_review(tmp_path / "rev")


def _answer(folder: ReviewFolder, reviewer: str, qid: str, code: str):
    def change(a):
        a = a or assessing.new_assessment(folder.review, "S1", "r1", reviewer, QSET)
        return assessing.set_response(a, QSET, qid, code)

    return change


def test_stale_writer_refuses_naming_the_file_and_saying_to_reload(root):
    first, second = ReviewFolder.open(root), ReviewFolder.open(root)
    first.update_assessment("ana", "S1", "r1", _answer(first, "ana", "1.1", "Y"))
    mine = second.load_assessment("ana", "S1", "r1")
    first.update_assessment("ana", "S1", "r1", _answer(first, "ana", "1.2", "N"))
    changed = assessing.set_response(mine, QSET, "1.3", "Y")
    with pytest.raises(StaleFileError, match=r"S1--r1\.json.*reload"):
        second.save_assessment(changed)
    answers = stress.stored_answers(root, "ana")
    assert answers == {"1.1": "Y", "1.2": "N"}, "the refused write changed nothing"


def test_a_file_created_by_another_process_is_not_replaced(root):
    looked = ReviewFolder.open(root)
    assert looked.load_assessment("ana", "S1", "r1") is None
    other = ReviewFolder.open(root)
    other.update_assessment("ana", "S1", "r1", _answer(other, "ana", "1.1", "PY"))
    fresh = assessing.new_assessment(looked.review, "S1", "r1", "ana", QSET)
    with pytest.raises(StaleFileError, match="created by another process"):
        looked.save_assessment(assessing.set_response(fresh, QSET, "1.2", "Y"))
    assert stress.stored_answers(root, "ana") == {"1.1": "PY"}


def test_review_edits_from_two_openings_keep_both_studies(root, tmp_path):
    report = tmp_path / "b.txt"
    report.write_text("Allocation was concealed.\n", encoding="utf-8")
    first, second = ReviewFolder.open(root), ReviewFolder.open(root)
    first.add_study("S2", "Study two", [report])
    second.add_study("S3", "Study three", [report])  # opened before S2 was added
    ids = [s.id for s in ReviewFolder.open(root).review.studies]
    assert ids == ["S1", "S2", "S3"]


def test_workbench_session_reads_a_changed_file_and_applies_its_change_on_top(root):
    from robtui.tui.session import ReviewSession

    folder = ReviewFolder.open(root)
    folder.update_assessment("ana", "S1", "r1", _answer(folder, "ana", "1.1", "Y"))
    session = ReviewSession(ReviewFolder.open(root), "ana").load("S1", "r1")
    told: list[str] = []
    session.on_reloaded = told.append
    cli = ReviewFolder.open(root)  # the CLI edits the same assessment meanwhile
    cli.update_assessment("ana", "S1", "r1", _answer(cli, "ana", "1.2", "N"))
    session.set_response("1.3", "PY")  # the next keypress in the workbench
    assert stress.stored_answers(root, "ana") == {"1.1": "Y", "1.2": "N", "1.3": "PY"}
    assert session.assessment.answers["1.2"].response == "N", "the screen shows theirs too"
    assert told and "changed by another" in told[0]
    assert "(answers to 1.2)" in told[0] and "replaced" not in told[0]  # nothing of theirs
    cli = ReviewFolder.open(root)
    cli.update_assessment("ana", "S1", "r1", _answer(cli, "ana", "1.1", "PY"))
    session.set_response("1.1", "N")  # the same question: the reviewer is told theirs went
    assert stress.stored_answers(root, "ana")["1.1"] == "N"
    assert told[-1].endswith("yours replaced theirs: 1.1 PY → N"), told[-1]


def test_many_assess_processes_at_once_lose_no_answer(root):
    codes = ("Y", "PY", "N", "PN")
    wanted = [(qid, codes[i % 4]) for i, qid in enumerate(stress.ALWAYS_ASKED)]
    exits = stress.assess_at_once(root, "ana", wanted)
    assert exits == [0] * len(wanted)
    assert stress.stored_answers(root, "ana") == dict(wanted)


def test_double_writes_lose_nothing(root):
    ReviewFolder.open(root).edit_review(
        lambda r: r.reviewers.extend(["w0", "w1"])
    )
    tally = stress.double_writes(root, trials=2)
    assert tally.answers_written == 4
    assert tally.failed_commands == 0
    assert tally.answers_lost == 0


def test_kill_9_during_saves_loses_nothing_and_leaves_no_temp_files(root):
    tally = stress.kills_during_saves(root, kills=4)
    assert tally.kills == 4 and tally.confirmed_saves >= 4
    assert tally.unreadable_files == 0
    assert tally.answers_lost == 0
    assert tally.leftovers_after_next_save == 0
    found, problems = ReviewFolder.open(root).assessments()
    assert problems == [] and len(found) == 1


def test_leftover_of_a_killed_save_is_removed_by_the_next_save(root):
    folder = ReviewFolder.open(root)
    folder.update_assessment("ana", "S1", "r1", _answer(folder, "ana", "1.1", "Y"))
    leftover = root / "assessments" / "ana" / ".S1--r1.json.abc123.tmp"
    leftover.write_text("{half", encoding="utf-8")
    folder.update_assessment("ana", "S1", "r1", _answer(folder, "ana", "1.2", "Y"))
    assert not leftover.exists()


def test_files_take_their_mode_from_the_umask(tmp_path):
    old = os.umask(0o002)
    try:
        root = stress.make_review(tmp_path / "shared")
        assert umask_mode() == 0o664
        for path in (root / "review.toml", root / "reports" / "S1" / "shared-report.txt"):
            assert stat.S_IMODE(path.stat().st_mode) == 0o664, path
        lock = root / ".robtui.lock"
        assert stat.S_IMODE(lock.stat().st_mode) == 0o664, "the group can take the lock too"
    finally:
        os.umask(old)


def test_a_review_given_by_a_relative_path_works(root, monkeypatch, capsys):
    from robtui.cli import main

    monkeypatch.chdir(root.parent)
    report = root.parent / "more.txt"
    report.write_text("Allocation was concealed.\n", encoding="utf-8")
    study = ["study", "add", root.name, "--study", "S2", "--label", "Two", "--report", "more.txt"]
    assert main(study) == 0
    assert main(["assess", root.name, "--reviewer", "ana", "--study", "S2", "--result", "r1",
                 "1.1=Y"]) == 0  # fmt: skip
    capsys.readouterr()
    folder = ReviewFolder.open(root)
    assert [s.id for s in folder.review.studies] == ["S1", "S2"]
    assert folder.load_assessment("ana", "S2", "r1").answers["1.1"].response == "Y"
