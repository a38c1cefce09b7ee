"""``inkshift profiles show``: what an ICC profile is and which transforms it carries."""

from __future__ import annotations

import json
from typing import Any

import typer

from inkshift.cli import profiles_app
from inkshift.icc.read import read_profile
from inkshift.icc.summary import profile_summary
from inkshift.printing.gamut import gamut_summary
from inkshift.shipped import resolve_profile

__all__ = ["show_command", "format_summary"]


@profiles_app.command("show")
def show_command(
    profile: str = typer.Argument(..., help="An ICC file, or the short name of a shipped profile."),
    as_json: bool = typer.Option(False, "--json", help="Print the summary as JSON."),
) -> None:
    """Describe an ICC profile: class, colour spaces, white and black, transforms per intent, ink limit, gamut volume."""
    icc = read_profile(resolve_profile(profile))
    summary = profile_summary(icc)
    summary["gamut"] = gamut_summary(icc)
    typer.echo(json.dumps(summary, indent=2, ensure_ascii=False) if as_json else format_summary(summary))


def _transform_text(entry: dict[str, Any] | None) -> str:
    if entry is None:
        return "-"
    if entry["tag"] is None:
        return entry["type"]
    text = f"{entry['tag']} {entry['type']}"
    return text + " (fallback)" if entry["fallback"] else text


def _white_text(entry: dict[str, Any] | None) -> str:
    if entry is None:
        return "not given"
    x, y, z = entry["XYZ"]
    lab_l, lab_a, lab_b = entry["Lab"]
    return f"XYZ {x:.4f} {y:.4f} {z:.4f}   Lab {lab_l:.2f} {lab_a:.2f} {lab_b:.2f}"


def format_summary(summary: dict[str, Any]) -> str:
    """Return the plain-text form of :func:`inkshift.icc.summary.profile_summary`."""
    rows = [
        ("profile", summary["source"]),
        ("description", summary["description"] or "-"),
        ("copyright", summary["copyright"] or "-"),
        ("class", f"{summary['class_name']} ({summary['class']})"),
        ("colour space", f"{summary['color_space']} ({summary['channels']} channel{'s' if summary['channels'] != 1 else ''})"),
        ("PCS", summary["pcs"]),
        ("ICC version", summary["version"]),
        ("header intent", summary["header_intent"]),
        ("media white", _white_text(summary["media_white"])),
        ("media black", _white_text(summary["media_black"])),
        ("absolute white", _white_text(summary["absolute_white"]) + "  (scales the absolute intent)"),
    ]
    if "total_ink_limit" in summary:
        limit = summary["total_ink_limit"]
        if limit is None:
            rows.append(("total ink limit", "not found (no CMYK B2A table)"))
        else:
            per_tag = ", ".join(f"{tag} {value:.1f} %" for tag, value in summary["ink_limits"].items())
            rows.append(("total ink limit", f"{limit:.1f} % (max over the B2A tables: {per_tag})"))
    if summary.get("gamut_tag"):
        rows.append(("gamut tag", summary["gamut_tag"]))
    gamut = summary.get("gamut")
    if gamut:
        rows.append(("gamut volume", f"{gamut['gamut_volume']:,.0f} cubic CIELAB units (ICC-absolute)"))
        rows.append(("covers sRGB", f"{100 * gamut['srgb_coverage']:.1f} % of its volume"))
    width = max(len(label) for label, _ in rows) + 2
    lines = [f"{label:<{width}}{value}" for label, value in rows]

    lines.append("")
    header = ("intent", "device -> PCS", "PCS -> device")
    table = [header]
    for name, entry in summary["intents"].items():
        device_to_pcs = _transform_text(entry["device_to_pcs"])
        if entry["scaled_by_media_white"] and entry["device_to_pcs"] is not None:
            name = f"{name} (x media white)"
        table.append((name, device_to_pcs, _transform_text(entry["pcs_to_device"])))
    widths = [max(len(row[i]) for row in table) + 3 for i in range(2)]
    for row in table:
        lines.append(f"{row[0]:<{widths[0]}}{row[1]:<{widths[1]}}{row[2]}".rstrip())
    return "\n".join(lines)
