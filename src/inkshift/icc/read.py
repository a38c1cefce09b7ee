"""Read ICC profiles (v2 and v4) into plain data: header, tag table and the colorimetric tags.

Only numpy, struct and the standard library are used. Every malformation
the reader can meet becomes a :class:`inkshift.errors.ProfileError` naming
the file, the tag (when there is one) and the problem; no ``struct.error``,
``IndexError`` or ``ValueError`` escapes.

References
----------
ICC.1:2022 (v4.4): 7.2 header, 7.3 tag table, 9 tag list, 10 tag types
(10.2 chromaticityType is not needed; 10.6 curveType, 10.10 lut16Type,
10.11 lut8Type, 10.12 lutAToBType, 10.13 lutBToAType, 10.15
multiLocalizedUnicodeType, 10.18 parametricCurveType, 10.22
s15Fixed16ArrayType, 10.24 textType, 10.31 XYZType).
ICC.1:2001-04 (v2.4): 6.5.17 textDescriptionType ('desc').
"""

from __future__ import annotations

import struct
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from inkshift.errors import ProfileError, one_line
from inkshift.icc.lut import Clut, Curve, CurveSet, Lut, MatrixStage, Stage

__all__ = ["Profile", "read_profile", "MAX_CLUT_ENTRIES", "MAX_PROFILE_BYTES", "COLOR_SPACE_CHANNELS"]

MAX_CLUT_ENTRIES = 2**26
"""Largest CLUT accepted (grid points product times output channels); a 33^4 CMYK->Lab
table has 3.6e6 entries, so this only refuses absurd grids (project limit)."""

MAX_PROFILE_BYTES = 256 * 2**20
"""Largest profile file read (project limit; real output profiles are a few MB)."""

_HEADER = 128

# ICC.1:2022 table 19 (data colour space signatures) and their channel counts.
COLOR_SPACE_CHANNELS: dict[str, int] = {
    "XYZ ": 3, "Lab ": 3, "Luv ": 3, "YCbr": 3, "Yxy ": 3, "RGB ": 3, "GRAY": 1,
    "HSV ": 3, "HLS ": 3, "CMYK": 4, "CMY ": 3,
    **{f"{n:X}CLR": n for n in range(2, 16)},
}

_DEVICE_CLASSES = ("scnr", "mntr", "prtr", "link", "spac", "abst", "nmcl")

_LUT_TAGS = ("A2B0", "A2B1", "A2B2", "B2A0", "B2A1", "B2A2")


@dataclass(frozen=True, eq=False)
class Profile:
    """An ICC profile as read from its bytes.

    ``media_white``/``media_black`` are the wtpt/bkpt XYZ as stored (Y of a
    perfect white = 1); ``colorants`` has the rXYZ, gXYZ, bXYZ columns; ``trcs``
    holds (r, g, b) or (k,) curves; ``luts`` maps 'A2B0'..'B2A2' to tables;
    ``tags`` maps each tag signature to (offset, size, type signature).
    """

    source: str
    data: bytes
    version: tuple[int, int, int]
    device_class: str
    color_space: str
    pcs: str
    rendering_intent: int
    channels: int
    media_white: NDArray[np.float64] | None
    media_black: NDArray[np.float64] | None
    chad: NDArray[np.float64] | None
    description: str
    copyright: str
    colorants: NDArray[np.float64] | None
    trcs: tuple[Curve, ...] | None
    luts: dict[str, Lut] = field(default_factory=dict)
    gamut: Lut | None = None
    tags: dict[str, tuple[int, int, str]] = field(default_factory=dict)

    @property
    def is_matrix_trc(self) -> bool:
        """True when the profile has RGB colorants and TRCs (ICC.1 F.3 three-component matrix-based)."""
        return self.colorants is not None and self.trcs is not None and len(self.trcs) == 3

    @property
    def is_gray_trc(self) -> bool:
        """True when the profile has a grayTRC (ICC.1 F.2 monochrome)."""
        return self.trcs is not None and len(self.trcs) == 1


