"""Tests of the picture outputs: heat-map overlay, scalar map, side by side, swatch sheet.

References used below:
- colour-science 0.4.7 (sRGB IEC 61966-2-1 decoding, CIE XYZ -> CIELAB) as the
  independent colorimetry for the gray base;
- :func:`inkshift.color.scale.heat_colors` itself as the reference for painted colours
  (the picture must show exactly the scale the legend shows).
"""

from __future__ import annotations

import colour
import numpy as np
import pytest
from PIL import Image, ImageFont

from inkshift.color.scale import heat_colors
from inkshift.errors import InputError
from inkshift.report import heatmap as hm
from inkshift.report.images import Swatch, heatmap_overlay, scalar_map, side_by_side, swatch_sheet
from inkshift.report.sheets import font_size_for_width, plain_text


def _lab_of_srgb(rgb_u8: np.ndarray) -> np.ndarray:
    """CIELAB (D65 white) of 8-bit sRGB by colour-science (IEC 61966-2-1 + CIE 015)."""
    xyz = colour.sRGB_to_XYZ(np.asarray(rgb_u8, float) / 255.0)
    white = colour.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D65"]
    return colour.XYZ_to_Lab(xyz, white)


def _chart(h: int = 120, w: int = 160, seed: int = 3) -> np.ndarray:
    """A small chart-like image: white ground, coloured blocks, dark text-like lines."""
    rng = np.random.default_rng(seed)
    img = np.full((h, w, 3), 255, np.uint8)
    for k in range(6):
        y0, x0 = rng.integers(0, h - 10), rng.integers(0, w - 10)
        img[y0 : y0 + 20, x0 : x0 + 30] = rng.integers(0, 256, 3, dtype=np.uint8)
    img[::9, :] = 30
    return img


def _legend_height(width: int, **kw) -> int:
    return hm.legend_strip(width, vmax=kw.pop("vmax", hm.HEATMAP_VMAX_DEFAULT), title="t", quantity="q",
                           hatch=kw.pop("hatch", None), **kw).height


# ---------------------------------------------------------------- heat map: sizes


@pytest.mark.parametrize("h,w", [(1, 1), (2, 3), (3, 2), (7, 300), (300, 7), (90, 700)])
def test_heatmap_size_mode_and_legend_below(h: int, w: int) -> None:
    rgb = np.full((h, w, 3), 200, np.uint8)
    de = np.zeros((h, w), np.float32)
    img = heatmap_overlay(rgb, de, np.zeros((h, w), bool))
    assert img.mode == "RGB"
    width = max(w, hm.LEGEND_MIN_WIDTH)
    page = int(hm.faded_gray(np.array([255, 255, 255], np.uint8)))
    legend = hm.legend_strip(width, vmax=hm.HEATMAP_VMAX_DEFAULT, title=hm.HEATMAP_TITLE,
                             quantity=hm.HEATMAP_QUANTITY, hatch=hm.hatch_style_for_width(w), over_gray=page)
    assert img.size == (width, h + legend.height)
    assert legend.height > 0
    # The legend is what lies under the chart, pixel for pixel.
    assert np.array_equal(np.asarray(img)[h:], np.asarray(legend))


def test_all_zero_delta_e_gives_plain_gray_chart() -> None:
    rgb = _chart()
    img = np.asarray(heatmap_overlay(rgb, np.zeros(rgb.shape[:2], np.float32), np.zeros(rgb.shape[:2], bool)))
    chart = img[: rgb.shape[0], : rgb.shape[1]]
    assert np.all(chart[..., 0] == chart[..., 1]) and np.all(chart[..., 1] == chart[..., 2])


