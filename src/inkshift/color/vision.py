"""How a chart looks to readers with a colour-vision deficiency, and in grayscale.

Colour-vision deficiency (CVD) is simulated with the model of G. M. Machado,
M. M. Oliveira and L. A. F. Fernandes (2009), "A physiologically-based model for
simulation of color vision deficiency", IEEE Transactions on Visualization and
Computer Graphics 15(6):1291-1298. The model reduces to one 3x3 matrix per
deficiency and severity, applied to *linear* sRGB values (IEC 61966-2-1). The
authors published those matrices for severities 0, 0.1, ..., 1; severities in
between interpolate linearly between the two neighbouring published matrices,
as their supplementary material does. The published table is shipped as data
in :mod:`inkshift.color.machado2009` (the tests check it against
colour-science's ``CVD_MATRICES_MACHADO2010``), so no simulation imports
colour-science, which takes seconds.

Severity 1 of protanomaly and deuteranomaly is protanopia and deuteranopia.
For tritanomaly the authors shift the S-cone sensitivity instead of replacing
it, so its severity-1 matrix ("tritanopia" here) is their approximation of
tritanopia, not a model of it.

This simulates a typical dichromat or anomalous trichromat, not any one reader.

Colours given as CIELAB (D50, the ICC profile connection space) are taken to
linear sRGB through CIE XYZ with the Bradford chromatic adaptation from the ICC
D50 white to the sRGB white, from the standard sRGB and Bradford matrices
(the constants colour-science uses too; the tests check that). Two choices
differ from colour-science's own conversion, by up to about 2e-4 in linear RGB
(0.012 ΔE00): the adaptation starts from the white of the sRGB matrix (so sRGB
white is exactly L* = 100, a* = b* = 0), and CIELAB -> sRGB uses the exact
inverse of the RGB -> XYZ matrix rather than the standard's rounded one.
"""

from __future__ import annotations

import math
from functools import lru_cache
from typing import Final

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.color.convert import D50_XYZ, lab_to_xyz, xyz_to_lab
from inkshift.color.machado2009 import MACHADO2009_MATRICES
from inkshift.errors import InputError
from inkshift.thresholds import MERGE_DELTA_E

__all__ = [
    "CVD_KINDS",
    "CVD_MERGE_DELTA_E",
    "cvd_matrix",
    "simulate_cvd_linear",
    "simulate_cvd_srgb",
    "simulate_cvd_lab",
    "srgb_to_linear",
    "linear_to_srgb",
    "lab_to_linear_srgb",
    "linear_srgb_to_lab",
    "lab_to_gray_lab",
    "SRGB_TO_XYZ_D65",
    "BRADFORD",
]

CVD_MERGE_DELTA_E: Final[float] = MERGE_DELTA_E
"""ΔE00 below which two palette colours 'merge' for a simulated CVD reader. The
same rule as merging in print (:data:`inkshift.thresholds.MERGE_DELTA_E`, common
practice: under about 5 ΔE00 two category colours on small marks are easily
confused); a reader does not care whether print or their eyes caused it."""

# Kind name -> (key of the published table, whether it names the complete loss).
_KINDS: Final[dict[str, tuple[str, bool]]] = {
    "protanopia": ("Protanomaly", True),
    "protanomaly": ("Protanomaly", False),
    "deuteranopia": ("Deuteranomaly", True),
    "deuteranomaly": ("Deuteranomaly", False),
    "tritanopia": ("Tritanomaly", True),
    "tritanomaly": ("Tritanomaly", False),
}
CVD_KINDS: Final[tuple[str, ...]] = tuple(_KINDS)
"""Accepted deficiency names. The '-opia' names are severity 1 of the '-omaly' ones."""

_SEVERITY_STEPS: Final[int] = 10  # the published matrices are 0.1 apart


@lru_cache(maxsize=None)
def _published_table(key: str) -> NDArray[np.float64]:
    """The published matrices of one deficiency, stacked (11, 3, 3) by severity 0, 0.1, ..., 1."""
    stack = np.array(MACHADO2009_MATRICES[key], dtype=np.float64)
    stack.setflags(write=False)
    return stack


