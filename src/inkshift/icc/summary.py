"""A plain-data summary of an ICC profile, for ``inkshift profiles show`` and the Python API.

References
----------
ICC.1:2022 (v4.4): 7.2.5 profile/device class, table 25 (tags per
rendering intent), 9.2.36 mediaWhitePointTag (the paper white as measured,
in ICC-absolute XYZ). Total area coverage (the sum of the four ink
percentages) is the print trade's ink limit, ISO 12647-2:2013 and
ISO/TS 10128.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from inkshift.color.convert import xyz_to_lab
from inkshift.icc.evaluate import absolute_white, select_table
from inkshift.icc.intent import INTENT_NAMES, Intent
from inkshift.icc.lut import Clut, Lut, eval_stages
from inkshift.icc.read import Profile

__all__ = ["profile_summary", "total_ink_limit", "ink_limits", "CLASS_NAMES"]

CLASS_NAMES: dict[str, str] = {
    "scnr": "input device",
    "mntr": "display device",
    "prtr": "output device",
    "link": "device link",
    "spac": "colour space",
    "abst": "abstract",
    "nmcl": "named colour",
}
"""Plain names of the ICC profile classes (ICC.1:2022 7.2.5, table 18)."""

_DIGITS = 4


def total_ink_limit(lut: Lut) -> float | None:
    """Return the largest sum of the four outputs over a table's CLUT nodes, in percent.

    Each CLUT node is taken through the stages that follow the CLUT (the
    output curves of lut8/lut16, the A curves of lutBtoA), which is what
    the table can send to the press. None when the table has no CLUT or
    does not have four outputs.
    """
    if lut.n_out != 4:
        return None
    for i, stage in enumerate(lut.stages):
        if isinstance(stage, Clut):
            inks = eval_stages(lut.stages[i + 1:], stage.table)
            return float(inks.sum(axis=1).max() * 100.0)
    return None


def _white_entry(xyz: np.ndarray | None) -> dict[str, list[float]] | None:
    if xyz is None:
        return None
    return {
        "XYZ": [round(float(v), _DIGITS) + 0.0 for v in xyz],
        "Lab": [round(float(v), 2) + 0.0 for v in xyz_to_lab(np.asarray(xyz, dtype=np.float64))],
    }


def _transform_entry(profile: Profile, direction: str, intent: Intent) -> dict[str, Any] | None:
    tag = select_table(profile, direction, intent)
    if tag is not None:
        own = f"{direction}{intent.table_index}"
        return {"tag": tag, "type": profile.luts[tag].kind, "fallback": tag != own}
    if profile.is_matrix_trc:
        return {"tag": None, "type": "matrix/TRC", "fallback": False}
    if profile.is_gray_trc and profile.channels == 1:
        return {"tag": None, "type": "gray TRC", "fallback": False}
    return None


def profile_summary(profile: Profile) -> dict[str, Any]:
    """Return what ``inkshift profiles show`` prints, as JSON-ready plain data.

    Keys: source, description, copyright, class, class_name, color_space,
    channels, pcs, version, header_intent, media_white, media_black (each
    ``{"XYZ": [...], "Lab": [...]}`` or None), absolute_white (the white
    ICC-absolute colorimetry scales by, see
    :func:`inkshift.icc.evaluate.absolute_white`), intents (per intent the
    device-to-PCS and PCS-to-device transform: tag, table type, and whether
    it is the A2B0/B2A0 fallback), tables (tag -> table type), gamut_tag,
    and for CMYK profiles ink_limits (B2A tag -> percent) and
    total_ink_limit (their maximum, percent).
    """
    intents = {}
    for intent in Intent:
        intents[INTENT_NAMES[intent]] = {
            "device_to_pcs": _transform_entry(profile, "A2B", intent),
            "pcs_to_device": _transform_entry(profile, "B2A", intent),
            "scaled_by_media_white": intent is Intent.ABSOLUTE,
        }
    summary: dict[str, Any] = {
        "source": profile.source,
        "description": profile.description,
        "copyright": profile.copyright,
        "class": profile.device_class,
        "class_name": CLASS_NAMES.get(profile.device_class, profile.device_class),
        "color_space": profile.color_space,
        "channels": profile.channels,
        "pcs": profile.pcs,
        "version": ".".join(str(v) for v in profile.version),
        "header_intent": INTENT_NAMES.get(Intent(profile.rendering_intent), str(profile.rendering_intent))
        if profile.rendering_intent in (0, 1, 2, 3) else str(profile.rendering_intent),
        "media_white": _white_entry(profile.media_white),
        "media_black": _white_entry(profile.media_black),
        "absolute_white": _white_entry(absolute_white(profile)),
        "intents": intents,
        "tables": {tag: lut.kind for tag, lut in sorted(profile.luts.items())},
        "gamut_tag": profile.gamut.kind if profile.gamut is not None else None,
    }
    if profile.color_space == "CMYK":
        limits = ink_limits(profile)
        summary["ink_limits"] = limits
        summary["total_ink_limit"] = max(limits.values()) if limits else None
    return summary


def ink_limits(profile: Profile) -> dict[str, float]:
    """Return the total ink (percent, to 0.1 %) of each B2A table of a CMYK profile.

    :func:`total_ink_limit` of each table, rounded to 0.1 % (which absorbs the
    16-bit rounding of the entries). A profile's separations never ask for more
    ink than its condition allows, so the largest is the limit it was built for;
    a colorimetric table may stay below it (its darkest colours are clipped
    rather than pushed to the deepest black).
    """
    limits = {}
    for tag, lut in sorted(profile.luts.items()):
        if tag.startswith("B2A"):
            limit = total_ink_limit(lut)
            if limit is not None:
                limits[tag] = round(limit, 1)
    return limits
