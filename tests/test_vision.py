"""Tests of inkshift.color.vision: Machado et al. (2009) CVD simulation, sRGB and gray."""

from __future__ import annotations

import colour
import numpy as np
import pytest
from colour.blindness import CVD_MATRICES_MACHADO2010

from inkshift.color.convert import D50_XYZ
from inkshift.color.difference import delta_e_2000
from inkshift.color.vision import (
    BRADFORD,
    CVD_KINDS,
    SRGB_TO_XYZ_D65,
    CVD_MERGE_DELTA_E,
    cvd_matrix,
    lab_to_gray_lab,
    lab_to_linear_srgb,
    linear_srgb_to_lab,
    linear_to_srgb,
    simulate_cvd_lab,
    simulate_cvd_linear,
    simulate_cvd_srgb,
    srgb_to_linear,
)
from inkshift.errors import InputError
from inkshift.thresholds import DISTINCT_DELTA_E

_FAMILY = {"protanomaly": "Protanomaly", "deuteranomaly": "Deuteranomaly", "tritanomaly": "Tritanomaly"}
_GRID = [round(0.1 * i, 1) for i in range(11)]
_OFF_GRID = [0.03, 0.15, 0.333, 0.5, 0.77, 0.95, 0.999]

# Machado, Oliveira & Fernandes (2009), supplementary matrices for severity 1
# (protanopia, deuteranopia, and the tritanomaly shift model at its end point).
# From memory, and identical to colour-science's copy of the table.
_SEVERITY_1 = {
    "protanopia": [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216], [-0.003882, -0.048116, 1.051998]],
    "deuteranopia": [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413], [-0.011820, 0.042940, 0.968881]],
    "tritanopia": [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602], [0.004733, 0.691367, 0.303900]],
}


def _table_interpolation(family: str, severity: float) -> np.ndarray:
    """Element-wise piecewise-linear interpolation of the published 0.1-step table."""
    table = CVD_MATRICES_MACHADO2010[family]
    grid = np.array(sorted(table))
    stack = np.stack([table[s] for s in grid])
    flat = [np.interp(severity, grid, stack[:, i, j]) for i in range(3) for j in range(3)]
    return np.array(flat).reshape(3, 3)


def _random_srgb(seed: int, n: int = 2000) -> np.ndarray:
    return np.random.default_rng(seed).uniform(0.0, 1.0, size=(n, 3))


@pytest.mark.parametrize("kind", list(_FAMILY))
@pytest.mark.parametrize("severity", _GRID)
def test_matrix_on_published_steps_matches_colour(kind: str, severity: float) -> None:
    # Reference: colour.matrix_cvd_Machado2009 (colour-science), exact on the published steps.
    expected = colour.matrix_cvd_Machado2009(_FAMILY[kind], severity)
    np.testing.assert_allclose(cvd_matrix(kind, severity), expected, atol=1e-6)


@pytest.mark.parametrize("kind", list(_FAMILY))
@pytest.mark.parametrize("severity", _OFF_GRID)
def test_matrix_between_steps_interpolates_published_table(kind: str, severity: float) -> None:
    # Machado et al. (2009) supplement: linear interpolation between the two
    # neighbouring 0.1 steps of the published table (colour-science's copy).
    # colour.matrix_cvd_Machado2009 itself is not used here: in colour-science
    # 0.4.7 it extrapolates from the step pair above the severity (and returns
    # the severity-1 matrix for severities above 0.9) instead of interpolating.
    np.testing.assert_allclose(cvd_matrix(kind, severity), _table_interpolation(_FAMILY[kind], severity), atol=1e-6)


def test_interpolation_halfway_is_mean_of_neighbours() -> None:
    # Hand check on the published deuteranomaly entries at 0.1 and 0.2 (paper's supplement).
    m = cvd_matrix("deuteranomaly", 0.15)
    assert m[0, 0] == pytest.approx((0.866435 + 0.760729) / 2, abs=1e-9)
    assert m[1, 1] == pytest.approx((0.939063 + 0.889315) / 2, abs=1e-9)


