"""Saving in the workbench: answers are shown at once and written in a worker thread, in the
order they were given, never two writes at once; another process's write in between is kept;
leaving and quitting wait for the writes; a failed write is said and tried again.

The writes are held back by a gate (the test opens it), so every check is on what happened,
never on how long it took."""

from __future__ import annotations

import asyncio
import subprocess
import sys
import threading

from robtui.store.review_folder import ReviewFolder
from robtui.tui.app import Workbench
from robtui.tui.screens.assessment import AssessmentScreen
from robtui.tui.screens.overview import OverviewScreen

from .conftest import SIZE, FixedRanker
from .helpers import open_selected, said_on_screen

REVIEWER = "tess"


class Gate:
    """Stands in for the workbench folder's ``save_assessment``: each write waits until the
    gate is open (or fails with ``fail``), then is recorded (its answers, its thread)."""

    def __init__(self, folder: ReviewFolder) -> None:
        self._save = folder.save_assessment
        self.opened = threading.Event()
        self.fail: OSError | None = None
        self.saved: list[dict[str, str | None]] = []
        self.threads: set[str] = set()
        self.waiting = 0  # writes waiting at the gate now
        self.most_at_once = 0
        self._count = threading.Lock()

    def __call__(self, assessment):
        with self._count:
            self.waiting += 1
            self.most_at_once = max(self.most_at_once, self.waiting)
        try:
            assert self.opened.wait(20), "the test never opened the gate"
            if self.fail is not None:
                raise self.fail
            path = self._save(assessment)
            self.saved.append({q: a.response for q, a in assessment.answers.items()})
            self.threads.add(threading.current_thread().name)
            return path
        finally:
            with self._count:
                self.waiting -= 1


async def _gated(pilot, monkeypatch) -> tuple[AssessmentScreen, Gate]:
    """The first result opened, its writes held at a gate (closed)."""
    screen = await open_selected(pilot)
    folder = screen.session.folder
    gate = Gate(folder)
    monkeypatch.setattr(folder, "save_assessment", gate)
    return screen, gate


async def _first_write_held(pilot, monkeypatch) -> tuple[AssessmentScreen, Gate, str]:
    """The first result opened, y pressed on its first question, that write held at the gate."""
    screen, gate = await _gated(pilot, monkeypatch)
    qid = screen.question_id
    await pilot.press("y")
    await _until(pilot, lambda: gate.waiting == 1, "the write reached the gate")
    return screen, gate, qid


async def _until(pilot, condition, what: str) -> None:
    for _ in range(1000):
        if condition():
            return
        await pilot.pause(0.01)
    raise AssertionError(f"never happened: {what}")


def _on_disk(demo_dir, screen: AssessmentScreen) -> dict[str, str | None]:
    a = screen.session.assessment
    stored = ReviewFolder.open(demo_dir).load_assessment(REVIEWER, a.study_id, a.result_id)
    return {q: x.response for q, x in stored.answers.items()} if stored else {}


async def test_an_answer_is_shown_while_its_save_still_waits(demo_dir, monkeypatch):
    app = Workbench(demo_dir, REVIEWER, ranker_factory=FixedRanker)
    async with app.run_test(size=SIZE) as pilot:
        screen, gate, qid = await _first_write_held(pilot, monkeypatch)
        assert screen.session.response(qid) == "Y"
        assert screen.last_update_at > 0, "the judgements were redrawn"
        assert qid not in _on_disk(demo_dir, screen), "not written yet: the gate is closed"
        await pilot.press("j")  # the keys still work
        assert screen.question_id != qid
        gate.opened.set()
        await app.workers.wait_for_complete()
        assert _on_disk(demo_dir, screen)[qid] == "Y"
        assert "MainThread" not in gate.threads


async def test_quick_answers_land_in_order_one_write_at_a_time(demo_dir, monkeypatch):
    app = Workbench(demo_dir, REVIEWER, ranker_factory=FixedRanker)
    async with app.run_test(size=SIZE) as pilot:
        screen, gate, qid = await _first_write_held(pilot, monkeypatch)
        await pilot.press("n", "p")  # queued behind the first write
        assert screen.session.response(qid) == "PY"
        gate.opened.set()
        await app.workers.wait_for_complete()
        assert [s[qid] for s in gate.saved] == ["Y", "PY"], "in order; the queued two in one"
        assert gate.most_at_once == 1
        assert _on_disk(demo_dir, screen)[qid] == "PY"


