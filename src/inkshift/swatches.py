"""Brand or specified colours against one or more output profiles.

:func:`check_swatches` answers, for each colour of a list and each output
profile: does it print, how far does its print move from the screen colour,
what ink recipe does it get, and which screen colour prints as the nearest
colour the press can make.

How each colour is proofed
--------------------------
- Hex and ``rgb()`` colours are sRGB (CSS Color 4) and go through
  :func:`inkshift.proof.proof_colors` with the sRGB profile as source,
  exactly as the pixels of an untagged chart do in ``check``.
- ``lab()`` colours are proofed from CIELAB directly. Their separation is
  made the way ``check`` makes every separation, by LittleCMS, here from
  LittleCMS's built-in CIELAB D50 profile (Pillow mode ``LAB``) with the
  same intent and black point compensation. Pillow's LAB buffers are 8-bit,
  so the separation sees L* rounded to steps of 100/255 and a*, b* rounded
  to whole units (at most about 0.5 ΔE00 away); the screen colour, the print
  colour and the out-of-gamut test are computed from the exact input in
  float, with the same rule as ``proof_colors``.

Nearest printable colour
------------------------
The relative colorimetric round trip Lab -> B2A1 -> A2B1 through the
profile's float evaluator gives the printable colour nearest the input by
the profile's own gamut clipping (for the project's profiles, a minimum
ΔE00 clip). A printable colour should also come back from its own round
trip; where the profile's B2A table cannot reach the clipped colour (the
clip is not idempotent, as in dark, saturated corners of some CMYK
profiles) the round trip is repeated, up to PRINTABLE_ITERATIONS times, and
the first colour that returns within PRINTABLE_SELF_DELTA_E, and stays within
PRINTABLE_DRIFT_DELTA_E of the first clip, is taken (else the one that returns
best). The printable colour is reported as the sRGB hex whose *print* comes closest to
that colour: starting from the sRGB rendering of the printable colour, a
steepest-descent search over the 8-bit sRGB neighbourhood picks the hex
whose separated and re-measured print has the smallest ΔE00 to the
printable colour; that ΔE00 is reported with it, so a hex that cannot
quite reach it (a printable colour outside sRGB) says so.

With the absolute colorimetric intent the print is seen on its paper, so the
round trip and the search are made ICC-absolute too (the media white point
scales both sides); the out-of-gamut test stays relative colorimetric, the
rule ``check`` uses.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Sequence

import numpy as np
from numpy.typing import NDArray

from inkshift.cautions import cautions_for
from inkshift.chart.unique import unique_colors
from inkshift.check import open_output_profile, shipped_in_use
from inkshift.color.difference import delta_e_2000
from inkshift.colorlist import ColorSpec
from inkshift.errors import InputError
from inkshift.icc.cms import lab_profile, srgb_profile_bytes, transform_colors
from inkshift.icc.evaluate import codes_to_lab, device_to_lab, lab_to_device
from inkshift.icc.intent import Intent, parse_intent
from inkshift.icc.read import Profile
from inkshift.proof import (
    PILLOW_MODES,
    ColorProof,
    in_srgb,
    ink_recipes,
    lab_to_srgb8,
    print_side,
    print_view,
    proof_colors,
    srgb8_to_lab,
    srgb_profile,
)
from inkshift.report.console import closing_lines, format_table, intent_line
from inkshift.report.model import ProfileInfo, rgb_hex
from inkshift.shipped import DEFAULT_PROFILE
from inkshift.thresholds import OUT_OF_GAMUT_DELTA_E, SRGB_GAMUT_DELTA_E

__all__ = [
    "SWATCHES_SCHEMA",
    "SRGB_GAMUT_DELTA_E",
    "PRINTABLE_SELF_DELTA_E",
    "PRINTABLE_DRIFT_DELTA_E",
    "PRINTABLE_ITERATIONS",
    "NEAREST_SEARCH_RADIUS",
    "NEAREST_SEARCH_SCALES",
    "NEAREST_SEARCH_STEPS",
    "NEAREST_SCREEN_WEIGHT",
    "SwatchResult",
    "SwatchReport",
    "check_swatches",
    "nearest_printable",
    "printable_colors",
    "format_swatches",
]

SWATCHES_SCHEMA = "inkshift.swatches/1"
"""Name and version of the swatches report's JSON schema."""

