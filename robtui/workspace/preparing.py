"""Prepare many reports at once: read and rank each in a process pool, keeping the results.

Every report is read (the document cache) and ranked for each effect (the prepared-suggestions
cache, evidence/prepared.py) in worker processes, one report per task, using all cores
(``concurrent.futures.ProcessPoolExecutor``). What the caches already hold is skipped, so an
interrupted preparation resumes where it stopped: each finished report is kept at once. A
report that cannot be read is listed with its reason and the rest goes on.

Memory stays bounded whatever the number of reports: at most ``2 x workers`` tasks are in
flight and a task returns a small summary, never the document.

Where the time goes (``robtui bench prepare`` prints it): a worker starts in about 0.45 CPU
seconds (a fresh interpreter, imports, the ranker loaded once by the initializer) against about
0.7 per twelve-page report; the hand-over between reports takes about 0.01 s in a whole run,
and the workers write to the caches themselves, so one report per task needs no chunking and
"spawn" costs under 1% of a 200-report run. "spawn" stays: it is safe beside the workbench's
threads, and each pool takes the cache folder from the environment of the moment it starts
(tried on Python 3.11: a fork server's workers keep the environment of the moment the
server started, so a second pool with another cache folder would write to the first).
Reports go largest first, so no long one is left for the end.
"""

from __future__ import annotations

import os
import threading
import time
from collections.abc import Callable, Iterable, Sequence
from concurrent.futures import FIRST_COMPLETED, Future, ProcessPoolExecutor, wait
from dataclasses import dataclass, field
from pathlib import Path

from robtui.errors import InputError


@dataclass(frozen=True)
class PrepareJob:
    """One file to prepare: where it is, its bytes' sha256 and a label for messages."""

    path: str
    sha256: str
    label: str
    effects: tuple[str, ...] = ("assignment",)
    question_set: object = None  # the study's QuestionSet (None: the ranker's default set)

    @property
    def set_id(self) -> str:
        from robtui.evidence.prepared import DEFAULT_SET

        return self.question_set.id if self.question_set is not None else DEFAULT_SET


@dataclass
class ReportOutcome:
    """What happened to one report (returned by a worker; small on purpose)."""

    label: str
    path: str
    sha256: str
    error: str | None = None
    pages: int = 0
    sentences: int = 0
    read_seconds: float = 0.0
    rank_seconds: float = 0.0
    worker: int = 0  # process id
    peak_rss_mb: float = 0.0  # the worker's peak resident memory after this report
    already: bool = False  # another process prepared it meanwhile (nothing was done here)
    # where the time went (wall clock, time.time(), comparable across processes)
    started: float = 0.0
    ended: float = 0.0
    cpu_seconds: float = 0.0  # this process's CPU time on the report (less than the wall
    #                           time when other processes had the core)
    worker_ready: float = 0.0  # when the worker had started and loaded the ranker (0: in-process)
    worker_start_cpu: float = 0.0  # CPU seconds the worker took to start (interpreter, imports,
    #                                ranker); 0 in-process
    niceness: int | None = None  # the process's scheduling niceness (None: not on this platform)

    @property
    def ok(self) -> bool:
        return self.error is None


@dataclass
class PrepareProgress:
    """Where a preparation stands; rates count only the reports prepared in this run."""

    total: int  # reports to prepare in this run (not counting skipped ones)
    skipped: int  # already held by the caches
    done: int = 0  # finished (prepared or failed)
    failed: int = 0
    pages: int = 0
    elapsed: float = 0.0
    last: str = ""

    @property
    def reports_per_minute(self) -> float:
        return 60.0 * self.done / self.elapsed if self.elapsed > 0 else 0.0

    @property
    def pages_per_second(self) -> float:
        return self.pages / self.elapsed if self.elapsed > 0 else 0.0

    @property
    def seconds_left(self) -> float | None:
        """Estimated from this run's rate so far; None before the first report finishes."""
        if not self.done or self.elapsed <= 0:
            return None
        return (self.total - self.done) * self.elapsed / self.done