@pytest.mark.parametrize("kind", list(_SEVERITY_1))
def test_complete_forms_match_paper(kind: str) -> None:
    expected = np.array(_SEVERITY_1[kind])
    np.testing.assert_allclose(cvd_matrix(kind), expected, atol=1e-6)
    np.testing.assert_allclose(cvd_matrix(kind.replace("opia", "omaly"), 1.0), expected, atol=1e-6)


@pytest.mark.parametrize("kind", CVD_KINDS)
def test_white_stays_white(kind: str) -> None:
    # Machado et al. normalise each matrix so that equal-energy white maps to
    # itself: rows sum to 1 (to the 6 decimals the table is published with).
    severities = [1.0] if kind.endswith("opia") else [0.0, 0.25, 0.6, 1.0]
    for s in severities:
        np.testing.assert_allclose(cvd_matrix(kind, s).sum(axis=1), 1.0, atol=5e-6)


def test_severity_zero_is_identity() -> None:
    for kind in _FAMILY:
        np.testing.assert_array_equal(cvd_matrix(kind, 0.0), np.eye(3))


def test_kind_is_case_insensitive_and_matrix_is_a_copy() -> None:
    m = cvd_matrix("Deuteranopia")
    m[0, 0] = 99.0
    assert cvd_matrix("deuteranopia")[0, 0] == pytest.approx(0.367322)


@pytest.mark.parametrize(
    ("kind", "severity"),
    [
        ("colourblind", 1.0),
        ("protanopia", 0.5),
        ("deuteranomaly", 1.5),
        ("tritanomaly", -0.1),
        ("protanomaly", float("nan")),
        ("protanomaly", "strong"),
    ],
)
def test_bad_input_raises_project_error(kind: str, severity: float) -> None:
    with pytest.raises(InputError) as info:
        cvd_matrix(kind, severity)
    assert "\n" not in str(info.value)


@pytest.mark.parametrize("kind", CVD_KINDS)
def test_simulate_linear_matches_colour_matrix(kind: str) -> None:
    # Reference: colour.matrix_cvd_Machado2009 applied to linear RGB (colour-science
    # documents the matrices as operating on linear RGB).
    rgb = _random_srgb(11)
    family = _FAMILY[kind.replace("opia", "omaly")]
    expected = np.einsum("ij,...j->...i", colour.matrix_cvd_Machado2009(family, 1.0), rgb)
    np.testing.assert_allclose(simulate_cvd_linear(rgb, kind), expected, atol=1e-6)


def test_simulate_linear_between_steps() -> None:
    rgb = _random_srgb(12).reshape(40, 50, 3)
    expected = rgb @ _table_interpolation("Protanomaly", 0.42).T
    np.testing.assert_allclose(simulate_cvd_linear(rgb, "protanomaly", 0.42), expected, atol=1e-6)


def test_srgb_transfer_matches_colour() -> None:
    # Reference: colour.cctf_decoding / cctf_encoding for 'sRGB' (IEC 61966-2-1).
    v = np.linspace(0.0, 1.0, 1001)
    np.testing.assert_allclose(srgb_to_linear(v), colour.cctf_decoding(v, function="sRGB"), atol=1e-12)
    np.testing.assert_allclose(linear_to_srgb(v), colour.cctf_encoding(v, function="sRGB"), atol=1e-12)
    np.testing.assert_allclose(linear_to_srgb(srgb_to_linear(v)), v, atol=1e-12)


