"""Tests of inkshift.readability: palettes in black and white and for colour-blind readers."""

from __future__ import annotations

import json

import colour
import numpy as np
import pytest

from inkshift.check import open_output_profile
from inkshift.color.convert import D50_XYZ, xyz_to_lab
from inkshift.errors import ProfileError
from inkshift.icc.cms import lab_profile, transform_colors
from inkshift.icc.intent import Intent
from inkshift.proof import proof_colors, srgb_profile
from inkshift.readability import (
    CHECKED_DEFICIENCIES,
    GRAY_MERGE_DELTA_L,
    format_gray,
    format_vision,
    gray_check,
    vision_check,
)
from inkshift.thresholds import DISTINCT_DELTA_E, MERGE_DELTA_E, Thresholds

# Test palette (chosen for these tests; CIE L* checked against colour-science
# in test_palette_has_the_intended_lightness):
RED, GREEN = "#d9534f", "#589034"  # same L* (54.1), hue differs: a red/green pair
BLUE, YELLOW = "#5898f0", "#989840"  # same L* (about 62), a blue/yellow pair
DARK, LIGHT = "#1f3a93", "#f2d16b"  # L* 27 and 85
WHITE, BLACK = "#ffffff", "#000000"

_D50 = colour.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D50"]


def _rgb8(hexes: list[str]) -> np.ndarray:
    return np.array([[int(h[i:i + 2], 16) for i in (1, 3, 5)] for h in hexes], dtype=np.uint8)


def _colour_lab(hexes: list[str]) -> np.ndarray:
    """CIELAB (D50) of sRGB colours by colour-science: IEC 61966-2-1 sRGB, Bradford to D50."""
    xyz = colour.RGB_to_XYZ(
        _rgb8(hexes) / 255.0, colour.RGB_COLOURSPACES["sRGB"], illuminant=_D50,
        chromatic_adaptation_transform="Bradford", apply_cctf_decoding=True,
    )
    return colour.XYZ_to_Lab(xyz, _D50)


def _colour_cvd_lab(hexes: list[str], family: str, severity: float = 1.0) -> np.ndarray:
    """Machado et al. (2009) simulation done entirely by colour-science, as CIELAB (D50)."""
    linear = colour.cctf_decoding(_rgb8(hexes) / 255.0, function="sRGB")
    sim = np.clip(linear @ colour.matrix_cvd_Machado2009(family, severity).T, 0.0, 1.0)
    xyz = colour.RGB_to_XYZ(
        sim, colour.RGB_COLOURSPACES["sRGB"], illuminant=_D50, chromatic_adaptation_transform="Bradford",
    )
    return colour.XYZ_to_Lab(xyz, _D50)


@pytest.fixture(scope="module")
def office_gray():
    return open_output_profile("office_gray")[0]


def test_palette_has_the_intended_lightness() -> None:
    # Reference: colour-science (sRGB -> XYZ D50 -> CIELAB), so the pairs below are what they claim.
    lab = _colour_lab([RED, GREEN, BLUE, YELLOW, DARK, LIGHT])
    assert abs(lab[0, 0] - lab[1, 0]) < 0.5
    assert abs(lab[2, 0] - lab[3, 0]) < 1.0
    assert lab[5, 0] - lab[4, 0] > 50
    de = colour.delta_E(lab[[0, 2, 4]], lab[[1, 3, 5]], method="CIE 2000")
    assert np.all(de > DISTINCT_DELTA_E)


def test_hue_only_pair_collapses_in_gray_light_dark_pair_does_not(office_gray) -> None:
    hexes = [RED, GREEN, DARK, LIGHT]
    result = gray_check(_rgb8(hexes), srgb_profile(), hexes, gray_profile=office_gray)
    for key in ("gray_print", "lightness"):
        pairs = {(p.a, p.b) for p in result.merges[key]}
        assert (RED, GREEN) in pairs, key
        assert (DARK, LIGHT) not in pairs, key
        for p in result.merges[key]:
            assert p.gray_delta_l < GRAY_MERGE_DELTA_L
            assert p.screen_delta_e >= DISTINCT_DELTA_E
    # 'L* alone' is CIE L* of the screen colour: colour-science as the reference.
    np.testing.assert_allclose(result.screen_lightness, _colour_lab(hexes)[:, 0], atol=0.1)
    text = "\n".join(format_gray(result))
    assert f"{RED} and {GREEN}" in text and f"{DARK} and {LIGHT}" not in text


