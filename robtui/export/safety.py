"""Keeping exports safe: spreadsheet formula injection, markup escaping, paths inside exports/."""

from __future__ import annotations

import html
import os
import re
import unicodedata
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


# A bracket right after \\ or \item would open an optional argument (a label "[A] trial"
# must not become one): braces keep it text.
_TEX_SPECIALS.update({"[": "{[}", "]": "{]}"})

# Characters outside what pdfLaTeX's utf8 input with T1 fonts sets (Latin-1 and Latin
# Extended-A, dashes, quotes) that trial reports use: the math or text commands for them
# (LaTeX's own symbol names, from memory of the standard symbol lists). U+2212 is kept on
# purpose by the readers, so it must print.
_TEX_SYMBOLS = {
    "\u2212": r"\textminus{}", "\u2264": r"\ensuremath{\leq}", "\u2265": r"\ensuremath{\geq}",
    "\u2260": r"\ensuremath{\neq}", "\u2248": r"\ensuremath{\approx}", "\u223c": r"\ensuremath{\sim}",
    "\u00b1": r"\ensuremath{\pm}", "\u2213": r"\ensuremath{\mp}", "\u00d7": r"\texttimes{}",
    "\u22c5": r"\ensuremath{\cdot}", "\u221e": r"\ensuremath{\infty}", "\u2192": r"\ensuremath{\rightarrow}",
    "\u2190": r"\ensuremath{\leftarrow}", "\u2191": r"\ensuremath{\uparrow}", "\u2193": r"\ensuremath{\downarrow}",
    "\u2194": r"\ensuremath{\leftrightarrow}", "\u2032": r"\ensuremath{'}", "\u2033": r"\ensuremath{''}",
    "\u2030": r"\textperthousand{}", "\u2122": r"\texttrademark{}", "\u2020": r"\textdagger{}",
    "\u2021": r"\textdaggerdbl{}", "\u2022": r"\textbullet{}", "\u2026": r"\ldots{}", "\u20ac": r"\texteuro{}",
    "\u2009": r"\,", "\u202f": r"\,", "\u2002": " ", "\u2003": " ", "\u2011": "-", "\u2010": "-",
    "\u2018": "`", "\u2019": "'", "\u201c": "``", "\u201d": "''", "\u2013": "--", "\u2014": "---",
    "\u03f5": r"\ensuremath{\epsilon}", "\u03d1": r"\ensuremath{\vartheta}", "\u03d5": r"\ensuremath{\phi}",
}
_GREEK = [
    "alpha", "beta", "gamma", "delta", "epsilon", "zeta", "eta", "theta", "iota", "kappa",
    "lambda", "mu", "nu", "xi", "o", "pi", "rho", "varsigma", "sigma", "tau", "upsilon", "phi",
    "chi", "psi", "omega",
]
# Capitals with a command of their own; the others look like Latin letters and are set so.
_GREEK_CAPITALS = [
    "Gamma", "Delta", "Theta", "Lambda", "Xi", "Pi", "Sigma", "Upsilon", "Phi", "Psi", "Omega",
]
for _i, _name in enumerate(_GREEK):
    _TEX_SYMBOLS[chr(0x3B1 + _i)] = "o" if _name == "o" else f"\\ensuremath{{\\{_name}}}"
    if _name.capitalize() in _GREEK_CAPITALS:
        _TEX_SYMBOLS[chr(0x391 + _i)] = f"\\ensuremath{{\\{_name.capitalize()}}}"
_TEX_SYMBOLS.update(zip("\u0391\u0392\u0395\u0396\u0397\u0399\u039a\u039c\u039d\u039f\u03a1\u03a4\u03a7",
                        "ABEZHIKMNOPTX"))
_TEX_SYMBOLS["\u00b5"] = r"\ensuremath{\mu}"  # micro sign


