"""Tests of inkshift.ramp and ``inkshift ramp``: colour scales in print and in gray."""

from __future__ import annotations

import colorsys
import json
import subprocess
import sys

import colour
import numpy as np
import pytest
from PIL import Image
from typer.testing import CliRunner

from inkshift.check import open_output_profile
from inkshift.cli import app
from inkshift.errors import ImageError, InputError, ProfileError
from inkshift.ramp import (
    RAMP_GRAY_STEP_DELTA_L,
    RAMP_SCHEMA,
    RAMP_STEP_DELTA_E,
    RampLimits,
    check_ramp,
    check_ramp_image,
    format_ramp,
    parse_strip,
    sample_strip,
)
from inkshift.shipped import shipped_names

# A single-hue light-to-dark blue chosen for these tests (light blue-white to
# dark navy, about 12 L* apart per step on screen).
BLUES = ["#eef3fc", "#c5d8ef", "#98bde0", "#6a9dcc", "#4279b2", "#1f5592", "#0b3368"]
# A blue-white-red diverging scale with a light middle (step 3), chosen for these tests.
DIVERGING = ["#2a4d8f", "#6f93c8", "#b7cbe6", "#f4f4f4", "#efbfae", "#d67b63", "#a3302a"]

_D50 = colour.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D50"]


def _rainbow() -> np.ndarray:
    """Hue sweep at full saturation and value: HSV hues 0, 30, ..., 300 degrees (Python colorsys)."""
    rgb = [colorsys.hsv_to_rgb(h / 360.0, 1.0, 1.0) for h in range(0, 301, 30)]
    return np.rint(np.array(rgb) * 255.0).astype(np.uint8)


def _colour_lightness(rgb8: np.ndarray) -> np.ndarray:
    """CIE L* of 8-bit sRGB by colour-science (IEC 61966-2-1, Bradford to D50)."""
    xyz = colour.RGB_to_XYZ(
        rgb8 / 255.0, colour.RGB_COLOURSPACES["sRGB"], illuminant=_D50,
        chromatic_adaptation_transform="Bradford", apply_cctf_decoding=True,
    )
    return colour.XYZ_to_Lab(xyz, _D50)[:, 0]


@pytest.fixture(scope="module")
def profiles() -> dict:
    """Every shipped profile, read once for the module."""
    return {name: open_output_profile(name)[0] for name in shipped_names()}


def _problems(report, rendition: str, problem: str) -> list[int]:
    return sorted(v.step for v in report.violations if v.rendition == rendition and v.problem == problem)


def test_the_shipped_set_has_a_gray_and_cmyk_profiles(profiles) -> None:
    # The parametrised tests below run over shipped_names(); make sure that is not empty.
    spaces = {p.color_space for p in profiles.values()}
    assert "office_gray" in profiles and spaces == {"CMYK", "GRAY"}


def test_rainbow_is_flagged_non_monotonic_on_screen_and_in_print(profiles) -> None:
    rainbow = _rainbow()
    report = check_ramp(rainbow, profiles["coated"], gray_profile=profiles["office_gray"])
    assert report.verdict == "fail"
    assert set(report.fails_in) >= {"screen", "print", "gray"}
    printed = _problems(report, "print", "reversal")
    assert printed, "a rainbow must lose lightness order in print"
    # Screen reversals are where CIE L* (colour-science) turns against the ends' direction
    # by more than the tolerance: Borland & Taylor (2007) on rainbow maps.
    lightness = _colour_lightness(rainbow)
    sign = np.sign(lightness[-1] - lightness[0])
    expected = np.flatnonzero(-sign * np.diff(lightness) > RampLimits().reversal_delta_l)
    assert _problems(report, "screen", "reversal") == expected.tolist()
    lines = format_ramp(report)
    assert "FAIL" in lines and "turns back" in lines


@pytest.mark.parametrize("name", shipped_names())
def test_single_hue_scale_passes_on_every_shipped_profile(name: str, profiles) -> None:
    # The gray profile is included: printing a scale on a grayscale printer is exactly
    # what the gray rendition models, so the check applies there too.
    report = check_ramp(BLUES, profiles[name], gray_profile=profiles["office_gray"])
    assert report.verdict == "pass", [v.message for v in report.violations]
    assert report.direction == "light to dark"
    print_l = np.array([s.print_lab[0] for s in report.steps])
    assert np.all(np.diff(print_l) < 0)
    assert all(s.print_delta_e_next >= RAMP_STEP_DELTA_E for s in report.steps[:-1])
    assert all(s.gray_delta_l_next >= RAMP_GRAY_STEP_DELTA_L for s in report.steps[:-1])
    # Screen L* is colour-science's CIE L* of the inputs (reference for the screen column).
    screen_l = [s.screen_lab[0] for s in report.steps]
    hexes = np.array([[int(h[i:i + 2], 16) for i in (1, 3, 5)] for h in BLUES], np.uint8)
    np.testing.assert_allclose(screen_l, _colour_lightness(hexes), atol=0.1)


