"""``inkshift profiles show`` and the profile summary behind it."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from PIL import ImageCms
from typer.testing import CliRunner

import icc_bytes
from conftest import require_file
from inkshift.cli import app
from inkshift.icc.cms import srgb_profile_bytes, transform_colors
from inkshift.icc.read import read_profile
from inkshift.icc.summary import profile_summary, total_ink_limit
from inkshift.printing.gamut import gamut_summary

GS = "/usr/share/color/icc/ghostscript"
DEFAULT_CMYK = f"{GS}/default_cmyk.icc"
LAB_D50 = ImageCms.ImageCmsProfile(ImageCms.createProfile("LAB"))
runner = CliRunner()

# default_cmyk.icc is Artifex's SWOP profile; SWOP's total area coverage limit is 300 %
# (SWOP specifications, from memory). The B2A tables are lut8, so four outputs rounded
# to 1/255 can add up to 4 * 0.5/255 = 0.8 % above the aim.
SWOP_TAC_PERCENT = 300.0
LUT8_ROUNDING_PERCENT = 0.8


def test_summary_of_a_cmyk_table_profile() -> None:
    profile = read_profile(require_file(DEFAULT_CMYK))
    s = profile_summary(profile)
    assert (s["class"], s["color_space"], s["channels"], s["pcs"], s["version"]) == ("prtr", "CMYK", 4, "LAB", "2.1.0")
    assert s["description"] == "Artifex CMYK SWOP Profile"
    np.testing.assert_allclose(s["media_white"]["XYZ"], profile.media_white, atol=1e-4)
    assert s["media_black"] is None
    assert s["intents"]["relative"]["device_to_pcs"] == {"tag": "A2B1", "type": "lut16", "fallback": False}
    assert s["intents"]["saturation"]["pcs_to_device"] == {"tag": "B2A2", "type": "lut8", "fallback": False}
    assert s["intents"]["absolute"]["scaled_by_media_white"] is True
    assert set(s["ink_limits"]) == {"B2A0", "B2A1", "B2A2"}
    assert abs(s["total_ink_limit"] - SWOP_TAC_PERCENT) <= LUT8_ROUNDING_PERCENT
    json.dumps(s)  # plain data only


def test_ink_limit_bounds_what_littlecms_separates() -> None:
    # LittleCMS's own separations (relative, every 8-bit Lab on a 4-code lattice) never
    # exceed the limit read from the CLUT nodes (trilinear interpolation of the nodes
    # cannot exceed their largest ink sum; 4 codes of rounding allowed), and come close to it.
    path = require_file(DEFAULT_CMYK)
    limit = total_ink_limit(read_profile(path).luts["B2A1"])
    axis = np.arange(0, 256, 4, dtype=np.uint8)
    lab = np.stack(np.meshgrid(axis, axis, axis, indexing="ij"), axis=-1).reshape(-1, 3)
    cmyk = transform_colors(lab, LAB_D50, path, "LAB", "CMYK", 1, optimise=False)
    sums = cmyk.astype(np.float64).sum(axis=1) / 255.0 * 100.0
    assert sums.max() <= limit + 4 * 100.0 / 255.0
    assert sums.max() >= limit - 5.0


def test_summary_of_a_matrix_profile() -> None:
    s = profile_summary(read_profile(srgb_profile_bytes()))
    assert s["intents"]["perceptual"]["device_to_pcs"]["type"] == "matrix/TRC"
    assert "total_ink_limit" not in s
    assert s["version"] == "4.4.0"
    assert s["media_white"]["Lab"] == [100.0, 0.0, 0.0]  # v4: wtpt is the PCS D50 (ICC.1:2022 9.2.36)


def test_show_text(tmp_path: Path) -> None:
    path = tmp_path / "ab.icc"
    path.write_bytes(icc_bytes.rgb_lab_ab_profile())
    result = runner.invoke(app, ["profiles", "show", str(path)])
    assert result.exit_code == 0, result.output
    out = result.output
    assert "inkshift test RGB lutAtoB" in out
    assert "display device (mntr)" in out
    assert "A2B1 lutAtoB" in out and "B2A1 lutBtoA" in out
    assert "\x1b[" not in out  # no terminal colour codes
    lines = out.splitlines()
    perceptual = next(line for line in lines if line.startswith("perceptual"))
    assert perceptual.split() == ["perceptual", "-", "-"]  # no A2B0: nothing serves it


def test_show_json_equals_the_summary() -> None:
    path = require_file(DEFAULT_CMYK)
    result = runner.invoke(app, ["profiles", "show", str(path), "--json"])
    assert result.exit_code == 0, result.output
    shown = json.loads(result.output)
    gamut = shown.pop("gamut")
    assert shown == json.loads(json.dumps(profile_summary(read_profile(path))))
    assert gamut == json.loads(json.dumps(gamut_summary(read_profile(path))))


def test_show_prints_gamut_volume_of_shipped_profiles() -> None:
    # Fact of the trade: coated stock holds a larger gamut than uncoated, and
    # uncoated than newsprint; every offset gamut is smaller than sRGB's.
    volumes = {}
    for name in ("coated", "uncoated", "newsprint"):
        result = runner.invoke(app, ["profiles", "show", name, "--json"])
        assert result.exit_code == 0, result.output
        volumes[name] = json.loads(result.output)["gamut"]["gamut_volume"]
        text = runner.invoke(app, ["profiles", "show", name]).output
        assert f"gamut volume     {volumes[name]:,.0f} cubic CIELAB units" in text
    srgb = gamut_summary(read_profile(srgb_profile_bytes()))["gamut_volume"]
    assert srgb > volumes["coated"] > volumes["uncoated"] > volumes["newsprint"] > 0


def test_show_text_cmyk_lists_the_ink_limit() -> None:
    result = runner.invoke(app, ["profiles", "show", str(require_file(DEFAULT_CMYK))])
    assert result.exit_code == 0
    assert "total ink limit  300.4 %" in result.output
    assert "absolute (x media white)" in result.output


def _run(*args: str) -> subprocess.CompletedProcess:
    # The console script's entry point (pyproject: inkshift = "inkshift.cli:main") in a
    # fresh interpreter. -W ignore: colour-science, imported by other commands' modules,
    # warns on stderr that matplotlib is missing; that line is not the command's output.
    code = "import sys; from inkshift.cli import main; sys.argv[0] = 'inkshift'; main()"
    return subprocess.run([sys.executable, "-W", "ignore", "-c", code, *args],
                          capture_output=True, text=True, timeout=120)


@pytest.mark.parametrize("case", ["truncated", "absurd-clut", "unknown-name"])
def test_bad_profile_one_line_exit_2(tmp_path: Path, case: str) -> None:
    good = icc_bytes.cmyk_lut16_profile(3)
    target = tmp_path / f"{case}.icc"
    # Each run starts a Python process (about 2 s here); the other malformations are
    # covered in test_icc_read.py, and they all reach the user through the same path.
    if case == "truncated":
        target.write_bytes(good[:300])
    elif case == "absurd-clut":
        a2b = good.index(b"mft2")
        target.write_bytes(good[:a2b + 10] + bytes([255]) + good[a2b + 11:])
    spec = "no-such-profile-name" if case == "unknown-name" else str(target)
    result = _run("profiles", "show", spec)
    assert result.returncode == 2
    assert result.stdout == ""
    lines = result.stderr.splitlines()
    assert len(lines) == 1, result.stderr
    assert lines[0].startswith("inkshift: error: ") and spec in lines[0]
    assert "Traceback" not in result.stderr