def test_gray_print_of_white_is_paper_and_black_is_the_profile_black(office_gray) -> None:
    result = gray_check(_rgb8([WHITE, BLACK]), srgb_profile(), [WHITE, BLACK], gray_profile=office_gray)
    white, black = result.gray_lightness
    assert white > black + 50
    # ICC.1 media-relative colorimetry: bare paper is L* = 100; sRGB white separates to no ink.
    assert white == pytest.approx(100.0, abs=0.5)
    assert result.gray_ink[0] == pytest.approx(0.0, abs=0.5)
    # With black point compensation sRGB black lands on the profile's black point
    # (bkpt, ICC-absolute), which media-relative is bkpt scaled by D50 / wtpt
    # (ICC.1 media-relative colorimetry, the scaling the tables contract uses).
    rel_black = office_gray.media_black * (D50_XYZ / office_gray.media_white)
    assert black == pytest.approx(xyz_to_lab(rel_black)[0], abs=1.0)


def test_gray_lightness_matches_littlecms(office_gray) -> None:
    # Reference: LittleCMS (Pillow.ImageCms) for the separation and its own gray -> Lab.
    hexes = [RED, GREEN, BLUE, YELLOW, DARK, LIGHT, "#808080"]
    result = gray_check(_rgb8(hexes), srgb_profile(), hexes, gray_profile=office_gray)
    device = transform_colors(_rgb8(hexes), srgb_profile(), office_gray, "RGB", "L", Intent.RELATIVE, bpc=True)
    lab8 = transform_colors(device, office_gray, lab_profile(), "L", "LAB", Intent.RELATIVE, optimise=False)
    lcms_l = lab8[:, 0].astype(np.float64) * 100.0 / 255.0
    # LittleCMS rounds L* to 8-bit codes of 0.39: half a code plus a margin (measured: at
    # most 0.20 over 2000 random sRGB colours).
    np.testing.assert_allclose(result.gray_lightness, lcms_l, atol=0.3)


def test_gray_result_to_dict_is_json(office_gray) -> None:
    hexes = [RED, GREEN]
    data = gray_check(_rgb8(hexes), srgb_profile(), hexes, gray_profile=office_gray).to_dict()
    data = json.loads(json.dumps(data))
    assert [c["label"] for c in data["colors"]] == hexes
    assert data["gray_profile"] == "office_gray"
    assert data["merges"]["gray_print"][0]["a"] == RED


def test_red_green_merges_for_deuteranopia_blue_yellow_does_not() -> None:
    hexes = [RED, GREEN, BLUE, YELLOW]
    lab = _colour_lab(hexes)
    result = vision_check(hexes, lab)
    deutan = {(p.a, p.b): p for p in result.screen_merges["deuteranopia"]}
    assert (RED, GREEN) in deutan
    assert (BLUE, YELLOW) not in deutan
    assert deutan[(RED, GREEN)].print_delta_e < MERGE_DELTA_E
    # The simulated ΔE00 agrees with the whole pipeline done by colour-science.
    ref = _colour_cvd_lab([RED, GREEN], "Deuteranomaly")
    assert deutan[(RED, GREEN)].print_delta_e == pytest.approx(
        float(colour.delta_E(ref[0], ref[1], method="CIE 2000")), abs=0.05
    )
    assert set(result.screen_merges) == set(CHECKED_DEFICIENCIES)
    assert result.print_merges["deuteranopia"] == [] and not result.has_print


def test_blue_yellow_merges_for_tritanopia_only_if_the_model_says_so() -> None:
    # Cross-check every kind against colour-science: a pair is listed exactly when
    # colour-science's simulated ΔE00 is under the merge threshold.
    hexes = [RED, GREEN, BLUE, YELLOW]
    result = vision_check(hexes, _colour_lab(hexes))
    families = {"protanopia": "Protanomaly", "deuteranopia": "Deuteranomaly", "tritanopia": "Tritanomaly"}
    for kind, family in families.items():
        ref = _colour_cvd_lab(hexes, family)
        listed = {(p.a, p.b) for p in result.screen_merges[kind]}
        for a, b in ((0, 1), (2, 3)):
            de = float(colour.delta_E(ref[a], ref[b], method="CIE 2000"))
            if abs(de - MERGE_DELTA_E) > 0.2:  # keep clear of the threshold itself
                assert ((hexes[a], hexes[b]) in listed) == (de < MERGE_DELTA_E), (kind, de)