def read_profile(source: str | Path | bytes, name: str | None = None) -> Profile:
    """Read an ICC profile from a path or from bytes.

    Parameters
    ----------
    source
        A file path, or the profile's bytes.
    name
        The name used in error messages (default: the path, or ``"<bytes>"``).

    Raises
    ------
    ProfileError
        The file cannot be read or is not a well-formed ICC profile.
    """
    if isinstance(source, (bytes, bytearray, memoryview)):
        label = name or "<bytes>"
        data = bytes(source)
    else:
        label = name or str(source)
        try:
            path = Path(source)
            if path.stat().st_size > MAX_PROFILE_BYTES:
                raise ProfileError(label, f"file is larger than {MAX_PROFILE_BYTES} bytes; not a profile")
            data = path.read_bytes()
        except ProfileError:
            raise
        except (OSError, ValueError) as exc:
            reason = exc.strerror if isinstance(exc, OSError) and exc.strerror else type(exc).__name__
            raise ProfileError(label, f"cannot read the file ({reason})") from None
    try:
        return _parse(label, data)
    except ProfileError:
        raise
    except (struct.error, IndexError, ValueError, TypeError, KeyError, OverflowError,
            ZeroDivisionError, UnicodeError, MemoryError) as exc:
        raise ProfileError(label, f"malformed profile ({type(exc).__name__}: {one_line(exc)})") from None




def _parse(label: str, data: bytes) -> Profile:
    if len(data) < _HEADER + 4:
        raise ProfileError(label, f"truncated header: {len(data)} bytes, an ICC profile needs at least {_HEADER + 4}")
    if data[36:40] != b"acsp":
        raise ProfileError(label, f"not an ICC profile (signature {data[36:40]!r} at byte 36, expected b'acsp')")
    declared = struct.unpack_from(">I", data, 0)[0]
    if declared > len(data):
        raise ProfileError(label, f"header declares {declared} bytes but the file has only {len(data)} (truncated)")
    if declared < _HEADER + 4:
        raise ProfileError(label, f"header declares an impossible size of {declared} bytes")
    data_end = declared

    major, minor_bug = data[8], data[9]
    version = (int(major), int(minor_bug >> 4), int(minor_bug & 0x0F))
    device_class = _sig(data[12:16])
    if device_class not in _DEVICE_CLASSES:
        raise ProfileError(label, f"unknown profile class {device_class!r}")
    space_sig = _sig(data[16:20])
    if space_sig not in COLOR_SPACE_CHANNELS:
        raise ProfileError(label, f"unknown data colour space {space_sig!r}")
    pcs_sig = _sig(data[20:24])
    if device_class != "link" and pcs_sig not in ("XYZ ", "Lab "):
        raise ProfileError(label, f"profile connection space must be XYZ or Lab, not {pcs_sig!r}")
    if pcs_sig not in COLOR_SPACE_CHANNELS:
        raise ProfileError(label, f"unknown PCS / output colour space {pcs_sig!r}")
    rendering_intent = struct.unpack_from(">I", data, 64)[0] & 0xFFFF

    count = struct.unpack_from(">I", data, _HEADER)[0]
    table_end = _HEADER + 4 + 12 * count
    if table_end > data_end:
        raise ProfileError(label, f"truncated tag table: {count} tags need {table_end} bytes, the profile has {data_end}")
    tags: dict[str, tuple[int, int, str]] = {}
    for i in range(count):
        sig_b, offset, size = struct.unpack_from(">4sII", data, _HEADER + 4 + 12 * i)
        sig = _sig(sig_b)
        if size == 0:
            raise ProfileError(label, "zero-length tag", tag=sig)
        if offset < table_end:
            raise ProfileError(label, f"tag data at offset {offset} overlaps the header or tag table", tag=sig)
        if offset + size > data_end:
            raise ProfileError(label, f"tag data ({offset}+{size}) runs past the end of the profile ({data_end} bytes)", tag=sig)
        if size < 8:
            raise ProfileError(label, f"tag is {size} bytes, too short for a type signature", tag=sig)
        if sig not in tags:
            tags[sig] = (offset, size, _sig(data[offset:offset + 4]))

    channels = COLOR_SPACE_CHANNELS[space_sig]
    pcs_channels = COLOR_SPACE_CHANNELS[pcs_sig]
    reader = _TagReader(label, data, tags)

    media_white = reader.xyz("wtpt")
    media_black = reader.xyz("bkpt")
    chad = reader.sf32_matrix("chad")
    description = reader.text("desc")
    copyright_ = reader.text("cprt")

    colorants = None
    if all(t in tags for t in ("rXYZ", "gXYZ", "bXYZ")):
        colorants = np.stack([reader.xyz(t) for t in ("rXYZ", "gXYZ", "bXYZ")], axis=1)
    trcs: tuple[Curve, ...] | None = None
    if all(t in tags for t in ("rTRC", "gTRC", "bTRC")) and colorants is not None:
        trcs = tuple(reader.curve_tag(t) for t in ("rTRC", "gTRC", "bTRC"))
    elif "kTRC" in tags:
        trcs = (reader.curve_tag("kTRC"),)
    if trcs is not None and len(trcs) == 3 and channels != 3:
        raise ProfileError(label, f"RGB colorant and TRC tags in a {channels}-channel {space_sig.strip()} profile", tag="rTRC")
    if trcs is not None and len(trcs) == 1 and channels != 1 and not any(t in tags for t in _LUT_TAGS):
        raise ProfileError(label, f"grayTRC in a {channels}-channel {space_sig.strip()} profile", tag="kTRC")

    luts: dict[str, Lut] = {}
    for t in _LUT_TAGS:
        if t in tags:
            xyz_input = (space_sig if t.startswith("A2B") else pcs_sig) == "XYZ "
            lut = reader.lut(t, xyz_input)
            n_in, n_out = (channels, pcs_channels) if t.startswith("A2B") else (pcs_channels, channels)
            if (lut.n_in, lut.n_out) != (n_in, n_out):
                raise ProfileError(
                    label,
                    f"table has {lut.n_in} inputs and {lut.n_out} outputs; "
                    f"a {space_sig.strip()}/{pcs_sig.strip()} profile needs {n_in} and {n_out}",
                    tag=t,
                )
            luts[t] = lut
    gamut = None
    if "gamt" in tags:
        gamut = reader.lut("gamt", pcs_sig == "XYZ ")
        if (gamut.n_in, gamut.n_out) != (pcs_channels, 1):
            raise ProfileError(label, f"gamut table has {gamut.n_in} inputs and {gamut.n_out} outputs; needs {pcs_channels} and 1", tag="gamt")

    return Profile(
        source=label,
        data=data,
        version=version,
        device_class=device_class,
        color_space=space_sig.strip().upper(),
        pcs=pcs_sig.strip().upper(),
        rendering_intent=rendering_intent,
        channels=channels,
        media_white=media_white,
        media_black=media_black,
        chad=chad,
        description=description,
        copyright=copyright_,
        colorants=colorants,
        trcs=trcs,
        luts=luts,
        gamut=gamut,
        tags=tags,
    )


