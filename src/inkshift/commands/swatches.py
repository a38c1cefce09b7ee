"""``inkshift swatches``: brand or specified colours against one or more output profiles."""

from __future__ import annotations

import json
from pathlib import Path
from typing import List, Optional

import typer

from inkshift.cli import app
from inkshift.commands.options import (
    BpcOption,
    GamutOption,
    IntentOption,
    JsonOption,
    ProfilesOption,
    check_gamut,
    check_intent,
)
from inkshift.errors import InputError
from inkshift.shipped import DEFAULT_PROFILE
from inkshift.thresholds import OUT_OF_GAMUT_DELTA_E


@app.command("swatches")
def swatches_command(
    colors: Optional[List[str]] = typer.Argument(
        None, help="Colours: #rrggbb, #rgb, rgb(R, G, B), lab(L a b), each optionally as name=colour."
    ),
    file: Optional[List[Path]] = typer.Option(
        None, "--file", "-f", help="A colour list: .csv/.tsv with a header, or text with one colour per line. Repeatable."
    ),
    profile: ProfilesOption = None,
    intent: IntentOption = "relative",
    bpc: BpcOption = True,
    as_json: JsonOption = False,
    gamut: GamutOption = OUT_OF_GAMUT_DELTA_E,
) -> None:
    """Show whether each colour prints, how far it moves, its ink recipe and the nearest printable colour."""
    from inkshift.colorlist import parse_named_color, read_color_file
    from inkshift.swatches import check_swatches, format_swatches

    check_intent(intent)
    check_gamut(gamut)
    specs = [parse_named_color(c) for c in colors or []]
    for path in file or []:
        specs.extend(read_color_file(path))
    if not specs:
        raise InputError("no colours given; name them as arguments or give --file")
    report = check_swatches(specs, profile or [DEFAULT_PROFILE], intent, bpc, out_of_gamut_delta_e=gamut)
    typer.echo(json.dumps(report.to_dict(), indent=2, ensure_ascii=False) if as_json else format_swatches(report))

