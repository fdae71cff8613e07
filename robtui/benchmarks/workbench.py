"""robtui bench workbench: how quickly the workbench responds.

Prints (figures, not pass/fail):
- start to first screen: a fresh process importing the app and showing the review overview
  (headless), and the same inside a warm process;
- keystroke to updated judgement (target <= 50 ms): the time from the answer key's action to
  the proposed domain and overall judgements being updated on screen; Pilot's full round trip
  per key (an upper bound that includes Pilot's own idle waits); keys due as a quick
  typist's (every 100 ms), from when each was due to its judgement updated, with the event
  loop's longest stall meanwhile;
- how long the saves of those keys held up the interface: each write of the assessment (atomic,
  fsync included) timed on the interface's thread (where the keys wait for it) and in the
  writer thread (where they do not);
- Python's full garbage collections meanwhile (each holds every thread, the interface's too);
- opening a ~15-page two-column PDF (or a real one: --pdf) to its first suggestions: read (not
  cached) and ranked in the worker, and reopened (from the reader's cache); the longest stall
  of the UI's event loop until the report is shown (its first screens laid out; the rest is
  laid out as the reviewer moves on) shows whether the interface stayed
  responsive, and the CPU time of the UI's thread over the same span what the interface itself
  spent (steadier than wall-clock stalls when other processes share the cores); then answer
  keys pressed during another first open, key due to judgement updated (the wait for the
  event loop included). The reader's cache is a fresh folder.

The PDF is rendered from articles of the shared CONSORT-TM corpus (Kilicoglu et al., J Biomed
Inform 2021;116:103717) when present, else from the bundled sample reports.
"""

from __future__ import annotations

import argparse
import asyncio
import gc
import itertools
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import threading
import time
import uuid
from dataclasses import dataclass
from pathlib import Path
from typing import Self

from robtui.reading.cache import CACHE_ENV

SIZE = (140, 42)
REVIEWER = "bench"
# As `robtui open` runs it: what exists once the first screen is up kept out of full garbage
# collections (tui/app.py); --no-freeze runs the workbench without.
FREEZE = True

_CHILD = """
import time; t0 = time.perf_counter()
import asyncio, sys
from pathlib import Path
from robtui.tui.app import Workbench
from robtui.tui.screens.overview import OverviewScreen
async def main():
    app = Workbench(Path(sys.argv[1]), "bench")
    async with app.run_test(size=(140, 42)) as pilot:
        while not isinstance(app.screen, OverviewScreen):
            await asyncio.sleep(0.001)
        await pilot.pause()
        print(time.perf_counter() - t0)
asyncio.run(main())
"""


def _ms(seconds: float) -> str:
    return f"{seconds * 1000:.1f} ms"


def _spread(values: list[float]) -> str:
    values = sorted(values)
    p95 = values[min(len(values) - 1, round(0.95 * (len(values) - 1)))]
    return (
        f"median {_ms(statistics.median(values))}, p95 {_ms(p95)}, max {_ms(values[-1])} "
        f"(n={len(values)})"
    )


def _text_source() -> tuple[list[str], str]:
    from robtui.evidence.training.corpus import default_corpus_dir, load_corpus

    corpus = default_corpus_dir()
    if corpus:
        articles = load_corpus(corpus)
        article = max(articles, key=lambda a: len(a.text))  # the longest: fewest repeats
        return [article.text], f"CONSORT-TM article {article.id}"
    from robtui.paths import bundled_dir

    texts = sorted(bundled_dir("sample_reports").rglob("*.txt"))
    return [t.read_text(encoding="utf-8") for t in texts], "bundled sample reports"


