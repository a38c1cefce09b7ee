"""Float evaluation of ICC profiles, checked against colour-science and LittleCMS (Pillow.ImageCms).

References used below:
- IEC 61966-2-1:1999 sRGB, as implemented by colour-science 0.4.7
  (colour.RGB_COLOURSPACES['sRGB'], colour.models.eotf_sRGB), with Bradford
  adaptation to D50 (ICC.1:2022 annex E) and CIELAB (CIE 015:2018).
- LittleCMS 2 through Pillow.ImageCms, run with cmsFLAGS_NOOPTIMIZE so that
  it evaluates the profiles' own tables (the reference CMM).
- ICC.1:2022 table 68 (parametric curve functions), table 25 (tags per
  intent), annex D.1 (ICC-absolute colorimetry).
"""

from __future__ import annotations

import colour
import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays
from PIL import ImageCms

import icc_bytes
from conftest import require_file
from inkshift.color.convert import D50_XYZ
from inkshift.color.difference import delta_e_2000
from inkshift.errors import InputError, ProfileError
from inkshift.icc.cms import srgb_profile_bytes, transform_colors
from inkshift.icc.encoding import lab_from_8
from inkshift.icc.evaluate import (
    absolute_white,
    available_tables,
    codes_to_lab,
    device_to_lab,
    device_to_xyz,
    lab_to_device,
    select_table,
    xyz_to_device,
)
from inkshift.icc.intent import Intent
from inkshift.icc.lut import Curve, _interp_uniform, eval_curve, invert_curve
from inkshift.icc.read import read_profile

ICC = "/usr/share/color/icc"
GS = "/usr/share/color/icc/ghostscript"
DEFAULT_CMYK = f"{GS}/default_cmyk.icc"

# LittleCMS's Lab profile with its default D50 white (Pillow createProfile("LAB")).
LAB_D50 = ImageCms.ImageCmsProfile(ImageCms.createProfile("LAB"))

N_COLOURS = 10_000
PILLOW_MODES = {"RGB": "RGB", "GRAY": "L", "CMYK": "CMYK", "LAB": "LAB"}

# Agreement with LittleCMS's 8-bit Lab output, fractions of colours (from the brief of
# this module: 8-bit rounding on one side only allows 1 code; the rest covers
# LittleCMS's 16-bit fixed-point arithmetic in its tables and curves).
WITHIN_1_CODE = 0.99
WITHIN_2_CODES = 0.999
MAX_CODES = 3


def lcms_lab_codes(pillow_lab: np.ndarray) -> np.ndarray:
    """Pillow LAB bytes (a*, b* signed) -> unsigned 8-bit Lab codes (L*255/100, a+128, b+128)."""
    codes = pillow_lab.astype(np.float64)
    codes[..., 1:] = pillow_lab[..., 1:].view(np.int8) + 128.0
    return codes


def to_lab_codes(lab: np.ndarray) -> np.ndarray:
    """Float CIELAB -> 8-bit Lab codes as LittleCMS rounds and clamps them."""
    codes = np.empty_like(lab)
    codes[..., 0] = np.round(lab[..., 0] * 255.0 / 100.0)
    codes[..., 1:] = np.round(lab[..., 1:]) + 128.0
    return np.clip(codes, 0.0, 255.0)


def agreement(ours: np.ndarray, ref: np.ndarray) -> tuple[float, float, float]:
    d = np.abs(ours - ref).max(axis=-1)
    return float((d <= 1).mean()), float((d <= 2).mean()), float(d.max())


def assert_agrees(ours: np.ndarray, ref: np.ndarray, what: str) -> None:
    w1, w2, worst = agreement(ours, ref)
    print(f"{what}: <=1 code {w1:.2%}, <=2 codes {w2:.2%}, max {worst:.0f}")
    assert w1 >= WITHIN_1_CODE, f"{what}: only {w1:.2%} within 1 code"
    assert w2 >= WITHIN_2_CODES, f"{what}: only {w2:.2%} within 2 codes"
    assert worst <= MAX_CODES, f"{what}: {worst:.0f} codes apart"


