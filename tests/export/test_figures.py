"""Figures: one layout, three renderers (svg, pdf, png) that agree, escape user text, keep every
label and letter, and give the same bytes for the same input."""

from __future__ import annotations

import io
import math
import re
import xml.etree.ElementTree as ET
import zlib

import pdfplumber
import pytest
from PIL import Image

from robtui.benchmarks.review import build_synthetic_review
from robtui.export import figure_png
from robtui.export.figure_layout import SLACK, lights_figure, summary_figure
from robtui.export.figure_primitives import Box, Dot, Label
from robtui.export.palette import SWATCHES, hex_to_rgb
from robtui.export.plot import render
from robtui.export.tables import build_outcome_export
from robtui.export.text_metrics import one_line, text_width, winansi_byte
from robtui.store.question_sets import builtin_question_set

QSET = builtin_question_set()
SVG = "{http://www.w3.org/2000/svg}"
MARKUP_LABEL = "<b>Trial</b> & \"Co\" 'x' caf\u00e9"
WIDE_LABEL = "Trial \u8bd5\u9a8c \u03b1-2"  # CJK and Greek: outside WinAnsi


@pytest.fixture(scope="module")
def export(tmp_path_factory):
    root = tmp_path_factory.mktemp("figures") / "review"
    f = build_synthetic_review(root, studies=6, results=2, seed=5, disagreement=0.1)
    review = f.review.model_copy(deep=True)
    review.studies[0].label = MARKUP_LABEL
    review.studies[1].label = WIDE_LABEL
    review.studies[2].label = "Line one\nline\ttwo \x01 end"
    review.results[0].outcome = "Pain <i>score</i> & $cost$"
    f.review = review
    f.save_review()
    assessments, _ = f.assessments()
    consensus, _ = f.consensus_records()
    return build_outcome_export(f.review, "outcome-1", QSET, assessments, consensus)


@pytest.fixture(scope="module")
def lights(export):
    return lights_figure(export, QSET)


@pytest.fixture(scope="module")
def summary(export):
    return summary_figure(export, QSET)


def _labels(fig) -> list[Label]:
    return [i for i in fig.items if isinstance(i, Label)]


def _svg_texts(data: bytes) -> list[str]:
    root = ET.fromstring(data)  # raises on anything not well-formed
    return [e.text or "" for e in root.iter(f"{SVG}text")]


def _pdf_content(data: bytes) -> str:
    """The page's content stream, inflated (the writer compresses it with zlib)."""
    start = data.index(b"4 0 obj")
    body = data[data.index(b"stream\n", start) + 7 : data.index(b"\nendstream", start)]
    return zlib.decompress(body).decode("latin-1")


# -- layout ------------------------------------------------------------------------------------
def test_every_cell_has_a_tile_with_its_letter_or_dot(export, lights):
    tiles = [i for i in lights.items if isinstance(i, Box) and i.radius and i.fill]
    letters = {(round(t.x, 2), round(t.y - 0.359 * t.size, 2)): t.text for t in _labels(lights)}
    dots = {(round(d.cx, 2), round(d.cy, 2)) for d in lights.items if isinstance(d, Dot)}
    cells = [b for b in tiles if b.w == 38.0]  # table tiles (legend tiles are smaller)
    assert len(cells) == len(export.rows) * len(export.columns)
    fills = {sw.fill: code for code, sw in SWATCHES.items()}
    seen = set()
    for b in cells:
        centre = (round(b.x + b.w / 2, 2), round(b.y + b.h / 2, 2))
        code = fills[b.fill]
        seen.add(code)
        if code == "incomplete":
            assert centre in dots and b.dash and b.stroke
        else:
            assert letters.get(centre) == SWATCHES[code].letter
    # the table shows judgements of each kind the export holds
    held = {row.judgements[k] or "incomplete" for row in export.rows for k, _ in export.columns}
    assert seen == held


def test_labels_are_clean_single_lines_and_fit_inside_the_figure(lights, summary):
    texts = [t.text for t in _labels(lights)]
    assert "Line one line two \ufffd end" in texts  # newline, tab collapsed; control made visible
    for fig in (lights, summary):
        for t in _labels(fig):
            width = text_width(t.text, t.size, t.bold) * SLACK
            left = t.x - {"start": 0, "middle": width / 2, "end": width}[t.anchor]
            assert left >= -0.01 and left + width <= fig.width + 0.01, t.text


def test_summary_bars_fill_100_percent_with_hatching(export, summary):
    bars = [i for i in summary.items if isinstance(i, Box) and i.h == 19.0]
    rows: dict[float, float] = {}
    for b in bars:
        rows[b.y] = rows.get(b.y, 0.0) + b.w
    assert len(rows) == len(export.columns)
    widths = {round(w, 6) for w in rows.values()}
    assert len(widths) == 1  # every bar is the full plot width
    hatched = {b.fill for b in summary.items if isinstance(b, Box) and b.hatch}
    assert SWATCHES["some_concerns"].fill in hatched and SWATCHES["high"].fill in hatched
    legend = {t.text for t in _labels(summary)}
    assert {f"{sw.letter} {sw.label}" for sw in SWATCHES.values()} <= legend


