"""Question-set files: read, parse and validate; the bundled sets by id.

Only the standard library and the core are imported so that `robtui judge` starts fast.
"""

from __future__ import annotations

import tomllib
from functools import cache
from pathlib import Path

from robtui.core.question_parsing import parse_question_set
from robtui.core.questions import QuestionSet
from robtui.errors import DataFileError, InputError
from robtui.paths import bundled_dir


def load_question_set(path: Path) -> QuestionSet:
    """Read and validate a question set file (raises DataFileError naming file, entry, problem)."""
    path = Path(path)
    try:
        raw = path.read_bytes()
    except OSError as error:
        raise DataFileError(f"{path}: cannot read the question set ({error.strerror or error})")
    try:
        data = tomllib.loads(raw.decode("utf-8"))
    except UnicodeDecodeError:
        raise DataFileError(f"{path}: not UTF-8 text; save the file as UTF-8") from None
    except tomllib.TOMLDecodeError as error:
        raise DataFileError(f"{path}: not valid TOML ({error})") from None
    return parse_question_set(data, str(path))


def _bundled_folder() -> Path:
    return bundled_dir("signalling_questions")


def available_question_sets() -> list[str]:
    """Ids of the bundled question sets (file names without .toml)."""
    folder = _bundled_folder()
    return sorted(p.stem for p in folder.glob("*.toml")) if folder.is_dir() else []


@cache
def builtin_question_set(set_id: str = "rob2-parallel") -> QuestionSet:
    """A bundled question set by id (loaded once, validated)."""
    names = available_question_sets()
    if set_id not in names:
        raise InputError(
            f"no bundled question set named {set_id!r}; available: {', '.join(names) or 'none'}"
        )
    return load_question_set(_bundled_folder() / f"{set_id}.toml")


def review_question_set(folder) -> QuestionSet:
    """The question set a review folder uses (DataFileError naming review.toml when unknown).

    ``folder`` is a ReviewFolder (only its ``review`` and ``review_path`` are used).
    """
    name = folder.review.question_set
    try:
        return builtin_question_set(name)
    except InputError as error:
        raise DataFileError(f"{folder.review_path}: unknown question set {name!r}: {error}") from None
