"""Does a colour scale keep its order and its steps in print and in black and white?

A sequential colour scale says 'more' by getting steadily darker (or
lighter); a diverging one by getting darker (or lighter) on both sides of a
middle. Readers decode order from lightness, so a scale whose lightness is
not monotonic misleads, and a hue sweep at full saturation (a 'rainbow')
fails that already on screen: Borland & Taylor (2007), "Rainbow color map
(still) considered harmful", IEEE Computer Graphics and Applications
27(2):14-17; Crameri, Shephard & Heron (2020), "The misuse of colour in
science communication", Nature Communications 11:5444. Print makes it
worse: dark steps crowd together near the press's black, saturated steps
are pulled into the gamut, and a grayscale printer keeps lightness only.

:func:`check_ramp` proofs every step of a scale on an output profile and on
the office grayscale profile and reports, by step index:

- reversals of L* against the scale's direction (sequential: the direction
  of its screen ends; diverging: towards the middle step of extreme L*, then
  away from it), on screen, in print and in the gray print;
- adjacent steps that come too close to tell apart: ΔE00 on screen and in
  print, ΔL* in the gray print.

The scale comes from a list of colours or from a strip of a legend image
(:func:`check_ramp_image`).
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any, Literal, Sequence

import numpy as np
from numpy.typing import NDArray
from PIL import Image

from inkshift.cautions import cautions_for
from inkshift.check import assumed_srgb, open_output_profile, shipped_in_use
from inkshift.chart.load import load_chart
from inkshift.color.difference import delta_e_2000
from inkshift.colorlist import ColorSpec, parse_named_color
from inkshift.errors import ImageError, InputError, ProfileError
from inkshift.icc.intent import Intent, parse_intent
from inkshift.icc.read import Profile
from inkshift.proof import ColorProof, in_srgb, ink_recipes, lab_to_srgb8, proof_colors, screen_srgb8, srgb8_to_lab, srgb_profile
from inkshift.readability import GRAY_PROFILE
from inkshift.report.console import closing_lines, format_table, intent_line
from inkshift.report.model import ProfileInfo, rgb_hex
from inkshift.shipped import DEFAULT_PROFILE
from inkshift.thresholds import Thresholds

__all__ = [
    "RAMP_SCHEMA",
    "RAMP_STEP_DELTA_E",
    "RAMP_GRAY_STEP_DELTA_L",
    "RAMP_REVERSAL_DELTA_L",
    "DEFAULT_STRIP_STEPS",
    "RAMP_KINDS",
    "RampLimits",
    "RampInput",
    "RampStep",
    "RampViolation",
    "RampReport",
    "ramp_input",
    "parse_strip",
    "sample_strip",
    "check_ramp",
    "check_ramp_image",
    "format_ramp",
]

RAMP_SCHEMA = "inkshift.ramp/1"
"""Name and version of the ramp report's JSON schema."""

RAMP_STEP_DELTA_E = 3.0
"""ΔE00 under which two adjacent steps of a scale are too close to tell apart.
Adjacent legend steps touch, so they are compared side by side, where about
1 ΔE00 is the just-noticeable difference for large patches (as
:mod:`inkshift.thresholds` notes, CIE 142-2001); common practice asks a few
times that for small map or chart areas read against the legend."""

RAMP_GRAY_STEP_DELTA_L = 3.0
"""ΔL* under which two adjacent steps are too close in the gray print.
Same reasoning as :data:`RAMP_STEP_DELTA_E` on the lightness axis alone
(CIEDE2000's lightness weighting is 1 at L* = 50, so 1 ΔL* is about one
patch JND there); common practice."""

RAMP_REVERSAL_DELTA_L = 1.0
"""L* a step may move against the scale's direction before it counts as a
reversal: about one just-noticeable lightness difference for side-by-side
patches (see :data:`RAMP_GRAY_STEP_DELTA_L`), which also absorbs the profile
tables' interpolation noise. Common practice."""