def test_text_widths_match_the_helvetica_metrics_pdfminer_ships():
    # pdfminer.fontmetrics holds its own copy of Adobe's Core 14 metrics, keyed by character
    from pdfminer.fontmetrics import FONT_METRICS

    compared = 0
    for font, bold in (("Helvetica", False), ("Helvetica-Bold", True)):
        widths = FONT_METRICS[font][1]
        for code in range(32, 256):
            try:
                ch = bytes([code]).decode("cp1252")
            except UnicodeDecodeError:
                continue
            if ch in widths and winansi_byte(ch) is not None:
                assert text_width(ch, 1000, bold) == widths[ch], (font, ch)
                compared += 1
    assert compared > 400


def test_one_line():
    assert one_line(" a\n b\t\tc ") == "a b c"
    assert one_line("x\x00y\ud800") == "x\ufffdy\ufffd"
    assert one_line(None) == ""


# -- svg ---------------------------------------------------------------------------------------
def test_svg_is_well_formed_with_user_text_as_text(export, lights, summary):
    data = render(lights, "svg")
    texts = _svg_texts(data)
    assert MARKUP_LABEL in texts and WIDE_LABEL in texts  # shown as written, not as markup
    root = ET.fromstring(data)
    assert not list(root.iter(f"{SVG}b")) and not list(root.iter("b"))
    assert root.find(f"{SVG}title").text == "Risk of bias: Pain <i>score</i> & $cost$"
    for row in export.rows[3:]:
        assert row.study_label in texts
    for code in ("low", "some_concerns", "high"):
        if any(r.judgements[k] == code for r in export.rows for k, _ in export.columns):
            assert SWATCHES[code].letter in texts
    s_texts = _svg_texts(render(summary, "svg"))
    assert "D1 Randomisation" in " ".join(s_texts) and "Overall" in s_texts
    assert b"<pattern" in render(summary, "svg")


def test_svg_survives_characters_xml_cannot_hold(export):
    from dataclasses import replace

    rows = [replace(export.rows[0], study_label="bad \x01\x1b char \ud83d")] + export.rows[1:]
    fig = lights_figure(replace(export, rows=rows), QSET)
    texts = _svg_texts(render(fig, "svg"))
    assert "bad \ufffd\ufffd char \ufffd" in texts


# -- pdf ---------------------------------------------------------------------------------------
def test_pdf_is_read_by_pdfplumber_with_labels_and_letters(export, lights):
    data = render(lights, "pdf")
    assert data.startswith(b"%PDF-1.5") and data.rstrip().endswith(b"%%EOF")
    with pdfplumber.open(io.BytesIO(data)) as pdf:
        [page] = pdf.pages
        assert (page.width, page.height) == pytest.approx((lights.width, lights.height), abs=0.01)
        text = page.extract_text()
    assert MARKUP_LABEL in text  # WinAnsi holds every character of it
    for row in export.rows[3:]:
        assert row.study_label in text
    assert "Risk of bias: Pain <i>score</i> & $cost$" in text
    for letter in ("L", "S", "H"):
        assert re.search(rf"\b{letter}\b", text)


def test_pdf_marks_characters_outside_winansi_and_keeps_them_as_actual_text(lights):
    data = render(lights, "pdf")
    with pdfplumber.open(io.BytesIO(data)) as pdf:
        text = pdf.pages[0].extract_text()
    assert "Trial ?? ?-2" in text  # visibly replaced, not dropped
    wanted = "<FEFF" + WIDE_LABEL.encode("utf-16-be").hex().upper() + ">"
    assert f"/ActualText {wanted}" in _pdf_content(data)


def test_renderers_draw_the_same_labels(lights, summary):
    for fig in (lights, summary):
        labels = [t.text for t in _labels(fig)]
        assert _svg_texts(render(fig, "svg")) == labels
        assert _pdf_content(render(fig, "pdf")).count(" Tj ET") == len(labels)


# -- png ---------------------------------------------------------------------------------------
def test_png_decodes_at_300_ppi_with_the_figure_size(lights, summary):
    for fig in (lights, summary):
        data = render(fig, "png")
        assert data.startswith(b"\x89PNG\r\n\x1a\n")
        with Image.open(io.BytesIO(data)) as im:
            im.load()
            assert im.size == (math.ceil(fig.width * 300 / 72), math.ceil(fig.height * 300 / 72))
            assert im.info["dpi"] == pytest.approx((300, 300), abs=0.01)


