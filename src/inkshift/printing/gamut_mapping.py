"""Gamut boundaries and the rendering intents of the shipped profiles' B2A tables.

All CIELAB here is D50 and **media-relative** (paper at L* = 100, a* = b* = 0),
the values a B2A table receives from the CMM.

Gamut boundary descriptor
-------------------------
The largest chroma C*ab found in each (L*, hue) bin (1 L* unit by 2° of hue),
from dense, deterministic sampling of a surface: for a print condition the
image of the boundary of the ink-limited device space (densely its 2-D faces,
where two inks are each 0 or 100 % or one is and the ink limit is reached;
more coarsely its 3-D faces; steps closer together near 0 % where colour moves
fastest); for sRGB the faces of the RGB cube. Empty bins inside a hue's
lightness range are filled along L*, a bin lower than both neighbours (a
sampling gap) is raised to their mean, and the neutral axis from the darkest
neutral up to the paper counts as inside; bins outside mean "no colour here".
Between bin centres the maximum chroma is interpolated bilinearly. This assumes that every line of
constant L* and hue crosses the gamut in one segment starting at the neutral
axis, which holds for printer and display gamuts away from their black and
white ends.

Rendering intents
-----------------
relative colorimetric (B2A1)
    A colour the print can reproduce is kept (the inverse decides, see
    :func:`inkshift.printing.tables.relative_colorimetric`). Any other is
    replaced by the point of the gamut boundary, in the plane of its own hue,
    with the smallest CIEDE2000 to it (a hue-preserving minimum-ΔE00 clip,
    :func:`clip_to_gamut`).
absolute colorimetric
    Served by B2A1: the CMM turns ICC-absolute PCS values into media-relative
    ones with the media white point before it uses the table (ICC.1).
perceptual (B2A0)
    Lightness is first scaled linearly from the PCS range (L* 0..100) to the
    print's (L* of the darkest neutral the print reproduces .. 100), so PCS
    black maps to the print black (taken neutral, as black point detection in
    CMMs does; a darker but coloured ink stack is not used as "black"). Then,
    in the plane of the colour's own hue, the colour is moved along the line
    from a focal point on the neutral axis at the lightness of the print's
    cusp (its most chromatic colour of that hue) through the colour, like the
    cusp-oriented compression of SGCK, the reference algorithm of CIE
    156:2004 (without its chroma-dependent sigmoidal lightness step). Along that line the
    source gamut (sRGB, the colour space of nearly every chart, after the
    same lightness scaling) is compressed onto the print gamut with a smooth
    knee: distances up to :data:`KNEE` times the print boundary's are kept,
    the rest of the source range is squeezed into the remaining print range by
    ``r x / (1 + (r - 1) x)``, which meets the straight part with the same
    slope and sends the sRGB boundary to the print boundary. Colours beyond
    sRGB stop at the print boundary. Light saturated colours (bright greens,
    cyans) thereby get darker and keep chroma instead of fading to pastel.
    Neutrals keep the linear lightness scaling exactly.
saturation (B2A2)
    Lightness as in the perceptual intent; chroma scaled by the ratio of the
    print's to the source's maximum chroma at that lightness and hue, so the
    most saturated sRGB colours become the most saturated print colours, and
    the gamut is used to the full (chroma as high as the print allows);
    beyond that, clipped to the print's maximum chroma at the same L* and hue.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from itertools import combinations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.color.convert import lab_to_lch, lch_to_lab
from inkshift.color.difference import delta_e_2000
from inkshift.color.vision import linear_srgb_to_lab, srgb_to_linear
from inkshift.icc.intent import Intent
from inkshift.printing.neugebauer import HalftoneModel, device_to_lab
from inkshift.printing.separation import neutral_black, print_black

__all__ = [
    "L_STEP",
    "HUE_STEP",
    "KNEE",
    "GamutBoundary",
    "boundary_from_samples",
    "printer_gamut_boundary",
    "srgb_gamut_boundary",
    "max_chroma",
    "in_gamut",
    "clip_to_gamut",
    "map_perceptual",
    "map_saturation",
    "map_intent",
]

L_STEP = 1.0
"""L* width of a boundary bin."""
HUE_STEP = 2.0
"""Hue width of a boundary bin, degrees."""
KNEE = 0.8
"""Share of the print's maximum chroma kept unchanged by the perceptual intent (common practice:
knee points of 0.7-0.9 are usual in chroma compression)."""
FACE2_STEPS = 97
"""Nodes per axis on each 2-D face of the ink-limited CMYK device box when sampling its boundary."""
FACE3_STEPS = 21
"""Nodes per axis on each 3-D face of the ink-limited CMYK device box."""
SRGB_FACE_STEPS = 97
"""Nodes per axis on each face of the sRGB cube."""
_RAY_LENGTH = 200.0  # CIELAB units: longer than any gamut is wide
_RAY_STEPS = 100  # samples along a ray before bisection
_CLIP_COARSE = 2.0  # L* step of the first pass of the minimum-ΔE00 search
_CLIP_MID = 0.5  # L* step of the second pass, over one coarse step either side
_CLIP_FINE = 0.125  # L* step of the third pass, over one mid step either side


@dataclass(frozen=True, eq=False)
class GamutBoundary:
    """Maximum chroma per (L*, hue) bin; NaN where the gamut has no colour.

    ``cmax[i, j]`` belongs to L* = ``i * L_STEP`` and hue ``j * HUE_STEP``. ``black`` is the
    darkest neutral of the gamut (L*, 0, 0): the perceptual and saturation intents map
    PCS black there.
    """

    cmax: NDArray[np.float64]
    black: NDArray[np.float64]

    @property
    def l_range(self) -> tuple[float, float]:
        rows = np.nonzero(np.isfinite(self.cmax).any(axis=1))[0]
        return float(rows[0] * L_STEP), float(rows[-1] * L_STEP)


def _empty_grid() -> NDArray[np.float64]:
    return np.full((int(round(100.0 / L_STEP)) + 1, int(round(360.0 / HUE_STEP))), np.nan)


def boundary_from_samples(lab: ArrayLike, black: ArrayLike | None = None) -> GamutBoundary:
    """Return the boundary descriptor of a cloud of CIELAB samples of a gamut surface.

    Parameters
    ----------
    lab
        CIELAB samples, shape ``(..., 3)``.
    black
        The gamut's darkest neutral; the darkest sample's L* when omitted.
    """
    lch = lab_to_lch(np.asarray(lab, dtype=np.float64).reshape(-1, 3))
    grid = _empty_grid()
    li = np.clip(np.rint(lch[:, 0] / L_STEP).astype(np.intp), 0, grid.shape[0] - 1)
    hi = np.rint(lch[:, 2] / HUE_STEP).astype(np.intp) % grid.shape[1]
    flat = np.full(grid.size, -np.inf)
    np.maximum.at(flat, li * grid.shape[1] + hi, lch[:, 1])
    grid = flat.reshape(grid.shape)
    grid[~np.isfinite(grid)] = np.nan
    # Fill holes left by the sampling inside each hue's lightness range.
    rows = np.arange(grid.shape[0])
    for j in range(grid.shape[1]):
        col = grid[:, j]
        ok = np.isfinite(col)
        if ok.sum() >= 2:
            lo, hi_ = rows[ok][0], rows[ok][-1]
            inside = (rows >= lo) & (rows <= hi_)
            col[inside] = np.interp(rows[inside], rows[ok], col[ok])
    # A bin lower than the mean of both neighbours (in hue, then in L*) only missed its
    # boundary samples: raise it to that mean. Peaks are left alone.
    for _ in range(2):
        side = 0.5 * (np.roll(grid, 1, axis=1) + np.roll(grid, -1, axis=1))
        grid = np.where(np.isfinite(side) & (side > grid), side, grid)
        side = np.full_like(grid, np.nan)
        side[1:-1] = 0.5 * (grid[:-2] + grid[2:])
        grid = np.where(np.isfinite(side) & (side > grid), side, grid)
    flat_lab = np.asarray(lab, dtype=np.float64).reshape(-1, 3)
    if black is None:
        black = np.array([flat_lab[:, 0].min(), 0.0, 0.0])
    black = np.asarray(black, dtype=np.float64)
    # The neutral axis from the black's lightness up to the lightest sample is inside the gamut.
    neutral_rows = (rows * L_STEP >= np.floor(black[0] / L_STEP) * L_STEP) & (rows * L_STEP <= flat_lab[:, 0].max() + 1e-9)
    grid[neutral_rows] = np.where(np.isfinite(grid[neutral_rows]), grid[neutral_rows], 0.0)
    return GamutBoundary(cmax=grid, black=black)


def _warped_steps(n: int) -> NDArray[np.float64]:
    # Denser near 0: light tints move CIELAB fastest per unit of ink.
    return np.linspace(0.0, 1.0, n) ** 1.5


def _device_boundary_samples(n_inks: int, tac: float) -> NDArray[np.float64]:
    """Device values on the boundary of ``{0 <= x <= 1, sum(x) <= tac}``: dense on its 2-D faces, coarser on its 3-D faces."""
    if n_inks == 1:
        return np.linspace(0.0, 1.0, 1025)[:, None]
    parts = []
    s2 = _warped_steps(FACE2_STEPS)
    g2 = np.stack(np.meshgrid(s2, s2, indexing="ij"), axis=-1).reshape(-1, 2)
    for i, j in combinations(range(n_inks), 2):
        others = [o for o in range(n_inks) if o not in (i, j)]
        for fixed in np.ndindex(2, 2):
            x = np.empty((len(g2), n_inks))
            x[:, [i, j]] = g2
            x[:, others] = fixed
            parts.append(x)
        # where the ink-limit face meets a face with one ink fixed: solve the last ink from the limit
        for fixed_val in (0.0, 1.0):
            for a in others:
                b = [o for o in others if o != a][0]
                x = np.empty((len(g2), n_inks))
                x[:, [i, j]] = g2
                x[:, a] = fixed_val
                x[:, b] = tac - fixed_val - g2.sum(axis=1)
                parts.append(x[(x[:, b] >= 0.0) & (x[:, b] <= 1.0)])
    s3 = _warped_steps(FACE3_STEPS)
    g3 = np.stack(np.meshgrid(s3, s3, s3, indexing="ij"), axis=-1).reshape(-1, 3)
    for i in range(n_inks):
        for v in (0.0, 1.0):
            parts.append(np.insert(g3, i, v, axis=1))
        rest = tac - g3.sum(axis=1)
        keep = (rest >= 0.0) & (rest <= 1.0)
        parts.append(np.insert(g3[keep], i, rest[keep], axis=1))
    dev = np.concatenate(parts)
    return dev[dev.sum(axis=1) <= tac + 1e-9]


@lru_cache(maxsize=16)
def printer_gamut_boundary(model: HalftoneModel) -> GamutBoundary:
    """Return the media-relative gamut boundary of a condition within its ink limit."""
    black = np.array([neutral_black(model), 0.0, 0.0])
    if model.n_inks == 1:
        grid = _empty_grid()
        rows = np.arange(grid.shape[0]) * L_STEP
        grid[(rows >= np.ceil(black[0] / L_STEP) * L_STEP) & (rows <= 100.0)] = 0.0
        return GamutBoundary(cmax=grid, black=black)
    lab = device_to_lab(model, _device_boundary_samples(model.n_inks, model.tac))
    return boundary_from_samples(np.concatenate([lab, print_black(model)[1][None]]), black)


@lru_cache(maxsize=1)
def srgb_gamut_boundary() -> GamutBoundary:
    """Return the boundary of sRGB (IEC 61966-2-1) in CIELAB D50, Bradford-adapted (:mod:`inkshift.color.vision`)."""
    s = np.linspace(0.0, 1.0, SRGB_FACE_STEPS)
    g2 = np.stack(np.meshgrid(s, s, indexing="ij"), axis=-1).reshape(-1, 2)
    rgb = np.concatenate([np.insert(g2, i, v, axis=1) for i in range(3) for v in (0.0, 1.0)])
    return boundary_from_samples(linear_srgb_to_lab(srgb_to_linear(rgb)), np.zeros(3))


def max_chroma(gbd: GamutBoundary, lightness: ArrayLike, hue: ArrayLike) -> NDArray[np.float64]:
    """Return the boundary chroma at the given L* and hue (degrees), bilinear; NaN outside the gamut's L* range."""
    lightness = np.asarray(lightness, dtype=np.float64)
    hue = np.asarray(hue, dtype=np.float64)
    nl, nh = gbd.cmax.shape
    x = np.clip(lightness / L_STEP, 0.0, nl - 1.0)
    i0 = np.minimum(np.floor(x).astype(np.intp), nl - 2)
    fx = x - i0
    y = (hue % 360.0) / HUE_STEP
    j0 = np.floor(y).astype(np.intp) % nh
    fy = y - np.floor(y)
    j1 = (j0 + 1) % nh
    c = np.where(np.isfinite(gbd.cmax), gbd.cmax, -1e6)  # an empty corner drags the result below 0
    out = (
        (1 - fx) * (1 - fy) * c[i0, j0]
        + (1 - fx) * fy * c[i0, j1]
        + fx * (1 - fy) * c[i0 + 1, j0]
        + fx * fy * c[i0 + 1, j1]
    )
    # A query exactly on a bin row whose neighbour row is empty must not be lost.
    exact = fx < 1e-12
    out = np.where(exact, (1 - fy) * c[i0, j0] + fy * c[i0, j1], out)
    outside = (lightness < -1e-9) | (lightness > (nl - 1) * L_STEP + 1e-9) | (out < 0.0)
    return np.where(outside, np.nan, out)


