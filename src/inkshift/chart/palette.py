"""Find the colours a chart was drawn with, told apart from blends and noise.

A rendered chart holds far more distinct colours than its author chose: edges
are anti-aliased (each edge pixel mixes the two colours it covers in
proportion to the area covered), and JPEG compression scatters every flat
fill into a cloud of nearby colours. :func:`extract_palette` recovers the
intended colours (fills, lines, markers, text), each with its share of the
image, and explains every other colour as noise around one of them or as a
blend of two of them.

Method (the project's own; the reasoning is given for each step)
----------------------------------------------------------------
1. **Spatial evidence per pixel.** Along each axis a pixel is compared with
   its neighbours in device values (8-bit codes, the space in which the
   renderer mixed colours):

   - *flat*: both neighbours on both axes within :data:`FLAT_TOLERANCE` codes.
     Fills have flat interiors; anti-aliased edges are one or two pixels wide
     and never flat.
   - *core*: on neither axis does the pixel lie strictly *between* its two
     neighbours (every channel inside their range, give or take the
     tolerance, and clearly different from both). An edge blend sits between
     the colours on its two sides; the middle of a thin line or of a text stem
     is an extreme of its neighbourhood, not between.
   - *line*: a core pixel that stands out from both neighbours across a
     horizontal or vertical run of at least :data:`LINE_RUN` similar pixels
     (neighbours at one or two pixels, for lines up to three wide). Axes,
     gridlines and straight chart lines make such runs; text stems are
     shorter, and a halo along a bar's edge has the bar on one side only.
   - *graded*: a flat pixel inside a smooth ramp (:data:`GRADIENT_STEP`).
   Evidence is gathered in strips of rows, so memory stays small.

2. **Fills.** Colours with flat pixels are grouped greedily: the colour with
   the most flat pixels seeds a group that takes every colour within the noise
   radius (:data:`NOISE_CODES`, or :data:`NOISE_DELTA_E` in CIEDE2000); repeat.
   A group is a drawn fill when it has :data:`MIN_FLAT_PIXELS` flat pixels,
   unless most of them are graded (a legend's colour ramp) or it is a halo
   (see :func:`_drop_halos`). Its colour is the per-channel median of its
   flat pixels, re-centred on the whole noise cloud (:data:`REFINE_CODES`):
   the mode for a clean PNG, the centre of the cloud for a JPEG, never the
   mean of its blends.

3. **Lines and strokes.** Colours not explained by a fill are grouped the same
   way, first by line pixels (a *line* colour needs :data:`MIN_LINE_PIXELS`),
   then by core pixels (a *thin-stroke* colour needs :data:`MIN_CORE_PIXELS`):
   text, diagonal lines, small markers in a noisy JPEG. Candidates within the
   noise radius of a better-founded one are merged into it (fill before line
   before stroke).

4. **Noise and blends among thin marks** (:func:`_drop_blends`). A line
   close to a fill (:data:`LINE_NOISE_CODES`), or a stroke close to a fill, a
   line or a stronger stroke (twice the noise radius), is that colour's
   noise. A stroke that lies on the straight segment between two other palette
   colours, in encoded values or in linear light, within
   :data:`BLEND_TOLERANCE` codes and strictly inside the segment
   (:data:`BLEND_MIN_FRACTION`), is a blend. This is the rule for small
   text: each stem of 9-11 px text is under a pixel wide, so its darkest
   pixel is a mix of ink and paper that differs from stem to stem; those
   mixes all lie between the paper and the ink and are dropped, while the ink
   itself (an extreme, never between two other colours) stays when it
   appears anywhere in full (a heading, an axis). Fills and lines are never
   dropped as blends: a stacked bar whose middle segment lies between its
   neighbours in colour still has a flat interior.

5. **Labels.** Every unique colour gets the index of its nearest palette
   colour if within the noise radius (noise folded in), else :data:`BLEND`
   with the two parents and the mixing fraction if it lies on a segment
   between two palette colours, else :data:`OTHER`. The most common colour is
   always in the palette and flagged as the background.

Known limits. Thin marks in a JPEG with 4:2:0 chroma subsampling (the
default) take the chroma of their surroundings, because one chroma sample
covers 2 x 2 pixels: what is found is the paler colour actually stored.
A one-pixel line whose runs are shorter than :data:`LINE_RUN` and whose
colour lies between the paper and another palette colour (short gray dashes
between white and black) is taken for anti-aliasing. A line always rendered
straddling two pixel rows is reported with the colour it shows. Colours
closer than the noise radius are reported as one. Continuous gradients are
not reported (their end colours may be, as thin strokes). Images enlarged
with smooth interpolation have edges several pixels wide and may yield extra
colours.
"""

from __future__ import annotations

from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, replace
from typing import Callable

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.chart.unique import IndexedImage, UniqueColors, as_pixel_map, pack_colors, unique_colors
from inkshift.chunks import WORKERS, for_each_chunk
from inkshift.color.difference import delta_e_1976, delta_e_2000
from inkshift.color.vision import srgb_to_linear
from inkshift.memory import release_freed_memory

__all__ = [
    "Palette",
    "PaletteEvidence",
    "extract_palette",
    "palette_evidence",
    "palette_from_evidence",
    "label_blends",
    "BLEND",
    "OTHER",
    "MAX_COLORS",
    "FLAT_TOLERANCE",
    "NOISE_DELTA_E",
    "NOISE_CODES",
    "REFINE_CODES",
    "MIN_FLAT_PIXELS",
    "MIN_CORE_PIXELS",
    "LINE_RUN",
    "RUN_TOLERANCE",
    "MIN_LINE_PIXELS",
    "LINE_NOISE_CODES",
    "GRADIENT_REACH",
    "GRADIENT_STEP",
    "GRADIENT_SHARE",
    "HALO_REACH",
    "HALO_RIM_SHARE",
    "BLEND_TOLERANCE",
    "BLEND_MIN_FRACTION",
]

MAX_COLORS = 64
"""Most colours each stage (fills, lines, strokes) reports, strongest first.
Chosen by this project: categorical chart palettes stay near a dozen colours
(common practice) and even a stepped heat-map scale rarely needs more than a
few dozen; beyond that the image is not read by its colours (a photograph)."""

BLEND = -1
"""Label of a colour explained as a blend of two palette colours."""
OTHER = -2
"""Label of a colour that is neither a palette colour, its noise, nor a two-colour blend."""

FLAT_TOLERANCE = 6
"""Codes (8-bit, any channel) within which neighbours count as the same colour.
Chosen by this project from measurement: inside the fills of the three sample
charts saved as JPEG quality 85, 99 % of neighbour differences are within 4-8
codes; in lossless PNG they are 0."""

NOISE_DELTA_E = 1.0
"""CIEDE2000 difference under which two colours count as one: about one
just-noticeable difference (common practice for CIEDE2000). Compression noise
is covered by :data:`NOISE_CODES`; either suffices."""

NOISE_CODES = 8
"""Codes (8-bit, largest channel) within which colours are one drawn colour plus
noise. JPEG adds its noise in YCbCr codes, so its size in codes hardly depends on
the colour: inside the fills of the three sample charts saved as JPEG quality 85,
99 % of pixels are within 4-8 codes of the drawn colour (measured by this
project), while in CIEDE2000 the same noise is 1.3-2.1 ΔE00 at the 99th
percentile and larger near black. A ΔE00 radius that large would merge drawn
colours that are near in ΔE00 but far apart in codes, such as sRGB blue
(0, 0, 255) and a violet (60, 0, 255), 2.6 ΔE00 apart, or white and a warm
near-white (244, 243, 240), 2.4 apart."""

REFINE_CODES = 18
"""Codes (largest channel) around a group's colour whose evidence sets its final
colour: the noise of JPEG quality 85 on thin marks and small markers of the test
chart has a standard deviation of 4-12 codes per channel (measured by this
project), so this takes in most of the cloud without reaching a neighbouring
drawn colour."""

