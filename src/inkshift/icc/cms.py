"""A thin wrapper over Pillow.ImageCms (LittleCMS) for arrays of colours.

LittleCMS decides separations (device values for an intent, with or without
black point compensation) exactly as a print workflow does; it is also the
reference the project's own float evaluator is tested against. Pillow only
runs 8-bit transforms, so every array here is ``uint8``.

Every failure inside Pillow or LittleCMS is re-raised as
:class:`inkshift.errors.CmsError` (or :class:`~inkshift.errors.ProfileError`
when a profile cannot be opened).
"""

from __future__ import annotations

import io
from functools import lru_cache
from pathlib import Path
from typing import Union

import numpy as np
from numpy.typing import NDArray
from PIL import Image, ImageCms

from inkshift.errors import CmsError, ProfileError, one_line
from inkshift.icc.intent import Intent, parse_intent

__all__ = [
    "ProfileSource",
    "cms_profile",
    "srgb_profile_bytes",
    "lab_profile",
    "transform_colors",
    "MODE_CHANNELS",
]

ProfileSource = Union[str, Path, bytes, ImageCms.ImageCmsProfile, "HasIccBytes"]

MODE_CHANNELS: dict[str, int] = {"L": 1, "RGB": 3, "CMYK": 4, "LAB": 3}
"""Pillow modes used with LittleCMS here, and their channel counts."""

# Rows of at most this many colours per image keep Pillow's buffers small.
_ROW = 4096


class HasIccBytes:  # pragma: no cover - typing helper only
    """Anything with the raw ICC bytes in ``.data`` (the project's Profile)."""

    data: bytes
    source: str


@lru_cache(maxsize=1)
def srgb_profile_bytes() -> bytes:
    """Return LittleCMS's built-in sRGB profile, written out by Pillow, as bytes."""
    return ImageCms.ImageCmsProfile(ImageCms.createProfile("sRGB")).tobytes()


def lab_profile() -> ImageCms.ImageCmsProfile:
    """Return LittleCMS's built-in CIELAB D50 profile (Pillow mode ``LAB``)."""
    return ImageCms.ImageCmsProfile(ImageCms.createProfile("LAB", 5000))


def cms_profile(source: ProfileSource) -> ImageCms.ImageCmsProfile:
    """Open ``source`` (path, bytes, ImageCmsProfile or project Profile) for LittleCMS."""
    if isinstance(source, ImageCms.ImageCmsProfile):
        return source
    name = "<bytes>"
    try:
        if isinstance(source, (str, Path)):
            name = str(source)
            return ImageCms.ImageCmsProfile(str(source))
        if isinstance(source, (bytes, bytearray)):
            return ImageCms.ImageCmsProfile(io.BytesIO(bytes(source)))
        data = getattr(source, "data", None)
        if isinstance(data, (bytes, bytearray)):
            name = str(getattr(source, "source", name))
            return ImageCms.ImageCmsProfile(io.BytesIO(bytes(data)))
    except (OSError, ImageCms.PyCMSError, TypeError, ValueError) as exc:
        raise ProfileError(name, f"LittleCMS cannot open the profile ({one_line(exc)})") from None
    raise ProfileError(name, f"not a profile: {type(source).__name__}")


def transform_colors(
    colors: NDArray[np.uint8],
    source: ProfileSource,
    target: ProfileSource,
    in_mode: str,
    out_mode: str,
    intent: Intent | str | int = Intent.RELATIVE,
    bpc: bool = False,
    optimise: bool = True,
) -> NDArray[np.uint8]:
    """Return ``colors`` (``(..., channels)`` uint8) transformed by LittleCMS.

    Parameters
    ----------
    colors
        8-bit device values, last axis the channels of ``in_mode``.
    source, target
        The profiles (see :func:`cms_profile`).
    in_mode, out_mode
        Pillow modes: ``"L"``, ``"RGB"``, ``"CMYK"`` or ``"LAB"``.
    intent
        ICC rendering intent.
    bpc
        Black point compensation (LittleCMS ``cmsFLAGS_BLACKPOINTCOMPENSATION``).
    optimise
        ``False`` sets ``cmsFLAGS_NOOPTIMIZE`` so that LittleCMS evaluates the
        profiles' own tables instead of a resampled device link.
    """
    intent = parse_intent(intent)
    colors = np.asarray(colors)
    if colors.dtype != np.uint8:
        raise CmsError(f"transform_colors needs uint8 colours, got {colors.dtype}")
    n_in = MODE_CHANNELS.get(in_mode)
    n_out = MODE_CHANNELS.get(out_mode)
    if n_in is None or n_out is None:
        raise CmsError(f"unsupported Pillow mode pair {in_mode!r} -> {out_mode!r}")
    if colors.shape[-1:] != (n_in,):
        raise CmsError(f"mode {in_mode} needs {n_in} channels, got shape {colors.shape}")
    lead = colors.shape[:-1]
    flat = colors.reshape(-1, n_in)
    n = flat.shape[0]
    if n == 0:
        return np.zeros(lead + (n_out,), np.uint8)

    flags = 0
    if bpc:
        flags |= ImageCms.Flags.BLACKPOINTCOMPENSATION
    if not optimise:
        flags |= ImageCms.Flags.NOOPTIMIZE
    try:
        transform = ImageCms.buildTransform(
            cms_profile(source), cms_profile(target), in_mode, out_mode,
            renderingIntent=ImageCms.Intent(int(intent)), flags=flags,
        )
    except ImageCms.PyCMSError as exc:
        raise CmsError(f"LittleCMS cannot build the transform ({one_line(exc)})") from None

    rows = -(-n // _ROW)
    width = min(n, _ROW)
    padded = np.zeros((rows * width, n_in), np.uint8)
    padded[:n] = flat
    img = _to_image(padded.reshape(rows, width, n_in), in_mode)
    try:
        out = ImageCms.applyTransform(img, transform)
    except (ImageCms.PyCMSError, ValueError, OSError) as exc:
        raise CmsError(f"LittleCMS failed to apply the transform ({one_line(exc)})") from None
    arr = _from_image(out, out_mode).reshape(-1, n_out)[:n]
    return arr.reshape(lead + (n_out,))


def _to_image(arr: NDArray[np.uint8], mode: str) -> Image.Image:
    if mode == "L":
        return Image.fromarray(np.ascontiguousarray(arr[..., 0]), mode="L")
    if mode in ("RGB", "CMYK"):
        return Image.fromarray(np.ascontiguousarray(arr), mode=mode)
    # LAB: Pillow has no fromarray for LAB; build it from raw bytes.
    h, w, _ = arr.shape
    return Image.frombytes("LAB", (w, h), np.ascontiguousarray(arr).tobytes())


def _from_image(img: Image.Image, mode: str) -> NDArray[np.uint8]:
    if mode == "L":
        return np.asarray(img, dtype=np.uint8)[..., None]
    if mode == "LAB":
        w, h = img.size
        return np.frombuffer(img.tobytes(), np.uint8).reshape(h, w, 3)
    return np.asarray(img, dtype=np.uint8)


