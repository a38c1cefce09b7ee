"""Build small ICC profiles byte by byte for the reader and evaluator tests.

The layouts follow ICC.1:2022 (v4.4): 7.2 header, 7.3 tag table, 10.6
curveType, 10.10 lut16Type, 10.12 lutAToBType, 10.13 lutBToAType, 10.15
multiLocalizedUnicodeType, 10.18 parametricCurveType, 10.31 XYZType. The
profiles carry made-up but smooth tables; LittleCMS (through Pillow) reads
them too, and the tests compare the project's evaluator against it.
"""

from __future__ import annotations

import struct

import numpy as np


def s15(values) -> bytes:
    """s15Fixed16Numbers, big-endian (ICC.1:2022 4.6)."""
    return b"".join(struct.pack(">i", int(round(v * 65536.0))) for v in np.ravel(values))


def pad4(b: bytes) -> bytes:
    return b + b"\0" * (-len(b) % 4)


def xyz_tag(xyz) -> bytes:
    return b"XYZ \0\0\0\0" + s15(xyz)


def mluc_tag(text: str) -> bytes:
    body = text.encode("utf-16-be")
    return b"mluc\0\0\0\0" + struct.pack(">II2s2sII", 1, 12, b"en", b"US", len(body), 28) + body


def curv_gamma(gamma: float) -> bytes:
    return b"curv\0\0\0\0" + struct.pack(">IH", 1, int(round(gamma * 256)))


def curv_identity() -> bytes:
    return b"curv\0\0\0\0" + struct.pack(">I", 0)


def curv_table(values) -> bytes:
    codes = np.round(np.clip(values, 0, 1) * 65535).astype(">u2")
    return b"curv\0\0\0\0" + struct.pack(">I", codes.size) + codes.tobytes()


def para(function: int, params) -> bytes:
    return b"para\0\0\0\0" + struct.pack(">HH", function, 0) + s15(params)


def _curves(curves: list[bytes]) -> bytes:
    return b"".join(pad4(c) for c in curves)


def _clut(grid, table, precision: int) -> bytes:
    head = bytes(list(grid) + [0] * (16 - len(grid))) + bytes([precision, 0, 0, 0])
    if precision == 1:
        data = np.round(np.clip(table, 0, 1) * 255).astype(np.uint8).tobytes()
    else:
        data = np.round(np.clip(table, 0, 1) * 65535).astype(">u2").tobytes()
    return pad4(head + data)


def lut_ab_tag(kind: str, n_in: int, n_out: int, *, a=None, clut=None, m=None, matrix=None, b=None,
               precision: int = 2) -> bytes:
    """lutAToBType ('mAB ') or lutBToAType ('mBA '); ``clut`` is (grid, table (prod, n_out) in 0..1),
    ``matrix`` is (3x3, offset 3)."""
    sig = b"mAB " if kind == "mAB" else b"mBA "
    elements: dict[str, bytes] = {}
    if b is not None:
        elements["b"] = _curves(b)
    if matrix is not None:
        elements["matrix"] = s15(np.concatenate([np.ravel(matrix[0]), np.ravel(matrix[1])]))
    if m is not None:
        elements["m"] = _curves(m)
    if clut is not None:
        elements["clut"] = _clut(clut[0], clut[1], precision)
    if a is not None:
        elements["a"] = _curves(a)
    pos = 32
    offsets = {}
    body = b""
    for key in ("b", "matrix", "m", "clut", "a"):
        if key in elements:
            offsets[key] = pos
            body += elements[key]
            pos += len(elements[key])
    head = sig + b"\0\0\0\0" + struct.pack(">BBH", n_in, n_out, 0)
    head += struct.pack(">5I", *(offsets.get(k, 0) for k in ("b", "matrix", "m", "clut", "a")))
    return head + body


def lut16_tag(n_in: int, n_out: int, grid_points: int, table, in_tables=None, out_tables=None,
              matrix=None, entries: int = 256) -> bytes:
    """lut16Type ('mft2') with identity curves unless given."""
    ramp = np.linspace(0, 1, entries)
    in_tables = np.tile(ramp, (n_in, 1)) if in_tables is None else np.asarray(in_tables)
    out_tables = np.tile(ramp, (n_out, 1)) if out_tables is None else np.asarray(out_tables)
    matrix = np.eye(3) if matrix is None else matrix

    def u16(x):
        return np.round(np.clip(x, 0, 1) * 65535).astype(">u2").tobytes()

    head = b"mft2\0\0\0\0" + struct.pack(">BBBB", n_in, n_out, grid_points, 0) + s15(matrix)
    head += struct.pack(">HH", in_tables.shape[1], out_tables.shape[1])
    return head + u16(in_tables) + u16(table) + u16(out_tables)


