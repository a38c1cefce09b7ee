"""Float evaluation of ICC profiles: device values to PCS and back.

Device values are floats in 0..1 (8-bit codes divided by 255); colours are
returned as float64 CIELAB (D50) or CIE XYZ with the PCS white at Y = 1.
For a device colour space that is itself CIELAB or XYZ (abstract and
colour-space profiles), the 0..1 device values use the ICC v4 16-bit Lab
encoding or u1Fixed15 XYZ, normalised, as LittleCMS's 8- and 16-bit Lab
buffers do.

References
----------
ICC.1:2022 (v4.4): table 25 (which A2Bn/B2An tag serves which intent; A2B0
when the others are absent), F.2 (monochrome: connection = grayTRC), F.3
(three-component matrix-based: XYZ = [rXYZ gXYZ bXYZ] @ TRC(device)),
6.3.4.2 and 10.10-10.13 (PCS encodings of lut8, lut16, lutAtoB/lutBtoA),
annex D.1 (ICC-absolute = media-relative * media white / PCS white).
LittleCMS 2 (``cmsio1.c``): a grayTRC on a Lab PCS gives L* = 100 * TRC;
v2 display-class profiles take D50 as the media white for ICC-absolute
colorimetry (their wtpt describes the display, not the PCS adaptation).
"""

from __future__ import annotations

from weakref import WeakKeyDictionary

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.color.convert import D50_XYZ, lab_to_xyz, xyz_to_lab
from inkshift.errors import InputError, ProfileError
from inkshift.icc.encoding import (
    lab_from_8,
    lab_from_legacy16,
    lab_from_v4_16,
    lab_to_8,
    lab_to_legacy16,
    lab_to_v4_16,
    xyz_from_u1fixed15,
    xyz_to_u1fixed15,
)
from inkshift.icc.intent import Intent, parse_intent
from inkshift.icc.lut import Lut, eval_lut, eval_curve, invert_curve
from inkshift.icc.read import Profile

__all__ = [
    "device_to_xyz",
    "device_to_lab",
    "codes_to_lab",
    "lab_to_device",
    "xyz_to_device",
    "available_tables",
    "select_table",
    "absolute_white",
]


def available_tables(profile: Profile) -> dict[str, str]:
    """Return the profile's transforms as ``{"A2B0": "lut16", ...}``.

    Matrix/TRC profiles list ``"matrix/TRC"`` (RGB) or ``"gray TRC"`` under
    ``"device to PCS"`` and ``"PCS to device"``: they serve every intent.
    """
    out = {tag: lut.kind for tag, lut in sorted(profile.luts.items())}
    if profile.is_matrix_trc:
        out.setdefault("device to PCS", "matrix/TRC")
        out.setdefault("PCS to device", "matrix/TRC")
    elif profile.is_gray_trc:
        out.setdefault("device to PCS", "gray TRC")
        out.setdefault("PCS to device", "gray TRC")
    return out


def select_table(profile: Profile, direction: str, intent: Intent | str | int) -> str | None:
    """Return the tag ('A2B1' ...) that serves ``intent`` in ``direction`` ('A2B' or 'B2A'), or None.

    ICC.1:2022 table 25: the intent's own tag (absolute uses the colorimetric
    one), else the 0 tag.
    """
    intent = parse_intent(intent)
    for tag in (f"{direction}{intent.table_index}", f"{direction}0"):
        if tag in profile.luts:
            return tag
    return None


def absolute_white(profile: Profile) -> NDArray[np.float64]:
    """Return the media white used for ICC-absolute colorimetry (XYZ, Y = 1).

    The wtpt tag, except D50 when it is missing or the profile is a v2
    display profile (LittleCMS ``_cmsReadMediaWhitePoint``).
    """
    if profile.media_white is None or (profile.version[0] < 4 and profile.device_class == "mntr"):
        return D50_XYZ.copy()
    if profile.media_white[1] <= 0:
        raise ProfileError(profile.source, "media white point has Y <= 0", tag="wtpt")
    return np.asarray(profile.media_white, dtype=np.float64)


