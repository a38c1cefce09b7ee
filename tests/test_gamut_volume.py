"""Tests of the gamut volume and coverage (inkshift.printing.gamut).

Independent references: the volume of the sRGB gamut in CIELAB computed by
the divergence theorem over the triangulated surface of the RGB cube, with
colour-science's IEC 61966-2-1 sRGB (Bradford adaptation to D50); the
closed-form volume of a ball; and exact scaling laws of the descriptor.
"""

from __future__ import annotations

import numpy as np
import pytest

import colour

from inkshift.color.convert import xyz_to_lab
from inkshift.icc.cms import srgb_profile_bytes
from inkshift.printing.gamut import (
    GamutDescriptor,
    boundary_device_samples,
    descriptor_volume,
    gamut_coverage,
    gamut_volume,
    intersection_volume,
    segment_maxima,
)
from conftest import require_file

_SRGB = colour.RGB_COLOURSPACES["sRGB"]
_D50_XY = colour.CCS_ILLUMINANTS["CIE 1931 2 Degree Standard Observer"]["D50"]
DEFAULT_CMYK = "/usr/share/color/icc/ghostscript/default_cmyk.icc"


def _srgb_to_lab(rgb: np.ndarray) -> np.ndarray:
    """colour-science sRGB (IEC 61966-2-1) -> XYZ adapted to D50 (Bradford) -> CIELAB."""
    xyz = colour.RGB_to_XYZ(
        rgb, _SRGB, illuminant=_D50_XY, chromatic_adaptation_transform="Bradford", apply_cctf_decoding=True
    )
    return xyz_to_lab(xyz)


def _divergence_volume(n: int = 129) -> float:
    """Volume enclosed by the image of the RGB cube's surface: sum of signed tetrahedra
    (origin, triangle) over a consistently oriented triangulation (divergence theorem)."""
    t = np.linspace(0.0, 1.0, n)
    u, v = np.meshgrid(t, t, indexing="ij")
    total = 0.0
    for axis in range(3):
        others = [np.eye(3)[i] for i in range(3) if i != axis]
        # +1 if (du x dv) points out of the cube on this face.
        orient = float(np.dot(np.cross(*others), np.eye(3)[axis]))
        for value, outward in ((0.0, -1.0), (1.0, 1.0)):
            cols = [u, v]
            cols.insert(axis, np.full_like(u, value))
            lab = _srgb_to_lab(np.stack(cols, -1))
            p00, p10, p01, p11 = lab[:-1, :-1], lab[1:, :-1], lab[:-1, 1:], lab[1:, 1:]
            s = np.einsum("...i,...i", p00, np.cross(p10, p11)).sum()
            s += np.einsum("...i,...i", p00, np.cross(p11, p01)).sum()
            total += orient * outward * s / 6.0
    return abs(total)


@pytest.fixture(scope="module")
def srgb_reference() -> float:
    # Measured: 833,272 at n = 129 (833,280 at n = 513); a voxel count of the
    # same gamut on a 1-unit CIELAB lattice gave 833,207.
    return _divergence_volume()


def test_srgb_volume_matches_divergence_theorem(srgb_reference):
    lab = _srgb_to_lab(boundary_device_samples(3))
    vol = segment_maxima(lab).volume
    # Measured: 840,489 vs 833,272 (+0.9 %). The segment maxima keep the
    # highest-chroma sample of each 0.5-L* row, a small upward bias.
    assert vol == pytest.approx(srgb_reference, rel=0.02)
    assert vol > srgb_reference  # the bias has a known sign


def test_srgb_volume_through_project_evaluator(srgb_reference):
    # LittleCMS's built-in sRGB profile, read and evaluated by the project:
    # 840,315 measured, within 2 % of the independent figure.
    assert gamut_volume(srgb_profile_bytes()) == pytest.approx(srgb_reference, rel=0.02)


def test_ball_volume_matches_closed_form():
    # A ball of radius 30 about (50, 0, 0): V = 4/3 pi r^3 = 113,097 (measured 114,443, +1.2 %).
    rng = np.random.default_rng(3)
    d = rng.normal(size=(400_000, 3))
    d /= np.linalg.norm(d, axis=1, keepdims=True)
    lab = np.array([50.0, 0.0, 0.0]) + 30.0 * d
    assert segment_maxima(lab).volume == pytest.approx(4.0 / 3.0 * np.pi * 30.0**3, rel=0.02)


def test_scaling_and_intersection_laws():
    lab = _srgb_to_lab(boundary_device_samples(3, steps=33))
    a = segment_maxima(lab)
    shrunk = segment_maxima(lab * [1.0, 0.8, 0.8])
    # Chroma scaled by 0.8 about the neutral axis scales every sector by 0.64.
    assert shrunk.volume == pytest.approx(0.64 * a.volume, rel=1e-9)
    assert intersection_volume(a, shrunk) == pytest.approx(shrunk.volume, rel=1e-12)
    assert intersection_volume(a, a) == pytest.approx(a.volume, rel=1e-12)
    empty = GamutDescriptor(np.zeros_like(a.radius), a.l_edges)
    assert descriptor_volume(empty) == 0.0 and intersection_volume(a, empty) == 0.0


def test_cmyk_boundary_samples_respect_the_ink_limit():
    dev = boundary_device_samples(4, ink_limit=3.0)
    sums = dev.sum(axis=1)
    assert sums.max() <= 3.0 + 1e-9
    assert np.isclose(sums, 3.0).sum() > 1000  # the ink-limit facet is sampled
    assert ((dev == 0) | (dev == 1)).any(axis=1).mean() > 0.5  # tesseract facets
    assert np.all((dev >= 0) & (dev <= 1))


def test_print_gamut_is_smaller_than_srgb_and_covers_part_of_it():
    path = require_file(DEFAULT_CMYK)
    vol = gamut_volume(path)
    cov = gamut_coverage(path)
    # Measured: 282,162 cubic units and 31 % of sRGB for Ghostscript's default_cmyk.icc
    # (ink limit read from its B2A1 CLUT: 300.4 %). A print gamut is well below sRGB's and
    # misses its saturated blues and greens (fact of the trade).
    assert 150_000 < vol < 0.8 * gamut_volume(srgb_profile_bytes())
    assert 0.2 < cov < 0.9
    assert gamut_coverage(srgb_profile_bytes()) == pytest.approx(1.0, abs=1e-12)


def test_gamut_summary_agrees_with_volume_and_coverage():
    from inkshift.icc.cms import lab_profile
    from inkshift.icc.read import read_profile
    from inkshift.printing.gamut import gamut_summary

    prof = read_profile(require_file(DEFAULT_CMYK))
    summary = gamut_summary(prof)
    assert summary["gamut_volume"] == pytest.approx(gamut_volume(prof), rel=1e-12)
    assert summary["srgb_coverage"] == pytest.approx(gamut_coverage(prof), rel=1e-12)
    # A CIELAB colour-space profile has no device gamut.
    assert gamut_summary(read_profile(lab_profile().tobytes())) is None