@pytest.mark.parametrize("kind", ["protanopia", "deuteranomaly", "tritanopia"])
def test_simulate_srgb_matches_colour_pipeline(kind: str) -> None:
    # Reference: colour-science decode -> Machado matrix -> clip -> encode.
    rgb = _random_srgb(13)
    m = colour.matrix_cvd_Machado2009(_FAMILY[kind.replace("opia", "omaly")], 1.0 if kind.endswith("opia") else 0.6)
    linear = np.clip(colour.cctf_decoding(rgb, function="sRGB") @ m.T, 0.0, 1.0)
    expected = colour.cctf_encoding(linear, function="sRGB")
    severity = 1.0 if kind.endswith("opia") else 0.6
    np.testing.assert_allclose(simulate_cvd_srgb(rgb, kind, severity), expected, atol=1e-6)


def test_constants_match_colour_science() -> None:
    # IEC 61966-2-1 sRGB matrix and the Bradford matrix, as colour-science has them.
    np.testing.assert_array_equal(SRGB_TO_XYZ_D65, colour.RGB_COLOURSPACES["sRGB"].matrix_RGB_to_XYZ)
    np.testing.assert_array_equal(BRADFORD, colour.adaptation.CAT_BRADFORD)


def test_lab_to_linear_srgb_close_to_colour_default() -> None:
    # colour-science's default path (white from the sRGB xy, the standard's rounded
    # XYZ -> RGB matrix) differs by the documented 2e-4 at most.
    lab = np.random.default_rng(17).uniform([0.0, -100.0, -100.0], [100.0, 100.0, 100.0], size=(2000, 3))
    xy = colour.XYZ_to_xy(D50_XYZ)
    expected = colour.XYZ_to_RGB(
        colour.Lab_to_XYZ(lab, illuminant=xy), "sRGB", illuminant=xy, chromatic_adaptation_transform="Bradford"
    )
    np.testing.assert_allclose(lab_to_linear_srgb(lab), expected, rtol=2e-4, atol=2e-4)


def _colour_matrix_white_to_lab(rgb_linear: np.ndarray) -> np.ndarray:
    """colour-science reference for linear sRGB -> CIELAB D50 with the adaptation
    source white taken from the sRGB matrix itself (the project's documented choice)."""
    space = colour.RGB_COLOURSPACES["sRGB"]
    xyz = np.einsum("ij,...j->...i", space.matrix_RGB_to_XYZ, rgb_linear)
    white = space.matrix_RGB_to_XYZ.sum(axis=1)
    adapted = colour.adaptation.chromatic_adaptation_VonKries(xyz, white, D50_XYZ, transform="Bradford")
    return colour.XYZ_to_Lab(adapted, illuminant=colour.XYZ_to_xy(D50_XYZ))


def test_linear_srgb_to_lab_matches_colour() -> None:
    rgb = _random_srgb(14)
    np.testing.assert_allclose(linear_srgb_to_lab(rgb), _colour_matrix_white_to_lab(rgb), atol=1e-9)
    # And against colour-science's default path (white from the sRGB xy): within
    # 0.02 ΔE00, the size of the 4-decimal matrix's white offset.
    xy = colour.XYZ_to_xy(D50_XYZ)
    default = colour.XYZ_to_Lab(
        colour.RGB_to_XYZ(rgb, "sRGB", illuminant=xy, chromatic_adaptation_transform="Bradford"), illuminant=xy
    )
    assert delta_e_2000(linear_srgb_to_lab(rgb), default).max() < 0.02


def test_lab_round_trip_and_white() -> None:
    rgb = _random_srgb(15)
    np.testing.assert_allclose(lab_to_linear_srgb(linear_srgb_to_lab(rgb)), rgb, atol=1e-12)
    np.testing.assert_allclose(linear_srgb_to_lab([1.0, 1.0, 1.0]), [100.0, 0.0, 0.0], atol=1e-9)
    # sRGB primaries in CIELAB D50 with Bradford: red about (54.3, 80.8, 69.9) (from memory).
    np.testing.assert_allclose(linear_srgb_to_lab([1.0, 0.0, 0.0]), [54.29, 80.83, 69.91], atol=0.05)