def pillow_lab_input(codes: np.ndarray) -> np.ndarray:
    """Unsigned 8-bit Lab codes -> Pillow LAB bytes (a*, b* as signed bytes)."""
    out = codes.astype(np.uint8)
    out[..., 1:] = (codes[..., 1:] - 128).astype(np.int8).view(np.uint8)
    return out


# --- sRGB against colour-science (IEC 61966-2-1) -------------------------------------

# Maximum CIEDE2000 against colour-science's sRGB: LittleCMS's built-in profile stores
# the sRGB primaries and curve parameters as s15Fixed16 numbers, Debian's sRGB.icc a
# 1024-entry curve table; the limits are those of this module's brief (measured: 0.037
# and 0.040 over 10^4 colours).
SRGB_BUILTIN_MAX_DE00 = 0.05
SRGB_DEBIAN_MAX_DE00 = 0.1


def srgb_reference_lab(rgb: np.ndarray) -> np.ndarray:
    # IEC 61966-2-1 decoding and primaries, Bradford to colour-science's D50, then
    # CIELAB relative to the ICC PCS white (ICC.1:2022 7.2.16).
    d50 = colour.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D50"]
    xyz = colour.RGB_to_XYZ(rgb, colour.RGB_COLOURSPACES["sRGB"], illuminant=d50,
                            chromatic_adaptation_transform="Bradford", apply_cctf_decoding=True)
    return colour.XYZ_to_Lab(xyz, colour.XYZ_to_xy(D50_XYZ))


@pytest.mark.parametrize(
    ("source", "limit"),
    [("builtin", SRGB_BUILTIN_MAX_DE00), (f"{ICC}/sRGB.icc", SRGB_DEBIAN_MAX_DE00)],
)
def test_srgb_matches_colour_science(source: str, limit: float) -> None:
    data = srgb_profile_bytes() if source == "builtin" else require_file(source)
    profile = read_profile(data)
    rgb = np.random.default_rng(2026).random((N_COLOURS, 3))
    ours = device_to_lab(profile, rgb)
    ref = srgb_reference_lab(rgb)
    de = delta_e_2000(ours, ref)
    # Cross-check the project's CIEDE2000 with colour-science's on the same pairs.
    np.testing.assert_allclose(de, colour.delta_E(ours, ref, method="CIE 2000"), atol=1e-9)
    print(f"{source}: max dE00 {de.max():.4f}, mean {de.mean():.4f}")
    assert de.max() <= limit


# --- third-party profiles against LittleCMS --------------------------------------------

# Profiles of Debian's icc-profiles-free and libgs-common that Pillow can drive
# (LCMSXYZI.ICM has an XYZ device space, which Pillow has no mode for).
THIRD_PARTY = [
    f"{ICC}/sRGB.icc", f"{ICC}/compatibleWithAdobeRGB1998.icc", f"{ICC}/LStar-RGB.icc",
    f"{ICC}/CineonLog_M.icc", f"{ICC}/CineonLog_M_Knee_10.icc", f"{ICC}/CineonLog_M_Knee_20.icc",
    f"{ICC}/CineonLog_M_Knee_30.icc", f"{ICC}/CineonLog_M_Knee_60.icc",
    f"{ICC}/Gray.icc", f"{ICC}/Gray-CIE_L.icc",
    f"{ICC}/ITULab.icc", f"{ICC}/LCMSLABI.ICM", f"{ICC}/CineLogCurve.icc",
    DEFAULT_CMYK, f"{GS}/ps_cmyk.icc", f"{GS}/gray_to_k.icc", f"{GS}/srgb.icc", f"{GS}/esrgb.icc",
    f"{GS}/a98.icc", f"{GS}/rommrgb.icc", f"{GS}/scrgb.icc", f"{GS}/sgray.icc", f"{GS}/default_gray.icc",
    f"{GS}/ps_rgb.icc", f"{GS}/ps_gray.icc", f"{GS}/lab.icc",
]


