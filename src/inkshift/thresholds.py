"""The numbers that decide a verdict, each with where it comes from.

CIEDE2000 was scaled so that about one unit is a just-noticeable difference
for large uniform patches viewed side by side (CIE 142-2001; Luo, Cui & Rigg
2001). Chart marks are small, thin and seen apart, so the thresholds that
matter for charts are larger than that. Every value can be overridden on the
command line and through :class:`Thresholds` in the Python API.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = [
    "SHIFT_DELTA_E",
    "DISTINCT_DELTA_E",
    "MERGE_DELTA_E",
    "SEPARATION_LOSS_RATIO",
    "OUT_OF_GAMUT_DELTA_E",
    "SRGB_GAMUT_DELTA_E",
    "Thresholds",
]

SHIFT_DELTA_E = 3.0
"""ΔE00 from screen to print above which a palette colour 'shifts noticeably'.
Common practice: print buyers accept about 2-3 ΔE00 between proof and press for
flat colours; 3 marks the point where a reader comparing screen and print sees
a different colour."""

DISTINCT_DELTA_E = 8.0
"""ΔE00 on screen from which two palette colours count as 'clearly distinct'.
Common practice for category colours of chart marks, which need several times
the patch JND to be told apart at a glance (from memory: studies of mark
colour difference in visualisation put reliable discrimination of small
marks at several ΔE units, growing as marks get smaller)."""

MERGE_DELTA_E = 5.0
"""ΔE00 in print below which two clearly distinct screen colours 'merge'.
Common practice: under about 5 ΔE00 two category colours on small marks are
easily confused (from memory, same studies as DISTINCT_DELTA_E)."""

SEPARATION_LOSS_RATIO = 0.5
"""A pair that stays above MERGE_DELTA_E but keeps less than this share of its
screen ΔE00 in print is reported as losing separation (common practice)."""

OUT_OF_GAMUT_DELTA_E = 2.0
"""A colour whose relative colorimetric round trip (Lab -> B2A1 -> A2B1) through
the output profile misses by more than this ΔE00 is out of gamut. Common
practice: twice the JND leaves room for the profile's own table precision
(the shipped profiles round-trip in-gamut colours at p95 <= 1 ΔE00)."""


SRGB_GAMUT_DELTA_E = 0.5
"""A ``lab()`` colour counts as inside sRGB when rendering it in sRGB (clipped)
and measuring back misses it by at most this ΔE00. The unclipped float round
trip of the matrix/TRC sRGB profile is exact to rounding, so a larger miss
comes from clipping. Common practice: half the ~1 ΔE00 just-noticeable
difference (CIE 142-2001) is invisible on a screen."""


@dataclass(frozen=True)
class Thresholds:
    """The verdict thresholds of one check, defaulting to the constants above."""

    shift: float = SHIFT_DELTA_E
    distinct: float = DISTINCT_DELTA_E
    merge: float = MERGE_DELTA_E
    separation_loss: float = SEPARATION_LOSS_RATIO
    out_of_gamut: float = OUT_OF_GAMUT_DELTA_E
