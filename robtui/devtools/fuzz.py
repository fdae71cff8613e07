"""Mutated inputs for robtui's readers and review-file loaders (fuzzing).

A seed per input kind (a small report in each format, an assessment, a consensus record,
review.toml, rules.toml), byte-level mutations (flip, insert, delete, truncate, duplicate,
splice in a token that parsers treat specially), and ``try_input`` which feeds one input to
the loader a user's file would meet and returns what escaped that is not robtui's own error.
tests/fuzz (hypothesis chooses the mutations) and ``robtui bench robustness`` (random ones,
5,000 by default) use it.
"""

from __future__ import annotations

import random
import shutil
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from robtui.errors import ReaderBugError, RobtuiError

REPORT_TEXT = (
    "Lantern oil for invented night cramps: a randomised trial\n\n"
    "Methods\n"
    "Participants were randomised by a computer-generated list held by the pharmacy.\n"
    "Allocation was concealed in sealed opaque envelopes; outcome assessors were blinded.\n"
    "Results\n"
    "Of 120 participants, 114 completed follow-up (95% CI 0.81 to 0.97; p = 0.02).\n"
)
KINDS = ("txt", "md", "html", "pdf", "assessment", "consensus", "review", "rules")

# Tokens that parsers treat specially: quotes and brackets, NUL, BOMs, huge numbers, codes.
TOKENS = (
    b'"', b"{", b"}", b"[", b"]", b"\x00", b"\xff\xfe", b"\xef\xbb\xbf", b"\\u0000", b"1e999",
    b"-1", b"null", b"true", b'"NA"', b'"Q"', b"\n[[studies]]\n", b"=", b"\x1b[2J", b"%%EOF",
    b"endobj", b"<</Length 99999999>>", b"stream\n", b"*a " * 50, b"![" * 50, b"\xd8\x00",
    b"A" * 5000,
)


@dataclass(frozen=True)
class Mutation:
    """One change to a byte string (positions are fractions of its length, 0..1)."""

    op: str  # flip | insert | delete | truncate | duplicate | token
    at: float
    size: int = 1
    value: int = 0

    def apply(self, data: bytes) -> bytes:
        n = len(data)
        i = min(int(self.at * n), max(n - 1, 0))
        if self.op == "flip" and n:
            return data[:i] + bytes([data[i] ^ (self.value or 1)]) + data[i + 1 :]
        if self.op == "insert":
            return data[:i] + bytes([self.value % 256]) * self.size + data[i:]
        if self.op == "delete":
            return data[:i] + data[i + self.size :]
        if self.op == "truncate":
            return data[:i]
        if self.op == "duplicate":
            return data[:i] + data[i : i + self.size] * 2 + data[i + self.size :]
        if self.op == "token":
            return data[:i] + TOKENS[self.value % len(TOKENS)] + data[i:]
        return data


OPS = ("flip", "insert", "delete", "truncate", "duplicate", "token")


def random_mutations(rng: random.Random, most: int = 4) -> list[Mutation]:
    return [
        Mutation(rng.choice(OPS), rng.random(), rng.randint(1, 64), rng.randint(0, 255))
        for _ in range(rng.randint(1, most))
    ]


def mutate(data: bytes, mutations: list[Mutation]) -> bytes:
    for m in mutations:
        data = m.apply(data)
    return data