def intents_carried(profile) -> list[Intent]:
    """Every intent for matrix/TRC profiles; for table profiles those with their own A2Bn
    tag, plus absolute (on A2B1, else A2B0, like LittleCMS)."""
    if not profile.luts:
        return list(Intent)
    own = [i for i in Intent if i is not Intent.ABSOLUTE and f"A2B{i.table_index}" in profile.luts]
    return own + [Intent.ABSOLUTE]


@pytest.mark.parametrize("path", THIRD_PARTY, ids=lambda p: p.rsplit("/", 1)[-1])
def test_device_to_lab_matches_littlecms(path: str) -> None:
    require_file(path)
    profile = read_profile(path)
    mode = PILLOW_MODES[profile.color_space]
    rng = np.random.default_rng(7)
    device = rng.integers(0, 256, (N_COLOURS, profile.channels), dtype=np.uint8)
    values = device / 255.0
    if profile.color_space == "LAB":
        # Pillow's LAB mode holds a*, b* as signed bytes; LittleCMS reads the unsigned codes.
        values = lcms_lab_codes(device) / 255.0
    intents = intents_carried(profile)
    assert intents
    for intent in intents:
        ref = lcms_lab_codes(transform_colors(device, path, LAB_D50, mode, "LAB", intent, optimise=False))
        ours = to_lab_codes(device_to_lab(profile, values, intent))
        assert_agrees(ours, ref, f"{path} {intent.label}")


# Profiles whose PCS -> device direction is compared. The CineonLog and esrgb profiles
# are left out: their TRC tables have flat stretches (esrgb: 1026 of 2048 steps), so
# the inverse is not unique and LittleCMS's sampled reverse curve picks other points
# on them for a few colours (measured: 1-2 colours in 10^4, up to 55 codes).
REVERSE = [f"{ICC}/sRGB.icc", f"{ICC}/compatibleWithAdobeRGB1998.icc", f"{ICC}/Gray.icc",
           f"{ICC}/Gray-CIE_L.icc", DEFAULT_CMYK, f"{GS}/default_gray.icc", f"{GS}/srgb.icc"]


@pytest.mark.parametrize("path", REVERSE, ids=lambda p: p.rsplit("/", 1)[-1])
def test_lab_to_device_matches_littlecms(path: str) -> None:
    require_file(path)
    profile = read_profile(path)
    mode = PILLOW_MODES[profile.color_space]
    codes = np.random.default_rng(11).integers(0, 256, (N_COLOURS, 3)).astype(np.float64)
    lab = lab_from_8(codes)
    for intent in intents_carried(profile):
        ref = transform_colors(pillow_lab_input(codes), LAB_D50, path, "LAB", mode, intent, optimise=False)
        ours = np.round(lab_to_device(profile, lab, intent) * 255.0)
        assert_agrees(ours, ref.reshape(ours.shape).astype(np.float64), f"{path} {intent.label} (PCS->device)")


def test_builtin_srgb_matches_littlecms_every_intent() -> None:
    # LittleCMS's own v4 sRGB: parametric type-3 curves and a chad tag.
    data = srgb_profile_bytes()
    profile = read_profile(data)
    device = np.random.default_rng(3).integers(0, 256, (N_COLOURS, 3), dtype=np.uint8)
    for intent in Intent:
        ref = lcms_lab_codes(transform_colors(device, data, LAB_D50, "RGB", "LAB", intent, optimise=False))
        assert_agrees(to_lab_codes(device_to_lab(profile, device / 255.0, intent)), ref, f"built-in sRGB {intent.label}")


# --- synthetic lutAtoB / lutBtoA / lut16 profiles against LittleCMS ------------------

