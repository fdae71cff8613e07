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
- time to read one pathological Markdown line (linear since the patterns are bounded);
- large inputs: peak memory (RSS of a fresh process) reading text, Markdown, HTML and registry
  records of growing size, one over the text limit (refused), and `robtui suggest` on text.

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
        "--quick", action="store_true", help="10 double writes, 10 kills, 200 inputs, 1 MB inputs"
    )
    parser.add_argument(
        "--large-only", action="store_true", help="only the peak memory on large inputs"
    )
    return parser.parse_args(argv)


def main(argv: list[str]) -> int:
    args = _parse(argv)
    if args.quick:
        args.double_writes, args.kills, args.inputs = 10, 10, 200
    work = Path(tempfile.mkdtemp(prefix="robtui-robustness-"))
    try:
        if not args.large_only:
            _double_writes(work, args.double_writes, args.seed)
            _kills(work, args.kills, args.seed)
            _fuzz(work, args.inputs, args.seed)
            _confinement(work)
            _markdown()
        _large_inputs(work, (1.0,) if args.quick else (1.0, 4.5))
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


# -- large inputs: peak memory ------------------------------------------------------------------
# Each measurement runs in a fresh interpreter and prints its own peak resident set size in
# kilobytes: VmHWM of /proc/self/status on Linux (the peak of this program's own memory;
# getrusage's ru_maxrss would count the benchmark's memory too, as Linux carries the parent's
# peak over fork and exec), else ru_maxrss.
_PEAK = (
    "import resource,sys,time;from pathlib import Path;t=time.perf_counter();"
    "from robtui.errors import RobtuiError\n"
    "try:\n"
    " {action}\n"
    "except RobtuiError as e: out='refused: '+str(e).split(': ',1)[1][:60]\n"
    "print(out);print(time.perf_counter()-t)\n"
    "try: print(next(int(l.split()[1]) for l in open('/proc/self/status') if l[:6]=='VmHWM:'))\n"
    "except (OSError, StopIteration): print(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss)"
)
_READ = (
    "from robtui.reading.reader import read_document;"
    "out=str(len(read_document(Path(sys.argv[1]),use_cache=False).sentences))+' sentences'"
)
_SUGGEST = (
    "from robtui.cli import main;import contextlib,io;buf=io.StringIO()\n"
    " with contextlib.redirect_stdout(buf): rc=main(['suggest',sys.argv[1],'--json'])\n"
    " out=f'exit {rc}'"
)


def _sample_text() -> str:
    from robtui.paths import bundled_dir

    reports = sorted(bundled_dir("sample_reports").glob("*.txt"))
    return "\n\n".join(p.read_text(encoding="utf-8") for p in reports)


def _large_files(work: Path, megabytes: float) -> dict[str, Path]:
    """Text, Markdown, HTML and a registry record of about ``megabytes`` MB of report text
    (the invented sample reports over and over)."""
    import html

    from robtui.paths import bundled_dir

    text = _sample_text()
    size = int(megabytes * 1_000_000)
    text = (text * (size // len(text) + 1))[:size]
    paragraphs = [p for p in text.split("\n\n") if p.strip()]
    tag = f"{megabytes:g}MB"
    files = {
        "txt": (work / f"large-{tag}.txt", text),
        "md": (work / f"large-{tag}.md",
               "\n\n".join(("## " + p) if len(p) < 60 else p for p in paragraphs)),
        "html": (work / f"large-{tag}.html", "<html><body>" + "".join(
            f"<p>{html.escape(p)}</p>\n" for p in paragraphs) + "</body></html>"),
    }  # fmt: skip
    record = (bundled_dir("sample_reports") / "registry" / "alder-registry.xml").read_text()
    marker = "Headache Impact Score; Time frame: 12 weeks"
    outcome = "Use of acute headache medication, count {i}; Time frame: weeks 9 to 12\n"
    outcomes = "".join(outcome.format(i=i) for i in range(int(size * 0.6) // len(outcome)))
    files["registry"] = (work / f"large-{tag}.xml", record.replace(marker, outcomes + marker))
    for path, content in files.values():
        path.write_text(content, encoding="utf-8")
    return {kind: path for kind, (path, _) in files.items()}


def _peak(action: str, path: Path, cache: Path) -> tuple[str, float, float]:
    import os
    import subprocess
    import sys

    env = {**os.environ, "ROBTUI_CACHE_DIR": str(cache)}
    run = subprocess.run([sys.executable, "-c", _PEAK.format(action=action), str(path)],
                         capture_output=True, text=True, env=env, check=False)  # fmt: skip
    lines = run.stdout.strip().splitlines()
    if run.returncode != 0 or len(lines) < 3:
        return f"failed: {run.stderr.strip().splitlines()[-1:]}", 0.0, 0.0
    return lines[-3], float(lines[-2]), int(lines[-1]) / 1024


def _large_inputs(work: Path, sizes: tuple[float, ...]) -> None:
    from robtui.paths import bundled_dir
    from robtui.reading.reader import MAX_DOCUMENT_CHARS, MAX_TEXT_BYTES

    cache = work / "cache"
    _, _, base = _peak(_READ.split(";out=")[0] + ";out='-'", Path("none"), cache)
    print(f"large inputs: peak memory (RSS) of a fresh process; the reader imported, nothing "
          f"read: {base:.0f} MB; text limit {MAX_DOCUMENT_CHARS / 1e6:g} million characters")  # fmt: skip
    for megabytes in sizes:
        for kind, path in _large_files(work, megabytes).items():
            size = path.stat().st_size / 1e6
            what, took, peak = _peak(_READ, path, cache)
            print(f"  read {kind:<8} {size:5.1f} MB: peak {peak:5.0f} MB "
                  f"({(peak - base) / size:4.1f} MB per input MB above that), "
                  f"{took:4.1f} s, {what}")  # fmt: skip
    over = work / "over-limit.txt"
    over.write_text(_sample_text() * (MAX_TEXT_BYTES // len(_sample_text())), encoding="utf-8")
    what, took, peak = _peak(_READ, over, cache)
    print(f"  read txt over the limit, {over.stat().st_size / 1e6:.1f} MB: peak {peak:.0f} MB, "
          f"{took:.1f} s, {what}")  # fmt: skip
    one = min(bundled_dir("sample_reports").glob("*.txt"))
    _, took, small = _peak(_SUGGEST, one, cache)
    print(f"  suggest one sample report ({one.stat().st_size / 1e3:.0f} KB): peak {small:.0f} MB, "
          f"{took:.1f} s")  # fmt: skip
    for megabytes in sizes:
        path = _large_files(work, megabytes)["txt"]
        what, took, peak = _peak(_SUGGEST, path, cache)
        size = path.stat().st_size / 1e6
        print(f"  suggest txt {size:4.1f} MB: peak {peak:5.0f} MB "
              f"({(peak - small) / size:5.1f} MB per input MB above one report), "
              f"{took:5.1f} s, {what}")  # fmt: skip
