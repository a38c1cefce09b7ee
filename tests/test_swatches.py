"""Tests of ``inkshift swatches`` (inkshift.swatches and its command).

References used here:
- colour-science 0.4 (IEC 61966-2-1 sRGB, Bradford adaptation to D50, CIE 015
  CIELAB) for the Lab of sRGB colours;
- LittleCMS through Pillow.ImageCms for the 8-bit Lab buffers;
- the project's own ``proof_colors`` (the rule ``check`` uses) for the
  consistency checks;
- facts of the trade for the gamut verdicts: the RGB display primaries and
  vivid oranges lie outside offset CMYK gamuts, a mid gray lies inside.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys

import colour
import numpy as np
import pytest
from typer.testing import CliRunner

from conftest import require_file
from inkshift.cautions import HARD_PROOF, SHIPPED_PROFILE
from inkshift.cli import app, main
from inkshift.color.convert import D50_XYZ, xyz_to_lab
from inkshift.color.difference import delta_e_2000
from inkshift.colorlist import parse_named_color
from inkshift.errors import InputError
from inkshift.icc.cms import lab_profile, srgb_profile_bytes, transform_colors
from inkshift.icc.evaluate import device_to_lab, lab_to_device
from inkshift.icc.intent import Intent
from inkshift.icc.read import read_profile
from inkshift.proof import lab_to_srgb8, proof_colors, srgb_profile
from inkshift.shipped import resolve_profile
from inkshift.swatches import SWATCHES_SCHEMA, _lab_to_pillow8, check_swatches

DEBIAN_CMYK = "/usr/share/color/icc/ghostscript/default_cmyk.icc"  # Debian libgs-common, LUT CMYK

# The acceptance colours: sRGB blue and green primaries, a vivid orange, a mid gray.
ACCEPTANCE = ["blue=#0000ff", "green=#00ff00", "orange=#ff6600", "gray=#808080"]
# A wider set for the nearest-printable checks: dark, light, neutral, Lab inputs.
MORE = ["#000000", "#ffffff", "#0050a0", "#c0e0ff", "#402010", "lab(50 -20 30)", "lab(60 0 -90)", "lab(90 5 5)"]


def srgb_lab_reference(rgb8: np.ndarray) -> np.ndarray:
    """CIELAB (D50) of 8-bit sRGB by colour-science: IEC 61966-2-1 decoding, Bradford to D50."""
    d50 = colour.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D50"]
    xyz = colour.RGB_to_XYZ(
        np.asarray(rgb8) / 255.0, "sRGB", illuminant=d50,
        chromatic_adaptation_transform="Bradford", apply_cctf_decoding=True,
    )
    return xyz_to_lab(xyz, D50_XYZ)


@pytest.fixture(scope="module")
def coated_path():
    # The shipped default profile is part of the project; a missing one is a failure.
    return resolve_profile("coated")


@pytest.fixture(scope="module")
def coated_report(coated_path):
    colors = [parse_named_color(t) for t in ACCEPTANCE + MORE]
    return check_swatches(colors, ["coated"])


@pytest.fixture(scope="module")
def debian_report():
    path = require_file(DEBIAN_CMYK)
    colors = [parse_named_color(t) for t in ACCEPTANCE + MORE]
    return check_swatches(colors, [str(path)])


@pytest.mark.parametrize("which", ["coated_report", "debian_report"])
def test_display_primaries_and_vivid_orange_are_out_of_gamut_gray_is_in(which, request) -> None:
    # Facts of the trade: sRGB blue/green primaries and vivid orange are outside
    # offset CMYK gamuts; a mid gray is inside.
    report = request.getfixturevalue(which)
    by_name = {s.name: s for s in report.swatches if s.name}
    assert not by_name["blue"].in_gamut
    assert not by_name["green"].in_gamut
    assert not by_name["orange"].in_gamut
    assert by_name["gray"].in_gamut
    # Out-of-gamut colours move clearly in print; the gray hardly (common practice: 3 ΔE00).
    assert by_name["blue"].delta_e > 3 and by_name["green"].delta_e > 3
    assert by_name["gray"].delta_e < 3


def _self_round_trip(report, inputs: list[str]) -> np.ndarray:
    """ΔE00 of each nearest printable colour from its own Lab -> B2A1 -> A2B1 (float evaluator)."""
    output = read_profile(report.profiles[0].path)
    printable = np.array([s.nearest_printable_lab for s in report.swatches if s.input in inputs])
    again = device_to_lab(output, lab_to_device(output, printable, Intent.RELATIVE), Intent.RELATIVE)
    return delta_e_2000(printable, again)




@pytest.mark.parametrize("which", ["coated_report", "debian_report"])
def test_nearest_printable_colour_round_trips(which, request) -> None:
    # Acceptance: each nearest printable colour goes Lab -> B2A1 -> A2B1 (float
    # evaluator) back to itself within 1 ΔE00.
    report = request.getfixturevalue(which)
    inputs = [parse_named_color(t).text for t in ACCEPTANCE + MORE]
    assert _self_round_trip(report, inputs).max() < 1.0
    # In-gamut colours are their own nearest printable colour (within the gamut tolerance).
    for s in report.swatches:
        if s.in_gamut:
            assert s.nearest_delta_e <= report.out_of_gamut_delta_e


@pytest.mark.parametrize("which", ["coated_report", "debian_report"])
def test_nearest_printable_hex_prints_as_the_printable_colour(which, request) -> None:
    report = request.getfixturevalue(which)
    output = read_profile(report.profiles[0].path)
    hexes = np.array([[int(s.nearest_printable_hex[i:i + 2], 16) for i in (1, 3, 5)] for s in report.swatches], np.uint8)
    # The reported ΔE00 is the print of that hex as `check` would proof it.
    proof = proof_colors(hexes, srgb_profile(), output, Intent.RELATIVE, True)
    printable = np.array([s.nearest_printable_lab for s in report.swatches])
    measured = delta_e_2000(proof.print_lab, printable)
    np.testing.assert_allclose([s.nearest_print_delta_e for s in report.swatches], measured, atol=1e-9)
    # The search never does worse than the plain sRGB rendering of the target it starts from.
    start = proof_colors(lab_to_srgb8(printable), srgb_profile(), output, Intent.RELATIVE, True)
    assert np.all(measured <= delta_e_2000(start.print_lab, printable) + 1e-9)
    # Common practice: a suggestion should print within about the JND of what it promises;
    # allow 1.5 ΔE00 for printable colours that sRGB itself cannot show exactly.
    assert measured.max() < 1.5


def test_in_gamut_flag_and_shift_follow_the_check_rule(debian_report) -> None:
    # The same rule as `check` (proof_colors), for the sRGB inputs.
    output = read_profile(DEBIAN_CMYK)
    rgb_rows = [s for s in debian_report.swatches if s.kind == "rgb"]
    rgb = np.array([[int(s.hex[i:i + 2], 16) for i in (1, 3, 5)] for s in rgb_rows], np.uint8)
    proof = proof_colors(rgb, srgb_profile(), output, Intent.RELATIVE, True)
    assert [s.in_gamut for s in rgb_rows] == list(~proof.out_of_gamut)
    np.testing.assert_allclose([s.delta_e for s in rgb_rows], proof.delta_e, atol=1e-9)
    ink = np.array([list(s.ink.values()) for s in rgb_rows])
    np.testing.assert_allclose(ink, proof.device * 100.0 / 255.0, atol=1e-9)
    np.testing.assert_allclose([s.coverage for s in rgb_rows], ink.sum(axis=1), atol=1e-9)


def test_screen_lab_of_hex_matches_colour_science(coated_report) -> None:
    rows = [s for s in coated_report.swatches if s.kind == "rgb"]
    rgb = np.array([[int(s.hex[i:i + 2], 16) for i in (1, 3, 5)] for s in rows], np.uint8)
    # LittleCMS's built-in sRGB stores its matrix in s15Fixed16: allow 0.1 ΔE00.
    assert delta_e_2000(np.array([s.screen_lab for s in rows]), srgb_lab_reference(rgb)).max() < 0.1


def test_lab_input_agrees_with_the_same_colour_as_hex() -> None:
    # A lab() input equal to the CIELAB of an sRGB colour (by colour-science) must
    # give nearly the verdicts the hex gets. The two separations differ by the 8-bit
    # Lab buffer (L* steps 0.39, a*/b* steps 1: up to ~0.5 ΔE00) and by LittleCMS
    # resampling each source into its own device link (up to three 8-bit codes per
    # ink, DESIGN.md), so allow 1.5 ΔE00 between the prints (measured max 1.03).
    path = require_file(DEBIAN_CMYK)
    hexes = ["#0000ff", "#ff6600", "#808080", "#0050a0", "#c0e0ff", "#402010"]
    rgb = np.array([[int(h[i:i + 2], 16) for i in (1, 3, 5)] for h in hexes], np.uint8)
    labs = srgb_lab_reference(rgb)
    colors = [parse_named_color(h) for h in hexes] + [parse_named_color("lab({:.4f} {:.4f} {:.4f})".format(*v)) for v in labs]
    report = check_swatches(colors, [str(path)])
    as_hex, as_lab = report.swatches[:6], report.swatches[6:]
    for h, l in zip(as_hex, as_lab):
        assert l.kind == "lab" and l.in_srgb
        assert l.hex == h.hex or max(abs(int(l.hex[i:i + 2], 16) - int(h.hex[i:i + 2], 16)) for i in (1, 3, 5)) <= 1
        assert l.in_gamut == h.in_gamut
        assert abs(l.delta_e - h.delta_e) < 1.5
        assert delta_e_2000(np.array(l.print_lab), np.array(h.print_lab)) < 1.5
        assert max(abs(l.ink[k] - h.ink[k]) for k in "cmyk") < 4.0


def test_lab_outside_srgb_is_flagged() -> None:
    path = require_file(DEBIAN_CMYK)
    report = check_swatches([parse_named_color("lab(60 0 -90)"), parse_named_color("lab(50 0 0)")], [str(path)])
    outside, gray = report.swatches
    assert not outside.in_srgb and gray.in_srgb
    # L* = 50 neutral is sRGB #777777 (colour-science: L* of #777777 is 50.03).
    assert abs(srgb_lab_reference(np.array([0x77] * 3, np.uint8))[0] - 50.0) < 0.1
    assert gray.hex == "#777777"
    assert any("outside sRGB" in n for n in report.notes)


def test_lab_buffer_matches_littlecms_encoding() -> None:
    # Pillow's LAB mode: L* 0..255 for 0..100, a*/b* signed bytes. Sent through
    # LittleCMS to sRGB, the packed values must land where the float path puts them.
    # Compared on Lab values already on the 8-bit grid, with LittleCMS's own tables
    # (no optimisation); a wrong a*/b* encoding (offset 128) would miss by ~100 codes.
    lab = np.array([[50.0, 40.0, -20.0], [70.0, -30.0, 10.0], [30.0, -5.0, -40.0], [90.0, 2.0, 60.0]])
    lab[:, 0] = np.rint(lab[:, 0] * 2.55) / 2.55
    rgb = transform_colors(
        _lab_to_pillow8(lab), lab_profile(), srgb_profile_bytes(), "LAB", "RGB", Intent.RELATIVE, optimise=False
    )
    assert np.abs(rgb.astype(int) - lab_to_srgb8(lab).astype(int)).max() <= 1


def test_report_json_and_cautions(coated_report) -> None:
    data = json.loads(json.dumps(coated_report.to_dict(), allow_nan=False))
    assert data["schema"] == SWATCHES_SCHEMA == "inkshift.swatches/1"
    first = data["swatches"][0]
    assert first["name"] == "blue" and first["input"] == "#0000ff" and first["profile"] == "coated"
    assert set(first["ink"]) == {"c", "m", "y", "k"}
    assert set(first["nearest_printable"]) == {"lab", "delta_e", "hex", "hex_print_delta_e", "ink", "coverage"}
    assert SHIPPED_PROFILE.format(name="coated") in data["cautions"]
    assert data["cautions"][-1] == HARD_PROOF


def test_several_profiles_each_get_every_colour(coated_path) -> None:
    path = require_file(DEBIAN_CMYK)
    colors = [parse_named_color(t) for t in ACCEPTANCE]
    report = check_swatches(colors, ["coated", str(path), str(coated_path)])
    # coated named twice (short name and path) is the same profile, checked once.
    names = [p.name for p in report.profiles]
    assert names == ["coated", str(path)]
    assert [s.name for s in report.for_profile(str(path))] == ["blue", "green", "orange", "gray"]
    assert len(report.swatches) == 8


def test_refusals() -> None:
    with pytest.raises(InputError, match="no colours"):
        check_swatches([], ["coated"])
    with pytest.raises(InputError, match="no output profile"):
        check_swatches([parse_named_color("#000")], [])


# ---- the command ----------------------------------------------------------------

runner = CliRunner()


def test_command_table_from_csv(tmp_path, coated_path) -> None:
    csv_path = tmp_path / "brand.csv"
    csv_path.write_text("name,color\nBrand blue,#0000ff\nMid gray,#808080\n", encoding="utf-8")
    result = runner.invoke(app, ["swatches", "--file", str(csv_path), "#ff6600"])
    assert result.exit_code == 0, result.output
    lines = result.output.splitlines()
    blue = next(ln for ln in lines if ln.strip().startswith("Brand blue"))
    gray = next(ln for ln in lines if ln.strip().startswith("Mid gray"))
    assert " no " in blue and " yes " in gray
    assert any(ln.strip().startswith("#ff6600") for ln in lines)
    assert "Printer:  coated" in result.output and "Cautions:" in result.output


def test_command_json(coated_path) -> None:
    result = runner.invoke(app, ["swatches", "gray=#808080", "--json", "--no-bpc", "--intent", "perceptual"])
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["bpc"] is False and data["intent"] == "perceptual"
    assert data["swatches"][0]["name"] == "gray"


def _run_cli(*args: str, cwd) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-c", "from inkshift.cli import main; main()", *args],
        capture_output=True, text=True, cwd=cwd, timeout=120, env={**os.environ},
    )


def test_command_bad_file_line_in_a_subprocess(tmp_path) -> None:
    # Acceptance: as a user runs it, a bad line gives exit 2 and one line naming it.
    bad = tmp_path / "brand.csv"
    bad.write_text("name,color\nok,#000000\nbroken,lab(50 a 3)\n", encoding="utf-8")
    proc = _run_cli("swatches", "--file", str(bad), cwd=tmp_path)
    assert proc.returncode == 2, proc.stderr
    assert "Traceback" not in proc.stderr
    assert proc.stderr == f"inkshift: error: {bad}: line 3: 'lab(50 a 3)' is not a colour: 'a' is not a number\n"
    assert proc.stdout == ""


@pytest.mark.parametrize(
    "args, expected",
    [
        (["swatches"], "no colours given"),
        (["swatches", "#000", "--profile", "no-such-profile"], "no-such-profile"),
        (["swatches", "#00"], "'#00' is not a colour"),
        (["swatches", "#000", "--intent", "vivid"], "unknown rendering intent 'vivid'"),
        (["swatches", "#000", "--gamut-tolerance", "0"], "--gamut-tolerance"),
    ],
)
def test_command_errors_are_one_line_exit_2(args, expected, monkeypatch, capsys) -> None:
    monkeypatch.setattr(sys, "argv", ["inkshift", *args])
    with pytest.raises(SystemExit) as info:
        main()
    assert info.value.code == 2
    out, err = capsys.readouterr()
    assert out == "" and err.count("\n") == 1 and err.startswith("inkshift: error: ") and expected in err