@dataclass
class PrepareSummary:
    outcomes: list[ReportOutcome] = field(default_factory=list)
    skipped: int = 0
    workers: int = 0
    seconds: float = 0.0
    interrupted: bool = False
    began: float = 0.0  # time.time() at the start (for the outcomes' timestamps)

    @property
    def failures(self) -> list[ReportOutcome]:
        return [o for o in self.outcomes if not o.ok]

    @property
    def prepared(self) -> list[ReportOutcome]:
        return [o for o in self.outcomes if o.ok]

    def peak_memory_by_worker(self) -> dict[int, float]:
        peaks: dict[int, float] = {}
        for o in self.outcomes:
            peaks[o.worker] = max(peaks.get(o.worker, 0.0), o.peak_rss_mb)
        return peaks


def default_workers() -> int:
    """All cores this process may use."""
    try:
        return max(1, len(os.sched_getaffinity(0)))
    except AttributeError:  # not on every platform
        return max(1, os.cpu_count() or 1)


def jobs_for_files(paths: Iterable[Path], effects: Sequence[str] = ("assignment",)
                   ) -> tuple[list[PrepareJob], list[ReportOutcome]]:
    """A job per readable file; files that cannot even be opened come back as failures."""
    from robtui.store.report_copies import sha256_of

    jobs, failures = [], []
    for path in paths:
        path = Path(path)
        try:
            sha = sha256_of(path)
        except OSError as error:
            failures.append(ReportOutcome(str(path), str(path), "", error=(
                f"{path}: cannot be read ({error.strerror or error})")))
            continue
        jobs.append(PrepareJob(str(path), sha, str(path), tuple(effects)))
    return jobs, failures


def is_prepared(job: PrepareJob) -> bool:
    """True when the caches hold the document and its suggestions for every effect."""
    from robtui.evidence.prepared import has_prepared
    from robtui.reading.cache import has_cached
    from robtui.reading.reader import SUFFIX_KINDS

    kind = SUFFIX_KINDS.get(Path(job.path).suffix.lower())
    if kind is None or not has_cached(job.sha256, kind):
        return False
    return all(has_prepared(job.sha256, effect, job.set_id) for effect in job.effects)


# -- the worker side ---------------------------------------------------------------------------
_worker_ranker = None
_worker_problem: str | None = None
_worker_ready = 0.0
_worker_start_cpu = 0.0


# How much a background worker gives way (nice +10: CFS weight 110 against 1024 at nice 0, the
# kernel's sched_prio_to_weight table in kernel/sched/core.c, from memory), so the workbench
# answers keys while its reports are prepared. Where the kernel groups processes by session
# (autogroup) this orders only the workbench's own processes, never other users'.
BACKGROUND_NICENESS = 10


def _init_worker(background: bool = False) -> None:
    """Pool initializer: Ctrl-C is the parent's to handle; the ranker is loaded once; the PDF
    library's warnings about odd drawing commands stay out of the progress display; a
    background worker gives way to the workbench."""
    import logging
    import signal

    logging.getLogger("pdfminer").setLevel(logging.ERROR)
    from robtui.errors import RobtuiError

    global _worker_ready, _worker_start_cpu
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if background:
        try:
            os.nice(BACKGROUND_NICENESS)
        except (AttributeError, OSError):  # not on every platform: run at the same priority
            pass
    try:
        worker_ranker()
    except RobtuiError:
        pass  # every task of this worker reports the problem
    _worker_ready, _worker_start_cpu = time.time(), time.process_time()


def worker_ranker():
    """This process's ranker, loaded on first use; RobtuiError when it cannot be loaded."""
    global _worker_ranker, _worker_problem
    from robtui.errors import ModelFileError, RobtuiError
    from robtui.evidence.ranker import load_ranker

    if _worker_ranker is None and _worker_problem is None:
        try:
            _worker_ranker = load_ranker()
        except RobtuiError as error:
            _worker_problem = str(error)
    if _worker_ranker is None:
        raise ModelFileError(f"no suggestions: {_worker_problem}")
    return _worker_ranker


def _peak_rss_mb() -> float:
    try:
        import resource
    except ImportError:  # not on every platform
        return 0.0
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0  # KiB on Linux


