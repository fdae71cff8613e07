"""Many hands on one review: concurrent writers and killed saves, as a tester would try them.

Used by tests/store/test_concurrency.py (a few trials) and ``robtui bench robustness`` (100 of
each). Every scenario runs real processes: ``robtui assess`` from the shell, or a writer loop
through the library that is killed with SIGKILL in the middle of its saves.
"""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path

# Questions asked whatever the other answers are (RoB 2 parallel set, effect of assignment).
ALWAYS_ASKED = ("1.1", "1.2", "1.3", "2.1", "2.2", "3.1", "4.1", "4.2", "5.1", "5.2", "5.3")
STUDY, RESULT = "S1", "r1"


def make_review(root: Path, reviewers: tuple[str, ...] = ("ana", "ben")) -> Path:
    """A small review: one study with a text report, one result, the reviewers listed."""
    from robtui.core.model import ResultSpec
    from robtui.store.review_folder import ReviewFolder

    root = Path(root)
    folder = ReviewFolder.create(root, "Stress review", lead="lee", reviewers=reviewers)
    report = root.parent / f"{root.name}-report.txt"
    report.write_text("Participants were randomised by a computer list.\n", encoding="utf-8")
    folder.add_study(STUDY, "Study one", [report])
    folder.add_result(ResultSpec(id=RESULT, outcome="pain"))
    return root


def _robtui(*args: str) -> list[str]:
    return [sys.executable, "-m", "robtui", *args]


def assess_at_once(root: Path, reviewer: str, answers: list[tuple[str, str]]) -> list[int]:
    """Start one ``robtui assess`` process per answer at the same moment; their exit codes."""
    procs = [
        subprocess.Popen(
            _robtui("assess", str(root), "--reviewer", reviewer, "--study", STUDY,
                    "--result", RESULT, f"{qid}={code}"),
            stdout=subprocess.DEVNULL,
            stderr=subprocess.PIPE,
        )
        for qid, code in answers
    ]
    return [p.wait() for p in procs]


def stored_answers(root: Path, reviewer: str) -> dict[str, str]:
    """The answers on disk (raises a robtui error when the file does not parse)."""
    from robtui.store.review_folder import ReviewFolder

    a = ReviewFolder.open(root).load_assessment(reviewer, STUDY, RESULT)
    if a is None:
        return {}
    return {k: v.response for k, v in a.answers.items() if v.response}


@dataclass
class Tally:
    """What a scenario did and what it found (every count of a finding should be 0)."""

    trials: int = 0
    kills: int = 0
    answers_written: int = 0
    confirmed_saves: int = 0
    answers_lost: int = 0
    failed_commands: int = 0
    unreadable_files: int = 0
    leftovers_after_next_save: int = 0


def double_writes(root: Path, trials: int, seed: int = 1) -> Tally:
    """Two ``robtui assess`` on the same reviewer and result at once, each answering its own
    question, ``trials`` times (fresh reviewer per trial); counts answers missing after."""
    rng = random.Random(seed)
    tally = Tally()
    for trial in range(trials):
        reviewer = f"w{trial}"
        q1, q2 = rng.sample(ALWAYS_ASKED, 2)
        wanted = [(q1, rng.choice(("Y", "PY"))), (q2, rng.choice(("N", "PN")))]
        codes = assess_at_once(root, reviewer, wanted)
        # --add-reviewer is not given: the reviewers are listed up front by the caller.
        tally.failed_commands += sum(1 for c in codes if c != 0)
        on_disk = stored_answers(root, reviewer)
        tally.trials += 1
        tally.answers_written += len(wanted)
        tally.answers_lost += sum(1 for qid, code in wanted if on_disk.get(qid) != code)
    return tally


_WRITER = r"""
import sys
from pathlib import Path
from robtui.core import assessing
from robtui.store.question_sets import builtin_question_set
from robtui.store.review_folder import ReviewFolder

root, reviewer, qid = Path(sys.argv[1]), sys.argv[2], sys.argv[3]
folder = ReviewFolder.open(root)
qset = builtin_question_set(folder.review.question_set)
i = 0
while True:
    i += 1
    def change(a, i=i):
        a = a or assessing.new_assessment(folder.review, "S1", "r1", reviewer, qset)
        a = assessing.set_response(a, qset, qid, "Y" if i % 2 else "N")
        return assessing.set_justification(a, qset, qid, f"save {i}")
    folder.update_assessment(reviewer, "S1", "r1", change)
    print(i, flush=True)
"""


def kills_during_saves(root: Path, kills: int, seed: int = 2, reviewer: str = "ana") -> Tally:
    """Two writer processes save their own question of one assessment in a loop; one of them
    is killed with SIGKILL at a random moment, ``kills`` times. After each kill the file must
    parse and hold every save either writer confirmed (the last confirmed one or a newer)."""
    rng = random.Random(seed)
    tally = Tally()
    env = dict(os.environ, PYTHONUNBUFFERED="1")
    steady_q, killed_q = "1.1", "1.2"
    steady = subprocess.Popen(
        [sys.executable, "-c", _WRITER, str(root), reviewer, steady_q],
        stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env,
    )
    try:
        for _ in range(kills):
            victim = subprocess.Popen(
                [sys.executable, "-c", _WRITER, str(root), reviewer, killed_q],
                stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env,
            )
            # Let it start saving (its first line), then kill it a moment later.
            first = victim.stdout.readline()
            time.sleep(rng.uniform(0.0, 0.05))
            victim.send_signal(signal.SIGKILL)
            out, _ = victim.communicate()
            tally.kills += 1
            confirmed = [int(x) for x in (first + out).split()]
            tally.confirmed_saves += len(confirmed)
            last = max(confirmed, default=0)
            try:
                a = _load(root, reviewer)
            except Exception:  # noqa: BLE001 - counted: any failure to parse is a finding
                tally.unreadable_files += 1
                continue
            answer = a.answers.get(killed_q) if a else None
            saved = int(answer.justification.split()[-1]) if answer and last else 0
            if last and saved < last:
                tally.answers_lost += 1
        steady.send_signal(signal.SIGTERM)
        out, _ = steady.communicate()
    finally:
        if steady.poll() is None:
            steady.kill()
            steady.wait()
    steady_confirmed = [int(x) for x in out.split()]
    tally.confirmed_saves += len(steady_confirmed)
    a = _load(root, reviewer)
    answer = a.answers.get(steady_q) if a else None
    if steady_confirmed and (answer is None or int(answer.justification.split()[-1]) < max(steady_confirmed)):
        tally.answers_lost += 1
    tally.leftovers_after_next_save = leftovers_after_save(root, reviewer)
    return tally


def _load(root: Path, reviewer: str):
    from robtui.store.review_folder import ReviewFolder

    return ReviewFolder.open(root).load_assessment(reviewer, STUDY, RESULT)


def leftovers_after_save(root: Path, reviewer: str) -> int:
    """Hidden temp files left in the reviewer's folder after one more save there."""
    from robtui.core import assessing
    from robtui.store.question_sets import builtin_question_set
    from robtui.store.review_folder import ReviewFolder

    folder = ReviewFolder.open(root)
    qset = builtin_question_set(folder.review.question_set)
    folder.update_assessment(
        reviewer, STUDY, RESULT,
        lambda a: assessing.set_justification(a, qset, "5.3", f"checked {time.time()}"),
    )
    return sum(1 for p in (root / "assessments" / reviewer).iterdir() if p.name.endswith(".tmp"))
