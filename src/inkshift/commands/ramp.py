"""``inkshift ramp``: does a colour scale keep its order and steps in print and in gray?"""

from __future__ import annotations

import json
from pathlib import Path
from typing import List, Optional

import typer

from inkshift.cli import app
from inkshift.commands.options import (
    BpcOption,
    GamutOption,
    GrayProfileOption,
    IntentOption,
    JsonOption,
    ProfileOption,
    check_gamut,
    check_intent,
)
from inkshift.errors import InputError
from inkshift.readability import GRAY_PROFILE
from inkshift.shipped import DEFAULT_PROFILE
from inkshift.thresholds import OUT_OF_GAMUT_DELTA_E


@app.command("ramp")
def ramp_command(
    colors: Optional[List[str]] = typer.Argument(
        None, help="The scale's colours in order: #rrggbb, rgb(...), lab(...), optionally name=colour."
    ),
    from_image: Optional[Path] = typer.Option(None, "--from-image", help="Read the scale from a legend image instead."),
    strip: Optional[str] = typer.Option(
        None, "--strip", help="With --from-image: x0,y0,x1,y1, two opposite corners of the colour strip "
        "(pixels); the scale runs from the first corner to the second along the longer side."
    ),
    steps: Optional[int] = typer.Option(None, "--steps", "-n", help="With --from-image: number of steps to sample (default 9)."),
    diverging: bool = typer.Option(False, "--diverging", help="The scale runs to a lightest (or darkest) middle and back."),
    profile: ProfileOption = DEFAULT_PROFILE,
    gray_profile: GrayProfileOption = GRAY_PROFILE,
    intent: IntentOption = "relative",
    bpc: BpcOption = True,
    as_json: JsonOption = False,
    step_threshold: Optional[float] = typer.Option(None, "--step-threshold", help="Least ΔE00 between adjacent steps (default 3)."),
    gray_step_threshold: Optional[float] = typer.Option(None, "--gray-step-threshold", help="Least L* between adjacent gray steps (default 3)."),
    reversal_tolerance: Optional[float] = typer.Option(None, "--reversal-tolerance", help="L* a step may turn back before it counts (default 1)."),
    gamut: GamutOption = OUT_OF_GAMUT_DELTA_E,
) -> None:
    """Check that a colour scale stays ordered in lightness and keeps its steps apart in print and in gray."""
    from inkshift.ramp import DEFAULT_STRIP_STEPS, RampLimits, check_ramp, check_ramp_image, format_ramp
    from inkshift.thresholds import Thresholds

    check_intent(intent)
    defaults = RampLimits()
    limits = RampLimits(
        step_delta_e=defaults.step_delta_e if step_threshold is None else step_threshold,
        gray_step_delta_l=defaults.gray_step_delta_l if gray_step_threshold is None else gray_step_threshold,
        reversal_delta_l=defaults.reversal_delta_l if reversal_tolerance is None else reversal_tolerance,
    )
    check_gamut(gamut)
    for name, value in (("--step-threshold", limits.step_delta_e), ("--gray-step-threshold", limits.gray_step_delta_l),
                        ("--reversal-tolerance", limits.reversal_delta_l)):
        if not value >= 0:
            raise InputError(f"{name} must be 0 or more, got {value}")
    thresholds = Thresholds(out_of_gamut=gamut)
    kind = "diverging" if diverging else "sequential"
    common = dict(kind=kind, intent=intent, bpc=bpc, gray_profile=gray_profile, thresholds=thresholds, limits=limits)

    if from_image is not None:
        if colors:
            raise InputError("give either colours or --from-image, not both")
        if strip is None:
            raise InputError("--from-image needs --strip x0,y0,x1,y1 (the corners of the colour strip)")
        report = check_ramp_image(
            from_image, strip, profile, steps=DEFAULT_STRIP_STEPS if steps is None else steps, **common
        )
    else:
        if strip is not None or steps is not None:
            raise InputError("--strip and --steps go with --from-image")
        if not colors:
            raise InputError("give the scale's colours in order, or --from-image with --strip")
        report = check_ramp(colors, profile, **common)
    typer.echo(json.dumps(report.to_dict(), indent=2, ensure_ascii=False) if as_json else format_ramp(report))
