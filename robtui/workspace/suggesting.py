"""Suggested sentences for files outside a review: one file, or many in the process pool."""

from __future__ import annotations

import threading
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path

from robtui.errors import InputError
from robtui.reading.reader import SUFFIX_KINDS


@dataclass(frozen=True)
class SuggestRequest:
    """What to rank: the file and the options of `robtui suggest`."""

    path: str
    questions: tuple[str, ...] | None = None
    effect: str = "assignment"
    top: int = 5
    threshold: float | None = None
    spread: bool = False
    question_set: str | None = None  # a bundled set id or design (None: the parallel set)

    def resolved_set(self):
        """The QuestionSet to rank for (None: the ranker's default)."""
        if self.question_set is None:
            return None
        from robtui.store.question_sets import bundled_catalogue

        return bundled_catalogue().resolve(self.question_set)


def payload(document, ranking: dict) -> dict:
    """The JSON object `robtui suggest --json` prints for one document."""
    return {
        "document": {"path": document.path, "sha256": document.sha256},
        "questions": {
            qid: [
                {"start": s.start, "end": s.end, "page": s.page, "section": s.section,
                 "score": s.score, "text": s.text}
                for s in items
            ]
            for qid, items in ranking.items()
        },
    }


def rank_file(request: SuggestRequest, ranker) -> tuple[object, dict]:
    """Read and rank one file: (document, suggestions per question)."""
    from robtui.reading.reader import read_document

    document = read_document(Path(request.path))
    ranking = ranker.rank(document, list(request.questions) if request.questions else None,
                          effect=request.effect, top=request.top,
                          threshold=request.threshold, spread=request.spread,
                          question_set=request.resolved_set())
    return document, ranking


def suggest_one(request: SuggestRequest) -> dict:
    """One JSON Lines object: the payload, or {"path", "error"} when the file cannot be ranked."""
    from robtui.errors import RobtuiError
    from robtui.workspace.preparing import worker_ranker

    try:
        document, ranking = rank_file(request, worker_ranker())
        return payload(document, ranking)
    except RobtuiError as error:
        return {"path": request.path, "error": str(error)}
    except Exception as error:  # noqa: BLE001 - one bad file must not stop the others
        return {"path": request.path, "error": f"{type(error).__name__}: {error}"}


def files_to_suggest(paths: Sequence[Path], lists: Sequence[Path] = ()) -> list[Path]:
    """The files named: folders give their report files (recursively, sorted); each list file
    names one file per line (blank lines and lines starting with # are skipped)."""
    out: list[Path] = []
    for listing in lists:
        try:
            lines = Path(listing).read_text(encoding="utf-8").splitlines()
        except OSError as error:
            raise InputError(f"{listing}: cannot read the list of files "
                             f"({error.strerror or error})") from error
        base = Path(listing).parent
        for line in lines:
            name = line.strip()
            if name and not name.startswith("#"):
                path = Path(name)
                out.append(path if path.is_absolute() else base / path)
    for path in paths:
        path = Path(path)
        if path.is_dir():
            found = sorted(p for p in path.rglob("*")
                           if p.is_file() and p.suffix.lower() in SUFFIX_KINDS
                           and not any(part.startswith(".") for part in p.relative_to(path).parts))
            if not found:
                raise InputError(f"{path}: no report files in this folder "
                                 f"(looked for {', '.join(sorted(SUFFIX_KINDS))})")
            out.extend(found)
        else:
            out.append(path)
    return out


def suggest_many(requests: Sequence[SuggestRequest], emit: Callable[[dict], None], *,
                 workers: int | None = None, cancel: threading.Event | None = None) -> bool:
    """Rank every request in the process pool and ``emit`` one object per file, in the order
    given (each as soon as it and all before it are done). Returns True when interrupted."""
    from robtui.workspace.preparing import default_workers, map_in_pool

    workers = default_workers() if workers is None else workers
    if workers == 0:
        for request in requests:
            if cancel is not None and cancel.is_set():
                return True
            emit(suggest_one(request))
        return False
    waiting: dict[int, dict] = {}
    next_out = 0

    def done(item: tuple[int, SuggestRequest], result, error) -> None:
        nonlocal next_out
        index, request = item
        if result is None:
            result = {"path": request.path,
                      "error": f"the worker ranking it stopped ({type(error).__name__}: {error})"}
        waiting[index] = result
        while next_out in waiting:
            emit(waiting.pop(next_out))
            next_out += 1

    items = list(enumerate(requests))
    return map_in_pool(suggest_one_at, items, min(workers, len(items)) or 1, done, cancel)


def suggest_one_at(item: tuple[int, SuggestRequest]) -> dict:
    """:func:`suggest_one` for an (index, request) pair (the pool keeps the input order)."""
    return suggest_one(item[1])
