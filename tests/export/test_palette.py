"""The export palette stays distinguishable under simulated colour-vision deficiency."""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from robtui.export.palette import (
    SWATCHES,
    ciede2000,
    contrast_ratio,
    hex_to_rgb,
    relative_luminance,
)

colorspacious = pytest.importorskip("colorspacious")

# Machado, Oliveira & Fernandes (2009), IEEE TVCG 15(6):1291-1298, as implemented by
# colorspacious ("sRGB1+CVD"); severity 100 simulates full dichromacy.
SIMULATIONS = [None, "protanomaly", "deuteranomaly", "tritanomaly"]


def _lab(colour: str, cvd: str | None) -> tuple[float, float, float]:
    rgb = np.array(hex_to_rgb(colour))
    if cvd:
        space = {"name": "sRGB1+CVD", "cvd_type": cvd, "severity": 100}
        rgb = np.clip(colorspacious.cspace_convert(rgb, space, "sRGB1"), 0, 1)
    return tuple(colorspacious.cspace_convert(rgb, "sRGB1", "CIELab"))


@pytest.mark.parametrize("cvd", SIMULATIONS)
def test_every_pair_of_judgement_colours_differs_by_at_least_20(cvd):
    worst = min(
        ciede2000(_lab(a.fill, cvd), _lab(b.fill, cvd))
        for a, b in itertools.combinations(SWATCHES.values(), 2)
    )
    assert worst >= 20, f"{cvd or 'normal vision'}: smallest CIEDE2000 {worst:.1f}"


@pytest.mark.parametrize("cvd", SIMULATIONS)
def test_pairs_also_differ_in_cam02_ucs(cvd):
    # Second opinion from colorspacious's own distance (CAM02-UCS, Luo et al. 2006).
    for a, b in itertools.combinations(SWATCHES.values(), 2):
        if cvd:
            space = {"name": "sRGB1+CVD", "cvd_type": cvd, "severity": 100}
            ra = np.clip(colorspacious.cspace_convert(hex_to_rgb(a.fill), space, "sRGB1"), 0, 1)
            rb = np.clip(colorspacious.cspace_convert(hex_to_rgb(b.fill), space, "sRGB1"), 0, 1)
        else:
            ra, rb = hex_to_rgb(a.fill), hex_to_rgb(b.fill)
        assert colorspacious.deltaE(ra, rb) >= 15, (a.label, b.label, cvd)


def test_text_on_every_cell_meets_wcag_aa():
    for sw in SWATCHES.values():
        assert contrast_ratio(sw.fill, sw.ink) >= 4.5, sw.label


def test_every_cell_has_a_distinct_letter():
    letters = [sw.letter for sw in SWATCHES.values()]
    assert all(letters) and len(set(letters)) == len(letters)


@pytest.mark.parametrize(
    "lab1, lab2, expected",
    [
        # Sharma, Wu & Dalal (2005), Color Res Appl 30:21-30, supplementary test data, pairs
        # 1, 7, 17, 18, 19, 20 and 25 (values from memory of that table).
        ((50.0, 2.6772, -79.7751), (50.0, 0.0, -82.7485), 2.0425),
        ((50.0, 0.0, 0.0), (50.0, -1.0, 2.0), 2.3669),
        ((50.0, 2.5, 0.0), (73.0, 25.0, -18.0), 27.1492),
        ((50.0, 2.5, 0.0), (61.0, -5.0, 29.0), 22.8977),
        ((50.0, 2.5, 0.0), (56.0, -27.0, -3.0), 31.9030),
        ((50.0, 2.5, 0.0), (58.0, 24.0, 15.0), 19.4535),
        ((60.2574, -34.0099, 36.2677), (60.4626, -34.1751, 39.4387), 1.2644),
    ],
)
def test_ciede2000_against_published_test_data(lab1, lab2, expected):
    assert ciede2000(lab1, lab2) == pytest.approx(expected, abs=1e-4)
    assert ciede2000(lab2, lab1) == pytest.approx(expected, abs=1e-4)


def test_wcag_reference_values():
    # WCAG 2.1 definitions: black on white is 21:1, white has luminance 1.
    assert contrast_ratio("#000000", "#FFFFFF") == pytest.approx(21.0)
    assert relative_luminance("#FFFFFF") == pytest.approx(1.0)


def test_fills_get_darker_with_severity_for_greyscale_print():
    # In greyscale a reader orders the fills by lightness: not judged (white) > low > some
    # concerns > high, CIE L* computed by colorspacious, at least 10 apart (our own threshold).
    order = ("incomplete", "low", "some_concerns", "high")
    lightness = [_lab(SWATCHES[code].fill, None)[0] for code in order]
    assert all(a - b >= 10 for a, b in itertools.pairwise(lightness)), lightness


def test_fills_differ_in_lightness_for_greyscale_print():
    # Our own threshold: CIE L* of any two fills at least 10 apart, so a greyscale print
    # still separates them (the letters carry the meaning anyway).
    lightness = [_lab(sw.fill, None)[0] for sw in SWATCHES.values()]
    assert min(abs(a - b) for a, b in itertools.combinations(lightness, 2)) >= 10
