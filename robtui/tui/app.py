"""The workbench app: one reviewer's sessions on a review folder.

``run_workbench(folder, reviewer)`` is the entry point used by ``robtui open`` and
``robtui demo``.
"""

from __future__ import annotations

import dataclasses
import threading
from collections.abc import Callable, Iterable
from functools import partial
from pathlib import Path
from typing import Any, ClassVar

from textual.app import App, SystemCommand
from textual.binding import Binding, BindingType
from textual.notifications import SeverityLevel
from textual.reactive import reactive
from textual.screen import Screen

from robtui.errors import RobtuiError
from robtui.store.review_folder import ReviewFolder
from robtui.tui.report_loading import shared_ranker
from robtui.tui.screens.assessment import AssessmentScreen
from robtui.tui.screens.compare import CompareScreen
from robtui.tui.screens.dialogs import ListDialog
from robtui.tui.screens.help import HelpScreen
from robtui.tui.screens.overview import OverviewScreen
from robtui.tui.screens.start import ProblemScreen, ReviewerScreen
from robtui.tui.session import ReviewSession


class Workbench(App[int]):
    """robtui's assessment workbench."""

    # The background preparation of the review's reports (None: none running or done).
    preparation: reactive[object | None] = reactive(None, always_update=True)

    CSS_PATH = "workbench.tcss"
    TITLE = "robtui workbench"
    ENABLE_COMMAND_PALETTE = True
    # Screens get these classes from the terminal's size; the CSS lays out compactly on
    # "-narrow" (one pane at a time) and "-short" (shorter fields) terminals.
    HORIZONTAL_BREAKPOINTS: ClassVar[list[tuple[int, str]]] = [
        (0, "-narrow"),
        (100, "-medium"),
        (140, "-wide"),
    ]
    VERTICAL_BREAKPOINTS: ClassVar[list[tuple[int, str]]] = [(0, "-short"), (28, "-tall")]
    BINDINGS: ClassVar[list[BindingType]] = [
        Binding("ctrl+p", "command_palette", "Commands"),
        Binding("ctrl+q", "quit", "Quit", priority=True),
        Binding("f1", "help", "Help", show=False),
    ]

    def notify(
        self,
        message: str,
        *,
        title: str = "",
        severity: SeverityLevel = "information",
        timeout: float | None = None,
        markup: bool = False,
    ) -> None:
        """A toast; never markup: messages carry user text (ids, labels, searches, paths)."""
        super().notify(message, title=title, severity=severity, timeout=timeout, markup=False)

    def __init__(
        self,
        folder: Path | ReviewFolder,
        reviewer: str | None = None,
        *,
        ranker_factory: Callable[[], Any] = shared_ranker,
        prepare_in_background: bool = False,
        freeze_startup_objects: bool = False,
    ) -> None:
        super().__init__()
        self.prepare_in_background = prepare_in_background
        self.freeze_startup_objects = freeze_startup_objects
        self.preparation_done = False
        self.preparation_failures: list[str] = []
        self._preparation_cancel = threading.Event()
        self.closing = threading.Event()  # set when the app ends
        self._quit_unsaved = False  # told that changes could not be saved: ctrl+q quits anyway
        if prepare_in_background or ranker_factory is shared_ranker:
            # Reports are prepared in worker processes (in the background, and a long PDF when
            # it is opened: report_loading.prepare_apart). multiprocessing's resource tracker is
            # started with the process's stderr, which the running app replaces; start it now,
            # while stderr is still the terminal's.
            from multiprocessing import resource_tracker

            resource_tracker.ensure_running()
        self.folder_arg = folder
        self.reviewer = reviewer
        self.ranker_factory = ranker_factory
        self.folder: ReviewFolder | None = folder if isinstance(folder, ReviewFolder) else None
        self.session: ReviewSession | None = None

    def on_mount(self) -> None:
        self.theme = "textual-dark"
        if self.freeze_startup_objects:
            self.call_after_refresh(_freeze_startup_objects)
        if self.folder is None:
            try:
                self.folder = ReviewFolder.open(Path(self.folder_arg))
            except RobtuiError as error:
                self.push_screen(ProblemScreen(str(error)))
                return
        if self.reviewer:
            self._start(self.reviewer)
        else:
            review = self.folder.review
            listed = list(review.reviewers)
            if review.lead and review.lead not in listed:
                listed.append(review.lead)
            self.push_screen(ReviewerScreen(self.folder.review.title, listed), self._start)

    def _start(self, reviewer: str | None) -> None:
        if not reviewer or self.folder is None:
            return
        try:
            self.session = ReviewSession(self.folder, reviewer)
        except RobtuiError as error:
            self.push_screen(ProblemScreen(str(error)))
            return
        self.reviewer = self.session.reviewer
        self.sub_title = f"{self.folder.review.title} · {self.session.reviewer}"
        self.push_screen(OverviewScreen(self.session))
        if self.prepare_in_background:
            self.start_preparation()

    # -- reports prepared in the background ------------------------------------------
    def start_preparation(self) -> None:
        """Read and rank every report of the review in worker processes, in a thread of its
        own, so the reviewer can work meanwhile; what is already prepared is skipped."""
        self._preparation_cancel.clear()
        self.preparation_done = False
        self.run_worker(self._prepare_reports, thread=True, group="preparation",
                        exclusive=True, exit_on_error=False)

    def _prepare_reports(self) -> None:
        from robtui.workspace.preparing import jobs_for_review, prepare

        folder = self.folder
        if folder is None:
            return
        jobs, problems = jobs_for_review(folder)

        def show(state) -> None:
            if not self._preparation_cancel.is_set():
                self.call_from_thread(self._show_preparation, dataclasses.replace(state))

        summary = prepare(jobs, progress=show, cancel=self._preparation_cancel, background=True)
        if self._preparation_cancel.is_set():
            return
        failures = [f"{o.label}: {o.error}" for o in [*problems, *summary.failures]]
        self.call_from_thread(self._preparation_finished, failures)

    def _show_preparation(self, state) -> None:
        self.preparation = state

    def _preparation_finished(self, failures: list[str]) -> None:
        self.preparation_done = True
        self.preparation_failures = failures
        self.preparation = self.preparation  # shows the final line
        if failures:
            self.notify(f"{len(failures)} report(s) could not be prepared: "
                        + "; ".join(failures[:3]), severity="warning", timeout=8)

    def on_unmount(self) -> None:
        self._preparation_cancel.set()
        self.closing.set()  # a report being read apart (report_loading.prepare_apart) stops

    # -- navigation used by the screens ----------------------------------------------
    def open_result(self, study_id: str, result_id: str) -> None:
        """Open this reviewer's assessment of a result (asking the effect when new)."""
        session = self.session
        assert session is not None
        try:
            existing = session.load(study_id, result_id)
        except RobtuiError as error:
            self.push_screen(
                ListDialog(
                    "This assessment cannot be opened",
                    [str(error)],
                    "The file was left exactly as it is. Repair or move it aside, then reopen "
                    "the result; the rest of the review is usable.",
                )
            )
            return
        if existing is not None:
            self.push_screen(AssessmentScreen(existing))
            return
        try:  # the effect of interest is the result's: never asked here
            started = session.start(study_id, result_id)
        except RobtuiError as error:
            self.notify(str(error), severity="error")
            return
        self.push_screen(AssessmentScreen(started))

    def open_comparison(self) -> None:
        session = self.session
        if session is None:
            return
        if not session.is_lead:
            self.notify(
                "Only the review's lead sees the comparison of reviewers.", severity="warning"
            )
            return
        self.push_screen(CompareScreen(session))

    async def action_quit(self) -> None:
        """Quit once every change is on disk: what was typed is queued, the queue written
        (the reviewer is told when that takes a moment, and what failed; ctrl+q again then
        quits without it)."""
        screens = [s for s in self.screen_stack if isinstance(s, AssessmentScreen)]
        for screen in screens:
            screen.save_pending()
        if self._quit_unsaved or not any(s.saves_outstanding() for s in screens):
            self._quit_now()
            return
        self.run_worker(self._quit_when_saved(screens), group="quitting", exclusive=True)

    async def _quit_when_saved(self, screens: list[AssessmentScreen]) -> None:
        saved = [await screen.saves_written("quitting") for screen in screens]
        if all(saved):
            self._quit_now()
        else:
            self._quit_unsaved = True

    def _quit_now(self) -> None:
        self._preparation_cancel.set()  # the workers end at once; prepared reports are kept
        self.exit()

    def action_help(self) -> None:
        """The key map, with the domain keys of the study being assessed (else of every
        question set the review uses)."""
        if isinstance(self.screen, HelpScreen):
            return
        from robtui.tui.keys import key_map_for

        if isinstance(self.screen, AssessmentScreen):
            sets = [self.screen.session.qset]
        elif self.session is not None:
            sets = self.session.sets.in_use([s.id for s in self.session.review.studies])
        else:
            sets = []
        self.push_screen(HelpScreen(key_map_for(sets, AssessmentScreen.taken_keys())))

    # -- command palette ---------------------------------------------------------------
    def get_system_commands(self, screen: Screen) -> Iterable[SystemCommand]:
        yield from super().get_system_commands(screen)
        yield SystemCommand("Help: workbench keys", "All keys of the workbench", self.action_help)
        if isinstance(screen, OverviewScreen):
            yield SystemCommand(
                "Assess the selected result", "Open it", screen.action_open_selected
            )
            yield SystemCommand(
                "Filter by status", "Next status filter", screen.action_cycle_filter
            )
            yield SystemCommand(
                "Evidence map", "Studies x questions: where the prepared reports hold evidence",
                screen.action_evidence_map,
            )
            if self.session and self.session.is_lead:
                yield SystemCommand(
                    "Compare reviewers", "The lead's side-by-side comparison", self.open_comparison
                )
        if isinstance(screen, (AssessmentScreen, CompareScreen)):
            for title, help_text, action in screen.palette_commands():
                yield SystemCommand(title, help_text, partial(screen.run_action, action))


def _freeze_startup_objects() -> None:
    """Keep what exists once the first screen is up (modules, classes, the review) out of
    Python's full garbage collections: gc.freeze() (Python's gc module documentation). A
    full collection holds every thread, the interface's too, for as long as it takes to look
    at each object; in a workbench with a 15-page report open it took 81-86 ms of CPU, 29-30
    ms with these objects frozen (measured with gc.collect(2) at 140x42). Only a process that
    runs one workbench freezes: objects frozen are never collected as cycles."""
    import gc

    gc.freeze()


def run_workbench(folder: Path, reviewer: str | None = None) -> int:
    """Run the workbench on a review folder; returns the exit code.

    Raises the folder's RobtuiError (not a review, unreadable review.toml) before the
    terminal is taken over, so the CLI can print it.
    """
    opened = ReviewFolder.open(Path(folder))
    if reviewer is not None:
        from robtui.workspace import check_reviewer_name

        reviewer = check_reviewer_name(reviewer)
    result = Workbench(opened, reviewer, prepare_in_background=True,
                       freeze_startup_objects=True).run()
    return int(result or 0)
