"""Heat-map pictures: per-pixel ΔE00 over a faded gray chart, and plain scalar maps.

The chart underneath is drawn as a neutral gray of its own CIE L* (CIE 015:2018,
eq. 8.7, from the relative luminance Y of the sRGB values, IEC 61966-2-1 with the
Rec. 709 primaries' weights), compressed into a lighter, low-contrast band so the
heat colours read on top. L* rather than Rec. 709 luma (a weighted sum of gamma-encoded
values) because L* is the lightness the project judges everywhere else: equal
steps in the gray base are equal steps of perceived lightness, and the base keeps
the order of lightness a grayscale print would show.

ΔE00 is painted with the project's heat scale (:func:`inkshift.color.scale.heat_colors`),
transparent at or below the just-noticeable difference and fully opaque from
twice that, so every clearly visible shift has exactly the colour the legend
shows for it. Pixels outside the print gamut get a diagonal hatch of black and
white lines: a pattern, not a hue, so it reads on any heat colour and in a
grayscale print.

The picture is built in horizontal bands of about a million pixels, so the
working memory beyond the output does not grow with the image, and each band
costs three table look-ups: luminance per channel, gray per luminance, and one
packed colour per (ΔE00 level, gray) pair.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Callable, Iterator, Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray
from PIL import Image, ImageDraw

from inkshift.chart.unique import IndexedImage, as_pixel_map
from inkshift.color.convert import D50_XYZ, lab_to_xyz, xyz_to_lab
from inkshift.color.scale import HEAT_TICKS_DEFAULT, heat_colors
from inkshift.color.vision import linear_to_srgb, srgb_to_linear
from inkshift.errors import InputError
from inkshift.memory import release_freed_memory
from inkshift.report.sheets import (
    BACKGROUND,
    TEXT_COLOR,
    fit_text,
    font_size_for_width,
    format_value,
    label_font,
    line_height,
    text_width,
)

__all__ = [
    "heatmap_overlay",
    "heatmap_bands",
    "scalar_bands",
    "scalar_map",
    "legend_strip",
    "HatchStyle",
    "hatch_style_for_width",
    "faded_gray",
    "heat_alpha",
    "HEAT_FLOOR_DELTA_E",
    "HEAT_OPAQUE_DELTA_E",
    "HEATMAP_VMAX_DEFAULT",
    "GRAY_BASE_L_RANGE",
    "LEGEND_MIN_WIDTH",
    "OUT_OF_GAMUT_LABEL",
]

HEAT_FLOOR_DELTA_E = 1.0
"""ΔE00 at or below which the chart stays uncovered. CIEDE2000 was scaled so that
about one unit is a just-noticeable difference between large patches side by
side (CIE 142-2001; Luo, Cui & Rigg 2001); treating 1 as the JND is common practice."""

HEAT_OPAQUE_DELTA_E = 2.0
"""ΔE00 from which the heat colour covers the chart completely; between the floor
and this the heat colour fades in linearly. Twice the JND, the margin the
project's out-of-gamut threshold also uses (common practice)."""

HEATMAP_VMAX_DEFAULT = 20.0
"""Top of the ΔE00 scale; larger differences take its top colour. Around 20 ΔE00
two colours read as different colour names, so finer steps above add nothing,
and the 1-5 range where print tolerances sit keeps a quarter of the bar
(common practice)."""

GRAY_BASE_L_RANGE = (55.0, 80.0)
"""CIE L* that black and white of the chart map to in the faded base (project's
choice). The heat scale runs from dark to light (:data:`inkshift.color.scale.HEAT_L_RANGE`,
about L* 12 to 94), so a white page would swallow its light end, the largest
shifts. A page at L* 80 leaves the top of the scale clearly lighter than the page
and small shifts clearly darker; the colours of equal lightness fall mid-scale,
where their hue and chroma still set them apart in colour. 25 L* of range keeps
the chart's text and marks recognisable."""

