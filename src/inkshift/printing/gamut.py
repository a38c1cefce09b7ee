"""Gamut volume and gamut coverage in CIELAB, from a segment-maxima descriptor.

Method
------
The device gamut's boundary is sampled densely in device space (RGB: the six
faces of the cube; CMYK: the facets of the ink-limited polytope
``{0 <= c, m, y, k <= 1, c + m + y + k <= limit}``, K anywhere in 0..1;
gray: the ramp), mapped to CIELAB through the profile, and summarised by a
segment-maxima gamut boundary descriptor: in each (L*, hue) segment the
sample of highest chroma C*ab stands for the boundary. Each L* row's
boundary points are joined by interpolating chroma over their own hue
angles and read off on fixed hue rays.

Volume assumes every constant-L* cross-section is star-shaped about the
neutral axis (true of printing and display gamuts, whose cross-sections
contain their neutral point): each row and ray contributes the sector area
``0.5 * r**2 * dh`` times ``dL``, so ``V = sum 0.5 * r**2 * dh * dL`` in cubic
CIELAB units. The intersection of two gamuts takes ``min(r_a, r_b)`` ray by
ray. Checked against a voxel count of the sRGB gamut (1 % or better, see
tests/test_gamut_volume.py).

Colorimetry: ICC-absolute. Gamuts of different papers are compared fairly
only on the paper itself: media-relative values (A2B1) map every paper white
to L* = 100, which would credit a grey newsprint with the lightness range of
a bright coated stock. So every profile is evaluated with A2B1 and scaled by
its media white point (ICC.1:2022, annex D.4, ICC-absolute colorimetric).
The source space of :func:`gamut_coverage` is evaluated the same way (a
display profile's absolute and relative values coincide when its media white
is the PCS white, as for sRGB).

References
----------
Morovič, J. and Luo, M. R. (2000), "Calculating medium and image gamut
boundaries for gamut mapping", Color Research & Application 25(6), 394-401
(the segment-maxima gamut boundary descriptor).
ICC.1:2022, annex D.4 (ICC-absolute from media-relative colorimetry).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.errors import ProfileError
from inkshift.icc.cms import srgb_profile_bytes
from inkshift.icc.evaluate import device_to_lab
from inkshift.icc.intent import Intent
from inkshift.icc.read import Profile, read_profile
from inkshift.icc.summary import ink_limits
from inkshift.shipped import resolve_profile

__all__ = [
    "GamutDescriptor",
    "segment_maxima",
    "descriptor_volume",
    "intersection_volume",
    "boundary_device_samples",
    "profile_boundary_lab",
    "estimate_ink_limit",
    "gamut_descriptor",
    "gamut_volume",
    "gamut_coverage",
    "gamut_summary",
    "GAMUT_CLASSES",
    "L_BIN",
    "HUE_BINS",
    "RAYS",
    "FACE_STEPS",
]

L_BIN = 0.5
"""Height of an L* bin (CIELAB units). Each bin keeps its highest-chroma sample,
so a taller bin overstates the volume where chroma changes fast with L*
(sRGB: +0.4 % at 0.5, +1.6 % at 1.0, +4 % at 2.0 against a voxel count)."""

HUE_BINS = 72
"""Number of hue segments (5 degrees each) in which the highest-chroma sample is kept."""

RAYS = 360
"""Hue directions (1 degree apart) on which each L* row is integrated and compared."""

FACE_STEPS = 129
"""Samples per device axis on an RGB cube face (steps of 1/128); CMYK facets use
33 per axis (steps of 1/32) because they are three-dimensional."""

_L_MAX = 101.0  # a paper or display white can sit marginally above L* = 100


@dataclass(frozen=True)
class GamutDescriptor:
    """A segment-maxima gamut boundary descriptor resampled on fixed hue rays.

    ``radius[i, j]`` is the gamut's chroma extent C*ab in L* row ``i``
    (``l_edges[i]`` to ``l_edges[i + 1]``) along hue ``j * 360 / rays``
    degrees; 0 where the gamut has no colour at that lightness.
    """

    radius: NDArray[np.float64]
    l_edges: NDArray[np.float64]

    @property
    def volume(self) -> float:
        """Volume in cubic CIELAB units (see :func:`descriptor_volume`)."""
        return descriptor_volume(self)


def segment_maxima(
    lab: ArrayLike, *, l_bin: float = L_BIN, hue_bins: int = HUE_BINS, rays: int = RAYS
) -> GamutDescriptor:
    """Return the segment-maxima descriptor of CIELAB samples of a gamut boundary.

    Parameters
    ----------
    lab
        ``(..., 3)`` CIELAB samples on (or inside) the gamut boundary.
    l_bin
        Height of an L* row.
    hue_bins
        Number of equal hue segments per row; each keeps its highest-chroma sample.
    rays
        Number of equally spaced hue directions the result is given on.

    Notes
    -----
    Segment maxima after Morovič and Luo (2000): within each (L*, hue)
    segment the sample of highest chroma stands for the boundary. In each L*
    row those points, at their own hue angles, are joined by linear
    interpolation of chroma over hue (circularly) and read off on ``rays``
    fixed directions. Using the points' own hues rather than the segment
    edges avoids crediting each segment with its maximum over its whole
    width, which overstates the sRGB volume by 6 % at 5-degree segments.
    Segments without samples are bridged by the interpolation.
    """
    lab = np.asarray(lab, dtype=np.float64).reshape(-1, 3)
    lab = lab[np.all(np.isfinite(lab), axis=1)]
    l_edges = np.arange(0.0, _L_MAX + l_bin / 2, l_bin)
    n_l = len(l_edges) - 1
    radius = np.zeros((n_l, rays))
    if lab.shape[0] == 0:
        return GamutDescriptor(radius, l_edges)
    chroma = np.hypot(lab[:, 1], lab[:, 2])
    hue = np.mod(np.arctan2(lab[:, 2], lab[:, 1]), 2 * np.pi)
    li = np.clip((lab[:, 0] / l_bin).astype(np.int64), 0, n_l - 1)
    hi = np.minimum((hue * (hue_bins / (2 * np.pi))).astype(np.int64), hue_bins - 1)
    key = li * hue_bins + hi
    order = np.lexsort((chroma, key))  # by segment, then chroma ascending
    last = np.r_[key[order][1:] != key[order][:-1], True]
    best = order[last]  # highest-chroma sample of every non-empty segment
    row, c_best, h_best = li[best], chroma[best], hue[best]
    directions = np.arange(rays) * (2 * np.pi / rays)
    starts = np.searchsorted(row, np.arange(n_l + 1))  # best is sorted by row (key order)
    for i in np.flatnonzero(np.diff(starts)):  # at most ~200 rows
        sl = slice(starts[i], starts[i + 1])
        radius[i] = np.interp(directions, h_best[sl], c_best[sl], period=2 * np.pi)
    return GamutDescriptor(radius, l_edges)


def descriptor_volume(desc: GamutDescriptor) -> float:
    """Return ``sum 0.5 * r**2 * dh * dL`` over rows and rays (star-shaped cross-sections)."""
    dh = 2 * np.pi / desc.radius.shape[1]
    dl = np.diff(desc.l_edges)[:, None]
    return float(np.sum(0.5 * desc.radius**2 * dh * dl))


def intersection_volume(a: GamutDescriptor, b: GamutDescriptor) -> float:
    """Return the volume common to two descriptors on the same rows and rays (``min(r_a, r_b)``)."""
    if a.radius.shape != b.radius.shape or not np.array_equal(a.l_edges, b.l_edges):
        raise ValueError("gamut descriptors use different rows or rays")
    return descriptor_volume(GamutDescriptor(np.minimum(a.radius, b.radius), a.l_edges))


def boundary_device_samples(
    n_channels: int, *, ink_limit: float | None = None, steps: int = FACE_STEPS
) -> NDArray[np.float64]:
    """Return device values (0..1) sampling the boundary of a device gamut.

    Parameters
    ----------
    n_channels
        1 (gray), 3 (RGB) or 4 (CMYK).
    ink_limit
        Total area coverage as a fraction (e.g. 3.0 for 300 %), CMYK only;
        ``None`` or >= 4 means no limit.
    steps
        Samples per axis on a face (CMYK facets, being three-dimensional, use ``steps // 4 + 1``).

    Notes
    -----
    RGB: the six faces of the cube. CMYK: the eight facets of the tesseract
    (one channel at 0 or 1, the other three on a grid) and the ink-limit
    facet (c + m + y + k = limit, the dependent channel solved for), all
    kept only where within the limit. A colour inside the polytope can still
    map onto the Lab boundary; the facets cover the surfaces that do in
    practice (K at 0 and the ink limit bound the dark end).
    """
    if n_channels == 1:
        return np.linspace(0.0, 1.0, 4 * steps)[:, None]
    if n_channels == 3:
        t = np.linspace(0.0, 1.0, steps)
        u, v = (a.ravel() for a in np.meshgrid(t, t, indexing="ij"))
        faces = []
        for axis in range(3):
            for value in (0.0, 1.0):
                cols = [u, v]
                cols.insert(axis, np.full_like(u, value))
                faces.append(np.stack(cols, -1))
        return np.concatenate(faces)
    if n_channels != 4:
        raise ValueError(f"no boundary sampling for {n_channels} channels")
    limit = 4.0 if ink_limit is None else float(ink_limit)
    t = np.linspace(0.0, 1.0, max(9, steps // 4 + 1))
    g = np.stack([a.ravel() for a in np.meshgrid(t, t, t, indexing="ij")], -1)
    parts = []
    for axis in range(4):
        for value in (0.0, 1.0):
            parts.append(np.insert(g, axis, value, axis=1))
        if limit < 4.0:
            dep = limit - g.sum(axis=1)
            ok = (dep >= 0.0) & (dep <= 1.0)
            parts.append(np.insert(g[ok], axis, dep[ok], axis=1))
    dev = np.concatenate(parts)
    return dev[dev.sum(axis=1) <= limit + 1e-9]


def _open(profile: Any) -> Profile:
    if isinstance(profile, Profile):
        return profile
    if isinstance(profile, (bytes, bytearray)):
        return read_profile(bytes(profile))
    if isinstance(profile, (str, Path)):
        return read_profile(resolve_profile(profile))
    raise ProfileError(str(profile), f"not a profile: {type(profile).__name__}")


def estimate_ink_limit(profile: Any) -> float | None:
    """Return a CMYK profile's ink limit (fraction, e.g. 3.3), or None.

    The largest total ink of its B2A tables, the figure ``profiles show``
    prints (:func:`inkshift.icc.summary.ink_limits`). None for profiles that
    are not CMYK or have no B2A table.
    """
    prof = _open(profile)
    limits = ink_limits(prof) if prof.color_space == "CMYK" else {}
    return max(limits.values()) / 100.0 if limits else None


def profile_boundary_lab(profile: Any, *, ink_limit: float | None = None, steps: int = FACE_STEPS) -> NDArray[np.float64]:
    """Return ICC-absolute CIELAB samples of a profile's device-gamut boundary.

    ``ink_limit`` (fraction) applies to CMYK; ``None`` reads it from the
    profile with :func:`estimate_ink_limit`.
    """
    prof = _open(profile)
    n = prof.channels
    if n not in (1, 3, 4) or prof.color_space.strip().upper() not in ("GRAY", "RGB", "CMYK"):
        raise ProfileError(getattr(prof, "source", "<profile>"), "gamut volume needs a GRAY, RGB or CMYK profile")
    if n == 4 and ink_limit is None:
        ink_limit = estimate_ink_limit(prof)
    dev = boundary_device_samples(n, ink_limit=ink_limit, steps=steps)
    return device_to_lab(prof, dev, Intent.ABSOLUTE)


def gamut_descriptor(profile: Any, *, ink_limit: float | None = None) -> GamutDescriptor:
    """Return the segment-maxima descriptor of a profile's ICC-absolute gamut.

    Descriptors are kept per profile content (a few seconds of work each;
    volume and coverage of the same profiles are asked for repeatedly).
    """
    prof = _open(profile)
    return _descriptor(prof.data, prof.source, ink_limit)


@lru_cache(maxsize=16)
def _descriptor(data: bytes, source: str, ink_limit: float | None) -> GamutDescriptor:
    return segment_maxima(profile_boundary_lab(read_profile(data, name=source), ink_limit=ink_limit))


def gamut_volume(profile: Any, *, ink_limit: float | None = None) -> float:
    """Return the ICC-absolute CIELAB volume of a profile's gamut (cubic CIELAB units).

    Parameters
    ----------
    profile
        A path, a shipped short name, ICC bytes or a profile read by
        :func:`inkshift.icc.read.read_profile`.
    ink_limit
        CMYK total area coverage as a fraction; read from the profile's B2A1
        when omitted (:func:`estimate_ink_limit`).

    Notes
    -----
    Segment-maxima descriptor (Morovič and Luo 2000) with star-shaped
    cross-sections; see the module docstring for the method and for why the
    values are ICC-absolute. A gray profile's gamut is a line of neutrals
    (or near-neutrals), so its volume is zero or close to it.
    """
    return gamut_descriptor(profile, ink_limit=ink_limit).volume


def gamut_coverage(profile: Any, source: Any = None, *, ink_limit: float | None = None) -> float:
    """Return the share (0..1) of the source gamut's volume that ``profile``'s gamut covers.

    ``source`` is any profile :func:`gamut_volume` accepts; ``None`` means
    sRGB (LittleCMS's built-in sRGB profile). Both gamuts are ICC-absolute.
    """
    if source is None:
        source = srgb_profile_bytes()
    target = gamut_descriptor(profile, ink_limit=ink_limit)
    src = gamut_descriptor(source)
    total = src.volume
    if total <= 0.0:
        raise ProfileError("<source profile>", "the source gamut has no volume")
    return intersection_volume(target, src) / total


GAMUT_CLASSES = ("prtr", "mntr", "scnr")
"""Device classes whose gamut :func:`gamut_summary` measures (output, display, input)."""


def gamut_summary(profile: Any) -> dict[str, float] | None:
    """Return ``{"gamut_volume": ..., "srgb_coverage": ...}`` for a device profile, else None.

    Both are ICC-absolute (see the module notes). Profiles of other classes
    (colour space, abstract, device link, named colour) or with a CIELAB or
    XYZ data space have no device gamut to measure and give None.
    """
    if getattr(profile, "device_class", None) not in GAMUT_CLASSES or profile.color_space in ("LAB", "XYZ"):
        return None
    return {"gamut_volume": gamut_volume(profile), "srgb_coverage": gamut_coverage(profile)}