def test_lut_atob_and_btoa_match_littlecms() -> None:
    # A2B1 lutAtoB: parametric A curves (types 0-2), 5x7x6 2-byte CLUT, M curves
    # (types 3, 4, gamma), matrix with offset, B curves; B2A1 lutBtoA with a 1-byte CLUT.
    data = icc_bytes.rgb_lab_ab_profile()
    profile = read_profile(data)
    assert {t: lut.kind for t, lut in profile.luts.items()} == {"A2B1": "lutAtoB", "B2A1": "lutBtoA"}
    rng = np.random.default_rng(5)
    device = rng.integers(0, 256, (N_COLOURS, 3), dtype=np.uint8)
    for intent in (Intent.RELATIVE, Intent.ABSOLUTE):
        ref = lcms_lab_codes(transform_colors(device, data, LAB_D50, "RGB", "LAB", intent, optimise=False))
        assert_agrees(to_lab_codes(device_to_lab(profile, device / 255.0, intent)), ref, f"lutAtoB {intent.label}")
    codes = rng.integers(0, 256, (N_COLOURS, 3)).astype(np.float64)
    ref = transform_colors(pillow_lab_input(codes), LAB_D50, data, "LAB", "RGB", Intent.RELATIVE, optimise=False)
    ours = np.round(lab_to_device(profile, lab_from_8(codes), Intent.RELATIVE) * 255.0)
    assert_agrees(ours, ref.astype(np.float64), "lutBtoA relative")


def test_lut_atob_xyz_pcs_four_inputs_matches_littlecms() -> None:
    # CMYK -> XYZ lutAtoB with a different number of grid points per input (3, 4, 5, 3).
    data = icc_bytes.cmyk_xyz_ab_profile()
    profile = read_profile(data)
    assert profile.luts["A2B1"].clut.grid == (3, 4, 5, 3)
    device = np.random.default_rng(6).integers(0, 256, (N_COLOURS, 4), dtype=np.uint8)
    ref = lcms_lab_codes(transform_colors(device, data, LAB_D50, "CMYK", "LAB", Intent.RELATIVE, optimise=False))
    assert_agrees(to_lab_codes(device_to_lab(profile, device / 255.0)), ref, "CMYK XYZ lutAtoB")


@pytest.mark.parametrize("channels", [3, 4])
def test_interpolation_scheme_matches_littlecms_on_random_tables(channels: int) -> None:
    # A CLUT of random values makes the interpolation scheme visible: tetrahedral in
    # 3-D, and for CMYK the first input (C) as the outer, linearly blended dimension.
    # Trilinear, or K as the outer dimension, leave about 99 % of colours > 1 code off.
    rng = np.random.default_rng(channels)
    table = rng.random((3**channels, 3))
    data = icc_bytes.cmyk_lut16_profile(3, table) if channels == 4 else icc_bytes.rgb_lut16_profile(3, table)
    profile = read_profile(data)
    mode = "CMYK" if channels == 4 else "RGB"
    device = rng.integers(0, 256, (N_COLOURS, channels), dtype=np.uint8)
    for intent in (Intent.PERCEPTUAL, Intent.RELATIVE):  # A2B0 serves both (ICC.1:2022 table 25)
        ref = lcms_lab_codes(transform_colors(device, data, LAB_D50, mode, "LAB", intent, optimise=False))
        assert_agrees(to_lab_codes(device_to_lab(profile, device / 255.0, intent)), ref, f"random {mode} lut16")


# --- curves (ICC.1:2022 table 68) --------------------------------------------------------

def test_parametric_type3_is_the_srgb_decoding() -> None:
    # IEC 61966-2-1 as a type-3 function: g=2.4, a=1/1.055, b=0.055/1.055, c=1/12.92, d=0.04045.
    curve = Curve("parametric", function=3, params=(2.4, 1 / 1.055, 0.055 / 1.055, 1 / 12.92, 0.04045))
    x = np.linspace(0, 1, 1001)
    np.testing.assert_allclose(eval_curve(curve, x), colour.models.eotf_sRGB(x), atol=1e-12)
    np.testing.assert_allclose(invert_curve(curve, colour.models.eotf_sRGB(x)), x, atol=1e-9)