DEFAULT_STRIP_STEPS = 9
"""Steps sampled from a legend strip when none is given. Project choice: classed
legends of maps and charts mostly have 3 to 9 classes (common practice in
cartography, from memory); a continuous colour bar
should be sampled with --steps set to the classes the reader is meant to tell apart."""

RAMP_KINDS = ("sequential", "diverging")

RENDITIONS: dict[str, str] = {"screen": "on screen", "print": "in print", "gray": "in gray"}
"""The renditions a scale is judged in, and their words in messages."""

Kind = Literal["sequential", "diverging"]


@dataclass(frozen=True)
class RampLimits:
    """The limits a scale is judged by, defaulting to the constants above."""

    step_delta_e: float = RAMP_STEP_DELTA_E
    gray_step_delta_l: float = RAMP_GRAY_STEP_DELTA_L
    reversal_delta_l: float = RAMP_REVERSAL_DELTA_L


@dataclass(frozen=True)
class RampInput:
    """The steps of a scale as 8-bit colours in their own colour space.

    Attributes
    ----------
    colors
        ``(N, C)`` uint8 device values in ``source``'s colour space, in scale order.
    source
        The profile of those values (sRGB for colour lists).
    labels
        One label per step (the colour as written, or its name).
    origin
        Where the scale came from, in words.
    source_name
        The source profile's name for the report.
    assumed
        True when an image without an embedded profile was taken as sRGB.
    notes
        Plain sentences on anything changed on the way in.
    """

    colors: NDArray[np.uint8]
    source: Profile
    labels: tuple[str, ...]
    origin: str
    source_name: str = "sRGB IEC61966-2.1"
    assumed: bool = False
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class RampStep:
    """One step of the scale on screen, in print and in the gray print.

    The ``*_next`` figures compare this step with the following one (None on
    the last step); ``flags`` name the problems of that transition.
    """

    index: int
    label: str
    screen_hex: str
    print_hex: str
    gray_hex: str
    screen_lab: tuple[float, float, float]
    print_lab: tuple[float, float, float]
    gray_l: float
    ink: dict[str, float]
    delta_e: float
    out_of_gamut: bool
    screen_delta_e_next: float | None
    print_delta_e_next: float | None
    gray_delta_l_next: float | None
    flags: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        nxt = (self.screen_delta_e_next, self.print_delta_e_next, self.gray_delta_l_next)
        s, p, g = (None if v is None else round(v, 2) for v in nxt)
        return {
            "index": self.index,
            "label": self.label,
            "screen_hex": self.screen_hex,
            "print_hex": self.print_hex,
            "gray_hex": self.gray_hex,
            "screen_lab": [round(v, 2) for v in self.screen_lab],
            "print_lab": [round(v, 2) for v in self.print_lab],
            "gray_l": round(self.gray_l, 2),
            "ink": {k: round(v, 1) for k, v in self.ink.items()},
            "delta_e": round(self.delta_e, 2),
            "out_of_gamut": self.out_of_gamut,
            "next": {"screen_delta_e": s, "print_delta_e": p, "gray_delta_l": g},
            "flags": list(self.flags),
        }


@dataclass(frozen=True)
class RampViolation:
    """One problem of the scale between step ``step`` and step ``step + 1``.

    ``problem`` is ``"reversal"`` (``value`` is how far L* moved against the
    scale's direction), ``"too close"`` (``value`` is the ΔE00, or the ΔL*
    in gray) or ``"no middle"`` (a diverging scale whose extreme L* is at an
    end; ``step`` is that end).
    """

    rendition: str
    problem: str
    step: int
    value: float
    limit: float

    @property
    def message(self) -> str:
        """The problem in one sentence."""
        where = RENDITIONS[self.rendition]
        a, b = self.step, self.step + 1
        if self.problem == "reversal":
            return (f"steps {a}->{b}: L* turns back by {self.value:.1f} {where} "
                    f"(more than {self.limit:g} against the scale's direction)")
        if self.problem == "too close":
            unit = "L* apart" if self.rendition == "gray" else "ΔE00"
            return f"steps {a}->{b}: only {self.value:.1f} {unit} {where} (needs {self.limit:g})"
        return (f"step {a} is the extreme of L* {where} but lies at an end: "
                "not a diverging scale (judged as sequential)")

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "rendition": self.rendition,
            "problem": self.problem,
            "step": self.step,
            "value": round(self.value, 2),
            "limit": self.limit,
            "message": self.message,
        }


