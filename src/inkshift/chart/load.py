"""Load a chart image into an 8-bit array in its own colour space.

:func:`load_chart` accepts a file path, an open ``PIL.Image.Image`` or a numpy
array and returns a :class:`ChartImage`: 8-bit samples in the image's own
colour space (RGB, GRAY or CMYK), the alpha channel when there is real
transparency, the embedded ICC profile, and plain-sentence notes on anything
the loader changed (bit depth, palette expansion, frames dropped).

Decisions (each also stated in the code where it is made):

- Formats: PNG, JPEG (including MPO, the multi-picture JPEG some cameras
  write), TIFF, WebP, BMP and GIF; the first frame of a multi-frame file is used.
- Modes ``1``, ``L`` and ``LA`` become GRAY; ``P``/``PA`` are expanded to RGB(A)
  through their palette, keeping the embedded profile (it describes the
  palette's RGB); ``YCbCr`` is converted to RGB; ``CMYK`` stays CMYK. Pillow
  reads the Adobe APP14 marker of CMYK JPEGs and undoes the inverted storage
  Adobe applications use, so CMYK JPEG samples come back as ink amounts.
- 16-bit grayscale (``I;16*``) is reduced to 8 bits by ``round(v * 255 / 65535)``
  (exactly ``(v + 128) // 257``). Pillow itself reduces 16-bit RGB(A) PNG and
  TIFF to 8 bits by keeping the high byte of each sample, which can be one
  code below correct rounding; the loader says so in a note.
- Mode ``I`` (32-bit integers) is accepted only when every value lies in
  0..65535 and is then taken as 16-bit samples; mode ``F`` (32-bit float) only
  when every value lies in 0..1. Anything else, and ``LAB``/``HSV`` images, are
  refused: the chart should be exported as 8-bit RGB.
- A GRAY image that embeds an RGB profile is expanded to RGB by repeating the
  gray channel, so that the profile can be used. An embedded profile whose
  colour space matches neither is dropped, with a note.
- Pixel limit: the size declared in the file header is checked against
  ``max_pixels`` before any pixel is decoded. Pillow's own decompression-bomb
  check is switched off while the project's limit is in force, so that
  ``DecompressionBombError``/``Warning`` never reach the user.

Numpy input: ``(H, W)`` is GRAY, ``(H, W, 1)`` GRAY, ``(H, W, 3)`` RGB and
``(H, W, 4)`` RGBA (a 4-channel array is taken as RGB plus alpha, never as
CMYK: pass a ``PIL.Image`` in mode ``CMYK`` for that). The dtype must be
``uint8``, or floating point with every value in 0..1 (scaled by 255 and
rounded).
"""

from __future__ import annotations

import struct
import threading
import warnings
import zlib
from contextlib import contextmanager
from dataclasses import dataclass, field
from pathlib import Path
from typing import Iterator, Literal

import numpy as np
from numpy.typing import NDArray
from PIL import Image, ImageOps, UnidentifiedImageError

from inkshift.errors import ImageError

__all__ = ["MAX_PIXELS_DEFAULT", "SUPPORTED_FORMATS", "ChartImage", "load_chart"]

MAX_PIXELS_DEFAULT = 200_000_000
"""Largest image accepted by default (pixels). Chosen by this project: a 60-megapixel
poster (e.g. A0 at 300 ppi is about 140 MP, a 60 MP one is common) fits with room to
spare, while the decoded RGBA array (800 MB) still fits in an ordinary workstation."""

SUPPORTED_FORMATS: tuple[str, ...] = ("PNG", "JPEG", "TIFF", "WEBP", "BMP", "GIF")
"""Pillow format names the loader opens; others are refused before decoding. (Pillow
opens a multi-picture JPEG, MPO, through its JPEG entry, so it is accepted too.)"""

Space = Literal["RGB", "GRAY", "CMYK"]

_CHANNELS: dict[str, int] = {"RGB": 3, "GRAY": 1, "CMYK": 4}
_ICC_SPACE: dict[bytes, str] = {b"RGB ": "RGB", b"GRAY": "GRAY", b"CMYK": "CMYK"}

