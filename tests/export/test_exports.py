"""Exports: content, sources per row, listing of drafts/missing, safety (injection, escaping,
paths)."""

from __future__ import annotations

import csv
import io
import os
import shutil
import subprocess
from dataclasses import replace

import pdfplumber
import pytest

from robtui.benchmarks.review import answer_everything, build_synthetic_review
from robtui.core import assessing
from robtui.core.comparison import pair_assessments
from robtui.core.consensus import (
    complete_consensus,
    set_consensus_override,
    settle,
    start_consensus,
)
from robtui.errors import InputError
from robtui.export.safety import csv_cell, export_path, markup, md, tex
from robtui.export.writers import export_outcome
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set()
NASTY = '<script>alert("x")</script> & co'
OVERRIDE_REASON = "outcome assessors knew the allocation, per the protocol amendment"
SETTLE_NOTE = "the methods section reads as ana says"


@pytest.fixture(scope="module")
def folder(tmp_path_factory):
    root = tmp_path_factory.mktemp("exports") / "review"
    f = build_synthetic_review(root, studies=5, results=2, seed=3, disagreement=0.0)
    review = f.review.model_copy(deep=True)
    review.studies[0].label = NASTY  # user-written text reaches every format
    review.results[0].outcome = f"Pain {NASTY}"
    f.review = review
    f.save_review()
    # Trial-001: ben's assessment goes back to draft; Trial-002: ben's disappears
    b1 = assessing.reopen(f.load_assessment("ben", "Trial-001", "outcome-1"))
    f.save_assessment(b1)
    (f.assessments_dir / "ben" / "Trial-002--outcome-1.json").unlink()
    # Trial-003: ben differs on 1.1; the lead settles it into a complete consensus
    b3 = assessing.reopen(f.load_assessment("ben", "Trial-003", "outcome-1"))
    a3 = f.load_assessment("ana", "Trial-003", "outcome-1")
    other = next(o for o in QSET.question("1.1").options if o != a3.answers["1.1"].response)
    b3 = assessing.set_response(b3, QSET, "1.1", other)
    b3 = assessing.mark_complete(answer_everything(b3, QSET, lambda q: q.options[0]), QSET)
    f.save_assessment(b3)
    [pair] = pair_assessments([a3], [b3])
    c = start_consensus(pair, "lead", QSET)
    for qid in ("1.1",):
        c = settle(c, QSET, qid, "a", note=SETTLE_NOTE, pair=pair)
    from robtui.core.consensus import pending_questions

    for qid in pending_questions(c, QSET):
        c = settle(c, QSET, qid, "a", note="follows from 1.1", pair=pair)
    c = set_consensus_override(c, QSET, "4", "high", OVERRIDE_REASON)
    f.save_consensus(complete_consensus(c, QSET))
    return f


def _export(folder, fmt, **kw):
    return export_outcome(folder, QSET, "outcome-1", fmt, **kw)


def test_rows_say_their_source_and_drafts_and_missing_are_listed(folder):
    _, ex = _export(folder, "md")
    source = {r.study_id: r.source for r in ex.rows}
    assert source["Trial-000"] == "agreed by ana, ben"
    assert source["Trial-001"] == "ana only"  # ben's is a draft
    assert source["Trial-002"] == "ana only"  # ben's is missing
    assert source["Trial-003"] == "consensus"
    problems = " ".join(ex.problems)
    assert "Trial-001: draft by ben" in problems
    assert "Trial-002: no assessment by ben" in problems
    assert len(ex.rows) == 5  # nobody dropped


def test_markdown_holds_tables_grade_and_the_not_final_list(folder):
    [path], _ = _export(folder, "md")
    text = path.read_text(encoding="utf-8")
    assert path.parent == folder.exports_dir.resolve()
    for needle in (
        "## Judgements",
        "## Summary",
        "## Supporting table",
        "GRADE",
        "Suggestion for the panel",
        "own rule of thumb",
        "draft by ben",
        "(p. 2)",
    ):
        assert needle in text, needle
    assert r"\<script>" in text and "<script>" not in text.replace(r"\<script>", "")
    # plain text stays plain: no HTML entities in the raw Markdown
    assert "&#x27;" not in text and "&gt;" not in text and "&lt;" not in text
    assert ">= 50%" in text  # the rule of thumb, readable as written
    # rendered by a CommonMark parser (markdown-it-py, installed with rich), user text is text
    from markdown_it import MarkdownIt

    html = MarkdownIt("commonmark").enable("table").render(text)
    assert "<script>" not in html and "&lt;script&gt;" in html
    # every judgement cell carries a letter, so the table reads without colour
    row = next(line for line in text.splitlines() if line.startswith("| Trial 004"))
    assert row.count("[") >= 6


