"""Does a chart palette still read in black and white, and for colour-blind readers?

Two checks of the pairs of palette colours that are clearly distinct on
screen (ΔE00 >= ``thresholds.distinct``):

:func:`gray_check`
    The palette printed on an office grayscale (black-only) printer: LittleCMS
    separates each colour to the one black channel, exactly as the printer
    driver would, and the project's float evaluator gives the L* of that
    print. As a second opinion, CIE L* of the screen colours alone, which is
    what any colour-to-gray conversion that keeps lightness would give. A pair
    whose gray lightness difference falls under :data:`GRAY_MERGE_DELTA_L`
    is listed, per rendition. Chart makers are routinely told that a figure
    must still read when printed or copied in black and white (common
    practice).
:func:`vision_check`
    The screen palette, and the printed palette, seen through the
    colour-vision deficiency model of Machado, Oliveira & Fernandes (2009),
    "A physiologically-based model for simulation of color vision
    deficiency", IEEE TVCG 15(6):1291-1298, for protanopia, deuteranopia and
    tritanopia. A pair distinct for normal vision on screen that comes
    closer than ``thresholds.merge`` under the deficiency is listed, on
    screen and in print (the merge rule of :func:`inkshift.check.pair_verdicts`).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Sequence

import numpy as np
from numpy.typing import NDArray

from inkshift.color.difference import delta_e_2000
from inkshift.color.vision import simulate_cvd_lab
from inkshift.errors import InputError, ProfileError
from inkshift.icc.intent import Intent, parse_intent
from inkshift.icc.read import Profile
from inkshift.proof import ink_percent, proof_colors
from inkshift.report.console import MAX_LISTED_PAIRS, format_pairs, more_line
from inkshift.report.model import PairVerdict
from inkshift.thresholds import Thresholds

__all__ = [
    "GRAY_PROFILE",
    "GRAY_MERGE_DELTA_L",
    "CHECKED_DEFICIENCIES",
    "GrayPair",
    "GrayResult",
    "VisionResult",
    "gray_check",
    "vision_check",
    "format_gray",
    "format_vision",
]

GRAY_PROFILE = "office_gray"
"""Shipped short name of the office grayscale printer profile used by default."""

GRAY_MERGE_DELTA_L = 10.0
"""CIE L* difference under which two palette colours 'merge' in black and white.
Common practice: gray levels of small chart marks (lines, dots, thin bars) need
roughly 10-15 L* between them to be told apart at a glance in a black-and-white
print or photocopy; 10 is the lenient end. From memory, not checked against a
published study; users can override it."""

CHECKED_DEFICIENCIES: tuple[str, ...] = ("protanopia", "deuteranopia", "tritanopia")
"""The deficiencies checked, named by their complete form (Machado et al. 2009
give all three; below severity 1 the matching '-omaly' form is simulated)."""

GRAY_RENDITIONS: dict[str, str] = {
    "gray_print": "gray print",
    "lightness": "L* alone",
}
"""JSON keys of the two gray renditions and their words on the console."""


@dataclass(frozen=True)
class GrayPair:
    """Two palette colours, distinct on screen, whose gray levels come too close."""

    a: str
    b: str
    screen_delta_e: float
    gray_delta_l: float

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "a": self.a,
            "b": self.b,
            "screen_delta_e": round(self.screen_delta_e, 2),
            "gray_delta_l": round(self.gray_delta_l, 2),
        }


@dataclass(frozen=True)
class GrayResult:
    """The palette in black and white.

    Attributes
    ----------
    labels
        One label per colour (normally its screen hex).
    screen_lightness
        CIE L* of each screen colour (the 'L* alone' rendition).
    gray_lightness
        L* of each colour printed on the gray profile (media-relative:
        bare paper is 100).
    gray_ink
        Black ink of that print, percent.
    gray_profile
        Name of the gray output profile.
    merges
        Per rendition (``"gray_print"``, ``"lightness"``), the pairs clearly
        distinct on screen whose ΔL* falls under ``min_delta_l``, closest first.
    distinct, min_delta_l
        The limits used (screen ΔE00, gray ΔL*).
    """

    labels: tuple[str, ...]
    screen_lightness: NDArray[np.float64]
    gray_lightness: NDArray[np.float64]
    gray_ink: NDArray[np.float64]
    gray_profile: str
    merges: dict[str, list[GrayPair]]
    distinct: float
    min_delta_l: float

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "gray_profile": self.gray_profile,
            "distinct_delta_e": self.distinct,
            "min_delta_l": self.min_delta_l,
            "colors": [
                {
                    "label": label,
                    "screen_l": round(float(s), 2),
                    "gray_print_l": round(float(g), 2),
                    "gray_ink": round(float(k), 1),
                }
                for label, s, g, k in zip(self.labels, self.screen_lightness, self.gray_lightness, self.gray_ink)
            ],
            "merges": {key: [p.to_dict() for p in pairs] for key, pairs in self.merges.items()},
        }


@dataclass(frozen=True)
class VisionResult:
    """The palette as readers with a dichromacy would see it.

    Attributes
    ----------
    labels
        One label per colour.
    severity
        Severity of the simulated deficiency, 0..1 (1 = dichromacy).
    screen_merges, print_merges
        Per deficiency simulated (keyed 'deuteranopia' ..., or 'deuteranomaly'
        ... when the severity is under 1), pairs distinct on screen for normal vision that
        merge under the deficiency, on screen and in print (``print_merges``
        is empty when no print colours were given).
    simulated_screen_lab, simulated_print_lab
        Per kind, the simulated CIELAB (D50) of each colour.
    """

    labels: tuple[str, ...]
    severity: float
    screen_merges: dict[str, list[PairVerdict]]
    print_merges: dict[str, list[PairVerdict]]
    simulated_screen_lab: dict[str, NDArray[np.float64]] = field(repr=False)
    simulated_print_lab: dict[str, NDArray[np.float64]] = field(repr=False)
    has_print: bool = True

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "model": "Machado, Oliveira & Fernandes 2009",
            "severity": self.severity,
            "kinds": {
                kind: {
                    "screen_merges": [p.to_dict() for p in self.screen_merges[kind]],
                    "print_merges": [p.to_dict() for p in self.print_merges[kind]] if self.has_print else None,
                }
                for kind in self.screen_merges
            },
        }


def gray_check(
    screen_colors: NDArray[np.uint8],
    source: Profile,
    labels: Sequence[str],
    *,
    gray_profile: str | Path | Profile = GRAY_PROFILE,
    intent: Intent | str | int = Intent.RELATIVE,
    bpc: bool = True,
    thresholds: Thresholds = Thresholds(),
    min_delta_l: float = GRAY_MERGE_DELTA_L,
) -> GrayResult:
    """Check which clearly distinct palette colours merge in black and white.

    Parameters
    ----------
    screen_colors
        ``(K, C)`` uint8 palette colours in ``source``'s colour space.
    source
        The profile of those colours (sRGB when the chart had none).
    labels
        One label per colour, used in the pair lists.
    gray_profile
        The grayscale output profile: shipped short name, path or Profile.
    intent, bpc
        Rendering intent and black point compensation of the gray separation.
    thresholds
        ``thresholds.distinct`` decides which screen pairs are clearly distinct.
    min_delta_l
        Gray ΔL* under which such a pair is listed (:data:`GRAY_MERGE_DELTA_L`).

    Returns
    -------
    GrayResult

    Notes
    -----
    The gray print is media-relative (bare paper is L* = 100): a reader
    compares the marks with the paper they are printed on. Lightness is
    compared as plain CIE L* differences (CIELAB, CIE 15:2018), not ΔE00,
    whose lightness weighting S_L shrinks differences away from L* = 50
    (CIE 142-2001).
    """
    from inkshift.check import open_output_profile  # check.py uses this module: import late

    intent = parse_intent(intent)
    colors = np.asarray(screen_colors, dtype=np.uint8)
    if colors.ndim == 1:
        colors = colors[:, None]
    labels = tuple(labels)
    if len(labels) != len(colors):
        raise InputError(f"{len(labels)} labels for {len(colors)} colours")
    gray, gray_info = open_output_profile(gray_profile)
    if gray.color_space != "GRAY":
        raise ProfileError(gray.source, f"is a {gray.color_space} profile; the black-and-white check needs a grayscale output profile")
    proof = proof_colors(colors, source, gray, intent, bpc, out_of_gamut_delta_e=thresholds.out_of_gamut)
    screen_l = proof.screen_lab[:, 0]
    gray_l = proof.print_lab[:, 0]
    ink = ink_percent(gray, proof.device)[:, 0]
    merges = {
        "gray_print": _lightness_pairs(labels, proof.screen_lab, gray_l, thresholds.distinct, min_delta_l),
        "lightness": _lightness_pairs(labels, proof.screen_lab, screen_l, thresholds.distinct, min_delta_l),
    }
    return GrayResult(
        labels=labels,
        screen_lightness=screen_l,
        gray_lightness=gray_l,
        gray_ink=ink,
        gray_profile=gray_info.name,
        merges=merges,
        distinct=thresholds.distinct,
        min_delta_l=min_delta_l,
    )


def _lightness_pairs(
    labels: tuple[str, ...],
    screen_lab: NDArray[np.float64],
    lightness: NDArray[np.float64],
    distinct: float,
    min_delta_l: float,
) -> list[GrayPair]:
    """Return the pairs with screen ΔE00 >= ``distinct`` and ΔL* < ``min_delta_l``."""
    if len(labels) < 2:
        return []
    i, j = np.triu_indices(len(labels), 1)
    screen = delta_e_2000(screen_lab[i], screen_lab[j])
    dl = np.abs(lightness[i] - lightness[j])
    hit = np.flatnonzero((screen >= distinct) & (dl < min_delta_l))
    hit = hit[np.argsort(dl[hit], kind="stable")]
    return [GrayPair(labels[i[k]], labels[j[k]], float(screen[k]), float(dl[k])) for k in hit]


def vision_check(
    labels: Sequence[str],
    screen_lab: NDArray[np.float64],
    print_lab: NDArray[np.float64] | None = None,
    *,
    severity: float = 1.0,
    thresholds: Thresholds = Thresholds(),
    kinds: Sequence[str] = CHECKED_DEFICIENCIES,
) -> VisionResult:
    """Check which clearly distinct palette colours merge for colour-blind readers.

    Parameters
    ----------
    labels
        One label per colour.
    screen_lab, print_lab
        ``(K, 3)`` CIELAB (D50) of the palette on screen and in print
        (``print_lab`` may be None to judge the screen only).
    severity
        Severity of the deficiency, 0..1; 1 simulates dichromacy.
    thresholds
        ``distinct`` (screen ΔE00 for normal vision) and ``merge`` (ΔE00
        under the deficiency) decide a merge, as in
        :func:`inkshift.check.pair_verdicts`.
    kinds
        Deficiencies to simulate (default: all of :data:`CHECKED_DEFICIENCIES`),
        named by their complete form; with ``severity`` under 1 the
        matching anomaly (protanomaly ...) is simulated.

    Returns
    -------
    VisionResult

    Notes
    -----
    Simulation after Machado, Oliveira & Fernandes (2009) through
    :func:`inkshift.color.vision.simulate_cvd_lab`. A pair counts as distinct
    by its normal-vision screen difference both times: the question is
    whether the difference the designer meant survives.
    """
    from inkshift.check import pair_verdicts  # check.py uses this module: import late

    labels = list(labels)
    screen_lab = np.asarray(screen_lab, dtype=np.float64)
    if len(labels) != len(screen_lab):
        raise InputError(f"{len(labels)} labels for {len(screen_lab)} colours")
    has_print = print_lab is not None
    sim_screen: dict[str, NDArray[np.float64]] = {}
    sim_print: dict[str, NDArray[np.float64]] = {}
    screen_merges: dict[str, list[PairVerdict]] = {}
    print_merges: dict[str, list[PairVerdict]] = {}
    for name in kinds:
        kind = name if severity == 1.0 else _anomaly(name)
        sim_screen[kind] = simulate_cvd_lab(screen_lab, kind, severity)
        screen_merges[kind] = _relabel(pair_verdicts(labels, screen_lab, sim_screen[kind], thresholds)[0], kind)
        if has_print:
            sim_print[kind] = simulate_cvd_lab(np.asarray(print_lab, dtype=np.float64), kind, severity)
            print_merges[kind] = _relabel(pair_verdicts(labels, screen_lab, sim_print[kind], thresholds)[0], kind)
        else:
            print_merges[kind] = []
    return VisionResult(
        labels=tuple(labels),
        severity=float(severity),
        screen_merges=screen_merges,
        print_merges=print_merges,
        simulated_screen_lab=sim_screen,
        simulated_print_lab=sim_print,
        has_print=has_print,
    )


def _anomaly(kind: str) -> str:
    """Return the '-omaly' name for a '-opia' one (the partial form of the same deficiency)."""
    return kind[:-4] + "omaly" if kind.endswith("opia") else kind


def _relabel(pairs: list[PairVerdict], kind: str) -> list[PairVerdict]:
    """Name the deficiency in each merge's kind (``"merge under deuteranopia"``)."""
    return [PairVerdict(p.a, p.b, p.screen_delta_e, p.print_delta_e, f"merge under {kind}") for p in pairs]


