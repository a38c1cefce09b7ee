"""Palette extraction on generated charts with a known palette.

References: screen colour by colour-science (IEC 61966-2-1 sRGB, Bradford
adaptation to the ICC D50 white, CIE 1976 L*a*b*); colour differences by
colour-science's CIE 2000 implementation (CIE 142-2001); JPEG encoding by
Pillow's libjpeg. The charts are drawn at 4x and reduced by 4 x 4 box
averaging, so every edge pixel is an area-weighted blend of the colours it
covers.
"""

from __future__ import annotations

import io
from pathlib import Path

import colour
import numpy as np
import pytest
from PIL import Image, ImageDraw, ImageFont

from inkshift.chart.palette import BLEND, OTHER, extract_palette
from inkshift.chart.unique import unique_colors

_D50 = colour.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D50"]

PAPER = (255, 255, 255)
INK = (30, 30, 36)
GRID = (200, 204, 212)
BARS = ((31, 119, 180), (214, 96, 20), (44, 160, 44))
LINE = (148, 52, 160)
MARKER = (230, 170, 10)
DRAWN = np.array((PAPER, INK, GRID) + BARS + (LINE, MARKER), np.uint8)
THIN = [1, 2, 6, 7]  # indices in DRAWN of the ink, the gridlines, the 3 px line and the markers


def srgb_to_lab(colors: np.ndarray) -> np.ndarray:
    """sRGB 8-bit -> CIELAB D50 via colour-science (the reference conversion)."""
    rgb = np.asarray(colors, np.float64) / 255.0
    xyz = colour.RGB_to_XYZ(
        rgb,
        colour.RGB_COLOURSPACES["sRGB"],
        illuminant=_D50,
        chromatic_adaptation_transform="Bradford",
        apply_cctf_decoding=True,
    )
    return colour.XYZ_to_Lab(xyz, _D50)