def in_gamut(gbd: GamutBoundary, lab: ArrayLike, tolerance: float = 0.0) -> NDArray[np.bool_]:
    """Return True where a media-relative CIELAB colour lies inside the boundary (chroma within ``tolerance``)."""
    lch = lab_to_lch(lab)
    cm = max_chroma(gbd, lch[..., 0], lch[..., 2])
    return np.isfinite(cm) & (lch[..., 1] <= cm + tolerance)


def clip_to_gamut(gbd: GamutBoundary, lab: ArrayLike) -> NDArray[np.float64]:
    """Return, for each colour outside the boundary, the boundary point of its hue with the smallest CIEDE2000.

    Colours inside are returned unchanged. Search: every ``_CLIP_COARSE`` L* along the
    boundary curve of the hue plane, then finer steps around the best.
    """
    lab = np.asarray(lab, dtype=np.float64)
    shape = lab.shape
    flat = lab.reshape(-1, 3).copy()
    out_idx = np.nonzero(~in_gamut(gbd, flat))[0]
    lo, hi = gbd.l_range
    coarse = np.arange(lo, hi + 1e-9, _CLIP_COARSE)
    if coarse[-1] < hi:
        coarse = np.append(coarse, hi)
    mid = np.arange(-_CLIP_COARSE, _CLIP_COARSE + 1e-9, _CLIP_MID)
    fine = np.arange(-_CLIP_MID, _CLIP_MID + 1e-9, _CLIP_FINE)
    for s in range(0, out_idx.size, 8192):
        idx = out_idx[s : s + 8192]
        target = flat[idx]
        h = lab_to_lch(target)[:, 2]
        best_l = _best_on_boundary(gbd, target, h, np.broadcast_to(coarse, (idx.size, coarse.size)))
        for offsets in (mid, fine):
            cand = np.clip(best_l[:, None] + offsets[None, :], lo, hi)
            best_l = _best_on_boundary(gbd, target, h, cand)
        c = np.nan_to_num(max_chroma(gbd, best_l, h), nan=0.0)
        flat[idx] = lch_to_lab(np.stack([best_l, np.maximum(c, 0.0), h], axis=-1))
    return flat.reshape(shape)