@dataclass
class RampReport:
    """Everything :func:`check_ramp` found; :meth:`to_dict` is the JSON report."""

    kind: str
    origin: str
    source_profile: str
    profile_assumed: bool
    output_profile: ProfileInfo
    gray_profile: ProfileInfo
    intent: str
    bpc: bool
    direction: str
    middle: int | None
    steps: list[RampStep]
    violations: list[RampViolation]
    limits: RampLimits
    thresholds: Thresholds
    cautions: list[str]
    notes: tuple[str, ...] = ()
    extra: dict[str, Any] = field(default_factory=dict)

    @property
    def fails_in(self) -> list[str]:
        """The renditions with at least one violation, in the order screen, print, gray."""
        seen = {v.rendition for v in self.violations}
        return [r for r in RENDITIONS if r in seen]

    @property
    def verdict(self) -> str:
        """``"pass"`` when no rendition has a violation, else ``"fail"``."""
        return "fail" if self.violations else "pass"

    def to_dict(self) -> dict[str, Any]:
        """Return the report as plain JSON-ready data (schema :data:`RAMP_SCHEMA`)."""
        data: dict[str, Any] = {
            "schema": RAMP_SCHEMA,
            "kind": self.kind,
            "input": {
                "origin": self.origin,
                "source_profile": self.source_profile,
                "profile_assumed": self.profile_assumed,
                "notes": list(self.notes),
            },
            "output_profile": asdict(self.output_profile),
            "gray_profile": asdict(self.gray_profile),
            "intent": self.intent,
            "bpc": self.bpc,
            "direction": self.direction,
            "middle": self.middle,
            "limits": asdict(self.limits),
            "thresholds": asdict(self.thresholds),
            "steps": [s.to_dict() for s in self.steps],
            "violations": [v.to_dict() for v in self.violations],
            "verdict": self.verdict,
            "fails_in": self.fails_in,
        }
        data.update(self.extra)
        data["cautions"] = list(self.cautions)
        return data


# ---------------------------------------------------------------- input


def ramp_input(colors: Sequence[str | ColorSpec] | NDArray[np.uint8], thresholds: Thresholds = Thresholds()) -> RampInput:
    """Return the scale given as colours: strings, ColorSpecs or an ``(N, 3)`` uint8 sRGB array.

    Strings are parsed by :func:`inkshift.colorlist.parse_named_color` (hex,
    ``rgb()``, ``lab()``, optionally ``name=colour``). A CIELAB colour is
    used as its nearest 8-bit sRGB value (a scale is meant for the screen);
    one that lies outside sRGB by more than ``thresholds.out_of_gamut``
    ΔE00 is noted.
    """
    if isinstance(colors, np.ndarray):
        arr = np.asarray(colors)
        if arr.ndim != 2 or arr.shape[1] != 3 or arr.dtype != np.uint8:
            raise InputError(f"a ramp array must be (N, 3) uint8 sRGB, got {arr.shape} {arr.dtype}")
        labels = tuple(rgb_hex(c) for c in arr)
        return RampInput(arr.copy(), srgb_profile(), labels, "colour list")
    specs = [c if isinstance(c, ColorSpec) else parse_named_color(str(c)) for c in colors]
    rgb = np.zeros((len(specs), 3), np.uint8)
    notes: list[str] = []
    lab_rows = [k for k, s in enumerate(specs) if s.kind == "lab"]
    for k, s in enumerate(specs):
        if s.kind == "rgb":
            rgb[k] = s.rgb
    if lab_rows:
        lab = np.array([specs[k].lab for k in lab_rows], dtype=np.float64)
        shown = lab_to_srgb8(lab)
        rgb[lab_rows] = shown
        miss = delta_e_2000(lab, srgb8_to_lab(shown))
        for k, m, c, inside in zip(lab_rows, miss, shown, in_srgb(lab)):
            if not inside:
                notes.append(
                    f"{specs[k].text} lies outside sRGB ({m:.1f} ΔE00 away); the nearest sRGB "
                    f"colour {rgb_hex(c)} is used."
                )
    return RampInput(rgb, srgb_profile(), tuple(s.label for s in specs), "colour list", notes=tuple(notes))


