"""The cautions shown beside every result that could lead to an expensive print run.

The wording is the project's own; DESIGN.md lists what they must cover.
"""

from __future__ import annotations

from typing import Sequence

__all__ = ["SOFT_PROOF", "SHIPPED_PROFILE", "SHIPPED_PROFILES", "VISION_MODEL", "HARD_PROOF", "ASSUMED_SRGB", "cautions_for"]

SOFT_PROOF = (
    "This is a soft proof computed from profiles; on an uncalibrated display its "
    "pictures are only indicative and it is not a contract proof."
)
SHIPPED_PROFILE = (
    "The output profile '{name}' is one of inkshift's own approximations of a "
    "standard printing condition, not a certified characterisation of any press."
)
SHIPPED_PROFILES = (
    "The output profiles {names} are inkshift's own approximations of standard "
    "printing conditions, not certified characterisations of any press."
)
VISION_MODEL = (
    "Colour-vision results model typical dichromacy (Machado et al. 2009); real "
    "readers vary."
)
HARD_PROOF = (
    "Before an important or large run, check with your print provider's own "
    "profile and ask for a hard proof."
)
ASSUMED_SRGB = "The image has no embedded ICC profile; it was taken to be sRGB."


def cautions_for(
    *, shipped_profile: str | Sequence[str] | None, vision: bool, assumed_srgb: bool
) -> list[str]:
    """Return the cautions for one result, in the order they are shown.

    ``shipped_profile`` names the shipped profile(s) the result used, if any.
    """
    out = [SOFT_PROOF]
    if assumed_srgb:
        out.append(ASSUMED_SRGB)
    names = [shipped_profile] if isinstance(shipped_profile, str) else list(shipped_profile or [])
    if len(names) == 1:
        out.append(SHIPPED_PROFILE.format(name=names[0]))
    elif names:
        out.append(SHIPPED_PROFILES.format(names=", ".join(f"'{n}'" for n in names)))
    if vision:
        out.append(VISION_MODEL)
    out.append(HARD_PROOF)
    return out
