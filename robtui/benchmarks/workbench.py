"""robtui bench workbench: how quickly the workbench responds.

Prints (figures, not pass/fail):
- start to first screen: a fresh process importing the app and showing the review overview
  (headless), and the same inside a warm process;
- keystroke to updated judgement (target <= 50 ms): the time from the answer key's action to
  the proposed domain and overall judgements being updated on screen, including the atomic
  save of the assessment; plus Pilot's full round trip per key (an upper bound that includes
  Pilot's own idle waits of at least 2 x 20 ms);
- opening a ~15-page two-column PDF to its first suggestions: read (not cached) and ranked in
  the worker, and reopened (from the reader's cache); the longest stall of the UI's event
  loop while the worker runs shows whether the interface stayed responsive.

The PDF is rendered from articles of the shared CONSORT-TM corpus (Kilicoglu et al., J Biomed
Inform 2021;116:103717) when present, else from the bundled sample reports.
"""

from __future__ import annotations

import argparse
import asyncio
import itertools
import statistics
import subprocess
import sys
import tempfile
import time
import uuid
from pathlib import Path

SIZE = (140, 42)
REVIEWER = "bench"

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


async def _keystrokes(root: Path, study_id: str, count: int) -> tuple[list[float], list[float]]:
    from robtui.tui.app import Workbench

    app = Workbench(root, REVIEWER)
    handler, round_trip = [], []
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        screen = await _open_row(pilot, study_id)
        await app.workers.wait_for_complete()
        await pilot.pause()
        for i in range(count):
            started = time.perf_counter()
            await pilot.press("y" if i % 2 else "n")
            round_trip.append(time.perf_counter() - started)
            handler.append(screen.last_update_seconds)
    return handler, round_trip


async def _open_pdf(root: Path, study_id: str) -> tuple[float, float, int, int, dict]:
    """Seconds from opening the result to suggestions shown; longest UI-loop stall; counts."""
    from robtui.tui.app import Workbench

    app = Workbench(root, REVIEWER)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.pause()
        ticks: list[float] = []
        started = time.perf_counter()
        screen = await _open_row(pilot, study_id)
        timer = screen.set_interval(0.005, lambda: ticks.append(time.perf_counter()))
        while not (screen.loaded and screen.loaded[0].suggestions):
            if screen.loaded and screen.loaded[0].document is None:
                raise SystemExit(f"the benchmark PDF could not be read: {screen.loaded[0].problem}")
            await asyncio.sleep(0.002)
        await pilot.pause()
        elapsed = time.perf_counter() - started
        timer.stop()
        gaps = [b - a for a, b in itertools.pairwise(ticks)] or [0.0]
        document = screen.loaded[0].document
        parts = screen.loaded[0].seconds
        return elapsed, max(gaps), document.pages or 0, len(document.sentences), parts


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
    args = parser.parse_args(argv)

    from robtui.store.demo import build_demo_review
    from robtui.store.review_folder import ReviewFolder
    from robtui.tui import report_loading

    with tempfile.TemporaryDirectory(prefix="robtui-bench-workbench-") as tmp:
        workdir = Path(tmp)
        root = workdir / "review"
        folder = build_demo_review(root)
        pdf, _pages, origin = _make_pdf(workdir, args.pages)
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

        handler, round_trip = asyncio.run(_keystrokes(root, first_study, args.keys))
        print("keystroke to updated judgement (answer key on question 1.1, saved each time)")
        print(f"  key action -> judgements updated: {_spread(handler)}  [target <= 50 ms]")
        print(f"  Pilot round trip per key:         {_spread(round_trip)}")

        report_loading._ranker = None  # the first open pays for loading the ranker too
        first, stall, got_pages, sentences, parts = asyncio.run(_open_pdf(root, "bench-pdf"))
        again, stall_again, _, _, parts_again = asyncio.run(_open_pdf(root, "bench-pdf"))
        print(f"opening a {got_pages}-page two-column PDF ({sentences} sentences, from {origin})")
        print(
            f"  to first suggestions, first open (not cached; loads the ranker): {_ms(first)}"
            f"  [in the worker: read {_ms(parts.get('read', 0))}, rank {_ms(parts.get('rank', 0))}]"
        )
        print(
            f"  to first suggestions, reopened (reader cache; ranker loaded):     {_ms(again)}"
            f"  [in the worker: read {_ms(parts_again.get('read', 0))}, "
            f"rank {_ms(parts_again.get('rank', 0))}]"
        )
        print(
            f"  longest UI event-loop stall while the worker ran: {_ms(stall)} / {_ms(stall_again)}"
        )
        read, rank = _parts(pdf)
        print(f"  of which, outside the app: reading (not cached) {_ms(read)}, ranking {_ms(rank)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