def _sig(b: bytes) -> str:
    return b.decode("latin-1")


class _TagReader:
    """Decodes the tag types the project needs; errors name the tag."""

    def __init__(self, label: str, data: bytes, tags: dict[str, tuple[int, int, str]]) -> None:
        self.label = label
        self.data = data
        self.tags = tags

    def _buf(self, tag: str) -> tuple[bytes, str]:
        offset, size, type_sig = self.tags[tag]
        return self.data[offset:offset + size], type_sig

    def _fail(self, tag: str, problem: str) -> ProfileError:
        return ProfileError(self.label, problem, tag=tag)

    def _guard(self, tag: str, fn, *args):
        try:
            return fn(*args)
        except ProfileError:
            raise
        except (struct.error, IndexError, ValueError, TypeError, KeyError, OverflowError,
                ZeroDivisionError, UnicodeError) as exc:
            raise self._fail(tag, f"malformed data ({type(exc).__name__}: {one_line(exc)})") from None

    # --- simple types ---------------------------------------------------------
    def xyz(self, tag: str) -> NDArray[np.float64] | None:
        if tag not in self.tags:
            return None
        buf, type_sig = self._buf(tag)
        if type_sig != "XYZ ":
            raise self._fail(tag, f"unknown tag type {type_sig!r} (expected 'XYZ ')")
        if len(buf) < 20:
            raise self._fail(tag, f"XYZType needs 20 bytes, the tag has {len(buf)}")
        return _s15(buf, 8, 3)

    def sf32_matrix(self, tag: str) -> NDArray[np.float64] | None:
        if tag not in self.tags:
            return None
        buf, type_sig = self._buf(tag)
        if type_sig != "sf32":
            raise self._fail(tag, f"unknown tag type {type_sig!r} (expected 'sf32')")
        if len(buf) < 8 + 36:
            raise self._fail(tag, f"a 3x3 s15Fixed16 matrix needs 44 bytes, the tag has {len(buf)}")
        return _s15(buf, 8, 9).reshape(3, 3)

    def text(self, tag: str) -> str:
        if tag not in self.tags:
            return ""
        buf, type_sig = self._buf(tag)
        # Text tags are informative: a malformed one is reported as empty, not as an error.
        try:
            if type_sig == "desc":
                n = struct.unpack_from(">I", buf, 8)[0]
                raw = buf[12:12 + n]
                return raw.split(b"\0", 1)[0].decode("latin-1").strip()
            if type_sig == "text":
                return buf[8:].split(b"\0", 1)[0].decode("latin-1").strip()
            if type_sig == "mluc":
                return _mluc(buf)
        except (struct.error, IndexError, ValueError, UnicodeError):
            return ""
        return ""

    # --- curves -----------------------------------------------------------------
    def curve_tag(self, tag: str) -> Curve:
        buf, type_sig = self._buf(tag)
        if type_sig not in ("curv", "para"):
            raise self._fail(tag, f"unknown tag type {type_sig!r} (expected 'curv' or 'para')")
        curve, _ = self._guard(tag, _read_curve, buf, 0, tag, self.label)
        return curve

    # --- tables -----------------------------------------------------------------
    def lut(self, tag: str, xyz_input: bool) -> Lut:
        buf, type_sig = self._buf(tag)
        readers = {"mft1": _read_lut8, "mft2": _read_lut16, "mAB ": _read_lut_ab, "mBA ": _read_lut_ba}
        if type_sig not in readers:
            raise self._fail(tag, f"unknown tag type {type_sig!r} (expected 'mft1', 'mft2', 'mAB ' or 'mBA ')")
        return self._guard(tag, readers[type_sig], buf, tag, self.label, xyz_input)