def parse_strip(text: str) -> tuple[int, int, int, int]:
    """Parse ``x0,y0,x1,y1`` (pixel coordinates of two opposite corners, inclusive)."""
    parts = [p.strip() for p in str(text).split(",")]
    if len(parts) != 4:
        raise InputError(f"strip '{text}': give four whole numbers x0,y0,x1,y1")
    try:
        values = tuple(int(p) for p in parts)
    except ValueError:
        raise InputError(f"strip '{text}': give four whole numbers x0,y0,x1,y1") from None
    if min(values) < 0:
        raise InputError(f"strip '{text}': coordinates cannot be negative")
    return values  # type: ignore[return-value]


def sample_strip(pixels: NDArray[np.uint8], box: tuple[int, int, int, int], steps: int, name: str = "image") -> NDArray[np.uint8]:
    """Sample ``steps`` colours along a strip of an image.

    Parameters
    ----------
    pixels
        ``(H, W, C)`` uint8 image.
    box
        ``(x0, y0, x1, y1)``: opposite corners of the strip, inclusive pixel
        coordinates. The scale runs along the strip's longer side, from the
        ``x0`` (or ``y0``) end to the ``x1`` (or ``y1``) end, so giving the
        corners the other way round reads the scale backwards.
    steps
        Number of samples: the centres of ``steps`` equal segments along the
        strip, each averaged across the strip's whole width (which removes
        JPEG noise and stays clear of the edges between legend classes).
    name
        The image's name for error messages.

    Returns
    -------
    ``(steps, C)`` uint8, the rounded mean of the 8-bit codes.
    """
    h, w = pixels.shape[:2]
    x0, y0, x1, y1 = box
    if max(x0, x1) >= w or max(y0, y1) >= h:
        raise ImageError(name, f"strip {x0},{y0},{x1},{y1} reaches outside the {w} x {h} pixel image")
    horizontal = abs(x1 - x0) >= abs(y1 - y0)
    a0, a1 = (x0, x1) if horizontal else (y0, y1)
    b_lo, b_hi = sorted((y0, y1) if horizontal else (x0, x1))
    length = abs(a1 - a0) + 1
    if steps < 2:
        raise InputError(f"--steps must be at least 2, got {steps}")
    if steps > length:
        raise InputError(f"{name}: the strip is {length} pixels long, too short for {steps} steps")
    offsets = ((np.arange(steps) + 0.5) * length / steps).astype(np.int64)
    along = a0 + offsets if a1 >= a0 else a0 - offsets
    if horizontal:
        band = pixels[b_lo:b_hi + 1, along, :].astype(np.float64)  # (width, steps, C)
    else:
        band = pixels[along, b_lo:b_hi + 1, :].astype(np.float64).transpose(1, 0, 2)
    return np.rint(band.mean(axis=0)).astype(np.uint8)


# ---------------------------------------------------------------- judging


def _expected_signs(lightness: NDArray[np.float64], kind: str) -> tuple[NDArray[np.float64], int | None, str, bool]:
    """Return the expected sign of each L* step, the middle step, the direction and whether a middle was found.

    Sequential: one direction, that of the screen ends (light to dark when
    they are equal). Diverging: towards the step of extreme L* and away from
    it; the extreme (lightest or darkest) is the one further from the mean of
    the two ends.
    """
    n = len(lightness)
    if kind == "sequential":
        sign = 1.0 if lightness[-1] > lightness[0] else -1.0
        return np.full(n - 1, sign), None, "dark to light" if sign > 0 else "light to dark", True
    ends = 0.5 * (lightness[0] + lightness[-1])
    light_middle = lightness.max() - ends >= ends - lightness.min()
    middle = int(np.argmax(lightness) if light_middle else np.argmin(lightness))
    towards = 1.0 if light_middle else -1.0
    signs = np.where(np.arange(n - 1) < middle, towards, -towards)
    words = "light middle" if light_middle else "dark middle"
    return signs, middle, words, 0 < middle < n - 1


