"""Tests of the ICC v2.4 output-profile writer (inkshift.icc.write).

The reference is LittleCMS 2 through Pillow.ImageCms: a profile written from
synthetic tables must open there, report the header fields as written, and
transform with every intent in both directions, matching the tables.
Layout checks follow ICC.1:2001-04 (6.1 header, 6.2 tag table, 6.5.5
lut16Type, 6.5.17 textDescriptionType).
"""

from __future__ import annotations

import io
import struct
from dataclasses import dataclass, replace
from datetime import datetime

import numpy as np
import pytest
from PIL import ImageCms

from inkshift.color.convert import D50_XYZ, xyz_to_lab
from inkshift.errors import InputError
from inkshift.icc.cms import lab_profile, transform_colors
from inkshift.icc.encoding import lab_to_legacy16, legacy16_lab_grid
from inkshift.icc.write import printer_profile_bytes

CREATED = "2024-05-01T12:34:56"


@dataclass
class Tables:
    """Same attributes as inkshift.printing.tables.ProfileTables (tables contract)."""

    description: str
    copyright: str
    color_space: str
    media_white_xyz: np.ndarray
    media_black_xyz: np.ndarray
    a2b: dict
    b2a: dict
    gamut: np.ndarray


# Ink transmittance per X, Y, Z channel for a simple subtractive model; only
# needs to be smooth and to stay inside the 8-bit Lab range (a*, b* within +-127).
_TRANSMITTANCE = np.array([[0.25, 0.55, 0.95], [0.7, 0.4, 0.6], [0.9, 0.85, 0.1], [0.1, 0.1, 0.1]])


def _b2a_affine(lab: np.ndarray, intent: int, n_ink: int) -> np.ndarray:
    """An affine Lab -> device map inside 0..1 everywhere on the Lab cube.

    Trilinear and tetrahedral interpolation both reproduce affine functions
    exactly, so LittleCMS must return this value at any Lab, node or not.
    """
    L, a, b = lab[..., 0], lab[..., 1], lab[..., 2]
    out = np.stack([0.45 - a / 600 + b / 900, 0.45 + a / 500, 0.5 + b / 400, 0.6 - L / 250], -1)
    out = out + 0.03 * intent
    return out if n_ink == 4 else out[..., 3:]


def synthetic_cmyk(a2b_points: int = 6, b2a_points: int = 9) -> Tables:
    nodes = np.linspace(0.0, 1.0, a2b_points)
    dev = np.stack(np.meshgrid(*[nodes] * 4, indexing="ij"), -1)
    lab = xyz_to_lab(D50_XYZ * np.prod(1 - dev[..., :, None] * (1 - _TRANSMITTANCE), axis=-2))
    # Distinct tables per intent so that a tag mix-up is caught.
    a2b = {1: lab, 0: lab * [0.98, 1.0, 1.0], 2: lab * [1.0, 1.05, 0.95]}
    grid = legacy16_lab_grid(b2a_points)
    b2a = {i: _b2a_affine(grid, i, 4) for i in range(3)}
    gamut = (np.hypot(grid[..., 1], grid[..., 2]) > 60).astype(float)[..., None]
    return Tables(
        "Synthetic CMYK test profile", "No copyright, use freely", "CMYK",
        np.array([0.85, 0.88, 0.72]), np.array([0.010, 0.011, 0.009]), a2b, b2a, gamut,
    )


def synthetic_gray(points: int = 256, b2a_points: int = 9) -> Tables:
    t = np.linspace(0.0, 1.0, points)
    L = 95.0 - 80.0 * t**0.8
    lab = np.stack([L, 0.5 - t, 2.0 - 3.0 * t], -1)
    a2b = {1: lab, 0: lab + [1.0, 0, 0], 2: lab - [1.0, 0, 0]}
    grid = legacy16_lab_grid(b2a_points)
    b2a = {i: _b2a_affine(grid, i, 1) for i in range(3)}
    gamut = np.zeros(grid.shape[:-1] + (1,))
    return Tables(
        "Synthetic gray test profile", "No copyright", "GRAY",
        np.array([0.86, 0.89, 0.74]), np.array([0.05, 0.052, 0.045]), a2b, b2a, gamut,
    )


def _lab8_to_float(out: np.ndarray) -> np.ndarray:
    """Pillow LAB bytes -> Lab: L in 0..255 for 0..100, a*/b* signed bytes (DESIGN.md)."""
    lab = np.empty(out.shape, float)
    lab[..., 0] = out[..., 0].astype(float) * (100.0 / 255.0)
    lab[..., 1:] = out[..., 1:].view(np.int8).astype(float)
    return lab


