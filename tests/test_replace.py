"""Tests of the replacement palettes (inkshift.replace and ``inkshift replace``)."""

from __future__ import annotations

import json
import sys
from itertools import combinations
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

from inkshift.chart.palette import BLEND, label_blends
from inkshift.check import check, open_output_profile
from inkshift.errors import InputError
from inkshift.icc.cms import lab_profile, srgb_profile_bytes, transform_colors
from inkshift.icc.intent import Intent
from inkshift.proof import proof_colors, srgb_profile
from inkshift.replace import (
    CHROMA_WEIGHT,
    HUE_WEIGHT,
    LIGHTNESS_WEIGHT,
    OUTPUT_FILES,
    REPLACE_SCHEMA,
    _cost,
    candidate_grid,
    parse_hex,
    recolor_chart,
    replace_colors,
    suggest_replacements,
    write_replace_outputs,
)
from inkshift.report.model import hex_rgb
from inkshift.thresholds import OUT_OF_GAMUT_DELTA_E, Thresholds

SAMPLES = Path(__file__).resolve().parent.parent / "samples"
FERRY = SAMPLES / "ferry_ridership.png"


@pytest.fixture(scope="module")
def ferry():
    """One replacement run on the shipped sample chart (coated profile, defaults)."""
    return replace_colors(FERRY, "coated")


def _reference_de00(lab1, lab2):
    # Reference implementation: colour-science's CIEDE2000 (CIE 142-2001).
    import colour

    return colour.difference.delta_E_CIE2000(np.asarray(lab1), np.asarray(lab2))


def test_every_suggested_colour_is_in_gamut(ferry):
    hexes = [c.replacement_hex for c in ferry.colors if not c.locked]
    assert hexes
    rgb = np.array([hex_rgb(h) for h in hexes], np.uint8)
    output, _ = open_output_profile("coated")
    proof = proof_colors(rgb, srgb_profile(), output, Intent.RELATIVE, True, out_of_gamut_delta_e=OUT_OF_GAMUT_DELTA_E)
    # The check's own gamut rule, re-applied to the suggested hex codes.
    assert not proof.out_of_gamut.any(), dict(zip(hexes, proof.roundtrip_delta_e.round(2)))
    reported = np.array([c.replacement_print_lab for c in ferry.colors if not c.locked])
    np.testing.assert_allclose(proof.print_lab, reported, atol=1e-6)


def test_replacement_prints_agree_with_littlecms(ferry):
    # Reference: LittleCMS through Pillow, sRGB -> CMYK -> Lab without
    # optimisation; its 8-bit Lab is off by up to 0.82 ΔE00 (DESIGN.md), so
    # 1.5 ΔE00 allows that plus the 8-bit CMYK step.
    rgb = np.array([hex_rgb(c.replacement_hex) for c in ferry.colors], np.uint8)
    output, _ = open_output_profile("coated")
    cmyk = transform_colors(rgb, srgb_profile_bytes(), output, "RGB", "CMYK", Intent.RELATIVE, bpc=True)
    lab8 = transform_colors(cmyk, output, lab_profile(), "CMYK", "LAB", Intent.RELATIVE, optimise=False)
    lab = np.empty((len(rgb), 3))
    lab[:, 0] = lab8[:, 0].astype(np.float64) * 100.0 / 255.0
    lab[:, 1:] = lab8[:, 1:].view(np.int8).astype(np.float64)
    reported = np.array([c.replacement_print_lab for c in ferry.colors])
    assert np.max(_reference_de00(lab, reported)) < 1.5


def test_separations_are_never_worse_and_match_a_reference(ferry):
    b, a = ferry.before, ferry.after
    assert a.print_delta_e >= b.print_delta_e
    assert a.gray_delta_l >= b.gray_delta_l
    assert a.vision_delta_e >= b.vision_delta_e
    # Recompute the smallest print ΔE00 over the pairs distinct on screen with
    # colour-science's CIEDE2000.
    screen = np.array([c.screen_lab for c in ferry.check.colors])
    prints = np.array([c.replacement_print_lab for c in ferry.colors])
    pairs = [(i, j) for i, j in combinations(range(len(screen)), 2)
             if _reference_de00(screen[i], screen[j]) >= ferry.distinct]
    ref = min(float(_reference_de00(prints[i], prints[j])) for i, j in pairs)
    assert ref == pytest.approx(a.print_delta_e, abs=1e-3)
    gray = np.array([c.replacement_gray_l for c in ferry.colors])
    assert min(abs(gray[i] - gray[j]) for i, j in pairs) == pytest.approx(a.gray_delta_l, abs=1e-9)


