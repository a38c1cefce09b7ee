"""Tests of the Tidepool heat-map scale (inkshift.color.scale)."""

from __future__ import annotations

import colour
import numpy as np
import pytest

from inkshift.color import scale
from inkshift.color.convert import D50_XYZ, lab_to_lch
from inkshift.color.difference import delta_e_2000
from inkshift.color.scale import HEAT_TICKS_DEFAULT, heat_colors, heat_scale_lab
from inkshift.color.vision import lab_to_linear_srgb
from inkshift.errors import InputError

# Design tolerance of the scale (project's choice): the largest CIEDE2000 step
# between consecutive samples is at most this many times the smallest.
STEP_RATIO_MAX = 1.02

_XY_D50 = colour.XYZ_to_xy(D50_XYZ)


def _srgb8_to_lab(rgb8: np.ndarray) -> np.ndarray:
    """Reference: colour-science sRGB (IEC 61966-2-1) -> XYZ, Bradford to ICC D50 -> CIELAB."""
    xyz = colour.RGB_to_XYZ(
        rgb8 / 255.0, "sRGB", illuminant=_XY_D50, chromatic_adaptation_transform="Bradford", apply_cctf_decoding=True
    )
    return colour.XYZ_to_Lab(xyz, illuminant=_XY_D50)


def test_lightness_strictly_increases_over_256_samples() -> None:
    lab = heat_scale_lab(256)
    assert lab.shape == (256, 3)
    assert np.all(np.diff(lab[:, 0]) > 0.0)
    assert lab[0, 0] == pytest.approx(scale.HEAT_L_RANGE[0]) and lab[-1, 0] == pytest.approx(scale.HEAT_L_RANGE[1])


def test_quantised_colours_keep_lightness_order() -> None:
    # After rounding to 8-bit sRGB, L* measured by colour-science still rises.
    rgb8 = heat_colors(np.linspace(0.0, 20.0, 64), 20.0)
    assert np.all(np.diff(_srgb8_to_lab(rgb8)[:, 0]) > 0.0)


def test_inside_srgb_without_clipping() -> None:
    # Linear sRGB of every sample must already lie in [0, 1] (IEC 61966-2-1 gamut);
    # checked with colour-science's conversion as well as the project's.
    lab = heat_scale_lab(1024)
    ours = lab_to_linear_srgb(lab)
    assert ours.min() >= 0.0 and ours.max() <= 1.0
    theirs = colour.XYZ_to_RGB(
        colour.Lab_to_XYZ(lab, illuminant=_XY_D50), "sRGB", illuminant=_XY_D50, chromatic_adaptation_transform="Bradford"
    )
    assert theirs.min() >= 0.0 and theirs.max() <= 1.0


def test_equal_delta_e_steps() -> None:
    lab = heat_scale_lab(256)
    steps = delta_e_2000(lab[:-1], lab[1:])
    assert steps.max() / steps.min() <= STEP_RATIO_MAX
    # Same with colour-science's CIEDE2000 (independent of the project's formula).
    ref = colour.delta_E(lab[:-1], lab[1:], method="CIE 2000")
    assert ref.max() / ref.min() <= STEP_RATIO_MAX


def test_hue_turns_enough_to_read_in_colour() -> None:
    lch = lab_to_lch(heat_scale_lab(256))
    turn = np.degrees(np.unwrap(np.radians(lch[:, 2])))
    assert turn[-1] - turn[0] == pytest.approx(scale.HEAT_HUE_TURN, abs=1e-6)
    assert np.all(np.diff(turn) > 0.0)
    # Chromatic enough that the hue shows: C*ab of at least 10 everywhere.
    assert lch[:, 1].min() >= 10.0


def test_heat_colors_ends_clamping_and_nan() -> None:
    lut_ends = heat_colors(np.array([0.0, 20.0]), 20.0)
    np.testing.assert_array_equal(heat_colors(np.array([-5.0, np.nan]), 20.0), lut_ends[[0, 0]])
    np.testing.assert_array_equal(heat_colors(np.array([25.0, np.inf]), 20.0), lut_ends[[1, 1]])
    # The end colours are the scale's end colours, to 8-bit rounding (colour-science check).
    ends_lab = heat_scale_lab(2)
    assert delta_e_2000(_srgb8_to_lab(lut_ends), ends_lab).max() < 0.5


def test_heat_colors_shape_and_dtype() -> None:
    values = np.random.default_rng(3).uniform(0.0, 30.0, size=(7, 5))
    out = heat_colors(values, 20.0)
    assert out.shape == (7, 5, 3) and out.dtype == np.uint8
    np.testing.assert_array_equal(heat_colors(values.ravel(), 20.0), out.reshape(-1, 3))


def test_heat_colors_scales_with_vmax() -> None:
    v = np.linspace(0.0, 1.0, 50)
    np.testing.assert_array_equal(heat_colors(v * 10.0, 10.0), heat_colors(v * 40.0, 40.0))


@pytest.mark.parametrize("vmax", [0.0, -1.0, float("nan"), float("inf"), "big"])
def test_bad_vmax_raises_project_error(vmax: object) -> None:
    with pytest.raises(InputError):
        heat_colors(np.array([1.0]), vmax)  # type: ignore[arg-type]


@pytest.mark.parametrize("n", [1, 0, 2.5, None])
def test_bad_sample_count(n: object) -> None:
    with pytest.raises(InputError):
        heat_scale_lab(n)  # type: ignore[arg-type]


def test_default_ticks_sorted_and_non_negative() -> None:
    assert list(HEAT_TICKS_DEFAULT) == sorted(set(HEAT_TICKS_DEFAULT))
    assert HEAT_TICKS_DEFAULT[0] == 0.0


def test_shape_preserving_cubic_reproduces_lines_and_keeps_monotone_data() -> None:
    # Fritsch & Carlson (1980): the interpolant of linear data is that line, and
    # of monotone data is monotone (no overshoot between nodes).
    x = np.array([0.0, 0.2, 0.5, 0.6, 1.0])
    t = np.linspace(0.0, 1.0, 501)
    np.testing.assert_allclose(scale._pchip(x, 3.0 * x - 1.0, t), 3.0 * t - 1.0, atol=1e-12)
    y = np.array([0.0, 0.1, 5.0, 5.05, 9.0])
    out = scale._pchip(x, y, t)
    assert np.all(np.diff(out) >= -1e-12)
    np.testing.assert_allclose(scale._pchip(x, y, x), y, atol=1e-12)