LEGEND_MIN_WIDTH = 480
"""Narrowest legend in pixels; smaller charts get a wider canvas so the legend text
fits (project's choice)."""

HEAT_LUT_LEVELS = 4096
"""Steps of the ΔE00 -> colour look-up table (vmax/4095 apart: 0.005 ΔE00 at
vmax 20, far below what an 8-bit colour can show)."""

STRIP_PIXELS = 1 << 19
"""Pixels per band processed at once; bounds the working memory (about 15 MB)."""

HATCH_DARK = (0, 0, 0)
HATCH_LIGHT = (255, 255, 255)
OUT_OF_GAMUT_LABEL = "out of gamut"
HEATMAP_TITLE = "Colour shift from screen to print (CIEDE2000)"
HEATMAP_QUANTITY = "dE00"


@dataclass(frozen=True)
class HatchStyle:
    """Diagonal hatch: lines along x + y = const, ``period`` pixels apart along x.

    A dark line of ``thickness`` pixels starts each period, a light one half a
    period later; the pixels between keep their heat colour.
    """

    period: int
    thickness: int

    def masks(self, y0: int, y1: int, width: int) -> tuple[NDArray[np.bool_], NDArray[np.bool_]]:
        """Return (dark, light) line masks for rows ``y0:y1`` of a picture ``width`` wide."""
        d = np.add.outer(np.arange(y0, y1, dtype=np.int32), np.arange(width, dtype=np.int32))
        d %= self.period
        dark = d < self.thickness
        d -= self.period // 2
        light = (d >= 0) & (d < self.thickness)
        return dark, light


