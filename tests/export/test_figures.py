"""Figures as a journal prints them: 174 mm (page) or 84 mm (column) wide, at most 225 mm
tall per page, text >= 7 pt inside the page, fonts embedded, a key of the domains and of the
judgements, no reviewer names, fills darkening with severity in greyscale, one letter per
judged cell, the same bytes for the same input."""

from __future__ import annotations

import io
import re
import shutil
import subprocess
import xml.etree.ElementTree as ET
from dataclasses import replace

import pdfplumber
import pytest
from matplotlib.patches import FancyBboxPatch
from PIL import Image

from robtui.benchmarks.review import build_synthetic_review
from robtui.export.figures import (
    MAX_HEIGHT_MM,
    PT_PER_MM,
    WIDTHS_MM,
    figure_files,
    lights_pages,
    one_line,
)
from robtui.export.palette import SWATCHES, hex_to_rgb
from robtui.export.tables import build_outcome_export
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set()
SVG = "{http://www.w3.org/2000/svg}"
MARKUP = "<b>Trial</b> & \"Co\" 'x' caf\u00e9 $cost$"


def _export(root, studies: int):
    f = build_synthetic_review(root, studies=studies, results=1, seed=5, disagreement=0.1)
    review = f.review.model_copy(deep=True)
    review.results[0].outcome = MARKUP
    review.studies[1].label = "Line one\nline\ttwo \x01 end"
    f.review = review
    f.save_review()
    assessments, _ = f.assessments()
    consensus, _ = f.consensus_records()
    return build_outcome_export(f.review, "outcome-1", QSET, assessments, consensus), f


@pytest.fixture(scope="module")
def small(tmp_path_factory):
    return _export(tmp_path_factory.mktemp("small") / "review", 8)


@pytest.fixture(scope="module")
def large(tmp_path_factory):
    return _export(tmp_path_factory.mktemp("large") / "review", 60)


def _pdf_pages(data: bytes):
    with pdfplumber.open(io.BytesIO(data)) as pdf:
        return [(p.width, p.height, p.chars, p.extract_text()) for p in pdf.pages]


@pytest.mark.parametrize("width", ["page", "column"])
def test_every_page_fits_the_journal_width_and_height_with_text_of_7pt_inside(small, large, width):
    for ex, _ in (small, large):
        files = figure_files(ex, QSET, "pdf", width)
        for data in files.values():
            for w, h, chars, _ in _pdf_pages(data):
                assert w == pytest.approx(WIDTHS_MM[width] * PT_PER_MM, abs=0.01)
                assert h <= MAX_HEIGHT_MM * PT_PER_MM + 0.01
                assert chars and min(c["size"] for c in chars) >= 7 - 0.01
                for c in chars:
                    assert c["x0"] >= 0 and c["x1"] <= w + 0.01, c["text"]
                    assert c["top"] >= 0 and c["bottom"] <= h + 0.01, c["text"]


def test_a_long_table_splits_into_even_pages_holding_every_study(large):
    ex, _ = large
    data = figure_files(ex, QSET, "pdf")["-lights.pdf"]
    pages = _pdf_pages(data)
    assert len(pages) == 2
    text = "\n".join(t for *_, t in pages)
    for row in ex.rows:
        assert text.count(one_line(row.study_label)) == 1, row.study_label
    assert "(1 of 2)" in text and "(2 of 2)" in text
    png = figure_files(ex, QSET, "png")
    assert sorted(png) == ["-lights-2.png", "-lights.png", "-summary.png"]


def test_fonts_are_embedded(small):
    ex, _ = small
    for data in figure_files(ex, QSET, "pdf").values():
        assert b"/FontFile2" in data  # TrueType font programs inside the file
        if shutil.which("pdffonts"):  # poppler-utils, as an editor's check
            run = subprocess.run(["pdffonts", "-"], input=data, capture_output=True, check=False)
            out = run.stdout
            rows = out.decode().splitlines()[2:]
            assert rows and all(re.search(r"\syes\s+yes\s", r) for r in rows), rows


def test_key_of_domains_and_judgements_and_no_reviewer_names(small):
    ex, folder = small
    for suffix, data in figure_files(ex, QSET, "pdf").items():
        [(_, _, _, text)] = _pdf_pages(data)
        flat = " ".join(text.split())
        assert "D1 Bias arising from the randomisation process" in flat, suffix
        assert "D5 Bias in selection of the reported result" in flat
        for sw in SWATCHES.values():
            assert sw.label in flat
        for name in folder.review.reviewers:
            assert name not in flat, (suffix, name)
        assert "agreed by" not in flat


def test_rows_not_from_a_complete_consensus_are_marked_and_explained(small):
    ex, _ = small
    agreed = [r for r in ex.rows if r.source.startswith("agreed")]
    assert agreed
    [(_, _, _, text)] = _pdf_pages(figure_files(ex, QSET, "pdf")["-lights.pdf"])
    for row in agreed:
        assert f"{one_line(row.study_label)}\u2020" in text
    assert "\u2020 reviewers' judgements agree; no consensus record" in " ".join(text.split())


