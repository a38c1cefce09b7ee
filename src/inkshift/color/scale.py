"""The project's colour scale for ΔE00 heat maps: "Tidepool".

Tidepool runs from a deep teal through blue, violet and rose to a light straw
colour. It was designed for this project in CIELAB (D50) / CIE LCh:

* CIE L* rises linearly along the design path from :data:`HEAT_L_RANGE` [0] to
  [1], so the scale is ordered by lightness alone and survives a grayscale
  print or a reader who sees no hue at all;
* the hue angle turns steadily through :data:`HEAT_HUE_TURN` degrees from
  :data:`HEAT_HUE_START`, so in colour neighbouring values also differ in hue;
* the chroma follows a shape-preserving cubic (Fritsch & Carlson 1980) through
  :data:`HEAT_CHROMA_POINTS`, chosen below the sRGB gamut boundary at every
  point of the path (weak at the dark end, where sRGB has little room around
  teal, strongest in the violets);
* the path is then re-parameterised by its CIEDE2000 arc length, so equal steps
  of the value give (near) equal ΔE00 steps of colour (CIE 142-2001).

Every colour of the scale lies inside sRGB (IEC 61966-2-1), so no clipping is
needed to show it.
"""

from __future__ import annotations

import operator
from functools import lru_cache
from typing import Final

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.color.convert import lch_to_lab
from inkshift.color.difference import delta_e_2000
from inkshift.color.vision import lab_to_linear_srgb, linear_to_srgb
from inkshift.errors import InputError

__all__ = [
    "HEAT_TICKS_DEFAULT",
    "HEAT_L_RANGE",
    "HEAT_HUE_START",
    "HEAT_HUE_TURN",
    "HEAT_CHROMA_POINTS",
    "heat_scale_lab",
    "heat_colors",
]

HEAT_TICKS_DEFAULT: Final[tuple[float, ...]] = (0.0, 1.0, 2.0, 3.0, 5.0, 10.0, 15.0, 20.0)
"""ΔE00 values labelled on a heat-map legend: 1 is about a just-noticeable
difference (CIE 142-2001), 2-3 the tolerance range print buyers work with
(3 is the project's shift threshold), 5 its merge threshold (common practice,
see :mod:`inkshift.thresholds`), 10, 15 and 20 to read large shifts."""

HEAT_L_RANGE: Final[tuple[float, float]] = (12.0, 94.0)
"""CIE L* at the two ends of the scale: dark but not black, light but not white
(project's choice: both ends still carry some hue)."""

HEAT_HUE_START: Final[float] = 160.0
"""CIELAB hue angle (degrees) at the dark end: teal."""

HEAT_HUE_TURN: Final[float] = 295.0
"""Degrees the hue turns (counter-clockwise in a*b*) towards the light end, ending at 95° (straw)."""

HEAT_CHROMA_POINTS: Final[tuple[float, ...]] = (12.0, 16.0, 30.0, 40.0, 26.0, 28.0)
"""CIE C*ab at equally spaced points of the design path, dark to light. Each is
at most about 0.85 of the sRGB boundary chroma at that L* and hue."""

_DESIGN_SAMPLES: Final[int] = 4097  # points of the design path used for the arc length
_LUT_SIZE: Final[int] = 4096  # colours tabulated for heat_colors (about 0.005 ΔE00 of scale apart at vmax 20)


def _pchip_slopes(x: NDArray[np.float64], y: NDArray[np.float64]) -> NDArray[np.float64]:
    """Node slopes of the shape-preserving piecewise cubic of Fritsch & Carlson (1980),
    with the weighted harmonic mean of Fritsch & Butland (1984) inside and
    three-point end slopes limited as in Moler, Numerical Computing with MATLAB, 3.4."""
    h = np.diff(x)
    delta = np.diff(y) / h
    d = np.zeros_like(y)
    same = delta[:-1] * delta[1:] > 0.0
    w1 = 2.0 * h[1:] + h[:-1]
    w2 = h[1:] + 2.0 * h[:-1]
    with np.errstate(divide="ignore", invalid="ignore"):
        inner = (w1 + w2) / (w1 / delta[:-1] + w2 / delta[1:])
    d[1:-1] = np.where(same, inner, 0.0)
    for end, (h0, h1, d0, d1) in ((0, (h[0], h[1], delta[0], delta[1])), (-1, (h[-1], h[-2], delta[-1], delta[-2]))):
        s = ((2.0 * h0 + h1) * d0 - h0 * d1) / (h0 + h1)
        if np.sign(s) != np.sign(d0):
            s = 0.0
        elif np.sign(d0) != np.sign(d1) and abs(s) > abs(3.0 * d0):
            s = 3.0 * d0
        d[end] = s
    return d


