"""CIE colour-difference formulae on CIELAB arrays: ΔE*ab, ΔE94 and CIEDE2000.

All functions take two CIELAB arrays whose last axis holds (L*, a*, b*); the
arrays broadcast against each other and the result has the broadcast shape
without the last axis, in float64.

References
----------
CIE 015:2018, Colorimetry, 4th edition, section 8.3.1 (ΔE*ab).
CIE 116-1995, Industrial colour-difference evaluation (ΔE94).
CIE 142-2001, Improvement to industrial colour-difference evaluation (CIEDE2000).
G. Sharma, W. Wu, E. N. Dalal (2005), "The CIEDE2000 color-difference formula:
implementation notes, supplementary test data, and mathematical observations",
Color Research and Application 30(1):21-30.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.errors import InputError

__all__ = ["delta_e_1976", "delta_e_1994", "delta_e_2000", "delta_e_2000_over", "DE2000_PER_DE76"]

DE2000_PER_DE76 = 2.1
"""An upper bound of ΔE00 / ΔE*ab for any two colours (kL = kC = kH = 1), derived
from Sharma, Wu & Dalal (2005), eqs. (2)-(22): ΔL' = ΔL* and S_L >= 1; with one G
per pair, a' = (1 + G) a* and G <= 0.5, so ΔC'^2 + ΔH'^2 (the squared distance
in a'b') <= 2.25 Δa*b*^2; S_C >= 1 and S_H >= 1 (T >= 0.36 > 0); the rotation term
adds at most |R_T| / 2 <= sin 60° of the chroma and hue terms (R_C <= 2,
Δθ <= 30°). Hence ΔE00^2 <= ΔL*^2 + 1.866 * 2.25 Δa*b*^2 <= 4.2 ΔE*ab^2, and
sqrt(4.2) = 2.05, rounded up."""

_25_POW_7 = 25.0**7
# cos and sin of the constant phase offsets in the CIEDE2000 weighting function T.
_C30, _S30 = np.cos(np.radians(30.0)), np.sin(np.radians(30.0))
_C6, _S6 = np.cos(np.radians(6.0)), np.sin(np.radians(6.0))
_C63, _S63 = np.cos(np.radians(63.0)), np.sin(np.radians(63.0))
_TWO_PI = 2.0 * np.pi


def _pair(lab1: ArrayLike, lab2: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    a = np.asarray(lab1, dtype=np.float64)
    b = np.asarray(lab2, dtype=np.float64)
    if a.shape[-1:] != (3,) or b.shape[-1:] != (3,):
        raise InputError(f"colour difference: CIELAB arrays need a last axis of 3, got shapes {a.shape} and {b.shape}")
    try:
        np.broadcast_shapes(a.shape, b.shape)
    except ValueError:
        raise InputError(f"colour difference: CIELAB arrays of shapes {a.shape} and {b.shape} do not broadcast") from None
    return a, b


def delta_e_1976(lab1: ArrayLike, lab2: ArrayLike) -> NDArray[np.float64]:
    """Return the CIE 1976 colour difference ΔE*ab.

    The Euclidean distance in CIELAB (CIE 015:2018, eq. 8.21).

    Parameters
    ----------
    lab1, lab2
        CIELAB arrays, last axis (L*, a*, b*), broadcast together.

    Returns
    -------
    numpy.ndarray
        ΔE*ab, float64, broadcast shape without the last axis.
    """
    a, b = _pair(lab1, lab2)
    d = a - b
    return np.sqrt(np.einsum("...i,...i->...", d, d))


def delta_e_1994(lab1: ArrayLike, lab2: ArrayLike, *, textiles: bool = False) -> NDArray[np.float64]:
    """Return the CIE 1994 colour difference ΔE94 (CIE 116-1995).

    ``ΔE94 = sqrt((ΔL*/(kL SL))² + (ΔC*/(kC SC))² + (ΔH*/(kH SH))²)`` with
    ``SL = 1``, ``SC = 1 + K1 C*``, ``SH = 1 + K2 C*`` and ``kC = kH = 1``.

    The formula is asymmetric: ``C*`` in the weights is the chroma of the
    *reference* colour, which is the first argument. ``delta_e_1994(a, b)``
    and ``delta_e_1994(b, a)`` differ whenever the two chromas differ.

    Parameters
    ----------
    lab1
        CIELAB of the reference (standard), last axis (L*, a*, b*).
    lab2
        CIELAB of the sample, broadcast against ``lab1``.
    textiles
        Use the textile weights (kL = 2, K1 = 0.048, K2 = 0.014) instead of the
        graphic-arts weights (kL = 1, K1 = 0.045, K2 = 0.015).

    Returns
    -------
    numpy.ndarray
        ΔE94, float64, broadcast shape without the last axis.
    """
    a, b = _pair(lab1, lab2)
    k_l, k1, k2 = (2.0, 0.048, 0.014) if textiles else (1.0, 0.045, 0.015)
    c1 = np.hypot(a[..., 1], a[..., 2])
    c2 = np.hypot(b[..., 1], b[..., 2])
    d = a - b
    d_c = c1 - c2
    # ΔH*² = Δa*² + Δb*² − ΔC*²; rounding can make it a hair below zero.
    d_h2 = np.maximum(d[..., 1] ** 2 + d[..., 2] ** 2 - d_c**2, 0.0)
    s_c = 1.0 + k1 * c1
    s_h = 1.0 + k2 * c1
    return np.sqrt((d[..., 0] / k_l) ** 2 + (d_c / s_c) ** 2 + d_h2 / s_h**2)


def delta_e_2000(
    lab1: ArrayLike,
    lab2: ArrayLike,
    *,
    kL: float = 1.0,
    kC: float = 1.0,
    kH: float = 1.0,
) -> NDArray[np.float64]:
    """Return the CIEDE2000 colour difference ΔE00 (CIE 142-2001).

    Implemented step by step as in Sharma, Wu & Dalal (2005), eqs. (1)-(22),
    including their conventions for the hue angle of a neutral colour
    (h' = 0 when a' = b' = 0), for the hue difference and mean hue when one
    chroma is zero, and for the mean hue when the two hues are 180° apart
    (|h1' − h2'| ≤ 180° takes the plain mean). The formula is symmetric in its
    two arguments.

    The four cosines of the weighting function T are evaluated from one
    cosine and one sine of h̄' with multiple-angle identities (exact to
    rounding), and arrays are updated in place to keep temporaries few.

    Parameters
    ----------
    lab1, lab2
        CIELAB arrays, last axis (L*, a*, b*), broadcast together.
    kL, kC, kH
        Parametric factors (1 under the CIE reference conditions).

    Returns
    -------
    numpy.ndarray
        ΔE00, float64, broadcast shape without the last axis.
    """
    p, q = _pair(lab1, lab2)
    if p.ndim == 1 and q.ndim == 1:  # one pair: work on length-1 arrays, return a 0-d array
        return delta_e_2000(p[None], q[None], kL=kL, kC=kC, kH=kH).reshape(())
    l1, a1, b1 = p[..., 0], p[..., 1], p[..., 2]
    l2, a2, b2 = q[..., 0], q[..., 1], q[..., 2]

    # Eqs. (2)-(5): G rescales a*; C'; h' in [0, 2π).
    c_bar = np.hypot(a1, b1) + np.hypot(a2, b2)  # full broadcast shape from here on
    c_bar *= 0.5
    c7 = c_bar**7
    g = c7 + _25_POW_7
    np.divide(c7, g, out=g)
    np.sqrt(g, out=g)
    np.subtract(1.5, 0.5 * g, out=g)  # 1 + G with G = 0.5 (1 - sqrt(C̄⁷/(C̄⁷+25⁷)))
    a1p = a1 * g
    a2p = np.multiply(a2, g, out=g)
    c1p = np.hypot(a1p, b1)
    c2p = np.hypot(a2p, b2)
    h1p = np.arctan2(b1, a1p)
    np.add(h1p, _TWO_PI, out=h1p, where=h1p < 0.0)
    h2p = np.arctan2(b2, a2p)
    np.add(h2p, _TWO_PI, out=h2p, where=h2p < 0.0)
    del a1p, a2p

    c12 = c1p * c2p
    neutral = c12 == 0.0

    # Eqs. (8)-(10): ΔL', ΔC', Δh' and ΔH'.
    d_l = l2 - l1
    d_c = c2p - c1p
    d_h = h2p - h1p
    np.subtract(d_h, _TWO_PI, out=d_h, where=d_h > np.pi)
    np.add(d_h, _TWO_PI, out=d_h, where=d_h < -np.pi)
    d_h[neutral] = 0.0
    d_h *= 0.5
    np.sin(d_h, out=d_h)
    d_h *= 2.0
    d_h *= np.sqrt(c12)  # ΔH'
    del c12

    # Eq. (14): mean hue h̄'.
    h_bar = h1p + h2p
    far = np.abs(h1p - h2p) > np.pi
    far &= ~neutral  # with a zero chroma h̄' is the plain sum, never wrapped
    del h1p, h2p
    wrap = np.where(h_bar < _TWO_PI, _TWO_PI, -_TWO_PI)
    np.add(h_bar, wrap, out=h_bar, where=far)
    del wrap
    np.multiply(h_bar, np.where(neutral, 1.0, 0.5), out=h_bar)
    del far, neutral

    # Eq. (15): T from cos h̄', sin h̄' and multiple-angle identities.
    c = np.cos(h_bar)
    s = np.sin(h_bar)
    c2 = 2.0 * c * c - 1.0  # cos 2h
    s2 = 2.0 * s * c  # sin 2h
    c3 = c * (2.0 * c2 - 1.0)  # cos 3h = cos h (2 cos 2h − 1)
    s3 = s * (2.0 * c2 + 1.0)  # sin 3h = sin h (2 cos 2h + 1)
    t = 1.0 - 0.17 * (c * _C30 + s * _S30)
    t += 0.24 * c2
    t += 0.32 * (c3 * _C6 - s3 * _S6)
    c4 = 2.0 * c2 * c2 - 1.0
    s4 = 2.0 * s2 * c2
    t -= 0.20 * (c4 * _C63 + s4 * _S63)
    del c, s, c2, s2, c3, s3, c4, s4

    # Eqs. (16)-(22).
    h_bar = np.degrees(h_bar, out=h_bar)
    h_bar -= 275.0
    h_bar *= 1.0 / 25.0
    np.square(h_bar, out=h_bar)
    np.negative(h_bar, out=h_bar)
    np.exp(h_bar, out=h_bar)
    h_bar *= np.radians(60.0)  # 2 Δθ in radians, Δθ = 30° exp(-((h̄'-275°)/25°)²)
    rt = np.sin(h_bar, out=h_bar)

    cp_bar = c1p + c2p
    cp_bar *= 0.5
    del c1p, c2p
    cp7 = cp_bar**7
    r_c = cp7 + _25_POW_7
    np.divide(cp7, r_c, out=r_c)
    np.sqrt(r_c, out=r_c)
    rt *= r_c
    rt *= -2.0  # R_T = −sin(2Δθ) R_C with R_C = 2 sqrt(C̄'⁷/(C̄'⁷+25⁷))
    del cp7, r_c

    s_c = 0.045 * cp_bar
    s_c += 1.0
    s_c *= kC
    t *= 0.015
    t *= cp_bar
    t += 1.0
    t *= kH  # kH S_H
    del cp_bar

    l_bar = l1 + l2
    l_bar *= 0.5
    l_bar -= 50.0
    np.square(l_bar, out=l_bar)
    s_l = np.sqrt(l_bar + 20.0)
    np.divide(l_bar, s_l, out=s_l)
    s_l *= 0.015
    s_l += 1.0
    s_l *= kL
    del l_bar

    np.divide(d_l, s_l, out=d_l)
    np.divide(d_c, s_c, out=d_c)
    np.divide(d_h, t, out=d_h)
    rt *= d_c
    rt *= d_h
    np.square(d_l, out=d_l)
    np.square(d_c, out=d_c)
    np.square(d_h, out=d_h)
    rt += d_l
    rt += d_c
    rt += d_h
    # Exact rounding can leave a tiny negative sum for identical colours.
    np.maximum(rt, 0.0, out=rt)
    return np.sqrt(rt, out=rt)


def delta_e_2000_over(lab1: ArrayLike, lab2: ArrayLike, limit: float) -> NDArray[np.bool_]:
    """Return ``delta_e_2000(lab1, lab2) > limit``, computing ΔE00 only where needed.

    Where ΔE*ab <= ``limit`` / :data:`DE2000_PER_DE76`, ΔE00 cannot exceed the
    limit, so the answer is False without it; elsewhere ΔE00 decides. Exactly
    the same result as the plain comparison, and cheaper when most pairs are
    close (an out-of-gamut test over millions of colours).
    """
    a, b = _pair(lab1, lab2)
    shape = np.broadcast_shapes(a.shape, b.shape)[:-1]
    a, b = np.broadcast_to(a, shape + (3,)), np.broadcast_to(b, shape + (3,))
    over = np.zeros(shape, bool)
    maybe = delta_e_1976(a, b) > limit / DE2000_PER_DE76
    over[maybe] = delta_e_2000(a[maybe], b[maybe]) > limit
    return over
