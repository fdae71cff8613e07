"""The review's answering rules on disk: DIR/rules.toml, versioned, validated, saved atomically.

File layout (TOML)::

    schema_version = 1
    question_set = "rob2-parallel"
    question_set_version = "1"
    version = 2                      # goes up by one with every change
    updated = "2026-01-01T12:00:00Z"

    [[rules]]
    id = "R1"
    question = "4.4"
    text = "Death from any cause is counted the same whoever knows the allocation."
    answer = "N"                     # optional
    added_in = 1
    retired_in = 2                   # only once withdrawn
    note = "calibration round 1"
    author = "lead"
    when = { outcome_type = "objective", self_reported = false }

Withdrawn rules stay in the file, so the rules in force at any older version can be compared.
Every saved version is also kept in DIR/rules_history/ as ``rules-v<N>.toml``, and before a
save replaces rules.toml the text it replaces is kept there too (nothing is lost, even a hand
edit that did not raise the version; ``hand_edit_warning`` notices such an edit).
"""

from __future__ import annotations

import tomllib
from dataclasses import replace
from pathlib import Path
from typing import Any

import tomli_w
from pydantic import BaseModel, ConfigDict, Field, ValidationError

from robtui.core.model import SCHEMA_VERSION, Response, utc_now
from robtui.core.rules import (
    AnsweringRule,
    QuestionSetLike,
    RuleBook,
    normalise_condition,
    validate_rulebook,
)
from robtui.errors import DataFileError, InputError
from robtui.files import review_lock, write_text_atomic
from robtui.store.records import check_schema
from robtui.store.records import read_text_file as read_text

RULES_FILE = "rules.toml"
HISTORY_DIR = "rules_history"


class _RuleEntry(BaseModel):
    model_config = ConfigDict(extra="forbid")

    id: str = Field(pattern=r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,31}$")
    question: str = Field(min_length=1)
    text: str = Field(min_length=1)
    answer: Response | None = None
    added_in: int = Field(ge=1)
    retired_in: int | None = Field(default=None, ge=2)
    note: str = ""
    author: str | None = None
    when: dict[str, str | bool] = Field(default_factory=dict)


class _RulesFile(BaseModel):
    model_config = ConfigDict(extra="forbid")

    schema_version: int
    question_set: str = Field(min_length=1)
    question_set_version: str = Field(min_length=1)
    version: int = Field(ge=0)
    updated: str = ""
    rules: list[_RuleEntry] = Field(default_factory=list)


def history_dir(rules_path: Path) -> Path:
    return Path(rules_path).parent / HISTORY_DIR


def empty_rulebook(qset: QuestionSetLike | None = None) -> RuleBook:
    """Version 0: no rules written yet."""
    if qset is None:
        return RuleBook()
    return RuleBook(question_set=qset.id, question_set_version=str(qset.version))


def _entry_name(data: Any, index: int) -> str:
    rules = data.get("rules") if isinstance(data, dict) else None
    rule_id = None
    if isinstance(rules, list) and index < len(rules) and isinstance(rules[index], dict):
        rule_id = rules[index].get("id")
    return f"rule {rule_id} (entry {index + 1})" if rule_id else f"rule entry {index + 1}"


def _describe(error: ValidationError, data: Any) -> str:
    lines = []
    for item in error.errors():
        loc = list(item["loc"])
        if len(loc) >= 2 and loc[0] == "rules" and isinstance(loc[1], int):
            where = _entry_name(data, loc[1])
            rest = ".".join(str(p) for p in loc[2:])
            lines.append(f"{where}: {rest + ': ' if rest else ''}{item['msg']}")
        else:
            lines.append(f"{'.'.join(str(p) for p in loc) or '(file)'}: {item['msg']}")
    return "; ".join(lines)


def parse_rules_text(text: str, path: Path) -> RuleBook:
    """Parse the text of a rules file (DataFileError naming ``path`` and the entry)."""
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise DataFileError(
            f"{path}: not valid TOML ({error}): fix the file by hand or restore it from "
            f"{HISTORY_DIR}/ or git; until then the rules are unavailable (nothing was changed)"
        ) from None
    check_schema(data, path)
    try:
        model = _RulesFile.model_validate(data)
    except ValidationError as error:
        raise DataFileError(f"{path}: {_describe(error, data)}: fix the file by hand") from None
    rules = []
    for index, entry in enumerate(model.rules):
        try:
            when = []
            for attr, value in entry.when.items():
                when.append(normalise_condition(attr, value))
        except ValueError as error:
            raise DataFileError(
                f"{path}: {_entry_name(data, index)}: {error}: fix the file by hand"
            ) from None
        rules.append(
            AnsweringRule(
                id=entry.id,
                question_id=entry.question,
                text=entry.text,
                when=tuple(sorted(when)),
                answer=entry.answer,
                note=entry.note,
                author=entry.author,
                added_in=entry.added_in,
                retired_in=entry.retired_in,
            )
        )
    return RuleBook(
        question_set=model.question_set,
        question_set_version=model.question_set_version,
        version=model.version,
        updated=model.updated,
        rules=tuple(rules),
    )


def check_rulebook(book: RuleBook, qset: QuestionSetLike, path: Path) -> None:
    """Raise DataFileError listing every problem of ``book`` against ``qset``."""
    problems = validate_rulebook(book, qset)
    if problems:
        listed = "; ".join(str(p) for p in problems)
        raise DataFileError(
            f"{path}: {listed}: fix the file by hand (`robtui rules check` lists every problem)"
        )


