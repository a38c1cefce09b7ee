"""Plain-text console summaries of reports, readable without colour support."""

from __future__ import annotations

from typing import TYPE_CHECKING, Sequence

from inkshift.report.model import CheckReport, PairVerdict

if TYPE_CHECKING:
    from inkshift.compare import CompareReport

__all__ = ["format_check", "format_compare", "format_table", "format_pairs", "more_line", "intent_line", "closing_lines", "MAX_LISTED_PAIRS"]

INTENT_WORDS = {
    "perceptual": "perceptual",
    "relative": "relative colorimetric",
    "saturation": "saturation",
    "absolute": "ICC-absolute colorimetric",
}



def intent_line(intent: str, bpc: bool, extra: str = "") -> str:
    """The "Intent:" line every command prints: intent in words, black point compensation, ``extra``."""
    return f"Intent:   {INTENT_WORDS.get(intent, intent)}, black point compensation {'on' if bpc else 'off'}{extra}"


def closing_lines(outputs: dict[str, str], cautions: Sequence[str]) -> list[str]:
    """The end every command prints: the files written (if any), then the cautions."""
    lines: list[str] = []
    if outputs:
        width = max(len(k) for k in outputs)
        lines += ["", "Written:"] + [f"  {key:<{width}}  {path}" for key, path in outputs.items()]
    return lines + ["", "Cautions:"] + [f"  - {c}" for c in cautions]


def format_table(headers: Sequence[str], rows: Sequence[Sequence[str]], right: Sequence[bool] | None = None) -> list[str]:
    """Return the lines of a plain-text table with columns padded to their widest cell."""
    right = right or [False] * len(headers)
    widths = [max(len(h), *(len(r[i]) for r in rows)) if rows else len(h) for i, h in enumerate(headers)]

    def line(cells: Sequence[str]) -> str:
        parts = [c.rjust(w) if r else c.ljust(w) for c, w, r in zip(cells, widths, right)]
        return "  ".join(parts).rstrip()

    out = [line(headers), line(["-" * w for w in widths])]
    out.extend(line(r) for r in rows)
    return out


MAX_LISTED_PAIRS = 12
"""Pairs listed per section on the console; report.json always lists them all."""


def more_line(total: int) -> list[str]:
    """Return the line that stands for pairs left off a console list, if any."""
    hidden = total - MAX_LISTED_PAIRS
    return [f"  ... and {hidden} more (all are in report.json)"] if hidden > 0 else []


def format_pairs(title: str, pairs: Sequence[PairVerdict], other: str = "print") -> list[str]:
    """Return lines listing colour pairs and their ΔE00 on screen and in another rendition."""
    if not pairs:
        return []
    lines = [title]
    for p in pairs[:MAX_LISTED_PAIRS]:
        lines.append(
            f"  {p.a} and {p.b}: ΔE00 {p.screen_delta_e:.1f} on screen, {p.print_delta_e:.1f} in {other}"
        )
    return lines + more_line(len(pairs))


