"""Turning records into file text and back: stable JSON and TOML, clear errors for bad files.

Every file carries ``schema_version``; a file from a newer robtui is refused with
NewerSchemaError before anything else is looked at. Problems name the file and the field.
"""

from __future__ import annotations

import json
import re
import tomllib
from pathlib import Path
from typing import Any, TypeVar

import tomli_w
from pydantic import BaseModel, ValidationError

from robtui.core.model import OVERALL, SCHEMA_VERSION
from robtui.errors import DataFileError, InputError, NewerSchemaError

M = TypeVar("M", bound=BaseModel)

# Dict fields whose keys are question or domain ids: written in natural order
# ("1.2" before "1.10", domains before "overall") so the same content gives the same bytes.
_ORDERED_DICT_FIELDS = ("answers", "decisions", "proposed", "overrides", "final", "weights")


def natural_key(key: str) -> tuple:
    """Sort key for ids like "1", "2.1", "2.10", with "overall" last."""
    if key == OVERALL:
        return (1, ())
    parts = re.split(r"(\d+)", key)
    return (0, tuple((0, int(p), "") if p.isdigit() else (1, 0, p) for p in parts if p))


def _ordered(value: Any) -> Any:
    if isinstance(value, dict):
        out = {}
        for k, v in value.items():
            if k in _ORDERED_DICT_FIELDS and isinstance(v, dict):
                v = {kk: _ordered(v[kk]) for kk in sorted(v, key=natural_key)}
            out[k] = _ordered(v)
        return out
    if isinstance(value, list):
        return [_ordered(v) for v in value]
    return value


def record_to_json(record: BaseModel) -> str:
    """JSON text of a record: fields in model order, id-keyed maps sorted, indent 2, newline."""
    data = _ordered(record.model_dump(mode="json"))
    return json.dumps(data, indent=2, ensure_ascii=False) + "\n"


def _drop_none(value: Any) -> Any:
    # TOML has no null: an absent key reads back as the model's default (None).
    if isinstance(value, dict):
        return {k: _drop_none(v) for k, v in value.items() if v is not None}
    if isinstance(value, list):
        return [_drop_none(v) for v in value]
    return value


def record_to_toml(record: BaseModel) -> str:
    """TOML text of a record (None fields left out), for review.toml."""
    return tomli_w.dumps(_drop_none(_ordered(record.model_dump(mode="json"))))


def describe_validation(error: ValidationError) -> str:
    """One line per problem: 'field.path: message'."""
    lines = []
    for item in error.errors():
        where = ".".join(str(p) for p in item["loc"]) or "(file)"
        lines.append(f"{where}: {item['msg']}")
    return "; ".join(lines)


def check_schema(data: Any, path: Path) -> None:
    """Refuse a file from a newer robtui, or one whose schema_version is missing or wrong."""
    if not isinstance(data, dict):
        raise DataFileError(f"{path}: expected a table of fields, found {type(data).__name__}")
    version = data.get("schema_version")
    if version is None:
        raise DataFileError(f"{path}: schema_version is missing: the file is not a robtui record")
    if not isinstance(version, int) or isinstance(version, bool) or version < 1:
        raise DataFileError(f"{path}: schema_version must be a positive whole number")
    if version > SCHEMA_VERSION:
        raise NewerSchemaError(
            f"{path} was written by a newer robtui (schema {version}, this one reads up to "
            f"{SCHEMA_VERSION}): upgrade robtui"
        )


def parse_record(model: type[M], data: Any, path: Path) -> M:
    """Validate ``data`` read from ``path`` as ``model`` (schema checked first)."""
    check_schema(data, path)
    try:
        return model.model_validate(data)
    except ValidationError as error:
        raise DataFileError(
            f"{path}: {describe_validation(error)}: fix the file by hand or restore it from git"
        ) from None


# A review file larger than this is not one robtui wrote (the largest real ones are kB).
MAX_RECORD_BYTES = 16 * 1024 * 1024


def _read_bytes(path: Path) -> bytes:
    try:
        with open(path, "rb") as handle:
            data = handle.read(MAX_RECORD_BYTES + 1)
    except FileNotFoundError:
        raise DataFileError(f"{path}: file not found") from None
    except IsADirectoryError:
        raise DataFileError(f"{path}: is a folder, not a file: move it aside") from None
    except OSError as error:
        raise DataFileError(f"{path}: cannot be read ({error.strerror or error})") from None
    if len(data) > MAX_RECORD_BYTES:
        raise DataFileError(
            f"{path}: larger than {MAX_RECORD_BYTES // (1024 * 1024)} MB, which no robtui "
            "record is: restore it from git or a backup"
        )
    return data


def _decode(data: bytes, path: Path) -> str:
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as error:
        raise DataFileError(
            f"{path}: not UTF-8 text ({error.reason} at byte {error.start})"
        ) from None


def _json_problem(error: json.JSONDecodeError) -> str:
    return f"not valid JSON ({error.msg} at line {error.lineno}, column {error.colno})"


def _toml_problem(error: tomllib.TOMLDecodeError) -> str:
    return f"not valid TOML ({error})"


_FORMATS = {
    "json": (json.loads, json.JSONDecodeError, _json_problem),
    "toml": (tomllib.loads, tomllib.TOMLDecodeError, _toml_problem),
}


def read_text_file(path: Path) -> str:
    """The UTF-8 text of a review file (size-guarded); DataFileError names the problem."""
    return _decode(_read_bytes(path), path)


def parse_record_bytes(model: type[M], data: bytes, path: Path, kind: str) -> M:
    """Validate the bytes of a record file (``kind``: "json" or "toml")."""
    parse, decode_error, describe = _FORMATS[kind]
    text = _decode(data, path)
    try:
        parsed = parse(text)
    except decode_error as error:
        raise DataFileError(
            f"{path}: {describe(error)}: fix the file by hand or restore it from git"
        ) from None
    except RecursionError:
        raise DataFileError(
            f"{path}: nested too deeply to be a robtui record: restore it from git"
        ) from None
    return parse_record(model, parsed, path)


def read_record_and_digest(model: type[M], path: Path) -> tuple[M, str]:
    """Read and validate a record file (JSON or TOML by its suffix), with the sha256 of the
    bytes read: a later save compares the file with it (robtui.files.refuse_if_changed)."""
    import hashlib

    data = _read_bytes(path)
    kind = "toml" if Path(path).suffix == ".toml" else "json"
    return parse_record_bytes(model, data, path, kind), hashlib.sha256(data).hexdigest()


def read_json_record(model: type[M], path: Path) -> M:
    """Read and validate a JSON record file."""
    return parse_record_bytes(model, _read_bytes(path), path, "json")


def read_toml_record(model: type[M], path: Path) -> M:
    """Read and validate a TOML record file."""
    return parse_record_bytes(model, _read_bytes(path), path, "toml")


def validated(model: type[M], data: dict, what: str) -> M:
    """``data`` as a ``model`` record; InputError names ``what`` and the fields at fault."""
    try:
        return model.model_validate(data)
    except ValidationError as error:
        raise InputError(f"{what}: {describe_validation(error)}") from None