class Seeds:
    """The seed bytes of every kind, made once in ``workdir`` (a review for the loaders)."""

    def __init__(self, workdir: Path) -> None:
        from robtui.devtools.pdf_writer import render_text_as_pdf
        from robtui.devtools.stress import make_review

        self.workdir = Path(workdir)
        self.workdir.mkdir(parents=True, exist_ok=True)
        self.review = make_review(self.workdir / "seed-review")
        self._make_records()
        pdf = self.workdir / "seed.pdf"
        render_text_as_pdf(REPORT_TEXT, pdf)
        md = REPORT_TEXT.replace("Methods\n", "## Methods\n").replace("Results\n", "## Results\n")
        html = "<html><body>" + "".join(f"<p>{line}</p>" for line in REPORT_TEXT.splitlines())
        self.data: dict[str, bytes] = {
            "txt": REPORT_TEXT.encode("utf-8"),
            "md": md.encode("utf-8"),
            "html": (html + "</body></html>").encode("utf-8"),
            "pdf": pdf.read_bytes(),
            "assessment": self.assessment_path.read_bytes(),
            "consensus": self.consensus_path.read_bytes(),
            "review": (self.review / "review.toml").read_bytes(),
            "rules": (self.review / "rules.toml").read_bytes(),
        }

    def _make_records(self) -> None:
        from robtui.core import assessing
        from robtui.core.model import Answer, Consensus, Decision
        from robtui.core.rules import AnsweringRule, RuleBook
        from robtui.store.question_sets import builtin_question_set
        from robtui.store.review_folder import ReviewFolder
        from robtui.store.rules_file import save_rulebook

        folder = ReviewFolder.open(self.review)
        qset = builtin_question_set(folder.review.question_set)
        a = assessing.new_assessment(folder.review, "S1", "r1", "ana", qset)
        for qid in ("1.1", "1.2", "1.3"):
            a = assessing.set_response(a, qset, qid, "Y")
        a = assessing.set_justification(a, qset, "1.1", "list kept by the pharmacy")
        self.assessment_path = folder.save_assessment(a)
        consensus = Consensus(
            study_id="S1",
            result_id="r1",
            reviewers=("ana", "ben"),
            lead="lee",
            answers={"1.1": Answer(response="Y", justification="both: computer list")},
            decisions={"1.1": Decision(question_id="1.1", source="agreed", response="Y")},
        )
        self.consensus_path = folder.save_consensus(consensus)
        book = RuleBook(
            question_set=qset.id,
            question_set_version=qset.version,
            version=1,
            rules=(AnsweringRule(id="r1", question_id="1.1", text="Computer lists are random"),),
        )
        save_rulebook(folder.rules_path, book, expected_version=0, qset=qset)


def try_input(kind: str, data: bytes, seeds: Seeds, scratch: Path) -> BaseException | None:
    """Feed ``data`` as a file of ``kind`` to the loader a user's file would meet; return the
    exception when it is not one of robtui's own errors (or is a reader bug), else None."""
    try:
        _LOADERS[kind](data, seeds, Path(scratch))
    except ReaderBugError as error:
        return error
    except RobtuiError:
        return None
    except Exception as error:  # noqa: BLE001 - this is what the fuzzing looks for
        return error
    return None


def _read_report(suffix: str) -> Callable[[bytes, Seeds, Path], None]:
    def load(data: bytes, seeds: Seeds, scratch: Path) -> None:
        from robtui.reading.reader import read_document

        path = scratch / f"report{suffix}"
        path.write_bytes(data)
        read_document(path, use_cache=False)

    return load


def _review_copy(seeds: Seeds, scratch: Path) -> Path:
    root = scratch / "review"
    if root.exists():
        shutil.rmtree(root)
    shutil.copytree(seeds.review, root)
    return root


def _load_record(relative: Callable[[Seeds], Path], load: str):
    def run(data: bytes, seeds: Seeds, scratch: Path) -> None:
        from robtui.store.review_folder import ReviewFolder

        root = _review_copy(seeds, scratch)
        (root / relative(seeds).relative_to(seeds.review)).write_bytes(data)
        folder = ReviewFolder.open(root)
        if load == "assessment":
            folder.load_assessment("ana", "S1", "r1")
            folder.assessments()
        elif load == "consensus":
            folder.load_consensus("S1", "r1")
            folder.consensus_records()

    return run


def _load_review(data: bytes, seeds: Seeds, scratch: Path) -> None:
    from robtui.store.review_folder import ReviewFolder

    root = _review_copy(seeds, scratch)
    (root / "review.toml").write_bytes(data)
    folder = ReviewFolder.open(root)
    folder.assessments()
    for study in folder.review.studies:
        for report in study.reports:
            folder.check_report(report)


def _load_rules(data: bytes, seeds: Seeds, scratch: Path) -> None:
    from robtui.store.question_sets import builtin_question_set
    from robtui.store.rules_file import load_rulebook

    path = scratch / "rules.toml"
    path.write_bytes(data)
    load_rulebook(path, builtin_question_set("rob2-parallel"))


_LOADERS: dict[str, Callable[[bytes, Seeds, Path], None]] = {
    "txt": _read_report(".txt"),
    "md": _read_report(".md"),
    "html": _read_report(".html"),
    "pdf": _read_report(".pdf"),
    "assessment": _load_record(lambda s: s.assessment_path, "assessment"),
    "consensus": _load_record(lambda s: s.consensus_path, "consensus"),
    "review": _load_review,
    "rules": _load_rules,
}


def describe(error: BaseException) -> str:
    return f"{type(error).__name__}: {str(error)[:200]}"