MIN_FLAT_PIXELS = 12
"""Flat pixels a fill needs: a marker 6 px across has a flat core of about 12
pixels (chosen by this project)."""

MIN_CORE_PIXELS = 24
"""Core pixels a thin-stroke colour needs (chosen by this project: a few letters
of 10 px text)."""

LINE_RUN = 24
"""Run length (pixels) that makes a core pixel a line pixel: longer than the
stems of text up to about 30 px, shorter than any axis or gridline (chosen by
this project)."""

RUN_TOLERANCE = 12
"""Codes (any channel) within which neighbours continue a run: twice
:data:`FLAT_TOLERANCE`, because JPEG noise along a thin line is stronger than
inside a fill (chosen by this project)."""

LINE_NOISE_CODES = 12
"""Codes (largest channel) within which a line candidate is a fill's compression
ringing rather than a drawn line: beside the one-pixel gridlines of the samples
saved as JPEG quality 85 the ringing reaches 9-11 codes, while a drawn light
gridline lies 16 codes from the palest fill of the fare-mix sample (measured by
this project)."""

MIN_LINE_PIXELS = 48
"""Line pixels a line colour needs: two runs of :data:`LINE_RUN` (chosen by this project)."""

GRADIENT_REACH = 3
GRADIENT_STEP = 3
"""A flat pixel is *graded* when, in some channel, the pixels GRADIENT_REACH away
on both sides differ from it by at least GRADIENT_STEP codes in the same
direction: it sits inside a smooth ramp (a legend's colour bar), not a fill.
JPEG noise of about 2 codes rarely passes (chosen by this project)."""

GRADIENT_SHARE = 0.5
"""Share of graded flat pixels above which a fill group is part of a gradient and
not a drawn colour (chosen by this project)."""

HALO_REACH = 3
"""Pixels from an edge within which JPEG's 4:2:0 chroma subsampling tints a fill
(two chroma samples of 2 x 2 pixels, plus the 8 x 8 transform's ringing; chosen
by this project)."""

HALO_RIM_SHARE = 0.8
"""Share of a fill's flat pixels within :data:`HALO_REACH` of an edge above which a
fill close to a stronger one is taken for a halo (chosen by this project; a
legend swatch 14 px square has 75 %)."""

BLEND_TOLERANCE = 8.0
"""Codes (8-bit, largest channel) a blend may lie off the segment between its
parents: 0.5 for rounding, the rest for JPEG noise on edges (chosen by this
project from the JPEG quality 85 sample charts)."""

BLEND_MIN_FRACTION = 0.04
"""Smallest mixing fraction of a blend; closer to a parent it is that parent's
noise (chosen by this project: 4 % of a full black-white step is 10 codes)."""

_MAX_GROUP_STEPS = 16 * 64  # seeds tried per grouping stage before giving up
_MAX_GROUP_COLORS = 1 << 16  # colours with the most evidence that take part in grouping
_DE_PREFILTER_CODES = 64
"""Codes (largest channel) beyond which two RGB or gray colours are not tested by
ΔE00 for the noise radius: within 1 ΔE00 of each other, two 8-bit sRGB colours
are at most 37 codes apart (measured by this project: the worst case is near
(0, 0, 255)). Not applied to CMYK, where ink mixes 250 codes apart can print
within 1 ΔE00 of each other; the ΔE*ab bound decides there."""
_STRIP_PIXELS = 1 << 19  # pixels per strip when gathering spatial evidence
_CHUNK = 1 << 13  # colours per step when matching colours against the palette
_LABEL_CHUNK = 1 << 17  # unique colours per step of the final labelling
_LAB_CHUNK = 1 << 16  # colours per call of the caller's Lab conversion when there are many
_SORT_COUNT_SHARE = 8  # a chunk's evidence pixels are sorted when fewer than 1/8 of the colour count
_COUNT_CHUNK = 1 << 23  # pixels per step when counting evidence per colour
_PAIRS_PER_STEP = 1 << 20  # colour x palette pairs per step of the nearest-colour search
_SPARSE_SHARE = 0.2  # colour changes between neighbours per pixel above which evidence is computed densely
# Two colours within d ΔE00 are within d * (_DE76_BASE + _DE76_PER_CHROMA * (C1 + C2))
# ΔE*ab (C = C*ab), so the noise test skips pairs farther apart. Derivation from
# Sharma, Wu & Dalal (2005): ΔE*ab <= the distance in a' b' (a' = (1 + G) a*,
# one G per pair); |ΔL'| / S_L <= ΔE00 with S_L <= 1.75; the chroma and hue terms
# y, z satisfy y^2 + z^2 + R_T y z <= ΔE00^2 with |R_T| <= 2 sin 60° (R_C <= 2,
# Δθ <= 30°), so |(y, z)| <= ΔE00 / sqrt(1 - sin 60°) = 2.73 ΔE00; S_C = 1 + 0.045 C̄'
# and S_H <= 1 + 0.015 * 1.93 C̄' <= S_C (T <= 1.93); C̄' <= 0.75 (C1 + C2) (G <= 0.5).
# Hence 1.75 + 2.73 (1 + 0.045 * 0.75 (C1 + C2)); rounded up by 2 %.
_DE76_BASE = 1.02 * (1.75 + 2.73)
_DE76_PER_CHROMA = 1.02 * 2.73 * 0.045 * 0.75
_REFINE_STEPS = 4  # median-shift steps when re-centring a group's colour
_ALL_PAIRS_UP_TO = 16  # palettes up to this size: every pair is tried as a blend's parents
_PARENTS = 8  # larger palettes: pairs among this many nearest colours (Euclidean, codes)


_Group = tuple[NDArray[np.uint8], int, NDArray[np.intp]]  # (colour, evidence, member indices)
_LabFn = Callable[[NDArray[np.uint8]], NDArray[np.float64]]


@dataclass(frozen=True)
class Palette:
    """The drawn colours of a chart.

    Attributes
    ----------
    colors
        ``(K, C)`` uint8 device values, most pixels first.
    lab
        ``(K, 3)`` CIELAB of ``colors`` (from the caller's ``lab`` function).
    counts
        ``(K,)`` pixels of each colour, its noise included, blends excluded.
    shares
        ``(K,)`` ``counts`` over all counted pixels (pixels with alpha 0 are not counted).
    is_background
        ``(K,)`` bool, True for the colour with the most pixels.
    kind
        ``(K,)`` str: ``"fill"``, ``"line"`` or ``"stroke"`` (the evidence that kept it).
    labels
        ``(N,)`` int per unique colour: palette index, :data:`BLEND` or :data:`OTHER`.
    parents
        ``(N, 2)`` int: for blends the two palette indices, else ``-1``.
    mix
        ``(N,)`` float: for blends the fraction of ``parents[:, 0]`` in encoded
        device values (``color ≈ mix * p0 + (1 - mix) * p1``), else NaN.
        Without blends (``extract_palette(..., blends=False)``) ``parents`` and
        ``mix`` are read-only views of -1 and NaN; :func:`label_blends` returns
        a palette with real arrays.
    """

    colors: NDArray[np.uint8]
    lab: NDArray[np.float64]
    counts: NDArray[np.int64]
    shares: NDArray[np.float64]
    is_background: NDArray[np.bool_]
    kind: NDArray[np.str_]
    labels: NDArray[np.int16]
    parents: NDArray[np.int64]
    mix: NDArray[np.float64]

    def __len__(self) -> int:
        return int(self.colors.shape[0])