def test_csv_neutralises_formula_cells(folder):
    paths, _ = _export(folder, "csv")
    answers = next(p for p in paths if p.name.endswith("answers.csv"))
    rows = list(csv.DictReader(io.StringIO(answers.read_text(encoding="utf-8-sig"))))
    justifications = [r["justification"] for r in rows if r["justification"]]
    assert justifications and all(j.startswith("'=") for j in justifications)
    assert not any(cell.startswith(("=", "+", "-", "@")) for r in rows for cell in r.values())
    judgements = next(p for p in paths if p.name.endswith("judgements.csv"))
    table = list(csv.DictReader(io.StringIO(judgements.read_text(encoding="utf-8-sig"))))
    assert {r["source"] for r in table} >= {"consensus", "ana only"}
    assert any("draft by ben" in r["note"] for r in table)


@pytest.mark.parametrize(
    "value, expected",
    [
        ("=1+1", "'=1+1"),
        ("+A1", "'+A1"),
        ("-2", "'-2"),
        ("@SUM(A1)", "'@SUM(A1)"),
        ("\tx", "'\tx"),
        ("\rx", "'\rx"),
        ("plain", "plain"),
        (None, ""),
    ],
)
def test_csv_cell(value, expected):
    # OWASP "CSV Injection": cells starting with = + - @ tab CR are read as formulas
    assert csv_cell(value) == expected


def test_html_escapes_user_text(folder):
    [path], _ = _export(folder, "html")
    text = path.read_text(encoding="utf-8")
    assert "<script>" not in text
    assert "&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; co" in text
    assert "&lt;b&gt;ana&lt;/b&gt;" in text  # justification markup shown, not run
    assert "Not judged or not final" in text and "Suggested rating" in text


def test_svg_escapes_user_text(folder):
    paths, _ = _export(folder, "svg")
    for path in paths:
        text = path.read_text(encoding="utf-8")
        assert text.lstrip().startswith("<?xml") and "<svg" in text
        assert "<script>" not in text and "&lt;script&gt;" in text  # outcome in the title


def test_png_and_pdf_figures(folder):
    for fmt, magic in (("png", b"\x89PNG"), ("pdf", b"%PDF")):
        paths, _ = _export(folder, fmt)
        assert [p.name for p in paths] == [f"outcome-1-lights.{fmt}", f"outcome-1-summary.{fmt}"]
        for p in paths:
            assert p.read_bytes().startswith(magic)


def test_tex_escapes_and_colours(folder):
    [path], _ = _export(folder, "tex")
    text = path.read_text(encoding="utf-8")
    assert r"\definecolor{rtlow}{HTML}{86BCE6}" in text
    assert r"\& co" in text and "\\cellcolor" in text
    assert tex("50% of #1_a") == r"50\% of \#1\_a"


def test_weights_switch_the_summary_basis(folder):
    _, by_count = export_outcome(folder, QSET, "outcome-1", "md")
    _, by_weight = export_outcome(folder, QSET, "outcome-2", "md")
    assert by_count.basis == "studies" and by_weight.basis == "weight"
    shares = by_weight.shares["overall"]
    assert sum(shares.values()) == pytest.approx(1.0)


def test_export_paths_stay_inside_exports(folder, tmp_path):
    base = folder.exports_dir
    for bad in ("../escape", "/tmp/escape", "a/../../b", ""):
        with pytest.raises(InputError):
            export_path(base, bad)
    outside = tmp_path / "elsewhere"
    outside.mkdir()
    link = base / "link-out"
    if not link.exists():
        os.symlink(outside, link)
    with pytest.raises(InputError, match="symbolic link"):
        export_path(base, "link-out/file")
    assert export_path(base, "sub/name.md") == base.resolve() / "sub" / "name.md"
    with pytest.raises(InputError):
        export_outcome(folder, QSET, "outcome-1", "md", name="../../oops")
    assert not (folder.root.parent / "oops.md").exists()


