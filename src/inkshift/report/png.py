"""Write an RGB PNG band by band, so a full-size picture never has to exist whole.

A 24-megapixel heat map held as a Pillow image costs 96 MB before it is
encoded; written here from bands of rows, it costs one band. The file follows
the PNG specification (ISO/IEC 15948:2004, W3C PNG 2nd edition): signature,
IHDR (8-bit truecolour, no interlace), an optional iCCP chunk carrying the
ICC profile (zlib-compressed, section 11.3.3.3), IDAT chunks of one zlib
stream, IEND. Every scanline uses filter type 1 (Sub, section 9.2): one
subtraction per byte in numpy, and on the project's pictures it compresses
about as well as Pillow's adaptive filtering at a fraction of the time.
zlib runs at level 1 with the run-length strategy (Z_RLE). Measured on
24-megapixel outputs: a chart's simulated print in 0.24 s (2.1 MB) against
0.50 s (0.9 MB) with Pillow's save at level 1; a photograph's in 1.2 s (50 MB)
against 4.2 s (51 MB). benchmarks/heatmap.py compares the heat map both ways.
"""

from __future__ import annotations

import struct
import zlib
from pathlib import Path
from typing import Iterable

import numpy as np
from numpy.typing import NDArray

from inkshift.files import atomic_path

__all__ = ["write_png_bands", "PNG_SIGNATURE"]

PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"
"""The eight bytes every PNG file starts with (ISO/IEC 15948:2004, 5.2)."""

_IDAT_BYTES = 1 << 20  # compressed bytes gathered before an IDAT chunk is written
_ZLIB_LEVEL = 1
_ZLIB_STRATEGY = zlib.Z_RLE


def _chunk(kind: bytes, data: bytes) -> bytes:
    return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(data, zlib.crc32(kind)))


def _filtered(band: NDArray[np.uint8]) -> NDArray[np.uint8]:
    """Scanlines of an (h, W, 3) band with filter type 1 (Sub): each byte minus the one 3 bytes left.

    Returned as a contiguous (h, 1 + 3 W) array, which zlib reads in place.
    """
    h, w = band.shape[:2]
    raw = np.empty((h, 1 + 3 * w), np.uint8)
    raw[:, 0] = 1
    pixels = raw[:, 1:].reshape(h, w, 3)
    pixels[:, :1] = band[:, :1]
    np.subtract(band[:, 1:], band[:, :-1], out=pixels[:, 1:])  # modulo 256, as the filter asks
    return raw


def write_png_bands(
    path: str | Path,
    width: int,
    height: int,
    bands: Iterable[NDArray[np.uint8]],
    *,
    icc_profile: bytes | None = None,
) -> Path:
    """Write an 8-bit RGB PNG from ``bands`` of rows, top to bottom, atomically.

    Parameters
    ----------
    path
        The file to write (through a temporary name, renamed when complete).
    width, height
        Size of the picture; the bands must add up to ``height`` rows of
        ``width`` pixels.
    bands
        (h, width, 3) uint8 arrays (any strides), in order.
    icc_profile
        Bytes of an ICC profile to embed (iCCP chunk), or None.
    """
    if width < 1 or height < 1:
        raise ValueError(f"a PNG needs at least one pixel, got {width} x {height}")
    with atomic_path(path) as tmp, open(tmp, "wb") as f:
        f.write(PNG_SIGNATURE)
        f.write(_chunk(b"IHDR", struct.pack(">IIBBBBB", width, height, 8, 2, 0, 0, 0)))
        if icc_profile:
            # Profile name (Latin-1, 1-79 bytes), a zero byte, compression method 0 (zlib).
            f.write(_chunk(b"iCCP", b"ICC profile\x00\x00" + zlib.compress(icc_profile)))
        deflate = zlib.compressobj(_ZLIB_LEVEL, zlib.DEFLATED, 15, 8, _ZLIB_STRATEGY)
        pending: list[bytes] = []
        size = rows = 0
        for band in bands:
            if band.ndim != 3 or band.shape[1:] != (width, 3) or band.dtype != np.uint8:
                raise ValueError(f"a band must be (h, {width}, 3) uint8, got {band.dtype} {band.shape}")
            rows += band.shape[0]
            part = deflate.compress(_filtered(band))
            if part:
                pending.append(part)
                size += len(part)
            if size >= _IDAT_BYTES:
                f.write(_chunk(b"IDAT", b"".join(pending)))
                pending, size = [], 0
        if rows != height:
            raise ValueError(f"the bands held {rows} rows, not {height}")
        pending.append(deflate.flush())
        f.write(_chunk(b"IDAT", b"".join(pending)))
        f.write(_chunk(b"IEND", b""))
    return Path(path)