def _lab_float_to_pillow(lab: np.ndarray) -> np.ndarray:
    buf = np.empty(lab.shape, np.uint8)
    buf[..., 0] = np.rint(lab[..., 0] * 2.55).astype(np.uint8)
    buf[..., 1:] = np.rint(lab[..., 1:]).astype(np.int8).view(np.uint8)
    return buf


# ------------------------------------------------------------- LittleCMS checks


def test_cmyk_profile_header_as_parsed_by_littlecms():
    data = printer_profile_bytes(synthetic_cmyk(), created=CREATED)
    p = ImageCms.ImageCmsProfile(io.BytesIO(data)).profile
    assert p.version == pytest.approx(2.4)
    assert p.device_class == "prtr"
    assert p.xcolor_space == "CMYK"
    assert p.connection_space == "Lab "
    assert p.profile_description == "Synthetic CMYK test profile"
    assert p.copyright == "No copyright, use freely"
    assert p.rendering_intent == 0
    assert p.creation_date == datetime(2024, 5, 1, 12, 34, 56)
    # s15Fixed16 keeps 1/65536: within 1e-5 of the values written.
    np.testing.assert_allclose(p.media_white_point[0], [0.85, 0.88, 0.72], atol=1e-5)
    np.testing.assert_allclose(p.media_black_point[0], [0.010, 0.011, 0.009], atol=1e-5)
    for intent in range(3):
        assert p.is_intent_supported(intent, ImageCms.Direction.INPUT)
        assert p.is_intent_supported(intent, ImageCms.Direction.OUTPUT)


@pytest.mark.parametrize("intent", [0, 1, 2])
def test_cmyk_a2b_matches_tables_at_grid_nodes(intent):
    # 6 nodes per axis sit at 8-bit codes 0, 51, ..., 255, so LittleCMS
    # evaluates exactly at the nodes; NOOPTIMIZE makes it use the profile's own
    # tables (DESIGN.md). Its 8-bit Lab output is compared code by code.
    tables = synthetic_cmyk()
    data = printer_profile_bytes(tables, created=CREATED)
    codes = (np.arange(6) * 51).astype(np.uint8)
    dev = np.stack(np.meshgrid(*[codes] * 4, indexing="ij"), -1)
    out = transform_colors(dev, data, lab_profile(), "CMYK", "LAB", intent, optimise=False)
    got = _lab8_to_float(out)
    want = tables.a2b[intent]
    assert np.abs(got[..., 0] - want[..., 0]).max() * 2.55 <= 1.0
    assert np.abs(got[..., 1:] - want[..., 1:]).max() <= 1.0


@pytest.mark.parametrize("intent", [0, 1, 2])
def test_cmyk_b2a_matches_tables(intent):
    tables = synthetic_cmyk()
    data = printer_profile_bytes(tables, created=CREATED)
    rng = np.random.default_rng(7)
    lab = np.stack([rng.uniform(0, 100, 3000), rng.uniform(-110, 110, 3000), rng.uniform(-110, 110, 3000)], -1)
    buf = _lab_float_to_pillow(lab)
    out = transform_colors(buf, lab_profile(), data, "LAB", "CMYK", intent, optimise=False)
    # Expected value at the 8-bit Lab LittleCMS actually received.
    want = _b2a_affine(_lab8_to_float(buf), intent, 4) * 255.0
    assert np.abs(out.astype(float) - want).max() <= 1.0
    # Also the exact grid nodes (held by an affine table): the paper white node.
    node = _b2a_affine(legacy16_lab_grid(9)[8, 4, 4], intent, 4)
    assert np.allclose(tables.b2a[intent][8, 4, 4], node)


@pytest.mark.parametrize("intent", [0, 1, 2])
def test_gray_profile_round_trips_with_256_point_table(intent):
    tables = synthetic_gray()
    data = printer_profile_bytes(tables, created=CREATED)
    p = ImageCms.ImageCmsProfile(io.BytesIO(data)).profile
    assert p.xcolor_space == "GRAY"
    # 256 nodes are the 256 8-bit gray codes: every code is a node.
    gray = np.arange(256, dtype=np.uint8)[:, None]
    got = _lab8_to_float(transform_colors(gray, data, lab_profile(), "L", "LAB", intent, optimise=False))
    want = tables.a2b[intent]
    assert np.abs(got[:, 0] - want[:, 0]).max() * 2.55 <= 1.0
    assert np.abs(got[:, 1:] - want[:, 1:]).max() <= 1.0
    lab = np.stack([np.linspace(5, 100, 200), np.linspace(-40, 40, 200), np.linspace(30, -30, 200)], -1)
    buf = _lab_float_to_pillow(lab)
    out = transform_colors(buf, lab_profile(), data, "LAB", "L", intent, optimise=False)
    want_k = _b2a_affine(_lab8_to_float(buf), intent, 1)[:, 0] * 255.0
    assert np.abs(out[:, 0].astype(float) - want_k).max() <= 1.0