@pytest.mark.parametrize(
    ("function", "params", "formula"),
    [
        (0, (2.2,), lambda x: x**2.2),
        (1, (2.0, 1.2, -0.2), lambda x: np.where(x >= 0.2 / 1.2, np.maximum(1.2 * x - 0.2, 0) ** 2.0, 0.0)),
        (2, (2.0, 0.8, 0.1, 0.05), lambda x: np.where(x >= -0.1 / 0.8, (0.8 * x + 0.1) ** 2.0 + 0.05, 0.05)),
        (4, (2.0, 0.9, 0.1, 0.3, 0.1, 0.02, 0.01),
         lambda x: np.where(x >= 0.1, (0.9 * x + 0.1) ** 2.0 + 0.02, 0.3 * x + 0.01)),
    ],
)
def test_parametric_functions_follow_icc_table_68(function, params, formula) -> None:
    # Each function written out from ICC.1:2022 table 68 (results clipped to 0..1).
    curve = Curve("parametric", function=function, params=params)
    x = np.linspace(0, 1, 513)
    expected = np.clip(formula(x), 0, 1)
    np.testing.assert_allclose(eval_curve(curve, x), expected, atol=1e-12)
    inside = (expected > expected.min() + 1e-6) & (expected < 1 - 1e-6)
    np.testing.assert_allclose(eval_curve(curve, invert_curve(curve, expected[inside])), expected[inside], atol=1e-9)


def test_table_curve_inverse_of_a_decreasing_table() -> None:
    # A decreasing curve (e.g. a negative film TRC) inverts by swapping the axes.
    curve = Curve("table", table=np.linspace(1, 0, 17) ** 2)
    y = np.linspace(0.01, 0.99, 50)
    np.testing.assert_allclose(eval_curve(curve, invert_curve(curve, y)), y, atol=1e-12)


# --- intents, absolute colorimetry, fallbacks ---------------------------------------

def test_absolute_maps_paper_to_media_white() -> None:
    # ICC.1:2022 D.1: ICC-absolute = media-relative * wtpt / D50, so unprinted paper
    # (media-relative white, Lab 100 0 0 in A2B1) comes out as the wtpt XYZ.
    path = require_file(DEFAULT_CMYK)
    profile = read_profile(path)
    paper_rel = device_to_lab(profile, np.zeros(4), Intent.RELATIVE)
    np.testing.assert_allclose(paper_rel, [100, 0, 0], atol=0.5)  # lut16 table precision
    paper_abs = device_to_xyz(profile, np.zeros(4), Intent.ABSOLUTE)
    np.testing.assert_allclose(paper_abs, profile.media_white * device_to_xyz(profile, np.zeros(4)) / D50_XYZ)
    np.testing.assert_allclose(paper_abs, profile.media_white, atol=0.005)
    back = lab_to_device(profile, device_to_lab(profile, np.zeros(4), Intent.ABSOLUTE), Intent.ABSOLUTE)
    np.testing.assert_allclose(back, np.zeros(4), atol=1.5 / 255)


def test_v2_display_profiles_use_d50_for_absolute() -> None:
    # Debian's sRGB.icc (v2, display class) has a D65 wtpt; LittleCMS (cmsio1.c,
    # _cmsReadMediaWhitePoint) takes D50 for v2 display profiles, and so do we.
    profile = read_profile(require_file(f"{ICC}/sRGB.icc"))
    assert abs(profile.media_white[2] - 1.0883) < 1e-3
    np.testing.assert_array_equal(absolute_white(profile), D50_XYZ)
    rgb = np.random.default_rng(1).random((100, 3))
    np.testing.assert_allclose(device_to_lab(profile, rgb, Intent.ABSOLUTE), device_to_lab(profile, rgb), atol=1e-9)


def test_missing_intent_falls_back_to_the_0_tag() -> None:
    # ICC.1:2022 table 25: A2B0/B2A0 serve intents whose own tag is absent.
    profile = read_profile(require_file(f"{GS}/ps_cmyk.icc"))
    assert select_table(profile, "A2B", Intent.RELATIVE) == "A2B0"
    assert select_table(profile, "B2A", Intent.SATURATION) == "B2A0"
    assert select_table(profile, "A2B", Intent.ABSOLUTE) == "A2B0"
    cmyk = read_profile(require_file(DEFAULT_CMYK))
    assert select_table(cmyk, "A2B", Intent.ABSOLUTE) == "A2B1"
    assert available_tables(cmyk) == {"A2B0": "lut16", "A2B1": "lut16", "A2B2": "lut16",
                                      "B2A0": "lut8", "B2A1": "lut8", "B2A2": "lut8"}
    assert available_tables(read_profile(srgb_profile_bytes())) == {"device to PCS": "matrix/TRC",
                                                                     "PCS to device": "matrix/TRC"}


