"""robtui bench prepare: a synthetic review of many reports prepared in the process pool.

Builds N two-column PDF reports of about 12 pages each (default 200), every one different:
paragraphs of the bundled sample reports and, when present, of the shared CONSORT-TM corpus
articles (Kilicoglu et al., J Biomed Inform 2021;116:103717), rotated so no two reports hold the
same text, rendered by devtools/pdf_writer.py (in the pool too). Then, each time with an empty
cache of its own:

- one process: the reports prepared in this process, one after another (``--baseline`` of them);
- the pool: every report prepared with ``--workers`` processes (default all cores);

and prints reports per minute, pages per second, peak memory per worker (and how it grew from
the first quarter of each worker's reports to the end: bounded memory shows as no growth), the
speed-up of the pool over one process, and the load average of the machine before and after
(a busy machine lowers the speed-up; measure when it is quiet). Last, the time the workbench
takes to open a prepared report's suggestions (``load_report`` on prepared documents).
Figures, not pass/fail.
"""

from __future__ import annotations

import argparse
import os
import statistics
import tempfile
import time
from pathlib import Path

TARGET_PAGES = 12
CHARS_PER_PAGE = 5000  # pdf_writer's two-column layout: measured on these paragraphs


def _paragraphs() -> tuple[list[str], str]:
    """Body paragraphs to build reports from, and where they came from."""
    from robtui.paths import bundled_dir

    paras = []
    for path in sorted(bundled_dir("sample_reports").glob("*.txt")):
        paras += [p.strip() for p in path.read_text(encoding="utf-8").splitlines() if p.strip()]
    origin = "bundled sample reports"
    from robtui.evidence.training.corpus import default_corpus_dir, load_corpus

    corpus = default_corpus_dir()
    if corpus:
        for article in load_corpus(corpus):
            paras += [p.strip() for p in article.text.splitlines() if p.strip()]
        origin += " + shared CONSORT-TM corpus articles"
    return paras, origin


def report_text(index: int, paras: list[str]) -> str:
    """Report ``index``: a title, then paragraphs from a start that differs per report."""
    lines = [f"Synthetic trial report {index + 1:04d} for the preparation benchmark",
             f"Benchmark authors {index + 1}", "Abstract"]
    size, at = 0, (index * 7919) % len(paras)  # a prime stride spreads the starting points
    while size < TARGET_PAGES * CHARS_PER_PAGE:
        para = paras[at % len(paras)]
        lines.append(para)
        size += len(para)
        at += 1
    return "\n".join(lines)


def render_one(item: tuple[str, str]) -> int:
    """Render (text, path) as a two-column PDF; the number of pages (runs in a worker)."""
    from robtui.devtools.pdf_writer import blocks_from_lines, render_blocks_as_pdf

    text, path = item
    return render_blocks_as_pdf(blocks_from_lines(text, 3), Path(path))


def build_reports(folder: Path, count: int, workers: int) -> list[Path]:
    """Render the synthetic reports (those already in ``folder`` are kept)."""
    from robtui.workspace.preparing import map_in_pool

    paras, origin = _paragraphs()
    print(f"reports built from {origin} ({len(paras)} paragraphs)")
    folder.mkdir(parents=True, exist_ok=True)
    paths = [folder / f"report-{i + 1:04d}.pdf" for i in range(count)]
    todo = [(report_text(i, paras), str(p)) for i, p in enumerate(paths) if not p.is_file()]
    if todo:
        started = time.perf_counter()
        problems: list[str] = []

        def done(item, _pages, error) -> None:
            if error is not None:
                problems.append(f"{item[1]}: {error}")

        map_in_pool(render_one, todo, workers, done, initializer=_quiet_init)
        if problems:
            raise SystemExit("could not render: " + "; ".join(problems[:3]))
        print(f"rendered {len(todo)} PDFs in {time.perf_counter() - started:.0f} s")
    return paths


def _quiet_init() -> None:
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)


def _run(paths: list[Path], workers: int, cache: Path):
    from robtui.workspace.preparing import jobs_for_files, prepare

    os.environ["ROBTUI_CACHE_DIR"] = str(cache)  # inherited by the spawned workers
    _forget_fingerprints()
    jobs, problems = jobs_for_files(paths)
    if problems:
        raise SystemExit(f"could not read {problems[0].path}: {problems[0].error}")
    return prepare(jobs, workers=workers)


def _forget_fingerprints() -> None:
    from robtui.evidence.prepared import ranker_fingerprint
    from robtui.reading.cache import reader_fingerprint

    ranker_fingerprint.cache_clear()
    reader_fingerprint.cache_clear()


def _figures(name: str, summary) -> tuple[float, float]:
    reports = len(summary.prepared)
    pages = sum(o.pages for o in summary.prepared)
    per_minute = 60.0 * reports / summary.seconds
    per_second = pages / summary.seconds
    print(f"{name}: {reports} reports, {pages} pages ({pages / max(reports, 1):.1f} per report) "
          f"in {summary.seconds:.1f} s: {per_minute:.1f} reports/min, {per_second:.2f} pages/s"
          + (f"; {len(summary.failures)} failed" if summary.failures else ""))
    for failure in summary.failures[:3]:
        print(f"  failed: {failure.error}")
    return per_minute, per_second


