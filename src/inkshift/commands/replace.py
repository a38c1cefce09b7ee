"""``inkshift replace``: propose printable replacement colours for a chart's palette."""

from __future__ import annotations

import json
from typing import List, Optional

import typer

from inkshift.cli import app
from inkshift.commands.options import (
    BpcOption,
    GrayProfileOption,
    ImageArgument,
    IntentOption,
    JsonOption,
    MaxPixelsOption,
    OutOption,
    ProfileOption,
    check_intent,
)
from inkshift.readability import GRAY_PROFILE
from inkshift.shipped import DEFAULT_PROFILE


@app.command("replace")
def replace_command(
    image: ImageArgument,
    profile: ProfileOption = DEFAULT_PROFILE,
    intent: IntentOption = "relative",
    bpc: BpcOption = True,
    lock: Optional[List[str]] = typer.Option(None, "--lock", help="Keep this chart colour exactly (#rrggbb); repeat for more."),
    move_background: bool = typer.Option(False, "--move-background", help="Let the background colour change too."),
    gray_profile: GrayProfileOption = GRAY_PROFILE,
    out: OutOption = None,
    as_json: JsonOption = False,
    max_pixels: MaxPixelsOption = None,
) -> None:
    """Suggest printable colours for chart colours that shift, leave the gamut or merge."""
    from inkshift.check import default_out_dir
    from inkshift.replace import format_replace, replace_colors, write_replace_outputs

    check_intent(intent)
    result = replace_colors(
        image, profile, intent, bpc=bpc, max_pixels=max_pixels, locks=tuple(lock or ()),
        lock_background=not move_background, gray_profile=gray_profile,
    )
    write_replace_outputs(result, out if out is not None else default_out_dir(image))
    if as_json:
        typer.echo(json.dumps(result.to_dict(), indent=2, ensure_ascii=False))
    else:
        typer.echo(format_replace(result))
