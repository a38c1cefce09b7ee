"""The report objects a check returns, and their JSON form.

The command line prints these objects; the Python API returns them. Arrays
needed to draw the pictures ride along in :class:`ProofMaps` and are left out
of the JSON.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field
from typing import Any

import numpy as np
from numpy.typing import NDArray

from inkshift.thresholds import Thresholds

__all__ = [
    "CHECK_SCHEMA",
    "ImageInfo",
    "ProfileInfo",
    "Summary",
    "PaletteColor",
    "PairVerdict",
    "ProofMaps",
    "CheckReport",
    "rgb_hex",
    "hex_rgb",
]

CHECK_SCHEMA = "inkshift.check/1"
"""Name and version of the check report's JSON schema."""


def rgb_hex(rgb: NDArray[np.uint8] | tuple[int, int, int]) -> str:
    """Return ``#rrggbb`` for an 8-bit RGB triple."""
    r, g, b = (int(v) for v in rgb)
    return f"#{r:02x}{g:02x}{b:02x}"


def hex_rgb(hex_: str) -> NDArray[np.uint8]:
    """Return the 8-bit RGB triple of a ``#rrggbb`` string."""
    return np.array([int(hex_[i : i + 2], 16) for i in (1, 3, 5)], np.uint8)


def _round(values: Any, digits: int = 2) -> Any:
    if isinstance(values, (list, tuple, np.ndarray)):
        return [_round(v, digits) for v in values]
    return round(float(values), digits)


@dataclass(frozen=True)
class ImageInfo:
    """The chart image that was checked."""

    path: str | None
    width: int
    height: int
    color_space: str
    source_profile: str
    profile_assumed: bool
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class ProfileInfo:
    """The output profile a proof used."""

    name: str
    description: str
    path: str
    color_space: str
    shipped: bool


@dataclass(frozen=True)
class Summary:
    """Per-pixel statistics of a proof."""

    delta_e_mean: float
    delta_e_p95: float
    delta_e_max: float
    out_of_gamut_share: float


@dataclass(frozen=True)
class PaletteColor:
    """One colour the chart was drawn with, and what print does to it."""

    hex: str
    share: float
    background: bool
    screen_lab: tuple[float, float, float]
    print_lab: tuple[float, float, float]
    delta_e: float
    out_of_gamut: bool
    ink: dict[str, float]
    coverage: float | None  # total ink, percent; None for an RGB output profile
    print_hex: str
    verdicts: tuple[str, ...]

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "hex": self.hex,
            "share": round(self.share, 5),
            "background": self.background,
            "screen_lab": _round(self.screen_lab),
            "print_lab": _round(self.print_lab),
            "delta_e": round(self.delta_e, 2),
            "out_of_gamut": self.out_of_gamut,
            "cmyk": {k: round(v, 1) for k, v in self.ink.items()},
            "coverage": None if self.coverage is None else round(self.coverage, 1),
            "print_hex": self.print_hex,
            "verdicts": list(self.verdicts),
        }


@dataclass(frozen=True)
class PairVerdict:
    """Two palette colours whose separation suffers in some rendition."""

    a: str
    b: str
    screen_delta_e: float
    print_delta_e: float
    kind: str  # "merge" or "separation loss"

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "a": self.a,
            "b": self.b,
            "screen_delta_e": round(self.screen_delta_e, 2),
            "print_delta_e": round(self.print_delta_e, 2),
            "kind": self.kind,
        }


@dataclass
class ProofMaps:
    """The per-pixel maps behind the pictures (not part of the JSON).

    Each is an (H, W[, 3]) array or, as :func:`inkshift.check.check` keeps
    them, an :class:`~inkshift.chart.unique.IndexedImage` (per-colour values
    and the shared pixel index; ``np.asarray`` expands one whole, slicing
    rows expands a band): screen and print sRGB (uint8), ΔE00 (float) and the
    out-of-gamut flag (bool).
    """

    screen_rgb: Any
    print_rgb: Any
    delta_e: Any
    out_of_gamut: Any


@dataclass
class CheckReport:
    """Everything one ``check`` found; :meth:`to_dict` is report.json."""

    image: ImageInfo
    output_profile: ProfileInfo
    intent: str
    bpc: bool
    paper: bool
    summary: Summary
    colors: list[PaletteColor]
    merges: list[PairVerdict]
    separation_losses: list[PairVerdict]
    thresholds: Thresholds
    cautions: list[str]
    gray: Any = None
    """Black-and-white check (:class:`inkshift.readability.GrayResult`)."""
    vision: Any = None
    """Colour-vision check (:class:`inkshift.readability.VisionResult`)."""
    extra: dict[str, Any] = field(default_factory=dict)
    outputs: dict[str, str] = field(default_factory=dict)
    maps: ProofMaps | None = field(default=None, repr=False)
    unique: Any = field(default=None, repr=False)
    """The image's unique colours (:class:`inkshift.chart.unique.UniqueColors`)."""
    proof: Any = field(default=None, repr=False)
    """Per-unique-colour results (:class:`inkshift.proof.PixelProof`: ΔE00, out-of-gamut
    flag, print sRGB, and print CIELAB when asked for)."""
    source_profile: Any = field(default=None, repr=False)
    """The image's profile as used (:class:`inkshift.icc.read.Profile`)."""
    output: Any = field(default=None, repr=False)
    """The output profile as used (:class:`inkshift.icc.read.Profile`)."""
    palette: Any = field(default=None, repr=False)
    """The chart's palette (:class:`inkshift.chart.palette.Palette`), same order as ``colors``."""

    def to_dict(self) -> dict[str, Any]:
        """Return the report as plain JSON-ready data (schema :data:`CHECK_SCHEMA`)."""
        data: dict[str, Any] = {
            "schema": CHECK_SCHEMA,
            "image": {**asdict(self.image), "notes": list(self.image.notes)},
            "output_profile": asdict(self.output_profile),
            "intent": self.intent,
            "bpc": self.bpc,
            "paper_view": self.paper,
            "summary": {k: round(v, 4) for k, v in asdict(self.summary).items()},
            "thresholds": asdict(self.thresholds),
            "colors": [c.to_dict() for c in self.colors],
            "merges": [m.to_dict() for m in self.merges],
            "separation_losses": [m.to_dict() for m in self.separation_losses],
        }
        if self.gray is not None:
            data["gray"] = self.gray.to_dict()
        if self.vision is not None:
            data["vision"] = self.vision.to_dict()
        data.update(self.extra)
        data["outputs"] = dict(self.outputs)
        data["cautions"] = list(self.cautions)
        return data
