"""A line at the foot of the overview: the reports being prepared in the background.

It follows the app's ``preparation`` (a PrepareProgress, set from the background worker) and
shows reports done, pages per second and time left; once everything is prepared it says so
and failures are named (they stay listed in the notes of the app's ``preparation_failures``).
"""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import Label, ProgressBar

from robtui.workspace.preparing import PrepareProgress, describe_progress


class PreparationBar(Horizontal):
    """Progress of the background preparation; hidden when there is nothing to prepare."""

    DEFAULT_CSS = """
    PreparationBar {
        height: 1;
        display: none;
    }
    PreparationBar.-active {
        display: block;
    }
    PreparationBar Label {
        width: auto;
        padding: 0 1;
    }
    PreparationBar ProgressBar {
        width: 16;
    }
    """

    def compose(self) -> ComposeResult:
        yield Label("Preparing", id="preparation-title")
        yield ProgressBar(show_percentage=False, show_eta=False, id="preparation-progress")
        yield Label("", id="preparation-text")

    def on_mount(self) -> None:
        self.watch(self.app, "preparation", self.show, init=True)

    def show(self, state: PrepareProgress | None) -> None:
        if state is None or (state.total == 0 and not getattr(self.app, "preparation_done",
                                                                False)):
            self.remove_class("-active")
            return
        self.add_class("-active")
        bar = self.query_one(ProgressBar)
        bar.update(total=max(state.total, 1), progress=state.done)
        done = getattr(self.app, "preparation_done", False)
        title = "Prepared" if done else "Preparing"
        self.query_one("#preparation-title", Label).update(title)
        text = describe_progress(state)
        if done:
            count = len(getattr(self.app, "preparation_failures", []))
            failed = f"; {count} could not be read (see the evidence map: e)" if count else ""
            text = f"{state.done} of {state.total} reports in this session{failed}"
        self.query_one("#preparation-text", Label).update(text)
