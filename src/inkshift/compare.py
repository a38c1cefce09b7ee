"""Compare how two or more output profiles print the same chart.

Each profile gets an ordinary :func:`inkshift.check.check` run, so every
figure here equals the figure a separate ``check`` would report. On top of
that the comparison measures where the prints differ from each other
(CIEDE2000 between the printed colours, per pixel), the gamut volume and
source-space coverage of each profile (:mod:`inkshift.printing.gamut`), and
names the profile that keeps the chart best, with its reasons.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from functools import partial
from itertools import combinations
from pathlib import Path
from typing import Any, Sequence

import numpy as np
from numpy.typing import NDArray
from PIL import Image

from inkshift.cautions import cautions_for
from inkshift.chart.load import load_chart
from inkshift.chart.unique import IndexedImage, pixel_runs
from inkshift.chunks import for_each_chunk
from inkshift.check import assumed_srgb, check, shipped_in_use, weighted_mean, weighted_percentile
from inkshift.color.difference import delta_e_2000
from inkshift.errors import InputError
from inkshift.files import output_folder
from inkshift.icc.cms import srgb_profile_bytes
from inkshift.icc.intent import Intent, parse_intent
from inkshift.printing.gamut import gamut_coverage, gamut_volume
from inkshift.readability import GRAY_MERGE_DELTA_L, GRAY_PROFILE
from inkshift.shipped import resolve_profile
from inkshift.report.model import CheckReport, ImageInfo, hex_rgb
from inkshift.thresholds import Thresholds

__all__ = ["COMPARE_SCHEMA", "ProfileOutcome", "CompareReport", "compare", "write_compare_outputs", "default_compare_dir"]

COMPARE_SCHEMA = "inkshift.compare/1"
"""Name and version of the comparison report's JSON schema."""


def _palette_mean(report: CheckReport) -> float:
    """Share-weighted mean ΔE00 of the chart colours other than the background."""
    cols = [c for c in report.colors if not c.background] or report.colors
    w = np.array([c.share for c in cols])
    d = np.array([c.delta_e for c in cols])
    return float(np.dot(w, d) / w.sum()) if w.sum() > 0 else float(d.mean())


@dataclass
class ProfileOutcome:
    """One profile's results within a comparison."""

    name: str
    description: str
    shipped: bool
    delta_e_mean: float
    delta_e_p95: float
    delta_e_max: float
    out_of_gamut_share: float
    merge_count: int
    palette_delta_e_mean: float
    gamut_volume: float
    source_coverage: float
    check: CheckReport = field(repr=False)

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "name": self.name,
            "description": self.description,
            "delta_e_mean": round(self.delta_e_mean, 4),
            "delta_e_p95": round(self.delta_e_p95, 4),
            "delta_e_max": round(self.delta_e_max, 4),
            "out_of_gamut_share": round(self.out_of_gamut_share, 4),
            "merge_count": self.merge_count,
            "palette_delta_e_mean": round(self.palette_delta_e_mean, 3),
            "gamut_volume": round(self.gamut_volume),
            "source_coverage": round(self.source_coverage, 4),
        }


@dataclass
class PrintDifference:
    """How far two profiles' prints of the chart lie from each other."""

    a: str
    b: str
    delta_e_mean: float
    delta_e_p95: float
    delta_e_max: float
    values: NDArray[np.float64] = field(repr=False)  # per unique colour

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "a": self.a,
            "b": self.b,
            "delta_e_mean": round(self.delta_e_mean, 4),
            "delta_e_p95": round(self.delta_e_p95, 4),
            "delta_e_max": round(self.delta_e_max, 4),
        }


@dataclass
class CompareReport:
    """Everything one comparison found; :meth:`to_dict` is its report.json."""

    image: ImageInfo
    intent: str
    bpc: bool
    paper: bool
    profiles: list[ProfileOutcome]
    differences: list[PrintDifference]
    best: str
    verdict: str
    cautions: list[str]
    outputs: dict[str, str] = field(default_factory=dict)
    pixels_shape: tuple[int, int] = (0, 0)

    def to_dict(self) -> dict[str, Any]:
        """Return the report as plain JSON-ready data (schema :data:`COMPARE_SCHEMA`)."""
        first = self.profiles[0].check
        colors = []
        for k, c in enumerate(first.colors):
            colors.append({
                "hex": c.hex,
                "share": round(c.share, 5),
                "background": c.background,
                "delta_e": {p.name: round(p.check.colors[k].delta_e, 2) for p in self.profiles},
                "out_of_gamut": {p.name: p.check.colors[k].out_of_gamut for p in self.profiles},
                "print_hex": {p.name: p.check.colors[k].print_hex for p in self.profiles},
            })
        return {
            "schema": COMPARE_SCHEMA,
            "image": {**self.image.__dict__, "notes": list(self.image.notes)},
            "intent": self.intent,
            "bpc": self.bpc,
            "paper_view": self.paper,
            "profiles": [p.to_dict() for p in self.profiles],
            "colors": colors,
            "merges": {p.name: [m.to_dict() for m in p.check.merges] for p in self.profiles},
            "gray": first.gray.to_dict() if first.gray is not None else None,
            "vision": {p.name: p.check.vision.to_dict() for p in self.profiles if p.check.vision is not None},
            "differences": [d.to_dict() for d in self.differences],
            "best": self.best,
            "verdict": self.verdict,
            "outputs": dict(self.outputs),
            "cautions": list(self.cautions),
        }


