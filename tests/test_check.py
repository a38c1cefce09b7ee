"""End-to-end tests of the main job: `inkshift check` and `inkshift.check`.

References named beside the checks:
- colour-science (open reference library) for float colorimetry of RGB spaces;
- CSS Color Module Level 4, section 10.4 (display-p3: primaries, D65 white, sRGB transfer);
- IEC 61966-2-1 (sRGB transfer function);
- facts of the trade: sRGB display primaries lie outside offset CMYK gamuts.
"""

from __future__ import annotations

import json
import os
import struct
import subprocess
import sys
import zlib
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

import colour
from inkshift.chart.unique import expand
from inkshift.check import check, open_output_profile, weighted_percentile
from inkshift.color.convert import D50_XYZ, xyz_to_lab
from inkshift.color.difference import delta_e_2000
from inkshift.proof import proof_colors, srgb_profile
from inkshift.thresholds import Thresholds

from icc_bytes import para, profile_bytes, xyz_tag, mluc_tag

REPO = Path(__file__).resolve().parents[1]


def _blocks(colors: list[tuple[int, int, int]], size: int = 40, background=(255, 255, 255)) -> np.ndarray:
    """A chart-like image: flat blocks of each colour on a background."""
    img = np.empty((size * 2, size * (2 * len(colors) + 1), 3), np.uint8)
    img[:] = background
    for k, c in enumerate(colors):
        img[size // 2 : size // 2 + size, size * (2 * k + 1) : size * (2 * k + 2)] = c
    return img


def _color(report, hex_):
    return next(c for c in report.colors if c.hex == hex_)


def test_unique_colour_path_equals_brute_force():
    # Brute force: every pixel proofed on its own. The per-colour path must
    # give the same per-pixel ΔE00 (max abs difference < 1e-6).
    rng = np.random.default_rng(11)
    flat = rng.integers(0, 256, size=(8, 3), dtype=np.uint8)
    img = flat[rng.integers(0, 8, size=(36, 44))]
    noisy = rng.random((36, 44)) < 0.4
    img[noisy] = rng.integers(0, 256, size=(int(noisy.sum()), 3), dtype=np.uint8)
    report = check(img, "coated")
    output, _ = open_output_profile("coated")
    brute = proof_colors(img.reshape(-1, 3), srgb_profile(), output).delta_e.reshape(36, 44)
    per_pixel = expand(report.proof.delta_e, report.unique.inverse, img.shape[:2])
    assert np.abs(per_pixel - brute).max() < 1e-6
    # The stored map is float32: equal within float32 rounding.
    assert np.allclose(report.maps.delta_e, brute, rtol=1e-6, atol=1e-5)
    # Summary statistics are pixel-weighted.
    assert report.summary.delta_e_mean == pytest.approx(brute.mean(), abs=1e-9)
    assert report.summary.delta_e_max == pytest.approx(brute.max(), abs=1e-9)


def test_primaries_out_of_gamut_and_gray_in_gamut_on_coated():
    # Fact of the trade: sRGB blue and green lie outside offset CMYK gamuts;
    # a neutral mid gray lies inside.
    report = check(_blocks([(0, 0, 255), (0, 255, 0), (128, 128, 128)]), "coated")
    assert _color(report, "#0000ff").out_of_gamut
    assert _color(report, "#00ff00").out_of_gamut
    assert not _color(report, "#808080").out_of_gamut
    assert "out of gamut" in _color(report, "#0000ff").verdicts
    assert report.summary.out_of_gamut_share > 0


def test_constructed_blues_that_clip_together_are_a_merge():
    # Two out-of-gamut blues, clearly apart on screen, that the coated profile
    # separates to nearly the same ink mix (constructed by searching the sRGB
    # cube with this project's proof; a regression guard, not an outside fact).
    a, b = (90, 120, 255), (120, 120, 210)
    report = check(_blocks([a, b]), "coated")
    ca, cb = _color(report, "#5a78ff"), _color(report, "#7878d2")
    assert ca.out_of_gamut and cb.out_of_gamut
    inks = np.array(list(ca.ink.values())) - np.array(list(cb.ink.values()))
    assert np.abs(inks).max() < 6.0  # percent: nearly the same ink mix
    pairs = {(m.a, m.b) for m in report.merges} | {(m.b, m.a) for m in report.merges}
    assert ("#5a78ff", "#7878d2") in pairs
    m = report.merges[0]
    assert m.screen_delta_e >= Thresholds().distinct and m.print_delta_e < Thresholds().merge


def _p3_profile() -> bytes:
    # display-p3 per CSS Color 4, 10.4: primaries R (0.680, 0.320), G (0.265, 0.690),
    # B (0.150, 0.060), white D65, sRGB transfer function (IEC 61966-2-1) as ICC
    # parametric curve type 3. Colorants adapted to the PCS D50 with Bradford.
    space = colour.RGB_COLOURSPACES["Display P3"]
    d65 = colour.xy_to_XYZ(space.whitepoint)
    cat = colour.adaptation.matrix_chromatic_adaptation_VonKries(d65, D50_XYZ, "Bradford")
    colorants = cat @ space.matrix_RGB_to_XYZ
    srgb_curve = para(3, [2.4, 1 / 1.055, 0.055 / 1.055, 1 / 12.92, 0.04045])
    tags = {
        "desc": mluc_tag("display-p3 (test, CSS Color 4 primaries)"),
        "wtpt": xyz_tag(D50_XYZ),
        "rXYZ": xyz_tag(colorants[:, 0]),
        "gXYZ": xyz_tag(colorants[:, 1]),
        "bXYZ": xyz_tag(colorants[:, 2]),
        "rTRC": srgb_curve,
        "gTRC": srgb_curve,
        "bTRC": srgb_curve,
    }
    return profile_bytes(tags, device_class=b"mntr", space=b"RGB ", pcs=b"XYZ ")


def test_embedded_wide_gamut_profile_is_honoured(tmp_path):
    colors = [(250, 30, 20), (20, 200, 60), (30, 60, 230), (200, 180, 40), (120, 120, 120)]
    path = tmp_path / "p3_chart.png"
    Image.fromarray(_blocks(colors)).save(path, icc_profile=_p3_profile())
    report = check(path, "coated")
    assert not report.image.profile_assumed
    # Reference: colour-science's float conversion of display-p3 to XYZ,
    # Bradford-adapted to the ICC D50 white, then CIELAB.
    space = colour.RGB_COLOURSPACES["Display P3"]
    rgb = np.array(colors) / 255.0
    xyz = colour.RGB_to_XYZ(rgb, space, illuminant=colour.XYZ_to_xy(D50_XYZ), chromatic_adaptation_transform="Bradford", apply_cctf_decoding=True)
    ref = xyz_to_lab(xyz)
    # The palette colours' screen Lab as the report gives it (the palette keeps
    # the colours as stored, in the image's own space).
    drawn = [tuple(int(v) for v in col) for col in report.palette.colors]
    for c, want in zip(colors, ref):
        assert float(delta_e_2000(report.colors[drawn.index(c)].screen_lab, want)) < 0.1
    # The screen colours differ from an sRGB reading of the same numbers.
    srgb = check(Image.fromarray(_blocks(colors)), "coated")
    srgb_drawn = [tuple(int(v) for v in col) for col in srgb.palette.colors]
    p3_lab = np.array([report.colors[drawn.index(c)].screen_lab for c in colors])
    srgb_lab = np.array([srgb.colors[srgb_drawn.index(c)].screen_lab for c in colors])
    assert not np.allclose(srgb_lab, p3_lab, atol=1.0)


def test_api_accepts_path_pil_and_array(tmp_path):
    img = _blocks([(200, 40, 40), (40, 40, 200)])
    path = tmp_path / "chart.png"
    Image.fromarray(img).save(path)
    a = check(path)
    b = check(Image.open(path))
    c = check(img)
    assert a.to_dict()["colors"] == b.to_dict()["colors"] == c.to_dict()["colors"]
    assert a.summary == b.summary == c.summary


def test_transparent_areas_become_white():
    rgba = np.zeros((30, 30, 4), np.uint8)
    rgba[..., :3] = (10, 90, 160)
    rgba[10:20, 10:20, 3] = 255  # opaque square, rest fully transparent
    report = check(rgba)
    hexes = {c.hex for c in report.colors}
    assert "#ffffff" in hexes and "#0a5aa0" in hexes
    assert any("Transparent" in n for n in report.image.notes)


def test_cmyk_image_is_proofed_as_it_stands(tmp_path):
    cmyk = np.zeros((20, 40, 4), np.uint8)
    cmyk[:, 20:] = (255, 0, 0, 0)
    path = tmp_path / "inks.tif"
    Image.fromarray(cmyk, mode="CMYK").save(path)
    report = check(path, "coated")
    assert report.summary.delta_e_max < 1e-6  # no separation: screen and print are one
    assert report.extra["ink_coverage"]["max"] == pytest.approx(100.0)
    cyan = next(c for c in report.colors if c.ink["c"] > 99)
    assert cyan.coverage == pytest.approx(100.0)


def run_cli(*args: str, cwd: Path | None = None) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "inkshift", *args], capture_output=True, text=True, cwd=cwd)