def _best_on_boundary(gbd: GamutBoundary, target: NDArray[np.float64], h: NDArray[np.float64], cand_l: NDArray[np.float64]) -> NDArray[np.float64]:
    hh = np.broadcast_to(h[:, None], cand_l.shape)
    c = max_chroma(gbd, cand_l, hh)
    cand = lch_to_lab(np.stack([cand_l, np.nan_to_num(c, nan=0.0), hh], axis=-1))
    de = delta_e_2000(target[:, None, :], cand)
    de = np.where(np.isfinite(c), de, np.inf)
    return cand_l[np.arange(len(target)), np.argmin(de, axis=1)]


def _lightness_map(gbd: GamutBoundary, lab: NDArray[np.float64]) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    lk = gbd.black[0]
    l_src = np.clip(lab[..., 0], 0.0, 100.0)
    return l_src, lk + l_src * (100.0 - lk) / 100.0


def _cusp_lightness(gbd: GamutBoundary, hue: NDArray[np.float64]) -> NDArray[np.float64]:
    """L* of the most chromatic colour of each hue (linear between hue bins)."""
    filled = np.where(np.isfinite(gbd.cmax), gbd.cmax, -np.inf)
    per_bin = np.argmax(filled, axis=0) * L_STEP
    y = (hue % 360.0) / HUE_STEP
    j0 = np.floor(y).astype(np.intp) % per_bin.size
    f = y - np.floor(y)
    return (1.0 - f) * per_bin[j0] + f * per_bin[(j0 + 1) % per_bin.size]


