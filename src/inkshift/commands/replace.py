"""``inkshift replace``: propose printable replacement colours for a chart's palette."""

from __future__ import annotations

import json
from pathlib import Path
from typing import List, Optional

import typer

from inkshift.cli import app
from inkshift.commands.check import INTENT_CHOICES
from inkshift.errors import InputError
from inkshift.readability import GRAY_PROFILE
from inkshift.shipped import DEFAULT_PROFILE


@app.command("replace")
def replace_command(
    image: Path = typer.Argument(..., help="Chart image: PNG, JPEG, TIFF, WebP, BMP or GIF."),
    profile: str = typer.Option(DEFAULT_PROFILE, "--profile", "-p", help="Output profile: a shipped short name or an ICC file."),
    intent: str = typer.Option("relative", "--intent", "-i", help="Rendering intent: " + ", ".join(INTENT_CHOICES) + "."),
    bpc: bool = typer.Option(True, "--bpc/--no-bpc", help="Black point compensation for the separation."),
    lock: Optional[List[str]] = typer.Option(None, "--lock", help="Keep this chart colour exactly (#rrggbb); repeat for more."),
    move_background: bool = typer.Option(False, "--move-background", help="Let the background colour change too."),
    gray_profile: str = typer.Option(GRAY_PROFILE, "--gray-profile", help="Grayscale profile for the black-and-white figure."),
    out: Optional[Path] = typer.Option(None, "--out", "-o", help="Output folder (default: beside the image, named after it)."),
    as_json: bool = typer.Option(False, "--json", help="Print replace.json to standard output instead of the summary."),
    max_pixels: Optional[int] = typer.Option(None, "--max-pixels", help="Refuse images with more pixels than this."),
) -> None:
    """Suggest printable colours for chart colours that shift, leave the gamut or merge."""
    from inkshift.check import default_out_dir
    from inkshift.replace import format_replace, replace_colors, write_replace_outputs

    if intent.lower() not in INTENT_CHOICES:
        raise InputError(f"unknown rendering intent '{intent}'; use one of: {', '.join(INTENT_CHOICES)}")
    result = replace_colors(
        image, profile, intent, bpc=bpc, max_pixels=max_pixels, locks=tuple(lock or ()),
        lock_background=not move_background, gray_profile=gray_profile,
    )
    write_replace_outputs(result, out if out is not None else default_out_dir(image))
    if as_json:
        typer.echo(json.dumps(result.to_dict(), indent=2, ensure_ascii=False))
    else:
        typer.echo(format_replace(result))