def _violations(
    rendition: str,
    lightness: NDArray[np.float64],
    signs: NDArray[np.float64],
    closeness: NDArray[np.float64],
    close_limit: float,
    limits: RampLimits,
) -> list[RampViolation]:
    """Return the reversals and too-close steps of one rendition."""
    against = -signs * np.diff(lightness)
    out = [
        RampViolation(rendition, "reversal", int(k), float(against[k]), limits.reversal_delta_l)
        for k in np.flatnonzero(against > limits.reversal_delta_l)
    ]
    out += [
        RampViolation(rendition, "too close", int(k), float(closeness[k]), close_limit)
        for k in np.flatnonzero(closeness < close_limit)
    ]
    return out


_FLAG_WORDS = {"reversal": "reverses", "too close": "too close", "no middle": "no middle"}


def check_ramp(
    ramp: Sequence[str | ColorSpec] | NDArray[np.uint8] | RampInput,
    profile: str | Path | Profile = DEFAULT_PROFILE,
    *,
    kind: Kind = "sequential",
    intent: Intent | str | int = Intent.RELATIVE,
    bpc: bool = True,
    gray_profile: str | Path | Profile = GRAY_PROFILE,
    thresholds: Thresholds = Thresholds(),
    limits: RampLimits = RampLimits(),
) -> RampReport:
    """Judge whether a colour scale keeps its order and steps in print and in gray.

    Parameters
    ----------
    ramp
        The steps in order: colour strings or :class:`~inkshift.colorlist.ColorSpec`
        (see :func:`ramp_input`), an ``(N, 3)`` uint8 sRGB array, or a
        :class:`RampInput` (e.g. from a legend strip).
    profile
        The output profile: shipped short name, path or Profile.
    kind
        ``"sequential"`` (lightness runs one way) or ``"diverging"``
        (lightness runs to an extreme in the middle and back).
    intent, bpc
        Rendering intent and black point compensation of both separations.
    gray_profile
        The grayscale output profile for the black-and-white rendition.
    thresholds
        ``out_of_gamut`` flags steps outside the print gamut.
    limits
        Step and reversal limits (:class:`RampLimits`).

    Returns
    -------
    RampReport

    Notes
    -----
    Why lightness order matters: Borland & Taylor (2007), "Rainbow color map
    (still) considered harmful", IEEE CG&A 27(2):14-17, and Crameri, Shephard
    & Heron (2020), "The misuse of colour in science communication", Nature
    Communications 11:5444. The print and gray renditions are media-relative
    (bare paper is L* = 100), as a reader sees a print against its paper.
    """
    if kind not in RAMP_KINDS:
        raise InputError(f"unknown scale kind '{kind}'; use one of: {', '.join(RAMP_KINDS)}")
    intent = parse_intent(intent)
    inp = ramp if isinstance(ramp, RampInput) else ramp_input(ramp, thresholds)
    n = len(inp.colors)
    if n < 2:
        raise InputError(f"a scale needs at least 2 colours, got {n}")
    output, out_info = open_output_profile(profile)
    gray, gray_info = open_output_profile(gray_profile)
    if gray.color_space != "GRAY":
        raise ProfileError(gray.source, f"is a {gray.color_space} profile; the gray rendition needs a grayscale output profile")

    proof = proof_colors(inp.colors, inp.source, output, intent, bpc, out_of_gamut_delta_e=thresholds.out_of_gamut)
    gproof = proof_colors(inp.colors, inp.source, gray, intent, bpc, out_of_gamut_delta_e=thresholds.out_of_gamut)

    screen_l = proof.screen_lab[:, 0]
    print_l = proof.print_lab[:, 0]
    gray_l = gproof.print_lab[:, 0]
    signs, middle, direction, has_middle = _expected_signs(screen_l, kind)
    screen_next = delta_e_2000(proof.screen_lab[:-1], proof.screen_lab[1:])
    print_next = delta_e_2000(proof.print_lab[:-1], proof.print_lab[1:])
    gray_next = np.abs(np.diff(gray_l))

    violations: list[RampViolation] = []
    if kind == "diverging" and not has_middle:
        violations.append(RampViolation("screen", "no middle", int(middle or 0), float(screen_l[middle or 0]), 0.0))
    violations += _violations("screen", screen_l, signs, screen_next, limits.step_delta_e, limits)
    violations += _violations("print", print_l, signs, print_next, limits.step_delta_e, limits)
    violations += _violations("gray", gray_l, signs, gray_next, limits.gray_step_delta_l, limits)
    order = {r: i for i, r in enumerate(RENDITIONS)}
    violations.sort(key=lambda v: (v.step, order[v.rendition], v.problem))

    steps = _steps(inp, proof, gproof, output, screen_next, print_next, gray_next, violations)
    cautions = cautions_for(
        shipped_profile=shipped_in_use([out_info, gray_info]),
        vision=False,
        assumed_srgb=assumed_srgb(inp.assumed, inp.source.color_space),
    )
    notes = inp.notes
    if kind == "diverging":
        notes += ("In black and white a diverging scale keeps its steps but not which side of the "
                  "middle a value lies on; label the sides.",)
    return RampReport(
        kind=kind,
        origin=inp.origin,
        source_profile=inp.source_name,
        profile_assumed=inp.assumed,
        output_profile=out_info,
        gray_profile=gray_info,
        intent=intent.label,
        bpc=bpc,
        direction=direction,
        middle=middle,
        steps=steps,
        violations=violations,
        limits=limits,
        thresholds=thresholds,
        cautions=cautions,
        notes=notes,
    )