def test_gray_base_is_neutral_with_faded_cie_lightness() -> None:
    # Reference: colour-science sRGB -> XYZ -> CIELAB. A neutral sRGB gray has
    # a* = b* = 0 (D65 white); the base L* is the screen L* mapped into GRAY_BASE_L_RANGE.
    rng = np.random.default_rng(7)
    rgb = rng.integers(0, 256, (40, 50, 3), dtype=np.uint8)
    rgb[0, 0] = (0, 0, 0)
    rgb[0, 1] = (255, 255, 255)
    img = np.asarray(heatmap_overlay(rgb, np.zeros((40, 50), np.float32), np.zeros((40, 50), bool)))[:40, :50]
    lab_out = _lab_of_srgb(img.reshape(-1, 3))
    assert np.abs(lab_out[:, 1:]).max() < 0.01
    lo, hi = hm.GRAY_BASE_L_RANGE
    expected = lo + (hi - lo) * _lab_of_srgb(rgb.reshape(-1, 3))[:, 0] / 100.0
    # 8-bit gray quantisation: half a code is at most 0.25 L* in this light band.
    assert np.abs(lab_out[:, 0] - expected).max() < 0.3
    assert abs(lab_out[0, 0] - lo) < 0.3 and abs(lab_out[1, 0] - hi) < 0.3


# ---------------------------------------------------------------- heat map: colours


def test_page_lightness_sits_between_the_ends_of_the_heat_scale() -> None:
    # Design intent of GRAY_BASE_L_RANGE: the largest shifts (light end of the scale)
    # and the smallest painted ones (dark end) both differ from a white page by at
    # least 10 CIE L* (colour-science), so both read in a grayscale print.
    vmax = hm.HEATMAP_VMAX_DEFAULT
    page = hm.faded_gray(np.array([[255, 255, 255]], np.uint8))[0]
    l_page = _lab_of_srgb(np.array([page, page, page]))[0]
    ends = heat_colors(np.array([hm.HEAT_OPAQUE_DELTA_E, vmax]), vmax)
    l_low, l_top = _lab_of_srgb(ends)[:, 0]
    assert l_page - l_low >= 10.0 and l_top - l_page >= 10.0




def test_heat_colours_where_delta_e_is_high_and_gray_below_floor() -> None:
    h, w = 60, 80
    rgb = np.full((h, w, 3), 255, np.uint8)
    rgb[:, :40] = (20, 90, 200)
    de = np.zeros((h, w), np.float32)
    de[:20] = 15.0
    de[20:40] = 0.9 * hm.HEAT_FLOOR_DELTA_E
    de[40:] = 50.0  # above vmax: top colour
    img = np.asarray(heatmap_overlay(rgb, de, np.zeros((h, w), bool)))[:h, :w].astype(int)
    vmax = hm.HEATMAP_VMAX_DEFAULT
    top = heat_colors(np.array([15.0, vmax]), vmax).astype(int)
    # Reference: heat_colors itself; the look-up table steps vmax/4095 allow one code.
    assert np.abs(img[:20] - top[0]).max() <= 1
    assert np.abs(img[40:] - top[1]).max() <= 1
    below = img[20:40]
    assert np.all(below[..., 0] == below[..., 1]) and np.all(below[..., 1] == below[..., 2])
    base = hm.faded_gray(rgb[20:40]).astype(int)
    assert np.array_equal(below[..., 0], base)


def test_alpha_ramp_blends_between_floor_and_opaque() -> None:
    mid = 0.5 * (hm.HEAT_FLOOR_DELTA_E + hm.HEAT_OPAQUE_DELTA_E)
    assert hm.heat_alpha(np.array([0.0, hm.HEAT_FLOOR_DELTA_E, mid, hm.HEAT_OPAQUE_DELTA_E, 40.0])).tolist() == [
        0.0, 0.0, 0.5, 1.0, 1.0,
    ]
    rgb = np.full((4, 4, 3), 128, np.uint8)
    de = np.full((4, 4), mid, np.float32)
    img = np.asarray(heatmap_overlay(rgb, de, np.zeros((4, 4), bool)))[:4, :4].astype(float)
    base = float(hm.faded_gray(rgb[:1, :1])[0, 0])
    heat = heat_colors(np.array([mid]), hm.HEATMAP_VMAX_DEFAULT)[0].astype(float)
    assert np.abs(img - (base + 0.5 * (heat - base))).max() <= 1.0


def test_nan_and_infinite_delta_e_do_not_raise() -> None:
    de = np.array([[np.nan, np.inf], [-np.inf, 3.0]], np.float32)
    img = np.asarray(heatmap_overlay(np.full((2, 2, 3), 90, np.uint8), de, np.zeros((2, 2), bool)))[:2, :2]
    top = heat_colors(np.array([hm.HEATMAP_VMAX_DEFAULT]), hm.HEATMAP_VMAX_DEFAULT)[0].astype(int)
    assert np.abs(img[0, 1].astype(int) - top).max() <= 1  # +inf clamps to the top colour
    assert img[0, 0, 0] == img[0, 0, 1] == img[0, 0, 2]  # NaN: nothing painted