PRINTABLE_SELF_DELTA_E = 1.0
"""A printable colour must come back from its own relative colorimetric round
trip within this ΔE00. Common practice: one just-noticeable difference
(CIE 142-2001 scales ΔE00 so that 1 is about a JND), the precision the shipped
profiles aim at for in-gamut colours (see OUT_OF_GAMUT_DELTA_E)."""

PRINTABLE_DRIFT_DELTA_E = 2.0
"""Repeated round trips may drift (in dark, saturated corners each pass can come
out lighter); a repeated result further than this ΔE00 from the first clip is
not taken. Common practice: twice the JND, the same margin as
OUT_OF_GAMUT_DELTA_E."""

PRINTABLE_ITERATIONS = 3
"""Most round trips tried to find a printable colour that returns within
PRINTABLE_SELF_DELTA_E. Measured on 4000 random sRGB colours when this was
written: the first clip returns within 1 ΔE00 for 98.8 % (coated), 99.6 %
(uncoated) and 94.5 % (newsprint); with three tries all but 22 (coated, dark
browns and olives) and 0 (the others) do, and more tries only drift."""

NEAREST_SEARCH_RADIUS = 2
"""Grid steps searched on each side of the current sRGB colour in one step of
the nearest-printable search (a 5 x 5 x 5 neighbourhood). Two steps reach past
the plateaus that the 8-bit quantisation of the separation leaves in the
print (common practice)."""

NEAREST_SEARCH_SCALES = (8, 4, 2, 1)
"""Grid spacings, in 8-bit sRGB codes, of the coarse-to-fine nearest-printable
search. The coarse passes cover the large moves black point compensation
gives dark colours (measured: about 40 codes for a near-black on a LUT CMYK
profile); the last pass works on single codes (common practice)."""

NEAREST_SCREEN_WEIGHT = 0.25
"""Weight of the hex's own screen ΔE00 to the printable colour in the cost of the
nearest-printable search (cost = print ΔE00 + weight x screen ΔE00). Many sRGB
colours outside the print gamut print alike; the small weight picks, among
those that print the target about equally well, the one that also looks like
it on screen, so the suggested hex means the same on screen and on paper
(common practice: a soft tie-break, the print term dominates)."""

NEAREST_SEARCH_STEPS = 8
"""Most steps at each spacing of the nearest-printable search (common practice;
the search normally settles in two or three)."""