def device_to_xyz(profile: Profile, device: ArrayLike, intent: Intent | str | int = Intent.RELATIVE) -> NDArray[np.float64]:
    """Return PCS XYZ (D50, white Y = 1) for device values in 0..1, shape (..., channels).

    ``Intent.ABSOLUTE`` returns ICC-absolute XYZ (the media-relative value
    scaled by :func:`absolute_white` / D50, ICC.1:2022 D.1).
    """
    values, space = _device_to_pcs(profile, device, intent)
    xyz = values if space == "XYZ" else lab_to_xyz(values)
    return _to_absolute(profile, xyz, intent)


def device_to_lab(profile: Profile, device: ArrayLike, intent: Intent | str | int = Intent.RELATIVE) -> NDArray[np.float64]:
    """Return CIELAB (D50) for device values in 0..1, shape (..., channels); see :func:`device_to_xyz`."""
    intent = parse_intent(intent)
    return _pcs_to_lab(profile, *_device_to_pcs(profile, device, intent), intent)


def _pcs_to_lab(profile: Profile, values: NDArray[np.float64], space: str, intent: Intent) -> NDArray[np.float64]:
    """Media-relative PCS values -> CIELAB, ICC-absolute for the absolute intent."""
    if intent is not Intent.ABSOLUTE:
        return values if space == "LAB" else xyz_to_lab(values)
    xyz = values if space == "XYZ" else lab_to_xyz(values)
    return xyz_to_lab(_to_absolute(profile, xyz, intent))


def codes_to_lab(profile: Profile, codes: ArrayLike, intent: Intent | str | int = Intent.RELATIVE) -> NDArray[np.float64]:
    """Return :func:`device_to_lab` of 8-bit device codes (``codes / 255``), bit for bit, faster.

    The tone curves of a matrix/TRC or gray TRC profile are evaluated once at
    the 256 codes and looked up, instead of once per colour (a parametric
    sRGB curve costs a power function per channel and colour).
    """
    intent = parse_intent(intent)
    codes = np.asarray(codes)
    if codes.dtype != np.uint8 or codes.ndim == 0 or codes.shape[-1] != profile.channels:
        raise InputError(f"{profile.source}: 8-bit codes need a uint8 array with a last axis of {profile.channels}")
    if select_table(profile, "A2B", intent) is not None or not (profile.is_matrix_trc or profile.is_gray_trc):
        return device_to_lab(profile, codes / 255.0, intent)
    return _pcs_to_lab(profile, *_device_to_pcs(profile, codes, intent, codes=True), intent)


_TRC_TABLES: WeakKeyDictionary[Profile, list[NDArray[np.float64]]] = WeakKeyDictionary()


def _trc_tables(profile: Profile) -> list[NDArray[np.float64]]:
    """Each TRC of ``profile`` evaluated at the 256 8-bit codes (cached per profile object)."""
    tables = _TRC_TABLES.get(profile)
    if tables is None:
        tables = _TRC_TABLES[profile] = [eval_curve(c, np.arange(256) / 255.0) for c in profile.trcs]
    return tables


def lab_to_device(profile: Profile, lab: ArrayLike, intent: Intent | str | int = Intent.RELATIVE) -> NDArray[np.float64]:
    """Return device values in 0..1, shape (..., channels), for CIELAB (D50), shape (..., 3).

    Uses the B2An table of the intent (else B2A0), or the inverted
    matrix/TRC or grayTRC model, clipped to the device range.
    """
    intent = parse_intent(intent)
    lab = _as_colours(profile, lab, 3, "Lab")
    if intent is Intent.ABSOLUTE:
        return _pcs_to_device(profile, _from_absolute(profile, lab_to_xyz(lab), intent), "XYZ", intent)
    return _pcs_to_device(profile, lab, "LAB", intent)