def test_band_processing_matches_single_band(monkeypatch: pytest.MonkeyPatch) -> None:
    rgb = _chart(50, 70)
    rng = np.random.default_rng(1)
    de = rng.uniform(0, 25, (50, 70)).astype(np.float32)
    oog = rng.random((50, 70)) < 0.3
    whole = np.asarray(heatmap_overlay(rgb, de, oog))
    monkeypatch.setattr(hm, "STRIP_PIXELS", 70 * 3 + 5)  # bands of 3 rows
    assert np.array_equal(np.asarray(heatmap_overlay(rgb, de, oog)), whole)


# ---------------------------------------------------------------- heat map: hatching


def test_hatch_only_on_out_of_gamut_pixels_and_visible_in_grayscale() -> None:
    h, w = 120, 160
    rgb = _chart(h, w)
    de = np.full((h, w), 12.0, np.float32)
    oog = np.zeros((h, w), bool)
    oog[30:90, 40:120] = True
    plain = np.asarray(heatmap_overlay(rgb, de, np.zeros_like(oog)))[:h, :w]
    marked = np.asarray(heatmap_overlay(rgb, de, oog))[:h, :w]
    changed = np.any(plain != marked, axis=2)
    assert not changed[~oog].any()
    assert changed[oog].mean() > 0.2
    # Survives grayscale: CIE L* (colour-science) inside the marked region spans dark
    # and light lines, while the same heat colour unmarked is one flat lightness.
    l_marked = _lab_of_srgb(marked[oog])[:, 0]
    l_plain = _lab_of_srgb(plain[oog])[:, 0]
    assert l_plain.std() < 0.01
    assert l_marked.std() > 15.0
    assert l_marked.min() < 5.0 and l_marked.max() > 95.0
    # Also after Pillow's own grayscale conversion (ITU-R 601 luma), as an office printer would.
    gray = np.asarray(Image.fromarray(marked).convert("L"))[oog].astype(float)
    assert gray.std() > 40.0


def test_hatch_pattern_is_diagonal_with_the_stated_period() -> None:
    style = hm.HatchStyle(period=10, thickness=2)
    dark, light = style.masks(0, 20, 20)
    assert dark[0, 0] and dark[0, 1] and not dark[0, 2] and dark[0, 10]
    assert light[0, 5] and light[0, 6] and not light[0, 7]
    assert np.array_equal(dark[1:, :-1], dark[:-1, 1:])  # constant along x + y
    assert not (dark & light).any()
    assert hm.hatch_style_for_width(6000).period > hm.hatch_style_for_width(600).period


# ---------------------------------------------------------------- legend


def test_legend_scales_with_width_and_shows_the_scale_and_hatch() -> None:
    small, large = _legend_height(600), _legend_height(6000)
    assert font_size_for_width(600) >= 12
    assert 6 < large / small < 12  # type and bar grow with the width
    vmax = 10.0
    hatch = hm.HatchStyle(12, 3)
    strip = np.asarray(hm.legend_strip(600, vmax=vmax, title="t", quantity="dE00", hatch=hatch))
    colours = {tuple(c) for c in strip.reshape(-1, 3)}
    # Both ends of the bar show the scale's end colours; the outline takes the outer
    # columns, so allow the change of a few bar pixels (a bar >= 300 px spans the scale).
    ends = heat_colors(np.array([0.0, vmax]), vmax).astype(int)
    found = np.array(sorted(colours), int)
    assert np.abs(found - ends[0]).max(axis=1).min() <= 4
    assert np.abs(found - ends[1]).max(axis=1).min() <= 4
    assert (0, 0, 0) in colours and (255, 255, 255) in colours  # hatch sample


