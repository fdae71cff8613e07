"""robtui bench robustness: many hands and hostile input, counted.

Prints, for the targets of a review folder that many hands cannot break:
- concurrent double writes (two ``robtui assess`` processes at once on one assessment, each
  answering its own question): answers lost;
- SIGKILL during saves (a writer killed at a random moment while another keeps saving):
  answers lost, files that no longer parse, temp files left after the next save;
- mutated inputs (robtui.devtools.fuzz) through the readers and the review-file loaders:
  exceptions outside robtui's own error types, by kind of input, and time per input;
- confinement probes (symlinked folders, report paths and export names leading outside):
  files written outside the review;
- time to read one pathological Markdown line (linear since the patterns are bounded).

Every figure is a count or a time printed as measured; nothing is asserted here.
"""

from __future__ import annotations

import argparse
import random
import shutil
import tempfile
import time
from collections import Counter
from pathlib import Path


def _parse(argv: list[str]) -> argparse.Namespace:
    parser = argparse.ArgumentParser(prog="robtui bench robustness")
    parser.add_argument("--double-writes", type=int, default=100, metavar="N")
    parser.add_argument("--kills", type=int, default=100, metavar="N")
    parser.add_argument("--inputs", type=int, default=5000, metavar="N", help="mutated inputs")
    parser.add_argument("--seed", type=int, default=14)
    parser.add_argument(
        "--quick", action="store_true", help="10 double writes, 10 kills, 200 inputs"
    )
    return parser.parse_args(argv)


def main(argv: list[str]) -> int:
    args = _parse(argv)
    if args.quick:
        args.double_writes, args.kills, args.inputs = 10, 10, 200
    work = Path(tempfile.mkdtemp(prefix="robtui-robustness-"))
    try:
        _double_writes(work, args.double_writes, args.seed)
        _kills(work, args.kills, args.seed)
        _fuzz(work, args.inputs, args.seed)
        _confinement(work)
        _markdown()
    finally:
        shutil.rmtree(work, ignore_errors=True)
    return 0


def _timed(run, *args):
    start = time.perf_counter()
    return run(*args), time.perf_counter() - start


def _double_writes(work: Path, trials: int, seed: int) -> None:
    from robtui.devtools import stress
    from robtui.store.review_folder import ReviewFolder

    root = stress.make_review(work / "double")
    ReviewFolder.open(root).edit_review(
        lambda r: r.reviewers.extend(f"w{i}" for i in range(trials))
    )
    tally, took = _timed(stress.double_writes, root, trials, seed)
    print(
        f"double writes: {tally.trials} trials, {tally.answers_written} answers written by "
        f"{2 * tally.trials} concurrent `robtui assess`, {tally.answers_lost} lost, "
        f"{tally.failed_commands} commands failed ({took:.0f} s)"
    )


def _kills(work: Path, kills: int, seed: int) -> None:
    from robtui.devtools import stress

    tally, took = _timed(stress.kills_during_saves, stress.make_review(work / "kills"), kills, seed)
    print(
        f"kill -9 during saves: {tally.kills} kills, {tally.confirmed_saves} saves confirmed, "
        f"{tally.answers_lost} answers lost, {tally.unreadable_files} files unreadable, "
        f"{tally.leftovers_after_next_save} temp files left after the next save ({took:.0f} s)"
    )


def _fuzz(work: Path, inputs: int, seed: int) -> None:
    from robtui.devtools import fuzz

    seeds = fuzz.Seeds(work / "fuzz-seeds")
    scratch = work / "fuzz"
    scratch.mkdir()
    rng = random.Random(seed)
    escaped: Counter[str] = Counter()
    tried: Counter[str] = Counter()
    examples: dict[str, str] = {}
    start = time.perf_counter()
    for i in range(inputs):
        kind = fuzz.KINDS[i % len(fuzz.KINDS)]
        data = fuzz.mutate(seeds.data[kind], fuzz.random_mutations(rng))
        error = fuzz.try_input(kind, data, seeds, scratch)
        tried[kind] += 1
        if error is not None:
            escaped[kind] += 1
            examples.setdefault(kind, fuzz.describe(error))
    took = time.perf_counter() - start
    print(
        f"mutated inputs: {inputs}, exceptions outside robtui's error types: "
        f"{sum(escaped.values())} ({took:.0f} s, {1000 * took / max(inputs, 1):.0f} ms each)"
    )
    for kind in fuzz.KINDS:
        line = f"  {kind:<11} {tried[kind]:>5} inputs, {escaped[kind]} escaped"
        print(line + (f"  e.g. {examples[kind]}" if kind in examples else ""))


def _confinement(work: Path) -> None:
    """Writes that would leave the review through symlinks, '..' and absolute paths."""
    from robtui.cli import main as cli
    from robtui.devtools import stress
    from robtui.store.review_folder import ReviewFolder

    root = stress.make_review(work / "confined")
    outside = work / "outside"
    outside.mkdir()
    (root / "assessments" / "zed").symlink_to(outside, target_is_directory=True)
    ReviewFolder.open(root).edit_review(lambda r: r.reviewers.append("zed"))
    probes = {
        "assessments/<reviewer> is a symlink": [
            "assess", str(root), "--reviewer", "zed", "--study", "S1", "--result", "r1", "1.1=Y"
        ],
        "export name with '..'": [
            "export", str(root), "--as", "lee", "--format", "csv", "--out", "../../outside/x"
        ],
        "export name absolute": [
            "export", str(root), "--as", "lee", "--format", "csv", "--out", str(outside / "y")
        ],
    }
    refused = 0
    for argv in probes.values():
        refused += cli(argv) != 0
    (root / "reports" / "S1").rename(work / "moved-reports")
    (root / "reports" / "S1").symlink_to(work / "moved-reports", target_is_directory=True)
    report = outside / "extra.txt"
    report.write_text("Allocation was concealed.\n", encoding="utf-8")
    refused += cli(["study", "report", str(root), "--study", "S1", "--report", str(report)]) != 0
    written = sorted(p.name for p in outside.iterdir() if p.name != "extra.txt")
    print(
        f"confinement: {len(probes) + 1} probes, {refused} refused, "
        f"{len(written)} files written outside the review{': ' + ', '.join(written) if written else ''}"
    )


def _markdown() -> None:
    from robtui.reading.markup import read_markup

    for pattern in ("*a ", "![", "[a]("):
        line = (pattern * (60_000 // len(pattern))).encode("utf-8")
        start = time.perf_counter()
        document = read_markup(
            Path("line.md"), b"Participants were randomised.\n\n" + line, "0" * 64, "md"
        )
        took = time.perf_counter() - start
        print(
            f"markdown: 60 KB line of {pattern!r}: {took:.2f} s "
            f"({len(document.sentences)} sentences)"
        )