RANK_DELTA_E_DECIMALS = 2
"""Decimals of the mean palette ΔE00 when ranking profiles: differences under
0.01 ΔE00, a hundredth of a just-noticeable difference, count as a tie (common
practice: 1 ΔE00 is about one JND)."""
RANK_SHARE_DECIMALS = 4
"""Decimals of the out-of-gamut share when ranking: 0.0001 of the image (0.01 %)
counts as a tie (chosen by this project: a few hundred pixels of a report figure)."""


def _rank_key(p: ProfileOutcome) -> tuple[int, float, float]:
    # Merges lose information outright, so they count first; then how far the
    # chart's own colours move; then how much of the image leaves the gamut.
    return (
        p.merge_count,
        round(p.palette_delta_e_mean, RANK_DELTA_E_DECIMALS),
        round(p.out_of_gamut_share, RANK_SHARE_DECIMALS),
    )


def _verdict(ranked: list[ProfileOutcome]) -> str:
    best, runner = ranked[0], ranked[1]
    reasons = []
    if best.merge_count != runner.merge_count:
        reasons.append(f"{best.merge_count} merging colour pair(s) against {runner.merge_count}")
    reasons.append(
        f"chart colours move by ΔE00 {best.palette_delta_e_mean:.1f} on average against {runner.palette_delta_e_mean:.1f}"
    )
    reasons.append(
        f"{100 * best.out_of_gamut_share:.1f} % of the image out of gamut against {100 * runner.out_of_gamut_share:.1f} %"
    )
    reasons.append(f"gamut volume {best.gamut_volume:,.0f} against {runner.gamut_volume:,.0f} cubic CIELAB units")
    if _rank_key(best) == _rank_key(runner):
        return f"'{best.name}' and '{runner.name}' keep this chart equally well: " + "; ".join(reasons) + "."
    return f"'{best.name}' keeps this chart best, ahead of '{runner.name}': " + "; ".join(reasons) + "."


def compare(
    image: str | Path | Image.Image | NDArray[Any],
    profiles: Sequence[str | Path],
    intent: Intent | str | int = Intent.RELATIVE,
    *,
    bpc: bool = True,
    paper: bool = False,
    thresholds: Thresholds = Thresholds(),
    max_pixels: int | None = None,
    gray_profile: str | Path | None = GRAY_PROFILE,
    gray_delta_l: float = GRAY_MERGE_DELTA_L,
    vision_severity: float | None = 1.0,
) -> CompareReport:
    """Proof one chart against two or more output profiles and rank them.

    Every per-profile figure comes from :func:`inkshift.check.check` with the
    same arguments, so it equals a separate check run exactly.
    """
    if len(profiles) < 2:
        raise InputError("compare needs at least two output profiles (--profile A --profile B)")
    intent = parse_intent(intent)
    resolved = [resolve_profile(spec).resolve() for spec in profiles]
    if len(set(resolved)) != len(resolved):
        raise InputError("the same output profile was given twice: " + ", ".join(str(p) for p in profiles))
    chart = load_chart(image, **({} if max_pixels is None else {"max_pixels": max_pixels}))
    outcomes: list[ProfileOutcome] = []
    screen_side: dict[bytes, Any] = {}  # unique colours and palette, computed once for all profiles
    for spec in profiles:
        rep = check(
            chart, spec, intent, bpc=bpc, paper=paper, thresholds=thresholds, keep_maps=False,
            gray_profile=gray_profile, gray_delta_l=gray_delta_l, vision_severity=vision_severity, reuse=screen_side,
            keep_print_lab=True,
        )
        outcomes.append(
            ProfileOutcome(
                name=rep.output_profile.name,
                description=rep.output_profile.description,
                shipped=rep.output_profile.shipped,
                delta_e_mean=rep.summary.delta_e_mean,
                delta_e_p95=rep.summary.delta_e_p95,
                delta_e_max=rep.summary.delta_e_max,
                out_of_gamut_share=rep.summary.out_of_gamut_share,
                merge_count=len(rep.merges),
                palette_delta_e_mean=_palette_mean(rep),
                gamut_volume=gamut_volume(rep.output),
                source_coverage=gamut_coverage(rep.output, rep.source_profile),
                check=rep,
            )
        )
    counts = outcomes[0].check.unique.counts
    differences = []
    for a, b in combinations(outcomes, 2):
        d = _print_difference(a.check.proof.print_lab, b.check.proof.print_lab)
        differences.append(
            PrintDifference(
                a.name, b.name, weighted_mean(d, counts), weighted_percentile(d, counts, 0.95), float(d.max()), d
            )
        )
    ranked = sorted(outcomes, key=_rank_key)
    first = outcomes[0].check
    return CompareReport(
        image=first.image,
        intent=intent.label,
        bpc=bpc,
        paper=paper,
        profiles=outcomes,
        differences=differences,
        best=ranked[0].name,
        verdict=_verdict(ranked),
        cautions=cautions_for(
            shipped_profile=shipped_in_use([o.check.output_profile for o in outcomes], first.gray),
            vision=vision_severity is not None,
            assumed_srgb=assumed_srgb(first.image.profile_assumed, first.image.color_space),
        ),
        pixels_shape=(first.image.height, first.image.width),
    )