def format_gray(result: GrayResult) -> list[str]:
    """Return console lines listing the pairs that merge in black and white."""
    lines: list[str] = []
    for key, word in GRAY_RENDITIONS.items():
        pairs = result.merges[key]
        if not pairs:
            continue
        where = f"on {result.gray_profile}" if key == "gray_print" else "of the screen colours"
        lines.append(
            f"Merge in black and white, {word} {where} "
            f"(distinct on screen, ΔE00 >= {result.distinct:g}; under {result.min_delta_l:g} L* apart)"
        )
        lines.extend(
            f"  {p.a} and {p.b}: ΔE00 {p.screen_delta_e:.1f} on screen, {p.gray_delta_l:.1f} L* apart in gray"
            for p in pairs[:MAX_LISTED_PAIRS]
        )
        lines.extend(more_line(len(pairs)))
    if not lines:
        lines.append(f"No chart colours merge in black and white (gray print on {result.gray_profile}, or L* alone).")
    return lines


def format_vision(result: VisionResult, merge: float) -> list[str]:
    """Return console lines listing the pairs that merge under each deficiency."""
    lines: list[str] = []
    for kind in result.screen_merges:
        lines += format_pairs(
            f"Merge on screen for {kind} (under {merge:g} ΔE00 simulated)", result.screen_merges[kind],
            other=f"simulated {kind}",
        )
        if result.has_print:
            lines += format_pairs(
                f"Merge in print for {kind} (under {merge:g} ΔE00 simulated)", result.print_merges[kind],
                other=f"print, simulated {kind}",
            )
    if not lines:
        lines.append("No chart colours merge under simulated protanopia, deuteranopia or tritanopia.")
    return lines