@dataclass(frozen=True)
class SwatchResult:
    """One colour on one output profile.

    Attributes
    ----------
    name, input, kind
        The colour's name (or None), its text as written and ``"rgb"``/``"lab"``.
    hex
        The screen colour as sRGB hex (for a ``lab()`` input, its sRGB rendering).
    in_srgb
        False for a ``lab()`` input that sRGB cannot show (``hex`` is then clipped).
    profile
        The output profile's short name.
    screen_lab, print_lab
        CIELAB (D50) on screen and in print.
    in_gamut
        The relative colorimetric round trip reaches the colour within the
        out-of-gamut tolerance (the rule ``check`` uses).
    delta_e
        ΔE00 from the screen colour to its print.
    ink
        Percent of each ink (``c``, ``m``, ``y``, ``k`` for CMYK).
    coverage
        Total area coverage, percent (NaN for an RGB output).
    print_hex
        sRGB hex showing the print.
    nearest_printable_lab
        The printable colour nearest the screen colour (see the module notes).
    nearest_delta_e
        ΔE00 from the screen colour to that printable colour.
    nearest_printable_hex
        The sRGB hex whose print comes closest to the printable colour.
    nearest_print_delta_e
        ΔE00 between that hex's print and the printable colour.
    nearest_ink, nearest_coverage
        The separation of that hex.
    """

    name: str | None
    input: str
    kind: str
    hex: str
    in_srgb: bool
    profile: str
    screen_lab: tuple[float, float, float]
    print_lab: tuple[float, float, float]
    in_gamut: bool
    delta_e: float
    ink: dict[str, float]
    coverage: float
    print_hex: str
    nearest_printable_lab: tuple[float, float, float]
    nearest_delta_e: float
    nearest_printable_hex: str
    nearest_print_delta_e: float
    nearest_ink: dict[str, float]
    nearest_coverage: float

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form (ΔE00 and percentages to two decimals)."""
        return {
            "name": self.name,
            "input": self.input,
            "kind": self.kind,
            "hex": self.hex,
            "in_srgb": self.in_srgb,
            "profile": self.profile,
            "screen_lab": [round(v, 2) for v in self.screen_lab],
            "print_lab": [round(v, 2) for v in self.print_lab],
            "in_gamut": self.in_gamut,
            "delta_e": round(self.delta_e, 2),
            "ink": {k: round(v, 2) for k, v in self.ink.items()},
            "coverage": None if np.isnan(self.coverage) else round(self.coverage, 2),
            "print_hex": self.print_hex,
            "nearest_printable": {
                "lab": [round(v, 2) for v in self.nearest_printable_lab],
                "delta_e": round(self.nearest_delta_e, 2),
                "hex": self.nearest_printable_hex,
                "hex_print_delta_e": round(self.nearest_print_delta_e, 2),
                "ink": {k: round(v, 2) for k, v in self.nearest_ink.items()},
                "coverage": None if np.isnan(self.nearest_coverage) else round(self.nearest_coverage, 2),
            },
        }


@dataclass
class SwatchReport:
    """What :func:`check_swatches` returns; ``swatches`` run profile by profile."""

    intent: str
    bpc: bool
    out_of_gamut_delta_e: float
    profiles: list[ProfileInfo]
    swatches: list[SwatchResult]
    notes: list[str] = field(default_factory=list)
    cautions: list[str] = field(default_factory=list)
    schema: str = SWATCHES_SCHEMA

    def for_profile(self, name: str) -> list[SwatchResult]:
        """Return the results on the profile with short name ``name``, in list order."""
        return [s for s in self.swatches if s.profile == name]

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "schema": self.schema,
            "intent": self.intent,
            "bpc": self.bpc,
            "out_of_gamut_delta_e": self.out_of_gamut_delta_e,
            "profiles": [
                {"name": p.name, "description": p.description, "path": p.path,
                 "color_space": p.color_space, "shipped": p.shipped}
                for p in self.profiles
            ],
            "swatches": [s.to_dict() for s in self.swatches],
            "notes": list(self.notes),
            "cautions": list(self.cautions),
        }


def _lab_to_pillow8(lab: NDArray[np.float64]) -> NDArray[np.uint8]:
    """Pack CIELAB into Pillow's 8-bit LAB buffer (L* 0..255, a*/b* signed bytes)."""
    codes = np.empty(lab.shape, np.uint8)
    codes[..., 0] = np.clip(np.rint(lab[..., 0] * (255.0 / 100.0)), 0, 255).astype(np.uint8)
    codes[..., 1:] = np.clip(np.rint(lab[..., 1:]), -128, 127).astype(np.int8).view(np.uint8)
    return codes


def _roundtrip(output: Profile, lab: NDArray[np.float64], view: Intent = Intent.RELATIVE) -> NDArray[np.float64]:
    """Lab -> B2A1 -> A2B1 through ``output`` (float): the printable colour nearest ``lab``.

    With ``view`` ABSOLUTE the colours are ICC-absolute (on the paper) on both sides.
    """
    return device_to_lab(output, lab_to_device(output, lab, view), view)


def printable_colors(
    output: Profile, lab: NDArray[np.float64], view: Intent = Intent.RELATIVE
) -> NDArray[np.float64]:
    """Return the printable colour nearest each CIELAB colour on ``output``.

    The relative colorimetric round trip Lab -> B2A1 -> A2B1 (float evaluator),
    repeated up to :data:`PRINTABLE_ITERATIONS` times for colours whose clip
    does not itself come back within :data:`PRINTABLE_SELF_DELTA_E`. Each
    colour takes the first result that comes back within that tolerance and
    lies within :data:`PRINTABLE_DRIFT_DELTA_E` of the first clip (repeated
    round trips can drift), else, among those near the first clip, the one
    that comes back best.

    Parameters
    ----------
    output
        The output profile.
    lab
        ``(N, 3)`` CIELAB (D50).
    view
        RELATIVE (media-relative) or ABSOLUTE (on the paper) colorimetry.
    """
    lab = np.asarray(lab, dtype=np.float64).reshape(-1, 3)
    steps = [_roundtrip(output, lab, view)]
    for _ in range(PRINTABLE_ITERATIONS):
        steps.append(_roundtrip(output, steps[-1], view))
    tries = np.stack(steps[:-1])  # (iterations, N, 3)
    self_de = np.stack([delta_e_2000(a, b) for a, b in zip(steps[:-1], steps[1:])])
    # A repeated round trip may drift (each pass lighter, say); keep only tries
    # within PRINTABLE_DRIFT_DELTA_E of the first clip.
    near = delta_e_2000(tries, steps[0][None]) <= PRINTABLE_DRIFT_DELTA_E
    good = near & (self_de <= PRINTABLE_SELF_DELTA_E)
    pick = np.where(good.any(axis=0), good.argmax(axis=0), np.where(near, self_de, np.inf).argmin(axis=0))
    return tries[pick, np.arange(len(lab))]


