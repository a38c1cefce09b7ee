"""Numeric encodings of the ICC specification, as vectorised float conversions.

References
----------
ICC.1:2022 (v4.4), 4.6 s15Fixed16Number, 4.9 u1Fixed15Number, 6.3.4.2 (16-bit
CIELAB PCS encoding), 10.10/10.11 (lut16Type and lut8Type, which keep the
legacy ICC v2 16-bit Lab encoding), annex A.
ICC.1:2001-04 (v2.4), 6.5.4 (the legacy 16-bit Lab encoding: L* 0..100 ->
0..0xFF00, a*/b* -128..127.996 -> 0..0xFFFF with 0x8000 at zero).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "lab_from_legacy16",
    "lab_to_legacy16",
    "lab_from_v4_16",
    "lab_to_v4_16",
    "lab_from_8",
    "lab_to_8",
    "xyz_from_u1fixed15",
    "xyz_to_u1fixed15",
    "legacy16_lab_grid",
]


def lab_from_legacy16(codes: ArrayLike) -> NDArray[np.float64]:
    """Return CIELAB for legacy (ICC v2, lut16) 16-bit codes, as floats in 0..65535."""
    c = np.asarray(codes, dtype=np.float64)
    lab = np.empty_like(c)
    lab[..., 0] = c[..., 0] * (100.0 / 65280.0)
    lab[..., 1:] = c[..., 1:] / 256.0 - 128.0
    return lab


def lab_to_legacy16(lab: ArrayLike) -> NDArray[np.float64]:
    """Return legacy 16-bit codes (float, not rounded, clipped to 0..65535) for CIELAB."""
    lab = np.asarray(lab, dtype=np.float64)
    c = np.empty_like(lab)
    c[..., 0] = lab[..., 0] * (65280.0 / 100.0)
    c[..., 1:] = (lab[..., 1:] + 128.0) * 256.0
    return np.clip(c, 0.0, 65535.0)


def lab_from_v4_16(codes: ArrayLike) -> NDArray[np.float64]:
    """Return CIELAB for ICC v4 16-bit codes (L* 0..100 -> 0..0xFFFF, a*/b* -128..127 -> 0..0xFFFF)."""
    c = np.asarray(codes, dtype=np.float64)
    lab = np.empty_like(c)
    lab[..., 0] = c[..., 0] * (100.0 / 65535.0)
    lab[..., 1:] = c[..., 1:] * (255.0 / 65535.0) - 128.0
    return lab


def lab_to_v4_16(lab: ArrayLike) -> NDArray[np.float64]:
    """Return ICC v4 16-bit codes (float, clipped to 0..65535) for CIELAB."""
    lab = np.asarray(lab, dtype=np.float64)
    c = np.empty_like(lab)
    c[..., 0] = lab[..., 0] * (65535.0 / 100.0)
    c[..., 1:] = (lab[..., 1:] + 128.0) * (65535.0 / 255.0)
    return np.clip(c, 0.0, 65535.0)


def lab_from_8(codes: ArrayLike) -> NDArray[np.float64]:
    """Return CIELAB for 8-bit codes (L* 0..100 -> 0..255, a*/b* -128..127 -> 0..255)."""
    c = np.asarray(codes, dtype=np.float64)
    lab = np.empty_like(c)
    lab[..., 0] = c[..., 0] * (100.0 / 255.0)
    lab[..., 1:] = c[..., 1:] - 128.0
    return lab


def lab_to_8(lab: ArrayLike) -> NDArray[np.float64]:
    """Return 8-bit codes (float, clipped to 0..255) for CIELAB."""
    lab = np.asarray(lab, dtype=np.float64)
    c = np.empty_like(lab)
    c[..., 0] = lab[..., 0] * (255.0 / 100.0)
    c[..., 1:] = lab[..., 1:] + 128.0
    return np.clip(c, 0.0, 255.0)


def xyz_from_u1fixed15(codes: ArrayLike) -> NDArray[np.float64]:
    """Return XYZ (white Y = 1) for 16-bit PCS XYZ codes (u1Fixed15: 0x8000 = 1.0)."""
    return np.asarray(codes, dtype=np.float64) / 32768.0


def xyz_to_u1fixed15(xyz: ArrayLike) -> NDArray[np.float64]:
    """Return 16-bit PCS XYZ codes (float, clipped to 0..65535) for XYZ."""
    return np.clip(np.asarray(xyz, dtype=np.float64) * 32768.0, 0.0, 65535.0)


def legacy16_lab_grid(points: int) -> NDArray[np.float64]:
    """Return the CIELAB value of every node of a ``points**3`` lut16 grid with Lab input.

    Node ``i`` on each axis sits at code ``i * 65535 / (points - 1)`` of the
    legacy encoding, so L* runs 0..100.39 and a*, b* -128..127.996. The result
    has shape ``(points, points, points, 3)``, axes in L*, a*, b* order.
    """
    codes = np.linspace(0.0, 65535.0, points)
    grid = np.stack(np.meshgrid(codes, codes, codes, indexing="ij"), axis=-1)
    return lab_from_legacy16(grid)
