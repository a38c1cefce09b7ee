"""Labelled picture sheets: text on images, swatch pairs, screen/print previews.

Everything written on the pictures is plain ASCII set in Pillow's bundled
FreeType face (``ImageFont.load_default(size=...)``), whose size follows the
width of the picture so that a label reads the same on a 600-px and on a
6000-px image. That face has no glyphs for Greek or mathematical signs, so the
pictures write ``dE00`` for ΔE00 and ``>=`` for ≥.

Colours are never the only carrier of meaning: each swatch says its ΔE00 and its
marks (for example out of gamut, merges) in words.
"""

from __future__ import annotations

import unicodedata
from dataclasses import dataclass, field
from functools import lru_cache
from typing import Iterator, Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray
from PIL import Image, ImageDraw, ImageFont

from inkshift.chart.unique import IndexedImage, as_pixel_map
from inkshift.errors import InputError

__all__ = [
    "rgb_bands",
    "Swatch",
    "side_by_side",
    "swatch_sheet",
    "font_size_for_width",
    "label_font",
    "plain_text",
    "format_value",
    "TEXT_COLOR",
    "BACKGROUND",
]

FONT_MIN_PX = 12
"""Smallest type size drawn, in pixels: about the x-height limit below which the
bundled sans face stops being legible on screen (common practice for UI text)."""

FONT_WIDTH_SHARE = 0.016
"""Type size as a share of the picture width: 12 px (the minimum) on a 600-px
picture, 96 px on a 6000-px one, so labels keep their size relative to the chart
when the picture is viewed scaled to fit a screen (project's choice)."""

SHEET_FONT_WIDTH_SHARE = 0.012
"""Type size of swatch sheets as a share of their width limit (29 px at the
2400-px default): sheets carry more, smaller text than a legend (project's choice)."""

TEXT_COLOR = (25, 25, 25)
BACKGROUND = (255, 255, 255)
_OUTLINE = (120, 120, 120)  # mid gray: outlines white and black patches alike

SIDE_MIN_PREVIEW_PX = 240
"""Charts whose longer side is below this are enlarged by a whole factor with
nearest-neighbour sampling so their pixels stay visible (project's choice)."""

SCREEN_CAPTION = "On screen"
PRINT_CAPTION = "In print (simulated)"
SWATCH_KEY = "Each pair: screen colour (left) | simulated print (right); dE00 = CIEDE2000 difference."


def font_size_for_width(width: int, share: float = FONT_WIDTH_SHARE) -> int:
    """Return the type size in pixels for a picture ``width`` pixels wide."""
    return max(FONT_MIN_PX, int(round(width * share)))


@lru_cache(maxsize=32)
def label_font(size: int) -> ImageFont.FreeTypeFont | ImageFont.ImageFont:
    """Return Pillow's bundled face at ``size`` pixels (cached)."""
    return ImageFont.load_default(size=size)


_SIGNS = {"Δ": "d", "≥": ">=", "≤": "<=", "≈": "~", "−": "-", "–": "-", "—": "-", "×": "x", "→": "->", "µ": "u"}


@lru_cache(maxsize=1)
def _notdef_mask() -> bytes:
    return bytes(label_font(20).getmask("\ue000"))  # a private-use code point: never in the face


@lru_cache(maxsize=1024)
def _plain_char(ch: str) -> str:
    if ch in _SIGNS:
        return _SIGNS[ch]
    if ch.isspace() or bytes(label_font(20).getmask(ch)) != _notdef_mask():
        return ch if not ch.isspace() else " "
    # A letter the face lacks: its base letter without accents (é -> e), else '?'.
    base = "".join(c for c in unicodedata.normalize("NFKD", ch) if not unicodedata.combining(c))
    if base and base != ch and all(_plain_char(c) == c for c in base):
        return base
    return "?"


def plain_text(text: str) -> str:
    """Return ``text`` with every character the bundled face cannot draw replaced:
    known signs by ASCII ('ΔE00' -> 'dE00', '≥' -> '>='), accented letters by their
    base letter, anything else by '?', so no label shows an empty box."""
    return "".join(_plain_char(ch) for ch in str(text))


def line_height(font: ImageFont.FreeTypeFont | ImageFont.ImageFont) -> int:
    """Return the distance between baselines of consecutive lines set in ``font``."""
    ascent, descent = font.getmetrics()  # type: ignore[union-attr]
    return int(ascent + descent)


def text_width(font: ImageFont.FreeTypeFont | ImageFont.ImageFont, text: str) -> int:
    """Return the advance width of ``text`` (as :func:`plain_text` makes it) in pixels."""
    return int(np.ceil(font.getlength(plain_text(text))))