def _pchip(x: NDArray[np.float64], y: NDArray[np.float64], t: NDArray[np.float64]) -> NDArray[np.float64]:
    """Evaluate the Fritsch-Carlson cubic through (x, y) at t (cubic Hermite form)."""
    d = _pchip_slopes(x, y)
    i = np.clip(np.searchsorted(x, t, side="right") - 1, 0, x.size - 2)
    h = x[i + 1] - x[i]
    s = (t - x[i]) / h
    s2, s3 = s * s, s * s * s
    return (
        (2.0 * s3 - 3.0 * s2 + 1.0) * y[i]
        + (s3 - 2.0 * s2 + s) * h * d[i]
        + (-2.0 * s3 + 3.0 * s2) * y[i + 1]
        + (s3 - s2) * h * d[i + 1]
    )


def _design_path(t: NDArray[np.float64]) -> NDArray[np.float64]:
    """CIELAB of the design path at parameters t in [0, 1] (before re-parameterisation)."""
    chroma_y = np.asarray(HEAT_CHROMA_POINTS, dtype=np.float64)
    chroma_x = np.linspace(0.0, 1.0, chroma_y.size)
    lch = np.empty(t.shape + (3,))
    lch[..., 0] = HEAT_L_RANGE[0] + (HEAT_L_RANGE[1] - HEAT_L_RANGE[0]) * t
    lch[..., 1] = _pchip(chroma_x, chroma_y, t)
    lch[..., 2] = HEAT_HUE_START + HEAT_HUE_TURN * t
    return lch_to_lab(lch)


@lru_cache(maxsize=1)
def _arc_length() -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Design parameter and its normalised cumulative CIEDE2000 arc length."""
    t = np.linspace(0.0, 1.0, _DESIGN_SAMPLES)
    lab = _design_path(t)
    steps = delta_e_2000(lab[:-1], lab[1:])
    s = np.concatenate([[0.0], np.cumsum(steps)])
    return t, s / s[-1]


def _scale_lab_at(u: NDArray[np.float64]) -> NDArray[np.float64]:
    t, s = _arc_length()
    return _design_path(np.interp(u, s, t))


def heat_scale_lab(n: int) -> NDArray[np.float64]:
    """Return ``n`` colours of the Tidepool scale as CIELAB (D50), dark to light.

    Consecutive colours are (near) equal CIEDE2000 steps apart; CIE L* strictly
    increases.

    Parameters
    ----------
    n
        Number of colours, at least 2.

    Returns
    -------
    numpy.ndarray
        (n, 3) float64 CIELAB.
    """
    try:
        count = operator.index(n)
    except TypeError:
        raise InputError(f"heat scale: number of colours must be a whole number, got {n!r}") from None
    if count < 2:
        raise InputError(f"heat scale: needs at least 2 colours, got {count}")
    return _scale_lab_at(np.linspace(0.0, 1.0, count))


@lru_cache(maxsize=1)
def _lut() -> NDArray[np.uint8]:
    rgb = linear_to_srgb(np.clip(lab_to_linear_srgb(heat_scale_lab(_LUT_SIZE)), 0.0, 1.0))
    lut = np.rint(rgb * 255.0).astype(np.uint8)
    lut.setflags(write=False)
    return lut


def heat_colors(values: ArrayLike, vmax: float) -> NDArray[np.uint8]:
    """Return the Tidepool sRGB colours of ``values`` on a scale from 0 to ``vmax``.

    Values at or below 0 take the darkest colour, values at or above ``vmax``
    the lightest; NaN counts as 0 (nothing to show). The colours come from a
    table of 4096 steps of the scale, so a large image costs one look-up per
    pixel.

    Parameters
    ----------
    values
        Any array of numbers (ΔE00 for the project's heat maps).
    vmax
        Top of the scale, finite and above 0.

    Returns
    -------
    numpy.ndarray
        uint8 sRGB, shape ``values.shape + (3,)``.
    """
    try:
        top = float(vmax)
    except (TypeError, ValueError):
        raise InputError(f"heat scale: top value '{vmax}' is not a number") from None
    if not np.isfinite(top) or top <= 0.0:
        raise InputError(f"heat scale: top value must be finite and above 0, got {vmax}")
    v = np.asarray(values, dtype=np.float64)
    idx = np.nan_to_num(v * ((_LUT_SIZE - 1) / top), nan=0.0, posinf=_LUT_SIZE - 1, neginf=0.0)
    np.clip(idx, 0.0, _LUT_SIZE - 1, out=idx)
    return _lut()[np.rint(idx).astype(np.intp)]
