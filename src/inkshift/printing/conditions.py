"""Printing-condition descriptions: the TOML files that the shipped profiles are built from.

A printing condition says what a press (or an office printer) prints on its
paper: the colour of the paper, of each ink printed alone at 100 %, of the
overprints that were measured, how much the dots grow, how much ink may be laid
down in total and how black replaces the gray component of a colour. All
colours are CIELAB, D50, 2° observer, **absolute** (measured on the paper, as
printing standards state their aims); the profile builder turns them into the
media-relative values that ICC tables hold.

File schema (TOML, read with :mod:`tomllib`)
--------------------------------------------
::

    name = "coated"                    # short name, [a-z0-9_-]+
    description = "one line"           # becomes the profile description
    note = "free text"                 # where the numbers come from
    licence = "CC0-1.0"                # licence of the description and the profile
    created = "2026-01-01T00:00:00"    # fixed ISO 8601 date for the ICC header
    inks = ["cyan", "magenta", "yellow", "black"]   # or ["black"]
    yule_nielsen_n = 1.8               # Yule–Nielsen n, 1..10
    total_area_coverage = 330          # percent, 100..400 (1 ink: must be 100)

    [paper]
    lab = [95.0, 0.0, -2.0]

    [solids]                           # every ink, 100 % on the paper
    cyan = [55.0, -37.0, -50.0]

    [overprints]                       # optional; keys "ink+ink[+ink...]"
    "magenta+yellow" = [47.0, 68.0, 48.0]

    [tone_value_increase]
    reference_tint = 50                # percent, strictly between 0 and 100
    curve = "parabola"                 # "parabola" or "hyperbola" (see below)
    cyan = 14                          # percent at the reference tint, 0..50

    [black_generation]                 # CMYK conditions only
    start = 0.25                       # darkness (0 paper .. 1 print black) where black begins
    amount = 0.6                       # fraction of the gray component printed with black, 0..1
    max_black = 0.95                   # cap on the black the rule asks for, 0..1

Tone value increase curves (tint ``t`` and reference ``r`` as fractions, ``v``
the increase at ``r``); both give the Murray–Davies tone value ``m(t)``:

* ``parabola``: ``m = t + v t (1 - t) / (r (1 - r))``, the symmetric curve of
  offset presses (common practice). It must stay monotonic, which needs
  ``v <= r (1 - r)``.
* ``hyperbola``: ``m = t (1 + b) / (1 + b t)`` with ``b = v / (r (1 - r - v))``
  so that ``m(r) = r + v``; monotonic for any increase below ``1 - r``, with
  its largest increase below 50 % and a slope that stays positive in the
  shadows; suited to the large gain of newsprint.

Every problem raises :class:`~inkshift.errors.ConditionError` naming the key.
"""

from __future__ import annotations

import math
import re
import tomllib
from dataclasses import dataclass, field
from datetime import datetime
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import NDArray

from inkshift.errors import ConditionError

__all__ = [
    "CMYK_INKS",
    "GRAY_INKS",
    "TVI_CURVES",
    "ToneValueIncrease",
    "BlackGeneration",
    "Condition",
    "load_condition",
    "parse_condition",
]

CMYK_INKS: tuple[str, ...] = ("cyan", "magenta", "yellow", "black")
"""Process inks of a four-colour condition, in device channel order."""
GRAY_INKS: tuple[str, ...] = ("black",)
"""The single ink of a grayscale condition."""
TVI_CURVES: tuple[str, ...] = ("parabola", "hyperbola")
"""Shapes of the tone value increase curve (see the module docstring)."""

MAX_TVI_PERCENT = 50.0  # no printing condition in ISO 12647-2/-3 comes near this (from memory)
YULE_NIELSEN_RANGE = (1.0, 10.0)  # n = 1 is Murray–Davies; published fits lie well inside (from memory)
TAC_RANGE = (100.0, 400.0)  # percent; 400 % is every ink at 100 % (definition)

_NAME_RE = re.compile(r"^[a-z0-9_-]+$")


@dataclass(frozen=True)
class ToneValueIncrease:
    """Tone value increase of one ink: ``value`` percent at ``reference_tint`` percent."""

    value: float
    reference_tint: float
    curve: str


@dataclass(frozen=True)
class BlackGeneration:
    """Black generation rule of a CMYK condition, all values 0..1 (see :mod:`inkshift.printing.separation`)."""

    start: float
    amount: float
    max_black: float