def test_png_tiles_show_their_fill_and_letter_ink(lights):
    with Image.open(io.BytesIO(render(lights, "png"))) as im:
        rgb = im.convert("RGB")
    scale = 300 / 72
    fills = {sw.fill: sw for sw in SWATCHES.values()}
    checked = 0
    for b in lights.items:
        if not (isinstance(b, Box) and b.w == 38.0 and b.fill in fills):
            continue
        sw = fills[b.fill]
        # a point inside the tile, left of the letter: the fill itself
        px = rgb.getpixel((round((b.x + 5) * scale), round((b.y + b.h / 2) * scale)))
        assert px == tuple(round(c * 255) for c in hex_to_rgb(sw.fill))
        # the middle of the tile holds ink (letter or dot)
        middle = rgb.crop(
            (
                round((b.x + b.w / 2 - 4) * scale),
                round((b.y + b.h / 2 - 4) * scale),
                round((b.x + b.w / 2 + 4) * scale),
                round((b.y + b.h / 2 + 4) * scale),
            )
        )
        ink = tuple(round(c * 255) for c in hex_to_rgb(sw.ink))
        closest = min(sum(abs(a - b) for a, b in zip(c, ink)) for _, c in middle.getcolors(4096))
        assert closest <= 24
        checked += 1
    assert checked


def test_png_summary_carries_hatching(summary):
    with Image.open(io.BytesIO(render(summary, "png"))) as im:
        rgb = im.convert("RGB")
    scale = 300 / 72
    # the legend's High swatch is always drawn (bars only when a study is at High)
    high = next(b for b in summary.items if isinstance(b, Box) and b.hatch
                and b.fill == SWATCHES["high"].fill)  # fmt: skip
    inner = (high.x + 1, high.y + 1, high.x + high.w - 1, high.y + high.h - 1)
    region = rgb.crop(tuple(round(v * scale) for v in inner))
    colours = {c for _, c in region.getcolors(65536)}
    line = tuple(round(c * 255) for c in hex_to_rgb(high.hatch.colour))
    assert tuple(round(c * 255) for c in hex_to_rgb(high.fill)) in colours
    assert min(sum(abs(a - b) for a, b in zip(c, line)) for c in colours) <= 24


# -- determinism -------------------------------------------------------------------------------
@pytest.mark.parametrize("fmt", ["svg", "pdf", "png"])
def test_same_figure_same_bytes(lights, summary, fmt):
    first = [render(f, fmt) for f in (lights, summary)]
    figure_png._kept_masks.cache_clear()  # cached masks must not change the result
    figure_png._text_mask.cache_clear()
    assert [render(f, fmt) for f in (lights, summary)] == first


def test_unknown_figure_format(lights):
    with pytest.raises(ValueError, match="svg, pdf or png"):
        render(lights, "gif")


def test_png_keeps_every_flat_colour_exact(lights, summary):
    # the palette PNG may round the blended edge pixels, never the fills themselves
    for fig in (lights, summary):
        with Image.open(io.BytesIO(render(fig, "png"))) as im:
            present = {c for _, c in im.convert("RGB").getcolors(1 << 16)}
        fills = {b.fill for b in fig.items if isinstance(b, Box) and b.fill} | {fig.background}
        for fill in fills:
            assert tuple(round(c * 255) for c in hex_to_rgb(fill)) in present, fill
        flat = {c for c in (*fills, *(i.colour for i in fig.items if isinstance(i, Label)))}
        assert len(present) > len(flat) + 20  # anti-aliased edges: blends between colours


def test_a_figure_too_large_for_300_ppi_is_drawn_at_the_resolution_that_fits(summary, monkeypatch):
    monkeypatch.setattr(figure_png, "MAX_PIXELS", 400_000)
    with Image.open(io.BytesIO(render(summary, "png"))) as im:
        assert im.width * im.height <= 400_000 * 1.01
        ppi = im.info["dpi"][0]
        assert 100 < ppi < 300
        assert im.width == pytest.approx(summary.width / 72 * ppi, abs=2)  # same physical size


def test_a_page_beyond_the_pdf_size_limit_gets_a_user_unit():
    from robtui.export.figure_primitives import Figure, Hatch

    hatch = Hatch("diagonal", "#CFC4D8", 6.0, 1.0)
    fig = Figure(
        300.0,
        30000.0,
        "tall",
        (
            Box(10, 29900, 100, 20, fill="#3D1A4F", hatch=hatch),
            Label(10, 29990, "Bottom row", 7.0),
        ),
    )
    data = render(fig, "pdf")
    assert data.startswith(b"%PDF-1.6") and b"/UserUnit 3" in data
    with pdfplumber.open(io.BytesIO(data)) as pdf:
        page = pdf.pages[0]
        assert page.height == pytest.approx(10000, abs=0.01)
        assert "Bottom row" in page.extract_text()


def test_a_result_without_studies_still_draws(export):
    from dataclasses import replace

    empty = replace(export, rows=[])
    for make in (lights_figure, summary_figure):
        fig = make(empty, QSET)
        assert render(fig, "svg").startswith(b"<?xml") and render(fig, "pdf").startswith(b"%PDF")
        assert render(fig, "png").startswith(b"\x89PNG")