def extract_palette(
    pixels: ArrayLike,
    lab: Callable[[NDArray[np.uint8]], NDArray[np.float64]],
    *,
    alpha: ArrayLike | None = None,
    unique: UniqueColors | None = None,
    unique_lab: ArrayLike | None = None,
    blends: bool = True,
) -> Palette:
    """Return the colours a chart was drawn with (see the module docstring).

    Parameters
    ----------
    pixels
        ``(H, W, C)`` uint8 device values (C = 1, 3 or 4).
    lab
        ``lab(colors (M, C) uint8) -> (M, 3)`` CIELAB; the caller's screen
        conversion. With many colours it is called on chunks, from two threads
        at once, and its results are kept in float32 (ample for telling drawn
        colours apart; differences are computed in float64).
    alpha
        ``(H, W)`` uint8 or None. Pixels with alpha 0 are ignored; partly
        transparent pixels are counted but give no spatial evidence.
    unique
        The image's :class:`~inkshift.chart.unique.UniqueColors`, if already computed.
    unique_lab
        ``lab(unique.colors)``, if already computed.
    blends
        Also find the two parents and the mix of every blend
        (:func:`label_blends`). Counts and shares do not depend on it; on a
        photograph with millions of colours it is most of the work, so
        callers that only need the palette pass False.

    Returns
    -------
    Palette
    """
    pixels = np.asarray(pixels)
    u = unique if unique is not None else unique_colors(pixels)
    return palette_from_evidence(
        u, palette_evidence(pixels, u, alpha=alpha), lab, unique_lab=unique_lab, blends=blends
    )


@dataclass(frozen=True)
class PaletteEvidence:
    """Step 1 per unique colour: the pixels that count and their spatial evidence.

    Attributes
    ----------
    totals
        Pixels of each colour that count (alpha above 0): ``unique.counts``
        when there is no alpha.
    flat, core, line, graded, rim
        Pixels of each colour with that evidence (module docstring, step 1),
        uint16 where every count fits, else int32; ``rim`` counts flat pixels
        within :data:`HALO_REACH` of an edge.
    """

    totals: NDArray[np.integer]
    flat: NDArray[np.integer]
    core: NDArray[np.integer]
    line: NDArray[np.integer]
    graded: NDArray[np.integer]
    rim: NDArray[np.integer]


def palette_evidence(
    pixels: ArrayLike | IndexedImage, unique: UniqueColors, *, alpha: ArrayLike | None = None
) -> PaletteEvidence:
    """Return step 1 of :func:`extract_palette`: the spatial evidence per unique colour.

    The only step that reads the pixels, a band of rows at a time; they may be
    given as ``IndexedImage(unique.colors, unique.inverse, shape)``, so that a
    caller short of memory can let the pixel array go once the unique colours
    are known.
    """
    pixels = as_pixel_map(pixels)
    if pixels.dtype != np.uint8 or pixels.ndim != 3 or pixels.shape[2] not in (1, 3, 4):
        raise ValueError(f"extract_palette needs (H, W, C) uint8 pixels, got {pixels.dtype} {pixels.shape}")
    h, w, _ = pixels.shape
    n = len(unique)
    if alpha is None:
        evidence_ok = None
        totals = unique.counts
    else:
        a = np.asarray(alpha).reshape(-1)
        evidence_ok = (a == 255).reshape(h, w)
        totals = np.bincount(unique.inverse[a > 0], minlength=n).astype(np.int64)
    return PaletteEvidence(totals, *_evidence_counts(pixels, evidence_ok, unique.inverse, totals))


def palette_from_evidence(
    unique: UniqueColors,
    evidence: PaletteEvidence,
    lab: Callable[[NDArray[np.uint8]], NDArray[np.float64]],
    *,
    unique_lab: ArrayLike | None = None,
    blends: bool = True,
) -> Palette:
    """Return steps 2-5 of :func:`extract_palette` from the evidence of step 1 (same parameters)."""
    u = unique
    n, c = len(u), u.colors.shape[1]
    totals = evidence.totals
    flat_n, core_n, line_n, graded_n, rim_n = evidence.flat, evidence.core, evidence.line, evidence.graded, evidence.rim
    del evidence  # each count is dropped as soon as its step is done (millions of colours)
    # With millions of colours (a photograph) the Lab of every colour and the
    # evidence are the largest arrays of this step; the pixels are not needed.
    ulab = np.asarray(unique_lab) if unique_lab is not None else _lab_of_many(lab, u.colors)

    # Step 2: fills.
    free = totals > 0
    fills = _group(u.colors, ulab, flat_n, free, MIN_FLAT_PIXELS)
    fills = [g for g in fills if graded_n[g[2]].sum() < GRADIENT_SHARE * g[1]]
    fills = _drop_halos(fills, rim_n, lab)
    del flat_n, graded_n, rim_n
    cand_colors = [g[0] for g in fills]
    cand_kind = ["fill"] * len(fills)
    cand_strength = [float(g[1]) for g in fills]
    members_taken = np.zeros(n, bool)
    for g in fills:
        members_taken[g[2]] = True

    # Step 3: lines, then strokes, among colours not already explained by a fill.
    near_fill = np.zeros(n, bool)
    if cand_colors:
        fill_colors = np.array(cand_colors, np.uint8)
        fill_lab = np.asarray(lab(fill_colors), np.float64)
        for col, flab in zip(fill_colors, fill_lab):
            near_fill |= _same(u.colors, ulab, col, flab)
    free = (totals > 0) & ~near_fill & ~members_taken
    line_groups = _group(u.colors, ulab, line_n, free, MIN_LINE_PIXELS)
    del line_n
    for col, strength, members in line_groups:
        cand_colors.append(col)
        cand_kind.append("line")
        cand_strength.append(float(strength))
        free[members] = False
    strokes = _group(u.colors, ulab, core_n, free, MIN_CORE_PIXELS)
    del core_n
    for col, strength, _members in strokes:
        cand_colors.append(col)
        cand_kind.append("stroke")
        cand_strength.append(float(strength))

    # The most common colour is always in the palette (a tiny or uniform image
    # may have no evidence at all).
    top = int(np.argmax(totals))
    covered = False
    if cand_colors:
        cand = np.array(cand_colors, np.uint8)
        cand_lab = np.asarray(lab(cand), np.float64)
        covered = any(
            bool(_same(u.colors[top : top + 1], ulab[top : top + 1], col, clab)[0])
            for col, clab in zip(cand, cand_lab)
        )
    if not covered:
        cand_colors.append(u.colors[top])
        cand_kind.append("fill")
        cand_strength.append(float(totals[top]))

    colors = np.array(cand_colors, dtype=np.uint8).reshape(-1, c)
    kinds = np.array(cand_kind)
    strength = np.array(cand_strength)

    # Merge candidates that came out within the noise radius of each other.
    colors, kinds, strength = _merge_close(colors, kinds, strength, lab)

    # Step 4: drop thin-stroke candidates that are blends of two others.
    colors, kinds = _drop_blends(colors, kinds, strength, lab)

    # Step 5: labels for every unique colour, then counts and shares.
    del free, near_fill, members_taken
    plab = np.asarray(lab(colors), dtype=np.float64)
    labels = _noise_labels(u.colors, ulab, colors, plab)
    k = colors.shape[0]
    sel = labels >= 0
    counts = np.bincount(labels[sel], weights=totals[sel], minlength=k).astype(np.int64)
    order = np.lexsort((np.arange(k), -counts))
    remap = np.empty(k, np.int16)
    remap[order] = np.arange(k)
    labels[sel] = remap[labels[sel]]
    colors, plab, counts, kinds = colors[order], plab[order], counts[order], kinds[order]
    total = int(totals.sum())
    shares = counts / total if total else np.zeros(k)
    is_background = np.zeros(k, bool)
    if k:
        is_background[0] = True
    palette = Palette(
        colors=colors,
        lab=plab,
        counts=counts,
        shares=shares,
        is_background=is_background,
        kind=kinds,
        labels=labels,
        # Read-only views of one value until label_blends fills them: with
        # millions of colours, real arrays would take 24 bytes a colour.
        parents=np.broadcast_to(np.int64(-1), (labels.size, 2)),
        mix=np.broadcast_to(np.float64(np.nan), (labels.size,)),
    )
    return label_blends(palette, u.colors) if blends else palette