def _proof_lab(
    lab: NDArray[np.float64], output: Profile, intent: Intent, bpc: bool, out_of_gamut_delta_e: float
) -> ColorProof:
    """Soft-proof CIELAB colours on ``output``: the ``proof_colors`` rule with a Lab source."""
    device = transform_colors(
        _lab_to_pillow8(lab), lab_profile(), output, "LAB", PILLOW_MODES[output.color_space], intent, bpc
    )
    print_lab, delta_e, reached, print_rgb = print_side(lab, device, output, print_view(intent))
    roundtrip = delta_e_2000(lab, reached)
    return ColorProof(
        screen_lab=lab,
        device=device,
        print_lab=print_lab,
        delta_e=delta_e,
        out_of_gamut=roundtrip > out_of_gamut_delta_e,
        roundtrip_delta_e=roundtrip,
        print_rgb=print_rgb,
    )


def _print_of_srgb(
    rgb: NDArray[np.uint8], output: Profile, intent: Intent, bpc: bool
) -> tuple[NDArray[np.uint8], NDArray[np.float64]]:
    """Return (separation, print CIELAB) of 8-bit sRGB colours, as ``proof_colors`` makes them."""
    device = transform_colors(rgb, srgb_profile_bytes(), output, "RGB", PILLOW_MODES[output.color_space], intent, bpc)
    return device, codes_to_lab(output, device, print_view(intent))


def nearest_printable(
    printable_lab: NDArray[np.float64],
    output: Profile,
    intent: Intent | str | int = Intent.RELATIVE,
    bpc: bool = True,
) -> tuple[NDArray[np.uint8], NDArray[np.uint8], NDArray[np.float64]]:
    """Find the 8-bit sRGB colours whose prints come closest to printable colours.

    A coarse-to-fine steepest-descent search on the 8-bit sRGB grid,
    vectorised over all colours. It starts from the sRGB rendering of each
    target; at each grid spacing s of :data:`NEAREST_SEARCH_SCALES` it
    repeatedly separates the (2 r + 1)³ neighbours at spacing s
    (r = :data:`NEAREST_SEARCH_RADIUS`) with LittleCMS, measures their prints
    with the float evaluator and moves to the one whose print has the
    smallest CIEDE2000 to the target, until no neighbour is better or
    :data:`NEAREST_SEARCH_STEPS` steps are done.

    Parameters
    ----------
    printable_lab
        ``(N, 3)`` CIELAB (D50) targets, normally printable colours.
    output
        The output profile.
    intent, bpc
        Separation settings, as in the proof.

    Returns
    -------
    rgb : (N, 3) uint8
        The chosen sRGB colours.
    device : (N, channels) uint8
        Their separations.
    delta_e : (N,) float64
        ΔE00 between each chosen colour's print and its target.
    """
    intent = parse_intent(intent)
    target = np.asarray(printable_lab, dtype=np.float64).reshape(-1, 3)
    r = NEAREST_SEARCH_RADIUS
    axis = np.arange(-r, r + 1)
    window = np.stack(np.meshgrid(axis, axis, axis, indexing="ij"), axis=-1).reshape(-1, 3)
    n = len(target)
    center = lab_to_srgb8(target).astype(np.int64)
    best_device, best_lab = _print_of_srgb(center.astype(np.uint8), output, intent, bpc)
    best_device = np.array(best_device)  # LittleCMS output arrays are read-only views
    best_de = delta_e_2000(best_lab, target).reshape(n)
    best_cost = best_de + NEAREST_SCREEN_WEIGHT * delta_e_2000(srgb8_to_lab(center), target).reshape(n)
    for scale in NEAREST_SEARCH_SCALES:
        active = np.ones(n, bool)
        for _ in range(NEAREST_SEARCH_STEPS):
            idx = np.flatnonzero(active)
            if idx.size == 0:
                break
            cand = np.clip(center[idx, None, :] + scale * window[None], 0, 255)  # (n, K, 3)
            uniq = unique_colors(cand.astype(np.uint8).reshape(1, -1, 3))  # neighbourhoods overlap
            rgb = uniq.colors
            device, lab = _print_of_srgb(rgb, output, intent, bpc)
            inverse = uniq.inverse.reshape(cand.shape[:2])
            de = delta_e_2000(lab[inverse], target[idx, None, :])
            cost = de + NEAREST_SCREEN_WEIGHT * delta_e_2000(srgb8_to_lab(rgb)[inverse], target[idx, None, :])
            pick = np.argmin(cost, axis=1)
            rows = np.arange(idx.size)
            better = cost[rows, pick] < best_cost[idx]
            moved = idx[better]
            center[moved] = cand[better, pick[better]]
            best_cost[moved] = cost[rows, pick][better]
            best_de[moved] = de[rows, pick][better]
            best_device[moved] = device[inverse[better, pick[better]]]
            active[idx[~better]] = False
    return center.astype(np.uint8), best_device, best_de