@dataclass(frozen=True, eq=False)
class Condition:
    """A validated printing condition; colours are absolute CIELAB D50."""

    name: str
    description: str
    note: str
    licence: str
    created: str
    inks: tuple[str, ...]
    paper_lab: NDArray[np.float64]
    solids: dict[str, NDArray[np.float64]]
    overprints: dict[str, NDArray[np.float64]]
    tvi: dict[str, ToneValueIncrease]
    yule_nielsen_n: float
    total_area_coverage: float
    black_generation: BlackGeneration | None
    source: str = field(default="<data>")

    @property
    def is_gray(self) -> bool:
        """True for a one-ink (black only) condition."""
        return len(self.inks) == 1


def load_condition(path: str | Path) -> Condition:
    """Read and validate a printing-condition TOML file."""
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise ConditionError(p, "(file)", "no such file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise ConditionError(p, "(file)", f"cannot be read: {exc.__class__.__name__}") from None
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ConditionError(p, "(file)", f"not valid TOML: {exc}") from None
    return parse_condition(data, str(p))


def _get(data: dict[str, Any], key: str, source: str, prefix: str = "") -> Any:
    if key not in data:
        raise ConditionError(source, prefix + key, "missing")
    return data[key]


def _text(data: dict[str, Any], key: str, source: str) -> str:
    value = _get(data, key, source)
    if not isinstance(value, str) or not value.strip():
        raise ConditionError(source, key, "must be a non-empty string")
    return value.strip()


def _number(value: Any, key: str, source: str) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise ConditionError(source, key, f"must be a finite number, got {value!r}")
    return float(value)


def _in_range(value: float, low: float, high: float, key: str, source: str, unit: str = "") -> float:
    if not low <= value <= high:
        raise ConditionError(source, key, f"{value:g}{unit} is outside {low:g}..{high:g}{unit}")
    return value


def _lab(value: Any, key: str, source: str) -> NDArray[np.float64]:
    if not isinstance(value, list) or len(value) != 3:
        raise ConditionError(source, key, "must be a list of three numbers [L*, a*, b*]")
    lab = np.array([_number(v, key, source) for v in value])
    if not 0.0 <= lab[0] <= 100.0:
        raise ConditionError(source, key, f"L* {lab[0]:g} is outside 0..100")
    if np.any(np.abs(lab[1:]) > 128.0):
        raise ConditionError(source, key, "a* and b* must lie within -128..128")
    return lab


def _table(data: dict[str, Any], key: str, source: str, required: bool = True) -> dict[str, Any]:
    if key not in data:
        if required:
            raise ConditionError(source, key, "missing")
        return {}
    value = data[key]
    if not isinstance(value, dict):
        raise ConditionError(source, key, "must be a table")
    return value


def _tvi_slope_ok(value: float, ref: float) -> bool:
    return value <= ref * (1.0 - ref) + 1e-12


def parse_condition(data: dict, source: str) -> Condition:
    """Validate a parsed condition description and return a :class:`Condition`.

    Parameters
    ----------
    data
        The mapping read from a condition file (see the module docstring).
    source
        The file name (or a label) used in error messages.
    """
    if not isinstance(data, dict):
        raise ConditionError(source, "(file)", "must be a table of keys")
    name = _text(data, "name", source)
    if not _NAME_RE.match(name):
        raise ConditionError(source, "name", f"{name!r} must use only a-z, 0-9, '_' and '-'")
    description = _text(data, "description", source)
    if "\n" in description:
        raise ConditionError(source, "description", "must be a single line")
    note = _text(data, "note", source)
    licence = _text(data, "licence", source)
    created = _get(data, "created", source)
    if hasattr(created, "isoformat"):  # TOML date-times arrive as datetime objects
        created = created.isoformat()
    if not isinstance(created, str):
        raise ConditionError(source, "created", "must be an ISO 8601 date-time")
    try:
        datetime.fromisoformat(created)
    except ValueError:
        raise ConditionError(source, "created", f"{created!r} is not an ISO 8601 date-time") from None

    inks_raw = _get(data, "inks", source)
    if not isinstance(inks_raw, list) or not all(isinstance(i, str) for i in inks_raw):
        raise ConditionError(source, "inks", "must be a list of ink names")
    inks = tuple(inks_raw)
    if inks not in (CMYK_INKS, GRAY_INKS):
        raise ConditionError(source, "inks", f"must be {list(CMYK_INKS)} or {list(GRAY_INKS)}, got {inks_raw}")

    paper_lab = _lab(_get(_table(data, "paper", source), "lab", source, "paper."), "paper.lab", source)

    solids_t = _table(data, "solids", source)
    solids: dict[str, NDArray[np.float64]] = {}
    for ink in inks:
        key = f"solids.{ink}"
        lab = _lab(_get(solids_t, ink, source, "solids."), key, source)
        if lab[0] >= paper_lab[0]:
            raise ConditionError(source, key, f"L* {lab[0]:g} is not darker than the paper (L* {paper_lab[0]:g})")
        solids[ink] = lab
    for extra in solids_t:
        if extra not in inks:
            raise ConditionError(source, f"solids.{extra}", "not one of the condition's inks")

    overprints: dict[str, NDArray[np.float64]] = {}
    for key_raw, value in _table(data, "overprints", source, required=False).items():
        key = f"overprints.{key_raw}"
        parts = key_raw.split("+")
        if len(parts) < 2 or len(set(parts)) != len(parts) or any(p not in inks for p in parts):
            raise ConditionError(source, key, "must name two or more different inks of the condition joined by '+'")
        canonical = "+".join(i for i in inks if i in parts)
        if canonical in overprints:
            raise ConditionError(source, key, "given twice")
        lab = _lab(value, key, source)
        if lab[0] >= paper_lab[0]:
            raise ConditionError(source, key, f"L* {lab[0]:g} is not darker than the paper (L* {paper_lab[0]:g})")
        overprints[canonical] = lab

    tvi_t = _table(data, "tone_value_increase", source)
    ref = _in_range(
        _number(_get(tvi_t, "reference_tint", source, "tone_value_increase."), "tone_value_increase.reference_tint", source),
        0.0, 100.0, "tone_value_increase.reference_tint", source, " %",
    )
    if ref in (0.0, 100.0):
        raise ConditionError(source, "tone_value_increase.reference_tint", "must lie strictly between 0 and 100 %")
    curve = _get(tvi_t, "curve", source, "tone_value_increase.")
    if curve not in TVI_CURVES:
        raise ConditionError(source, "tone_value_increase.curve", f"{curve!r} is not one of {list(TVI_CURVES)}")
    tvi: dict[str, ToneValueIncrease] = {}
    for ink in inks:
        key = f"tone_value_increase.{ink}"
        value = _in_range(_number(_get(tvi_t, ink, source, "tone_value_increase."), key, source), 0.0, MAX_TVI_PERCENT, key, source, " %")
        if ref + value >= 100.0:
            raise ConditionError(source, key, f"{value:g} % at {ref:g} % would reach a tone value of 100 %")
        if curve == "parabola" and not _tvi_slope_ok(value / 100.0, ref / 100.0):
            raise ConditionError(
                source, key, f"{value:g} % at {ref:g} % makes the parabola curve non-monotonic; use curve = \"hyperbola\""
            )
        tvi[ink] = ToneValueIncrease(value, ref, curve)

    n = _in_range(_number(_get(data, "yule_nielsen_n", source), "yule_nielsen_n", source), *YULE_NIELSEN_RANGE, "yule_nielsen_n", source)
    tac = _number(_get(data, "total_area_coverage", source), "total_area_coverage", source)
    if len(inks) == 1:
        if tac != 100.0:
            raise ConditionError(source, "total_area_coverage", "must be 100 for a one-ink condition")
    else:
        _in_range(tac, *TAC_RANGE, "total_area_coverage", source, " %")

    black_generation = None
    if len(inks) == 4:
        bg = _table(data, "black_generation", source)
        values = {}
        for k in ("start", "amount", "max_black"):
            key = f"black_generation.{k}"
            values[k] = _in_range(_number(_get(bg, k, source, "black_generation."), key, source), 0.0, 1.0, key, source)
        if values["start"] >= 1.0:
            raise ConditionError(source, "black_generation.start", "must be below 1")
        black_generation = BlackGeneration(**values)

    return Condition(
        name=name,
        description=description,
        note=note,
        licence=licence,
        created=created,
        inks=inks,
        paper_lab=paper_lab,
        solids=solids,
        overprints=overprints,
        tvi=tvi,
        yule_nielsen_n=n,
        total_area_coverage=tac,
        black_generation=black_generation,
        source=source,
    )
