"""User text in exports: TeX compiles with any Unicode and with labels starting with '[';
Markdown never turns a justification into a link or a remote image."""

from __future__ import annotations

import shutil
import subprocess
from dataclasses import replace

import pytest

from robtui.benchmarks.review import build_synthetic_review
from robtui.export.safety import md, tex
from robtui.export.writers import export_outcome, to_tex
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set("rob2-parallel")
HOSTILE = "[Pilot] ≥ ≤ − β χ Ω 中文 😀 ﬁ ŉ \x1b[2J\x07 \u202e x_1 ~ 50% & #"


@pytest.fixture(scope="module")
def export(tmp_path_factory):
    root = tmp_path_factory.mktemp("hostile") / "review"
    folder = build_synthetic_review(root, studies=2, results=1, seed=7, disagreement=0.0)
    _, ex = export_outcome(folder, QSET, "outcome-1", "md")
    return ex


def test_tex_escape_maps_every_character_to_something_pdflatex_sets():
    out = tex(HOSTILE)
    assert out.startswith("{[}Pilot{]}")
    assert r"\ensuremath{\geq}" in out and r"\textminus{}" in out and r"\ensuremath{\chi}" in out
    assert "<U+4E2D>" in out and "<U+1F600>" in out
    assert "\x1b" not in out and "\x07" not in out and "\u202e" not in out


@pytest.mark.skipif(not shutil.which("pdflatex"), reason="needs pdflatex (texlive-latex-base)")
def test_tex_export_compiles_with_hostile_labels_and_every_code_point(export, tmp_path):
    every = "".join(chr(c) for c in range(0x20, 0x3000) if not 0xD800 <= c < 0xE000)
    rows = [replace(export.rows[0], study_label=HOSTILE), *export.rows[1:]]
    source = tmp_path / "out.tex"
    text = to_tex(replace(export, rows=rows, problems=[HOSTILE, "[x] first", every]), QSET)
    source.write_text(text, encoding="utf-8")
    run = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", source.name],
        check=False, cwd=tmp_path, capture_output=True, timeout=180,
    )  # fmt: skip
    log = (tmp_path / "out.log").read_text(encoding="latin-1")
    assert run.returncode == 0, log[log.find("\n!") :][:1500]


def test_markdown_neutralises_links_and_images_in_user_text():
    cell = md("see ![x](http://remote.example/p.png) and [here](http://remote.example) \\[y](z)")
    assert "](" not in cell.replace("\\](", "")
    assert "![" not in cell and "\\[here\\]" in cell