def test_every_judged_cell_carries_its_letter(small):
    ex, _ = small
    [(_, _, _, text)] = _pdf_pages(figure_files(ex, QSET, "pdf")["-lights.pdf"])
    words = text.split()
    for code in ("low", "some_concerns", "high"):
        cells = sum(r.judgements[k] == code for r in ex.rows for k, _ in ex.columns)
        legend = 1
        assert words.count(SWATCHES[code].letter) == cells + legend, code


def test_a_study_without_a_domain_gets_no_cell(small):
    ex, _ = small
    rows = list(ex.rows)
    judgements = {k: v for k, v in rows[0].judgements.items() if k != "3"}
    rows[0] = replace(rows[0], judgements=judgements)

    def tiles(export) -> int:
        children = lights_pages(export, QSET)[0].ax.get_children()
        return sum(isinstance(a, FancyBboxPatch) for a in children)

    assert tiles(ex) - tiles(replace(ex, rows=rows)) == 1


def test_fills_darken_with_severity_in_the_rendered_greyscale_image(small):
    ex, _ = small
    data = figure_files(ex, QSET, "png")["-lights.png"]
    with Image.open(io.BytesIO(data)) as im:
        rgb = im.convert("RGB")
    grey = rgb.convert("L")  # Pillow: ITU-R 601-2 luma, as a greyscale print would
    level = {}
    colours = {c: n for n, c in rgb.getcolors(1 << 20)}
    for code, sw in SWATCHES.items():
        fill = tuple(round(c * 255) for c in hex_to_rgb(sw.fill))
        assert colours.get(fill, 0) > 100, code  # the fill is drawn, flat
        level[code] = Image.new("RGB", (1, 1), fill).convert("L").getpixel((0, 0))
    assert level["incomplete"] > level["low"] > level["some_concerns"] > level["high"]
    assert grey.size == rgb.size


def test_svg_is_well_formed_titled_with_user_text_as_written(small):
    ex, _ = small
    files = figure_files(ex, QSET, "svg")
    root = ET.fromstring(files["-lights.svg"])  # raises on anything not well-formed
    titles = [e.text for e in root.iter() if e.tag.endswith("}title")]
    assert f"Risk of bias: {MARKUP}" in titles
    assert "<b>" not in files["-lights.svg"].decode()  # escaped, not markup
    assert root.get("width") == f"{WIDTHS_MM['page'] * PT_PER_MM:.6f}pt".rstrip("0")


def test_png_is_600_ppi_at_print_size(small):
    ex, _ = small
    for width in WIDTHS_MM:
        data = figure_files(ex, QSET, "png", width)["-summary.png"]
        with Image.open(io.BytesIO(data)) as im:
            assert im.info["dpi"] == pytest.approx((600, 600), abs=0.01)
            assert im.width / 600 * 25.4 == pytest.approx(WIDTHS_MM[width], abs=0.1)


@pytest.mark.parametrize("fmt", ["svg", "pdf", "png"])
def test_same_export_same_bytes(small, fmt):
    ex, _ = small
    assert figure_files(ex, QSET, fmt) == figure_files(ex, QSET, fmt)


def test_labels_are_one_clean_line_and_bad_options_are_refused(small):
    ex, _ = small
    assert one_line(" a\n b\t\tc \x01 \ud800") == "a b c \ufffd \ufffd"
    with pytest.raises(ValueError, match="svg, pdf or png"):
        figure_files(ex, QSET, "gif")
    with pytest.raises(ValueError, match="page, column"):
        figure_files(ex, QSET, "pdf", "poster")


def test_a_result_without_studies_still_draws(small):
    ex, _ = small
    files = figure_files(replace(ex, rows=[]), QSET, "pdf")
    assert all(d.startswith(b"%PDF") for d in files.values())


def test_a_stale_consensus_row_is_marked_and_explained(small):
    ex, _ = small
    rows = [replace(ex.rows[0], source="consensus (stale)"), *ex.rows[1:]]
    [(_, _, _, text)] = _pdf_pages(figure_files(replace(ex, rows=rows), QSET, "pdf")["-lights.pdf"])
    assert f"{one_line(rows[0].study_label)}\u2021" in text
    assert "\u2021 consensus built on answers a reviewer has since changed" in " ".join(
        text.split()
    )


def test_support_and_direction_reach_the_supporting_table(tmp_path):
    f = build_synthetic_review(tmp_path / "review", studies=2, results=1, seed=5)
    assessments, _ = f.assessments()
    study = assessments[0].study_id
    extra = {"support": {"1": "central allocation"}, "direction": {"overall": "towards_null"}}
    assessments = [a.model_copy(update=extra) if a.study_id == study else a for a in assessments]
    ex = build_outcome_export(f.review, "outcome-1", QSET, assessments, [])
    rows = [s for s in ex.supporting if s.study_id == study and s.response is None]
    assert [(s.question_id, s.justification) for s in rows] == [
        ("D1 Randomisation support", "central allocation"),
        ("Overall support", "Predicted direction of bias: Towards null"),
    ]