def format_check(report: CheckReport) -> str:
    """Return the console summary of a check: palette table, merges, outputs, cautions."""
    from inkshift.readability import format_gray, format_vision

    img = report.image
    prof = report.output_profile
    s = report.summary
    lines = [
        f"Chart:    {img.path or '(in memory)'}  {img.width} x {img.height} px, {img.color_space}, "
        f"source profile: {img.source_profile}",
        f"Printer:  {prof.name}  ({prof.description})",
        intent_line(report.intent, report.bpc, ", print shown on its paper" if report.paper else ""),
        "",
        f"Pixels:   ΔE00 mean {s.delta_e_mean:.2f}, 95th percentile {s.delta_e_p95:.2f}, "
        f"max {s.delta_e_max:.2f}; out of gamut: {100 * s.out_of_gamut_share:.1f} % of the image",
    ]
    for note in img.notes:
        lines.append(f"Note:     {note}")
    lines.append("")
    lines.append(f"Chart colours ({len(report.colors)} found)")
    ink_keys = list(report.colors[0].ink) if report.colors else []
    headers = ["screen", "share", "ΔE00", "prints as", *[k.upper() for k in ink_keys], "total", "verdict"]
    rows = []
    for c in report.colors:
        verdict = ", ".join(c.verdicts) or "ok"
        if c.background:
            verdict += " (background)"
        total = "" if c.coverage is None else f"{c.coverage:.0f}%"
        rows.append(
            [c.hex, f"{100 * c.share:.1f}%", f"{c.delta_e:.1f}", c.print_hex,
             *[f"{v:.0f}" for v in c.ink.values()], total, verdict]
        )
    right = [False, True, True, False, *[True] * len(ink_keys), True, False]
    lines.extend("  " + ln for ln in format_table(headers, rows, right))
    t = report.thresholds
    lines.append(
        f"  (shifts: ΔE00 > {t.shift:g}; out of gamut: round trip misses by > {t.out_of_gamut:g} ΔE00)"
    )
    pair_lines = format_pairs(
        f"Merge in print (distinct on screen, ΔE00 >= {t.distinct:g}; under {t.merge:g} in print)",
        report.merges,
    ) + format_pairs(
        f"Lose separation in print (keep under {100 * t.separation_loss:.0f} % of their screen ΔE00)",
        report.separation_losses,
    )
    if pair_lines:
        lines.append("")
        lines.extend(pair_lines)
    else:
        lines.append("")
        lines.append("No chart colours merge in print.")
    if report.gray is not None:
        lines.append("")
        lines.extend(format_gray(report.gray))
    if report.vision is not None:
        lines.append("")
        lines.extend(format_vision(report.vision, t.merge))
    lines.extend(closing_lines(report.outputs, report.cautions))
    return "\n".join(lines)


def format_compare(report: "CompareReport") -> str:
    """Return the console summary of a comparison: profile table, colours, verdict, cautions."""
    from inkshift.readability import format_gray

    img = report.image
    lines = [
        f"Chart:    {img.path or '(in memory)'}  {img.width} x {img.height} px, source profile: {img.source_profile}",
        intent_line(report.intent, report.bpc, ", prints measured on their paper" if report.paper else ""),
        "",
        "Printers",
    ]
    headers = ["profile", "ΔE00 mean", "p95", "chart ΔE00", "out of gamut", "merges", "gamut volume", "covers source"]
    rows = [
        [p.name, f"{p.delta_e_mean:.2f}", f"{p.delta_e_p95:.2f}", f"{p.palette_delta_e_mean:.2f}",
         f"{100 * p.out_of_gamut_share:.1f}%", str(p.merge_count), f"{p.gamut_volume:,.0f}",
         f"{100 * p.source_coverage:.0f}%"]
        for p in report.profiles
    ]
    lines.extend("  " + ln for ln in format_table(headers, rows, [False] + [True] * 7))
    lines.append("")
    lines.append("Chart colours, ΔE00 from screen (* out of gamut)")
    names = [p.name for p in report.profiles]
    rows = []
    for k, c in enumerate(report.profiles[0].check.colors):
        cells = [c.hex, f"{100 * c.share:.1f}%"]
        for p in report.profiles:
            pc = p.check.colors[k]
            cells.append(f"{pc.delta_e:.1f}{'*' if pc.out_of_gamut else ' '}")
        rows.append(cells)
    lines.extend("  " + ln for ln in format_table(["screen", "share", *names], rows, [False, True, *[True] * len(names)]))
    for p in report.profiles:
        pair_lines = format_pairs(f"Merge on {p.name}", p.check.merges)
        if pair_lines:
            lines.append("")
            lines.extend(pair_lines)
    first = report.profiles[0].check
    if first.gray is not None:
        lines.append("")
        lines.extend(format_gray(first.gray))
    for p in report.profiles:
        if p.check.vision is None:
            continue
        vision_lines = [
            ln for kind, pairs in p.check.vision.print_merges.items()
            for ln in format_pairs(f"Merge in print on {p.name} for {kind}", pairs, other=f"print, simulated {kind}")
        ]
        if vision_lines:
            lines.append("")
            lines.extend(vision_lines)
    if report.differences:
        lines.append("")
        lines.append("Where the prints differ from each other")
        for d in report.differences:
            lines.append(f"  {d.a} vs {d.b}: ΔE00 mean {d.delta_e_mean:.2f}, p95 {d.delta_e_p95:.2f}, max {d.delta_e_max:.2f}")
    lines.append("")
    lines.append("Verdict: " + report.verdict)
    lines.extend(closing_lines(report.outputs, report.cautions))
    return "\n".join(lines)