def _exit_distance(
    chroma_at, origin_l: NDArray[np.float64], dir_l: NDArray[np.float64], dir_c: NDArray[np.float64], hue: NDArray[np.float64]
) -> NDArray[np.float64]:
    """Distance from (origin_l, 0) along the unit direction (dir_l, dir_c) to the first point outside a boundary."""

    def outside(dist: NDArray[np.float64]) -> NDArray[np.bool_]:
        lightness = origin_l[:, None] + dist * dir_l[:, None]
        cm = chroma_at(lightness, np.broadcast_to(hue[:, None], lightness.shape))
        return ~(np.isfinite(cm) & (dist * dir_c[:, None] <= cm + 1e-9))

    steps = np.linspace(0.0, _RAY_LENGTH, _RAY_STEPS + 1)[1:]
    out = outside(np.broadcast_to(steps, (origin_l.size, steps.size)))
    first = np.where(out.any(axis=1), np.argmax(out, axis=1), steps.size - 1)
    hi = steps[first]
    lo = np.where(first > 0, steps[np.maximum(first - 1, 0)], 0.0)
    for _ in range(20):
        mid = 0.5 * (lo + hi)
        o = outside(mid[:, None])[:, 0]
        hi = np.where(o, mid, hi)
        lo = np.where(o, lo, mid)
    return lo