def test_out_of_gamut_colours_are_replaced_and_background_kept(ferry):
    by_hex = {c.original_hex: c for c in ferry.colors}
    bg = [c for c in ferry.colors if c.background]
    assert len(bg) == 1 and bg[0].locked and not bg[0].changed
    for c in ferry.check.colors:
        if c.out_of_gamut and not c.background:
            r = by_hex[c.hex]
            assert r.changed and r.in_gamut and "out of gamut" in r.reasons


def test_locked_colours_are_kept_exactly(ferry):
    # Lock the largest mark colour the check finds out of gamut (a brand colour, say).
    green = next(c.hex for c in ferry.check.colors if c.out_of_gamut and not c.background)
    res = suggest_replacements(ferry.check, locks=[green.upper()])
    by_hex = {c.original_hex: c for c in res.colors}
    assert by_hex[green].replacement_hex == green and by_hex[green].locked
    assert not by_hex[green].in_gamut
    assert any("locked but out of gamut" in n for n in res.notes)
    assert res.after.print_delta_e >= res.before.print_delta_e
    assert res.after.gray_delta_l >= res.before.gray_delta_l
    assert all(not c.changed for c in res.colors if c.background)


def test_lock_not_in_the_chart_is_refused(ferry):
    with pytest.raises(InputError, match="#123456"):
        suggest_replacements(ferry.check, locks=["#123456"])


def test_preview_carries_the_replacements(ferry):
    preview = recolor_chart(ferry)
    src = np.asarray(Image.open(FERRY).convert("RGB"))
    assert preview.shape == src.shape and preview.dtype == np.uint8
    for c in ferry.colors:
        flat = np.all(src == hex_rgb(c.original_hex), axis=-1)
        assert flat.sum() > 0
        assert np.all(preview[flat] == hex_rgb(c.replacement_hex)), c.original_hex
    # Pixels that are neither a replaced colour nor a blend of one stay as they were.
    pal = label_blends(ferry.check.palette, ferry.check.unique.colors)
    changed = np.array([c.changed for c in ferry.colors])
    lab = pal.labels[ferry.check.unique.inverse].reshape(src.shape[:2])
    par = pal.parents[ferry.check.unique.inverse].reshape(*src.shape[:2], 2)
    touched = ((lab >= 0) & changed[np.maximum(lab, 0)]) | (
        (lab == BLEND) & (changed[np.maximum(par[..., 0], 0)] | changed[np.maximum(par[..., 1], 0)])
    )
    assert np.array_equal(preview[~touched], src[~touched])


def test_blend_is_the_same_mix_of_the_replaced_parents():
    # A two-colour chart with one column of exact 50/50 edge blends.
    a, b = np.array([0, 0, 255]), np.array([255, 255, 255])
    img = np.empty((60, 100, 3), np.uint8)
    img[:, :40] = a
    img[:, 40:] = b
    img[:, 40] = np.rint((a + b) / 2)

    rep = check(img, "coated", keep_maps=False)
    res = suggest_replacements(rep)
    new = {c.original_hex: hex_rgb(c.replacement_hex).astype(float) for c in res.colors}
    blue = new["#0000ff"]
    assert not np.array_equal(blue, a)  # pure blue is out of gamut on coated
    pal = label_blends(rep.palette, rep.unique.colors)
    k = rep.unique.inverse.reshape(60, 100)[0, 40]
    assert pal.labels[k] == BLEND
    m = pal.mix[k]
    p0, p1 = (rep.colors[i].hex for i in pal.parents[k])
    expected = m * new[p0] + (1 - m) * new[p1] + (img[0, 40] - (m * hex_rgb(p0) + (1 - m) * hex_rgb(p1)))
    preview = recolor_chart(res)
    np.testing.assert_array_equal(preview[:, 40], np.broadcast_to(np.clip(np.rint(expected), 0, 255), (60, 3)))