def profile_bytes(tags: dict[str, bytes], *, device_class: bytes = b"mntr", space: bytes = b"RGB ",
                  pcs: bytes = b"Lab ", version: int = 0x04400000, intent: int = 0) -> bytes:
    """Assemble a profile: header, tag table, then each tag 4-byte aligned."""
    n = len(tags)
    pos = 128 + 4 + 12 * n
    table = struct.pack(">I", n)
    data = b""
    for sig, body in tags.items():
        table += struct.pack(">4sII", sig.encode("latin-1"), pos, len(body))
        padded = pad4(body)
        data += padded
        pos += len(padded)
    size = 128 + len(table) + len(data)
    header = struct.pack(">I4sI4s4s4s", size, b"none", version, device_class, space, pcs)
    header += struct.pack(">6H", 2026, 1, 1, 0, 0, 0) + b"acsp" + b"\0" * 4
    header += struct.pack(">I", 0) + b"\0" * 8 + b"\0" * 8  # flags, manufacturer, model, attributes
    header += struct.pack(">I", intent) + s15([0.9642, 1.0, 0.8249]) + b"\0" * 4
    header = header + b"\0" * (128 - len(header))
    return header + table + data


def rgb_lab_ab_profile() -> bytes:
    """A v4 RGB display profile with Lab PCS whose A2B1/B2A1 are lutAtoB/lutBtoA.

    A2B1: A curves of parametric types 0-2, a 5x7x6 2-byte CLUT, M curves
    (parametric types 3 and 4, a gamma), a matrix with offset, B curves
    (a table, an identity, a gamma). B2A1: B curves, matrix, M curves, a 9^3
    1-byte CLUT and A curves. The CLUT holds smooth functions of the grid.
    """
    grid = (5, 7, 6)
    axes = np.meshgrid(*[np.linspace(0, 1, g) for g in grid], indexing="ij")
    r, g, b = (ax.ravel() for ax in axes)
    lab = np.stack([
        100.0 * (0.2 * r + 0.7 * g + 0.1 * b) ** 0.8,
        80.0 * (r - g) * (1.0 - 0.3 * b),
        60.0 * (0.5 * (r + g) - b),
    ], axis=1)
    a2b_table = np.stack([lab[:, 0] / 100.0, (lab[:, 1] + 128.0) / 255.0, (lab[:, 2] + 128.0) / 255.0], axis=1)
    a2b = lut_ab_tag(
        "mAB", 3, 3,
        a=[para(0, [1.8]), para(1, [2.2, 1.0, 0.0]), para(2, [2.0, 0.95, 0.05, 0.02])],
        clut=(grid, a2b_table),
        m=[para(3, [2.4, 1 / 1.055, 0.055 / 1.055, 1 / 12.92, 0.04045]),
           para(4, [1.5, 0.9, 0.1, 0.5, 0.1, 0.0, 0.0]), curv_gamma(1.0)],
        matrix=(np.array([[0.9, 0.05, 0.0], [0.02, 0.95, 0.0], [0.0, 0.03, 0.92]]), np.array([0.02, 0.01, 0.03])),
        b=[curv_table(np.linspace(0, 1, 256) ** 0.9), curv_identity(), curv_gamma(1.1)],
        precision=2,
    )
    g9 = 9
    axes = np.meshgrid(*[np.linspace(0, 1, g9)] * 3, indexing="ij")
    lv, av, bv = (ax.ravel() for ax in axes)
    b2a_table = np.stack([
        np.clip(lv + 0.4 * (av - 0.5), 0, 1),
        np.clip(lv - 0.3 * (av - 0.5) + 0.1 * (bv - 0.5), 0, 1),
        np.clip(lv - 0.5 * (bv - 0.5), 0, 1),
    ], axis=1)
    b2a = lut_ab_tag(
        "mBA", 3, 3,
        b=[curv_identity(), curv_identity(), curv_identity()],
        matrix=(np.array([[1.0, 0.0, 0.0], [0.0, 0.9, 0.05], [0.0, 0.05, 0.9]]), np.array([0.0, 0.025, 0.025])),
        m=[para(0, [1.0]), curv_gamma(1.2), curv_table(np.linspace(0, 1, 64) ** 0.8)],
        clut=((g9,) * 3, b2a_table),
        a=[curv_table(np.linspace(0, 1, 128) ** 1.2), para(0, [0.9]), curv_identity()],
        precision=1,
    )
    return profile_bytes({
        "desc": mluc_tag("inkshift test RGB lutAtoB"),
        "cprt": mluc_tag("test data, no rights reserved"),
        "wtpt": xyz_tag([0.9642, 1.0, 0.8249]),
        "A2B1": a2b,
        "B2A1": b2a,
    })