# What pdfLaTeX's utf8 input sets with T1 and TS1 fonts (the code points declared in LaTeX's
# t1enc.dfu and ts1enc.dfu, TeX Live 2022): passed through as they are.
_TEX_SETS = (
    (0x00A0, 0x00B7), (0x00B9, 0x0125), (0x0128, 0x0137), (0x0139, 0x013E), (0x0141, 0x0148),
    (0x014A, 0x0165), (0x0168, 0x017E), (0x0192, 0x0192), (0x01C4, 0x01D4), (0x01E2, 0x01E3),
    (0x01E6, 0x01EB), (0x01F0, 0x01F0), (0x01F4, 0x01F5), (0x0218, 0x021B), (0x0232, 0x0233),
    (0x0237, 0x0237), (0x02C7, 0x02C7), (0x02D8, 0x02D9), (0x02DB, 0x02DB), (0x02DD, 0x02DD),
    (0x1E02, 0x1E03), (0x1E0D, 0x1E0D), (0x1E1E, 0x1E21), (0x1E25, 0x1E25), (0x1E30, 0x1E31),
    (0x1E37, 0x1E37), (0x1E43, 0x1E43), (0x1E45, 0x1E45), (0x1E47, 0x1E47), (0x1E5B, 0x1E5B),
    (0x1E63, 0x1E63), (0x1E6D, 0x1E6D), (0x1E8E, 0x1E91), (0x1E9E, 0x1E9E), (0x1EF2, 0x1EF3),
    (0x2010, 0x2016), (0x2018, 0x201A), (0x201C, 0x201E), (0x2020, 0x2022), (0x2030, 0x2031),
    (0x2039, 0x203B), (0x203D, 0x203D), (0x2044, 0x2044), (0x20AC, 0x20AC), (0x2103, 0x2103),
    (0x2116, 0x2117), (0x2122, 0x2122), (0x2126, 0x2127), (0x2190, 0x2193), (0xFB00, 0xFB06),
)


def _tex_sets(code: int) -> bool:
    return 0x20 <= code < 0x7F or any(a <= code <= b for a, b in _TEX_SETS)


def _pdflatex_fallback(ch: str) -> str:
    """What pdfLaTeX sets for a character its fonts lack: the symbol command, the letters of
    its compatibility decomposition, or else its code point, visibly."""
    if ch in _TEX_SYMBOLS:
        return _TEX_SYMBOLS[ch]
    decomposed = unicodedata.normalize("NFKD", ch)
    if decomposed != ch:
        kept = "".join(_tex_char(c) for c in decomposed if not unicodedata.combining(c))
        if kept and "<U+" not in kept and "\\rtchar" not in kept:
            return kept
    return f"\\textsf{{<U+{ord(ch):04X}>}}\\allowbreak{{}}"


def _tex_char(ch: str) -> str:
    if ch in _TEX_SPECIALS:
        return _TEX_SPECIALS[ch]
    code = ord(ch)
    if ch in _TEX_SYMBOLS and _tex_sets(code):
        return _TEX_SYMBOLS[ch]  # dashes, quotes, spaces: TeX's own ligatures and commands
    category = unicodedata.category(ch)
    if category == "Zs" or ch in "\t\n\r":
        return " "
    if category[0] in "CZ":  # controls, format marks (BOM, joiners), line separators
        return ""
    if code < 0x180 and _tex_sets(code):
        return ch  # Latin-1 and Latin Extended-A: in Latin Modern for every engine
    # Beyond (rarer Latin, Greek, maths, CJK, emoji, other scripts): the character itself for
    # a Unicode engine, which sets it in the first font that has it, and for pdfLaTeX the
    # character if its T1/TS1 fonts set it, else a fallback (see TEX_FONT_SETUP).
    fallback = ch if _tex_sets(code) else _pdflatex_fallback(ch)
    return f"\\rtchar{{{ch}}}{{{code:X}}}{{{fallback}}}"


