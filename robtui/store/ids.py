"""Ids that name reviewers, studies and results, and the record file names made of them."""

from __future__ import annotations

import re

from robtui.errors import InputError

# Same pattern as the model's ids, matched in full (a trailing newline is refused); "--" is
# kept out because it joins study and result in file names.
_ID = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.-]{0,63}")
SEPARATOR = "--"
# Names Windows reserves for devices, with or without an extension (Microsoft, "Naming Files,
# Paths, and Namespaces"): a review folder may be shared with or copied to Windows.
_RESERVED = re.compile(r"(CON|PRN|AUX|NUL|COM[0-9¹²³]|LPT[0-9¹²³])(\..*)?", re.IGNORECASE)


def is_valid_id(value: object) -> bool:
    """True when ``value`` can name a reviewer, study or result (and so a file)."""
    return (
        isinstance(value, str)
        and _ID.fullmatch(value) is not None
        and SEPARATOR not in value
        and not value.endswith(".")
        and _RESERVED.fullmatch(value) is None
    )


def check_id(value: str, what: str) -> str:
    """Validate a reviewer, study or result id; InputError says what is allowed."""
    if not is_valid_id(value):
        raise InputError(
            f"{what} id {value!r} is not allowed: use 1-64 letters, digits, '.', '_' or '-', "
            "starting with a letter or digit, not ending with '.', without '--', and not a "
            "name Windows reserves (CON, PRN, AUX, NUL, COM1-9, LPT1-9)"
        )
    return value


def record_file_name(study_id: str, result_id: str) -> str:
    """The file of one study's result: ``<study>--<result>.json``."""
    return f"{study_id}{SEPARATOR}{result_id}.json"