def test_vision_check_in_print_uses_the_print_colours() -> None:
    hexes = [RED, GREEN, BLUE, YELLOW]
    output = open_output_profile("coated")[0]
    proof = proof_colors(_rgb8(hexes), srgb_profile(), output)
    result = vision_check(hexes, proof.screen_lab, proof.print_lab)
    assert result.has_print
    for kind in CHECKED_DEFICIENCIES:
        sim = result.simulated_print_lab[kind]
        for p in result.print_merges[kind]:
            a, b = hexes.index(p.a), hexes.index(p.b)
            assert p.print_delta_e < MERGE_DELTA_E
            assert p.print_delta_e == pytest.approx(float(colour.delta_E(sim[a], sim[b], method="CIE 2000")), abs=1e-6)
    # The red/green pair keeps equal lightness in print, so it still merges there for a deuteranope.
    assert (RED, GREEN) in {(p.a, p.b) for p in result.print_merges["deuteranopia"]}
    data = json.loads(json.dumps(result.to_dict()))
    assert data["kinds"]["deuteranopia"]["print_merges"][0]["kind"] == "merge under deuteranopia"
    assert any("deuteranopia" in line for line in format_vision(result, MERGE_DELTA_E))


def test_partial_severity_simulates_the_anomaly() -> None:
    hexes = [RED, GREEN]
    result = vision_check(hexes, _colour_lab(hexes), severity=0.5, thresholds=Thresholds(merge=60.0))
    assert set(result.screen_merges) == {"protanomaly", "deuteranomaly", "tritanomaly"}
    ref = _colour_cvd_lab(hexes, "Deuteranomaly", 0.5)
    pair = result.screen_merges["deuteranomaly"][0]
    assert pair.print_delta_e == pytest.approx(float(colour.delta_E(ref[0], ref[1], method="CIE 2000")), abs=0.05)


def test_gray_ink_follows_the_profiles_own_polarity() -> None:
    # A gray output profile in the display convention (device 0 = black, 1 = paper), as
    # many third-party gray profiles are; built here with the project's ICC writer.
    from types import SimpleNamespace

    from inkshift.icc.encoding import legacy16_lab_grid
    from inkshift.icc.read import read_profile
    from inkshift.icc.write import printer_profile_bytes

    v = np.linspace(0.0, 1.0, 256)
    a2b = np.zeros((256, 3))
    a2b[:, 0] = 20.0 + 80.0 * v  # L* linear in the device value, media-relative
    lab_nodes = legacy16_lab_grid(17)
    b2a = np.clip((lab_nodes[..., :1] - 20.0) / 80.0, 0.0, 1.0)
    tables = SimpleNamespace(
        description="display-convention gray (test)", copyright="none", color_space="GRAY",
        media_white_xyz=D50_XYZ * 0.9, media_black_xyz=D50_XYZ * 0.03,
        a2b={i: a2b for i in range(3)}, b2a={i: b2a for i in range(3)},
        gamut=np.zeros(lab_nodes.shape[:-1] + (1,)),
    )
    inverted = read_profile(printer_profile_bytes(tables, created="2026-01-01"), name="inverted.icc")
    result = gray_check(_rgb8([WHITE, BLACK]), srgb_profile(), [WHITE, BLACK], gray_profile=inverted)
    # White is bare paper (no ink) and black is full ink, whatever the device polarity.
    assert result.gray_ink[0] == pytest.approx(0.0, abs=0.5)
    assert result.gray_ink[1] == pytest.approx(100.0, abs=2.0)  # a 17-point B2A grid is coarse
    assert result.gray_lightness[0] > result.gray_lightness[1] + 50


def test_gray_check_refuses_a_colour_profile() -> None:
    coated = open_output_profile("coated")[0]
    with pytest.raises(ProfileError, match="grayscale"):
        gray_check(_rgb8([WHITE, BLACK]), srgb_profile(), [WHITE, BLACK], gray_profile=coated)