# Errors Pillow and its plugins are known to raise on malformed files.
_DECODE_ERRORS = (
    OSError,
    SyntaxError,
    ValueError,
    EOFError,
    IndexError,
    KeyError,
    TypeError,
    struct.error,
    zlib.error,
    MemoryError,
    Image.DecompressionBombError,
)

_PIL_LIMIT_LOCK = threading.RLock()


@dataclass
class ChartImage:
    """A chart image as 8-bit samples in its own colour space.

    Attributes
    ----------
    pixels
        ``(H, W, C)`` uint8; C is 3 for RGB, 1 for GRAY, 4 for CMYK.
    space
        ``"RGB"``, ``"GRAY"`` or ``"CMYK"``.
    alpha
        ``(H, W)`` uint8, or None when the image has no alpha or is fully opaque.
        Compositing transparent areas is the caller's job.
    icc
        The embedded ICC profile, or None.
    path
        The file the image came from, or None for arrays and unnamed images.
    width, height
        Size in pixels.
    notes
        Plain sentences on what the loader changed, for the report.
    format
        Pillow's format name (``"PNG"``, ``"JPEG"`` ...) or None.
    """

    pixels: NDArray[np.uint8]
    space: Space
    alpha: NDArray[np.uint8] | None
    icc: bytes | None
    path: str | None
    width: int
    height: int
    notes: list[str] = field(default_factory=list)
    format: str | None = None


def load_chart(
    source: str | Path | Image.Image | NDArray,
    *,
    max_pixels: int = MAX_PIXELS_DEFAULT,
) -> ChartImage:
    """Load a chart image from a file, a PIL image or a numpy array.

    Parameters
    ----------
    source
        Path of a PNG, JPEG, TIFF, WebP, BMP or GIF file; an open PIL image; or
        a numpy array (see the module docstring for the accepted shapes).
    max_pixels
        Largest accepted width x height, checked before decoding.

    Returns
    -------
    ChartImage

    Raises
    ------
    ImageError
        For every file or array that cannot be read or is not acceptable; the
        message is one line naming the file and the problem.
    """
    if isinstance(source, np.ndarray):
        return _from_array(source, max_pixels)
    if isinstance(source, Image.Image):
        name = getattr(source, "filename", "") or None
        with _pillow_limit_off():
            return _from_pil(source, str(name) if name else "<image>", name, max_pixels)
    if isinstance(source, (str, Path)):
        return _from_path(Path(source), max_pixels)
    raise ImageError("<input>", f"cannot load a chart from a {type(source).__name__}")


def _from_path(path: Path, max_pixels: int) -> ChartImage:
    name = str(path)
    if not path.exists():
        raise ImageError(name, "file not found")
    if path.is_dir():
        raise ImageError(name, "is a directory, not an image file")
    try:
        size = path.stat().st_size
    except OSError as exc:
        raise ImageError(name, f"cannot read the file ({_one_line(exc)})") from None
    if size == 0:
        raise ImageError(name, "file is empty")
    with _pillow_limit_off():
        try:
            im = Image.open(path, formats=list(SUPPORTED_FORMATS))
        except UnidentifiedImageError:
            raise ImageError(name, "not a PNG, JPEG, TIFF, WebP, BMP or GIF image") from None
        except PermissionError:
            raise ImageError(name, "permission denied") from None
        except _DECODE_ERRORS as exc:
            raise ImageError(name, f"cannot read the image header ({_one_line(exc)})") from None
        with im:
            return _from_pil(im, name, name, max_pixels)


def _from_pil(im: Image.Image, name: str, path: str | None, max_pixels: int) -> ChartImage:
    width, height = im.size
    _check_size(name, width, height, max_pixels)
    notes: list[str] = []
    fmt = im.format
    try:
        frames = int(getattr(im, "n_frames", 1) or 1)
        if frames > 1:
            im.seek(0)
            notes.append(f"{fmt or 'image'}: first frame of {frames} used")
        rawmode = _tile_rawmode(im)
        im.load()
        if rawmode is not None and im.mode in ("RGB", "RGBA") and "16" in rawmode:
            notes.append(
                "16-bit samples reduced to 8-bit by Pillow (high byte kept; at most one code "
                "below rounding)"
            )
        icc = im.info.get("icc_profile") or None
        if _orientation(im) != 1:
            im = ImageOps.exif_transpose(im)
            notes.append("rotated/flipped as its EXIF orientation tag asks")
        pixels, alpha, space = _pixels_from_mode(im, name, notes)
    except ImageError:
        raise
    except _DECODE_ERRORS as exc:
        raise ImageError(name, f"cannot decode the image ({_one_line(exc)})") from None

    pixels, space, icc = _match_profile(pixels, space, icc, notes)
    if alpha is not None and bool(np.all(alpha == 255)):
        alpha = None
    h, w = pixels.shape[:2]
    return ChartImage(
        pixels=np.ascontiguousarray(pixels),
        space=space,
        alpha=None if alpha is None else np.ascontiguousarray(alpha),
        icc=bytes(icc) if icc else None,
        path=path,
        width=w,
        height=h,
        notes=notes,
        format=fmt,
    )