def _make_pdf(workdir: Path, pages: int) -> tuple[Path, int, str]:
    """A two-column PDF of about ``pages`` pages: the text cut (at a line) to fit."""
    from robtui.devtools.pdf_writer import blocks_from_lines, render_blocks_as_pdf

    source, origin = _text_source()
    # A line of its own makes the file new to the reader's cache: the first open is cold.
    text = "\n".join([f"Benchmark copy {uuid.uuid4().hex}", *source])
    pdf = workdir / "bench-report.pdf"
    got = render_blocks_as_pdf(blocks_from_lines(text, 3), pdf)
    for _ in range(3):
        if got == pages:
            break
        text = (text + "\n") * 2 if got < pages else text
        cut = text[: int(len(text) * pages / max(got, 1))]
        got = render_blocks_as_pdf(blocks_from_lines(cut[: cut.rfind("\n")], 3), pdf)
        if got <= pages:
            text = cut
    return pdf, got, origin


async def _first_screen_warm(root: Path) -> float:
    from robtui.tui.app import Workbench
    from robtui.tui.screens.overview import OverviewScreen

    started = time.perf_counter()
    app = Workbench(root, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        while not isinstance(app.screen, OverviewScreen):
            await asyncio.sleep(0.001)
        await pilot.pause()
        return time.perf_counter() - started


async def _open_row(pilot, study_id: str):
    from robtui.tui.screens.assessment import AssessmentScreen

    app = pilot.app
    overview = app.screen
    keys = [r.study_id for r in overview.rows.values()]
    table = overview.query_one("#results")
    table.move_cursor(row=keys.index(study_id))
    await pilot.press("enter")
    await pilot.pause()
    assert isinstance(app.screen, AssessmentScreen)
    return app.screen


class _SaveClock:
    """Stands in for a folder's ``save_assessment``: times every write and notes whether it ran
    on the interface's thread (where it holds up the keys) or in a writer thread."""

    def __init__(self, folder) -> None:
        self._save = folder.save_assessment
        self.on_ui: list[float] = []
        self.in_writer: list[float] = []
        self._ui_thread = threading.get_ident()

    def __call__(self, assessment):
        started = time.perf_counter()
        try:
            return self._save(assessment)
        finally:
            took = time.perf_counter() - started
            on_ui = threading.get_ident() == self._ui_thread
            (self.on_ui if on_ui else self.in_writer).append(took)


@dataclass
class Keying:
    """Answer keys on an opened assessment: Pilot's presses, then keys due as a quick
    typist's (KEY_INTERVAL apart) while the saves go on."""

    handler: list[float]  # key action -> judgements updated
    round_trip: list[float]  # Pilot's press, idle waits included
    posted: list[float]  # key due -> judgement updated
    stall: float  # the event loop's longest stall while the keys were pressed
    saves: _SaveClock


async def _keystrokes(root: Path, study_id: str, count: int) -> Keying:
    from robtui.tui.app import Workbench

    app = Workbench(root, REVIEWER, freeze_startup_objects=FREEZE)
    handler, round_trip = [], []
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        screen = await _open_row(pilot, study_id)
        await app.workers.wait_for_complete()
        await pilot.pause()
        saves = _SaveClock(screen.session.folder)
        screen.session.folder.save_assessment = saves  # this instance only
        for i in range(count):
            started = time.perf_counter()
            await pilot.press("y" if i % 2 else "n")
            round_trip.append(time.perf_counter() - started)
            handler.append(screen.last_update_seconds)
        ticks: list[float] = []
        timer = screen.set_interval(0.005, lambda: ticks.append(time.perf_counter()))
        typist = _Typist()
        for _ in range(count):
            await typist.press(app, screen)
        timer.stop()
        await app.workers.wait_for_complete()
        gaps = [b - a for a, b in itertools.pairwise(ticks)] or [0.0]
    return Keying(handler, round_trip, typist.latencies, max(gaps), saves)


KEY_INTERVAL = 0.1  # seconds between answer keys pressed during an opening (a quick typist)


async def _answer_key(app, screen, key: str, due: float, timeout: float = 5.0) -> float | None:
    """Post an answer key as the terminal would and wait for its judgement: seconds from when
    the key was due (a typist pressed it; the bench's own coroutine may only get to post it
    after a stall of the event loop, as a real key waits in the driver's queue) to the
    judgement updated (None if it was not updated within ``timeout``). Pilot's press is not
    used here: it waits for the whole process to fall idle, worker too."""
    from textual import events

    posted = time.perf_counter()
    app.post_message(events.Key(key, key))
    while screen.last_update_at <= posted:
        if time.perf_counter() - posted > timeout:
            return None
        await asyncio.sleep(0.001)
    return screen.last_update_at - min(due, posted)


class _Typist:
    """Answer keys due every KEY_INTERVAL seconds from the first."""

    def __init__(self) -> None:
        self.due = time.perf_counter()
        self.latencies: list[float] = []

    async def press(self, app, screen) -> None:
        """Wait until the next key is due (at once if it is overdue), press it, time it."""
        await asyncio.sleep(max(0.0, self.due - time.perf_counter()))
        key = "y" if len(self.latencies) % 2 else "n"
        latency = await _answer_key(app, screen, key, self.due)
        if latency is not None:
            self.latencies.append(latency)
        self.due = max(self.due + KEY_INTERVAL, time.perf_counter())


@dataclass
class Opening:
    """One opening of the PDF's result: to first suggestions, the UI loop's longest stall, and
    the answer keys pressed meanwhile (key due -> judgement updated, waits included)."""

    seconds: float
    stall: float
    pages: int
    sentences: int
    parts: dict
    keys: list[float]
    ui_cpu: float = 0.0  # CPU seconds of the interface's thread until the report is shown
    saves: _SaveClock | None = None  # the writes of the answer keys
    stall_cpu: float = 0.0  # CPU seconds of the interface's thread within the longest stall
    turn_cpu: float = 0.0  # the most CPU the interface's thread spent between two ticks


async def _open_pdf(root: Path, study_id: str, *, keys: bool = False) -> Opening:
    """Open the result and wait for its suggestions (and the report laid out); with ``keys``,
    answer keys are pressed while the worker reads and ranks, as a reviewer would."""
    from robtui.tui.app import Workbench

    app = Workbench(root, REVIEWER, freeze_startup_objects=FREEZE)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        ticks: list[tuple[float, float]] = []
        started = time.perf_counter()
        cpu_started = time.thread_time()  # this thread runs the event loop: the interface
        screen = await _open_row(pilot, study_id)
        typist = _Typist()  # the first key is due once the screen is there
        saves = _SaveClock(screen.session.folder)
        screen.session.folder.save_assessment = saves
        timer = screen.set_interval(
            0.005, lambda: ticks.append((time.perf_counter(), time.thread_time())))
        view = screen.query_one("#report")
        elapsed = None
        while elapsed is None or not view.laid_out:
            if screen.loaded and screen.loaded[0].document is None:
                raise SystemExit(f"the benchmark PDF could not be read: {screen.loaded[0].problem}")
            if keys:
                await typist.press(app, screen)
            if elapsed is None and screen.loaded and screen.loaded[0].suggestions:
                await pilot.pause()
                elapsed = time.perf_counter() - started
            await asyncio.sleep(0.002)
        await pilot.pause()
        ui_cpu = time.thread_time() - cpu_started
        timer.stop()
        await app.workers.wait_for_complete()
        gaps = [(b[0] - a[0], b[1] - a[1]) for a, b in itertools.pairwise(ticks)] or [(0.0, 0.0)]
        document = screen.loaded[0].document
        return Opening(elapsed, max(gaps)[0], document.pages or 0, len(document.sentences),
                       screen.loaded[0].seconds, typist.latencies, ui_cpu, saves,
                       max(gaps)[1], max(cpu for _, cpu in gaps))


class _FullCollections:
    """Python's full garbage collections (generation 2) while it is on: each one's wall time
    and thread. A full collection holds the interpreter lock throughout, so every thread,
    the interface's too, waits for it (gc.callbacks, Python's gc module documentation)."""

    def __init__(self) -> None:
        self.seen: list[tuple[float, str]] = []
        self._started: dict[int, float] = {}

    def _callback(self, phase: str, info: dict) -> None:
        if info.get("generation") != 2:
            return
        key = threading.get_ident()
        if phase == "start":
            self._started[key] = time.perf_counter()
        elif key in self._started:
            took = time.perf_counter() - self._started.pop(key)
            self.seen.append((took, threading.current_thread().name))

    def __enter__(self) -> Self:
        gc.callbacks.append(self._callback)
        return self

    def __exit__(self, *_: object) -> None:
        gc.callbacks.remove(self._callback)

    def line(self) -> str:
        if not self.seen:
            return "none"
        longest = max(self.seen)
        return (f"{len(self.seen)}, {_ms(sum(t for t, _ in self.seen))} in all, longest "
                f"{_ms(longest[0])} (in {longest[1]})")


def _print_saves(saves: _SaveClock, keys: int) -> None:
    """How long the saves of those keys held up the interface (fsync included)."""
    print(f"saves of those {keys} answer keys: {len(saves.on_ui) + len(saves.in_writer)} writes "
          "(keys given while a write is under way go in the next one)")
    if saves.on_ui:
        print(f"  on the interface's thread (the keys wait): {_spread(saves.on_ui)}, "
              f"{_ms(sum(saves.on_ui))} in all  [target: none over 50 ms]")
    else:
        print("  on the interface's thread (the keys wait): none")
    if saves.in_writer:
        print(f"  in the writer thread (the keys go on):     {_spread(saves.in_writer)}")


def _parts(pdf: Path) -> tuple[float, float]:
    """Reading without the cache and ranking alone, for the same PDF."""
    from robtui.reading.reader import read_document
    from robtui.tui.report_loading import SUGGESTIONS_PER_QUESTION, shared_ranker

    started = time.perf_counter()
    document = read_document(pdf, use_cache=False)
    read = time.perf_counter() - started
    ranker = shared_ranker()
    started = time.perf_counter()
    ranker.rank(document, top=SUGGESTIONS_PER_QUESTION)
    return read, time.perf_counter() - started


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="robtui bench workbench", description=__doc__)
    parser.add_argument("--pages", type=int, default=15, help="pages of the benchmark PDF")
    parser.add_argument("--keys", type=int, default=40, help="answer keystrokes to time")
    parser.add_argument("--pdf", type=Path, default=None,
                        help="open this PDF (a real article) instead of a rendered one")
    parser.add_argument("--no-freeze", action="store_true",
                        help="leave the objects of the workbench's start in Python's full "
                             "garbage collections (robtui open freezes them)")
    args = parser.parse_args(argv)
    if args.pdf is not None and not args.pdf.is_file():
        from robtui.errors import InputError

        raise InputError(f"--pdf {args.pdf}: no such file")
    global FREEZE
    FREEZE = not args.no_freeze
    saved_cache = os.environ.get(CACHE_ENV)
    try:
        return _run(args)
    finally:
        if saved_cache is None:
            os.environ.pop(CACHE_ENV, None)
        else:
            os.environ[CACHE_ENV] = saved_cache


