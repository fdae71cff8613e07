"""One assessment's changes written in the order the reviewer made them, by one writer at a time.

The interface shows each change at once and queues it (``SaveQueue.add``); a writer, a thread of
the front end's or the caller's own, writes what is queued (``SaveQueue.write``): the changes
still queued applied in order to the assessment as this process last read or wrote it, saved in
one write. Keys pressed while a save is under way join the next write, so a burst of keys is one
or two saves, never two saves of the same assessment at once.

The store refuses to replace a file another process changed since it was read
(``StaleFileError``). The writer then reads the file again under the review's lock, applies the
same queued changes to theirs and saves that, so neither writer's work is lost; its report says
what the other process had changed. A write that fails leaves its changes queued: the next
write (another change, leaving the assessment, quitting) tries them again.

Textual-free: robtui.tui.session uses it, the assessment screen runs the writer in a worker.
"""

from __future__ import annotations

import threading
from collections.abc import Callable
from dataclasses import dataclass
from functools import reduce

from robtui.core.model import Assessment
from robtui.errors import RobtuiError
from robtui.files import StaleFileError

Change = Callable[[Assessment], Assessment]


@dataclass(frozen=True)
class WriteReport:
    """What one write did, for the reviewer.

    ``reloaded``: another process had changed the file, which was read again (what it changed,
    what of theirs this write replaced). ``refused``: changes that could not be made on top of
    theirs, each with why (they are dropped). ``error``: nothing was written (the changes stay
    queued). ``changed_view``: what the interface shows must be built again (``SaveQueue.view``).
    """

    written: int = 0  # changes written
    reloaded: str | None = None
    refused: tuple[str, ...] = ()
    error: str | None = None

    @property
    def changed_view(self) -> bool:
        return self.reloaded is not None or bool(self.refused)


class SaveQueue:
    """The changes of one assessment not yet on disk, and the assessment as on disk."""

    def __init__(self, folder, on_disk: Assessment) -> None:
        self.folder = folder
        self._on_disk = on_disk  # as this process last read or wrote the file
        self._queued: list[Change] = []
        self._state = threading.Lock()  # guards _on_disk, _queued, _writer_wanted
        self._one_writer = threading.Lock()  # held for a whole write: one writer at a time
        self._writer_wanted = False  # a writer was asked for and has not finished

    def add(self, change: Change) -> bool:
        """Queue a change (already shown); True when no writer is under way: start one."""
        with self._state:
            self._queued.append(change)
            start = not self._writer_wanted
            self._writer_wanted = True
            return start

    def retry(self) -> bool:
        """True (and a writer counts as asked for) when changes are queued and no writer is
        under way: after a failed write, start one to try them again."""
        with self._state:
            start = bool(self._queued) and not self._writer_wanted
            self._writer_wanted = self._writer_wanted or start
            return start

    @property
    def queued(self) -> int:
        with self._state:
            return len(self._queued)

    @property
    def writing(self) -> bool:
        """A writer was asked for and has not finished."""
        with self._state:
            return self._writer_wanted

    def view(self) -> Assessment:
        """What the reviewer's changes make of the file as on disk: the queued changes applied
        to it in order (one that no longer applies is left out; its write reports it)."""
        with self._state:
            on_disk, queued = self._on_disk, list(self._queued)
        return _apply(queued, on_disk)[0]

    def write(self, report: Callable[[WriteReport], None] | None = None) -> list[WriteReport]:
        """Write what is queued until nothing is (changes queued meanwhile go in the next
        write), calling ``report`` after each write; stops at the first failure, leaving its
        changes queued. Any thread; one writer at a time."""
        reports: list[WriteReport] = []
        with self._one_writer:
            try:
                while True:
                    with self._state:
                        batch = list(self._queued)
                        if not batch:
                            self._writer_wanted = False
                            return reports
                    done = self._write(batch)
                    reports.append(done)
                    if done.error is not None:
                        with self._state:
                            self._writer_wanted = False
                    if report is not None:
                        report(done)
                    if done.error is not None:
                        return reports
            except BaseException:
                with self._state:
                    self._writer_wanted = False
                raise

    def _write(self, batch: list[Change]) -> WriteReport:
        with self._state:
            mine = self._on_disk
        target, refused = _apply(batch, mine)
        try:
            self.folder.save_assessment(target)
        except StaleFileError:
            return self._write_on_theirs(batch, mine)
        except (RobtuiError, OSError) as error:
            return WriteReport(error=f"could not save the assessment: {error}")
        self._written(batch, target)
        return WriteReport(written=len(batch), refused=refused)

    def _write_on_theirs(self, batch: list[Change], mine: Assessment) -> WriteReport:
        """Another process changed the file: read theirs under the lock, apply the batch to
        it, save that."""
        a = mine
        try:
            with self.folder.locked():
                theirs = self.folder.load_assessment(a.reviewer, a.study_id, a.result_id)
                if theirs is None:
                    path = self.folder.assessment_path(a.reviewer, a.study_id, a.result_id)
                    return WriteReport(error=(
                        f"{path} was removed by another process: your last change is not "
                        "saved yet (the next one writes the file again with all your answers)"
                    ))
                with self._state:  # from now on, theirs is what this process read
                    self._on_disk = theirs
                target, refused = _apply(batch, theirs)
                self.folder.save_assessment(target)
        except (RobtuiError, OSError) as error:
            return WriteReport(reloaded=None, error=f"could not save the assessment: {error}")
        self._written(batch, target)
        return WriteReport(written=len(batch), reloaded=reloaded_message(mine, theirs, target),
                           refused=refused)

    def _written(self, batch: list[Change], target: Assessment) -> None:
        with self._state:
            self._on_disk = target
            del self._queued[: len(batch)]


def _apply(changes: list[Change], start: Assessment) -> tuple[Assessment, tuple[str, ...]]:
    """``changes`` applied to ``start`` in order; those that raise are left out, with why."""
    refused: list[str] = []

    def step(a: Assessment, change: Change) -> Assessment:
        try:
            return change(a)
        except RobtuiError as error:
            refused.append(f"a change was not made on top of theirs: {error}")
            return a

    return reduce(step, changes, start), tuple(refused)


def reloaded_message(mine: Assessment, theirs: Assessment, saved: Assessment) -> str:
    """What the reviewer is told when another process had changed the file: which answers
    that process changed, and whose answer (Y, PY, ...) this change then replaced."""
    changed = sorted(
        q for q in set(mine.answers) | set(theirs.answers)
        if mine.answers.get(q) != theirs.answers.get(q)
    )
    text = "this assessment was changed by another robtui process or an editor"
    if changed:
        text += f" (answers to {', '.join(changed)})"
    text += ": it was read again and your change was saved on top of theirs"
    replaced = [
        f"{q} {_shown(theirs, q)} → {_shown(saved, q)}"
        for q in changed
        if _shown(saved, q) != _shown(theirs, q)
    ]
    if replaced:
        text += f"; yours replaced theirs: {', '.join(replaced)}"
    return text


def _shown(assessment: Assessment, question_id: str) -> str:
    answer = assessment.answers.get(question_id)
    return (answer.response if answer else None) or "no answer"