def fit_text(font: ImageFont.FreeTypeFont | ImageFont.ImageFont, text: str, width: int) -> str:
    """Return :func:`plain_text` of ``text``, shortened with '...' if wider than ``width`` pixels."""
    text = plain_text(text)
    if text_width(font, text) <= width:
        return text
    lo, hi = 0, len(text)
    while lo < hi:  # longest prefix that fits with the ellipsis (binary search)
        mid = (lo + hi + 1) // 2
        if text_width(font, text[:mid] + "...") <= width:
            lo = mid
        else:
            hi = mid - 1
    return text[:lo] + "..." if lo else ""


def format_value(value: float) -> str:
    """Return a short label for a scale value: '5', '2.5', '0.25'."""
    if value == round(value):
        return str(int(round(value)))
    return f"{value:.2f}".rstrip("0").rstrip(".")


def _as_rgb3(value: ArrayLike, what: str) -> NDArray[np.uint8]:
    arr = np.asarray(value)
    if arr.shape != (3,):
        raise InputError(f"swatch: {what} must be 3 values, got shape {arr.shape}")
    if arr.dtype != np.uint8:
        if not np.all(np.isfinite(arr)) or np.any(arr < 0) or np.any(arr > 255):
            raise InputError(f"swatch: {what} must be 0..255, got {arr.tolist()}")
        arr = np.rint(arr).astype(np.uint8)
    return arr


@dataclass(frozen=True, eq=False)
class Swatch:
    """One palette colour on screen and in print, for the swatch rows.

    Attributes
    ----------
    screen_rgb, print_rgb
        sRGB values (3,) uint8 of the colour on screen and of its simulated print.
    label
        Name shown under the pair (the hex code if empty).
    delta_e
        CIEDE2000 difference between the two; NaN prints as 'n/a'.
    marks
        Short plain-text marks such as "OUT" or "MERGE", shown as words.
    """

    screen_rgb: NDArray[np.uint8]
    print_rgb: NDArray[np.uint8]
    label: str = ""
    delta_e: float = float("nan")
    marks: tuple[str, ...] = field(default=())

    def __post_init__(self) -> None:
        object.__setattr__(self, "screen_rgb", _as_rgb3(self.screen_rgb, "screen_rgb"))
        object.__setattr__(self, "print_rgb", _as_rgb3(self.print_rgb, "print_rgb"))
        object.__setattr__(self, "marks", tuple(str(m) for m in self.marks))
        object.__setattr__(self, "delta_e", float(self.delta_e))

    @property
    def hex(self) -> str:
        """The screen colour as '#RRGGBB'."""
        return "#" + "".join(f"{int(v):02X}" for v in self.screen_rgb)

    def text_lines(self) -> list[str]:
        """The lines printed under the pair: label, hex, ΔE00, marks."""
        lines = []
        if self.label and self.label.upper() != self.hex:
            lines.append(self.label)
        lines.append(self.hex)
        lines.append("dE00 " + ("n/a" if not np.isfinite(self.delta_e) else f"{self.delta_e:.1f}"))
        if self.marks:
            lines.append(" ".join(self.marks))
        return lines