def _run(args: argparse.Namespace) -> int:
    from robtui.store.demo import build_demo_review
    from robtui.store.review_folder import ReviewFolder
    from robtui.tui import report_loading

    with tempfile.TemporaryDirectory(prefix="robtui-bench-workbench-") as tmp:
        workdir = Path(tmp)
        root = workdir / "review"
        folder = build_demo_review(root)
        os.environ[CACHE_ENV] = str(workdir / "cache")  # cold on first open, whatever was read
        if args.pdf is None:
            pdf, _pages, origin = _make_pdf(workdir, args.pages)
        else:
            pdf, origin = workdir / args.pdf.name, args.pdf.name
            shutil.copyfile(args.pdf, pdf)
        folder.add_study("bench-pdf", "Benchmark PDF", [pdf])
        folder = ReviewFolder.open(root)
        first_study = folder.review.studies[0].id

        python = time.perf_counter()
        subprocess.run([sys.executable, "-c", "pass"], check=True)
        python = time.perf_counter() - python
        child = subprocess.run(
            [sys.executable, "-c", _CHILD, str(root)], check=True, capture_output=True, text=True
        )
        cold = float(child.stdout.strip().splitlines()[-1])
        warm = asyncio.run(_first_screen_warm(root))
        print("start to first screen (review overview, headless, 140x42)")
        print(f"  fresh process, imports included: {_ms(cold)} (+ {_ms(python)} interpreter start)")
        print(f"  warm process:                    {_ms(warm)}")

        with _FullCollections() as collections_keys:
            keying = asyncio.run(_keystrokes(root, first_study, args.keys))
        print("keystroke to updated judgement (answer key on question 1.1, saved each time; "
              f"start's objects {'frozen' if FREEZE else 'not frozen (--no-freeze)'})")
        print(f"  key action -> judgements updated: {_spread(keying.handler)}  [target <= 50 ms]")
        print(f"  Pilot round trip per key:         {_spread(keying.round_trip)}")
        print(f"  keys due {KEY_INTERVAL * 1000:.0f} ms apart, key due -> judgement updated: "
              f"{_spread(keying.posted)}  [target <= 50 ms]; longest event-loop stall "
              f"{_ms(keying.stall)}")
        _print_saves(keying.saves, 2 * args.keys)
        print(f"  full garbage collections meanwhile (every thread waits): {collections_keys.line()}")

        report_loading._ranker = None  # the first open pays for loading the ranker too
        first = asyncio.run(_open_pdf(root, "bench-pdf"))
        again = asyncio.run(_open_pdf(root, "bench-pdf"))
        os.environ[CACHE_ENV] = str(workdir / "cache-keys")  # cold again, keys pressed
        report_loading._ranker = None
        with _FullCollections() as collections_open:
            keyed = asyncio.run(_open_pdf(root, "bench-pdf", keys=True))
        print(f"opening a {first.pages}-page PDF ({first.sentences} sentences, from {origin})")
        print(
            f"  to first suggestions, first open (not cached; loads the ranker): {_ms(first.seconds)}"
            f"  [in the worker: read {_ms(first.parts.get('read', 0))}, "
            f"rank {_ms(first.parts.get('rank', 0))}]"
        )
        print(
            f"  to first suggestions, reopened (reader cache; ranker loaded):     {_ms(again.seconds)}"
            f"  [in the worker: read {_ms(again.parts.get('read', 0))}, "
            f"rank {_ms(again.parts.get('rank', 0))}]"
        )
        print(
            f"  longest UI event-loop stall until the report is shown: {_ms(first.stall)} / "
            f"{_ms(again.stall)}; the interface's own CPU in it {_ms(first.stall_cpu)} / "
            f"{_ms(again.stall_cpu)}"
        )
        print(
            f"  most CPU of the interface's thread without a turn for the keys (between two "
            f"5 ms ticks): {_ms(first.turn_cpu)} / {_ms(again.turn_cpu)}  [a key waits at "
            "least this long; target <= 50 ms]"
        )
        print(
            f"  CPU time of the interface's thread until the report is shown: "
            f"{_ms(first.ui_cpu)} / {_ms(again.ui_cpu)} (less than wall time on a busy machine)"
        )
        if keyed.keys:
            print(f"  answer keys pressed during a first open, key due -> judgement updated: "
                  f"{_spread(keyed.keys)}  [target <= 50 ms]; longest stall {_ms(keyed.stall)} "
                  f"(the interface's own CPU in it {_ms(keyed.stall_cpu)}; most between two "
                  f"ticks {_ms(keyed.turn_cpu)})")
            _print_saves(keyed.saves, len(keyed.keys))
        print(f"  full garbage collections during that open (every thread waits): "
              f"{collections_open.line()}")
        read, rank = _parts(pdf)
        print(f"  of which, outside the app: reading (not cached) {_ms(read)}, ranking {_ms(rank)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
