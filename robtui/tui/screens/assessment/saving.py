"""Saving on the assessment screen without holding up the keys: each change is shown at once and
queued (robtui.tui.save_queue); one worker thread writes the queue in the order the reviewer made
the changes, fsync included, and reports back with a message. Leaving the screen and quitting
wait until the queue is on disk (and say so when that takes a moment); a write that failed is
tried again then, and when it fails again the reviewer is told and stays, unless they insist.

A mixin of AssessmentScreen (it uses the screen's session, ``refresh_form`` and
``_refresh_judgements``).
"""

from __future__ import annotations

import asyncio

from textual import work
from textual.message import Message

from robtui.tui.save_queue import WriteReport

WAIT_STEP = 0.01  # seconds between looks at the writer while waiting for it
SAY_WAITING_AFTER = 0.3  # seconds of waiting before the reviewer is told why


class Saving:
    """The screen's writer of the session's save queue."""

    _leave_unsaved = False  # the reviewer was told changes could not be saved, and may leave

    class Written(Message):
        """A write of the save queue is done (posted from the writer's thread)."""

        def __init__(self, report: WriteReport) -> None:
            super().__init__()
            self.report = report

    def start_saving_in_background(self) -> None:
        """From now on the session's changes are written by this screen's worker."""
        self.session.start_writer = self._write_queue

    @work(thread=True, group="saving", exit_on_error=False)
    def _write_queue(self) -> None:
        try:
            self.session.saves.write(lambda report: self.post_message(self.Written(report)))
        except Exception as error:  # noqa: BLE001 - a fault must reach the reviewer, not vanish
            self.post_message(self.Written(WriteReport(
                error=f"could not save the assessment: {error!r}")))

    def on_saving_written(self, event: Written) -> None:
        report, failed_before = event.report, self.session.unsaved_error
        self.session.settle(report)  # a reload is said by the screen's on_reloaded
        for refusal in report.refused:
            self.notify(refusal, severity="warning", markup=False)
        if report.changed_view:
            self.call_after_refresh(self.refresh_form, self.question_id)
        if report.error:
            self.notify(f"{report.error}. Your change is kept here and saved with the next "
                        "one, or when you leave.", severity="error", markup=False)
        elif failed_before:
            self._leave_unsaved = False
            self.notify("saved now: every change so far is on disk")
        if report.error or failed_before:
            self._refresh_judgements()  # the panel's 'not saved' line

    def saves_outstanding(self) -> bool:
        saves = self.session.saves
        return saves.writing or saves.queued > 0

    async def saves_written(self, leaving: str) -> bool:
        """Wait until every queued change is on disk (retrying failed ones); True when they
        are. Says so when it takes a moment; says what failed when it did."""
        saves = self.session.saves
        if saves.retry():
            self._write_queue()
        waited, told = 0.0, False
        while saves.writing:
            await asyncio.sleep(WAIT_STEP)
            waited += WAIT_STEP
            if waited >= SAY_WAITING_AFTER and not told:
                told = True
                self.notify(f"saving your last changes before {leaving} …")
        if saves.queued == 0:
            return True
        self._leave_unsaved = True
        self.notify(
            f"{saves.queued} change(s) could not be saved ({self.session.unsaved_error}); "
            f"fix the problem and try again, or repeat the key to go on {leaving} without them",
            severity="error", markup=False, timeout=15)
        return False

    def leave_when_saved(self) -> None:
        """Back to the overview once every change is on disk (at once when it already is)."""
        if self._leave_unsaved or not self.saves_outstanding():
            self.dismiss(None)
        else:
            self._leave_after_saving()

    @work(group="leaving", exclusive=True)
    async def _leave_after_saving(self) -> None:
        if await self.saves_written("leaving") and self.app.screen is self:
            self.dismiss(None)

    def on_unmount(self) -> None:
        """Last resort: whatever is still queued is written now (normally nothing is)."""
        if self.session.saves.queued and not self._leave_unsaved:
            self.session.saves.write()