def _print_difference(lab_a: NDArray[np.floating], lab_b: NDArray[np.floating]) -> NDArray[np.float64]:
    """ΔE00 between two prints of every unique colour, in chunks shared between threads
    (a photograph has millions of colours; ΔE00 makes a dozen temporaries per colour)."""
    out = np.empty(len(lab_a))

    def run(s: int) -> None:
        out[s : s + _DIFFERENCE_CHUNK] = delta_e_2000(lab_a[s : s + _DIFFERENCE_CHUNK], lab_b[s : s + _DIFFERENCE_CHUNK])

    for_each_chunk(run, len(out), _DIFFERENCE_CHUNK)
    return out


_DIFFERENCE_CHUNK = 1 << 16  # colours per step of the print-to-print difference


def default_compare_dir(image: str | Path) -> Path:
    """Return the default output folder of a comparison: beside the image."""
    path = Path(image)
    return path.with_name(path.stem + "_compare")


def write_compare_outputs(report: CompareReport, out_dir: str | Path) -> dict[str, Path]:
    """Write difference maps, the palette sheet and report.json atomically into ``out_dir``."""
    from inkshift.report.images import Swatch, scalar_bands, swatch_sheet, write_png_bands

    paths: dict[str, Path] = {}
    with output_folder(out_dir) as out:
        unique = report.profiles[0].check.unique
        runs = pixel_runs(unique.inverse)
        for diff in report.differences:
            key = f"difference_{diff.a}_vs_{diff.b}"
            safe = "".join(ch if ch.isalnum() or ch in "-_" else "_" for ch in key)
            # Painted once per colour and written band by band, as check's heat map.
            width, height, bands = scalar_bands(
                IndexedImage(diff.values, unique.inverse, report.pixels_shape, runs),
                title=f"Where the prints differ: {diff.a} vs {diff.b}",
                legend_label="ΔE00 between the two prints",
            )
            paths[key] = out.file(f"{safe}.png", partial(write_png_bands, width=width, height=height, bands=bands))
        rows = []
        first = report.profiles[0].check
        rows.append(("screen", [
            Swatch(screen_rgb=hex_rgb(c.hex), print_rgb=hex_rgb(c.hex), label=c.hex, delta_e=0.0, marks=())
            for c in first.colors
        ]))
        for p in report.profiles:
            rows.append((p.name, [
                Swatch(screen_rgb=hex_rgb(c.hex), print_rgb=hex_rgb(c.print_hex), label=c.hex, delta_e=c.delta_e,
                       marks=tuple(m for m, v in (("OUT", c.out_of_gamut), ("MERGE", "merges" in c.verdicts)) if v))
                for c in p.check.colors
            ]))
        paths["palettes"] = out.image("palettes.png", swatch_sheet(rows), icc_profile=srgb_profile_bytes())
        report.outputs = {k: str(v) for k, v in paths.items()} | {"report": str(out.path / "report.json")}
        paths["report"] = out.text("report.json", json.dumps(report.to_dict(), indent=2) + "\n")
    return paths