async def test_a_cli_write_in_between_is_kept(demo_dir, monkeypatch):
    app = Workbench(demo_dir, REVIEWER, ranker_factory=FixedRanker, prepare_in_background=False)
    async with app.run_test(size=SIZE, notifications=True) as pilot:
        screen, gate, qid = await _first_write_held(pilot, monkeypatch)
        a = screen.session.assessment
        assert qid == "1.1"
        cli = await asyncio.to_thread(
            subprocess.run,
            [sys.executable, "-m", "robtui", "assess", str(demo_dir), "--reviewer", REVIEWER,
             "--study", a.study_id, "--result", a.result_id, "--add-reviewer", "1.3=PN"],
            capture_output=True, text=True, check=False)
        assert cli.returncode == 0, cli.stderr
        gate.opened.set()
        await app.workers.wait_for_complete()
        await pilot.pause()
        on_disk = _on_disk(demo_dir, screen)
        assert on_disk["1.1"] == "Y" and on_disk["1.3"] == "PN"
        assert screen.session.response("1.3") == "PN", "the screen shows theirs too"
        assert said_on_screen(app, "changed by another robtui process")
        await pilot.press("j", "n")  # the next answer is saved on top of both
        await app.workers.wait_for_complete()
        assert _on_disk(demo_dir, screen) == {"1.1": "Y", "1.2": "N", "1.3": "PN"}


async def test_quitting_at_once_waits_for_the_save_and_says_so(demo_dir, monkeypatch):
    app = Workbench(demo_dir, REVIEWER, ranker_factory=FixedRanker)
    async with app.run_test(size=SIZE, notifications=True) as pilot:
        screen, gate = await _gated(pilot, monkeypatch)
        qid = screen.question_id
        await pilot.press("y", "ctrl+q")
        await _until(pilot, lambda: said_on_screen(app, "saving your last changes before "
                                                   "quitting"), "the wait was said")
        assert app.return_code is None, "still running: the save is not done"
        gate.opened.set()
        await _until(pilot, lambda: app.return_code is not None, "the app quit")
        assert _on_disk(demo_dir, screen)[qid] == "Y"


async def test_leaving_the_assessment_waits_for_its_saves(demo_dir, monkeypatch):
    app = Workbench(demo_dir, REVIEWER, ranker_factory=FixedRanker)
    async with app.run_test(size=SIZE) as pilot:
        screen, gate = await _gated(pilot, monkeypatch)
        qid = screen.question_id
        await pilot.press("y", "escape")
        await pilot.pause(0.1)
        assert app.screen is screen, "stays until the answer is on disk"
        gate.opened.set()
        await _until(pilot, lambda: isinstance(app.screen, OverviewScreen), "back at overview")
        assert _on_disk(demo_dir, screen)[qid] == "Y"


async def test_a_failed_save_is_said_kept_and_written_with_the_next_change(demo_dir, monkeypatch):
    app = Workbench(demo_dir, REVIEWER, ranker_factory=FixedRanker)
    async with app.run_test(size=SIZE, notifications=True) as pilot:
        screen, gate = await _gated(pilot, monkeypatch)
        gate.fail = OSError(28, "No space left on device")
        gate.opened.set()
        await pilot.press("y")
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert said_on_screen(app, "could not save the assessment")
        assert said_on_screen(app, "not saved:"), "the judgement panel says so too"
        assert screen.session.response("1.1") == "Y", "kept on screen"
        assert "1.1" not in _on_disk(demo_dir, screen)
        gate.fail = None  # space freed
        await pilot.press("j", "n")
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert _on_disk(demo_dir, screen) == {"1.1": "Y", "1.2": "N"}
        assert said_on_screen(app, "saved now")


async def test_quitting_with_a_save_that_fails_says_so_and_quits_when_asked_again(
    demo_dir, monkeypatch
):
    app = Workbench(demo_dir, REVIEWER, ranker_factory=FixedRanker)
    async with app.run_test(size=SIZE, notifications=True) as pilot:
        _screen, gate = await _gated(pilot, monkeypatch)
        gate.fail = OSError(30, "Read-only file system")
        gate.opened.set()
        await pilot.press("y", "ctrl+q")
        await _until(pilot, lambda: said_on_screen(app, "change(s) could not be saved"),
                     "the failure was said")
        assert app.return_code is None, "did not quit over unsaved work"
        await pilot.press("ctrl+q")
        await _until(pilot, lambda: app.return_code is not None, "the app quit when asked again")