def test_cli_writes_outputs_and_json(tmp_path):
    src = tmp_path / "chart.png"
    Image.fromarray(_blocks([(0, 0, 255), (255, 140, 0)])).save(src)
    res = run_cli("check", str(src), "--json")
    assert res.returncode == 0, res.stderr
    data = json.loads(res.stdout)
    out = tmp_path / "chart"
    for name in ("heatmap.png", "print.png", "side_by_side.png", "report.json"):
        assert (out / name).is_file()
    assert data["schema"] == "inkshift.check/1"
    for key in ("image", "output_profile", "intent", "bpc", "summary", "colors", "merges", "cautions"):
        assert key in data
    for key in ("path", "width", "height", "source_profile", "profile_assumed"):
        assert key in data["image"]
    for key in ("delta_e_mean", "delta_e_p95", "delta_e_max", "out_of_gamut_share"):
        assert key in data["summary"]
    for key in ("hex", "share", "screen_lab", "print_lab", "delta_e", "out_of_gamut", "cmyk", "print_hex"):
        assert key in data["colors"][0]
    assert json.loads((out / "report.json").read_text())["colors"] == data["colors"]
    with Image.open(out / "print.png") as im:
        assert im.size == (src_size := Image.open(src).size) and im.info.get("icc_profile")
    with Image.open(out / "heatmap.png") as im:
        assert im.size[0] >= src_size[0] and im.size[1] > src_size[1]  # legend below