def prepare_one(job: PrepareJob) -> ReportOutcome:
    """Read and rank one report, keeping both in the caches (runs in a worker or in-process)."""
    from robtui.errors import RobtuiError
    from robtui.evidence.prepared import rank_for_preparation, store_prepared
    from robtui.reading.reader import read_document

    outcome = ReportOutcome(job.label, job.path, job.sha256, worker=os.getpid(),
                            started=time.time(), worker_ready=_worker_ready,
                            worker_start_cpu=_worker_start_cpu,
                            niceness=os.nice(0) if hasattr(os, "nice") else None)
    cpu = time.process_time()  # restarted once the ranker is loaded (a worker's start-up)
    if is_prepared(job):  # e.g. a second robtui preparing the same review at the same time
        outcome.already = True
        outcome.ended = time.time()
        return outcome
    try:
        ranker = worker_ranker()
        cpu = time.process_time()
        started = time.perf_counter()
        document = read_document(Path(job.path))
        outcome.read_seconds = time.perf_counter() - started
        if document.sha256 != job.sha256:
            raise RobtuiError(f"{job.path}: the file changed while it was being prepared; "
                              "prepare again")
        outcome.pages, outcome.sentences = document.pages or 0, len(document.sentences)
        started = time.perf_counter()
        for effect in job.effects:
            store_prepared(rank_for_preparation(ranker, document, effect, job.question_set))
        outcome.rank_seconds = time.perf_counter() - started
    except RobtuiError as error:
        outcome.error = str(error)
    except Exception as error:  # noqa: BLE001 - one bad report must not stop the others
        outcome.error = f"{job.path}: {type(error).__name__}: {error}"
    outcome.peak_rss_mb = _peak_rss_mb()
    outcome.cpu_seconds = time.process_time() - cpu
    outcome.ended = time.time()
    return outcome


# -- the parent side ---------------------------------------------------------------------------
def prepare(
    jobs: Sequence[PrepareJob],
    *,
    workers: int | None = None,
    progress: Callable[[PrepareProgress], None] = lambda _p: None,
    cancel: threading.Event | None = None,
    skip_prepared: bool = True,
    background: bool = False,
) -> PrepareSummary:
    """Prepare ``jobs`` with ``workers`` processes (default all cores; 0: in this process).

    ``progress`` is called after every report (from the calling thread). Setting ``cancel``
    stops the run (the pool's workers end at once; in this process, after the current report);
    finished reports stay prepared either way. Ctrl-C (KeyboardInterrupt) does the same and
    returns a summary marked interrupted. ``background``: the workers give way to the calling
    process (the workbench preparing its review while the reviewer works).
    """
    workers = default_workers() if workers is None else workers
    if workers < 0:
        raise InputError(f"workers must be 0 (in this process) or more (got {workers})")
    cancel = cancel or threading.Event()
    todo = [job for job in jobs if not (skip_prepared and is_prepared(job))]
    # largest first: the long ones start early, so no worker is left with one at the end
    todo.sort(key=_file_size, reverse=True)
    state = PrepareProgress(total=len(todo), skipped=len(jobs) - len(todo))
    summary = PrepareSummary(skipped=state.skipped, workers=workers, began=time.time())
    started = time.perf_counter()

    def finished(outcome: ReportOutcome) -> None:
        summary.outcomes.append(outcome)
        state.done += 1
        state.failed += not outcome.ok
        state.pages += outcome.pages
        state.elapsed = time.perf_counter() - started
        state.last = outcome.label
        progress(state)

    progress(state)
    try:
        if workers == 0 or not todo:
            for job in todo:
                if cancel.is_set():
                    summary.interrupted = True
                    break
                finished(prepare_one(job))
        else:
            summary.interrupted = _run_pool(todo, min(workers, len(todo)), finished, cancel,
                                            background)
    except KeyboardInterrupt:
        summary.interrupted = True
    summary.seconds = time.perf_counter() - started
    return summary


def _file_size(job: PrepareJob) -> int:
    try:
        return os.path.getsize(job.path)
    except OSError:
        return 0  # reported as a failure when the worker tries to read it


def _run_pool(todo: Sequence[PrepareJob], workers: int,
              finished: Callable[[ReportOutcome], None], cancel: threading.Event,
              background: bool = False) -> bool:
    def done(job: PrepareJob, outcome: ReportOutcome | None, error: BaseException | None) -> None:
        if outcome is None:  # the worker died (e.g. out of memory): say so
            outcome = ReportOutcome(job.label, job.path, job.sha256, error=(
                f"{job.path}: the worker preparing it stopped ({type(error).__name__}: "
                f"{error}); prepare again to retry"))
        finished(outcome)

    return map_in_pool(prepare_one, todo, workers, done, cancel, initargs=(background,))


