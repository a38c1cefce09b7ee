"""ICC rendering intents and their command-line names.

Reference: ICC.1:2022, 7.2.15 (rendering intent field) and table 25
(the A2B0/A2B1/A2B2 and B2A0/B2A1/B2A2 tags per intent).
"""

from __future__ import annotations

from enum import IntEnum

from inkshift.errors import InputError

__all__ = ["Intent", "parse_intent", "INTENT_NAMES"]


class Intent(IntEnum):
    """The four ICC rendering intents, numbered as in the ICC header."""

    PERCEPTUAL = 0
    RELATIVE = 1  # media-relative colorimetric
    SATURATION = 2
    ABSOLUTE = 3  # ICC-absolute colorimetric

    @property
    def label(self) -> str:
        """The command-line name of the intent."""
        return INTENT_NAMES[self]

    @property
    def table_index(self) -> int:
        """The digit of the A2Bn/B2An tag that serves this intent (absolute uses 1)."""
        return 1 if self is Intent.ABSOLUTE else int(self)


INTENT_NAMES: dict[Intent, str] = {
    Intent.PERCEPTUAL: "perceptual",
    Intent.RELATIVE: "relative",
    Intent.SATURATION: "saturation",
    Intent.ABSOLUTE: "absolute",
}


def parse_intent(value: "str | int | Intent") -> Intent:
    """Return the :class:`Intent` for a command-line name, a number or an Intent."""
    if isinstance(value, Intent):
        return value
    if isinstance(value, int):
        try:
            return Intent(value)
        except ValueError:
            raise InputError(f"rendering intent {value} is not 0..3") from None
    key = str(value).strip().lower()
    for intent, name in INTENT_NAMES.items():
        if key == name:
            return intent
    raise InputError(
        f"unknown rendering intent '{value}'; use one of: {', '.join(INTENT_NAMES.values())}"
    )