def de00(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    return colour.delta_E(a, b, method="CIE 2000")


def draw_chart(scale: int = 4) -> np.ndarray:
    """A 420 x 300 chart: bars, a polyline with markers, gridlines, axis, title and 10 px text."""
    w, h, s = 420, 300, scale
    im = Image.new("RGB", (w * s, h * s), PAPER)
    d = ImageDraw.Draw(im)
    for y in range(60, 261, 50):  # one-pixel gridlines on the pixel grid
        d.rectangle((40 * s, y * s, 400 * s - 1, y * s + s - 1), fill=GRID)
    for i, (x, bar_h) in enumerate([(60, 150), (130, 90), (200, 170), (270, 60), (340, 120)]):
        d.rectangle((x * s, (260 - bar_h) * s, (x + 40) * s - 1, 260 * s - 1), fill=BARS[i % 3])
    pts = [(80, 200), (150, 120), (220, 160), (290, 90), (360, 140)]
    d.line([(x * s + 1.3, y * s + 2.1) for x, y in pts], fill=LINE, width=3 * s, joint="curve")
    for x, y in pts:
        d.ellipse(((x - 5) * s, (y - 5) * s, (x + 5) * s, (y + 5) * s), fill=MARKER)
    d.rectangle((40 * s, 260 * s, 400 * s - 1, 262 * s - 1), fill=INK)
    d.text((40 * s, 12 * s), "Crossings per hour", font=ImageFont.load_default(size=20 * s), fill=INK)
    small = ImageFont.load_default(size=10 * s)
    for i, x in enumerate(range(80, 400, 70)):
        d.text((x * s, 268 * s), f"Pier {i + 1}", font=small, fill=INK)
    d.text((44 * s, 40 * s), "small note text at ten pixels", font=small, fill=INK)
    return np.asarray(im.reduce(s))


@pytest.fixture(scope="module")
def chart() -> np.ndarray:
    return draw_chart()


def _jpeg(pixels: np.ndarray, subsampling: int) -> np.ndarray:
    buf = io.BytesIO()
    Image.fromarray(pixels).save(buf, "JPEG", quality=85, subsampling=subsampling)
    return np.asarray(Image.open(buf).convert("RGB"))


def _match(palette_lab: np.ndarray) -> np.ndarray:
    """(len(DRAWN), K) ΔE00 matrix between drawn colours and the palette."""
    return de00(srgb_to_lab(DRAWN)[:, None, :], palette_lab[None, :, :])


def test_png_chart_gives_exactly_the_drawn_colours(chart):
    # The chart holds hundreds of distinct colours (edge blends, text anti-aliasing).
    assert len(unique_colors(chart)) > 300
    pal = extract_palette(chart, srgb_to_lab)
    assert len(pal) == len(DRAWN)
    d = _match(pal.lab)
    assert d.min(axis=1).max() <= 1.0  # every drawn colour found within 1 ΔE00
    assert d.min(axis=0).max() <= 1.0  # and nothing else (no blend) reported
    np.testing.assert_allclose(pal.lab, srgb_to_lab(pal.colors), atol=1e-9)
    assert pal.is_background.sum() == 1
    assert tuple(pal.colors[pal.is_background][0]) == PAPER
    assert np.all(np.diff(pal.counts) <= 0)


def _stored(chart: np.ndarray, jpeg: np.ndarray) -> np.ndarray:
    """Per drawn colour, the median of the JPEG pixels that were exactly that colour
    in the lossless chart: the colour the file actually holds for that mark."""
    return np.array([np.median(jpeg[(chart == c).all(axis=2)], axis=0) for c in DRAWN])


FILLS = [i for i in range(len(DRAWN)) if i not in THIN]  # paper and bars


def test_jpeg_444_gives_the_same_palette_within_2(chart):
    # Quality 85 without chroma subsampling.
    jpeg = _jpeg(chart, 0)
    pal = extract_palette(jpeg, srgb_to_lab)
    assert len(pal) == len(DRAWN)
    d = _match(pal.lab)
    assert d.min(axis=0).max() <= 2.5  # no colour that was not drawn
    # Every drawn colour within 2 ΔE00, except the one-pixel gridline: JPEG's
    # quantisation of fine chroma detail moves its stored colour itself 2.4 ΔE00
    # (its median over the gridline pixels is (201, 205, 208)).
    assert np.delete(d.min(axis=1), 2).max() <= 2.0
    stored = de00(srgb_to_lab(_stored(chart, jpeg))[:, None, :], pal.lab[None, :, :])
    assert stored.min(axis=1).max() <= 1.0  # what the file holds, found within 1


def test_jpeg_420_fills_within_2_thin_marks_as_stored(chart):
    # Default 4:2:0 subsampling stores one chroma sample per 2 x 2 pixels, so
    # marks 1-3 px wide (gridline, axis, line) take the chroma of the paper
    # around them: the file holds paler colours (up to 4.1 ΔE00 from the drawn
    # ones here) that no extraction can undo. Fills keep their colour within
    # 2 ΔE00; each thin mark is found within 1 ΔE00 of the colour the file
    # holds or of the drawn colour (a 10 px marker keeps its colour at the
    # centre while its rim takes the paper's chroma).
    jpeg = _jpeg(chart, 2)
    pal = extract_palette(jpeg, srgb_to_lab)
    assert len(pal) == len(DRAWN)
    d = _match(pal.lab)
    assert d[FILLS].min(axis=1).max() <= 2.0
    stored = de00(srgb_to_lab(_stored(chart, jpeg))[:, None, :], pal.lab[None, :, :])
    assert np.minimum(stored.min(axis=1), d.min(axis=1))[THIN].max() <= 1.0


def test_blend_labels_parents_and_mix():
    # Two fills meeting at an edge that covers 30 % of one pixel column
    # (built directly, no drawing library): that column is a known blend.
    a, b = np.array([20, 90, 200], np.float64), np.array([250, 240, 30], np.float64)
    img = np.zeros((40, 41, 3), np.uint8)
    img[:, :20] = a
    img[:, 21:] = b
    blend = np.round(0.3 * a + 0.7 * b).astype(np.uint8)
    img[:, 20] = blend
    pal = extract_palette(img, srgb_to_lab)
    assert len(pal) == 2
    u = unique_colors(img)
    i = int(np.flatnonzero((u.colors == blend).all(axis=1))[0])
    assert pal.labels[i] == BLEND
    parents = pal.colors[pal.parents[i]]
    first = parents[0]
    mix_of_a = pal.mix[i] if np.array_equal(first, a.astype(np.uint8)) else 1.0 - pal.mix[i]
    assert {tuple(p) for p in parents} == {tuple(a.astype(np.uint8)), tuple(b.astype(np.uint8))}
    assert abs(mix_of_a - 0.3) < 0.01
    # Shares: each fill's 20 columns out of 41; the blend column belongs to neither.
    np.testing.assert_allclose(np.sort(pal.shares), [20 / 41, 20 / 41])
    assert np.isnan(pal.mix[pal.labels >= 0]).all()


def test_share_of_an_antialiased_rectangle():
    # A 30.5 x 20.5 px rectangle drawn at 4x: its share lies between the
    # inner (fully covered) and outer pixel areas.
    s = 4
    im = Image.new("RGB", (100 * s, 80 * s), PAPER)
    ImageDraw.Draw(im).rectangle((10 * s + 2, 10 * s + 2, 40 * s + 3, 30 * s + 3), fill=BARS[0])
    pix = np.asarray(im.reduce(s))
    pal = extract_palette(pix, srgb_to_lab)
    assert len(pal) == 2
    k = int(np.flatnonzero(~pal.is_background)[0])
    assert tuple(pal.colors[k]) == BARS[0]
    assert 30 * 20 / 8000 <= pal.shares[k] <= 32 * 22 / 8000


def test_noise_is_folded_into_the_drawn_colour():
    rng = np.random.default_rng(5)
    base = np.zeros((60, 60, 3), np.int16)
    base[:, :30] = (120, 60, 40)
    base[:, 30:] = (235, 235, 220)
    noisy = np.clip(base + rng.integers(-2, 3, base.shape), 0, 255).astype(np.uint8)
    pal = extract_palette(noisy, srgb_to_lab)
    assert len(pal) == 2
    d = de00(srgb_to_lab(np.array([[235, 235, 220], [120, 60, 40]]))[:, None], pal.lab[None])
    assert d.min(axis=1).max() < 1.0
    assert (pal.labels >= 0).all()  # every noisy colour belongs to one of the two
    np.testing.assert_allclose(pal.shares.sum(), 1.0)


def test_transparent_pixels_are_ignored():
    img = np.full((40, 40, 3), 255, np.uint8)
    img[:, 20:] = (200, 0, 0)
    alpha = np.full((40, 40), 255, np.uint8)
    alpha[:, 20:] = 0
    pal = extract_palette(img, srgb_to_lab, alpha=alpha)
    assert [tuple(c) for c in pal.colors] == [PAPER]
    np.testing.assert_allclose(pal.shares, [1.0])


def test_uniform_and_tiny_images():
    one = extract_palette(np.full((1, 1, 3), 77, np.uint8), srgb_to_lab)
    assert [tuple(c) for c in one.colors] == [(77, 77, 77)] and one.is_background[0]
    gray = extract_palette(np.full((8, 9, 1), 200, np.uint8), lambda c: srgb_to_lab(np.repeat(c, 3, axis=1)))
    assert gray.colors.shape == (1, 1)


def test_unexplained_colours_are_labelled_other():
    # A lone pixel of a third colour, far from the two fills and off their segment.
    img = np.full((30, 30, 3), 255, np.uint8)
    img[:, 15:] = (0, 0, 0)
    img[5, 5] = (255, 0, 0)
    pal = extract_palette(img, srgb_to_lab)
    u = unique_colors(img)
    i = int(np.flatnonzero((u.colors == (255, 0, 0)).all(axis=1))[0])
    assert len(pal) == 2 and pal.labels[i] == OTHER and (pal.parents[i] == -1).all()


def _sample_module():
    import importlib.util
    from pathlib import Path

    path = Path(__file__).resolve().parent.parent / "samples" / "draw_samples.py"
    spec = importlib.util.spec_from_file_location("draw_samples", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


@pytest.mark.parametrize("name", ["ferry_ridership.png", "fare_mix.png"])
def test_shipped_samples_give_exactly_their_drawn_colours(name):
    # The sample PNGs are drawn by samples/draw_samples.py from known colours;
    # the palette must be exactly those that appear, with no blend among them.
    ds = _sample_module()
    pixels = np.asarray(Image.open(ds.OUT / name).convert("RGB"))
    if name == "ferry_ridership.png":
        drawn = {ds.PAPER, ds.INK, ds.GRID, *ds.ROUTE_COLORS}
    else:
        drawn = {ds.PAPER, ds.INK, ds.GRID, *ds.SEQUENTIAL, *ds.DIVERGING}
    pal = extract_palette(pixels, srgb_to_lab)
    assert {tuple(int(v) for v in c) for c in pal.colors} == drawn
    assert tuple(pal.colors[pal.is_background][0]) == ds.PAPER


@pytest.mark.parametrize("name", ["ferry_ridership.png", "fare_mix.png"])
@pytest.mark.parametrize("jpeg", [False, True])
def test_sparse_evidence_equals_dense_evidence(name, jpeg, tmp_path):
    # The sparse path (pixels near a colour change only) must give the same
    # masks as the whole-array path it replaces for chart-like images.
    from inkshift.chart.palette import _pixel_evidence, _pixel_evidence_dense

    img = Image.open(Path(__file__).resolve().parents[1] / "samples" / name).convert("RGB")
    if jpeg:
        img.save(tmp_path / "s.jpg", quality=85)
        img = Image.open(tmp_path / "s.jpg").convert("RGB")
    pixels = np.asarray(img)[:300, :400].copy()
    sparse = _pixel_evidence(pixels, None)
    dense = _pixel_evidence_dense(pixels, None)
    for a, b in zip(sparse, dense):
        np.testing.assert_array_equal(a, b)


@pytest.mark.parametrize("with_alpha", [False, True])
def test_evidence_counted_through_flags_equals_counting_per_strip(chart, monkeypatch, with_alpha):
    # Images with many colours (photographs) keep one byte of flags per pixel
    # and count per colour at the end, through the sparser side of each flag,
    # by sorting or by a colour-long count; charts count strip by strip. All
    # routes, and pixels given as an IndexedImage, must give the same counts.
    import inkshift.chart.palette as palette
    from inkshift.chart.unique import IndexedImage

    jpeg = _jpeg(chart, 2)  # thousands of colours
    u = unique_colors(jpeg)
    alpha = None
    if with_alpha:
        alpha = np.full(jpeg.shape[:2], 255, np.uint8)
        alpha[:40, :] = 0
        alpha[40:60, :] = 128
    reference = palette.palette_evidence(jpeg, u, alpha=alpha)
    assert len(u) <= palette._STRIP_PIXELS  # the reference counts strip by strip
    for sort_share in (0, 10**9):  # always sort / never sort
        monkeypatch.setattr(palette, "_SORT_COUNT_SHARE", sort_share)
        monkeypatch.setattr(palette, "_COUNT_CHUNK", 4096)  # several chunks per flag
        # More colours than the strip threshold: flags (other strip heights, too).
        monkeypatch.setattr(palette, "_STRIP_PIXELS", len(u) - 1)
        pixels = IndexedImage(u.colors, u.inverse, u.shape)
        flagged = palette.palette_evidence(pixels, u, alpha=alpha)
        for field in ("totals", "flat", "core", "line", "graded", "rim"):
            np.testing.assert_array_equal(getattr(flagged, field), getattr(reference, field), err_msg=field)