def map_perceptual(gbd: GamutBoundary, lab: ArrayLike, source: GamutBoundary | None = None) -> NDArray[np.float64]:
    """Return the perceptual-intent image of media-relative CIELAB colours (see the module docstring)."""
    lch = lab_to_lch(np.asarray(lab, dtype=np.float64))
    shape = lch.shape
    lch = lch.reshape(-1, 3)
    source = source or srgb_gamut_boundary()
    _, l_dst = _lightness_map(gbd, lch)
    c, h = lch[:, 1], lch[:, 2]
    if not np.nanmax(gbd.cmax) > 0.0:  # one-ink print: only the neutral axis
        return lch_to_lab(np.stack([l_dst, np.zeros_like(c), h], axis=-1)).reshape(shape)
    lk = gbd.black[0]

    def source_chroma(lightness, hue):  # the source boundary after the lightness scaling
        return max_chroma(source, (lightness - lk) * 100.0 / (100.0 - lk), hue)

    def print_chroma(lightness, hue):
        return max_chroma(gbd, lightness, hue)

    focus = _cusp_lightness(gbd, h)
    dl, dc = l_dst - focus, c
    dist = np.hypot(dl, dc)
    moving = dist > 1e-9
    out = np.stack([l_dst, c, h], axis=-1)
    if moving.any():
        idx = np.nonzero(moving)[0]
        ul, uc = dl[idx] / dist[idx], dc[idx] / dist[idx]
        s_src = _exit_distance(source_chroma, focus[idx], ul, uc, h[idx])
        s_dst = _exit_distance(print_chroma, focus[idx], ul, uc, h[idx])
        s = dist[idx]
        knee = KNEE * s_dst
        compress = (s_src > s_dst) & (s > knee) & (s_dst > 0)
        with np.errstate(divide="ignore", invalid="ignore"):
            r = (s_src - knee) / (s_dst - knee)
            x = (s - knee) / (s_src - knee)
            squeezed = knee + (s_dst - knee) * r * x / (1.0 + (r - 1.0) * x)
        s_new = np.minimum(np.where(compress, squeezed, s), s_dst)
        out[idx, 0] = focus[idx] + s_new * ul
        out[idx, 1] = s_new * uc
    return lch_to_lab(out).reshape(shape)


def map_saturation(gbd: GamutBoundary, lab: ArrayLike, source: GamutBoundary | None = None) -> NDArray[np.float64]:
    """Return the saturation-intent image of media-relative CIELAB colours (see the module docstring)."""
    lch = lab_to_lch(lab)
    source = source or srgb_gamut_boundary()
    l_src, l_dst = _lightness_map(gbd, lch)
    c, h = lch[..., 1], lch[..., 2]
    cs = np.nan_to_num(max_chroma(source, l_src, h), nan=0.0)
    cd = np.maximum(np.nan_to_num(max_chroma(gbd, l_dst, h), nan=0.0), 0.0)
    with np.errstate(divide="ignore", invalid="ignore"):
        c_new = np.minimum(np.where(cs > 1e-6, c * cd / cs, c), cd)
    mapped = lch_to_lab(np.stack([l_dst, c_new, h], axis=-1))
    return mapped


def map_intent(gbd: GamutBoundary, lab: ArrayLike, intent: Intent | int) -> NDArray[np.float64]:
    """Return the target CIELAB a B2A table of the given intent aims at (absolute colorimetric uses relative)."""
    intent = Intent(intent)
    if intent == Intent.PERCEPTUAL:
        return map_perceptual(gbd, lab)
    if intent == Intent.SATURATION:
        return map_saturation(gbd, lab)
    return clip_to_gamut(gbd, lab)