def test_gray_profile_with_small_grid_uses_clut():
    tables = synthetic_gray(points=17)
    data = printer_profile_bytes(tables, created=CREATED)
    codes = np.rint(np.linspace(0, 255, 17)).astype(np.uint8)
    # Only codes 0 and 255 are exact nodes of a 17-point grid (255/16 is not whole).
    got = _lab8_to_float(transform_colors(codes[[0, -1], None], data, lab_profile(), "L", "LAB", 1, optimise=False))
    want = tables.a2b[1][[0, -1]]
    assert np.abs(got[:, 0] - want[:, 0]).max() * 2.55 <= 1.0
    assert np.abs(got[:, 1:] - want[:, 1:]).max() <= 1.0


# --------------------------------------------------------------- layout checks


def _tag_table(data: bytes) -> dict[str, tuple[int, int]]:
    (count,) = struct.unpack_from(">I", data, 128)
    tags = {}
    for i in range(count):
        sig, off, size = struct.unpack_from(">4sII", data, 132 + 12 * i)
        tags[sig.decode("ascii")] = (off, size)
    return tags


def test_layout_follows_icc_v2_header_and_tag_table():
    data = printer_profile_bytes(synthetic_cmyk(), created=CREATED)
    # ICC.1:2001-04 6.1: size, version 2.4.0, class, spaces, 'acsp', D50 illuminant.
    assert struct.unpack_from(">I", data, 0)[0] == len(data)
    assert len(data) % 4 == 0
    assert data[8:12] == b"\x02\x40\x00\x00"
    assert data[12:24] == b"prtrCMYKLab "
    assert struct.unpack_from(">6H", data, 24) == (2024, 5, 1, 12, 34, 56)
    assert data[36:40] == b"acsp"
    # D50 = 0.9642, 1.0, 0.8249 as s15Fixed16 (ICC.1:2001-04 6.1.14): 0x0000F6D6, 0x00010000, 0x0000D32D.
    assert data[68:80] == bytes.fromhex("0000f6d6" "00010000" "0000d32d")
    assert data[84:128] == bytes(44)  # profile ID and reserved bytes are zero in v2
    tags = _tag_table(data)
    assert set(tags) == {"desc", "cprt", "wtpt", "bkpt", "A2B0", "A2B1", "A2B2", "B2A0", "B2A1", "B2A2", "gamt"}
    for off, size in tags.values():
        assert off % 4 == 0 and off + size <= len(data)


def test_desc_and_lut16_fields():
    data = printer_profile_bytes(synthetic_cmyk(), created=CREATED)
    tags = _tag_table(data)
    off, size = tags["desc"]
    text = b"Synthetic CMYK test profile\0"
    # ICC.1:2001-04 6.5.17: count includes the NUL; then Unicode code+count, ScriptCode code, count, 67 bytes.
    assert data[off:off + 4] == b"desc"
    assert struct.unpack_from(">I", data, off + 8)[0] == len(text)
    assert data[off + 12:off + 12 + len(text)] == text
    assert size == 12 + len(text) + 8 + 3 + 67
    # lut16 (6.5.5): 'mft2', channels, grid, identity matrix, curve lengths, total size.
    off, size = tags["A2B1"]
    assert data[off:off + 4] == b"mft2"
    n_in, n_out, grid = struct.unpack_from(">BBB", data, off + 8)
    assert (n_in, n_out, grid) == (4, 3, 6)
    matrix = struct.unpack_from(">9i", data, off + 12)
    assert matrix == (65536, 0, 0, 0, 65536, 0, 0, 0, 65536)
    n, m = struct.unpack_from(">HH", data, off + 48)
    assert size == 52 + 2 * (n * n_in + grid**n_in * n_out + m * n_out)
    off, size = tags["gamt"]
    assert struct.unpack_from(">BBB", data, off + 8) == (3, 1, 9)
    # CLUT of the gamut tag: first input (L*) most significant; the node at
    # L* index 4, a* index 8 (a* = +127.996), b* index 4 (b* = 0) is out of gamut (1).
    clut = np.frombuffer(data, ">u2", count=9**3, offset=off + 52 + 2 * 2 * 3).reshape(9, 9, 9)
    assert clut[4, 8, 4] == 65535 and clut[4, 4, 4] == 0
    want = (np.hypot(legacy16_lab_grid(9)[..., 1], legacy16_lab_grid(9)[..., 2]) > 60) * 65535
    assert np.array_equal(clut, want)


