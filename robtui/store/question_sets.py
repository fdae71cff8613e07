"""Question-set files: read, parse and validate; the bundled sets by id; a review's own sets
(DIR/question_sets/*.toml) and which set each study of a review uses.

Only the standard library and the core are imported so that `robtui judge` starts fast.
"""

from __future__ import annotations

import tomllib
from collections.abc import Mapping
from dataclasses import dataclass
from functools import cache
from pathlib import Path

from robtui.core.question_parsing import parse_question_set
from robtui.core.questions import QuestionSet
from robtui.core.review_sets import ReviewSets
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


QUESTION_SETS_DIR = "question_sets"  # a review's own sets: DIR/question_sets/*.toml


@dataclass(frozen=True)
class SetCatalogue:
    """The question sets a review can use: its own files first, then the bundled ones."""

    own: Mapping[str, QuestionSet]  # set id -> set, from DIR/question_sets/
    where: str = "the review"  # for messages
    hint: str = f"; a review's own set goes in its {QUESTION_SETS_DIR}/ folder"

    def bundled_ids(self) -> list[str]:
        return available_question_sets()

    def by_id(self, set_id: str) -> QuestionSet | None:
        if set_id in self.own:
            return self.own[set_id]
        return builtin_question_set(set_id) if set_id in self.bundled_ids() else None

    def by_design(self, design: str) -> QuestionSet | None:
        """The set that declares ``design``: the review's own before a bundled one."""
        for qset in self.own.values():
            if qset.design == design:
                return qset
        for set_id in self.bundled_ids():
            qset = builtin_question_set(set_id)
            if qset.design == design:
                return qset
        return None

    def designs(self) -> list[str]:
        sets = [*self.own.values(), *(builtin_question_set(i) for i in self.bundled_ids())]
        return list(dict.fromkeys(q.design for q in sets if q.design))

    def resolve(self, name: str) -> QuestionSet:
        """A set by id, else by the design it declares (InputError listing both kinds)."""
        qset = self.by_id(name) or self.by_design(name)
        if qset is None:
            ids = [*self.own, *self.bundled_ids()]
            raise InputError(
                f"no question set or design named {name!r} in {self.where}: use a design "
                f"({', '.join(self.designs()) or 'none'}) or a set id ({', '.join(ids)})"
                f"{self.hint}"
            )
        return qset


def review_catalogue(root: Path) -> SetCatalogue:
    """The review's own sets (DIR/question_sets/*.toml, each validated) and the bundled ones.

    A file that fails validation raises DataFileError naming it; two files with one id, or an
    own set reusing a bundled id, are refused (which one would a study get?).
    """
    folder = Path(root) / QUESTION_SETS_DIR
    own: dict[str, QuestionSet] = {}
    seen: dict[str, Path] = {}
    for path in sorted(folder.glob("*.toml")) if folder.is_dir() else []:
        qset = load_question_set(path)
        if qset.id in seen:
            raise DataFileError(
                f"{path}: question set id {qset.id!r} is also the id of {seen[qset.id].name}: "
                "give each set its own id"
            )
        if qset.id in available_question_sets():
            raise DataFileError(
                f"{path}: question set id {qset.id!r} is the id of a bundled set: give the "
                "review's own set another id (and raise its version when you change it)"
            )
        seen[qset.id] = path
        own[qset.id] = qset
    return SetCatalogue(own, where=str(root))


def bundled_catalogue() -> SetCatalogue:
    """The bundled sets alone (for commands that work without a review)."""
    return SetCatalogue({}, where="the bundled sets", hint="")


def review_question_sets(folder, catalogue: SetCatalogue | None = None) -> ReviewSets:
    """Each study's question set: its ``design`` (a design or set id), else the review's set.

    ``folder`` is a ReviewFolder. DataFileError names review.toml and the study when a name
    matches no set.
    """
    catalogue = catalogue or review_catalogue(folder.root)
    review = folder.review
    try:
        default = catalogue.resolve(review.question_set)
    except InputError as error:
        raise DataFileError(f"{folder.review_path}: question_set: {error}") from None
    by_study: dict[str, QuestionSet] = {}
    for study in review.studies:
        if study.design is None:
            continue
        try:
            by_study[study.id] = catalogue.resolve(study.design)
        except InputError as error:
            raise DataFileError(f"{folder.review_path}: study {study.id}, design: {error}") from None
    return ReviewSets(default, by_study)


def review_question_set(folder) -> QuestionSet:
    """The review's own default question set (review.toml ``question_set``), as
    review_question_sets resolves it (DataFileError naming review.toml when unknown)."""
    return review_question_sets(folder).default