def test_a_palette_without_problems_stays():
    img = np.full((60, 120, 3), 255, np.uint8)
    img[10:50, 10:50] = 0x77
    img[10:50, 70:110] = 0xBB
    res = suggest_replacements(check(img, "coated", keep_maps=False))
    assert [c.changed for c in res.colors] == [False] * len(res.colors)
    assert all(c.reasons in (("fine as it is",), ("background, kept",)) for c in res.colors)
    assert res.before == res.after


def test_cost_decomposes_like_cie_15():
    # CIE 015:2018 8.2: ΔE*ab² = ΔL*² + ΔC*ab² + ΔH*ab², with ΔH*ab = 2 sqrt(C1 C2) sin(Δh/2).
    ref = np.array([50.0, 30.0, 0.0])
    assert _cost(np.array([57.0, 30.0, 0.0]), ref) == pytest.approx(7.0 * LIGHTNESS_WEIGHT)
    assert _cost(np.array([50.0, 37.0, 0.0]), ref) == pytest.approx(7.0 * CHROMA_WEIGHT)
    h = np.radians(20.0)
    rotated = np.array([50.0, 30.0 * np.cos(h), 30.0 * np.sin(h)])
    assert _cost(rotated, ref) == pytest.approx(HUE_WEIGHT * 2 * 30.0 * np.sin(h / 2))
    neutral = np.array([[50.0, 0.0, 0.0]])
    assert _cost(neutral, np.array([60.0, 0.0, 0.0]))[0] == pytest.approx(10.0 * LIGHTNESS_WEIGHT)


def test_parse_hex_and_grid():
    assert parse_hex("#0A0b0C").tolist() == [10, 11, 12]
    assert parse_hex("ff8c00").tolist() == [255, 140, 0]
    for bad in ("#12345", "12345g", "", "#1234567"):
        with pytest.raises(InputError):
            parse_hex(bad)
    g = candidate_grid(33)
    assert g.shape == (33**3, 3) and g.min() == 0 and g.max() == 255
    assert len(np.unique(g, axis=0)) == 33**3


def test_outputs_are_written(ferry, tmp_path):
    paths = write_replace_outputs(ferry, tmp_path / "out")
    assert {p.name for p in paths.values()} == set(OUTPUT_FILES.values())
    data = json.loads(paths["report"].read_text(encoding="utf-8"))
    assert data["schema"] == REPLACE_SCHEMA
    assert len(data["colors"]) == len(ferry.colors)
    for key in ("original", "replacement", "locked", "reasons", "print_delta_e"):
        assert key in data["colors"][0]
    for key in ("min_print_delta_e", "min_gray_delta_l", "min_vision_delta_e"):
        assert data["after"][key] >= data["before"][key]
    with Image.open(paths["preview"]) as im:
        assert im.size == (ferry.image.width, ferry.image.height)
    with Image.open(paths["swatches"]) as im:
        assert im.mode == "RGB"
    assert not list((tmp_path / "out").glob("*.part"))


def _main(monkeypatch, *args):
    from inkshift.cli import main

    monkeypatch.setattr(sys, "argv", ["inkshift", *args])
    with pytest.raises(SystemExit) as exc:
        main()
    return exc.value.code


def test_cli_bad_lock_exits_2_and_writes_nothing(monkeypatch, capsys, tmp_path):
    out = tmp_path / "out"
    code = _main(monkeypatch, "replace", str(FERRY), "--lock", "#12zz56", "--out", str(out))
    err = capsys.readouterr().err
    assert code == 2
    assert err.count("\n") == 1 and "#12zz56" in err
    assert not out.exists()


def test_cli_missing_image_exits_2(monkeypatch, capsys, tmp_path):
    code = _main(monkeypatch, "replace", str(tmp_path / "none.png"), "--out", str(tmp_path / "o"))
    assert code == 2 and "none.png" in capsys.readouterr().err
    assert not (tmp_path / "o").exists()


