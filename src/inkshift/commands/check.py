"""``inkshift check``: soft-proof a chart image against an output profile."""

from __future__ import annotations

import json
from typing import Optional

import typer

from inkshift.cli import app
from inkshift.commands.options import (
    BpcOption,
    DistinctOption,
    GamutOption,
    GrayProfileOption,
    GrayThresholdOption,
    ImageArgument,
    IntentOption,
    JsonOption,
    LossOption,
    MaxPixelsOption,
    MergeOption,
    OutOption,
    PaperOption,
    ProfileOption,
    SeverityOption,
    ShiftOption,
    check_intent,
    check_readability_options,
    threshold_options,
)
from inkshift.errors import InputError
from inkshift.readability import GRAY_MERGE_DELTA_L, GRAY_PROFILE
from inkshift.shipped import DEFAULT_PROFILE
from inkshift.thresholds import (
    DISTINCT_DELTA_E,
    MERGE_DELTA_E,
    OUT_OF_GAMUT_DELTA_E,
    SEPARATION_LOSS_RATIO,
    SHIFT_DELTA_E,
)


@app.command("check")
def check_command(
    image: ImageArgument,
    profile: ProfileOption = DEFAULT_PROFILE,
    intent: IntentOption = "relative",
    bpc: BpcOption = True,
    paper: PaperOption = False,
    out: OutOption = None,
    as_json: JsonOption = False,
    fail_over: Optional[float] = typer.Option(None, "--fail-over", help="Exit 1 if any chart colour shifts by more than this ΔE00."),
    fail_on_merge: bool = typer.Option(False, "--fail-on-merge", help="Exit 1 if any chart colours merge in print."),
    shift: ShiftOption = SHIFT_DELTA_E,
    distinct: DistinctOption = DISTINCT_DELTA_E,
    merge: MergeOption = MERGE_DELTA_E,
    loss: LossOption = SEPARATION_LOSS_RATIO,
    gamut: GamutOption = OUT_OF_GAMUT_DELTA_E,
    gray_profile: GrayProfileOption = GRAY_PROFILE,
    gray_threshold: GrayThresholdOption = GRAY_MERGE_DELTA_L,
    severity: SeverityOption = 1.0,
    max_pixels: MaxPixelsOption = None,
) -> None:
    """Soft-proof a chart and list the colours that shift, leave the gamut or merge in print."""
    from inkshift.check import check, default_out_dir, write_check_outputs
    from inkshift.report.console import format_check

    check_intent(intent)
    thresholds = threshold_options(shift, distinct, merge, loss, gamut)
    check_readability_options(gray_threshold, severity)
    if fail_over is not None and not fail_over >= 0:
        raise InputError(f"--fail-over must be a ΔE00 of 0 or more, got {fail_over}")
    report = check(
        image, profile, intent, bpc=bpc, paper=paper, thresholds=thresholds, max_pixels=max_pixels,
        gray_profile=gray_profile, gray_delta_l=gray_threshold, vision_severity=severity,
    )
    write_check_outputs(report, out if out is not None else default_out_dir(image))
    typer.echo(json.dumps(report.to_dict(), indent=2) if as_json else format_check(report))
    tripped = []
    if fail_over is not None and any(c.delta_e > fail_over for c in report.colors):
        tripped.append(f"a chart colour shifts by more than ΔE00 {fail_over:g}")
    if fail_on_merge and report.merges:
        tripped.append(f"{len(report.merges)} pair(s) of chart colours merge in print")
    if tripped:
        typer.echo("inkshift: gate tripped: " + "; ".join(tripped), err=True)
        raise typer.Exit(1)
