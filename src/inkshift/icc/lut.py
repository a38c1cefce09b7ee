"""ICC curves, matrices and colour look-up tables as data, and their float evaluation.

Every stage works on normalised values in 0..1 (a 16-bit code divided by
65535, an 8-bit code by 255); what those values mean (legacy or v4 Lab,
u1Fixed15 XYZ, device values) is decided by :mod:`inkshift.icc.evaluate`.

References
----------
ICC.1:2022 (v4.4), 10.6 curveType, 10.18 parametricCurveType (function
types 0-4, table 68), 10.10 lut16Type, 10.11 lut8Type, 10.12 lutAToBType,
10.13 lutBToAType (processing order and CLUT layout: the first input varies
slowest).
LittleCMS 2 (lcms2 ``cmsintrp.c``): tetrahedral interpolation for three
inputs, and for more inputs linear interpolation in the first input between
the two (n-1)-input results either side, recursively; 1 input linear, 2
inputs bilinear; trilinear for PCS-to-device tables with a CIELAB PCS
(``cmsio1.c``, ChangeInterpolationToTrilinear). This module follows the same
schemes so that its float results can be compared with LittleCMS.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass, field
from typing import Union

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = [
    "Curve",
    "CurveSet",
    "MatrixStage",
    "Clut",
    "Lut",
    "Stage",
    "eval_curve",
    "invert_curve",
    "interpolate_clut",
    "eval_stages",
    "eval_lut",
]

# Samples used to invert a curve numerically when no closed form applies.
_INVERSE_SAMPLES = 4096


@dataclass(frozen=True, eq=False)
class Curve:
    """One tone curve of a profile.

    ``kind`` is ``"identity"``, ``"gamma"`` (curveType with one entry),
    ``"table"`` (curveType with two or more entries, values in 0..1) or
    ``"parametric"`` (parametricCurveType; ``function`` 0-4 and its
    ``params`` g, a, b, c, d, e, f in the order of ICC.1 table 68).
    """

    kind: str
    gamma: float = 1.0
    table: NDArray[np.float64] | None = None
    function: int = 0
    params: tuple[float, ...] = ()

    @property
    def is_identity(self) -> bool:
        """True when the curve returns its input exactly: ``"identity"``, or a
        two-entry table 0 -> 0, 1 -> 1 (what lut16 writers put where no curve is
        wanted; interpolating it gives back ``x`` bit for bit)."""
        if self.kind == "identity":
            return True
        return self.kind == "table" and self.table is not None and len(self.table) == 2 and (
            float(self.table[0]) == 0.0 and float(self.table[1]) == 1.0
        )


@dataclass(frozen=True, eq=False)
class CurveSet:
    """One curve per channel, applied channel by channel."""

    curves: tuple[Curve, ...]


@dataclass(frozen=True, eq=False)
class MatrixStage:
    """``out = matrix @ in + offset`` on three normalised channels."""

    matrix: NDArray[np.float64]
    offset: NDArray[np.float64] = field(default_factory=lambda: np.zeros(3))


@dataclass(frozen=True, eq=False)
class Clut:
    """A colour look-up table: ``grid`` points per input, ``table`` of shape (prod(grid), n_out) in 0..1."""

    grid: tuple[int, ...]
    table: NDArray[np.float64]


Stage = Union[CurveSet, MatrixStage, Clut]


@dataclass(frozen=True, eq=False)
class Lut:
    """A multi-stage table tag (lut8, lut16, lutAtoB or lutBtoA), stages in processing order.

    ``kind`` is ``"lut8"``, ``"lut16"``, ``"lutAtoB"`` or ``"lutBtoA"``; it
    decides how the PCS side is encoded.
    """

    kind: str
    n_in: int
    n_out: int
    stages: tuple[Stage, ...]

    @property
    def clut(self) -> Clut | None:
        """The CLUT stage, if the table has one."""
        for stage in self.stages:
            if isinstance(stage, Clut):
                return stage
        return None


def _parametric_form(curve: Curve) -> tuple[float, float, float, float, float, float, float]:
    """Return (g, a, b, c, d, e, f) of the general type-4 form for any ICC function type.

    Type 4 is ``Y = (aX + b)^g + e`` for ``X >= d`` and ``Y = cX + f`` below;
    types 0-3 are special cases of it (ICC.1:2022 table 68).
    """
    p = curve.params
    t = curve.function
    if t == 0:
        return p[0], 1.0, 0.0, 0.0, -np.inf, 0.0, 0.0
    g, a, b = p[0], p[1], p[2]
    d = -b / a if a != 0 else -np.inf
    if t == 1:
        return g, a, b, 0.0, d, 0.0, 0.0
    if t == 2:
        return g, a, b, 0.0, d, p[3], p[3]
    if t == 3:
        return g, a, b, p[3], p[4], 0.0, 0.0
    return g, a, b, p[3], p[4], p[5], p[6]


def eval_curve(curve: Curve, x: ArrayLike) -> NDArray[np.float64]:
    """Evaluate ``curve`` at ``x`` (clipped to 0..1); the result is clipped to 0..1.

    Tables are interpolated linearly between equally spaced entries
    (ICC.1:2022 10.6).
    """
    x = np.clip(np.asarray(x, dtype=np.float64), 0.0, 1.0)
    if curve.is_identity:
        return x
    if curve.kind == "table":
        # The reader makes tables of two or more entries in 0..1; interpolating
        # between them stays in 0..1 and finite.
        return _interp_uniform(curve.table, x)
    if curve.kind == "gamma":
        y = np.power(x, curve.gamma)
    else:
        g, a, b, c, d, e, f = _parametric_form(curve)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            upper = np.power(np.maximum(a * x + b, 0.0), g) + e
        y = np.where(x >= d, upper, c * x + f)
    return np.clip(np.nan_to_num(y, nan=0.0), 0.0, 1.0)


def _interp_uniform(table: NDArray[np.float64], x: NDArray[np.float64]) -> NDArray[np.float64]:
    """Linear interpolation in a table of equally spaced entries over 0..1 (x already in 0..1)."""
    pos = x * (len(table) - 1)
    i = np.minimum(pos.astype(np.intp), len(table) - 2)
    f = pos
    f -= i
    lo = table.take(i)
    # lo + (hi - lo) f, written as lo (1 - f) + hi f to keep the original rounding.
    out = table.take(i + 1)
    out *= f
    np.subtract(1.0, f, out=f)
    lo *= f
    out += lo
    return out


def invert_curve(curve: Curve, y: ArrayLike) -> NDArray[np.float64]:
    """Return ``x`` in 0..1 with ``eval_curve(curve, x) == y`` for a monotone curve.

    Gammas and the increasing parametric functions are inverted in closed
    form; tables (and anything else) by linear interpolation of the sampled
    curve with the axes swapped, after making it monotone.
    """
    y = np.clip(np.asarray(y, dtype=np.float64), 0.0, 1.0)
    if curve.kind == "identity":
        return y
    if curve.kind == "gamma" and curve.gamma > 0:
        return np.power(y, 1.0 / curve.gamma)
    if curve.kind == "parametric":
        g, a, b, c, d, e, f = _parametric_form(curve)
        if g > 0 and a > 0 and c >= 0:
            d0 = max(d, 0.0)
            y_break = (max(a * d0 + b, 0.0)) ** g + e
            with np.errstate(invalid="ignore", divide="ignore"):
                upper = (np.power(np.maximum(y - e, 0.0), 1.0 / g) - b) / a
                lower = (y - f) / c if c > 0 else np.full_like(y, d0)
            x = np.where(y >= y_break, upper, lower)
            return np.clip(np.nan_to_num(x, nan=0.0), 0.0, 1.0)
    if curve.kind == "table":
        t = curve.table
        xs = np.linspace(0.0, 1.0, len(t))
    else:
        xs = np.linspace(0.0, 1.0, _INVERSE_SAMPLES)
        t = eval_curve(curve, xs)
    if t[-1] < t[0]:
        t, xs = t[::-1], xs[::-1]
    t = np.maximum.accumulate(t)
    return np.clip(np.interp(y, t, xs), 0.0, 1.0)


def interpolate_clut(clut: Clut, x: ArrayLike, method: str = "tetrahedral") -> NDArray[np.float64]:
    """Interpolate ``clut`` at ``x`` of shape (N, n_in) in 0..1; returns (N, n_out).

    ``method="tetrahedral"``: one input linear; two bilinear; three
    tetrahedral (the tetrahedron is chosen by the order of the three
    fractional parts, all six sharing the main diagonal; Kasson, Nin &
    Plouffe 1995); more than three: tetrahedral in the last three inputs,
    linear in each leading input, as LittleCMS does (the first input is the
    outermost). ``method="multilinear"``: linear in every input (trilinear
    for three), which LittleCMS uses for tables indexed by CIELAB, where the
    main diagonal of a cell has no special meaning.
    """
    if method not in ("tetrahedral", "multilinear"):
        raise ValueError(f"unknown interpolation method {method!r}")
    x = np.clip(np.asarray(x, dtype=np.float64), 0.0, 1.0)
    grid = np.asarray(clut.grid, dtype=np.intp)
    n_in = grid.size
    pos = x * (grid - 1)
    i0 = np.minimum(pos.astype(np.intp), np.maximum(grid - 2, 0))  # pos >= 0: truncation is floor
    frac = pos
    frac -= i0
    np.clip(frac, 0.0, 1.0, out=frac)
    strides = np.ones(n_in, dtype=np.intp)
    for k in range(n_in - 2, -1, -1):
        strides[k] = strides[k + 1] * grid[k + 1]
    step = np.where(grid > 1, strides, 0)
    base = i0 @ strides
    table = clut.table

    tetra = method == "tetrahedral" and n_in >= 3
    n_lin = n_in - 3 if tetra else n_in
    # The tetrahedron (corner offsets and weights) depends only on the last three
    # fractions, so it is found once and shared by every corner of the leading inputs.
    cell = _tetrahedron(frac[:, -3:], step[-3:]) if tetra else None
    out: NDArray[np.float64] | None = None
    for bits in itertools.product((0, 1), repeat=n_lin):
        weight: NDArray[np.float64] | None = None
        offset = base
        for k, bit in enumerate(bits):
            f = frac[:, k] if bit else 1.0 - frac[:, k]
            weight = f.copy() if weight is None else np.multiply(weight, f, out=weight)
            if bit:
                offset = offset + step[k]
        value = _tetrahedral_at(table, offset, cell) if cell is not None else table.take(offset, axis=0)
        if weight is not None:
            value *= weight[:, None]
        if out is None:
            out = value
        else:
            out += value
    assert out is not None
    return out


def _tetrahedron(
    frac: NDArray[np.float64], step: NDArray[np.intp]
) -> tuple[NDArray[np.intp], NDArray[np.intp], int, tuple[NDArray[np.float64], ...]]:
    """Corner offsets and weights of the tetrahedron holding each point of a 3-D cell.

    Walk from the base corner along the axes by decreasing fraction: the corners
    visited are base, base + step[largest], base + all steps but step[smallest],
    and the far corner; their weights are the differences of the sorted fractions.
    """
    fx, fy, fz = frac[:, 0], frac[:, 1], frac[:, 2]
    # On ties these choices never name the same axis twice, which is all the walk needs.
    largest = np.where((fx >= fy) & (fx >= fz), 0, np.where(fy >= fz, 1, 2))
    smallest = np.where((fz <= fx) & (fz <= fy), 2, np.where(fy <= fx, 1, 0))
    rows = np.arange(frac.shape[0])
    f_max = frac[rows, largest]
    f_min = frac[rows, smallest]
    f_mid = fx + fy
    f_mid += fz
    f_mid -= f_max
    f_mid -= f_min
    total = int(step.sum())
    weights = (1.0 - f_max, f_max - f_mid, f_mid - f_min, f_min)
    return step[largest], total - step[smallest], total, tuple(w[:, None] for w in weights)


def _tetrahedral_at(
    table: NDArray[np.float64],
    base: NDArray[np.intp],
    cell: tuple[NDArray[np.intp], NDArray[np.intp], int, tuple[NDArray[np.float64], ...]],
) -> NDArray[np.float64]:
    """Tetrahedral interpolation (Kasson, Nin & Plouffe 1995) at cells starting at ``base``."""
    c1, c2, total, (w0, w1, w2, w3) = cell
    out = table.take(base, axis=0)
    out *= w0
    for offset, w in ((base + c1, w1), (base + c2, w2), (base + total, w3)):
        v = table.take(offset, axis=0)
        v *= w
        out += v
    return out


def eval_stages(stages: tuple[Stage, ...], x: ArrayLike, method: str = "tetrahedral") -> NDArray[np.float64]:
    """Run normalised values ``x`` (N, n) through ``stages``; every stage's output is clipped to 0..1.

    ``method`` is the CLUT interpolation (see :func:`interpolate_clut`).
    """
    v = np.clip(np.asarray(x, dtype=np.float64), 0.0, 1.0)
    for stage in stages:
        if isinstance(stage, CurveSet):
            if all(c.is_identity for c in stage.curves):
                continue
            v = np.stack([eval_curve(c, v[:, i]) for i, c in enumerate(stage.curves)], axis=1)
        elif isinstance(stage, MatrixStage):
            v = np.clip(v @ stage.matrix.T + stage.offset, 0.0, 1.0)
        else:
            v = interpolate_clut(stage, v, method)
    return v


def eval_lut(lut: Lut, x: ArrayLike, method: str = "tetrahedral") -> NDArray[np.float64]:
    """Evaluate a table tag on normalised inputs (N, n_in); returns normalised outputs (N, n_out)."""
    return eval_stages(lut.stages, x, method)