def test_thresholds_feed_the_targets():
    img = np.full((40, 80, 3), 255, np.uint8)
    img[5:35, 5:35] = (0, 0, 255)
    rep = check(img, "coated", thresholds=Thresholds(merge=7.0), keep_maps=False)
    res = suggest_replacements(rep, gray_target=12.0, vision_target=6.0)
    assert res.targets == {"print_delta_e": 7.0, "gray_delta_l": 12.0, "vision_delta_e": 6.0}


def test_cmyk_chart_gets_srgb_replacements():
    # A CMYK chart without a profile is taken to be in the output profile's CMYK;
    # the replacements are sRGB and the note says so.
    c = np.zeros((40, 60, 4), np.uint8)
    c[5:35, 5:25] = (255, 0, 0, 0)
    c[5:35, 30:55] = (0, 255, 255, 0)
    res = replace_colors(Image.fromarray(c, "CMYK"), "coated")
    assert any("not in sRGB" in n for n in res.notes)
    assert all(c.in_gamut for c in res.colors)
    assert recolor_chart(res).shape == (40, 60, 3)


def test_single_colour_has_no_pairs():
    res = replace_colors(np.full((20, 20, 3), (0, 0, 255), np.uint8), "coated", lock_background=False)
    (only,) = res.colors
    assert only.changed and only.in_gamut  # pure blue is out of gamut on coated
    assert res.before.print_delta_e is None and res.after.to_dict()["min_print_delta_e"] is None


def test_fare_mix_is_never_worse_and_printable():
    # The second shipped sample: 15 colours, where the gray target cannot be met.
    res = replace_colors(SAMPLES / "fare_mix.png", "coated")
    b, a = res.before, res.after
    assert a.print_delta_e >= b.print_delta_e
    assert a.gray_delta_l >= b.gray_delta_l
    assert a.vision_delta_e >= b.vision_delta_e
    assert all(c.in_gamut and c.replacement_shift <= Thresholds().shift for c in res.colors if c.changed)
    # No pair, distinct on screen or not, comes closer in print than it was (or the merge target).
    orig = np.array([c.original_print_lab for c in res.colors])
    new = np.array([c.replacement_print_lab for c in res.colors])
    i, j = np.triu_indices(len(orig), 1)
    floor = np.minimum(_reference_de00(orig[i], orig[j]), Thresholds().merge)
    assert np.all(_reference_de00(new[i], new[j]) >= floor - 1e-6)


def test_checking_the_recoloured_chart_flags_no_new_colour(ferry):
    # End to end: the preview, checked again on the same profile, finds every
    # replacement among its palette colours, none out of gamut, shifting or merging.
    rep = check(recolor_chart(ferry), "coated", keep_maps=False)
    found = {c.hex: c for c in rep.colors}
    new = {c.replacement_hex for c in ferry.colors if c.changed}
    assert new and new <= set(found)
    for h in new:
        assert found[h].verdicts == (), (h, found[h].verdicts)


def test_cli_writes_outputs_and_prints_json(monkeypatch, capsys, tmp_path):
    img = np.full((60, 100, 3), 255, np.uint8)
    img[10:50, 10:40] = (0, 0, 255)
    img[10:50, 60:90] = (40, 60, 255)
    src = tmp_path / "bars.png"
    Image.fromarray(img).save(src)
    out = tmp_path / "out"
    code = _main(monkeypatch, "replace", str(src), "--json", "--out", str(out), "--lock", "#2838FF")
    captured = capsys.readouterr()
    assert code in (0, None), captured.err
    data = json.loads(captured.out)
    assert data["schema"] == REPLACE_SCHEMA
    by_hex = {c["original"]: c for c in data["colors"]}
    assert by_hex["#283cff"]["locked"] and by_hex["#283cff"]["replacement"] == "#283cff"
    assert by_hex["#0000ff"]["changed"] and by_hex["#0000ff"]["replacement_in_gamut"]
    assert sorted(p.name for p in out.iterdir()) == sorted(OUTPUT_FILES.values())
