"""``inkshift compare``: one chart proofed against two or more output profiles."""

from __future__ import annotations

import json
from pathlib import Path
from typing import List, Optional

import typer

from inkshift.cli import app
from inkshift.commands.check import INTENT_CHOICES, check_readability_options, threshold_options
from inkshift.errors import InputError
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
    image: Path = typer.Argument(..., help="Chart image: PNG, JPEG, TIFF, WebP, BMP or GIF."),
    profiles: List[str] = typer.Option(..., "--profile", "-p", help="Output profile (give two or more): shipped short name or ICC file."),
    intent: str = typer.Option("relative", "--intent", "-i", help="Rendering intent: " + ", ".join(INTENT_CHOICES) + "."),
    bpc: bool = typer.Option(True, "--bpc/--no-bpc", help="Black point compensation for the separation."),
    paper: bool = typer.Option(False, "--paper", help="Measure each print on its paper white (absolute view)."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="Output folder (default: beside the image, named after it + _compare)."),
    as_json: bool = typer.Option(False, "--json", help="Print report.json to standard output instead of the summary."),
    fail_on_merge: bool = typer.Option(False, "--fail-on-merge", help="Exit 1 if chart colours merge on the best profile."),
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
    """Proof a chart on several output profiles and say which keeps it best."""
    from inkshift.compare import compare, default_compare_dir, write_compare_outputs
    from inkshift.report.console import format_compare

    if intent.lower() not in INTENT_CHOICES:
        raise InputError(f"unknown rendering intent '{intent}'; use one of: {', '.join(INTENT_CHOICES)}")
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