def test_diverging_scale_is_judged_to_and_from_its_middle(profiles) -> None:
    out, gray = profiles["coated"], profiles["office_gray"]
    report = check_ramp(DIVERGING, out, kind="diverging", gray_profile=gray)
    assert report.verdict == "pass", [v.message for v in report.violations]
    assert report.middle == 3 and report.direction == "light middle"
    assert any("diverging" in n for n in report.notes)
    # Read as sequential, the second arm turns back on screen, in print and in gray.
    sequential = check_ramp(DIVERGING, out, gray_profile=gray)
    for rendition in ("screen", "print", "gray"):
        assert _problems(sequential, rendition, "reversal")


def test_a_diverging_scale_needs_a_middle(profiles) -> None:
    report = check_ramp(BLUES, profiles["coated"], kind="diverging", gray_profile=profiles["office_gray"])
    assert [(v.problem, v.step) for v in report.violations if v.problem == "no middle"] == [("no middle", 0)]


def test_repeated_step_is_too_close_everywhere_at_its_index(profiles) -> None:
    colors = BLUES[:3] + [BLUES[2]] + BLUES[3:]
    report = check_ramp(colors, profiles["coated"], gray_profile=profiles["office_gray"])
    for rendition in ("screen", "print", "gray"):
        assert _problems(report, rendition, "too close") == [2]
    assert "too close in print" in report.steps[2].flags
    assert report.steps[2].print_delta_e_next == pytest.approx(0.0, abs=1e-9)


def test_json_report(profiles) -> None:
    report = check_ramp(BLUES, profiles["uncoated"], gray_profile=profiles["office_gray"])
    data = json.loads(json.dumps(report.to_dict()))
    assert data["schema"] == RAMP_SCHEMA
    assert data["verdict"] == "pass" and data["fails_in"] == []
    assert [s["screen_hex"] for s in data["steps"]] == BLUES
    assert set(data["steps"][0]["ink"]) == {"c", "m", "y", "k"}
    assert data["steps"][-1]["next"]["print_delta_e"] is None
    assert data["output_profile"]["name"] == "uncoated" and data["gray_profile"]["name"] == "office_gray"
    # Both shipped profiles are approximations, and the cautions say so (DESIGN.md, cautions).
    assert any("'uncoated'" in c and "'office_gray'" in c for c in data["cautions"])


def test_lab_input_outside_srgb_is_noted(profiles) -> None:
    report = check_ramp(["lab(90 0 10)", "lab(40 0 -110)"], profiles["coated"], gray_profile=profiles["office_gray"])
    assert len(report.notes) == 1 and "lab(40 0 -110)" in report.notes[0]
    assert report.steps[0].label == "lab(90 0 10)"


def test_bad_inputs_raise_project_errors(profiles) -> None:
    out, gray = profiles["coated"], profiles["office_gray"]
    with pytest.raises(InputError, match="at least 2"):
        check_ramp(["#ffffff"], out, gray_profile=gray)
    with pytest.raises(InputError, match="kind"):
        check_ramp(BLUES, out, kind="rainbow", gray_profile=gray)  # type: ignore[arg-type]
    with pytest.raises(InputError, match="not a colour"):
        check_ramp(["#ffffff", "#12345g"], out, gray_profile=gray)
    with pytest.raises(ProfileError, match="grayscale"):
        check_ramp(BLUES, out, gray_profile=out)


def _legend(tmp_path, colors: list[str], vertical: bool = False):
    """A legend image: 30-pixel patches in a row, 12 pixels high, a black frame line above and below."""
    rgb = np.array([[int(h[i:i + 2], 16) for i in (1, 3, 5)] for h in colors], np.uint8)
    strip = np.repeat(rgb[None, :, :], 30, axis=1).repeat(1, axis=0)  # (1, 30n, 3)
    img = np.full((16, strip.shape[1] + 8, 3), 255, np.uint8)
    img[2:14, 4:-4] = strip
    img[1, :], img[14, :] = 0, 0
    if vertical:
        img = img.transpose(1, 0, 2).copy()
    path = tmp_path / ("legend_v.png" if vertical else "legend.png")
    Image.fromarray(img).save(path)
    return path, img


