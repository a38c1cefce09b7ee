"""Write ICC v2.4 output ('prtr') profiles with CIELAB PCS from float tables.

The writer serialises a :class:`ProfileTables` (built by
:func:`inkshift.printing.tables.profile_tables`, or any object with the same
attributes) into an ICC.1:2001-04 (version
2.4) profile: header, tag table, and the tags

``desc``  textDescriptionType (ASCII part; empty Unicode and ScriptCode parts)
``cprt``  textType
``wtpt``  XYZType, ICC-absolute XYZ of the paper (media white point)
``bkpt``  XYZType, ICC-absolute XYZ of the darkest printable colour
``A2B0/1/2``  lut16Type, device -> media-relative CIELAB
``B2A0/1/2``  lut16Type, media-relative CIELAB -> device
``gamt``  lut16Type, CIELAB -> 1 channel, 0 in gamut

Every lut16 carries the identity matrix and identity input/output curves of
two entries, so the CLUT holds the tables' values at their own grid nodes and
LittleCMS's trilinear/tetrahedral interpolation between nodes is the model's
interpolation. One documented exception: a one-input (GRAY) device-to-PCS
table with more nodes than the lut16 grid field can hold (255) is written as
a two-node CLUT that copies the input to all three channels, followed by the
table itself as the three output curves (up to 4096 entries each); this keeps
every node exact.

Values are rounded to the nearest 16-bit code (``floor(x + 0.5)``, so ties
always go up and rebuilds are byte-identical). CIELAB uses the legacy 16-bit
encoding that lut16Type keeps in every profile version.

Identical tables (for example A2B0 = A2B1 = A2B2) are written once and the
tag table points the tags at the same data, which ICC.1:2001-04 clause 6.3
allows.

References
----------
ICC.1:2001-04 (File Format for Color Profiles, version 4.0.0 of the document,
profile version 2.4): 6.1 header, 6.2 tag table, 6.4 required tags of output
profiles, 6.5.5 lut16Type, 6.5.17 textDescriptionType, 6.5.18 textType,
6.5.26 XYZType, 5.3 s15Fixed16Number.
"""

from __future__ import annotations

import struct
from datetime import date, datetime
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from inkshift.color.convert import D50_XYZ
from inkshift.errors import InputError
from inkshift.icc.encoding import lab_to_legacy16

__all__ = [
    "printer_profile_bytes",
    "ProfileTables",
    "PROFILE_VERSION",
    "CMM_SIGNATURE",
    "CREATOR_SIGNATURE",
    "MAX_LUT16_GRID",
    "MAX_LUT16_CURVE",
]

PROFILE_VERSION = 0x02400000
"""Profile version 2.4.0 as encoded in header bytes 8..11 (ICC.1:2001-04, 6.1.3)."""

CMM_SIGNATURE = b"\0\0\0\0"
"""Preferred CMM: none (zero is allowed, ICC.1:2001-04 6.1.2)."""

CREATOR_SIGNATURE = b"iksh"
"""The project's own 4-character creator signature (header bytes 80..83)."""

MAX_LUT16_GRID = 255
"""The lut16 CLUT grid-point field is one byte (ICC.1:2001-04, 6.5.5)."""

MAX_LUT16_CURVE = 4096
"""Upper limit of lut16 input/output table entries (ICC.1:2001-04, 6.5.5)."""

_HEADER_SIZE = 128
_COLOR_SPACES = {"CMYK": (b"CMYK", 4), "GRAY": (b"GRAY", 1)}


@dataclass(frozen=True, eq=False)
class ProfileTables:
    """Everything the writer needs for an output profile (see the tables contract)."""

    description: str
    copyright: str
    color_space: str
    media_white_xyz: NDArray[np.float64]
    media_black_xyz: NDArray[np.float64]
    a2b: dict[int, NDArray[np.float64]]
    b2a: dict[int, NDArray[np.float64]]
    gamut: NDArray[np.float64]


def printer_profile_bytes(tables: ProfileTables, *, created: str | date | datetime) -> bytes:
    """Return the bytes of an ICC v2.4 output profile holding ``tables``.

    Parameters
    ----------
    tables
        A ``ProfileTables``: description, copyright, color_space ("CMYK" or
        "GRAY"), media_white_xyz and media_black_xyz (ICC-absolute XYZ, Y of
        the perfect white = 1), a2b and b2a (intent 0/1/2 -> float tables in
        the shapes of the tables contract) and gamut (0 in gamut, 1 out).
    created
        The creation date written to the header: an ISO date or date-time
        string, a ``date`` or a ``datetime``. Fixing it makes rebuilds
        byte-identical.

    Returns
    -------
    bytes
        The complete profile (ICC.1:2001-04).

    Raises
    ------
    InputError
        If a table has the wrong shape, non-finite values, or a field is missing.
    """
    space = str(getattr(tables, "color_space", "")).upper()
    if space not in _COLOR_SPACES:
        raise InputError(f"profile tables: color_space must be CMYK or GRAY, got {space!r}")
    space_sig, n_ink = _COLOR_SPACES[space]

    tags: list[tuple[bytes, bytes]] = [
        (b"desc", _text_description(str(tables.description))),
        (b"cprt", _text(str(tables.copyright))),
        (b"wtpt", _xyz(_vector3(tables.media_white_xyz, "media_white_xyz"))),
        (b"bkpt", _xyz(_vector3(tables.media_black_xyz, "media_black_xyz"))),
    ]
    for intent in (0, 1, 2):
        tags.append((b"A2B%d" % intent, _a2b_lut(_table(tables.a2b, intent, "a2b"), n_ink, intent)))
    for intent in (0, 1, 2):
        tags.append((b"B2A%d" % intent, _b2a_lut(_table(tables.b2a, intent, "b2a"), n_ink, intent)))
    tags.append((b"gamt", _gamut_lut(np.asarray(tables.gamut, dtype=np.float64))))

    return _assemble(tags, space_sig, _header_date(created))


