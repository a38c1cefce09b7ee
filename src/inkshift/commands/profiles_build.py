"""``inkshift profiles list`` and ``inkshift profiles build``."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Optional

import typer

from inkshift.cli import profiles_app
from inkshift.printing.build import ShippedProfile, build_profile_file, shipped_profiles

__all__ = ["list_command", "build_command", "format_listing"]


@profiles_app.command("list")
def list_command(
    as_json: bool = typer.Option(False, "--json", help="Print the list as JSON."),
) -> None:
    """List the shipped profiles: short name, licence, description and where the numbers come from."""
    entries = shipped_profiles()
    if as_json:
        typer.echo(json.dumps([e.to_dict() for e in entries], indent=2, ensure_ascii=False))
    else:
        typer.echo(format_listing(entries))


@profiles_app.command("build")
def build_command(
    condition: Path = typer.Argument(..., help="A printing-condition description (.toml)."),
    output: Optional[Path] = typer.Option(
        None, "--output", "-o", help="Where to write the profile (default: the condition file with .icc)."
    ),
) -> None:
    """Build an ICC output profile from a printing-condition description."""
    target = output if output is not None else condition.with_suffix(".icc")
    written = build_profile_file(condition, target)
    typer.echo(f"wrote {written} ({written.stat().st_size} bytes)")


def format_listing(entries: list[ShippedProfile]) -> str:
    """Return the plain-text listing: one line per profile, its note's first sentence below."""
    if not entries:
        return "no shipped profiles found"
    width = max(len(e.name) for e in entries)
    lic = max(len(e.licence) for e in entries)
    lines = []
    for e in entries:
        lines.append(f"{e.name:<{width}}  {e.licence:<{lic}}  {e.description}")
        if e.note:
            lines.append(f"{'':<{width}}  {e.note}")
    lines.append("Approximations of published printing conditions, not certified characterisation profiles.")
    return "\n".join(lines)
