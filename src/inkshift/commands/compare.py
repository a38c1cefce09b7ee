"""``inkshift compare``: one chart proofed against two or more output profiles."""

from __future__ import annotations

import json
from pathlib import Path
from typing import List, Optional

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
    SeverityOption,
    ShiftOption,
    check_intent,
    check_readability_options,
    threshold_options,
)
from inkshift.readability import GRAY_MERGE_DELTA_L, GRAY_PROFILE
from inkshift.thresholds import (
    DISTINCT_DELTA_E,
    MERGE_DELTA_E,
    OUT_OF_GAMUT_DELTA_E,
    SEPARATION_LOSS_RATIO,
    SHIFT_DELTA_E,
)


@app.command("compare")
def compare_command(
    image: ImageArgument,
    profiles: List[str] = typer.Option(..., "--profile", "-p", help="Output profile (give two or more): shipped short name or ICC file."),
    intent: IntentOption = "relative",
    bpc: BpcOption = True,
    paper: bool = typer.Option(False, "--paper", help="Measure each print on its paper white (absolute view)."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="Output folder (default: beside the image, named after it + _compare)."),
    as_json: JsonOption = False,
    fail_on_merge: bool = typer.Option(False, "--fail-on-merge", help="Exit 1 if chart colours merge on the best profile."),
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
    """Proof a chart on several output profiles and say which keeps it best."""
    from inkshift.compare import compare, default_compare_dir, write_compare_outputs
    from inkshift.report.console import format_compare

    check_intent(intent)
    thresholds = threshold_options(shift, distinct, merge, loss, gamut)
    check_readability_options(gray_threshold, severity)
    report = compare(
        image, profiles, intent, bpc=bpc, paper=paper, thresholds=thresholds, max_pixels=max_pixels,
        gray_profile=gray_profile, gray_delta_l=gray_threshold, vision_severity=severity,
    )
    write_compare_outputs(report, out if out is not None else default_compare_dir(image))
    typer.echo(json.dumps(report.to_dict(), indent=2) if as_json else format_compare(report))
    best = next(p for p in report.profiles if p.name == report.best)
    if fail_on_merge and best.merge_count:
        typer.echo(f"inkshift: gate tripped: {best.merge_count} pair(s) of chart colours merge even on '{best.name}'", err=True)
        raise typer.Exit(1)