# --------------------------------------------------------------------- tables


def _table(tables: Any, intent: int, name: str) -> NDArray[np.float64]:
    try:
        return np.asarray(tables[intent], dtype=np.float64)
    except (KeyError, TypeError, IndexError):
        raise InputError(f"profile tables: {name} has no table for intent {intent}") from None


def _vector3(value: Any, name: str) -> NDArray[np.float64]:
    v = np.asarray(value, dtype=np.float64).reshape(-1)
    if v.shape != (3,) or not np.all(np.isfinite(v)):
        raise InputError(f"profile tables: {name} must be 3 finite numbers, got {value!r}")
    return v


def _check_grid(table: NDArray[np.float64], n_in: int, n_out: int, what: str) -> int:
    """Return the grid size of a ``(g,)*n_in + (n_out,)`` table, or raise."""
    if table.ndim != n_in + 1 or table.shape[-1] != n_out or len(set(table.shape[:-1])) != 1:
        raise InputError(
            f"profile tables: {what} must have shape (g,)*{n_in} + ({n_out},), got {table.shape}"
        )
    if not np.all(np.isfinite(table)):
        raise InputError(f"profile tables: {what} holds non-finite values")
    g = table.shape[0]
    if g < 2:
        raise InputError(f"profile tables: {what} needs at least 2 grid points, got {g}")
    return g


def _codes(values01: NDArray[np.float64]) -> NDArray[np.uint16]:
    """Round 0..65535 floats to the nearest 16-bit code, ties up (deterministic)."""
    return np.floor(np.clip(values01, 0.0, 65535.0) + 0.5).astype(">u2")


def _a2b_lut(table: NDArray[np.float64], n_ink: int, intent: int) -> bytes:
    what = f"a2b[{intent}]"
    if n_ink == 1 and table.ndim == 2 and table.shape[-1] == 3 and table.shape[0] > MAX_LUT16_GRID:
        g = table.shape[0]
        if g > MAX_LUT16_CURVE:
            raise InputError(f"profile tables: {what} has {g} points; lut16 allows {MAX_LUT16_CURVE}")
        if not np.all(np.isfinite(table)):
            raise InputError(f"profile tables: {what} holds non-finite values")
        # Two-node CLUT copying the input to L*, a*, b*, then the table as output curves.
        clut = np.array([[0.0, 0.0, 0.0], [65535.0, 65535.0, 65535.0]])
        out_curves = lab_to_legacy16(table).T  # (3, g)
        return _lut16(1, 3, 2, clut, _identity_curves(1, 2), out_curves)
    g = _check_grid(table, n_ink, 3, what)
    if g > MAX_LUT16_GRID:
        raise InputError(f"profile tables: {what} has {g} grid points; lut16 allows {MAX_LUT16_GRID}")
    return _lut16(n_ink, 3, g, lab_to_legacy16(table), _identity_curves(n_ink, 2), _identity_curves(3, 2))


def _b2a_lut(table: NDArray[np.float64], n_ink: int, intent: int) -> bytes:
    what = f"b2a[{intent}]"
    g = _check_grid(table, 3, n_ink, what)
    if g > MAX_LUT16_GRID:
        raise InputError(f"profile tables: {what} has {g} grid points; lut16 allows {MAX_LUT16_GRID}")
    return _lut16(3, n_ink, g, table * 65535.0, _identity_curves(3, 2), _identity_curves(n_ink, 2))


def _gamut_lut(table: NDArray[np.float64]) -> bytes:
    g = _check_grid(table, 3, 1, "gamut")
    if g > MAX_LUT16_GRID:
        raise InputError(f"profile tables: gamut has {g} grid points; lut16 allows {MAX_LUT16_GRID}")
    return _lut16(3, 1, g, table * 65535.0, _identity_curves(3, 2), _identity_curves(1, 2))


def _identity_curves(channels: int, entries: int) -> NDArray[np.float64]:
    return np.tile(np.linspace(0.0, 65535.0, entries), (channels, 1))