def test_unknown_format_and_result(folder):
    with pytest.raises(InputError, match="format"):
        export_outcome(folder, QSET, "outcome-1", "docx")
    with pytest.raises(InputError, match="no result"):
        export_outcome(folder, QSET, "nope", "md")


def test_markup_escapes_quotes():
    assert markup('"a" <b>') == "&quot;a&quot; &lt;b&gt;"


@pytest.mark.parametrize(
    "raw",
    [
        "it's >= 20% of the weight",
        "<b>bold</b> & <img src=x onerror=alert(1)>",
        "[click](http://example.invalid) ![img](http://example.invalid/x.png)",
        "&amp; &#39; a|b back\\slash <http://example.invalid>",
    ],
)
def test_markdown_cells_are_plain_text_when_rendered(raw):
    from markdown_it import MarkdownIt

    cell = md(raw)
    assert "&#x27;" not in cell and "&gt;" not in cell and "&quot;" not in cell
    html = MarkdownIt("commonmark").render(cell)
    assert "<a " not in html and "<img" not in html and "<b>" not in html
    # what a reader sees is what was written (markdown-it-py escapes it back for HTML)
    from html import unescape

    assert unescape(html.removeprefix("<p>").removesuffix("</p>\n")) == raw


def test_figures_take_awkward_user_text(tmp_path):
    # "$", newlines, tabs and characters missing from the font (CJK, emoji) must not break a
    # figure; "$" is text, never mathematics
    f = build_synthetic_review(tmp_path / "r", studies=2, results=1, seed=1, disagreement=0.0)
    review = f.review.model_copy(deep=True)
    review.results[0].outcome = "Cost in $ (one $ sign)"
    review.studies[0].label = "Line one\nline two\t\u8bd5\u9a8c \U0001f600"
    f.review = review
    f.save_review()
    for fmt in ("png", "svg", "pdf"):
        paths, _ = export_outcome(f, QSET, "outcome-1", fmt)
        assert all(p.stat().st_size > 1000 for p in paths)
    with pdfplumber.open(f.exports_dir / "outcome-1-summary.pdf") as pdf:
        assert "Cost in $ (one $ sign)" in pdf.pages[0].extract_text()


def test_exports_folder_that_is_a_link_out_of_the_review_is_refused(tmp_path):
    root = tmp_path / "review"
    root.mkdir()
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    os.symlink(elsewhere, root / "exports")
    with pytest.raises(InputError, match="outside the review folder"):
        export_path(root / "exports", "x.md", root)


def test_consensus_judgements_are_the_final_ones(folder):
    _, ex = _export(folder, "md")
    row = next(r for r in ex.rows if r.study_id == "Trial-003")
    record = folder.load_consensus("Trial-003", "outcome-1")
    assert row.source == "consensus"
    assert row.judgements == {k: record.final[k] for k in row.judgements}
    answers = [s for s in ex.supporting if s.study_id == "Trial-003"]
    assert answers and all(s.source == "consensus" for s in answers)
    assert {s.question_id: s.response for s in answers}["1.1"] == (record.answers["1.1"].response)


def test_partial_weights_fall_back_to_counting_with_a_note(tmp_path):
    f = build_synthetic_review(tmp_path / "r", studies=3, results=2, seed=2, disagreement=0.0)
    review = f.review.model_copy(deep=True)
    review.results[1].weights = {"Trial-000": 5.0}
    f.review = review
    f.save_review()
    _, ex = export_outcome(f, QSET, "outcome-2", "md")
    assert ex.basis == "studies"
    assert any("no meta-analysis weight" in p for p in ex.problems)


def test_reviewers_who_differ_without_consensus_are_not_judged_and_listed(tmp_path):
    f = build_synthetic_review(tmp_path / "r", studies=1, results=1, seed=4, disagreement=0.0)
    b = assessing.reopen(f.load_assessment("ben", "Trial-000", "outcome-1"))
    a = f.load_assessment("ana", "Trial-000", "outcome-1")
    # 1.2 = N gives domain 1 High (allocation not concealed); Y differs from that
    b = assessing.set_response(b, QSET, "1.2", "Y" if a.answers["1.2"].response == "N" else "N")
    b = answer_everything(b, QSET, lambda q: q.options[0])
    assert b.final["1"] != a.final["1"]
    f.save_assessment(assessing.mark_complete(b, QSET))
    [path], ex = export_outcome(f, QSET, "outcome-1", "md")
    assert ex.rows[0].source == "not judged"
    assert all(v is None for v in ex.rows[0].judgements.values())
    assert "differ and no consensus is complete" in ex.problems[0]
    assert "differ and no consensus is complete" in path.read_text(encoding="utf-8")