def _steps(
    inp: RampInput,
    proof: ColorProof,
    gproof: ColorProof,
    output: Profile,
    screen_next: NDArray[np.float64],
    print_next: NDArray[np.float64],
    gray_next: NDArray[np.float64],
    violations: list[RampViolation],
) -> list[RampStep]:
    n = len(inp.colors)
    screen_rgb = screen_srgb8(inp.colors, inp.source)
    inks = ink_recipes(output, proof.device)
    flags: list[list[str]] = [[] for _ in range(n)]
    for v in violations:
        flags[v.step].append(f"{_FLAG_WORDS[v.problem]} {RENDITIONS[v.rendition]}")
    out = []
    for k in range(n):
        last = k == n - 1
        own = ["out of gamut"] if proof.out_of_gamut[k] else []
        out.append(
            RampStep(
                index=k,
                label=inp.labels[k],
                screen_hex=rgb_hex(screen_rgb[k]),
                print_hex=rgb_hex(proof.print_rgb[k]),
                gray_hex=rgb_hex(gproof.print_rgb[k]),
                screen_lab=tuple(float(v) for v in proof.screen_lab[k]),  # type: ignore[arg-type]
                print_lab=tuple(float(v) for v in proof.print_lab[k]),  # type: ignore[arg-type]
                gray_l=float(gproof.print_lab[k, 0]),
                ink=inks[k],
                delta_e=float(proof.delta_e[k]),
                out_of_gamut=bool(proof.out_of_gamut[k]),
                screen_delta_e_next=None if last else float(screen_next[k]),
                print_delta_e_next=None if last else float(print_next[k]),
                gray_delta_l_next=None if last else float(gray_next[k]),
                flags=tuple(own + flags[k]),
            )
        )
    return out