def tex(text: object) -> str:
    """Escape text for the .tex export, which compiles with pdfLaTeX, LuaLaTeX and XeLaTeX:
    specials escaped, brackets braced, control characters dropped; a character pdfLaTeX's
    T1/TS1 fonts lack goes through ``\\rtchar``, so a Unicode engine prints it (in a fallback
    font when Latin Modern lacks it) and pdfLaTeX prints a command, its decomposition or its
    code point. Text is composed (NFC) first, so accents travel with their letters."""
    composed = unicodedata.normalize("NFC", "" if text is None else str(text))
    out, line = [], 0
    for ch in composed:
        piece = _tex_char(ch)
        out.append(piece)
        line += len(piece)
        if line > 120:
            # TeX reads a file line by line into a fixed buffer (TeX Live: buf_size 200,000):
            # a comment ending the line keeps any text of any length inside it, adding no space.
            out.append("%\n")
            line = 0
    return "".join(out)


# Fonts a Unicode engine tries, in turn, for a character Latin Modern lacks: free fonts with
# broad coverage that TeX distributions and Linux systems commonly carry (common practice, no
# source). Only those installed where the .tex is compiled are used; a character none of them
# has is printed as its code point, never dropped.
TEX_FALLBACK_FONTS = (
    "DejaVu Serif", "DejaVu Sans", "FreeSerif", "Noto Serif", "Noto Sans",
    "Noto Serif CJK SC", "Noto Sans CJK SC", "Droid Sans Fallback", "Noto Sans Symbols",
    "Noto Sans Symbols2", "Symbola", "Noto Emoji",
)  # fmt: skip

# The preamble lines that choose the fonts by engine (iftex): LuaLaTeX and XeLaTeX load
# fontspec (Latin Modern, as pdfLaTeX) and define \rtchar{char}{hex}{fallback} to set the
# character in the current font if it has it (\iffontchar), else in the first fallback font
# that has it, else the fallback; pdfLaTeX loads T1 Latin Modern and sets the fallback.
TEX_FONT_SETUP = [
    r"\usepackage{iftex}",
    r"\makeatletter",
    r"\iftutex",
    r"  \usepackage{fontspec}",
    r"  \newcount\rt@fonts \let\rt@chain\@empty",
    r"  \newcommand*\rt@fallback[1]{\IfFontExistsTF{#1}{\global\advance\rt@fonts\@ne",
    r"    \expandafter\newfontfamily\csname rt@font\romannumeral\rt@fonts\endcsname{#1}",
    r"    \expandafter\g@addto@macro\expandafter\rt@chain\expandafter",
    r"      {\csname rt@font\romannumeral\rt@fonts\endcsname}}{}}",
    r"  \@for\rt@name:={" + ",".join(TEX_FALLBACK_FONTS) + "}\\do",
    r"    {\expandafter\rt@fallback\expandafter{\rt@name}}",
    r'  \newcommand\rt@has[3]{\iffontchar\font"#1 \expandafter\@firstoftwo',
    r"    \else\expandafter\@secondoftwo\fi{#2}{#3}}",
    r"  \def\rt@stop{\rt@stop}\def\rt@skip#1\rt@stop{}",
    r"  \def\rt@walk#1#2#3#4{\ifx#4\rt@stop\expandafter\@firstoftwo\else",
    r"    \expandafter\@secondoftwo\fi{#3}{\begingroup#4\rt@has{#2}{#1\endgroup\rt@skip}",
    r"    {\endgroup\rt@walk{#1}{#2}{#3}}}}",
    r"  \def\rt@start#1\rt@stop#2#3#4{\rt@walk{#2}{#3}{#4}#1\rt@stop}",
    r"  \DeclareRobustCommand\rtchar[3]{\rt@has{#2}{#1}",
    r"    {\expandafter\rt@start\rt@chain\rt@stop{#1}{#2}{#3}}}",
    r"\else",
    r"  \usepackage[utf8]{inputenc}",
    r"  \usepackage[T1]{fontenc}",
    r"  \usepackage{lmodern}",  # Latin Modern: vector Type 1 fonts, embedded by pdfTeX
    r"  \DeclareRobustCommand\rtchar[3]{#3}",
    r"\fi",
    r"\makeatother",
]


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