def test_sample_strip_reads_patch_centres(tmp_path) -> None:
    _, img = _legend(tmp_path, BLUES)
    n = len(BLUES)
    x1 = 4 + 30 * n - 1
    got = sample_strip(img, (4, 2, x1, 13), n)
    assert [f"#{r:02x}{g:02x}{b:02x}" for r, g, b in got] == BLUES
    # Corners given the other way round read the scale backwards.
    assert np.array_equal(sample_strip(img, (x1, 13, 4, 2), n), got[::-1])
    # Averaging across a strip that includes the frame line darkens every sample equally.
    framed = sample_strip(img, (4, 1, x1, 13), n).astype(int)
    assert np.all(framed <= got.astype(int))
    vertical = img.transpose(1, 0, 2)
    assert np.array_equal(sample_strip(vertical, (2, 4, 13, x1), n), got)


def test_strip_errors(tmp_path) -> None:
    _, img = _legend(tmp_path, BLUES[:3])
    with pytest.raises(ImageError, match="outside"):
        sample_strip(img, (0, 0, 500, 5), 3)
    with pytest.raises(InputError, match="too short"):
        sample_strip(img, (4, 2, 8, 4), 9)
    with pytest.raises(InputError, match="at least 2"):
        sample_strip(img, (4, 2, 90, 13), 1)
    for bad in ("1,2,3", "a,b,c,d", "1,2,-3,4"):
        with pytest.raises(InputError, match="strip"):
            parse_strip(bad)


def test_check_ramp_image_matches_the_colour_list(tmp_path, profiles) -> None:
    path, _ = _legend(tmp_path, BLUES)
    x1 = 4 + 30 * len(BLUES) - 1
    report = check_ramp_image(path, f"4,2,{x1},13", profiles["coated"], steps=len(BLUES),
                              gray_profile=profiles["office_gray"])
    assert [s.screen_hex for s in report.steps] == BLUES
    assert report.verdict == "pass"
    assert report.profile_assumed and "strip 4,2" in report.origin


def test_cli_json_and_table() -> None:
    runner = CliRunner()
    result = runner.invoke(app, ["ramp", *BLUES, "--json"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["schema"] == RAMP_SCHEMA and data["verdict"] == "pass"
    result = runner.invoke(app, ["ramp", *DIVERGING, "--diverging", "--profile", "newsprint"])
    assert result.exit_code == 0, result.output
    assert "middle at step 3" in result.output and "Verdict:  pass" in result.output


def test_cli_from_image(tmp_path) -> None:
    path, _ = _legend(tmp_path, BLUES[::2])
    x1 = 4 + 30 * 4 - 1
    result = CliRunner().invoke(app, ["ramp", "--from-image", str(path), "--strip", f"{x1},2,4,13", "--steps", "4"])
    assert result.exit_code == 0, result.output
    # Read right to left, the scale runs dark to light.
    assert "dark to light" in result.output


@pytest.mark.parametrize(
    "args, message",
    [
        (["#ffffff", "#12345g"], "is not a colour"),
        (["--from-image", "nothing.png", "--strip", "0,0,9,9"], "nothing.png"),
        (["--from-image", "nothing.png"], "--strip"),
        (["#ffffff", "#000000", "--steps", "3"], "--from-image"),
        ([], "give the scale's colours"),
        (["#ffffff", "#000000", "--step-threshold", "-1"], "--step-threshold"),
    ],
)
def test_cli_bad_input_raises_one_line_project_errors(args: list[str], message: str) -> None:
    result = CliRunner().invoke(app, ["ramp", *args])
    assert isinstance(result.exception, (InputError, ImageError)), result.output
    text = str(result.exception)
    assert message in text and "\n" not in text


def test_cli_bad_input_exits_2_with_one_line() -> None:
    # The console entry point turns the project's errors into exit status 2 and one line.
    proc = subprocess.run([sys.executable, "-W", "ignore", "-m", "inkshift", "ramp", "#ffffff", "#12345g"],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and "is not a colour" in lines[0], proc.stderr


def test_cli_help_states_the_library_defaults() -> None:
    # The command leaves the limits to the library (None = default); its help must quote them.
    import typer.main

    from inkshift.ramp import DEFAULT_STRIP_STEPS, RAMP_REVERSAL_DELTA_L

    command = typer.main.get_command(app).commands["ramp"]  # type: ignore[attr-defined]
    helps = {p.name: p.help for p in command.params}
    assert f"(default {RAMP_STEP_DELTA_E:g})" in helps["step_threshold"]
    assert f"(default {RAMP_GRAY_STEP_DELTA_L:g})" in helps["gray_step_threshold"]
    assert f"(default {RAMP_REVERSAL_DELTA_L:g})" in helps["reversal_tolerance"]
    assert f"(default {DEFAULT_STRIP_STEPS})" in helps["steps"]