def test_simulate_lab_agrees_with_srgb_path() -> None:
    # The CIELAB path and the sRGB path describe the same display colours.
    rgb = _random_srgb(16)
    lab = linear_srgb_to_lab(srgb_to_linear(rgb))
    via_srgb = linear_srgb_to_lab(srgb_to_linear(simulate_cvd_srgb(rgb, "deuteranomaly", 0.7)))
    np.testing.assert_allclose(simulate_cvd_lab(lab, "deuteranomaly", 0.7), via_srgb, atol=1e-8)


def test_simulate_lab_clips_out_of_gamut_colours() -> None:
    # Severity 0 leaves an in-gamut colour alone and moves an out-of-gamut one
    # (a blue beyond sRGB's) to the clipped colour a display shows.
    inside = np.array([60.0, 20.0, -30.0])
    np.testing.assert_allclose(simulate_cvd_lab(inside, "protanomaly", 0.0), inside, atol=1e-9)
    outside = np.array([40.0, 40.0, -120.0])
    assert lab_to_linear_srgb(outside).min() < 0.0
    moved = simulate_cvd_lab(outside, "protanomaly", 0.0)
    np.testing.assert_allclose(moved, linear_srgb_to_lab(np.clip(lab_to_linear_srgb(outside), 0.0, 1.0)), atol=1e-9)
    rgb = lab_to_linear_srgb(moved)
    assert np.all(rgb >= -1e-12) and np.all(rgb <= 1.0 + 1e-12)


def test_red_green_merge_for_deuteranopia_blue_yellow_do_not() -> None:
    # Behaviour the model is known for (Machado et al. 2009, figs. 1 and 7): colours
    # told apart along red-green merge for a deuteranope; blue-yellow stays.
    red, green = np.array([50.0, 60.0, 40.0]), np.array([50.0, -20.0, 45.0])  # equal L*, both inside sRGB
    for lab in (red, green):
        assert np.all((lab_to_linear_srgb(lab) >= 0.0) & (lab_to_linear_srgb(lab) <= 1.0))
    assert delta_e_2000(red, green) > DISTINCT_DELTA_E
    merged = delta_e_2000(simulate_cvd_lab(red, "deuteranopia"), simulate_cvd_lab(green, "deuteranopia"))
    assert merged < CVD_MERGE_DELTA_E

    blue, yellow = np.array([60.0, 0.0, -45.0]), np.array([60.0, 0.0, 45.0])
    assert delta_e_2000(blue, yellow) > DISTINCT_DELTA_E
    for kind in ("protanopia", "deuteranopia"):
        apart = delta_e_2000(simulate_cvd_lab(blue, kind), simulate_cvd_lab(yellow, kind))
        assert apart > DISTINCT_DELTA_E


def test_lab_to_gray_lab() -> None:
    lab = np.array([[[55.0, 30.0, -12.0], [20.0, -4.0, 8.0]]])
    gray = lab_to_gray_lab(lab)
    assert gray.shape == lab.shape
    np.testing.assert_array_equal(gray[..., 0], lab[..., 0])
    np.testing.assert_array_equal(gray[..., 1:], 0.0)
    # Two colours of equal L* and different hue become one gray (ΔE00 = 0).
    assert delta_e_2000(lab_to_gray_lab([50.0, 60.0, 40.0]), lab_to_gray_lab([50.0, -20.0, 45.0])) == 0.0


def test_shipped_table_equals_colour_science_copy() -> None:
    # The project's copy of the published matrices (inkshift.color.machado2009)
    # against colour-science's copy of the same supplementary table.
    from inkshift.color.machado2009 import MACHADO2009_MATRICES

    for family, stack in MACHADO2009_MATRICES.items():
        table = CVD_MATRICES_MACHADO2010[family]
        assert len(stack) == len(table) == 11
        for severity, matrix in zip(sorted(table), stack):
            np.testing.assert_array_equal(np.array(matrix), np.asarray(table[severity]))