def _pixels_from_mode(
    im: Image.Image, name: str, notes: list[str]
) -> tuple[NDArray[np.uint8], NDArray[np.uint8] | None, Space]:
    """Return (pixels (H, W, C), alpha or None, space) for any accepted Pillow mode."""
    mode = im.mode
    if mode in ("L", "RGB") and "transparency" in im.info:
        # A colour-key transparency (PNG tRNS chunk) becomes a real alpha channel.
        notes.append("transparent colour key turned into an alpha channel")
        im = im.convert("LA" if mode == "L" else "RGBA")
        mode = im.mode
    if mode == "1":
        return np.asarray(im.convert("L"), np.uint8)[..., None], None, "GRAY"
    if mode == "L":
        return np.asarray(im, np.uint8)[..., None], None, "GRAY"
    if mode in ("LA", "La"):
        arr = np.asarray(im.convert("LA") if mode == "La" else im, np.uint8)
        return arr[..., :1], arr[..., 1], "GRAY"
    if mode in ("P", "PA"):
        has_alpha = mode == "PA" or "transparency" in im.info
        target = "RGBA" if has_alpha else "RGB"
        notes.append(f"palette image expanded to {target}")
        arr = np.asarray(im.convert(target), np.uint8)
        return arr[..., :3], (arr[..., 3] if has_alpha else None), "RGB"
    if mode in ("RGB", "RGBX"):
        return np.asarray(im.convert("RGB") if mode == "RGBX" else im, np.uint8), None, "RGB"
    if mode in ("RGBA", "RGBa"):
        arr = np.asarray(im.convert("RGBA") if mode == "RGBa" else im, np.uint8)
        return arr[..., :3], arr[..., 3], "RGB"
    if mode == "CMYK":
        return np.asarray(im, np.uint8), None, "CMYK"
    if mode == "YCbCr":
        notes.append("YCbCr samples converted to RGB")
        return np.asarray(im.convert("RGB"), np.uint8), None, "RGB"
    if mode.startswith("I;16"):
        notes.append("16-bit samples reduced to 8-bit")
        return _reduce16(np.asarray(im).astype(np.uint32))[..., None], None, "GRAY"
    if mode == "I":
        arr = np.asarray(im, np.int64)
        if arr.size and (arr.min() < 0 or arr.max() > 65535):
            raise ImageError(name, "32-bit integer samples outside 0..65535 are not supported; export as 8-bit")
        notes.append("32-bit integer samples taken as 16-bit and reduced to 8-bit")
        return _reduce16(arr.astype(np.uint32))[..., None], None, "GRAY"
    if mode == "F":
        arr = np.asarray(im, np.float64)
        if not np.all(np.isfinite(arr)) or (arr.size and (arr.min() < 0.0 or arr.max() > 1.0)):
            raise ImageError(name, "floating-point samples outside 0..1 are not supported; export as 8-bit")
        notes.append("floating-point samples in 0..1 scaled to 8-bit")
        return np.rint(arr * 255.0).astype(np.uint8)[..., None], None, "GRAY"
    raise ImageError(name, f"image mode {mode} is not supported; export the chart as 8-bit RGB")