def test_rebuilds_are_byte_identical_and_date_is_the_only_difference():
    a = printer_profile_bytes(synthetic_cmyk(), created=CREATED)
    b = printer_profile_bytes(synthetic_cmyk(), created=datetime(2024, 5, 1, 12, 34, 56))
    c = printer_profile_bytes(synthetic_cmyk(), created="2025-01-02")
    assert a == b
    diff = [i for i in range(len(a)) if a[i] != c[i]]
    assert diff and min(diff) >= 24 and max(diff) < 36


def test_identical_tables_share_one_tag_body():
    t = synthetic_cmyk()
    t.a2b[0] = t.a2b[2] = t.a2b[1]
    tags = _tag_table(printer_profile_bytes(t, created=CREATED))
    assert tags["A2B0"] == tags["A2B1"] == tags["A2B2"]
    assert tags["B2A0"] != tags["B2A1"]


def test_bad_tables_raise_one_line_input_errors():
    t = synthetic_cmyk()
    with pytest.raises(InputError, match="a2b"):
        printer_profile_bytes(replace(t, a2b={0: t.a2b[0], 1: t.a2b[1][..., :2], 2: t.a2b[2]}), created=CREATED)
    with pytest.raises(InputError, match="intent 2"):
        printer_profile_bytes(replace(t, b2a={0: t.b2a[0], 1: t.b2a[1]}), created=CREATED)
    with pytest.raises(InputError, match="ASCII"):
        printer_profile_bytes(replace(t, description="Offset \u00e9"), created=CREATED)
    with pytest.raises(InputError, match="color_space"):
        printer_profile_bytes(replace(t, color_space="RGB"), created=CREATED)
    with pytest.raises(InputError, match="ISO date"):
        printer_profile_bytes(t, created="yesterday")
    bad = dict(t.a2b)
    bad[1] = t.a2b[1].copy()
    bad[1][0, 0, 0, 0, 0] = np.nan
    with pytest.raises(InputError, match="non-finite"):
        printer_profile_bytes(replace(t, a2b=bad), created=CREATED)


# ------------------------------------------------------- the project's reader


@pytest.mark.parametrize("intent", [0, 1, 2])
def test_project_reader_returns_the_tables_at_grid_nodes(intent):
    from inkshift.icc.evaluate import device_to_lab, lab_to_device
    from inkshift.icc.lut import eval_lut
    from inkshift.icc.read import read_profile

    tables = synthetic_cmyk(a2b_points=5, b2a_points=9)
    prof = read_profile(printer_profile_bytes(tables, created=CREATED))
    assert (prof.device_class, prof.color_space, prof.pcs) == ("prtr", "CMYK", "LAB")
    assert prof.description == tables.description and prof.copyright == tables.copyright
    np.testing.assert_allclose(prof.media_white, tables.media_white_xyz, atol=1e-5)
    nodes = np.linspace(0.0, 1.0, 5)
    dev = np.stack(np.meshgrid(*[nodes] * 4, indexing="ij"), -1).reshape(-1, 4)
    # Legacy 16-bit Lab: L* step 100/65280, a*/b* step 1/256; rounding is half a step.
    got = device_to_lab(prof, dev, intent)
    np.testing.assert_allclose(got, tables.a2b[intent].reshape(-1, 3), atol=0.5 / 256 + 1e-9)
    grid = legacy16_lab_grid(9).reshape(-1, 3)
    np.testing.assert_allclose(lab_to_device(prof, grid, intent), tables.b2a[intent].reshape(-1, 4), atol=0.5 / 65535 + 1e-9)
    # gamt: legacy 16-bit Lab in, one channel out, 0 in gamut.
    flags = eval_lut(prof.gamut, lab_to_legacy16(grid) / 65535.0)[:, 0]
    np.testing.assert_array_equal(flags, tables.gamut.reshape(-1))


def test_project_reader_gray_256_point_table():
    from inkshift.icc.evaluate import device_to_lab
    from inkshift.icc.read import read_profile

    tables = synthetic_gray()
    prof = read_profile(printer_profile_bytes(tables, created=CREATED))
    got = device_to_lab(prof, np.linspace(0.0, 1.0, 256)[:, None], 1)
    np.testing.assert_allclose(got, tables.a2b[1], atol=0.5 / 256 + 1e-6)
