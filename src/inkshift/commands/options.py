"""Command-line options shared by several commands, declared once.

Each alias is an ``Annotated`` type carrying its typer declaration; a command
writes ``intent: IntentOption = "relative"`` and gets the same flag, short
name and help as every other command.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, List, Optional

import typer

from inkshift.errors import InputError
from inkshift.icc.intent import INTENT_NAMES, parse_intent
from inkshift.thresholds import Thresholds

__all__ = [
    "INTENT_CHOICES",
    "ImageArgument",
    "ProfileOption",
    "ProfilesOption",
    "IntentOption",
    "BpcOption",
    "PaperOption",
    "OutOption",
    "JsonOption",
    "ShiftOption",
    "DistinctOption",
    "MergeOption",
    "LossOption",
    "GamutOption",
    "GrayProfileOption",
    "GrayThresholdOption",
    "SeverityOption",
    "MaxPixelsOption",
    "check_intent",
    "check_gamut",
    "threshold_options",
    "check_readability_options",
]

INTENT_CHOICES: tuple[str, ...] = tuple(INTENT_NAMES.values())
"""Command-line names of the rendering intents."""

ImageArgument = Annotated[Path, typer.Argument(help="Chart image: PNG, JPEG, TIFF, WebP, BMP or GIF.")]
ProfileOption = Annotated[str, typer.Option("--profile", "-p", help="Output profile: a shipped short name or an ICC file.")]
ProfilesOption = Annotated[
    Optional[List[str]],
    typer.Option("--profile", "-p", help="Output profile: a shipped short name or an ICC file. Repeatable."),
]
IntentOption = Annotated[str, typer.Option("--intent", "-i", help="Rendering intent: " + ", ".join(INTENT_CHOICES) + ".")]
BpcOption = Annotated[bool, typer.Option("--bpc/--no-bpc", help="Black point compensation for the separation.")]
PaperOption = Annotated[bool, typer.Option("--paper", help="Show and measure the print on its paper white (absolute view).")]
OutOption = Annotated[Optional[Path], typer.Option("--out", "-o", help="Output folder (default: beside the image, named after it).")]
JsonOption = Annotated[bool, typer.Option("--json", help="Print the JSON report to standard output instead of the summary.")]
ShiftOption = Annotated[float, typer.Option("--shift-threshold", help="ΔE00 above which a colour shifts.")]
DistinctOption = Annotated[float, typer.Option("--distinct-threshold", help="Screen ΔE00 from which two colours count as distinct.")]
MergeOption = Annotated[float, typer.Option("--merge-threshold", help="Print ΔE00 under which distinct colours merge.")]
LossOption = Annotated[float, typer.Option("--loss-ratio", help="Share of screen ΔE00 under which a pair loses separation.")]
GamutOption = Annotated[float, typer.Option("--gamut-tolerance", help="Round-trip ΔE00 beyond which a colour is out of gamut.")]
GrayProfileOption = Annotated[str, typer.Option("--gray-profile", help="Grayscale output profile for the black-and-white check.")]
GrayThresholdOption = Annotated[
    float, typer.Option("--gray-threshold", help="Gray L* difference under which distinct colours merge in black and white.")
]
SeverityOption = Annotated[
    float, typer.Option("--severity", help="Severity 0..1 of the simulated colour-vision deficiencies (1 = dichromacy).")
]
MaxPixelsOption = Annotated[Optional[int], typer.Option("--max-pixels", help="Refuse images with more pixels than this.")]


def check_intent(intent: str) -> None:
    """Refuse an unknown rendering intent name before any work is done (the library's own rule)."""
    parse_intent(intent)


def check_gamut(gamut: float) -> None:
    """Refuse a round-trip tolerance that is not a positive ΔE00."""
    if not gamut > 0:
        raise InputError(f"--gamut-tolerance must be a positive ΔE00, got {gamut}")


def threshold_options(shift: float, distinct: float, merge: float, loss: float, gamut: float) -> Thresholds:
    """Return the verdict thresholds from the command line, refusing impossible ones."""
    for name, value in (("--shift-threshold", shift), ("--distinct-threshold", distinct), ("--merge-threshold", merge)):
        if not value > 0:
            raise InputError(f"{name} must be a positive ΔE00, got {value}")
    check_gamut(gamut)
    if not 0 < loss < 1:
        raise InputError(f"--loss-ratio must lie between 0 and 1, got {loss}")
    return Thresholds(shift=shift, distinct=distinct, merge=merge, separation_loss=loss, out_of_gamut=gamut)


def check_readability_options(gray_threshold: float, severity: float) -> None:
    """Refuse impossible values of the black-and-white and colour-vision options."""
    if not gray_threshold > 0:
        raise InputError(f"--gray-threshold must be a positive L* difference, got {gray_threshold}")
    if not 0.0 < severity <= 1.0:
        raise InputError(f"--severity must lie in (0, 1], got {severity}")