def hatch_style_for_width(width: int) -> HatchStyle:
    """Return the hatch for a picture ``width`` pixels wide: a period of 1/150 of the
    width (at least 8 px) and lines a quarter period thick (at least 2 px), so the
    pattern stays visible when a large picture is viewed scaled down (project's choice)."""
    period = max(8, int(round(width / 150)))
    return HatchStyle(period=period, thickness=max(2, period // 4))


_Y_SCALE = 65532  # sum of three rounded weighted entries stays below 2**16
_Y_WEIGHTS = (0.2126, 0.7152, 0.0722)  # relative luminance of sRGB primaries, IEC 61966-2-1 / ITU-R BT.709


@lru_cache(maxsize=1)
def _gray_luts() -> tuple[NDArray[np.uint16], NDArray[np.uint16], NDArray[np.uint16], NDArray[np.uint8]]:
    """Per-channel 16-bit luminance tables and the table from luminance to faded gray."""
    lin = srgb_to_linear(np.arange(256) / 255.0)
    r, g, b = (np.rint(w * lin * _Y_SCALE).astype(np.uint16) for w in _Y_WEIGHTS)
    y = np.minimum(np.arange(1 << 16) / _Y_SCALE, 1.0)
    lightness = xyz_to_lab(y[:, None] * D50_XYZ)[:, 0]
    lo, hi = GRAY_BASE_L_RANGE
    faded = np.zeros((y.size, 3))
    faded[:, 0] = lo + (hi - lo) * lightness / 100.0
    y_faded = lab_to_xyz(faded)[:, 1]
    gray = np.rint(255.0 * linear_to_srgb(np.clip(y_faded, 0.0, 1.0))).astype(np.uint8)
    return r, g, b, gray


def faded_gray(rgb: NDArray[np.uint8]) -> NDArray[np.uint8]:
    """Return the faded gray base (..., ) uint8 of sRGB pixels ``rgb`` (..., 3) uint8.

    The gray value is the sRGB encoding of the neutral whose CIE L* is the pixel's
    L* mapped linearly from 0..100 into :data:`GRAY_BASE_L_RANGE`.
    """
    lut_r, lut_g, lut_b, lut_gray = _gray_luts()
    y = lut_r.take(rgb[..., 0])
    y += lut_g.take(rgb[..., 1])
    y += lut_b.take(rgb[..., 2])
    return lut_gray.take(y)


def heat_alpha(delta_e: NDArray[np.floating]) -> NDArray[np.float32]:
    """Return the opacity of the heat colour: 0 at or below :data:`HEAT_FLOOR_DELTA_E`,
    rising linearly to 1 at :data:`HEAT_OPAQUE_DELTA_E`."""
    a = np.asarray(delta_e, dtype=np.float32) - np.float32(HEAT_FLOOR_DELTA_E)
    a *= np.float32(1.0 / (HEAT_OPAQUE_DELTA_E - HEAT_FLOOR_DELTA_E))
    return np.clip(a, 0.0, 1.0, out=a)


_PACKED_DARK = np.array([*HATCH_DARK, 255], np.uint8).view(np.uint32)[0]
_PACKED_LIGHT = np.array([*HATCH_LIGHT, 255], np.uint8).view(np.uint32)[0]


def _pack_rgbx(rgb: NDArray[np.uint8]) -> NDArray[np.uint32]:
    """(..., 3) uint8 -> (...) uint32 whose bytes in memory are R, G, B, 255 (Pillow raw 'RGBX')."""
    rgbx = np.full(rgb.shape[:-1] + (4,), 255, np.uint8)
    rgbx[..., :3] = rgb
    return rgbx.view(np.uint32)[..., 0]


@lru_cache(maxsize=4)
def _heat_lut(vmax: float) -> NDArray[np.uint32]:
    """Packed heat colours at HEAT_LUT_LEVELS values evenly spaced over 0..vmax."""
    lut = _pack_rgbx(np.asarray(heat_colors(np.linspace(0.0, vmax, HEAT_LUT_LEVELS), vmax), dtype=np.uint8))
    lut.setflags(write=False)
    return lut


@lru_cache(maxsize=4)
def _overlay_lut(vmax: float) -> NDArray[np.uint32]:
    """Packed overlay colours indexed by level * 256 + gray: the heat colour of the
    level blended over the gray base with :func:`heat_alpha` (4 MB per vmax)."""
    levels = np.linspace(0.0, vmax, HEAT_LUT_LEVELS)
    heat = np.asarray(heat_colors(levels, vmax), dtype=np.float32)[:, None, :]
    gray = np.arange(256, dtype=np.float32)[None, :, None]
    mix = heat - gray
    mix *= heat_alpha(levels)[:, None, None]
    mix += gray
    lut = _pack_rgbx(np.rint(mix).astype(np.uint8)).reshape(-1)
    lut.setflags(write=False)
    return lut


def _levels(values: NDArray[np.floating], vmax: float) -> NDArray[np.uint32]:
    """Index of the nearest look-up level of each value (NaN -> 0, values clamp into 0..vmax)."""
    idx = np.nan_to_num(np.asarray(values, dtype=np.float32), nan=0.0, posinf=vmax, neginf=0.0)
    idx *= np.float32((HEAT_LUT_LEVELS - 1) / vmax)
    np.clip(idx, 0, HEAT_LUT_LEVELS - 1, out=idx)
    idx += 0.5
    return idx.astype(np.uint32)


def _check_vmax(vmax: float, what: str, minimum: float | None = None) -> float:
    """Return ``vmax`` as float if finite and above 0 (or at least ``minimum``)."""
    try:
        top = float(vmax)
    except (TypeError, ValueError):
        raise InputError(f"{what}: the top of the scale '{vmax}' is not a number") from None
    if minimum is None and not (np.isfinite(top) and top > 0.0):
        raise InputError(f"{what}: the top of the scale must be a number above 0, got {vmax}")
    if minimum is not None and not (np.isfinite(top) and top >= minimum):
        raise InputError(f"{what}: the top of the scale must be at least {format_value(minimum)}, got {vmax}")
    return top


def _check_map(arr: ArrayLike | IndexedImage, shape: tuple[int, int], name: str, what: str) -> NDArray | IndexedImage:
    arr = as_pixel_map(arr)
    if arr.shape != shape:
        raise InputError(f"{what}: {name} has shape {arr.shape}, expected {shape}")
    return arr


def _bands(height: int, width: int) -> list[tuple[int, int]]:
    step = max(1, STRIP_PIXELS // width)
    return [(y0, min(height, y0 + step)) for y0 in range(0, height, step)]


def _tick_values(vmax: float, ticks: Sequence[float] | None) -> list[float]:
    """Ticks inside [0, vmax), then vmax itself (labelled as 'vmax and above')."""
    source = HEAT_TICKS_DEFAULT if ticks is None else ticks
    try:
        given = np.asarray(list(source), dtype=np.float64).reshape(-1)
    except (TypeError, ValueError):
        raise InputError(f"legend: tick values must be numbers, got {list(source)!r}") from None
    values = sorted({float(t) for t in given if np.isfinite(t) and 0.0 <= t < vmax})
    return values + [vmax]


def legend_strip(
    width: int,
    *,
    vmax: float,
    title: str,
    quantity: str,
    ticks: Sequence[float] | None = None,
    hatch: HatchStyle | None = None,
    over_gray: int | None = None,
) -> Image.Image:
    """Return the legend strip drawn under a heat map.

    A title line; the heat scale from 0 to ``vmax`` as a bar with tick marks and
    value labels (the top one reads '>=vmax': larger values take the top colour),
    ``quantity`` naming the values; and, when ``hatch`` is given, a sample of
    the out-of-gamut hatch with its label. Labels that would overlap are left
    out, the top one never.

    Parameters
    ----------
    width
        Width in pixels (the type size follows it, see :func:`font_size_for_width`).
    vmax
        Top of the scale.
    title, quantity
        Plain-text title line and name of the mapped quantity (e.g. 'dE00').
    ticks
        Values to label; default :data:`inkshift.color.scale.HEAT_TICKS_DEFAULT`.
    hatch
        The hatch drawn on the map, to show a sample of it.
    over_gray
        If given (0..255), the bar shows the colours exactly as the heat map
        paints them over a base of this gray: faded in from
        :data:`HEAT_FLOOR_DELTA_E` to :data:`HEAT_OPAQUE_DELTA_E`.
    """
    vmax = _check_vmax(vmax, "legend")
    width = int(width)
    if width < LEGEND_MIN_WIDTH:
        raise InputError(f"legend: width must be at least {LEGEND_MIN_WIDTH} pixels, got {width}")
    f = font_size_for_width(width)
    font = label_font(f)
    lh = line_height(font)
    pad = f
    bar_h = int(round(1.5 * f))
    tick_len = max(2, f // 3)
    bar_top = pad + lh + f // 2
    height = bar_top + bar_h + tick_len + lh + pad
    strip = Image.new("RGB", (width, height), BACKGROUND)
    draw = ImageDraw.Draw(strip)
    draw.text((pad, pad), fit_text(font, title, width - 2 * pad), fill=TEXT_COLOR, font=font)

    right = width - pad
    if hatch is not None:
        sample_w = 2 * bar_h
        block = sample_w + f // 2 + text_width(font, OUT_OF_GAMUT_LABEL)
        sx = right - block
        ys, xs = bar_top, sx
        sample = np.empty((bar_h, sample_w, 3), np.uint8)
        sample[...] = heat_colors(np.array([vmax / 2]), vmax)[0]
        dark, light = hatch.masks(0, bar_h, sample_w)
        sample[dark] = HATCH_DARK
        sample[light] = HATCH_LIGHT
        strip.paste(Image.fromarray(sample, mode="RGB"), (xs, ys))
        draw.rectangle([xs, ys, xs + sample_w - 1, ys + bar_h - 1], outline=TEXT_COLOR, width=1)
        draw.text((xs + sample_w + f // 2, ys + bar_h // 2), OUT_OF_GAMUT_LABEL, fill=TEXT_COLOR, font=font, anchor="lm")
        right = sx - 2 * f
    quantity = fit_text(font, quantity, width // 3)
    q_w = text_width(font, quantity)
    x0, x1 = pad, max(pad + 1, right - q_w - f)  # bar spans [x0, x1)
    bar_w = x1 - x0
    centres = (np.arange(bar_w) + 0.5) * (vmax / bar_w)
    if over_gray is None:
        colours = heat_colors(centres, vmax)
    else:
        idx = _levels(centres, vmax)
        idx <<= 8
        idx += np.uint32(over_gray)
        colours = _overlay_lut(vmax).take(idx).view(np.uint8).reshape(-1, 4)[:, :3]
    bar = np.broadcast_to(colours[None, :, :], (bar_h, bar_w, 3))
    strip.paste(Image.fromarray(np.ascontiguousarray(bar, dtype=np.uint8), mode="RGB"), (x0, bar_top))
    draw.rectangle([x0, bar_top, x1 - 1, bar_top + bar_h - 1], outline=TEXT_COLOR, width=1)
    draw.text((x1 + f // 2, bar_top + bar_h // 2), quantity, fill=TEXT_COLOR, font=font, anchor="lm")

    values = _tick_values(vmax, ticks)
    labels = [format_value(v) for v in values[:-1]] + [">=" + format_value(vmax)]
    xs_t = [min(x1 - 1, x0 + int(round(v / vmax * bar_w))) for v in values]
    spans = []
    for x, text in zip(xs_t, labels):
        w = text_width(font, text)
        left = min(max(0, x - w // 2), width - w)
        spans.append((left, left + w))
    keep = [len(values) - 1]  # the top label always; then left to right where there is room
    gap = f // 2
    for i in range(len(values) - 1):
        if all(spans[i][1] + gap <= spans[k][0] or spans[k][1] + gap <= spans[i][0] for k in keep):
            keep.append(i)
    y_tick = bar_top + bar_h
    for i in sorted(keep):
        draw.line([(xs_t[i], y_tick), (xs_t[i], y_tick + tick_len)], fill=TEXT_COLOR, width=max(1, f // 12))
        draw.text((spans[i][0], y_tick + tick_len), labels[i], fill=TEXT_COLOR, font=font)
    return strip


def heatmap_bands(
    screen_rgb: NDArray[np.uint8] | IndexedImage,
    delta_e: NDArray[np.floating] | IndexedImage,
    out_of_gamut: NDArray[np.bool_] | IndexedImage,
    *,
    vmax: float = HEATMAP_VMAX_DEFAULT,
    ticks: Sequence[float] | None = None,
    title: str = HEATMAP_TITLE,
) -> tuple[int, int, Iterator[NDArray[np.uint8]]]:
    """Return (width, height, bands) of the full-resolution heat map of a proof with its legend underneath.

    The bands are (h, width, 3) uint8 rows, top to bottom, made only as they
    are read (for :func:`inkshift.report.png.write_png_bands`);
    :func:`heatmap_overlay` gathers them into one image.

    Parameters
    ----------
    screen_rgb
        (H, W, 3) uint8 sRGB chart as seen on screen; drawn as a faded gray base
        (:func:`faded_gray`).
    delta_e
        (H, W) CIEDE2000 difference per pixel between screen and print (CIE
        142-2001). Painted with :func:`inkshift.color.scale.heat_colors`, faded in
        between :data:`HEAT_FLOOR_DELTA_E` and :data:`HEAT_OPAQUE_DELTA_E`; values
        above ``vmax`` take the top colour, NaN is treated as no difference.
    out_of_gamut
        (H, W) bool; these pixels get the diagonal hatch (:class:`HatchStyle`).
        The legend's bar shows the colours as painted over the faded white page.
    vmax, ticks, title
        Top of the scale (at least :data:`HEAT_OPAQUE_DELTA_E`), labelled values,
        title line of the legend.

    Returns
    -------
    width, height, bands
        The picture: the chart occupies the top-left W x H pixels unchanged in scale; the
        legend (:func:`legend_strip`) lies below it. Charts narrower than
        :data:`LEGEND_MIN_WIDTH` get a canvas that wide, white right of the chart.
    """
    what = "heat map"
    # Values above vmax are drawn at vmax; below the opaque point that would fade them out.
    vmax = _check_vmax(vmax, what, minimum=HEAT_OPAQUE_DELTA_E)
    screen_rgb = as_pixel_map(screen_rgb)
    if screen_rgb.ndim != 3 or screen_rgb.shape[2] != 3 or 0 in screen_rgb.shape or screen_rgb.dtype != np.uint8:
        raise InputError(f"{what}: expected an (H, W, 3) uint8 image, got {screen_rgb.dtype} {screen_rgb.shape}")
    h, w = screen_rgb.shape[:2]
    delta_e = _check_map(delta_e, (h, w), "delta_e", what)
    out_of_gamut = _check_map(out_of_gamut, (h, w), "out_of_gamut", what)
    hatch = hatch_style_for_width(w)
    page = int(faded_gray(np.array(BACKGROUND, np.uint8)))
    legend = legend_strip(
        max(w, LEGEND_MIN_WIDTH),
        vmax=vmax,
        title=title,
        quantity=HEATMAP_QUANTITY,
        ticks=ticks,
        hatch=hatch,
        over_gray=page,
    )
    lut = _overlay_lut(vmax)
    per_color = None
    if all(isinstance(m, IndexedImage) for m in (screen_rgb, delta_e)) and screen_rgb.index is delta_e.index:
        # A pixel's colour depends only on its unique colour: paint each once
        # (in steps, so that millions of colours make no large temporaries).
        painted = np.empty(delta_e.values.shape[0], np.uint32)
        for c0 in range(0, painted.size, STRIP_PIXELS):
            part = slice(c0, c0 + STRIP_PIXELS)
            idx = _levels(delta_e.values[part], vmax)
            idx <<= 8
            idx += faded_gray(screen_rgb.values[part])
            painted[part] = lut.take(idx)
        del idx
        release_freed_memory()  # the steps' temporaries, before the bands are drawn
        per_color = IndexedImage(painted, delta_e.index, (h, w), delta_e.runs)

    def packed(y0: int, y1: int) -> NDArray[np.uint32]:
        if per_color is not None:
            band = per_color[y0:y1]
        else:
            idx = _levels(delta_e[y0:y1], vmax)
            idx <<= 8
            idx += faded_gray(screen_rgb[y0:y1])
            band = lut.take(idx)
        oog = np.asarray(out_of_gamut[y0:y1], dtype=bool)
        if oog.any():
            dark, light = hatch.masks(y0, y1, w)
            band[dark & oog] = _PACKED_DARK
            band[light & oog] = _PACKED_LIGHT
        return band

    return _picture_bands(h, w, packed, legend)


def heatmap_overlay(
    screen_rgb: NDArray[np.uint8] | IndexedImage,
    delta_e: NDArray[np.floating] | IndexedImage,
    out_of_gamut: NDArray[np.bool_] | IndexedImage,
    *,
    vmax: float = HEATMAP_VMAX_DEFAULT,
    ticks: Sequence[float] | None = None,
    title: str = HEATMAP_TITLE,
) -> Image.Image:
    """Return the full-resolution heat map of a proof with its legend underneath.

    The picture of :func:`heatmap_bands` (same parameters) as one Pillow image.
    """
    return _gathered(*heatmap_bands(screen_rgb, delta_e, out_of_gamut, vmax=vmax, ticks=ticks, title=title))


def scalar_bands(
    values: NDArray[np.floating] | IndexedImage,
    *,
    vmax: float = HEATMAP_VMAX_DEFAULT,
    title: str,
    legend_label: str,
    ticks: Sequence[float] | None = None,
) -> tuple[int, int, Iterator[NDArray[np.uint8]]]:
    """Return (width, height, bands) of a map of ``values`` in the heat scale, with the heat map's legend.

    Parameters
    ----------
    values
        (H, W) non-negative values, e.g. ΔE00 between two simulated prints, as
        an array or an :class:`~inkshift.chart.unique.IndexedImage` (painted
        once per colour); every pixel is painted (no chart underneath), values
        above ``vmax`` take the top colour, NaN and negatives the bottom one.
    vmax, title, legend_label, ticks
        Top of the scale, title line, name of the quantity, labelled values.

    Returns
    -------
    width, height, bands
        As :func:`heatmap_bands`: the map in the top-left W x H pixels and the
        legend below, as (h, width, 3) uint8 bands made when read.
    """
    what = "scalar map"
    vmax = _check_vmax(vmax, what)
    values = as_pixel_map(values)
    if values.ndim != 2 or 0 in values.shape:
        raise InputError(f"{what}: expected an (H, W) array, got shape {values.shape}")
    if not (np.issubdtype(values.dtype, np.floating) or np.issubdtype(values.dtype, np.integer)):
        raise InputError(f"{what}: expected numbers, got {values.dtype}")
    h, w = values.shape
    legend = legend_strip(max(w, LEGEND_MIN_WIDTH), vmax=vmax, title=title, quantity=legend_label, ticks=ticks)
    lut = _heat_lut(vmax)
    if isinstance(values, IndexedImage):
        values = IndexedImage(lut.take(_levels(values.values, vmax)), values.index, (h, w), values.runs)

        def packed(y0: int, y1: int) -> NDArray[np.uint32]:
            return values[y0:y1]
    else:

        def packed(y0: int, y1: int) -> NDArray[np.uint32]:
            return lut.take(_levels(values[y0:y1], vmax))

    return _picture_bands(h, w, packed, legend)


def scalar_map(
    values: NDArray[np.floating] | IndexedImage,
    *,
    vmax: float = HEATMAP_VMAX_DEFAULT,
    title: str,
    legend_label: str,
    ticks: Sequence[float] | None = None,
) -> Image.Image:
    """Return the picture of :func:`scalar_bands` (same parameters) as one Pillow image."""
    return _gathered(*scalar_bands(values, vmax=vmax, title=title, legend_label=legend_label, ticks=ticks))


def _picture_bands(
    h: int, w: int, packed: Callable[[int, int], NDArray[np.uint32]], legend: Image.Image
) -> tuple[int, int, Iterator[NDArray[np.uint8]]]:
    """(width, height, bands) of a picture: ``packed(y0, y1)`` RGBX rows of the map, then ``legend``.

    A map narrower than the legend continues as page background on the right.
    """
    width = max(w, legend.width)

    def bands() -> Iterator[NDArray[np.uint8]]:
        for y0, y1 in _bands(h, w):
            rgb = packed(y0, y1).view(np.uint8).reshape(y1 - y0, w, 4)[..., :3]
            if width > w:
                padded = np.empty((y1 - y0, width, 3), np.uint8)
                padded[:, :w] = rgb
                padded[:, w:] = BACKGROUND
                rgb = padded
            yield rgb
        yield np.asarray(legend.convert("RGB"))

    return width, h + legend.height, bands()


def _gathered(width: int, height: int, bands: Iterator[NDArray[np.uint8]]) -> Image.Image:
    """One Pillow image of a picture given as bands (for callers that want it whole)."""
    canvas = Image.new("RGB", (width, height), BACKGROUND)
    y = 0
    for band in bands:
        canvas.paste(Image.fromarray(np.ascontiguousarray(band), mode="RGB"), (0, y))
        y += band.shape[0]
    return canvas