def _swatch_grid(swatches: Sequence[Swatch], width: int, font_px: int) -> Image.Image:
    """Draw ``swatches`` as pairs of patches with their text, wrapping rows to ``width``."""
    font = label_font(font_px)
    lh = line_height(font)
    patch = 3 * font_px
    gap = font_px
    texts = [s.text_lines() for s in swatches]
    widest = max((text_width(font, t) for lines in texts for t in lines), default=0)
    cell_w = min(max(2 * patch, widest), max(2 * patch, width))
    n_lines = max((len(lines) for lines in texts), default=0)
    cell_h = patch + font_px // 3 + n_lines * lh
    cols = max(1, (width + gap) // (cell_w + gap))
    rows = -(-len(swatches) // cols) if swatches else 0
    used_cols = max(1, min(cols, len(swatches)))
    sheet_w = max(1, used_cols * cell_w + (used_cols - 1) * gap)
    height = max(1, rows * cell_h + max(0, rows - 1) * gap)
    sheet = Image.new("RGB", (sheet_w, height), BACKGROUND)
    draw = ImageDraw.Draw(sheet)
    for i, (sw, lines) in enumerate(zip(swatches, texts)):
        x = (i % cols) * (cell_w + gap)
        y = (i // cols) * (cell_h + gap)
        draw.rectangle([x, y, x + patch - 1, y + patch - 1], fill=tuple(int(v) for v in sw.screen_rgb))
        draw.rectangle([x + patch, y, x + 2 * patch - 1, y + patch - 1], fill=tuple(int(v) for v in sw.print_rgb))
        draw.rectangle([x, y, x + 2 * patch - 1, y + patch - 1], outline=_OUTLINE, width=1)
        ty = y + patch + font_px // 3
        for line in lines:
            draw.text((x, ty), fit_text(font, line, cell_w), fill=TEXT_COLOR, font=font)
            ty += lh
    return sheet


def _check_rgb_image(rgb: NDArray[np.uint8] | IndexedImage, what: str) -> NDArray[np.uint8] | IndexedImage:
    rgb = as_pixel_map(rgb)
    if rgb.ndim != 3 or rgb.shape[2] != 3 or rgb.shape[0] < 1 or rgb.shape[1] < 1:
        raise InputError(f"{what}: expected an (H, W, 3) image, got shape {rgb.shape}")
    if rgb.dtype != np.uint8:
        raise InputError(f"{what}: expected uint8 values, got {rgb.dtype}")
    return rgb


def _preview(rgb: NDArray[np.uint8], box_w: int, box_h: int) -> Image.Image:
    """Return ``rgb`` scaled to fit ``box_w`` x ``box_h``: LANCZOS down, whole-factor NEAREST up."""
    h, w = rgb.shape[:2]
    if max(w, h) < SIDE_MIN_PREVIEW_PX:
        img = Image.fromarray(np.ascontiguousarray(rgb), mode="RGB")
        k = max(1, min(SIDE_MIN_PREVIEW_PX // max(w, h), box_w // w, box_h // h))
        return img.resize((w * k, h * k), Image.Resampling.NEAREST) if k > 1 else img
    scale = min(1.0, box_w / w, box_h / h)
    if scale >= 1.0:
        return Image.fromarray(np.ascontiguousarray(rgb), mode="RGB")
    size = (max(1, int(round(w * scale))), max(1, int(round(h * scale))))
    # Box-reduce by a whole factor first, then LANCZOS over at least a 2x step:
    # Pillow's reducing_gap speed-up (its documentation: 3.0 is "indistinguishable
    # from fair resampling in most cases", smaller is faster; a preview needs no
    # more than 2.0). The box reduction runs in bands of rows, so no full-size
    # copy of the image is made. Measured on a 6000 x 4000 chart to 1200 px wide:
    # 0.30 s with reducing_gap 3.0, 0.11 s with 2.0.
    factor = max(1, int(1.0 / scale / _REDUCING_GAP))
    return _box_reduced(rgb, factor).resize(size, Image.Resampling.LANCZOS)


_REDUCING_GAP = 2.0
_REDUCE_BAND_PX = 1 << 19  # source pixels per band of the box reduction and of written pictures


def _box_reduced(rgb: NDArray[np.uint8] | IndexedImage, factor: int) -> Image.Image:
    """``Image.reduce(factor)`` of an (H, W, 3) image, band by band (band heights are multiples of ``factor``)."""
    h, w = rgb.shape[:2]
    factor = max(1, factor)
    band = factor * max(1, _REDUCE_BAND_PX // (w * factor))
    out = Image.new("RGB", (-(-w // factor), -(-h // factor)))
    packed = isinstance(rgb, IndexedImage) and rgb.values.dtype == np.uint8
    for y0 in range(0, h, band):
        y1 = min(h, y0 + band)
        if packed:
            part = Image.frombuffer("RGB", (w, y1 - y0), rgb.packed_rows(y0, y1), "raw", "RGBX", 0, 1)
        else:
            part = Image.fromarray(np.ascontiguousarray(rgb[y0:y1]), mode="RGB")
        out.paste(part.reduce(factor) if factor > 1 else part, (0, y0 // factor))
    return out


def rgb_bands(rgb: NDArray[np.uint8] | IndexedImage) -> Iterator[NDArray[np.uint8]]:
    """Yield an (H, W, 3) uint8 array or :class:`IndexedImage` as bands of rows, top to bottom.

    For :func:`inkshift.report.png.write_png_bands`: an IndexedImage is
    expanded one band at a time.
    """
    rgb = _check_rgb_image(rgb, "picture")
    h, w = rgb.shape[:2]
    band = max(1, _REDUCE_BAND_PX // w)
    packed = isinstance(rgb, IndexedImage) and rgb.values.dtype == np.uint8
    for y0 in range(0, h, band):
        y1 = min(h, y0 + band)
        yield rgb.packed_rows(y0, y1).view(np.uint8).reshape(y1 - y0, w, 4)[..., :3] if packed else rgb[y0:y1]


def side_by_side(
    screen_rgb: NDArray[np.uint8] | IndexedImage,
    print_rgb: NDArray[np.uint8] | IndexedImage,
    swatches: Sequence[Swatch],
    *,
    max_width: int = 2400,
) -> Image.Image:
    """Return the chart on screen and in simulated print side by side, with palette swatches.

    Parameters
    ----------
    screen_rgb, print_rgb
        (H, W, 3) uint8 sRGB renderings of the chart on screen and of its simulated
        print (arrays or :class:`~inkshift.chart.unique.IndexedImage`).
    swatches
        Palette colours drawn under the previews as screen | print pairs with hex,
        ΔE00 and marks in words, wrapping to as many rows as needed.
    max_width
        Width limit of the whole picture in pixels; the previews are scaled down
        (LANCZOS) to fit, small charts enlarged by a whole factor (nearest neighbour).

    Returns
    -------
    PIL.Image.Image
        An RGB picture at most ``max_width`` pixels wide.
    """
    screen_rgb = _check_rgb_image(screen_rgb, "side-by-side: screen image")
    print_rgb = _check_rgb_image(print_rgb, "side-by-side: print image")
    if screen_rgb.shape != print_rgb.shape:
        raise InputError(f"side-by-side: screen image {screen_rgb.shape} and print image {print_rgb.shape} differ in size")
    max_width = int(max_width)
    min_width = 2 * SIDE_MIN_PREVIEW_PX
    if max_width < min_width:
        raise InputError(f"side-by-side: max_width must be at least {min_width} pixels, got {max_width}")
    margin = font_size_for_width(max_width, SHEET_FONT_WIDTH_SHARE)
    box_w = (max_width - 3 * margin) // 2
    left = _preview(screen_rgb, box_w, max_width)
    right = _preview(print_rgb, box_w, max_width)
    width = max(min_width, 2 * left.width + 3 * margin)
    font_px = font_size_for_width(width, SHEET_FONT_WIDTH_SHARE)
    font = label_font(font_px)
    lh = line_height(font)

    grid = _swatch_grid(swatches, width - 2 * margin, font_px) if swatches else None
    top = margin + lh + font_px // 3
    height = top + left.height + margin
    if grid is not None:
        height += lh + font_px // 2 + grid.height + margin
    canvas = Image.new("RGB", (width, height), BACKGROUND)
    draw = ImageDraw.Draw(canvas)
    for i, (img, caption) in enumerate(((left, SCREEN_CAPTION), (right, PRINT_CAPTION))):
        x = margin + i * (left.width + margin)
        draw.text((x, margin), fit_text(font, caption, max(left.width, box_w)), fill=TEXT_COLOR, font=font)
        canvas.paste(img, (x, top))
        draw.rectangle([x - 1, top - 1, x + img.width, top + img.height], outline=_OUTLINE, width=1)
    if grid is not None:
        y = top + left.height + margin
        draw.text((margin, y), fit_text(font, SWATCH_KEY, width - 2 * margin), fill=TEXT_COLOR, font=font)
        canvas.paste(grid, (margin, y + lh + font_px // 2))
    return canvas


def swatch_sheet(rows: Sequence[tuple[str, Sequence[Swatch]]], *, max_width: int = 2400) -> Image.Image:
    """Return a sheet of labelled rows of swatch pairs (e.g. 'original' and 'replacement').

    Parameters
    ----------
    rows
        (row label, swatches) in drawing order; a row wraps when it is wider than
        ``max_width``.
    max_width
        Width limit of the sheet in pixels; the sheet is narrower when the rows fit.

    Returns
    -------
    PIL.Image.Image
        An RGB picture.
    """
    max_width = int(max_width)
    if max_width < 2 * SIDE_MIN_PREVIEW_PX:
        raise InputError(f"swatch sheet: max_width must be at least {2 * SIDE_MIN_PREVIEW_PX} pixels, got {max_width}")
    if not rows:
        raise InputError("swatch sheet: no rows to draw")
    font_px = font_size_for_width(max_width, SHEET_FONT_WIDTH_SHARE)
    font = label_font(font_px)
    lh = line_height(font)
    margin = font_px
    inner = max_width - 2 * margin
    grids = [(str(label), _swatch_grid(list(sw), inner, font_px) if sw else None) for label, sw in rows]
    used = max([g.width for _, g in grids if g is not None] + [text_width(font, lab) for lab, _ in grids])
    width = max(2 * SIDE_MIN_PREVIEW_PX, min(max_width, used + 2 * margin))
    height = margin + sum(lh + font_px // 3 + (g.height if g is not None else 0) + margin for _, g in grids)
    canvas = Image.new("RGB", (width, height), BACKGROUND)
    draw = ImageDraw.Draw(canvas)
    draw_y = margin
    for label, grid in grids:
        draw.text((margin, draw_y), fit_text(font, label, width - 2 * margin), fill=TEXT_COLOR, font=font)
        draw_y += lh + font_px // 3
        if grid is not None:
            canvas.paste(grid, (margin, draw_y))
            draw_y += grid.height
        draw_y += margin
    return canvas