def _coverage(ink: dict[str, float], space: str) -> float:
    """Total area coverage in percent; NaN for an RGB output (no inks)."""
    return sum(ink.values()) if space != "RGB" else float("nan")


def _t3(v: NDArray[np.float64]) -> tuple[float, float, float]:
    return float(v[0]), float(v[1]), float(v[2])


def check_swatches(
    colors: Sequence[ColorSpec],
    profiles: Sequence[str | Path] = (DEFAULT_PROFILE,),
    intent: Intent | str | int = Intent.RELATIVE,
    bpc: bool = True,
    *,
    out_of_gamut_delta_e: float = OUT_OF_GAMUT_DELTA_E,
) -> SwatchReport:
    """Check a list of colours against one or more output profiles.

    Parameters
    ----------
    colors
        Colours from :func:`inkshift.colorlist.parse_color` or
        :func:`inkshift.colorlist.read_color_file`.
    profiles
        Shipped short names or ICC output profile paths.
    intent
        Rendering intent of the separation (default relative colorimetric).
    bpc
        Black point compensation for the separation (default on).
    out_of_gamut_delta_e
        Round-trip tolerance of the out-of-gamut test (ΔE00), as in ``check``.

    Returns
    -------
    SwatchReport
        One :class:`SwatchResult` per colour and profile, profile by profile.
    """
    if not colors:
        raise InputError("no colours given")
    if not profiles:
        raise InputError("no output profile given")
    if not out_of_gamut_delta_e > 0:
        raise InputError(f"the out-of-gamut tolerance must be a positive ΔE00, got {out_of_gamut_delta_e}")
    intent = parse_intent(intent)
    opened = []
    for spec in profiles:
        output, info = open_output_profile(spec)
        if all(info.name != seen.name for _, seen in opened):  # the same profile twice is checked once
            opened.append((output, info))

    is_rgb = np.array([c.kind == "rgb" for c in colors])
    rgb_in = np.array([c.rgb for c in colors if c.kind == "rgb"], np.uint8).reshape(-1, 3)
    lab_in = np.array([c.lab for c in colors if c.kind == "lab"], np.float64).reshape(-1, 3)
    screen_rgb = np.empty((len(colors), 3), np.uint8)
    screen_rgb[is_rgb] = rgb_in
    inside_srgb = np.ones(len(colors), bool)
    if lab_in.size:
        screen_rgb[~is_rgb] = lab_to_srgb8(lab_in)
        inside_srgb[~is_rgb] = in_srgb(lab_in)

    results: list[SwatchResult] = []
    for output, info in opened:
        n_ch = output.channels
        screen_lab = np.empty((len(colors), 3))
        print_lab = np.empty((len(colors), 3))
        device = np.empty((len(colors), n_ch), np.uint8)
        delta_e = np.empty(len(colors))
        out_of_gamut = np.empty(len(colors), bool)
        print_rgb = np.empty((len(colors), 3), np.uint8)
        for mask, proof in (
            (is_rgb, proof_colors(rgb_in, srgb_profile(), output, intent, bpc, False, out_of_gamut_delta_e)
             if rgb_in.size else None),
            (~is_rgb, _proof_lab(lab_in, output, intent, bpc, out_of_gamut_delta_e) if lab_in.size else None),
        ):
            if proof is None:
                continue
            screen_lab[mask] = proof.screen_lab
            print_lab[mask] = proof.print_lab
            device[mask] = proof.device
            delta_e[mask] = proof.delta_e
            out_of_gamut[mask] = proof.out_of_gamut
            print_rgb[mask] = proof.print_rgb

        printable = printable_colors(output, screen_lab, print_view(intent))
        printable_de = delta_e_2000(screen_lab, printable)
        near_rgb, near_device, near_de = nearest_printable(printable, output, intent, bpc)
        inks, near_inks = ink_recipes(output, device), ink_recipes(output, near_device)
        for k, c in enumerate(colors):
            ink, near_ink = inks[k], near_inks[k]
            coverage, near_coverage = _coverage(ink, output.color_space), _coverage(near_ink, output.color_space)
            results.append(
                SwatchResult(
                    name=c.name,
                    input=c.text,
                    kind=c.kind,
                    hex=rgb_hex(screen_rgb[k]),
                    in_srgb=bool(inside_srgb[k]),
                    profile=info.name,
                    screen_lab=_t3(screen_lab[k]),
                    print_lab=_t3(print_lab[k]),
                    in_gamut=not bool(out_of_gamut[k]),
                    delta_e=float(delta_e[k]),
                    ink=ink,
                    coverage=coverage,
                    print_hex=rgb_hex(print_rgb[k]),
                    nearest_printable_lab=_t3(printable[k]),
                    nearest_delta_e=float(printable_de[k]),
                    nearest_printable_hex=rgb_hex(near_rgb[k]),
                    nearest_print_delta_e=float(near_de[k]),
                    nearest_ink=near_ink,
                    nearest_coverage=near_coverage,
                )
            )

    notes = ["Hex and rgb() colours are sRGB (CSS Color 4); lab() colours are CIELAB under D50."]
    if lab_in.size:
        notes.append(
            "lab() colours are separated by LittleCMS from 8-bit CIELAB (L* in steps of 0.39, "
            "a* and b* in whole units); their screen and print colours are computed exactly."
        )
        if not inside_srgb.all():
            notes.append("Some lab() colours lie outside sRGB: their screen hex is the nearest sRGB can show.")
    infos = [info for _, info in opened]
    return SwatchReport(
        intent=intent.label,
        bpc=bpc,
        out_of_gamut_delta_e=out_of_gamut_delta_e,
        profiles=infos,
        swatches=results,
        notes=notes,
        cautions=cautions_for(shipped_profile=shipped_in_use(infos), vision=False, assumed_srgb=False),
    )