def test_no_table_for_the_intent_is_a_profile_error() -> None:
    # The lutAtoB test profile has A2B1 only: perceptual has no tag and no A2B0 to fall back on.
    profile = read_profile(icc_bytes.rgb_lab_ab_profile(), name="only-a2b1.icc")
    with pytest.raises(ProfileError, match="only-a2b1.icc"):
        device_to_lab(profile, np.zeros(3), Intent.PERCEPTUAL)


def test_shapes_and_wrong_channel_counts() -> None:
    profile = read_profile(srgb_profile_bytes())
    rgb = np.random.default_rng(0).random((4, 5, 3))
    lab = device_to_lab(profile, rgb)
    assert lab.shape == (4, 5, 3) and lab.dtype == np.float64
    assert lab_to_device(profile, lab).shape == (4, 5, 3)
    assert xyz_to_device(profile, device_to_xyz(profile, rgb)).shape == (4, 5, 3)
    np.testing.assert_allclose(device_to_lab(profile, rgb[0, 0]), lab[0, 0])
    with pytest.raises(InputError, match="last axis of 3"):
        device_to_lab(profile, np.zeros((10, 4)))
    with pytest.raises(InputError):
        lab_to_device(profile, np.zeros(2))
    with pytest.raises(InputError, match="finite"):
        lab_to_device(profile, [[50.0, np.nan, 0.0]])


# --- round trips (hypothesis) --------------------------------------------------------

# Matrix/TRC profiles: both directions are the same float model (matrix inverse and
# curve inverse), so PCS -> device -> PCS is exact up to float64 rounding; 1e-6 in
# L*, a*, b* leaves room for the table-curve inverse by linear interpolation.
MATRIX_ROUND_TRIP_LAB = 1e-6

# default_cmyk.icc: B2A (lut8, 33^3) and A2B (lut16, 9^4) are separate tables, so the
# round trip cannot be tighter than the profile's own: require it within LittleCMS's
# round trip of the same colour plus 1.0 dE00, which covers LittleCMS's 8-bit Lab and
# CMYK buffers (a Lab code step is 0.39 L*, 1 a*/b*; measured margin up to 0.9).
CMYK_ROUND_TRIP_MARGIN_DE00 = 1.0

unit_rgb = arrays(np.float64, (32, 3), elements=st.floats(0.0, 1.0))
unit_lab = arrays(np.float64, (32, 3), elements=st.floats(0.0, 1.0))


@pytest.mark.parametrize("source", ["builtin", f"{ICC}/sRGB.icc"])
@settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(rgb=unit_rgb)
def test_matrix_profile_round_trip(source: str, rgb: np.ndarray) -> None:
    profile = read_profile(srgb_profile_bytes() if source == "builtin" else require_file(source))
    lab = device_to_lab(profile, rgb)  # in gamut by construction
    again = device_to_lab(profile, lab_to_device(profile, lab))
    assert np.abs(again - lab).max() <= MATRIX_ROUND_TRIP_LAB


