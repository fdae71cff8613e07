"""User text in exports: TeX compiles with any Unicode and with labels starting with '[';
Markdown never turns a justification into a link or a remote image."""

from __future__ import annotations

import shutil
import subprocess
from dataclasses import replace
from pathlib import Path

import pytest

from robtui.benchmarks.review import build_synthetic_review
from robtui.export.safety import md, tex
from robtui.export.writers import export_outcome, row_pieces, to_tex
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set("rob2-parallel")
HOSTILE = "[Pilot] ≥ ≤ − β χ Ω 中文 😀 ﬁ ŉ \x1b[2J\x07 \u202e x_1 ~ 50% & #"


@pytest.fixture(scope="module")
def export(tmp_path_factory):
    root = tmp_path_factory.mktemp("hostile") / "review"
    folder = build_synthetic_review(root, studies=2, results=1, seed=7, disagreement=0.0)
    _, ex = export_outcome(folder, QSET, "outcome-1", "md")
    return ex


def test_tex_escape_gives_each_engine_the_character_or_a_visible_fallback():
    out = tex(HOSTILE)
    assert out.startswith("{[}Pilot{]}")
    # Beyond pdfLaTeX's fonts: the character itself (Unicode engines) and pdfLaTeX's fallback
    assert r"\rtchar{≥}{2265}{\ensuremath{\geq}}" in out
    assert r"\rtchar{−}{2212}{\textminus{}}" in out and r"\rtchar{χ}{3C7}{\ensuremath{\chi}}" in out
    assert r"\rtchar{中}{4E2D}{\textsf{<U+4E2D>}\allowbreak{}}" in out
    assert r"\rtchar{😀}{1F600}{\textsf{<U+1F600>}\allowbreak{}}" in out
    assert "\x1b" not in out and "\x07" not in out and "\u202e" not in out
    assert tex("e\u0301") == "é"  # composed first: the accent stays on its letter


def test_tex_escape_keeps_lines_short_whatever_the_text():
    # TeX reads a line into a fixed buffer (200,000 bytes in TeX Live): a long justification
    # is cut into lines by comments, which add no space
    out = tex("中" * 50_000 + "a" * 50_000)
    assert max(len(line) for line in out.split("\n")) < 200
    assert out.replace("%\n", "").count("中") == 50_000


ENGINES = [e for e in ("pdflatex", "lualatex", "xelatex") if shutil.which(e)]
EVERY = "".join(
    chr(c)
    for c in [*range(0x20, 0x3000), *range(0x4E00, 0x4E40), *range(0x1F600, 0x1F650)]
    if not 0xD800 <= c < 0xE000
)


def _compile(engine: str, source: Path) -> str:
    run = subprocess.run(
        [engine, "-interaction=nonstopmode", "-halt-on-error", source.name],
        check=False, cwd=source.parent, capture_output=True, timeout=300,
    )  # fmt: skip
    log = source.with_suffix(".log").read_text(encoding="utf-8", errors="replace")
    assert run.returncode == 0, log[log.find("\n!") :][:1500]
    return log


def test_long_cell_text_is_cut_into_pieces_that_fit_a_row_on_a_page():
    words = " ".join(f"word{i}" for i in range(3000))
    pieces = row_pieces(words)
    assert len(pieces) > 1 and " ".join(pieces) == words
    assert all(len(p) <= 900 for p in pieces)
    cjk = row_pieces("中" * 2000)  # no spaces: cut inside, wide characters count double
    assert "".join(cjk) == "中" * 2000 and all(len(p) <= 450 for p in cjk)
    assert row_pieces("") == [""]


@pytest.mark.skipif(not ENGINES, reason="needs pdflatex, lualatex or xelatex (TeX Live)")
@pytest.mark.parametrize("engine", ENGINES)
def test_tex_export_compiles_with_hostile_labels_and_every_code_point(export, tmp_path, engine):
    rows = [replace(export.rows[0], study_label=HOSTILE), *export.rows[1:]]
    problems = [HOSTILE, "[x] first", *(EVERY[i : i + 400] for i in range(0, len(EVERY), 400))]
    # a justification far taller than a page, in one supporting-table cell
    supporting = [replace(export.supporting[0], justification=EVERY), *export.supporting[1:]]
    source = tmp_path / "out.tex"
    ex = replace(export, rows=rows, problems=problems, supporting=supporting)
    source.write_text(to_tex(ex, QSET), "utf-8")
    log = _compile(engine, source)
    assert "(continued)" in source.read_text(encoding="utf-8")
    # A Unicode engine sets each character from a font that has it or prints its code point:
    # TeX's "Missing character" (a glyph silently dropped) never appears
    assert "Missing character" not in log
    if engine != "pdflatex" and shutil.which("pdftotext"):
        text = subprocess.run(["pdftotext", "out.pdf", "-"], check=True, cwd=tmp_path,
                              capture_output=True, text=True).stdout  # fmt: skip
        assert "≥" in text and "−" in text and "β" in text  # in the PDF as themselves
        if "DroidSansFallback" in log or "CJK" in log:  # a font with CJK is installed
            assert "中文" in text


def test_markdown_neutralises_links_and_images_in_user_text():
    cell = md("see ![x](http://remote.example/p.png) and [here](http://remote.example) \\[y](z)")
    assert "](" not in cell.replace("\\](", "")
    assert "![" not in cell and "\\[here\\]" in cell