def check_ramp_image(
    image: str | Path | Image.Image | NDArray[Any],
    strip: tuple[int, int, int, int] | str,
    profile: str | Path | Profile = DEFAULT_PROFILE,
    *,
    steps: int = DEFAULT_STRIP_STEPS,
    kind: Kind = "sequential",
    intent: Intent | str | int = Intent.RELATIVE,
    bpc: bool = True,
    gray_profile: str | Path | Profile = GRAY_PROFILE,
    thresholds: Thresholds = Thresholds(),
    limits: RampLimits = RampLimits(),
) -> RampReport:
    """Judge a colour scale sampled from a strip of a legend image.

    ``strip`` is ``(x0, y0, x1, y1)`` or its text form ``"x0,y0,x1,y1"``
    (see :func:`sample_strip`). The image's embedded profile is used; an
    image without one is taken as sRGB (and a CMYK one as being in the
    output profile's CMYK), as :func:`inkshift.check.check` does;
    transparent areas are composited onto white. Other parameters as for
    :func:`check_ramp`.
    """
    # The same source-profile and transparency rules as `check` (shared, not copied).
    from inkshift.check import composite_on_white, image_source

    box = parse_strip(strip) if isinstance(strip, str) else tuple(int(v) for v in strip)
    if len(box) != 4:
        raise InputError(f"strip {strip!r}: give four whole numbers x0,y0,x1,y1")
    chart = load_chart(image)
    output, _ = open_output_profile(profile)
    pixels, source, source_name, assumed, notes = image_source(chart, output)
    pixels, composite_notes = composite_on_white(pixels, chart.alpha, chart.space)
    name = chart.path or "image"
    colors = sample_strip(pixels, box, steps, name)  # type: ignore[arg-type]
    x0, y0, x1, y1 = box
    inp = RampInput(
        colors=colors,
        source=source,
        labels=tuple(f"step {k}" for k in range(steps)),
        origin=f"{name}, strip {x0},{y0} to {x1},{y1}, {steps} steps",
        source_name=source_name,
        assumed=assumed,
        notes=tuple(chart.notes) + tuple(notes) + tuple(composite_notes),
    )
    return check_ramp(
        inp, output, kind=kind, intent=intent, bpc=bpc, gray_profile=gray_profile,
        thresholds=thresholds, limits=limits,
    )


# ---------------------------------------------------------------- console


def format_ramp(report: RampReport) -> str:
    """Return the console summary: one table row per step, the problems, the verdict, cautions."""
    lim = report.limits
    lines = [
        f"Scale:    {report.kind}, {len(report.steps)} steps from {report.origin} "
        f"(source profile: {report.source_profile})",
        f"Printer:  {report.output_profile.name}  ({report.output_profile.description})",
        f"Gray:     {report.gray_profile.name}  ({report.gray_profile.description})",
        intent_line(report.intent, report.bpc),
        f"Runs:     {report.direction}" + (f", middle at step {report.middle}" if report.middle is not None else ""),
    ]
    lines += [f"Note:     {n}" for n in report.notes]
    lines.append("")
    headers = ["step", "screen", "print", "screen L*", "print L*", "gray L*", "ΔE00 next", "flags"]
    rows = []
    for s in report.steps:
        nxt = "" if s.print_delta_e_next is None else f"{s.print_delta_e_next:.1f}"
        rows.append([
            str(s.index), s.screen_hex, s.print_hex, f"{s.screen_lab[0]:.1f}", f"{s.print_lab[0]:.1f}",
            f"{s.gray_l:.1f}", nxt, ", ".join(s.flags),
        ])
    right = [True, False, False, True, True, True, True, False]
    lines.extend("  " + ln for ln in format_table(headers, rows, right))
    lines.append(
        f"  (ΔE00 next: printed step to the next one; steps need ΔE00 >= {lim.step_delta_e:g}, "
        f"gray steps >= {lim.gray_step_delta_l:g} L*; L* may turn back by at most {lim.reversal_delta_l:g})"
    )
    lines.append("")
    if report.violations:
        lines.append("Problems:")
        lines.extend(f"  {v.message}" for v in report.violations)
        lines.append("")
        words = [RENDITIONS[r] for r in report.fails_in]
        already = " (already before printing)" if "screen" in report.fails_in else ""
        lines.append(f"Verdict:  FAIL: the scale loses its order or its steps {', '.join(words)}{already}.")
    else:
        lines.append("Verdict:  pass: the scale keeps its order and distinguishable steps on screen, in print and in gray.")
    lines.extend(closing_lines({}, report.cautions))
    return "\n".join(lines)