def test_heatmap_legend_bar_fades_in_like_the_map() -> None:
    # The bar of the heat-map legend starts as the bare page gray (below the floor
    # nothing is painted) and ends in the scale's top colour (reference: heat_colors).
    vmax = 10.0
    page = 200
    strip = np.asarray(hm.legend_strip(600, vmax=vmax, title="t", quantity="q", over_gray=page)).astype(int)
    found = strip.reshape(-1, 3)
    assert np.abs(found - page).max(axis=1).min() == 0
    top = heat_colors(np.array([vmax]), vmax).astype(int)[0]
    assert np.abs(found - top).max(axis=1).min() <= 4
    bottom = heat_colors(np.array([0.0]), vmax).astype(int)[0]
    assert np.abs(found - bottom).max(axis=1).min() > 4  # the unpainted start is not shown


def test_tick_values_drop_values_beyond_the_top_and_end_at_vmax() -> None:
    assert hm._tick_values(10.0, [0, 1, 2, 5, 10, 20]) == [0.0, 1.0, 2.0, 5.0, 10.0]
    assert hm._tick_values(7.5, [0, 5, 20]) == [0.0, 5.0, 7.5]
    assert hm._tick_values(4.0, []) == [4.0]


def test_legend_text_is_in_the_bundled_font() -> None:
    # A glyph missing from the face renders as its .notdef box; compare masks.
    font = ImageFont.load_default(size=40)
    notdef = bytes(font.getmask("\ue000"))
    texts = [hm.HEATMAP_TITLE, hm.HEATMAP_QUANTITY, hm.OUT_OF_GAMUT_LABEL, ">=20", "0123456789.",
             "On screen", "In print (simulated)", Swatch([0, 0, 0], [0, 0, 0], "x", 1.0, ("OUT",)).text_lines()[-2]]
    for ch in set("".join(texts)) - {" "}:
        assert bytes(font.getmask(ch)) != notdef, ch


def test_text_the_face_cannot_draw_is_replaced() -> None:
    assert plain_text("ΔE00 ≥ 5 – a×b → ok") == "dE00 >= 5 - axb -> ok"
    assert plain_text("Café") == "Cafe"
    assert plain_text("\u4e2d") == "?"
    font = ImageFont.load_default(size=40)
    notdef = bytes(font.getmask("\ue000"))
    for ch in set(plain_text("ΔE00 between prints, Zürich ≈ 3½ €")) - {" "}:
        assert bytes(font.getmask(ch)) != notdef, ch


def test_bad_inputs_raise_input_error() -> None:
    rgb = np.zeros((4, 5, 3), np.uint8)
    ok_de, ok_oog = np.zeros((4, 5), np.float32), np.zeros((4, 5), bool)
    with pytest.raises(InputError, match="delta_e"):
        heatmap_overlay(rgb, np.zeros((5, 4)), ok_oog)
    with pytest.raises(InputError, match="out_of_gamut"):
        heatmap_overlay(rgb, ok_de, np.zeros((4,), bool))
    with pytest.raises(InputError, match="uint8"):
        heatmap_overlay(rgb.astype(float), ok_de, ok_oog)
    with pytest.raises(InputError, match="at least 2"):
        heatmap_overlay(rgb, ok_de, ok_oog, vmax=hm.HEAT_OPAQUE_DELTA_E / 2)
    with pytest.raises(InputError, match="not a number"):
        heatmap_overlay(rgb, ok_de, ok_oog, vmax="many")
    with pytest.raises(InputError, match="tick"):
        heatmap_overlay(rgb, ok_de, ok_oog, ticks=["a", 2])
    with pytest.raises(InputError, match="above 0"):
        scalar_map(np.zeros((3, 3)), vmax=0, title="t", legend_label="q")
    with pytest.raises(InputError, match="width"):
        hm.legend_strip(100, vmax=5, title="t", quantity="q")
    with pytest.raises(InputError):
        heatmap_overlay(np.zeros((0, 5, 3), np.uint8), np.zeros((0, 5)), np.zeros((0, 5), bool))
    with pytest.raises(InputError):
        scalar_map(np.zeros((3, 3, 3)), vmax=1, title="t", legend_label="q")


# ---------------------------------------------------------------- scalar map


