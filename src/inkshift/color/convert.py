"""Conversions between CIE XYZ, CIELAB and CIE LCh, in float.

References
----------
CIE 015:2018, Colorimetry, 4th edition, section 8.2.1 (CIE 1976 L*a*b*).
ICC.1:2022 (profile version 4.4), annex D: the PCS illuminant is D50 with
XYZ = (0.9642, 1.0, 0.8249).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = ["D50_XYZ", "xyz_to_lab", "lab_to_xyz", "lab_to_lch", "lch_to_lab"]

D50_XYZ: NDArray[np.float64] = np.array([0.9642, 1.0, 0.8249])
"""The ICC profile connection space white, CIE illuminant D50 (ICC.1:2022, 7.2.16)."""

_EPSILON = 216.0 / 24389.0  # (6/29)**3, CIE 015:2018 eq. 8.12
_KAPPA = 24389.0 / 27.0  # (29/3)**3


def xyz_to_lab(xyz: ArrayLike, white: ArrayLike = D50_XYZ) -> NDArray[np.float64]:
    """Return CIELAB for CIE XYZ (Y of the white = 1), CIE 015:2018 eq. 8.7-8.12."""
    xyz = np.asarray(xyz, dtype=np.float64)
    r = xyz / np.asarray(white, dtype=np.float64)
    f = np.where(r > _EPSILON, np.cbrt(r), (_KAPPA * r + 16.0) / 116.0)
    lab = np.empty_like(f)
    lab[..., 0] = 116.0 * f[..., 1] - 16.0
    lab[..., 1] = 500.0 * (f[..., 0] - f[..., 1])
    lab[..., 2] = 200.0 * (f[..., 1] - f[..., 2])
    return lab


def lab_to_xyz(lab: ArrayLike, white: ArrayLike = D50_XYZ) -> NDArray[np.float64]:
    """Return CIE XYZ (Y of the white = 1) for CIELAB; the inverse of :func:`xyz_to_lab`."""
    lab = np.asarray(lab, dtype=np.float64)
    fy = (lab[..., 0] + 16.0) / 116.0
    fx = fy + lab[..., 1] / 500.0
    fz = fy - lab[..., 2] / 200.0
    f = np.stack([fx, fy, fz], axis=-1)
    r = np.where(f**3 > _EPSILON, f**3, (116.0 * f - 16.0) / _KAPPA)
    # L* <= 8 lies on the linear segment for Y; use L* directly there for exactness.
    r[..., 1] = np.where(lab[..., 0] > _KAPPA * _EPSILON, fy**3, lab[..., 0] / _KAPPA)
    return r * np.asarray(white, dtype=np.float64)


def lab_to_lch(lab: ArrayLike) -> NDArray[np.float64]:
    """Return CIE LCh(ab) with hue in degrees in [0, 360) (CIE 015:2018 eq. 8.15-8.16)."""
    lab = np.asarray(lab, dtype=np.float64)
    out = np.empty_like(lab)
    out[..., 0] = lab[..., 0]
    out[..., 1] = np.hypot(lab[..., 1], lab[..., 2])
    out[..., 2] = np.degrees(np.arctan2(lab[..., 2], lab[..., 1])) % 360.0
    return out


def lch_to_lab(lch: ArrayLike) -> NDArray[np.float64]:
    """Return CIELAB for CIE LCh(ab) with hue in degrees."""
    lch = np.asarray(lch, dtype=np.float64)
    h = np.radians(lch[..., 2])
    out = np.empty_like(lch)
    out[..., 0] = lch[..., 0]
    out[..., 1] = lch[..., 1] * np.cos(h)
    out[..., 2] = lch[..., 1] * np.sin(h)
    return out