def xyz_to_device(profile: Profile, xyz: ArrayLike, intent: Intent | str | int = Intent.RELATIVE) -> NDArray[np.float64]:
    """Return device values in 0..1 for PCS XYZ (white Y = 1); see :func:`lab_to_device`."""
    intent = parse_intent(intent)
    xyz = _from_absolute(profile, _as_colours(profile, xyz, 3, "XYZ"), intent)
    return _pcs_to_device(profile, xyz, "XYZ", intent)


# --- internals ---------------------------------------------------------------------


def _as_colours(profile: Profile, values: ArrayLike, n: int, what: str) -> NDArray[np.float64]:
    arr = np.asarray(values, dtype=np.float64)
    if arr.ndim == 0 or arr.shape[-1] != n:
        raise InputError(f"{profile.source}: {what} values need a last axis of {n}, got shape {arr.shape}")
    if not np.isfinite(arr).all():
        raise InputError(f"{profile.source}: {what} values must be finite numbers (got NaN or infinity)")
    return arr


def _to_absolute(profile: Profile, xyz: NDArray[np.float64], intent: Intent | str | int) -> NDArray[np.float64]:
    if parse_intent(intent) is Intent.ABSOLUTE:
        return xyz * (absolute_white(profile) / D50_XYZ)
    return xyz


def _from_absolute(profile: Profile, xyz: NDArray[np.float64], intent: Intent) -> NDArray[np.float64]:
    if intent is Intent.ABSOLUTE:
        return xyz * (D50_XYZ / absolute_white(profile))
    return xyz


def _decode_pcs(lut: Lut, v: NDArray[np.float64], space: str) -> NDArray[np.float64]:
    """Normalised table values on the PCS side -> Lab or XYZ floats."""
    if space == "XYZ":
        return xyz_from_u1fixed15(v * 65535.0)
    if lut.kind == "lut16":
        return lab_from_legacy16(v * 65535.0)
    if lut.kind == "lut8":
        return lab_from_8(v * 255.0)
    return lab_from_v4_16(v * 65535.0)


def _encode_pcs(lut: Lut, pcs: NDArray[np.float64], space: str) -> NDArray[np.float64]:
    """Lab or XYZ floats -> normalised table inputs on the PCS side (clipped to the encoding)."""
    if space == "XYZ":
        return xyz_to_u1fixed15(pcs) / 65535.0
    if lut.kind == "lut16":
        return lab_to_legacy16(pcs) / 65535.0
    if lut.kind == "lut8":
        return lab_to_8(pcs) / 255.0
    return lab_to_v4_16(pcs) / 65535.0


def _device_in(profile: Profile, lut: Lut, d: NDArray[np.float64]) -> NDArray[np.float64]:
    """Device values (v4 normalised when the device space is Lab) -> the table's input encoding."""
    if profile.color_space == "LAB":
        return _encode_pcs(lut, lab_from_v4_16(np.clip(d, 0, 1) * 65535.0), "LAB")
    return d


def _device_out(profile: Profile, lut: Lut, v: NDArray[np.float64]) -> NDArray[np.float64]:
    if profile.color_space == "LAB":
        return lab_to_v4_16(_decode_pcs(lut, v, "LAB")) / 65535.0
    return v


