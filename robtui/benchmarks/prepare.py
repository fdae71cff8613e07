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
import itertools
import os
import statistics
import tempfile
import time
from dataclasses import dataclass, field
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
    """Prepare ``paths`` with an empty cache of their own; the summary and the load average
    and this (parent) process's CPU seconds over the run."""
    from robtui.workspace.preparing import jobs_for_files, prepare

    os.environ["ROBTUI_CACHE_DIR"] = str(cache)  # inherited by the spawned workers
    _forget_fingerprints()
    jobs, problems = jobs_for_files(paths)
    if problems:
        raise SystemExit(f"could not read {problems[0].path}: {problems[0].error}")
    before = os.times()
    summary = prepare(jobs, workers=workers)
    after = os.times()
    parent_cpu = (after.user - before.user) + (after.system - before.system)
    return summary, os.getloadavg()[0], parent_cpu


def _forget_fingerprints() -> None:
    from robtui.evidence.prepared import ranker_fingerprint
    from robtui.reading.cache import reader_fingerprint

    ranker_fingerprint.cache_clear()
    reader_fingerprint.cache_clear()


@dataclass
class Rate:
    """Reports and pages prepared over some wall-clock seconds, and the CPU seconds they took."""

    reports: int = 0
    pages: int = 0
    seconds: float = 0.0
    cpu: float = 0.0
    loads: list[float] = field(default_factory=list)

    def add(self, summary, load: float) -> Rate:
        self.reports += len(summary.prepared)
        self.pages += sum(o.pages for o in summary.prepared)
        self.seconds += summary.seconds
        self.cpu += sum(o.cpu_seconds for o in summary.prepared)
        self.loads.append(load)
        return self

    @property
    def per_minute(self) -> float:
        return 60.0 * self.reports / self.seconds if self.seconds else 0.0

    @property
    def pages_per_second(self) -> float:
        return self.pages / self.seconds if self.seconds else 0.0

    def line(self, name: str) -> str:
        return (f"{name}: {self.reports} reports, {self.pages} pages "
                f"({self.pages / max(self.reports, 1):.1f} per report) in {self.seconds:.1f} s: "
                f"{self.per_minute:.1f} reports/min, {self.pages_per_second:.2f} pages/s; "
                f"{self.cpu / max(self.reports, 1):.2f} CPU s per report; load average "
                + ", ".join(f"{x:.2f}" for x in self.loads))


def _failures(summary) -> None:
    for failure in summary.failures[:3]:
        print(f"  failed: {failure.error}")
    if summary.failures:
        print(f"  ({len(summary.failures)} failed)")


