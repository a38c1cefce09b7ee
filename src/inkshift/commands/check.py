"""``inkshift check``: soft-proof a chart image against an output profile."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Optional

import typer

from inkshift.cli import app
from inkshift.errors import InputError
from inkshift.readability import GRAY_MERGE_DELTA_L, GRAY_PROFILE
from inkshift.shipped import DEFAULT_PROFILE
from inkshift.thresholds import (
    DISTINCT_DELTA_E,
    MERGE_DELTA_E,
    OUT_OF_GAMUT_DELTA_E,
    SEPARATION_LOSS_RATIO,
    SHIFT_DELTA_E,
    Thresholds,
)

INTENT_CHOICES = ("perceptual", "relative", "saturation", "absolute")


def threshold_options(shift: float, distinct: float, merge: float, loss: float, gamut: float) -> Thresholds:
    for name, value in (("--shift-threshold", shift), ("--distinct-threshold", distinct),
                        ("--merge-threshold", merge), ("--gamut-tolerance", gamut)):
        if not value > 0:
            raise InputError(f"{name} must be a positive ΔE00, got {value}")
    if not 0 < loss < 1:
        raise InputError(f"--loss-ratio must lie between 0 and 1, got {loss}")
    return Thresholds(shift=shift, distinct=distinct, merge=merge, separation_loss=loss, out_of_gamut=gamut)


def check_readability_options(gray_threshold: float, severity: float) -> None:
    """Refuse impossible values of the black-and-white and colour-vision options."""
    if not gray_threshold > 0:
        raise InputError(f"--gray-threshold must be a positive L* difference, got {gray_threshold}")
    if not 0.0 < severity <= 1.0:
        raise InputError(f"--severity must lie in (0, 1], got {severity}")


@app.command("check")
def check_command(
    image: Path = typer.Argument(..., help="Chart image: PNG, JPEG, TIFF, WebP, BMP or GIF."),
    profile: str = typer.Option(DEFAULT_PROFILE, "--profile", "-p", help="Output profile: a shipped short name or an ICC file."),
    intent: str = typer.Option("relative", "--intent", "-i", help="Rendering intent: " + ", ".join(INTENT_CHOICES) + "."),
    bpc: bool = typer.Option(True, "--bpc/--no-bpc", help="Black point compensation for the separation."),
    paper: bool = typer.Option(False, "--paper", help="Show and measure the print on its paper white (absolute view)."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="Output folder (default: beside the image, named after it)."),
    as_json: bool = typer.Option(False, "--json", help="Print report.json to standard output instead of the summary."),
    fail_over: Optional[float] = typer.Option(None, "--fail-over", help="Exit 1 if any chart colour shifts by more than this ΔE00."),
    fail_on_merge: bool = typer.Option(False, "--fail-on-merge", help="Exit 1 if any chart colours merge in print."),
    shift: float = typer.Option(SHIFT_DELTA_E, "--shift-threshold", help="ΔE00 above which a colour shifts."),
    distinct: float = typer.Option(DISTINCT_DELTA_E, "--distinct-threshold", help="Screen ΔE00 from which two colours count as distinct."),
    merge: float = typer.Option(MERGE_DELTA_E, "--merge-threshold", help="Print ΔE00 under which distinct colours merge."),
    loss: float = typer.Option(SEPARATION_LOSS_RATIO, "--loss-ratio", help="Share of screen ΔE00 under which a pair loses separation."),
    gamut: float = typer.Option(OUT_OF_GAMUT_DELTA_E, "--gamut-tolerance", help="Round-trip ΔE00 beyond which a colour is out of gamut."),
    gray_profile: str = typer.Option(GRAY_PROFILE, "--gray-profile", help="Grayscale output profile for the black-and-white check."),
    gray_threshold: float = typer.Option(GRAY_MERGE_DELTA_L, "--gray-threshold", help="Gray L* difference under which distinct colours merge in black and white."),
    severity: float = typer.Option(1.0, "--severity", help="Severity 0..1 of the simulated colour-vision deficiencies (1 = dichromacy)."),
    max_pixels: Optional[int] = typer.Option(None, "--max-pixels", help="Refuse images with more pixels than this."),
) -> None:
    """Soft-proof a chart and list the colours that shift, leave the gamut or merge in print."""
    from inkshift.check import check, default_out_dir, write_check_outputs
    from inkshift.report.console import format_check

    if intent.lower() not in INTENT_CHOICES:
        raise InputError(f"unknown rendering intent '{intent}'; use one of: {', '.join(INTENT_CHOICES)}")
    thresholds = threshold_options(shift, distinct, merge, loss, gamut)
    if fail_over is not None and not fail_over >= 0:
        raise InputError(f"--fail-over must be a ΔE00 of 0 or more, got {fail_over}")
    check_readability_options(gray_threshold, severity)
    report = check(
        image, profile, intent, bpc=bpc, paper=paper, thresholds=thresholds, max_pixels=max_pixels,
        gray_profile=gray_profile, gray_delta_l=gray_threshold, vision_severity=severity,
    )
    write_check_outputs(report, out if out is not None else default_out_dir(image))
    if as_json:
        typer.echo(json.dumps(report.to_dict(), indent=2))
    else:
        typer.echo(format_check(report))
    tripped = []
    if fail_over is not None and any(c.delta_e > fail_over for c in report.colors):
        tripped.append(f"a chart colour shifts by more than ΔE00 {fail_over:g}")
    if fail_on_merge and report.merges:
        tripped.append(f"{len(report.merges)} pair(s) of chart colours merge in print")
    if tripped:
        typer.echo("inkshift: gate tripped: " + "; ".join(tripped), err=True)
        raise typer.Exit(1)