def _device_to_pcs(
    profile: Profile, device: ArrayLike, intent: Intent | str | int, codes: bool = False
) -> tuple[NDArray[np.float64], str]:
    """Return (media-relative PCS values, 'LAB' or 'XYZ') for device values.

    With ``codes`` the values are uint8 codes (checked by the caller) and the
    TRCs are looked up (:func:`codes_to_lab`).
    """
    intent = parse_intent(intent)
    _check_usable(profile)
    if codes:
        d = np.asarray(device)
        flat = d.reshape(-1, profile.channels)
    else:
        d = _as_colours(profile, device, profile.channels, f"{profile.color_space} device")
        flat = np.clip(d.reshape(-1, profile.channels), 0.0, 1.0)
    lead = d.shape[:-1]
    tag = select_table(profile, "A2B", intent)
    if tag is not None:
        lut = profile.luts[tag]
        out = _decode_pcs(lut, eval_lut(lut, _device_in(profile, lut, flat)), profile.pcs)
        return out.reshape(lead + (3,)), profile.pcs
    if profile.is_matrix_trc:
        linear = np.stack([_trc(profile, flat, i) for i in range(3)], axis=1)
        return (linear @ profile.colorants.T).reshape(lead + (3,)), "XYZ"
    if profile.is_gray_trc and profile.channels == 1:
        y = _trc(profile, flat, 0)
        if profile.pcs == "LAB":
            lab = np.zeros((flat.shape[0], 3))
            lab[:, 0] = 100.0 * y
            return lab.reshape(lead + (3,)), "LAB"
        return (y[:, None] * D50_XYZ).reshape(lead + (3,)), "XYZ"
    raise ProfileError(profile.source, "no device-to-PCS transform (no A2B0/A2B1/A2B2 table and no matrix/TRC or grayTRC)")


def _trc(profile: Profile, device: NDArray, channel: int) -> NDArray[np.float64]:
    """TRC ``channel`` of ``profile`` at the device values: looked up for uint8 codes, else evaluated."""
    if device.dtype == np.uint8:
        return _trc_tables(profile)[channel].take(device[:, channel])
    return eval_curve(profile.trcs[channel], device[:, channel])


def _pcs_to_device(profile: Profile, pcs: NDArray[np.float64], space: str, intent: Intent) -> NDArray[np.float64]:
    """Media-relative PCS values in ``space`` -> device values in 0..1."""
    _check_usable(profile)
    lead = pcs.shape[:-1]
    flat = pcs.reshape(-1, 3)
    tag = select_table(profile, "B2A", intent)
    if tag is not None:
        lut = profile.luts[tag]
        if space != profile.pcs:
            flat = lab_to_xyz(flat) if profile.pcs == "XYZ" else xyz_to_lab(flat)
        # Tables indexed by CIELAB are interpolated trilinearly, as LittleCMS does
        # (cmsio1.c, _cmsReadOutputLUT); device-indexed ones tetrahedrally.
        method = "multilinear" if profile.pcs == "LAB" else "tetrahedral"
        out = _device_out(profile, lut, eval_lut(lut, _encode_pcs(lut, flat, profile.pcs), method))
    elif profile.is_matrix_trc:
        xyz = flat if space == "XYZ" else lab_to_xyz(flat)
        linear = np.clip(xyz @ np.linalg.inv(profile.colorants).T, 0.0, 1.0)
        out = np.stack([invert_curve(c, linear[:, i]) for i, c in enumerate(profile.trcs)], axis=1)
    elif profile.is_gray_trc and profile.channels == 1:
        if profile.pcs == "LAB":
            lab = flat if space == "LAB" else xyz_to_lab(flat)
            y = lab[:, 0] / 100.0
        else:
            y = (flat if space == "XYZ" else lab_to_xyz(flat))[:, 1]
        out = invert_curve(profile.trcs[0], y)[:, None]
    else:
        raise ProfileError(profile.source, "no PCS-to-device transform (no B2A0/B2A1/B2A2 table and no matrix/TRC or grayTRC)")
    return np.clip(out, 0.0, 1.0).reshape(lead + (profile.channels,))


def _check_usable(profile: Profile) -> None:
    if profile.device_class == "link":
        raise ProfileError(profile.source, "a device link profile has no PCS; it cannot be evaluated to CIELAB")
    if profile.is_matrix_trc and abs(np.linalg.det(profile.colorants)) < 1e-12:
        raise ProfileError(profile.source, "the rXYZ/gXYZ/bXYZ colorant matrix is singular", tag="rXYZ")
