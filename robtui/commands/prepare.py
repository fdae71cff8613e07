"""robtui prepare DIR: read and rank every report of a review ahead of assessing, on all cores."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path


def register(subparsers: argparse._SubParsersAction) -> None:
    parser = subparsers.add_parser(
        "prepare",
        help="read and rank every report of a review ahead of time (all cores)",
        description=(
            "Read every report file of every study and rank its sentences for each signalling "
            "question, in a pool of worker processes, so the workbench opens each one at once. "
            "What is already prepared is skipped; an interrupted run (Ctrl-C) keeps what it "
            "finished and continues from there when run again. Reports that cannot be read are "
            "listed at the end with the reason; the rest are prepared."
        ),
    )
    parser.add_argument("folder", type=Path, metavar="DIR", help="review folder")
    parser.add_argument("--workers", type=int, default=None, metavar="N",
                        help="worker processes (default: all cores; 0: in this process)")
    parser.add_argument("--again", action="store_true",
                        help="prepare every report again, even those already prepared")
    parser.add_argument("--quiet", action="store_true", help="no progress bar")
    parser.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    from robtui.store.review_folder import ReviewFolder
    from robtui.workspace.preparing import jobs_for_review

    folder = ReviewFolder.open(args.folder)
    jobs, problems = jobs_for_review(folder)
    summary = run_with_progress(jobs, workers=args.workers, skip=not args.again,
                                quiet=args.quiet)
    return report_summary(summary, problems)


def run_with_progress(jobs, *, workers: int | None, skip: bool = True, quiet: bool = False):
    """Prepare ``jobs`` with a progress bar on stderr (reports, pages per second, time left)."""
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn

    from robtui.workspace.preparing import format_duration, is_prepared, prepare

    console = Console(stderr=True)
    pending = [job for job in jobs if not (skip and is_prepared(job))]  # no bar for nothing
    columns = (
        TextColumn("preparing"), BarColumn(), MofNCompleteColumn(), TextColumn("reports"),
        TextColumn("{task.fields[rate]}"), TextColumn("{task.fields[left]}"),
    )
    with Progress(*columns, console=console, disable=quiet or not pending,
                  transient=False) as bar:
        task = bar.add_task("prepare", total=None, rate="", left="")

        def show(state) -> None:
            bar.update(
                task, total=state.total, completed=state.done,
                rate=f"{state.pages_per_second:.1f} pages/s",
                left=f"{format_duration(state.seconds_left)} left",
            )

        return prepare(jobs, workers=workers, progress=show, skip_prepared=skip)


def report_summary(summary, problems=()) -> int:
    """Print what was done and every failure with its reason; 1 when any report failed."""
    from robtui.workspace.preparing import format_duration

    failures = [*problems, *summary.failures]
    pages = sum(o.pages for o in summary.prepared)
    line = (f"prepared {len(summary.prepared)} report(s) ({pages} pages) in "
            f"{format_duration(summary.seconds)} with {summary.workers or 1} "
            f"process(es); {summary.skipped} already prepared")
    print(line)
    if summary.interrupted:
        left = "run the same command again to continue where it stopped"
        print(f"interrupted: finished reports are kept; {left}", file=sys.stderr)
    if failures:
        print(f"{len(failures)} report(s) could not be prepared:", file=sys.stderr)
        for outcome in failures:
            print(f"  {outcome.label}: {outcome.error}", file=sys.stderr)
    return 1 if failures or summary.interrupted else 0