def test_scalar_map_paints_heat_colours_with_the_same_legend() -> None:
    vmax = 8.0
    values = np.linspace(0, 12, 30 * 20).reshape(30, 20)
    img = scalar_map(values, vmax=vmax, title="Where two prints differ", legend_label="dE00")
    width = hm.LEGEND_MIN_WIDTH
    legend = hm.legend_strip(width, vmax=vmax, title="Where two prints differ", quantity="dE00")
    assert img.size == (width, 30 + legend.height)
    arr = np.asarray(img)
    assert np.array_equal(arr[30:], np.asarray(legend))
    assert np.abs(arr[:30, :20].astype(int) - heat_colors(values, vmax).astype(int)).max() <= 1
    tiny = scalar_map(np.zeros((1, 1)), vmax=1.0, title="t", legend_label="q")
    assert tiny.size[1] > 1
    # Default top of the scale, and a quantity name with signs the face lacks.
    default = scalar_map(values, title="t", legend_label="ΔE00 between the two prints")
    assert np.abs(np.asarray(default)[:30, :20].astype(int)
                  - heat_colors(values, hm.HEATMAP_VMAX_DEFAULT).astype(int)).max() <= 1


# ---------------------------------------------------------------- swatches


def _swatches(n: int) -> list[Swatch]:
    rng = np.random.default_rng(n)
    return [
        Swatch(rng.integers(0, 256, 3).astype(np.uint8), rng.integers(0, 256, 3).astype(np.uint8),
               f"#{i:06X}", float(rng.uniform(0, 30)), ("OUT",) if i % 3 == 0 else ())
        for i in range(n)
    ]


def _has_colour(img: Image.Image, rgb: np.ndarray) -> bool:
    return bool(np.all(np.asarray(img) == np.asarray(rgb, np.uint8), axis=2).any())


def test_swatch_text_and_validation() -> None:
    a = Swatch([1, 2, 3], [1, 2, 3], "x", 1.0)
    assert a == a and a != Swatch([1, 2, 3], [1, 2, 3], "x", 1.0)  # identity, no array truth-value error
    sw = Swatch(np.array([255, 0, 16], np.uint8), [250, 10, 20], "brand red", 4.26, ("OUT", "MERGE"))
    assert sw.text_lines() == ["brand red", "#FF0010", "dE00 4.3", "OUT MERGE"]
    assert Swatch([1, 2, 3], [1, 2, 3], "#010203", float("nan")).text_lines() == ["#010203", "dE00 n/a"]
    with pytest.raises(InputError, match="screen_rgb"):
        Swatch([1, 2], [1, 2, 3], "x", 1.0)
    with pytest.raises(InputError, match="print_rgb"):
        Swatch([1, 2, 3], [1, 2, 300], "x", 1.0)


def test_side_by_side_fits_width_and_shows_swatch_colours() -> None:
    rgb = np.zeros((500, 3000, 3), np.uint8)
    rgb[:, 1500:] = 255
    sws = _swatches(5)
    img = side_by_side(rgb, rgb[:, ::-1].copy(), sws, max_width=1200)
    assert img.mode == "RGB" and img.width <= 1200
    for s in sws:
        assert _has_colour(img, s.screen_rgb) and _has_colour(img, s.print_rgb)
    # Without swatches the picture is shorter; more swatches wrap to more rows.
    assert side_by_side(rgb, rgb, [], max_width=1200).height < img.height
    assert side_by_side(rgb, rgb, _swatches(40), max_width=1200).height > img.height


@pytest.mark.parametrize("h,w", [(1, 1), (3, 2), (2, 3), (10, 900), (900, 10)])
def test_side_by_side_tiny_and_non_square(h: int, w: int) -> None:
    rgb = np.full((h, w, 3), 40, np.uint8)
    img = side_by_side(rgb, rgb, _swatches(2))
    assert img.width <= 2400 and img.height < 4000
    assert _has_colour(img, np.array([40, 40, 40]))


def test_side_by_side_rejects_mismatched_images() -> None:
    with pytest.raises(InputError, match="differ"):
        side_by_side(np.zeros((4, 4, 3), np.uint8), np.zeros((4, 5, 3), np.uint8), [])


def test_swatch_sheet_rows() -> None:
    orig, repl = _swatches(4), _swatches(6)
    one = swatch_sheet([("original", orig)])
    two = swatch_sheet([("original", orig), ("replacement", repl)])
    assert two.mode == "RGB" and two.height > one.height and two.width <= 2400
    for s in orig + repl:
        assert _has_colour(two, s.screen_rgb) and _has_colour(two, s.print_rgb)
    assert swatch_sheet([("empty", [])]).height > 0
    with pytest.raises(InputError):
        swatch_sheet([])