def _s15(buf: bytes, pos: int, n: int) -> NDArray[np.float64]:
    """n s15Fixed16Numbers (ICC.1:2022 4.6) from ``pos``."""
    raw = np.frombuffer(buf, dtype=">i4", count=n, offset=pos)
    return raw.astype(np.float64) / 65536.0


def _mluc(buf: bytes) -> str:
    """The en/US record of a multiLocalizedUnicodeType, or the first one (ICC.1:2022 10.15)."""
    n, rec = struct.unpack_from(">II", buf, 8)
    if n == 0:
        return ""
    chosen = None
    for i in range(n):
        lang, country, length, offset = struct.unpack_from(">2s2sII", buf, 16 + i * rec)
        if chosen is None or (lang == b"en" and country == b"US"):
            chosen = (length, offset)
        if lang == b"en" and country == b"US":
            break
    length, offset = chosen
    if offset + length > len(buf):
        raise IndexError("mluc record runs past the tag")
    return buf[offset:offset + length].decode("utf-16-be", errors="replace").rstrip("\0").strip()


_PARA_COUNTS = {0: 1, 1: 3, 2: 4, 3: 5, 4: 7}


def _read_curve(buf: bytes, pos: int, tag: str, label: str) -> tuple[Curve, int]:
    """Read a curveType or parametricCurveType at ``pos``; return it and the byte after it."""
    type_sig = buf[pos:pos + 4]
    if type_sig == b"curv":
        n = struct.unpack_from(">I", buf, pos + 8)[0]
        end = pos + 12 + 2 * n
        if end > len(buf):
            raise ProfileError(label, f"curve declares {n} entries but the tag ends first", tag=tag)
        if n == 0:
            return Curve("identity"), end
        if n == 1:
            gamma = struct.unpack_from(">H", buf, pos + 12)[0] / 256.0  # u8Fixed8Number
            return Curve("gamma", gamma=gamma), end
        table = np.frombuffer(buf, dtype=">u2", count=n, offset=pos + 12).astype(np.float64) / 65535.0
        return Curve("table", table=table), end
    if type_sig == b"para":
        function = struct.unpack_from(">H", buf, pos + 8)[0]
        if function not in _PARA_COUNTS:
            raise ProfileError(label, f"parametric curve function type {function} is not 0..4", tag=tag)
        count = _PARA_COUNTS[function]
        if pos + 12 + 4 * count > len(buf):
            raise ProfileError(label, f"parametric curve type {function} needs {count} parameters; the tag ends first", tag=tag)
        params = tuple(float(v) for v in _s15(buf, pos + 12, count))
        return Curve("parametric", function=function, params=params), pos + 12 + 4 * count
    raise ProfileError(label, f"unknown curve type {type_sig!r} (expected 'curv' or 'para')", tag=tag)