def _lab_of_many(lab: _LabFn, colors: NDArray[np.uint8]) -> NDArray[np.floating]:
    """``lab(colors)`` in chunks, kept as float32 when there are many colours.

    12 bytes a colour is ample for telling drawn colours apart (differences are
    computed in float64 from it), and the caller's conversion makes float64
    temporaries several times its output, so it runs chunk by chunk.
    """
    if colors.shape[0] <= _LAB_CHUNK:
        return np.asarray(lab(colors), dtype=np.float64)
    out = np.empty((colors.shape[0], 3), np.float32)

    def run(s: int) -> None:
        out[s : s + _LAB_CHUNK] = lab(colors[s : s + _LAB_CHUNK])

    for_each_chunk(run, colors.shape[0], _LAB_CHUNK)
    return out


def _evidence_counts(
    pixels: NDArray[np.uint8], evidence_ok: NDArray[np.bool_] | None, inverse: NDArray[np.int32], totals: NDArray[np.int64]
) -> tuple[NDArray[np.integer], ...]:
    """Per unique colour: flat, core, line, graded and rim pixel counts (see :func:`_narrowed`).

    ``totals`` are the pixels of each colour that count (alpha above 0).

    Works in strips of rows with :data:`LINE_RUN` rows of overlap on each side,
    which is enough for every neighbourhood test and for deciding whether a
    vertical run reaches LINE_RUN; memory then stays proportional to one strip
    plus one byte of flags per pixel.
    """
    h, w, _ = pixels.shape
    step = max(64, _STRIP_PIXELS // max(w, 1))
    halo = LINE_RUN
    # With many colours (a photograph), one byte of flags per pixel, counted per
    # colour at the end: a per-strip bincount would clear an array as long as
    # the colour list every time, which costs more than the tests themselves.
    n = totals.size
    per_strip = n <= _STRIP_PIXELS  # few colours: count each strip at once, no flags
    flags = np.zeros(0 if per_strip else h * w, np.uint8)
    n_bits = 5 if evidence_ok is None else 6  # the sixth marks pixels that give evidence

    def strip(s0: int) -> list[NDArray[np.int64]] | None:
        s1 = min(h, s0 + step)
        w0, w1 = max(0, s0 - halo), min(h, s1 + halo)
        ok = None if evidence_ok is None else evidence_ok[w0:w1]
        keys = inverse[w0 * w : w1 * w].reshape(w1 - w0, w)
        flat, core, line, graded = _pixel_evidence(pixels[w0:w1], ok, keys)
        rim = flat & _near(~flat, HALO_REACH)
        inner = slice(s0 - w0, s1 - w0)
        okr = np.ones((s1 - s0, w), bool) if ok is None else ok[inner]
        masks = (okr & ~flat[inner], okr & ~core[inner], line[inner], graded[inner], rim[inner], okr)[:n_bits]
        if per_strip:
            inv = inverse[s0 * w : s1 * w]
            return [np.bincount(inv[mask.reshape(-1)], minlength=n) for mask in masks]
        f = flags[s0 * w : s1 * w].reshape(s1 - s0, w)
        for bit, mask in enumerate(masks):
            f |= mask.view(np.uint8) << np.uint8(bit)
        return None

    def count_bit(bit: int) -> NDArray[np.int32]:
        # Gathering and counting cost grows with the pixels selected, so a bit
        # set on most pixels (in a photograph, "not flat") is counted through
        # its complement: every pixel gives evidence when there is no alpha.
        m = np.uint8(1 << bit)
        chunks = range(0, flags.size, _COUNT_CHUNK)
        set_n = sum(int(np.count_nonzero(flags[c0 : c0 + _COUNT_CHUNK] & m)) for c0 in chunks)
        complement = evidence_ok is None and 2 * set_n > flags.size
        total = np.zeros(n, np.int32)
        for c0 in chunks:
            part = flags[c0 : c0 + _COUNT_CHUNK] & m
            pick = (part == 0) if complement else (part != 0)
            idx = inverse[c0 : c0 + _COUNT_CHUNK][pick]
            del part, pick
            if idx.size * _SORT_COUNT_SHARE < n:
                # Few pixels: sorting them beats a count array as long as the colour list.
                colours, k = np.unique(idx, return_counts=True)
                total[colours] += k.astype(np.int32)
            else:
                total += np.bincount(idx, minlength=n)
        if complement:
            np.subtract(totals, total, out=total, casting="unsafe")  # counts fit int32 (< 2**31 pixels)
        return total

    # Strips are independent (each writes its own rows of flags), and numpy
    # releases the GIL inside its array operations: two threads share them.
    out = [np.zeros(n if per_strip else 0, np.int64) for _ in range(n_bits)]
    with ThreadPoolExecutor(max_workers=WORKERS) as pool:
        for counts in pool.map(strip, range(0, h, step)):
            if counts is not None:
                for total, c in zip(out, counts):
                    total += c
    release_freed_memory()  # the strips' temporaries, before the counts are made
    if not per_strip:
        # Counted below one bit at a time (each count makes an int64 array as long
        # as the colour list); the pixels that give evidence first, if not all do.
        out = [np.zeros(0, np.int32)] * 5 + ([count_bit(5)] if n_bits == 6 else [])
    counted = totals if evidence_ok is None else out[5]
    result = []
    for bit in range(5):
        counts = out[bit].astype(np.int32, copy=False) if per_strip else count_bit(bit)
        out[bit] = None
        if bit < 2:  # flat and core pixels are the rule in a chart: the exceptions were counted
            np.subtract(counted, counts, out=counts, casting="unsafe")
        result.append(_narrowed(counts))
    return tuple(result)


def _narrowed(counts: NDArray[np.int32]) -> NDArray[np.uint16] | NDArray[np.int32]:
    """``counts`` (all >= 0) as uint16 when they fit: half the memory for a photograph's millions of colours."""
    if counts.size == 0 or int(counts.max()) <= np.iinfo(np.uint16).max:
        return counts.astype(np.uint16)
    return counts


def _pixel_evidence(
    pixels: NDArray[np.uint8], evidence_ok: NDArray[np.bool_] | None, keys: NDArray | None = None
) -> tuple[NDArray[np.bool_], NDArray[np.bool_], NDArray[np.bool_], NDArray[np.bool_]]:
    """Flat, core, line and graded masks (H, W); see step 1 of the module docstring.

    ``keys`` (H, W) are equal exactly where pixels are equal (packed colours or
    colour indices). Along each axis only the pixels with a different colour
    within :data:`GRADIENT_REACH` are examined channel by channel; every other
    pixel is flat, core and not between, sandwiched or graded along that axis.
    """
    h, w, c = pixels.shape
    if keys is None:
        keys = pack_colors(pixels)
    keys = keys.reshape(h, w)
    changes = np.count_nonzero(keys[:, 1:] != keys[:, :-1]) + np.count_nonzero(keys[1:] != keys[:-1])
    if changes > _SPARSE_SHARE * h * w:
        # Busy (a photograph, a JPEG): shifted whole arrays beat gathers.
        return _pixel_evidence_dense(pixels, evidence_ok)
    flat = np.ones((h, w), bool)
    core = np.ones((h, w), bool)
    graded = np.zeros((h, w), bool)
    sandwiched = []
    breaks = []
    flat_px = np.ascontiguousarray(pixels).reshape(-1, c)
    for axis in (0, 1):
        idx, ev = _axis_evidence(flat_px, keys, (h, w), axis)
        far = ev["prev_far"] & ev["next_far"]
        flat.reshape(-1)[idx[ev["prev_far"] | ev["next_far"]]] = False
        core.reshape(-1)[idx[far & ev["inside"]]] = False
        graded.reshape(-1)[idx[ev["graded"]]] = True
        sw = np.zeros((h, w), bool)
        sw.reshape(-1)[idx[ev["sandwiched"]]] = True
        sandwiched.append(sw)
        breaks.append(idx[ev["next_apart"]])
    # A line pixel runs along one axis and is sandwiched across it.
    line = np.zeros((h, w), bool)
    for run_axis, across in ((1, 0), (0, 1)):
        cand = np.flatnonzero(core & sandwiched[across])
        if cand.size:
            long_ = _run_length_at(breaks[run_axis], cand, (h, w), run_axis) >= LINE_RUN
            line.reshape(-1)[cand[long_]] = True
    graded &= flat
    if evidence_ok is not None:
        flat &= evidence_ok
        core &= evidence_ok
        line &= evidence_ok
        graded &= evidence_ok
    return flat, core, line, graded


def _pixel_evidence_dense(
    pixels: NDArray[np.uint8], evidence_ok: NDArray[np.bool_] | None
) -> tuple[NDArray[np.bool_], NDArray[np.bool_], NDArray[np.bool_], NDArray[np.bool_]]:
    """:func:`_pixel_evidence` on whole shifted arrays, for busy images (photographs, JPEGs)."""
    h, w, c = pixels.shape
    flat = np.ones((h, w), bool)
    core = np.ones((h, w), bool)
    graded = np.zeros((h, w), bool)
    runs = []
    sandwiched = []
    tol = FLAT_TOLERANCE
    for axis in (0, 1):
        prev_far = np.zeros((h, w), bool)  # some channel differs from the previous neighbour
        next_far = np.zeros((h, w), bool)
        next_apart = np.zeros((h, w), bool)  # differs from the next by more than the run tolerance
        inside = np.ones((h, w), bool)  # every channel within the neighbours' range
        # Largest-channel distances to the neighbours at 1 and 2 pixels, and between them.
        dist = {key: np.zeros((h, w), np.int16) for key in ("p1", "n1", "pn1", "p2", "n2", "pn2")}
        for ch in range(c):
            x = pixels[..., ch].astype(np.int16)
            a, b = _reach(x, axis, 1)  # x[i] - x[i-1], x[i+1] - x[i] (0 past the border)
            aa, ab = np.abs(a), np.abs(b)
            prev_far |= aa > tol
            next_far |= ab > tol
            next_apart |= ab > RUN_TOLERANCE
            inside &= (a.astype(np.int32) * b >= 0) | (np.minimum(aa, ab) <= tol)
            np.maximum(dist["p1"], aa, out=dist["p1"])
            np.maximum(dist["n1"], ab, out=dist["n1"])
            np.maximum(dist["pn1"], np.abs(a + b), out=dist["pn1"])
            a2, b2 = _reach(x, axis, 2)
            np.maximum(dist["p2"], np.abs(a2), out=dist["p2"])
            np.maximum(dist["n2"], np.abs(b2), out=dist["n2"])
            np.maximum(dist["pn2"], np.abs(a2 + b2), out=dist["pn2"])
            r = GRADIENT_REACH
            if x.shape[axis] > 2 * r:
                ar, br = _reach(x, axis, r)
                g = GRADIENT_STEP
                graded |= ((ar >= g) & (br >= g)) | ((ar <= -g) & (br <= -g))
        flat &= ~prev_far & ~next_far
        core &= ~(prev_far & next_far & inside)
        # The pixel stands out from both neighbours more than they differ from
        # each other (at one or two pixels' reach, for lines up to three wide):
        # the middle of a line, not an edge with a halo.
        sw = np.zeros((h, w), bool)
        for k in ("1", "2"):
            p_, n_, pn = dist["p" + k], dist["n" + k], dist["pn" + k]
            sw |= (p_ > tol) & (n_ > tol) & (pn <= np.minimum(p_, n_))
        sandwiched.append(sw)
        runs.append(_run_lengths(~next_apart, axis) >= LINE_RUN)
        del dist
    # A line pixel runs along one axis and is sandwiched across it.
    line = core & ((runs[1] & sandwiched[0]) | (runs[0] & sandwiched[1]))
    graded &= flat
    if evidence_ok is not None:
        flat &= evidence_ok
        core &= evidence_ok
        line &= evidence_ok
        graded &= evidence_ok
    return flat, core, line, graded


def _axis_evidence(
    pixels: NDArray[np.uint8], keys: NDArray | None, shape: tuple[int, int], axis: int
) -> tuple[NDArray[np.intp], dict[str, NDArray[np.bool_]]]:
    """Neighbour tests along ``axis`` for the pixels with a colour change within GRADIENT_REACH.

    Returns the flat indices of those pixels and, for each, prev_far / next_far
    (some channel differs from that neighbour by more than FLAT_TOLERANCE),
    next_apart (by more than RUN_TOLERANCE), inside (every channel within the
    neighbours' range), sandwiched (stands out from both neighbours at one or two
    pixels more than they differ from each other) and graded (GRADIENT_STEP).
    A neighbour past the border counts as equal to the pixel.
    """
    h, w = shape
    n_ax = shape[axis]
    reach = GRADIENT_REACH
    if keys is None:
        active = np.ones(shape, bool)
    else:
        k = keys.reshape(shape)
        change = np.zeros(shape, bool)  # change[i]: pixel i differs from pixel i + 1
        lo = [slice(None), slice(None)]
        hi = [slice(None), slice(None)]
        lo[axis], hi[axis] = slice(0, n_ax - 1), slice(1, n_ax)
        np.not_equal(k[tuple(lo)], k[tuple(hi)], out=change[tuple(lo)])
        active = change.copy()
        for d in range(1, reach + 1):  # changes between j and j + 1 for j in i - reach .. i + reach - 1
            a_, b_ = [slice(None), slice(None)], [slice(None), slice(None)]
            a_[axis], b_[axis] = slice(d, n_ax), slice(0, n_ax - d)
            active[tuple(a_)] |= change[tuple(b_)]
            if d < reach:
                active[tuple(b_)] |= change[tuple(a_)]
    idx = np.flatnonzero(active)
    tol = FLAT_TOLERANCE
    g = GRADIENT_STEP
    pos = idx // w if axis == 0 else idx % w
    stride = w if axis == 0 else 1
    x0 = pixels.take(idx, axis=0).astype(np.int16)  # (m, C)

    def diffs(r: int) -> tuple[NDArray[np.int16], NDArray[np.int16]]:
        """(x[i] - x[i-r], x[i+r] - x[i]) per channel; a neighbour past the border is the pixel."""
        before = pixels.take(np.where(pos >= r, idx - r * stride, idx), axis=0)
        after = pixels.take(np.where(pos + r < n_ax, idx + r * stride, idx), axis=0)
        return x0 - before, after.astype(np.int16) - x0

    def largest(d: NDArray[np.int16]) -> NDArray[np.int16]:
        """Largest absolute value over the channels (column by column: faster than a reduction over a short axis)."""
        out = np.abs(d[:, 0])
        for ch in range(1, d.shape[1]):
            np.maximum(out, np.abs(d[:, ch]), out=out)
        return out

    a, b = diffs(1)
    p1, n1 = largest(a), largest(b)
    prev_far = p1 > tol
    next_far = n1 > tol
    next_apart = n1 > RUN_TOLERANCE
    inside = np.ones(idx.size, bool)
    for ch in range(a.shape[1]):
        ac, bc = a[:, ch], b[:, ch]
        inside &= (ac.astype(np.int32) * bc >= 0) | (np.minimum(np.abs(ac), np.abs(bc)) <= tol)
    pn1 = largest(a + b)
    a2, b2 = diffs(2)
    p2, n2, pn2 = largest(a2), largest(b2), largest(a2 + b2)
    graded = np.zeros(idx.size, bool)
    if n_ax > 2 * reach:
        ar, br = diffs(reach)
        for ch in range(ar.shape[1]):
            arc, brc = ar[:, ch], br[:, ch]
            graded |= ((arc >= g) & (brc >= g)) | ((arc <= -g) & (brc <= -g))
    sandwiched = np.zeros(idx.size, bool)
    for p_, n_, pn in ((p1, n1, pn1), (p2, n2, pn2)):
        sandwiched |= (p_ > tol) & (n_ > tol) & (pn <= np.minimum(p_, n_))
    return idx, {
        "prev_far": prev_far,
        "next_far": next_far,
        "next_apart": next_apart,
        "inside": inside,
        "sandwiched": sandwiched,
        "graded": graded,
    }


def _run_length_at(
    apart: NDArray[np.intp], query: NDArray[np.intp], shape: tuple[int, int], axis: int
) -> NDArray[np.intp]:
    """Length of the run along ``axis`` holding each ``query`` pixel (flat indices).

    Runs are broken after every pixel in ``apart`` (flat indices of pixels that
    differ from the next one along the axis by more than RUN_TOLERANCE) and at
    the border.
    """
    h, w = shape
    if axis == 1:
        order = lambda i: i  # noqa: E731  (row-major position)
        ends = np.arange(w - 1, h * w, w, dtype=np.intp)
    else:
        order = lambda i: (i % w) * h + i // w  # noqa: E731  (column-major position)
        ends = np.arange(h - 1, h * w, h, dtype=np.intp)
    b = np.sort(np.concatenate([order(apart), ends]))  # repeats do no harm below
    q = order(query)
    k = np.searchsorted(b, q, side="left")
    prev = np.where(k > 0, b[np.maximum(k - 1, 0)], -1)
    return b[k] - prev


def _near(mask: NDArray[np.bool_], reach: int) -> NDArray[np.bool_]:
    """Pixels within ``reach`` (Chebyshev distance) of a True pixel of ``mask``."""
    out = mask.copy()
    for axis in (0, 1):
        src = out.copy()
        n = src.shape[axis]
        for k in range(1, min(reach, n - 1) + 1):
            lo = [slice(None), slice(None)]
            hi = [slice(None), slice(None)]
            lo[axis], hi[axis] = slice(0, n - k), slice(k, n)
            out[tuple(lo)] |= src[tuple(hi)]
            out[tuple(hi)] |= src[tuple(lo)]
    return out


def _drop_halos(groups: list[_Group], rim_n: NDArray[np.integer], lab: _LabFn) -> list[_Group]:
    """Drop fill groups that are compression halos or wide blends of stronger fills.

    A group whose flat pixels lie almost all (:data:`HALO_RIM_SHARE`) within
    :data:`HALO_REACH` pixels of an edge is not a colour of its own when its
    colour is within twice the noise radius of a stronger fill (the tint JPEG's
    chroma subsampling leaves beside a saturated edge) or lies between two
    stronger fills (an anti-aliased edge enlarged so much that its blend
    pixels became flat).
    """
    if not groups:
        return groups
    colors = np.array([g[0] for g in groups], np.uint8)
    glab = np.asarray(lab(colors), np.float64)
    keep: list[int] = []
    for i, (_col, flat_total, members) in enumerate(groups):
        rim = float(rim_n[members].sum())
        if keep and rim >= HALO_RIM_SHARE * flat_total:
            ref = np.array(keep)
            codes = np.abs(colors[ref].astype(np.int16) - colors[i].astype(np.int16)).max(axis=1)
            d00 = delta_e_2000(glab[ref], glab[i])
            if np.any((codes <= 2 * NOISE_CODES) | (d00 <= 2 * NOISE_DELTA_E)):
                continue
            if ref.size >= 2 and _best_pair(colors[i : i + 1], colors[ref], nearest_only=False)[2][0] <= BLEND_TOLERANCE:
                continue  # a blend wide enough to have flat pixels (an enlarged image)
        keep.append(i)
    return [groups[i] for i in keep]


def _reach(x: NDArray[np.int16], axis: int, r: int) -> tuple[NDArray[np.int16], NDArray[np.int16]]:
    """(x[i] - x[i-r], x[i+r] - x[i]) along ``axis``, 0 where the neighbour is outside."""
    before = np.zeros_like(x)
    after = np.zeros_like(x)
    n = x.shape[axis]
    if n > r:
        hi = [slice(None), slice(None)]
        lo = [slice(None), slice(None)]
        hi[axis], lo[axis] = slice(r, n), slice(0, n - r)
        d = x[tuple(hi)] - x[tuple(lo)]
        before[tuple(hi)] = d
        after[tuple(lo)] = d
    return before, after


def _run_lengths(joined: NDArray[np.bool_], axis: int) -> NDArray[np.int32]:
    """Length of the run each pixel belongs to; ``joined[i]`` links pixel i to i+1 along ``axis``."""
    j = joined if axis == 1 else joined.T
    j = np.ascontiguousarray(j)
    j[:, -1] = False  # runs end at the image border
    flat = j.reshape(-1)
    starts = np.empty(flat.size, bool)
    starts[0] = True
    starts[1:] = ~flat[:-1]
    run_id = np.cumsum(starts, dtype=np.int32) - 1
    lengths = np.bincount(run_id).astype(np.int32)
    out = lengths[run_id].reshape(j.shape)
    return out if axis == 1 else out.T


def _group(
    colors: NDArray[np.uint8],
    ulab: NDArray[np.floating],
    evidence: NDArray[np.integer],
    free: NDArray[np.bool_],
    minimum: int,
) -> list[_Group]:
    """Greedy grouping by evidence; returns (colour, evidence, members) of groups >= minimum.

    The loop runs once per group (not per colour); groups below ``minimum`` are
    consumed without being kept, and the loop stops when the evidence left in
    all free colours together is below ``minimum``, after :data:`MAX_COLORS`
    groups, or after ``_MAX_GROUP_STEPS`` seeds (a photograph, not a chart).
    Only the ``_MAX_GROUP_COLORS`` colours with the most evidence take part,
    which bounds the work on images with a million colours; a chart's
    evidence sits in far fewer.
    """
    pool = _strongest(evidence, free & (evidence > 0), _MAX_GROUP_COLORS)
    cols, labs, ev = colors[pool], ulab[pool], evidence[pool].astype(np.int64)
    open_ = np.ones(pool.size, bool)
    out: list[_Group] = []
    for _ in range(_MAX_GROUP_STEPS):
        left = np.flatnonzero(open_)
        if left.size == 0 or int(ev[left].sum()) < minimum or len(out) >= MAX_COLORS:
            break
        seed = left[np.argmax(ev[left])]
        members_idx = left[_same(cols[left], labs[left], cols[seed], labs[seed])]
        open_[members_idx] = False
        total = int(ev[members_idx].sum())
        if total < minimum:
            continue
        # Indices, not an n-long mask: a photograph can yield MAX_COLORS groups
        # over millions of colours.
        members = pool[members_idx]
        # Re-centre among the colours no stronger group has claimed.
        claimable = open_.copy()
        claimable[members_idx] = True
        rep = _refine(cols, np.where(claimable, ev, 0), _weighted_median(cols[members_idx], ev[members_idx]))
        out.append((rep, total, members))
    return out


def _strongest(evidence: NDArray[np.integer], candidates: NDArray[np.bool_], k: int) -> NDArray[np.intp]:
    """Indices of the ``k`` candidates with the most evidence (ties at the cut: lowest indices), ascending.

    Found through the k-th largest value rather than an argsort or argpartition
    of every candidate: a photograph has millions, and their int64 indices
    would be the largest temporaries of the palette.
    """
    n_candidates = int(np.count_nonzero(candidates))
    if n_candidates <= k:
        return np.flatnonzero(candidates)
    values = evidence[candidates]
    cut = np.partition(values, n_candidates - k)[n_candidates - k]
    del values
    above = np.flatnonzero(candidates & (evidence > cut))
    at_cut = np.flatnonzero(candidates & (evidence == cut))[: k - above.size]
    return np.sort(np.concatenate([above, at_cut]))


def _refine(colors: NDArray[np.uint8], ev: NDArray[np.int64], rep: NDArray[np.uint8]) -> NDArray[np.uint8]:
    """Re-centre a group's colour on the median of the evidence within REFINE_CODES of it.

    The seed of a group is its most frequent colour, which in a JPEG is just
    one draw from the noise cloud; the median of the whole cloud is the drawn
    colour (a few steps of a median shift, at most ``_REFINE_STEPS``).
    """
    # Colours that any step could reach: within REFINE_CODES of every step's
    # centre, and the centre moves by at most REFINE_CODES per step.
    reach = (_REFINE_STEPS + 1) * REFINE_CODES
    has = np.flatnonzero(ev > 0)
    has = has[_code_distance(colors[has], rep) <= reach]
    cols = colors[has].astype(np.int16)
    w = ev[has]
    for _ in range(_REFINE_STEPS):
        near = _code_distance(cols, rep) <= REFINE_CODES
        if not near.any():
            break
        new = _weighted_median(cols[near].astype(np.uint8), w[near])
        if np.array_equal(new, rep):
            break
        rep = new
    return rep


def _same(
    colors: NDArray[np.uint8], lab: NDArray[np.float64], color: NDArray[np.uint8], lab1: NDArray[np.float64]
) -> NDArray[np.bool_]:
    """True where ``colors`` are within the noise radius of ``color`` (codes or ΔE00)."""
    codes = _code_distance(colors, color)
    out = codes <= NOISE_CODES
    maybe = ~out if colors.shape[1] == 4 else ~out & (codes <= _DE_PREFILTER_CODES)
    maybe = np.flatnonzero(maybe)
    # In chunks: in a photograph most colours pass the prefilter, and ΔE00
    # makes a dozen float64 temporaries per colour. ΔE00 only where the ΔE*ab
    # bound (see _DE76_BASE) allows a ΔE00 within the noise radius.
    c1 = float(np.hypot(lab1[1], lab1[2]))
    for s in range(0, maybe.size, _CHUNK * 8):
        part = maybe[s : s + _CHUNK * 8]
        near = np.asarray(lab[part], np.float64)
        reach = NOISE_DELTA_E * (_DE76_BASE + _DE76_PER_CHROMA * (np.hypot(near[:, 1], near[:, 2]) + c1))
        close = delta_e_1976(near, lab1) <= reach
        out[part[close]] = delta_e_2000(near[close], lab1) <= NOISE_DELTA_E
    return out


def _code_distance(colors: NDArray[np.integer], color: NDArray[np.integer]) -> NDArray[np.int16]:
    """Largest-channel code distance of each of ``colors`` (M, C) to ``color`` (C,).

    Column by column: faster than a reduction over the short channel axis.
    """
    out: NDArray[np.int16] | None = None
    for ch in range(colors.shape[1]):
        d = np.abs(colors[:, ch].astype(np.int16) - np.int16(color[ch]))
        out = d if out is None else np.maximum(out, d, out=out)
    return out if out is not None else np.zeros(colors.shape[0], np.int16)


def _weighted_median(colors: NDArray[np.uint8], weights: NDArray[np.int64]) -> NDArray[np.uint8]:
    """Per-channel weighted median (lower median) of 8-bit colours."""
    out = np.empty(colors.shape[1], np.uint8)
    half = weights.sum() / 2.0
    for ch in range(colors.shape[1]):
        hist = np.bincount(colors[:, ch], weights=weights, minlength=256)
        out[ch] = int(np.searchsorted(np.cumsum(hist), half))
    return out


def _nearest(
    lab_a: NDArray[np.floating], lab_b: NDArray[np.float64], within: float | None = None
) -> tuple[NDArray[np.int32], NDArray[np.float64]]:
    """Nearest of ``lab_b`` for each of ``lab_a`` by CIEDE2000.

    The two nearest by ΔE*ab are scored with CIEDE2000 and the better kept; this
    avoids an N x K CIEDE2000 matrix for images with many colours. With
    ``within`` (ΔE00), colours that cannot be that close to any colour of
    ``lab_b`` (see ``_DE76_BASE``) are not scored: they get index -1 and
    distance inf.
    """
    lab_a = np.asarray(lab_a)  # float32 stays float32 here; each chunk is widened below
    lab_b = np.asarray(lab_b, np.float64)
    n, k = lab_a.shape[0], lab_b.shape[0]
    if k == 0:
        return np.full(n, -1, np.int32), np.full(n, np.inf)
    idx = np.empty(n, np.int32)
    dist = np.empty(n)
    c_b = np.hypot(lab_b[:, 1], lab_b[:, 2])
    chunk = max(_CHUNK, _PAIRS_PER_STEP // k)

    def run(s: int) -> None:
        part = np.asarray(lab_a[s : s + chunk], np.float64)
        dab = delta_e_1976(part[:, None, :], lab_b[None, :, :])
        if within is None:
            sel = slice(None)
        else:
            c_a = np.hypot(part[:, 1], part[:, 2])
            reach = within * (_DE76_BASE + _DE76_PER_CHROMA * (c_a[:, None] + c_b[None, :]))
            sel = np.flatnonzero((dab <= reach).any(axis=1))
        dab, part = dab[sel], part[sel]
        top = np.argsort(dab, axis=1)[:, : min(2, k)]
        d00 = delta_e_2000(part[:, None, :], lab_b[top])
        best = np.argmin(d00, axis=1)
        rows = np.arange(part.shape[0])
        i_part = np.full(min(n, s + chunk) - s, -1, np.int32)
        d_part = np.full(i_part.size, np.inf)
        i_part[sel] = top[rows, best]
        d_part[sel] = d00[rows, best]
        idx[s : s + chunk] = i_part
        dist[s : s + chunk] = d_part

    for_each_chunk(run, n, chunk, threads=False)  # its caller shares chunks between threads
    return idx, dist


def _merge_close(
    colors: NDArray[np.uint8], kinds: NDArray[np.str_], strength: NDArray[np.float64], lab: _LabFn
) -> tuple[NDArray[np.uint8], NDArray[np.str_], NDArray[np.float64]]:
    """Fold candidates within the noise radius of a better-founded one into it.

    Fills outrank lines and lines outrank strokes (flat evidence fixes a colour
    more precisely than the middle of a thin mark); within a kind, more
    evidence wins.
    """
    priority = np.select([kinds == "fill", kinds == "line"], [0, 1], 2)
    order = np.lexsort((-strength, priority))
    colors, kinds, strength = colors[order], kinds[order], strength[order]
    plab = np.asarray(lab(colors), np.float64)
    keep = np.ones(colors.shape[0], bool)
    for i in range(colors.shape[0]):
        if not keep[i]:
            continue
        later = np.arange(i + 1, colors.shape[0])
        close = later[keep[later] & _same(colors[later], plab[later], colors[i], plab[i])]
        keep[close] = False
    return colors[keep], kinds[keep], strength[keep]


def _drop_blends(
    colors: NDArray[np.uint8], kinds: NDArray[np.str_], strength: NDArray[np.float64], lab: _LabFn
) -> tuple[NDArray[np.uint8], NDArray[np.str_]]:
    """Drop line and stroke candidates that are noise around, or blends of, other colours.

    Strongest first, a line candidate within :data:`LINE_NOISE_CODES` of a
    fill, and a stroke candidate within twice the noise radius (codes or
    ΔE00) of a fill, a line or a stronger stroke, is taken as that colour:
    thin marks are never free of blending or of compression ringing, so their
    colour is known less precisely than a fill's. Then, weakest first, a
    stroke candidate that lies between two other palette colours (see
    :func:`_best_pair`) is a blend. Lines are never taken for blends: their
    long straight runs are evidence enough.
    """
    keep = np.ones(colors.shape[0], bool)
    plab = np.asarray(lab(colors), np.float64)
    rank = np.empty(colors.shape[0], np.int64)
    rank[np.argsort(-strength, kind="stable")] = np.arange(colors.shape[0])
    for i in np.argsort(-strength, kind="stable"):
        if kinds[i] == "fill":
            continue
        if kinds[i] == "line":
            ref = np.flatnonzero(keep & (kinds == "fill"))
        else:  # strokes: any fill or line, or a stronger stroke
            ref = np.flatnonzero(keep & ((kinds != "stroke") | (rank < rank[i])))
        ref = ref[ref != i]
        if ref.size == 0:
            continue
        codes = np.abs(colors[ref].astype(np.int16) - colors[i].astype(np.int16)).max(axis=1)
        if kinds[i] == "line":
            near = codes <= LINE_NOISE_CODES
        else:
            near = (codes <= 2 * NOISE_CODES) | (delta_e_2000(plab[ref], plab[i]) <= 2 * NOISE_DELTA_E)
        if np.any(near):
            keep[i] = False
    for i in np.argsort(strength, kind="stable"):
        if kinds[i] != "stroke" or not keep[i]:
            continue
        others = np.flatnonzero(keep)
        others = others[others != i]
        if others.size >= 2:
            _, _, resid = _best_pair(colors[i : i + 1], colors[others], nearest_only=False)
            if resid[0] <= BLEND_TOLERANCE:
                keep[i] = False
    return colors[keep], kinds[keep]


def _linear(codes: NDArray[np.float64]) -> NDArray[np.float64]:
    """IEC 61966-2-1 sRGB decoding, expressed again in 0..255 so tolerances stay in codes."""
    return 255.0 * srgb_to_linear(codes / 255.0)


def _best_pair(
    x: NDArray[np.uint8], p: NDArray[np.uint8], nearest_only: bool = True, linear: bool = True
) -> tuple[NDArray[np.int64], NDArray[np.float64], NDArray[np.float64]]:
    """Best two-colour blend explanation of each colour in ``x`` by the colours ``p``.

    All pairs are tried when the palette has at most ``_ALL_PAIRS_UP_TO``
    colours (nearly every chart); beyond that only pairs among the
    ``_PARENTS`` palette colours nearest to each colour (Euclidean, encoded
    values), which keeps the work linear in the palette size. ``linear=False``
    skips the linear-light test.

    Returns (pair (M, 2) indices into p, fraction of the first parent in
    encoded values, residual in codes). The residual is the smaller of the
    largest-channel distance to the segment in encoded values and in linear
    light (sRGB decoding; RGB and gray only: CMYK files are mixed in ink values).
    Pairs whose fraction is not inside [BLEND_MIN_FRACTION, 1 - BLEND_MIN_FRACTION]
    do not count.
    """
    m, k = x.shape[0], p.shape[0]
    pair = np.full((m, 2), -1, np.int64)
    frac = np.full(m, np.nan)
    resid = np.full(m, np.inf)
    if k < 2 or m == 0:
        return pair, frac, resid
    near = (k if k <= _ALL_PAIRS_UP_TO else min(k, _PARENTS)) if nearest_only else k
    j0, j1 = np.triu_indices(near, 1)
    pf = p.astype(np.float64)
    pl = _linear(pf) if linear and p.shape[1] in (1, 3) else None
    for s in range(0, m, _CHUNK):
        xs = x[s : s + _CHUNK].astype(np.float64)
        rows = np.arange(xs.shape[0])[:, None]
        if near == k:
            nearest = np.broadcast_to(np.arange(k), (xs.shape[0], k))
        else:
            dist = np.einsum("mkc,mkc->mk", xs[:, None, :] - pf[None], xs[:, None, :] - pf[None])
            nearest = np.argpartition(dist, near - 1, axis=1)[:, :near]
        ia, ib = nearest[:, j0], nearest[:, j1]  # (m, P) palette indices of each pair
        t_e, r = _segment(xs, pf[ia], pf[ib])
        if pl is not None:
            _, r_lin = _segment(_linear(xs), pl[ia], pl[ib])
            r = np.minimum(r, r_lin)
        ok = (t_e >= BLEND_MIN_FRACTION) & (t_e <= 1.0 - BLEND_MIN_FRACTION)
        r = np.where(ok, r, np.inf)
        best = np.argmin(r, axis=1)
        rb = r[rows[:, 0], best]
        found = np.isfinite(rb)
        pair[s : s + _CHUNK] = np.where(
            found[:, None], np.stack([ia[rows[:, 0], best], ib[rows[:, 0], best]], axis=1), -1
        )
        frac[s : s + _CHUNK] = np.where(found, t_e[rows[:, 0], best], np.nan)
        resid[s : s + _CHUNK] = rb
    return pair, frac, resid


def _segment(
    x: NDArray[np.float64], a: NDArray[np.float64], b: NDArray[np.float64]
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Fraction t of ``a`` for x ≈ t a + (1 - t) b, and the largest-channel residual.

    ``x`` is (m, C); ``a`` and ``b`` are (m, P, C).
    """
    ab = a - b
    denom = np.einsum("mpc,mpc->mp", ab, ab)
    t = np.einsum("mpc,mpc->mp", x[:, None, :] - b, ab) / np.where(denom > 0, denom, 1.0)
    t = np.where(denom > 0, t, np.nan)
    r = np.abs(b + np.clip(t, 0.0, 1.0)[..., None] * ab - x[:, None, :]).max(axis=2)
    return t, np.where(denom > 0, r, np.inf)


def _noise_labels(
    ucolors: NDArray[np.uint8], ulab: NDArray[np.floating], colors: NDArray[np.uint8], plab: NDArray[np.float64]
) -> NDArray[np.int16]:
    """Step 5: palette index of every unique colour that is a palette colour or its noise, else OTHER.

    Each colour is labelled on its own, so the work runs in chunks of colours
    (a photograph has millions; the temporaries stay those of one chunk).
    """
    # int16 holds every label: a palette has at most 3 * MAX_COLORS + 1 colours.
    labels = np.empty(ucolors.shape[0], np.int16)

    def run(s: int) -> None:
        part = slice(s, s + _LABEL_CHUNK)
        labels[part] = _noise_labels_part(ucolors[part], ulab[part], colors, plab)

    for_each_chunk(run, ucolors.shape[0], _LABEL_CHUNK)
    return labels


def _noise_labels_part(
    ucolors: NDArray[np.uint8], ulab: NDArray[np.floating], colors: NDArray[np.uint8], plab: NDArray[np.float64]
) -> NDArray[np.int32]:
    idx, dist = _nearest(ulab, plab, within=NOISE_DELTA_E)
    labels = np.where(dist <= NOISE_DELTA_E, idx, np.int32(OTHER))
    del idx, dist
    # Within NOISE_CODES of a palette colour is its noise too (nearest in codes).
    rest = np.flatnonzero(labels == OTHER)
    if rest.size == 0 or colors.shape[0] == 0:
        return labels
    # Largest-channel code distance to each palette colour through 256-entry
    # tables (uint8, one gather per channel); the first nearest wins ties, as argmin.
    levels = np.arange(256, dtype=np.int16)
    channels = [ucolors[rest, ch] for ch in range(ucolors.shape[1])]
    best = np.full(rest.size, 255, np.uint8)
    best_j = np.full(rest.size, -1, np.int32)
    for j, pcol in enumerate(colors):
        d = None
        for ch, values in enumerate(channels):
            table = np.abs(levels - np.int16(pcol[ch])).astype(np.uint8)
            dc = table[values]
            d = dc if d is None else np.maximum(d, dc, out=d)
        better = d < best
        best[better] = d[better]
        best_j[better] = j
    close = best <= NOISE_CODES
    labels[rest[close]] = best_j[close]
    return labels


def label_blends(palette: Palette, ucolors: NDArray[np.uint8]) -> Palette:
    """Return ``palette`` with every OTHER unique colour that is a two-colour blend
    labelled BLEND, with its two parents and mix fraction.

    ``ucolors`` are the unique colours ``palette.labels`` refers to.
    """
    labels = palette.labels.copy()
    parents = np.full((labels.size, 2), -1, np.int64)
    mix = np.full(labels.size, np.nan)
    rest = np.flatnonzero(labels == OTHER)
    if rest.size:
        # Encoded values only here: renderers blend anti-aliased edges in
        # encoded sRGB, and halving the work matters for images with a
        # million colours. Candidates (step 4) are also tested in linear light.
        pair, frac, resid = _best_pair(np.asarray(ucolors)[rest], palette.colors, linear=False)
        is_blend = resid <= BLEND_TOLERANCE
        hit = rest[is_blend]
        labels[hit] = BLEND
        parents[hit] = pair[is_blend]
        mix[hit] = frac[is_blend]
    return replace(palette, labels=labels, parents=parents, mix=mix)