def _reduce16(values: NDArray[np.uint32]) -> NDArray[np.uint8]:
    """Round 16-bit samples to 8 bits: round(v * 255 / 65535) == (v + 128) // 257."""
    return ((values + 128) // 257).astype(np.uint8)


def _match_profile(
    pixels: NDArray[np.uint8], space: Space, icc: bytes | None, notes: list[str]
) -> tuple[NDArray[np.uint8], Space, bytes | None]:
    """Keep an embedded profile only if its colour space fits the pixels (ICC.1:2022 7.2.6)."""
    if not icc:
        return pixels, space, None
    sig = bytes(icc[16:20]) if len(icc) >= 128 else b""
    icc_space = _ICC_SPACE.get(sig)
    if icc_space == space:
        return pixels, space, icc
    if space == "GRAY" and icc_space == "RGB":
        notes.append("gray image with an embedded RGB profile: gray channel repeated to RGB")
        return np.repeat(pixels, 3, axis=2), "RGB", icc
    what = sig.decode("latin-1").strip() if icc_space is None and len(sig) == 4 else (icc_space or "unreadable")
    notes.append(f"embedded ICC profile ({what}) does not fit the {space} pixels and was ignored")
    return pixels, space, None


def _from_array(arr: NDArray, max_pixels: int) -> ChartImage:
    name = "<array>"
    if arr.ndim == 2:
        arr = arr[..., None]
    if arr.ndim != 3 or arr.shape[2] not in (1, 3, 4):
        raise ImageError(name, f"array shape {arr.shape} is not (H, W), (H, W, 3) or (H, W, 4)")
    h, w, c = arr.shape
    if h == 0 or w == 0:
        raise ImageError(name, f"array shape {arr.shape} has no pixels")
    _check_size(name, w, h, max_pixels)
    notes: list[str] = []
    if arr.dtype == np.uint8:
        data = arr
    elif np.issubdtype(arr.dtype, np.floating):
        if not np.all(np.isfinite(arr)) or arr.min() < 0.0 or arr.max() > 1.0:
            raise ImageError(name, "floating-point array values must lie in 0..1")
        data = np.rint(arr.astype(np.float64) * 255.0).astype(np.uint8)
        notes.append("floating-point samples in 0..1 scaled to 8-bit")
    else:
        raise ImageError(name, f"array dtype {arr.dtype} is not supported (use uint8 or float in 0..1)")
    alpha = None
    if c == 4:
        alpha = np.ascontiguousarray(data[..., 3])
        data = data[..., :3]
        if bool(np.all(alpha == 255)):
            alpha = None
    space: Space = "GRAY" if c == 1 else "RGB"
    return ChartImage(
        pixels=np.array(data, dtype=np.uint8, order="C", copy=True),
        space=space,
        alpha=alpha,
        icc=None,
        path=None,
        width=w,
        height=h,
        notes=notes,
        format=None,
    )


def _check_size(name: str, width: int, height: int, max_pixels: int) -> None:
    n = int(width) * int(height)
    if n <= 0:
        raise ImageError(name, f"image is {width} x {height}: no pixels")
    if n > max_pixels:
        raise ImageError(
            name, f"image is {width} x {height} = {n} pixels, over the limit of {max_pixels}"
        )


@contextmanager
def _pillow_limit_off() -> Iterator[None]:
    """Switch off Pillow's decompression-bomb check while the project's own limit applies.

    Pillow warns above ``Image.MAX_IMAGE_PIXELS`` and refuses above twice that;
    the loader checks the declared size itself, so Pillow's check is disabled
    (and any warning silenced) for the duration, then restored.
    """
    with _PIL_LIMIT_LOCK:
        saved = Image.MAX_IMAGE_PIXELS
        Image.MAX_IMAGE_PIXELS = None
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", Image.DecompressionBombWarning)
                yield
        finally:
            Image.MAX_IMAGE_PIXELS = saved


def _tile_rawmode(im: Image.Image) -> str | None:
    """Return the raw mode of the first decoder tile, if Pillow has not decoded yet."""
    tile = getattr(im, "tile", None)
    if not tile:
        return None
    args = tile[0][3] if len(tile[0]) > 3 else None
    if isinstance(args, tuple):
        args = args[0] if args else None
    return args if isinstance(args, str) else None


def _orientation(im: Image.Image) -> int:
    try:
        return int(im.getexif().get(0x0112, 1) or 1)
    except _DECODE_ERRORS:
        return 1


def _one_line(exc: BaseException) -> str:
    return " ".join(str(exc).split()) or type(exc).__name__