def format_swatches(report: SwatchReport) -> str:
    """Return the console text of a swatches report: one table per profile, then notes and cautions."""
    lines = [
        intent_line(report.intent, report.bpc),
    ]
    for info in report.profiles:
        rows_in = report.for_profile(info.name)
        inks = list(rows_in[0].ink) if rows_in else []
        headers = ["colour", "screen", "in gamut", "ΔE00", *[k.upper() for k in inks], "total",
                   "nearest printable", "ΔE00 away"]
        rows = []
        for s in rows_in:
            label = s.name or s.input
            screen = s.hex if s.in_srgb else s.hex + "*"
            total = "" if math.isnan(s.coverage) else f"{s.coverage:.0f}%"
            rows.append([
                label, screen, "yes" if s.in_gamut else "no", f"{s.delta_e:.1f}",
                *[f"{v:.0f}" for v in s.ink.values()], total,
                s.nearest_printable_hex, f"{s.nearest_delta_e:.1f}",
            ])
        right = [False, False, False, True, *[True] * len(inks), True, False, True]
        lines.append("")
        lines.append(f"Printer:  {info.name}  ({info.description})")
        lines.extend("  " + ln for ln in format_table(headers, rows, right))
        if any(not s.in_srgb for s in rows_in):
            lines.append("  * outside sRGB: the screen hex is the nearest sRGB can show")
        worst = max((s.nearest_print_delta_e for s in rows_in), default=0.0)
        lines.append(
            f"  (ΔE00: screen to print; in gamut: round trip within {report.out_of_gamut_delta_e:g} ΔE00;"
        )
        lines.append(
            "   nearest printable: the hex that prints as the closest printable colour, and how far that"
        )
        lines.append(
            f"   colour is from the screen colour; these hexes print within {worst:.1f} ΔE00 of it)"
        )
    if report.notes:
        lines.append("")
        lines.extend(f"Note:     {n}" for n in report.notes)
    lines.extend(closing_lines({}, report.cautions))
    return "\n".join(lines)
