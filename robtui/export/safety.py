"""Keeping exports safe: spreadsheet formula injection, markup escaping, paths inside exports/."""

from __future__ import annotations

import html
import os
import re
from pathlib import Path, PurePath

from robtui.errors import InputError

# A spreadsheet reads a cell starting with one of these as a formula (OWASP, "CSV Injection").
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def csv_cell(value: object) -> str:
    """Text for a CSV cell; a leading formula character gets an apostrophe in front."""
    text = "" if value is None else str(value)
    if text.startswith(_FORMULA_STARTS):
        return "'" + text
    return text


def markup(text: object) -> str:
    """Escape user-written text for HTML and SVG (quotes included, for attributes)."""
    return html.escape("" if text is None else str(text), quote=True)


_TEX_SPECIALS = {
    "\\": r"\textbackslash{}",
    "&": r"\&",
    "%": r"\%",
    "$": r"\$",
    "#": r"\#",
    "_": r"\_",
    "{": r"\{",
    "}": r"\}",
    "~": r"\textasciitilde{}",
    "^": r"\textasciicircum{}",
}


def tex(text: object) -> str:
    """Escape text for LaTeX."""
    return "".join(_TEX_SPECIALS.get(ch, ch) for ch in ("" if text is None else str(text)))


# Markdown text stays readable as plain text: instead of HTML entities (&#x27;, &gt;) the few
# characters that would start markup get a backslash, as CommonMark allows before any ASCII
# punctuation (CommonMark spec 0.31, "Backslash escapes"): the backslash itself, "<" (raw HTML,
# autolinks), "&" before an entity name or number, brackets (links, images) and the pipe
# (a table cell's end).
_MD_ESCAPES = re.compile(r"([\\<\[\]|]|&(?=#?\w+;))")


def md(text: object, line_break: str = "<br>") -> str:
    """Text for Markdown: markup characters backslash-escaped (no HTML entities in the raw
    text), line breaks as ``line_break`` (<br> in a table cell; "  \\n" in prose)."""
    value = _MD_ESCAPES.sub(r"\\\1", "" if text is None else str(text))
    return value.replace("\r\n", "\n").replace("\r", "\n").replace("\n", line_break)


def export_path(exports_dir: Path, name: str, root: Path | None = None) -> Path:
    """The path of export file ``name`` inside ``exports_dir``; refuses anything outside it.

    Rejects absolute paths, ``..`` parts, and paths that resolve (through symlinks) outside
    the exports folder; with ``root`` (the review folder), the exports folder itself must
    resolve inside it.
    """
    if not name or not name.strip():
        raise InputError("export name is empty: give a file name such as 'primary-outcome'")
    pure = PurePath(name)
    if pure.is_absolute() or os.path.isabs(name) or name.startswith("~"):
        raise InputError(
            f"export name {name!r} is an absolute path: exports are written inside the "
            "review's exports/ folder; give a plain name"
        )
    if ".." in pure.parts:
        raise InputError(f"export name {name!r} contains '..': give a name inside exports/")
    base = Path(exports_dir).resolve()
    if root is not None:
        top = Path(root).resolve()
        if base != top and top not in base.parents:
            raise InputError(
                f"the exports folder {exports_dir} leads outside the review folder (a symbolic "
                "link?): make exports/ a plain folder inside the review"
            )
    target = (base / pure).resolve()
    if target != base and base not in target.parents:
        raise InputError(
            f"export name {name!r} leads outside the review's exports/ folder "
            "(through a symbolic link): give another name"
        )
    return base / pure