def _check_grid(grid: tuple[int, ...], n_out: int, tag: str, label: str) -> int:
    if any(g < 2 for g in grid):
        raise ProfileError(label, f"CLUT grid {grid} has a dimension with fewer than 2 points", tag=tag)
    entries = int(np.prod(np.array(grid, dtype=np.float64))) * n_out
    if entries > MAX_CLUT_ENTRIES:
        raise ProfileError(label, f"CLUT grid {grid} x {n_out} outputs = {entries} entries exceeds the limit of {MAX_CLUT_ENTRIES}", tag=tag)
    return entries


def _check_channels(n_in: int, n_out: int, tag: str, label: str) -> None:
    if not (1 <= n_in <= 15 and 1 <= n_out <= 15):
        raise ProfileError(label, f"table has {n_in} inputs and {n_out} outputs; ICC allows 1..15", tag=tag)


def _table_curves(buf: bytes, pos: int, n_ch: int, n_entries: int, dtype: str, scale: float) -> tuple[CurveSet, int]:
    """The per-channel 1-D tables of lut8/lut16 (equally spaced entries)."""
    item = np.dtype(dtype).itemsize
    end = pos + n_ch * n_entries * item
    if end > len(buf):
        raise IndexError(f"tables need {end} bytes, the tag has {len(buf)}")
    arr = np.frombuffer(buf, dtype=dtype, count=n_ch * n_entries, offset=pos).astype(np.float64) / scale
    arr = arr.reshape(n_ch, n_entries)
    return CurveSet(tuple(Curve("table", table=arr[i].copy()) for i in range(n_ch))), end


def _read_lut_common(buf: bytes, tag: str, label: str, eight_bit: bool, xyz_input: bool) -> Lut:
    """lut8Type (ICC.1:2022 10.11) and lut16Type (10.10)."""
    n_in, n_out, grid_points = buf[8], buf[9], buf[10]
    _check_channels(n_in, n_out, tag, label)
    matrix = _s15(buf, 12, 9).reshape(3, 3)
    if eight_bit:
        n_in_entries = n_out_entries = 256
        pos, dtype, scale = 48, "u1", 255.0
    else:
        n_in_entries, n_out_entries = struct.unpack_from(">HH", buf, 48)
        pos, dtype, scale = 52, ">u2", 65535.0
        if n_in_entries < 2 or n_out_entries < 2:
            raise ProfileError(label, f"lut16 curve tables need at least 2 entries, got {n_in_entries} and {n_out_entries}", tag=tag)
    grid = (int(grid_points),) * n_in
    entries = _check_grid(grid, n_out, tag, label)
    in_curves, pos = _table_curves(buf, pos, n_in, n_in_entries, dtype, scale)
    item = np.dtype(dtype).itemsize
    if pos + entries * item > len(buf):
        raise ProfileError(label, f"CLUT needs {entries * item} bytes but only {max(len(buf) - pos, 0)} remain in the tag", tag=tag)
    table = np.frombuffer(buf, dtype=dtype, count=entries, offset=pos).astype(np.float64) / scale
    pos += entries * item
    out_curves, _ = _table_curves(buf, pos, n_out, n_out_entries, dtype, scale)
    stages: list[Stage] = []
    # The matrix applies only when the input is XYZ (ICC.1:2022 10.10, 10.11).
    # LittleCMS applies any non-identity matrix on 3 inputs; well-formed profiles
    # carry the identity there, so the two readings agree on them.
    if xyz_input and not np.allclose(matrix, np.eye(3)):
        stages.append(MatrixStage(matrix))
    stages += [in_curves, Clut(grid, table.reshape(-1, n_out)), out_curves]
    return Lut("lut8" if eight_bit else "lut16", n_in, n_out, tuple(stages))


def _read_lut8(buf: bytes, tag: str, label: str, xyz_input: bool) -> Lut:
    return _read_lut_common(buf, tag, label, True, xyz_input)


def _read_lut16(buf: bytes, tag: str, label: str, xyz_input: bool) -> Lut:
    return _read_lut_common(buf, tag, label, False, xyz_input)


def _curve_list(buf: bytes, offset: int, n: int, tag: str, label: str) -> CurveSet:
    curves = []
    pos = offset
    for _ in range(n):
        curve, end = _read_curve(buf, pos, tag, label)
        curves.append(curve)
        pos = end + (-end % 4)  # each curve is padded to a 4-byte boundary
    return CurveSet(tuple(curves))


def _ab_matrix(buf: bytes, offset: int) -> MatrixStage:
    values = _s15(buf, offset, 12)
    return MatrixStage(values[:9].reshape(3, 3), values[9:12].copy())