def _lookup(kind: str, severity: float) -> tuple[str, float]:
    name = str(kind).strip().lower()
    if name not in _KINDS:
        raise InputError(f"colour-vision deficiency '{kind}': unknown; use one of {', '.join(CVD_KINDS)}")
    key, complete = _KINDS[name]
    try:
        s = float(severity)
    except (TypeError, ValueError):
        raise InputError(f"colour-vision deficiency severity '{severity}': not a number") from None
    if not (0.0 <= s <= 1.0):
        raise InputError(f"colour-vision deficiency severity {severity}: must be between 0 and 1")
    if complete and s != 1.0:
        raise InputError(
            f"colour-vision deficiency '{name}' is the complete form (severity 1); "
            f"use '{name[:-4]}omaly' for severity {s:g}"
        )
    return key, s


def cvd_matrix(kind: str, severity: float = 1.0) -> NDArray[np.float64]:
    """Return the Machado et al. (2009) simulation matrix for linear sRGB.

    Parameters
    ----------
    kind
        One of :data:`CVD_KINDS` (case-insensitive).
    severity
        0 (normal vision) to 1 (dichromacy). Between the published steps of 0.1
        the matrix is interpolated linearly between the two neighbouring steps.
        The '-opia' kinds accept only 1.

    Returns
    -------
    numpy.ndarray
        A new (3, 3) float64 matrix ``M``; simulated ``rgb' = M @ rgb``.

    Raises
    ------
    inkshift.errors.InputError
        For an unknown kind or a severity outside 0..1.
    """
    key, s = _lookup(kind, severity)
    table = _published_table(key)
    position = s * _SEVERITY_STEPS
    lower = min(math.floor(position), _SEVERITY_STEPS - 1)
    weight = position - lower
    return (1.0 - weight) * table[lower] + weight * table[lower + 1]


def simulate_cvd_linear(rgb_linear: ArrayLike, kind: str, severity: float = 1.0) -> NDArray[np.float64]:
    """Apply the CVD matrix to linear sRGB values (last axis R, G, B).

    No clipping: results of in-gamut inputs may leave 0..1 by a little, which
    callers that need displayable values clip (see :func:`simulate_cvd_srgb`).
    """
    rgb = np.asarray(rgb_linear, dtype=np.float64)
    return rgb @ cvd_matrix(kind, severity).T


def srgb_to_linear(values: ArrayLike) -> NDArray[np.float64]:
    """Decode sRGB values (0..1) to linear light, IEC 61966-2-1:1999 section 5.2."""
    v = np.asarray(values, dtype=np.float64)
    return np.where(v <= 0.04045, v / 12.92, ((np.maximum(v, 0.04045) + 0.055) / 1.055) ** 2.4)


def linear_to_srgb(values: ArrayLike) -> NDArray[np.float64]:
    """Encode linear light (0..1) as sRGB values, IEC 61966-2-1:1999 section 5.3."""
    v = np.asarray(values, dtype=np.float64)
    return np.where(v <= 0.0031308, 12.92 * v, 1.055 * np.maximum(v, 0.0031308) ** (1.0 / 2.4) - 0.055)


def simulate_cvd_srgb(rgb_srgb: ArrayLike, kind: str, severity: float = 1.0) -> NDArray[np.float64]:
    """Simulate a CVD on sRGB values in 0..1: decode, apply the matrix, clip, encode.

    Clipping to 0..1 happens in linear light, after the matrix, as a display
    would show the simulated colour.
    """
    linear = simulate_cvd_linear(srgb_to_linear(rgb_srgb), kind, severity)
    return linear_to_srgb(np.clip(linear, 0.0, 1.0, out=linear))


SRGB_TO_XYZ_D65: Final[NDArray[np.float64]] = np.array(
    [[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722], [0.0193, 0.1192, 0.9505]]
)
"""Linear sRGB -> CIE XYZ (D65, Y of white = 1), IEC 61966-2-1:1999 section 5.2."""