def map_in_pool(function: Callable, items: Sequence, workers: int,
                done: Callable[[object, object, BaseException | None], None],
                cancel: threading.Event | None = None, initializer: Callable | None = None,
                initargs: tuple = ()) -> bool:
    """Run ``function(item)`` for every item in ``workers`` processes, calling
    ``done(item, result, error)`` in this thread as each finishes (in completion order).

    At most ``2 x workers`` items are in flight, so memory stays bounded. Setting ``cancel``
    ends the workers at once (items in progress are dropped, not reported) and returns True;
    Ctrl-C does the same and is raised again.
    ``function`` must be importable by name (it runs in a fresh interpreter).
    """
    import multiprocessing

    cancel = cancel or threading.Event()
    # "spawn": a fresh interpreter per worker, safe beside the threads of the workbench
    context = multiprocessing.get_context("spawn")
    pool = ProcessPoolExecutor(max_workers=max(1, workers), mp_context=context,
                               initializer=initializer or _init_worker, initargs=initargs)
    queue = list(reversed(items))
    running: dict[Future, object] = {}
    stopped = False
    try:
        while queue or running:
            while queue and len(running) < 2 * workers and not cancel.is_set():
                item = queue.pop()
                running[pool.submit(function, item)] = item
            if cancel.is_set():  # end at once: finished items are kept, writes are atomic
                stopped = bool(queue or running)
                _stop_workers(pool)
                break
            finished, _ = wait(running, timeout=0.2, return_when=FIRST_COMPLETED)
            for future in finished:
                item = running.pop(future)
                try:
                    result = future.result()
                except Exception as error:  # noqa: BLE001 - a worker died: say so, go on
                    done(item, None, error)
                else:
                    done(item, result, None)
    except KeyboardInterrupt:
        _stop_workers(pool)
        raise
    finally:
        pool.shutdown(wait=True, cancel_futures=True)
    return stopped


def _stop_workers(pool: ProcessPoolExecutor) -> None:
    """End the workers at once (cancel, Ctrl-C). Safe: every cache write is atomic."""
    processes = getattr(pool, "_processes", None) or {}  # no public way to end them
    for process in list(processes.values()):
        process.terminate()


def format_duration(seconds: float | None) -> str:
    if seconds is None:
        return "--:--"
    seconds = round(seconds)
    hours, rest = divmod(seconds, 3600)
    minutes, secs = divmod(rest, 60)
    return f"{hours}:{minutes:02d}:{secs:02d}" if hours else f"{minutes:02d}:{secs:02d}"


def describe_progress(state: PrepareProgress) -> str:
    """One line: reports done, pages per second, time left (the workbench and CLI say this)."""
    return (
        f"{state.done}/{state.total} reports · {state.pages_per_second:.1f} pages/s · "
        f"{format_duration(state.seconds_left)} left"
        + (f" · {state.failed} failed" if state.failed else "")
        + (f" · {state.skipped} already prepared" if state.skipped else "")
    )


def review_effects(folder) -> tuple[str, ...]:
    """The effects the review's results use, in the order its question sets give them (the
    first set's default effect when it has no results yet)."""
    from robtui.store.question_sets import review_question_sets

    sets = review_question_sets(folder)
    order = sets.effects()
    used = dict.fromkeys(result.effect for result in folder.review.results)
    ranked = sorted(used, key=lambda e: order.index(e) if e in order else len(order))
    return tuple(ranked) or (sets.default_effect([s.id for s in folder.review.studies]),)


def jobs_for_review(folder, effects: Sequence[str] | None = None
                    ) -> tuple[list[PrepareJob], list[ReportOutcome]]:
    """A job per readable file of every study, ranked with the study's question set; missing or
    changed copies come back as failures.

    Files robtui does not rank (an unsupported type) are left out: they are not failures.
    """
    from robtui.reading.reader import SUFFIX_KINDS
    from robtui.store.question_sets import review_question_sets

    effects = tuple(effects or review_effects(folder))
    sets = review_question_sets(folder)
    jobs, failures = [], []
    for study in folder.review.studies:
        qset = sets.of(study.id)
        own = tuple(e for e in effects if e in qset.effects()) or tuple(qset.effects()[:1])
        for report in study.reports:
            path = folder.report_path(report)
            label = f"{study.id}: {report.path}"
            if path.suffix.lower() not in SUFFIX_KINDS:
                continue
            problem = folder.check_report(report)
            if problem:
                failures.append(ReportOutcome(label, str(path), report.sha256, error=problem))
                continue
            jobs.append(PrepareJob(str(path), report.sha256, label, own, qset))
    return jobs, failures