def test_cli_gates(tmp_path):
    src = tmp_path / "blues.png"
    Image.fromarray(_blocks([(90, 120, 255), (120, 120, 210)])).save(src)
    assert run_cli("check", str(src), "--out", str(tmp_path / "a")).returncode == 0
    assert run_cli("check", str(src), "--out", str(tmp_path / "b"), "--fail-on-merge").returncode == 1
    assert run_cli("check", str(src), "--out", str(tmp_path / "c"), "--fail-over", "0.5").returncode == 1
    assert run_cli("check", str(src), "--out", str(tmp_path / "d"), "--fail-over", "80").returncode == 0


def _huge_png(path: Path) -> None:
    # A valid PNG signature and IHDR declaring 200000 x 200000 pixels, no real data.
    def chunk(kind: bytes, data: bytes) -> bytes:
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data))
    ihdr = struct.pack(">IIBBBBB", 200000, 200000, 8, 2, 0, 0, 0)
    path.write_bytes(b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr) + chunk(b"IDAT", zlib.compress(b"\0" * 10)) + chunk(b"IEND", b""))


@pytest.mark.parametrize("case", [
    "empty", "truncated", "text", "display_profile", "missing", "unwritable_out", "huge", "bad_intent",
])
def test_bad_input_gives_one_line_and_exit_2(tmp_path, case):
    good = tmp_path / "good.png"
    Image.fromarray(_blocks([(0, 0, 255)])).save(good)
    args: list[str]
    out = tmp_path / "out"
    if case == "empty":
        (tmp_path / "empty.png").write_bytes(b"")
        args = ["check", str(tmp_path / "empty.png"), "--out", str(out)]
    elif case == "truncated":
        data = good.read_bytes()
        (tmp_path / "cut.png").write_bytes(data[: len(data) // 2])
        args = ["check", str(tmp_path / "cut.png"), "--out", str(out)]
    elif case == "text":
        (tmp_path / "notes.png").write_text("this is not an image\n")
        args = ["check", str(tmp_path / "notes.png"), "--out", str(out)]
    elif case == "display_profile":
        from inkshift.icc.cms import srgb_profile_bytes
        (tmp_path / "display.icc").write_bytes(srgb_profile_bytes())
        args = ["check", str(good), "--profile", str(tmp_path / "display.icc"), "--out", str(out)]
    elif case == "missing":
        args = ["check", str(tmp_path / "nowhere.png"), "--out", str(out)]
    elif case == "unwritable_out":
        blocker = tmp_path / "file"
        blocker.write_text("x")
        out = blocker / "sub"  # a folder below a regular file cannot be created, even by root
        args = ["check", str(good), "--out", str(out)]
    elif case == "huge":
        _huge_png(tmp_path / "huge.png")
        args = ["check", str(tmp_path / "huge.png"), "--out", str(out)]
    else:
        args = ["check", str(good), "--intent", "vivid", "--out", str(out)]
    before = sorted(p.name for p in tmp_path.rglob("*"))
    res = run_cli(*args)
    assert res.returncode == 2, (res.stdout, res.stderr)
    assert "Traceback" not in res.stderr
    assert len(res.stderr.strip().splitlines()) == 1, res.stderr
    assert sorted(p.name for p in tmp_path.rglob("*")) == before  # nothing written


@pytest.mark.parametrize("seed", range(6))
def test_weighted_percentile_equals_numpy_on_expanded_pixels(seed):
    # Reference: numpy.percentile with method="inverted_cdf" (the smallest value
    # whose cumulative share reaches the percentile, Hyndman & Fan 1996
    # definition 1) over the per-colour values repeated by their pixel counts.
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 400))
    values = np.round(rng.gamma(2.0, 2.0, n), int(rng.integers(0, 4)))  # rounding makes ties
    counts = rng.integers(1, 60, n)
    pixels = np.repeat(values, counts)
    for share in (0.0, 0.25, 0.5, 0.95, 0.999, 1.0):
        want = np.percentile(pixels, 100 * share, method="inverted_cdf")
        assert weighted_percentile(values, counts, share) == want