def _lut16(
    n_in: int,
    n_out: int,
    grid: int,
    clut: NDArray[np.float64],
    in_curves: NDArray[np.float64],
    out_curves: NDArray[np.float64],
) -> bytes:
    """Serialise a lut16Type ('mft2', ICC.1:2001-04 6.5.5) with the identity matrix.

    ``clut`` is in 0..65535 code units with shape ``(grid,)*n_in + (n_out,)``;
    C order puts the first input channel in the most significant position,
    as the format requires.
    """
    identity = (1, 0, 0, 0, 1, 0, 0, 0, 1)
    head = b"mft2" + b"\0" * 4 + struct.pack(">BBBB", n_in, n_out, grid, 0)
    head += b"".join(_s15f16(v) for v in identity)
    head += struct.pack(">HH", in_curves.shape[1], out_curves.shape[1])
    return head + _codes(in_curves).tobytes() + _codes(clut).tobytes() + _codes(out_curves).tobytes()


# ------------------------------------------------------------- simple types


def _s15f16(value: float) -> bytes:
    """s15Fixed16Number (ICC.1:2001-04 5.3.1), rounded to the nearest 1/65536."""
    return struct.pack(">i", int(np.floor(value * 65536.0 + 0.5)))


def _xyz(xyz: NDArray[np.float64]) -> bytes:
    return b"XYZ " + b"\0" * 4 + b"".join(_s15f16(v) for v in xyz)


def _ascii(text: str, what: str) -> bytes:
    try:
        return text.encode("ascii")
    except UnicodeEncodeError:
        raise InputError(f"profile tables: {what} must be plain ASCII: {text!r}") from None


def _text(text: str) -> bytes:
    """textType (ICC.1:2001-04 6.5.18): NUL-terminated 7-bit ASCII."""
    return b"text" + b"\0" * 4 + _ascii(text, "copyright") + b"\0"


def _text_description(text: str) -> bytes:
    """textDescriptionType (ICC.1:2001-04 6.5.17) with empty Unicode and ScriptCode parts.

    The ASCII count includes the terminating NUL; the Unicode part is
    language code 0 and count 0; the ScriptCode part is code 0, count 0 and
    its fixed 67-byte field of zeros.
    """
    ascii_ = _ascii(text, "description") + b"\0"
    out = b"desc" + b"\0" * 4 + struct.pack(">I", len(ascii_)) + ascii_
    out += struct.pack(">II", 0, 0)
    out += struct.pack(">HB", 0, 0) + b"\0" * 67
    return out


# ------------------------------------------------------------------- header


def _header_date(created: str | date | datetime) -> tuple[int, int, int, int, int, int]:
    if isinstance(created, str):
        try:
            created = datetime.fromisoformat(created.strip().replace("Z", "+00:00"))
        except ValueError:
            raise InputError(f"profile creation date is not an ISO date: {created!r}") from None
    if isinstance(created, datetime):
        return (created.year, created.month, created.day, created.hour, created.minute, created.second)
    if isinstance(created, date):
        return (created.year, created.month, created.day, 0, 0, 0)
    raise InputError(f"profile creation date must be a string or a date, got {type(created).__name__}")


def _assemble(tags: list[tuple[bytes, bytes]], space_sig: bytes, created: tuple[int, ...]) -> bytes:
    """Lay out header, tag table and 4-byte aligned tag data (shared when identical)."""
    table_size = 4 + 12 * len(tags)
    offset = _HEADER_SIZE + table_size
    entries: list[tuple[bytes, int, int]] = []
    blobs: list[bytes] = []
    seen: dict[bytes, tuple[int, int]] = {}
    for sig, data in tags:
        if data in seen:
            entries.append((sig,) + seen[data])
            continue
        seen[data] = (offset, len(data))
        entries.append((sig, offset, len(data)))
        pad = (-len(data)) % 4
        blobs.append(data + b"\0" * pad)
        offset += len(data) + pad
    size = offset

    header = bytearray(_HEADER_SIZE)
    struct.pack_into(">I", header, 0, size)
    header[4:8] = CMM_SIGNATURE
    struct.pack_into(">I", header, 8, PROFILE_VERSION)
    header[12:16] = b"prtr"
    header[16:20] = space_sig
    header[20:24] = b"Lab "
    struct.pack_into(">6H", header, 24, *created)
    header[36:40] = b"acsp"
    # 40 platform, 44 flags, 48 manufacturer, 52 model, 56 attributes: all zero.
    struct.pack_into(">I", header, 64, 0)  # rendering intent: perceptual
    header[68:80] = b"".join(_s15f16(v) for v in D50_XYZ)
    header[80:84] = CREATOR_SIGNATURE
    # 84..127: profile ID (v4 only) and reserved bytes stay zero.

    table = struct.pack(">I", len(tags)) + b"".join(struct.pack(">4sII", *e) for e in entries)
    return bytes(header) + table + b"".join(blobs)