def _ab_clut(buf: bytes, offset: int, n_in: int, n_out: int, tag: str, label: str) -> Clut:
    grid = tuple(int(g) for g in buf[offset:offset + n_in])
    if len(grid) != n_in:
        raise IndexError("CLUT header runs past the tag")
    precision = buf[offset + 16]
    if precision not in (1, 2):
        raise ProfileError(label, f"CLUT precision {precision} is not 1 or 2 bytes", tag=tag)
    entries = _check_grid(grid, n_out, tag, label)
    pos = offset + 20
    if pos + entries * precision > len(buf):
        raise ProfileError(label, f"CLUT needs {entries * precision} bytes but only {max(len(buf) - pos, 0)} remain in the tag", tag=tag)
    dtype, scale = ("u1", 255.0) if precision == 1 else (">u2", 65535.0)
    table = np.frombuffer(buf, dtype=dtype, count=entries, offset=pos).astype(np.float64) / scale
    return Clut(grid, table.reshape(-1, n_out))


def _ab_offsets(buf: bytes, tag: str, label: str) -> tuple[int, int, tuple[int, int, int, int, int]]:
    n_in, n_out = buf[8], buf[9]
    _check_channels(n_in, n_out, tag, label)
    offsets = struct.unpack_from(">5I", buf, 12)
    for off in offsets:
        if off and not 32 <= off < len(buf):
            raise ProfileError(label, f"element offset {off} lies outside the {len(buf)}-byte tag", tag=tag)
    return n_in, n_out, offsets


def _read_lut_ab(buf: bytes, tag: str, label: str, xyz_input: bool = False) -> Lut:
    """lutAToBType (ICC.1:2022 10.12): A curves, CLUT, M curves, matrix, B curves."""
    n_in, n_out, (b_off, mat_off, m_off, clut_off, a_off) = _ab_offsets(buf, tag, label)
    if not b_off:
        raise ProfileError(label, "lutAtoB table without B curves", tag=tag)
    stages: list[Stage] = []
    if a_off or clut_off:
        if not (a_off and clut_off):
            raise ProfileError(label, "lutAtoB table has A curves without a CLUT or a CLUT without A curves", tag=tag)
        stages.append(_curve_list(buf, a_off, n_in, tag, label))
        stages.append(_ab_clut(buf, clut_off, n_in, n_out, tag, label))
    elif n_in != n_out:
        raise ProfileError(label, f"lutAtoB table without a CLUT cannot map {n_in} to {n_out} channels", tag=tag)
    if m_off or mat_off:
        if n_out != 3 or not (m_off and mat_off):
            raise ProfileError(label, "lutAtoB matrix and M curves must come together, on 3 channels", tag=tag)
        stages.append(_curve_list(buf, m_off, 3, tag, label))
        stages.append(_ab_matrix(buf, mat_off))
    stages.append(_curve_list(buf, b_off, n_out, tag, label))
    return Lut("lutAtoB", n_in, n_out, tuple(stages))


def _read_lut_ba(buf: bytes, tag: str, label: str, xyz_input: bool = False) -> Lut:
    """lutBToAType (ICC.1:2022 10.13): B curves, matrix, M curves, CLUT, A curves."""
    n_in, n_out, (b_off, mat_off, m_off, clut_off, a_off) = _ab_offsets(buf, tag, label)
    if not b_off:
        raise ProfileError(label, "lutBtoA table without B curves", tag=tag)
    stages: list[Stage] = [_curve_list(buf, b_off, n_in, tag, label)]
    if m_off or mat_off:
        if n_in != 3 or not (m_off and mat_off):
            raise ProfileError(label, "lutBtoA matrix and M curves must come together, on 3 channels", tag=tag)
        stages.append(_ab_matrix(buf, mat_off))
        stages.append(_curve_list(buf, m_off, 3, tag, label))
    if a_off or clut_off:
        if not (a_off and clut_off):
            raise ProfileError(label, "lutBtoA table has A curves without a CLUT or a CLUT without A curves", tag=tag)
        stages.append(_ab_clut(buf, clut_off, n_in, n_out, tag, label))
        stages.append(_curve_list(buf, a_off, n_out, tag, label))
    elif n_in != n_out:
        raise ProfileError(label, f"lutBtoA table without a CLUT cannot map {n_in} to {n_out} channels", tag=tag)
    return Lut("lutBtoA", n_in, n_out, tuple(stages))