def cmyk_xyz_ab_profile(grid=(3, 4, 5, 3)) -> bytes:
    """A v4 CMYK output profile with XYZ PCS whose A2B1 is a lutAtoB with a per-dimension 4-D grid."""
    axes = np.meshgrid(*[np.linspace(0, 1, g) for g in grid], indexing="ij")
    c, m, y, k = (ax.ravel() for ax in axes)
    refl = np.stack([(1 - 0.85 * c) * (1 - 0.3 * m), (1 - 0.25 * c) * (1 - 0.85 * m) * (1 - 0.1 * y),
                     (1 - 0.2 * m) * (1 - 0.9 * y)], axis=1) * (1 - 0.9 * k)[:, None]
    xyz = refl @ np.array([[0.45, 0.25, 0.05], [0.35, 0.65, 0.1], [0.15, 0.1, 0.67]]).T
    table = np.clip(xyz * 32768.0 / 65535.0, 0, 1)
    a2b = lut_ab_tag(
        "mAB", 4, 3,
        a=[curv_gamma(1.1), para(0, [0.9]), curv_identity(), curv_table(np.linspace(0, 1, 32) ** 1.3)],
        clut=(grid, table),
        b=[curv_identity(), curv_identity(), curv_identity()],
    )
    return profile_bytes({
        "desc": mluc_tag("inkshift test CMYK XYZ lutAtoB"),
        "wtpt": xyz_tag([0.9642, 1.0, 0.8249]),
        "A2B1": a2b,
    }, device_class=b"prtr", space=b"CMYK", pcs=b"XYZ ")


def cmyk_lut16_profile(grid_points: int = 5, table=None) -> bytes:
    """A v2 CMYK output profile with Lab PCS and a lut16 A2B0 (identity curves).

    ``table`` (grid_points**4, 3) in 0..1 replaces the smooth default CLUT.
    """
    if table is not None:
        return profile_bytes({
            "desc": mluc_tag("inkshift test CMYK lut16"),
            "wtpt": xyz_tag([0.9, 0.93, 0.78]),
            "A2B0": lut16_tag(4, 3, grid_points, table),
        }, device_class=b"prtr", space=b"CMYK", pcs=b"Lab ", version=0x02400000)
    axes = np.meshgrid(*[np.linspace(0, 1, grid_points)] * 4, indexing="ij")
    c, m, y, k = (ax.ravel() for ax in axes)
    lightness = 95.0 * (1 - 0.3 * c) * (1 - 0.4 * m) * (1 - 0.1 * y) * (1 - 0.85 * k)
    a = 60.0 * m - 40.0 * c
    b = 70.0 * y - 45.0 * c
    table = np.stack([lightness * 652.8, (a + 128) * 256, (b + 128) * 256], axis=1) / 65535.0
    return profile_bytes({
        "desc": mluc_tag("inkshift test CMYK lut16"),
        "wtpt": xyz_tag([0.9, 0.93, 0.78]),
        "A2B0": lut16_tag(4, 3, grid_points, table),
    }, device_class=b"prtr", space=b"CMYK", pcs=b"Lab ", version=0x02400000)


def rgb_lut16_profile(grid_points: int, table) -> bytes:
    """A v2 RGB profile with Lab PCS and a lut16 A2B0 holding ``table`` (grid_points**3, 3) in 0..1."""
    return profile_bytes({
        "desc": mluc_tag("inkshift test RGB lut16"),
        "wtpt": xyz_tag([0.9642, 1.0, 0.8249]),
        "A2B0": lut16_tag(3, 3, grid_points, table),
    }, device_class=b"scnr", space=b"RGB ", pcs=b"Lab ", version=0x02400000)