def load_rulebook(path: Path, qset: QuestionSetLike | None = None) -> RuleBook:
    """Read and validate rules.toml; an absent file is the empty book (version 0)."""
    path = Path(path)
    if not path.exists():
        return empty_rulebook(qset)
    text = read_text(path)
    book = parse_rules_text(text, path)
    if qset is not None:
        check_rulebook(book, qset, path)
    return book


def rules_to_toml(book: RuleBook) -> str:
    """The file text of ``book`` (stable: same book, same bytes)."""
    rules = []
    for r in book.rules:
        entry: dict[str, Any] = {"id": r.id, "question": r.question_id, "text": r.text}
        if r.answer is not None:
            entry["answer"] = r.answer
        entry["added_in"] = r.added_in
        if r.retired_in is not None:
            entry["retired_in"] = r.retired_in
        if r.note:
            entry["note"] = r.note
        if r.author:
            entry["author"] = r.author
        if r.when:
            entry["when"] = {k: (v == "true") if k == "self_reported" else v for k, v in r.when}
        rules.append(entry)
    data: dict[str, Any] = {
        "schema_version": SCHEMA_VERSION,
        "question_set": book.question_set,
        "question_set_version": str(book.question_set_version),
        "version": book.version,
        "updated": book.updated,
    }
    if rules:
        data["rules"] = rules
    return tomli_w.dumps(data)


def _keep_copy(path: Path, text: str, version: int) -> None:
    """Keep ``text`` as rules_history/rules-v<version>.toml (``.1``, ``.2`` ... when a different
    text of the same version is already kept)."""
    folder = history_dir(path)
    name = f"rules-v{version}.toml"
    candidate = folder / name
    n = 1
    while candidate.exists():
        if candidate.read_text(encoding="utf-8") == text:
            return
        candidate = folder / f"rules-v{version}.{n}.toml"
        n += 1
    write_text_atomic(candidate, text)


def save_rulebook(
    path: Path, book: RuleBook, *, expected_version: int, qset: QuestionSetLike | None = None
) -> RuleBook:
    """Write ``book`` to ``path`` atomically, after checking what is on disk first.

    The file on disk must read cleanly and still be at ``expected_version`` (the version the
    change was made from); otherwise nothing is written. The replaced text is kept in
    rules_history/. Returns the book as saved (``updated`` set when blank).
    """
    path = Path(path)
    if qset is not None:
        check_rulebook(book, qset, path)
    # The check of the version on disk and the write happen under the review's lock.
    with review_lock(path.parent):
        return _save_rulebook_locked(path, book, expected_version)


def _save_rulebook_locked(path: Path, book: RuleBook, expected_version: int) -> RuleBook:
    previous_text = None
    if path.exists():
        try:
            previous_text = path.read_text(encoding="utf-8")
            on_disk = parse_rules_text(previous_text, path)
        except (DataFileError, OSError, UnicodeDecodeError) as error:
            raise DataFileError(
                f"{error} (not saved: the rules file was left as it is; fix it first)"
            ) from None
        if on_disk.version != expected_version:
            raise InputError(
                f"{path} changed while this change was being made (version {on_disk.version} "
                f"on disk, {expected_version} expected): nothing was saved; run the command again"
            )
    elif expected_version != 0:
        raise InputError(f"{path} disappeared while this change was being made: nothing was saved")
    if book.version <= expected_version:
        raise InputError(
            f"a changed rule book must have a version above {expected_version} (got {book.version})"
        )
    if not book.updated:
        book = _with_updated(book)
    if previous_text is not None:
        _keep_copy(path, previous_text, expected_version)
    text = rules_to_toml(book)
    # The history copy first: if it cannot be written, rules.toml is left as it was.
    _keep_copy(path, text, book.version)  # lets a later hand edit be noticed
    write_text_atomic(path, text)
    return book


def hand_edit_warning(path: Path, book: RuleBook) -> str | None:
    """A warning when rules.toml differs from the copy robtui saved of the same version: the
    file was edited by hand without raising ``version``, so assessments made before the edit
    are not listed for a second look."""
    saved = history_dir(path) / f"rules-v{book.version}.toml"
    if not saved.is_file() or book.version == 0:
        return None
    try:
        same = parse_rules_text(saved.read_text(encoding="utf-8"), saved) == book
    except (DataFileError, OSError, UnicodeDecodeError):
        return None
    if same:
        return None
    return (
        f"{path} was changed by hand since version {book.version} was saved, without raising "
        f"its version: raise `version` to {book.version + 1} so that assessments made before "
        "the change are listed for a second look"
    )


def _with_updated(book: RuleBook) -> RuleBook:
    return replace(book, updated=utc_now().isoformat().replace("+00:00", "Z"))


def load_folder_rules(folder, qset: QuestionSetLike | None = None) -> RuleBook:
    """The validated rules of a ReviewFolder (raises DataFileError when they are unusable);
    ``qset`` is the review's question set when the caller holds it already."""
    from robtui.store.question_sets import review_question_set

    return load_rulebook(folder.rules_path, qset or review_question_set(folder))


def load_rules_safely(
    folder, qset: QuestionSetLike | None = None
) -> tuple[RuleBook | None, str | None]:
    """For the workbench: ``(rules, None)``, or ``(None, message)`` when they are unavailable.

    Never raises: a rules file that fails validation must not block opening the review.
    ``folder`` is a ReviewFolder or the path of a review folder.
    """
    try:
        if isinstance(folder, (str, Path)):
            from robtui.store.review_folder import ReviewFolder

            folder = ReviewFolder.open(Path(folder))
        return load_folder_rules(folder, qset), None
    except Exception as error:  # noqa: BLE001 - the app must open whatever is wrong here
        return None, f"answering rules unavailable: {error}"