BRADFORD: Final[NDArray[np.float64]] = np.array(
    [[0.8951, 0.2664, -0.1614], [-0.7502, 1.7135, 0.0367], [0.0389, -0.0685, 1.0296]]
)
"""XYZ -> Bradford cone-like responses (Lam 1985), as in ICC.1:2022 annex E."""


def _rgb_to_xyz_matrix() -> NDArray[np.float64]:
    """Linear sRGB -> ICC D50 XYZ: sRGB's primary matrix, then Bradford D65 -> D50.

    The standard's matrices have 4 decimals, and its XYZ -> RGB matrix is not the exact inverse of the RGB -> XYZ one.
    The project inverts the RGB -> XYZ matrix instead, so that the two
    directions are exact inverses (a round trip returns the colour to rounding).
    """
    # The adaptation starts from the white this matrix gives for R = G = B = 1
    # (0.9505, 1, 1.089), so display white lands exactly on the PCS white.
    white = SRGB_TO_XYZ_D65.sum(axis=1)
    gain = (BRADFORD @ D50_XYZ) / (BRADFORD @ white)
    adapt = np.linalg.solve(BRADFORD, gain[:, None] * BRADFORD)  # von Kries in Bradford space
    return adapt @ SRGB_TO_XYZ_D65


_LINEAR_SRGB_TO_XYZ_D50: Final[NDArray[np.float64]] = _rgb_to_xyz_matrix()
_XYZ_D50_TO_LINEAR_SRGB: Final[NDArray[np.float64]] = np.linalg.inv(_LINEAR_SRGB_TO_XYZ_D50)


def lab_to_linear_srgb(lab_d50: ArrayLike) -> NDArray[np.float64]:
    """Return unclipped linear sRGB for CIELAB (D50): XYZ, Bradford D50 -> D65, sRGB matrix.

    Values outside 0..1 mean the colour lies outside the sRGB gamut.
    """
    return lab_to_xyz(lab_d50) @ _XYZ_D50_TO_LINEAR_SRGB.T


def linear_srgb_to_lab(rgb_linear: ArrayLike) -> NDArray[np.float64]:
    """Return CIELAB (D50) for linear sRGB; the inverse of :func:`lab_to_linear_srgb`."""
    rgb = np.asarray(rgb_linear, dtype=np.float64)
    return xyz_to_lab(rgb @ _LINEAR_SRGB_TO_XYZ_D50.T)


def simulate_cvd_lab(lab_d50: ArrayLike, kind: str, severity: float = 1.0) -> NDArray[np.float64]:
    """Simulate a CVD on colours given as CIELAB (D50); return CIELAB (D50).

    This is how both the screen colours and the printed colours of a chart (which
    exist only as CIELAB) are seen through the model: CIELAB -> linear sRGB,
    clip to 0..1 in linear light, apply the matrix, clip again, and back to
    CIELAB. The model is defined for colours a display can show, so a colour
    outside the sRGB gamut is first replaced by the clipped one a display would
    show; in-gamut colours pass unchanged to the matrix.

    Parameters
    ----------
    lab_d50
        CIELAB (D50) array, last axis (L*, a*, b*).
    kind, severity
        As for :func:`cvd_matrix`.
    """
    m = cvd_matrix(kind, severity)
    linear = lab_to_linear_srgb(lab_d50)
    np.clip(linear, 0.0, 1.0, out=linear)
    simulated = linear @ m.T
    return linear_srgb_to_lab(np.clip(simulated, 0.0, 1.0, out=simulated))


def lab_to_gray_lab(lab: ArrayLike) -> NDArray[np.float64]:
    """Return the neutral of the same CIE L* (a* = b* = 0): a colour reduced to lightness.

    A grayscale print keeps (ideally) only lightness, so two colours that differ
    only in a* and b* print as the same gray; ΔE between the results of this
    function is the difference a grayscale reader can still see.
    """
    out = np.zeros_like(np.asarray(lab, dtype=np.float64))
    out[..., 0] = np.asarray(lab, dtype=np.float64)[..., 0]
    return out