def test_overrides_reasons_and_settlement_notes_reach_every_table_format(folder):
    texts = {}
    for fmt in ("md", "html", "tex", "csv"):
        paths, _ = _export(folder, fmt)
        texts[fmt] = "\n".join(p.read_text(encoding="utf-8") for p in paths)
    for fmt, text in texts.items():
        flat = " ".join(text.split())
        assert OVERRIDE_REASON in flat, fmt
        assert "(proposed Low)" in flat or "(proposed Some concerns)" in flat, fmt
        assert SETTLE_NOTE in flat, fmt
        assert "took ana's answer" in flat.replace("&#x27;", "'"), fmt


def test_csv_starts_with_a_byte_order_mark(folder):
    for path in _export(folder, "csv")[0]:
        assert path.read_bytes().startswith(b"\xef\xbb\xbf")  # spreadsheets then read UTF-8


def test_html_title_names_the_effect_once(folder):
    spec = folder.review.results[0]
    [path], _ = _export(folder, "html")
    title = path.read_text(encoding="utf-8").split("<title>")[1].split("</title>")[0]
    assert title.count("effect of") == 1 and spec.effect in title
    outcome = "Pain (effect of assignment)"
    from robtui.export.writers import _title

    _, ex = _export(folder, "md")
    assert _title(replace(ex, outcome=outcome)).count("effect of") == 1


def test_a_consensus_a_reviewer_has_since_changed_is_flagged_stale(tmp_path):
    f = build_synthetic_review(tmp_path / "r", studies=2, results=1, seed=3, disagreement=0.0)
    a = f.load_assessment("ana", "Trial-000", "outcome-1")
    b = f.load_assessment("ben", "Trial-000", "outcome-1")
    [pair] = pair_assessments([a], [b])
    c = start_consensus(pair, "lead", QSET)
    f.save_consensus(complete_consensus(c, QSET, pair))
    paths, ex = export_outcome(f, QSET, "outcome-1", "md")
    assert ex.rows[0].source == "consensus"
    other = next(o for o in QSET.question("1.1").options if o != b.answers["1.1"].response)
    b = assessing.reopen(b)
    b = assessing.mark_complete(assessing.set_response(b, QSET, "1.1", other), QSET)
    f.save_assessment(b)
    paths, ex = export_outcome(f, QSET, "outcome-1", "md")
    assert ex.rows[0].source == "consensus (stale)"
    text = paths[0].read_text(encoding="utf-8")
    assert "consensus built on answers a reviewer has since changed" in text
    assert f"ben: 1.1 {a.answers['1.1'].response} -> {other}" in text


@pytest.mark.skipif(not shutil.which("pdflatex"), reason="needs pdflatex (texlive-latex-base)")
def test_tex_compiles_with_nothing_outside_the_text_block(folder, tmp_path):
    from robtui.export.writers import to_tex

    _, ex = _export(folder, "md")
    long_id = "Trial-with-a-very-long-identifier-0000000000000000000000000001"
    rows = [replace(ex.rows[0], study_label=long_id), *ex.rows[1:]]
    supporting = [replace(ex.supporting[0], study_id=long_id), *ex.supporting[1:]]
    source = tmp_path / "out.tex"
    source.write_text(to_tex(replace(ex, rows=rows, supporting=supporting), QSET), "utf-8")
    run = subprocess.run(
        ["pdflatex", "-interaction=nonstopmode", "-halt-on-error", source.name],
        check=False, cwd=tmp_path, capture_output=True, text=True, timeout=120,
    )  # fmt: skip
    log = (tmp_path / "out.log").read_text(encoding="latin-1")
    assert run.returncode == 0, log[-2000:]
    assert "Overfull \\hbox" not in log, [ln for ln in log.splitlines() if "Overfull" in ln]
    if shutil.which("pdffonts"):  # poppler-utils: every font embedded, none a bitmap (Type 3)
        fonts = subprocess.run(["pdffonts", "out.pdf"], check=False, cwd=tmp_path,
                               capture_output=True, text=True).stdout.splitlines()[2:]  # fmt: skip
        assert fonts and all(" yes " in r and "Type 3" not in r for r in fonts), fonts