@settings(max_examples=25, deadline=None)
@given(seed_lab=unit_lab)
def test_cmyk_profile_round_trip_no_worse_than_littlecms(seed_lab: np.ndarray) -> None:
    path = str(require_file(DEFAULT_CMYK))
    profile = read_profile(path)
    # In-gamut colours: CMYK that the profile's own separation produces, then device -> PCS.
    lab_seed = np.column_stack([seed_lab[:, 0] * 100, seed_lab[:, 1:] * 255 - 128])
    cmyk = np.round(lab_to_device(profile, lab_seed) * 255) / 255
    lab = device_to_lab(profile, cmyk)
    ours = delta_e_2000(lab, device_to_lab(profile, lab_to_device(profile, lab)))

    cmyk8 = np.round(cmyk * 255).astype(np.uint8)
    ref_lab = lab_from_8(lcms_lab_codes(transform_colors(cmyk8, path, LAB_D50, "CMYK", "LAB", 1, optimise=False)))
    ref_codes = to_lab_codes(ref_lab)
    ref_cmyk = transform_colors(pillow_lab_input(ref_codes), LAB_D50, path, "LAB", "CMYK", 1, optimise=False)
    ref_again = lab_from_8(lcms_lab_codes(transform_colors(ref_cmyk, path, LAB_D50, "CMYK", "LAB", 1, optimise=False)))
    theirs = delta_e_2000(ref_lab, ref_again)
    assert np.all(ours <= theirs + CMYK_ROUND_TRIP_MARGIN_DE00)


def test_xyz_device_space_identity_profile() -> None:
    # LCMSXYZI.ICM is LittleCMS's "Relative XYZ identity" profile (its description):
    # device XYZ, as normalised u1Fixed15 codes (ICC.1:2022 6.3.4.3), maps to the same
    # PCS XYZ. Pillow has no XYZ mode, so this is checked against the identity itself;
    # 2e-5 is about one 16-bit code (1/32768 = 3e-5 in XYZ).
    profile = read_profile(require_file(f"{ICC}/LCMSXYZI.ICM"))
    assert (profile.color_space, profile.pcs) == ("XYZ", "XYZ")
    xyz = np.random.default_rng(8).random((1000, 3)) * D50_XYZ
    device = xyz * 32768.0 / 65535.0
    np.testing.assert_allclose(device_to_xyz(profile, device), xyz, atol=2e-5)
    np.testing.assert_allclose(xyz_to_device(profile, xyz), device, atol=2e-5)


@pytest.mark.parametrize(
    "path, channels",
    [
        (None, 3),  # LittleCMS's built-in sRGB (matrix/TRC, parametric curves)
        ("/usr/share/color/icc/ghostscript/sgray.icc", 1),  # gray TRC
        ("/usr/share/color/icc/ghostscript/default_cmyk.icc", 4),  # LUT-based: the plain path
    ],
)
@pytest.mark.parametrize("intent", [Intent.RELATIVE, Intent.ABSOLUTE])
def test_codes_to_lab_equals_device_to_lab_bit_for_bit(path, channels, intent):
    # Reference: the evaluator's own float path on codes / 255; the look-up of
    # tabulated curves must not change a single bit.
    profile = read_profile(srgb_profile_bytes()) if path is None else read_profile(require_file(path))
    codes = np.random.default_rng(channels).integers(0, 256, (5000, channels), dtype=np.uint8)
    codes[:256, 0] = np.arange(256)  # every code of the first channel
    want = device_to_lab(profile, codes / 255.0, intent)
    np.testing.assert_array_equal(codes_to_lab(profile, codes, intent), want)
    with pytest.raises(InputError):
        codes_to_lab(profile, codes.astype(np.float64), intent)


def test_two_entry_linear_table_is_an_exact_identity():
    # lut16 writers put the table 0 -> 0, 1 -> 1 where no curve is wanted
    # (ICC.1:2022 10.10); interpolating it returns x exactly.
    ramp = Curve("table", table=np.array([0.0, 1.0]))
    assert ramp.is_identity and Curve("identity").is_identity
    assert not Curve("table", table=np.array([0.0, 0.5, 1.0])).is_identity
    assert not Curve("table", table=np.array([1.0, 0.0])).is_identity
    x = np.random.default_rng(2).random(10_000)
    x[:3] = (0.0, 1.0, 0.5)
    # Skipping it is exact: the table interpolation it replaces gives x back bit for bit.
    np.testing.assert_array_equal(_interp_uniform(ramp.table, x.copy()), x)
    np.testing.assert_array_equal(eval_curve(ramp, x), x)