def _memory(summary) -> None:
    by_worker: dict[int, list[float]] = {}
    for outcome in summary.outcomes:
        by_worker.setdefault(outcome.worker, []).append(outcome.peak_rss_mb)
    for pid, peaks in sorted(by_worker.items()):
        quarter = peaks[max(0, len(peaks) // 4 - 1)]
        print(f"  worker {pid}: {len(peaks)} reports, peak memory {max(peaks):.0f} MB "
              f"(after its first quarter {quarter:.0f} MB)")


def _open_times(paths: list[Path], cache: Path, count: int) -> list[float]:
    """Seconds for the workbench's load_report to give a prepared report's suggestions."""
    from robtui.store.review_folder import ReviewFolder
    from robtui.tui.report_loading import load_report

    os.environ["ROBTUI_CACHE_DIR"] = str(cache)
    _forget_fingerprints()
    with tempfile.TemporaryDirectory() as tmp:
        folder = ReviewFolder.create(Path(tmp) / "review", title="bench", lead="bench",
                                     reviewers=["bench"])
        study = folder.add_study("S1", "S1", paths[:count])
        times = []
        for report in study.reports:
            started = time.perf_counter()
            loaded = load_report(folder, report, "assignment")
            times.append(time.perf_counter() - started)
            if not loaded.suggestions:
                raise SystemExit(f"no suggestions for {report.path}: {loaded.problem}")
    return times


def _panel_times(root: Path, cache: Path, opens: int = 6) -> list[float]:
    """Seconds from `w` to the findings shown in the workbench, on the prepared demo review."""
    import asyncio

    from robtui.store.demo import build_demo_review
    from robtui.workspace.preparing import jobs_for_review, prepare

    os.environ["ROBTUI_CACHE_DIR"] = str(cache)
    _forget_fingerprints()
    folder = build_demo_review(root)
    prepare(jobs_for_review(folder)[0])
    return asyncio.run(_open_panel(root, opens))


async def _open_panel(root: Path, opens: int) -> list[float]:
    import asyncio

    from robtui.tui.app import Workbench
    from robtui.tui.screens.overview import OverviewScreen
    from robtui.tui.screens.prespecification import PrespecificationScreen

    app = Workbench(root, "bench-reviewer")
    times = []
    async with app.run_test(size=(120, 40)) as pilot:
        while not isinstance(app.screen, OverviewScreen):
            await asyncio.sleep(0.01)
        await pilot.press("enter")
        await pilot.pause()
        if not hasattr(app.screen, "action_planned"):  # the effect dialog of a new result
            await pilot.press("enter")
            await pilot.pause()
        await app.workers.wait_for_complete()
        for _ in range(opens):
            await pilot.press("w")
            while not (isinstance(app.screen, PrespecificationScreen)
                       and app.screen.shown_seconds is not None):
                await asyncio.sleep(0.001)
            times.append(app.screen.shown_seconds)
            await pilot.press("escape")
            await pilot.pause()
    return times


def main(argv: list[str] | None = None) -> int:
    from robtui.workspace.preparing import default_workers

    parser = argparse.ArgumentParser(prog="robtui bench prepare", description=__doc__,
                                     formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--reports", type=int, default=200, help="reports in the review (200)")
    parser.add_argument("--baseline", type=int, default=None, metavar="N",
                        help="reports prepared in one process (default: all of them)")
    parser.add_argument("--workers", type=int, default=default_workers(),
                        help=f"pool size (default: all cores, here {default_workers()})")
    parser.add_argument("--keep", type=Path, default=None, metavar="DIR",
                        help="keep the rendered reports in DIR and reuse them next time")
    parser.add_argument("--open", type=int, default=20, metavar="N",
                        help="prepared reports opened as the workbench does (20)")
    args = parser.parse_args(argv)
    if args.reports < 1 or args.workers < 1:
        parser.error("--reports and --workers must be at least 1")
    baseline = min(args.baseline or args.reports, args.reports)
    print(f"load average before: {' '.join(f'{x:.2f}' for x in os.getloadavg())} "
          f"({os.cpu_count()} cores)")
    with tempfile.TemporaryDirectory(prefix="robtui-bench-prepare-") as tmp:
        tmp = Path(tmp)
        paths = build_reports(args.keep or tmp / "reports", args.reports, args.workers)
        single = _run(paths[:baseline], 0, tmp / "cache-one")
        one_rate, one_pages = _figures("one process", single)
        _memory(single)
        pool = _run(paths, args.workers, tmp / "cache-pool")
        pool_rate, pool_pages = _figures(f"pool of {args.workers}", pool)
        _memory(pool)
        print(f"speed-up over one process: {pool_rate / one_rate:.2f}x reports/min, "
              f"{pool_pages / one_pages:.2f}x pages/s")
        opened = _open_times(paths, tmp / "cache-pool", min(args.open, len(paths)))
        print(f"workbench opens a prepared report's suggestions: median "
              f"{statistics.median(opened) * 1000:.0f} ms, max {max(opened) * 1000:.0f} ms "
              f"(n={len(opened)}; first open includes loading modules)")
        panel = _panel_times(tmp / "demo", tmp / "cache-demo")
        print(f"pre-specification panel of a prepared demo study, opening to findings shown: "
              f"first {panel[0] * 1000:.0f} ms, then median "
              f"{statistics.median(panel[1:]) * 1000:.0f} ms, max {max(panel[1:]) * 1000:.0f} ms "
              f"(n={len(panel)}, the workbench under Textual's test driver)")
    print(f"load average after: {' '.join(f'{x:.2f}' for x in os.getloadavg())}")
    return 0