def _memory(summary) -> None:
    by_worker: dict[int, list[float]] = {}
    for outcome in summary.outcomes:
        by_worker.setdefault(outcome.worker, []).append(outcome.peak_rss_mb)
    for pid, peaks in sorted(by_worker.items()):
        quarter = peaks[max(0, len(peaks) // 4 - 1)]
        print(f"  worker {pid}: {len(peaks)} reports, peak memory {max(peaks):.0f} MB "
              f"(after its first quarter {quarter:.0f} MB)")


def _where_time_went(summary, parent_cpu: float) -> None:
    """The pool's wall time split: workers starting, preparing, waiting between reports (the
    hand-over through the pool), idle at the end; how much of a core the workers had while
    preparing (below 1: other processes held the cores)."""
    by_worker: dict[int, list] = {}
    for outcome in summary.outcomes:
        by_worker.setdefault(outcome.worker, []).append(outcome)
    if not by_worker:
        return
    end = summary.began + summary.seconds
    workers = len(by_worker)
    start_up = [min(o.started for o in mine) - summary.began for mine in by_worker.values()]
    busy = sum(o.ended - o.started for o in summary.outcomes)
    cpu = sum(o.cpu_seconds for o in summary.outcomes)
    gaps = []
    for mine in by_worker.values():
        mine = sorted(mine, key=lambda o: o.started)
        gaps.append(sum(max(0.0, b.started - a.ended) for a, b in itertools.pairwise(mine)))
    idle_at_end = [end - max(o.ended for o in mine) for mine in by_worker.values()]
    print(f"  where the pool's {summary.seconds:.1f} s went, per worker: starting "
          f"{statistics.mean(start_up):.2f} s (spawn, imports, ranker); preparing "
          f"{busy / workers:.1f} s ({100 * busy / (workers * summary.seconds):.1f}%); between "
          f"reports {statistics.mean(gaps):.2f} s in all; idle at the end "
          f"{statistics.mean(idle_at_end):.2f} s (the longest {max(idle_at_end):.2f} s). "
          f"The workers had {cpu / busy:.2f} of a core each while preparing (1.00: a core to "
          f"itself); the parent used {parent_cpu:.2f} CPU s")


def _idle_estimate(one: Rate, summaries: list) -> tuple[float, float] | None:
    """The speed-up this run's CPU accounting predicts if every process had a core to itself:
    one process preparing the pool's reports at its CPU seconds per page (plus one worker's
    start-up) against the pool's longest worker (its start-up plus its reports' CPU seconds).
    An estimate, not a measurement: it leaves out what two busy cores cost each other (shared
    cache, memory, the hypervisor), which only a quiet machine shows. Also the workers' mean
    start-up in CPU seconds."""
    outcomes = [o for s in summaries for o in s.prepared if o.worker_start_cpu > 0]
    if not outcomes or not one.pages:
        return None
    start_up = statistics.mean({o.worker: o.worker_start_cpu for o in outcomes}.values())
    one_cpu = start_up + sum(o.pages for o in outcomes) * one.cpu / one.pages
    makespans = []
    for summary in summaries:
        by_worker: dict[int, float] = {}
        for o in summary.prepared:
            by_worker[o.worker] = by_worker.get(o.worker, o.worker_start_cpu) + o.cpu_seconds
        makespans.append(max(by_worker.values(), default=0.0))
    return one_cpu / sum(makespans), start_up


def _ceiling(additions: int = 20_000_000) -> float:
    """How much faster two copies of a plain CPU loop run at once than one alone, right now:
    what the machine (cores, hypervisor, other work) gives a pool of two at best."""
    import multiprocessing

    context = multiprocessing.get_context("spawn")
    started = time.perf_counter()
    _spin(additions)
    alone = time.perf_counter() - started
    with context.Pool(2) as pool:
        pool.map(_spin, [1000, 1000], chunksize=1)  # both started first
        started = time.perf_counter()
        pool.map(_spin, [additions, additions], chunksize=1)
        both = time.perf_counter() - started
    return 2 * alone / both


def _spin(additions: int) -> int:
    """A fixed amount of pure-Python work (about a second on a free core of this machine)."""
    total = 0
    for i in range(additions):
        total += i
    return total


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


def _open_times_while_preparing(paths: list[Path], cache: Path, count: int,
                                background: bool) -> list[float]:
    """:func:`_open_times` while the pool prepares other reports again in a thread (as the
    workbench does when a review opens), its workers given way (``background``) or not."""
    import threading

    from robtui.workspace.preparing import jobs_for_files, prepare

    os.environ["ROBTUI_CACHE_DIR"] = str(cache)
    _forget_fingerprints()
    jobs, _problems = jobs_for_files(paths[count:count + 40])
    cancel = threading.Event()
    started = threading.Event()

    def run() -> None:
        prepare(jobs, skip_prepared=False, background=background, cancel=cancel,
                progress=lambda state: state.done and started.set())

    thread = threading.Thread(target=run)
    thread.start()
    try:
        started.wait(timeout=120)  # the workers are up and busy
        return _open_times(paths, cache, count) + _open_times(paths, cache, count)
    finally:
        cancel.set()
        thread.join()


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


def _measure_once(paths: list[Path], baseline: int, workers: int, tmp: Path
                  ) -> tuple[Rate, Rate, list]:
    """One process on half the baseline, the pool on every report, one process on the other
    half (a load that drifts during the run weighs on both)."""
    half = max(1, baseline // 2)
    one, pool = Rate(), Rate()
    runs = []
    first, load, _cpu = _run(paths[:half], 0, tmp / "cache-one-a")
    one.add(first, load)
    runs.append(first)
    summary, load, parent_cpu = _run(paths, workers, tmp / "cache-pool")
    pool.add(summary, load)
    if baseline > half:
        second, load, _cpu = _run(paths[half:baseline], 0, tmp / "cache-one-b")
        one.add(second, load)
        runs.append(second)
    print(one.line("one process (half before the pool, half after)"))
    for run in runs:
        _failures(run)
    _memory(runs[0])
    print(pool.line(f"pool of {workers}"))
    _failures(summary)
    _memory(summary)
    _where_time_went(summary, parent_cpu)
    return one, pool, [summary]


def _measure_in_rounds(paths: list[Path], baseline: int, workers: int, rounds: int, tmp: Path
                       ) -> tuple[Rate, Rate, list]:
    """Rounds of one process then the pool, each on its own slice of the reports: on a busy
    machine each round's ratio is taken under about the same load."""
    one, pool, ratios, summaries = Rate(), Rate(), [], []
    for number in range(rounds):
        chunk = paths[number * len(paths) // rounds:(number + 1) * len(paths) // rounds]
        alone = chunk[:max(1, baseline // rounds)]
        single, load_one, _cpu = _run(alone, 0, tmp / f"cache-one-{number}")
        summary, load_pool, parent_cpu = _run(chunk, workers, tmp / f"cache-pool-{number}")
        a, b = Rate().add(single, load_one), Rate().add(summary, load_pool)
        one.add(single, load_one)
        pool.add(summary, load_pool)
        ratios.append(b.per_minute / a.per_minute if a.per_minute else 0.0)
        summaries.append(summary)
        print(f"round {number + 1}: one process {a.per_minute:.1f} reports/min "
              f"({len(alone)} reports, load {load_one:.2f}), pool {b.per_minute:.1f} reports/min "
              f"({len(chunk)} reports, load {load_pool:.2f}): {ratios[-1]:.2f}x")
        _where_time_went(summary, parent_cpu)
    print(one.line("one process, all rounds"))
    print(pool.line(f"pool of {workers}, all rounds"))
    for summary in summaries:
        _failures(summary)
        _memory(summary)
    print(f"median of the rounds' speed-ups: {statistics.median(ratios):.2f}x")
    return one, pool, summaries


def main(argv: list[str] | None = None) -> int:
    from robtui.workspace.preparing import default_workers

    parser = argparse.ArgumentParser(prog="robtui bench prepare", description=__doc__,
                                     formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--reports", type=int, default=200, help="reports in the review (200)")
    parser.add_argument("--baseline", type=int, default=None, metavar="N",
                        help="reports prepared in one process (default: all of them)")
    parser.add_argument("--workers", type=int, default=default_workers(),
                        help=f"pool size (default: all cores, here {default_workers()})")
    parser.add_argument("--rounds", type=int, default=1, metavar="R",
                        help="alternate one process and the pool in R rounds, each on its own "
                             "slice of the reports (for a busy machine; default 1: the pool "
                             "prepares every report in one run)")
    parser.add_argument("--keep", type=Path, default=None, metavar="DIR",
                        help="keep the rendered reports in DIR and reuse them next time")
    parser.add_argument("--open", type=int, default=20, metavar="N",
                        help="prepared reports opened as the workbench does (20)")
    args = parser.parse_args(argv)
    if args.reports < 1 or args.workers < 1 or args.rounds < 1:
        parser.error("--reports, --workers and --rounds must be at least 1")
    baseline = min(args.baseline or args.reports, args.reports)
    print(f"load average before: {' '.join(f'{x:.2f}' for x in os.getloadavg())} "
          f"({os.cpu_count()} cores; niceness {os.nice(0)})")
    print(f"two plain CPU loops at once ran {_ceiling():.2f}x as fast as one alone "
          f"(what this machine gives two processes right now)")
    with tempfile.TemporaryDirectory(prefix="robtui-bench-prepare-") as tmp:
        tmp = Path(tmp)
        paths = build_reports(args.keep or tmp / "reports", args.reports, args.workers)
        if args.rounds == 1:
            one, pool, summaries = _measure_once(paths, baseline, args.workers, tmp)
        else:
            one, pool, summaries = _measure_in_rounds(paths, baseline, args.workers,
                                                      args.rounds, tmp)
        print(f"speed-up over one process: {pool.per_minute / one.per_minute:.2f}x reports/min, "
              f"{pool.pages_per_second / one.pages_per_second:.2f}x pages/s; CPU seconds per "
              f"report {pool.cpu / max(pool.reports, 1) / (one.cpu / max(one.reports, 1)):.2f}x "
              f"the one process's (target: 1.8x reports/min on 2 cores)")
        estimate = _idle_estimate(one, summaries)
        if estimate:
            print(f"with a core to each process (an estimate from the CPU seconds above, not a "
                  f"measurement): {estimate[0]:.2f}x; a worker takes {estimate[1]:.2f} CPU s "
                  f"to start")
        peak = max((o.peak_rss_mb for s in summaries for o in s.outcomes), default=0.0)
        print(f"peak memory of any worker: {peak:.0f} MB")
        prepared_cache = tmp / ("cache-pool" if args.rounds == 1 else "cache-pool-0")
        prepared_paths = paths if args.rounds == 1 else paths[:len(paths) // args.rounds]
        opened = _open_times(prepared_paths, prepared_cache, min(args.open, len(prepared_paths)))
        print(f"workbench opens a prepared report's suggestions: median "
              f"{statistics.median(opened) * 1000:.0f} ms, max {max(opened) * 1000:.0f} ms "
              f"(n={len(opened)}; first open includes loading modules; target 200 ms)")
        count = min(args.open, len(prepared_paths) // 2)
        for background in (False, True):
            busy = _open_times_while_preparing(prepared_paths, prepared_cache, count, background)
            how = ("giving way (nice +10, as the workbench starts them)" if background
                   else "at the same priority")
            print(f"... while the pool prepares other reports, its workers {how}: median "
                  f"{statistics.median(busy) * 1000:.0f} ms, max {max(busy) * 1000:.0f} ms "
                  f"(n={len(busy)}); load average {os.getloadavg()[0]:.2f}")
        panel = _panel_times(tmp / "demo", tmp / "cache-demo")
        print(f"pre-specification panel of a prepared demo study, opening to findings shown: "
              f"first {panel[0] * 1000:.0f} ms, then median "
              f"{statistics.median(panel[1:]) * 1000:.0f} ms, max {max(panel[1:]) * 1000:.0f} ms "
              f"(n={len(panel)}, the workbench under Textual's test driver; target 200 ms)")
    print(f"load average after: {' '.join(f'{x:.2f}' for x in os.getloadavg())}")
    return 0
