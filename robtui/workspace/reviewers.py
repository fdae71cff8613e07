"""Reviewer names: the check a typed name must pass, and choosing the two reviewers to compare."""

from __future__ import annotations

import re

from robtui.errors import InputError

REVIEWER_PATTERN = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$")


def check_reviewer_name(name: str) -> str:
    """The reviewer name, stripped; InputError when it cannot name an assessment folder."""
    name = name.strip()
    if not REVIEWER_PATTERN.match(name):
        raise InputError(
            f"reviewer name {name!r} is not usable: use 1-64 letters, digits, '.', '_' or '-', "
            "starting with a letter or digit (e.g. --reviewer maria)"
        )
    return name


def choose_reviewers(
    listed: list[str], on_disk: list[str], lead: str | None, named: list[str] | None
) -> tuple[str, str]:
    """The two reviewers to compare: as ``named`` (each must be known), else the review's two.

    ``listed`` are the reviewers of review.toml, ``on_disk`` those with assessment folders; the
    lead is never chosen by default.
    """
    known = list(dict.fromkeys([*listed, *on_disk]))
    if named:
        a, b = named
        if a == b:
            raise InputError(f"--reviewers names {a} twice: name two different reviewers")
        unknown = [r for r in (a, b) if r not in known]
        if unknown:
            raise InputError(
                f"reviewer {', '.join(unknown)} is not in this review (reviewers: "
                f"{', '.join(known) or 'none yet'}): check the spelling"
            )
        return a, b
    without_lead = [r for r in listed if r != lead]
    candidates = without_lead if len(without_lead) >= 2 else [r for r in known if r != lead]
    if len(candidates) != 2:
        raise InputError(
            f"this review has {len(candidates)} reviewers ({', '.join(candidates) or 'none'}): "
            "name the two to compare with --reviewers A B"
        )
    return candidates[0], candidates[1]
