"""Inverse model (separation): media-relative CIELAB -> device values, with black generation and ink limit.

Every function here takes and returns **media-relative** CIELAB (D50, paper at
L* = 100, a* = b* = 0), the values ICC B2A tables take.

Black generation
----------------
A CMYK colour other than at the gamut surface can be printed with a range of
black amounts ``[K_min, K_max]`` (its feasible range: the K for which some CMY
within the ink limit still reaches the colour). The condition's rule asks for

``K_rule = min(max_black, amount * clip((K_gray(L*) - K_gray(L*_start)) / (1 - K_gray(L*_start)), 0, 1))``

where ``K_gray(L*)`` is the black tint that alone prints lightness ``L*``
(1 beyond the black solid), ``L*_start = 100 - start (100 - L*_black)`` and
``L*_black`` is the lightness of the print black. ``amount`` is the share of
the gray component printed with black (0: as little black as the colour
allows; 1: a neutral is printed with black alone where black can reach it).
The colour always wins over the rule: the solver minimises

``|Lab(CMYK) - target|² + (BLACK_RULE_WEIGHT (K - K_rule))² + INK_WEIGHT² |CMY|²``

and a weight this small makes K the feasible value nearest to ``K_rule`` (the
rule clamped to the feasible range; the CMY term below moves it a little
towards more black, up to about +0.09 on mid-tone neutrals), so every colour of the ink-limited gamut
stays reachable, dark colours included. The last term is smaller still; it
only decides between CMY mixtures that print nearly the same colour (deep
shadows), so that neighbouring colours get neighbouring device values and B2A
tables interpolate smoothly (measured on coated: trilinear interpolation of
the 33^3 B2A1 table round trip p95 1.24 ΔE00 without it, 0.64 with it).

Solver
------
Projected Levenberg–Marquardt (Levenberg 1944, Marquardt 1963) in CIELAB,
vectorised over all targets, with the analytic Jacobian of
:func:`inkshift.printing.neugebauer.device_to_lab_jacobian`. Bounds ``0 <= x <= 1``
and the ink limit ``sum(x) <= TAC`` are handled by an active set (a variable at
a bound whose gradient pushes outward is frozen; the ink limit becomes an
equality when a step would cross it) and a Euclidean projection of every
trial point. Each target starts from the nearest node of a coarse device grid
(in CIELAB, with the black rule as a fourth coordinate). Everything is
deterministic.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.color.difference import delta_e_2000
from inkshift.printing.neugebauer import HalftoneModel, device_to_lab, device_to_lab_jacobian

__all__ = [
    "NEUTRAL_BLACK_DE00",
    "NEUTRAL_BLACK_STEP_L",
    "NEUTRAL_BLACK_SEARCH_L",
    "BLACK_RULE_WEIGHT",
    "INK_WEIGHT",
    "SEED_STEPS",
    "Separation",
    "project_ink_limit",
    "print_black",
    "neutral_black",
    "black_ramp",
    "black_rule",
    "separate",
]

BLACK_RULE_WEIGHT = 1.0
"""CIELAB units per unit of K in the solver's cost: small against the colour residual (the
colour error it allows is about weight² × ΔK / (dLab/dK) ≈ 0.01 ΔE*ab), large enough for
the solver to settle K in a few iterations."""
INK_WEIGHT = 0.3
"""CIELAB units per unit of C, M or Y pulling the solver towards less coloured ink. Where many
CMY mixtures print nearly the same colour (deep shadows) it picks the same one for
neighbouring colours, so B2A tables interpolate smoothly; elsewhere its colour cost is
about weight² × ink / (dLab/dink) < 0.01 ΔE*ab."""
SEED_STEPS = 6
"""Nodes per axis of the device grid the solver starts from (6^4 = 1296 before the ink limit)."""
MAX_ITERATIONS = 40
"""Levenberg–Marquardt iterations at most; most targets stop far earlier."""
NEUTRAL_BLACK_DE00 = 0.05
"""ΔE00 within which the inverse must reach a neutral for it to count as
reproduced when finding the darkest printable neutral: a twentieth of a
just-noticeable difference, so the black point sits on a neutral the separation
really prints (chosen by this project; 1 ΔE00 as one JND is common practice)."""
NEUTRAL_BLACK_STEP_L = 0.05
"""L* step of the search for the darkest printable neutral (chosen by this project,
finer than the 16-bit Lab encoding matters for)."""
NEUTRAL_BLACK_SEARCH_L = 30.0
"""How far above the print black's L* that search looks (chosen by this project;
on the shipped conditions the darkest neutral lies within a few L*)."""

_STOP_STEP = 1e-5  # device-value change below which a target has converged (1e-5 ≈ 0.001 ΔE*ab)
_BOUND_EPS = 1e-9


@dataclass(frozen=True)
class Separation:
    """Result of :func:`separate`: device values, the Lab they print and the CIEDE2000 to the target."""

    device: NDArray[np.float64]
    lab: NDArray[np.float64]
    delta_e: NDArray[np.float64]


def project_ink_limit(device: ArrayLike, tac: float) -> NDArray[np.float64]:
    """Return the nearest point (Euclidean) of ``{0 <= x <= 1, sum(x) <= tac}`` for each row.

    Finds ``tau`` with ``sum(clip(x - tau, 0, 1)) = tac`` by bisection where the limit is exceeded.
    """
    raw = np.asarray(device, dtype=np.float64)
    x = np.clip(raw, 0.0, 1.0)
    over = x.sum(axis=-1) > tac
    if not over.any():
        return x
    y = raw[over]
    lo = np.zeros(len(y))
    hi = np.maximum(y.max(axis=-1), 0.0)
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        s = np.clip(y - mid[:, None], 0.0, 1.0).sum(axis=-1)
        big = s > tac
        lo = np.where(big, mid, lo)
        hi = np.where(big, hi, mid)
    x[over] = np.clip(y - hi[:, None], 0.0, 1.0)
    return x


@lru_cache(maxsize=16)
def _print_black_cached(model: HalftoneModel) -> tuple[tuple[float, ...], tuple[float, ...]]:
    k = model.n_inks
    if k == 1:
        return (1.0,), tuple(device_to_lab(model, [1.0]))
    # The darkest colour uses all the black and spends the rest of the ink limit on CMY.
    steps = np.linspace(0.0, 1.0, 101)
    c, m = np.meshgrid(steps, steps, indexing="ij")
    c, m = c.ravel(), m.ravel()
    best_dev, best_lab = None, None
    for kk in np.linspace(max(0.0, model.tac - 3.0), 1.0, 21):
        y = np.clip(model.tac - kk - c - m, 0.0, 1.0)
        dev = np.stack([c, m, y, np.full_like(c, kk)], axis=-1)
        dev = dev[dev.sum(axis=-1) <= model.tac + 1e-9]
        lab = device_to_lab(model, dev)
        i = int(np.argmin(lab[:, 0]))
        if best_lab is None or lab[i, 0] < best_lab[0]:
            best_dev, best_lab = dev[i], lab[i]
    return tuple(best_dev), tuple(best_lab)


def print_black(model: HalftoneModel) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Return the device values and media-relative CIELAB of the darkest colour within the ink limit."""
    dev, lab = _print_black_cached(model)
    return np.array(dev), np.array(lab)


@lru_cache(maxsize=16)
def neutral_black(model: HalftoneModel) -> float:
    """Return the L* (media-relative) of the darkest neutral (a* = b* = 0) the condition reproduces.

    Found by separating neutrals from the print black's L* upward in steps of
    :data:`NEUTRAL_BLACK_STEP_L` (at most :data:`NEUTRAL_BLACK_SEARCH_L` above it)
    and keeping the first that the inverse reaches within :data:`NEUTRAL_BLACK_DE00`.
    """
    l_black = float(print_black(model)[1][0])
    ls = np.arange(l_black, min(l_black + NEUTRAL_BLACK_SEARCH_L, 100.0), NEUTRAL_BLACK_STEP_L)
    lab = np.zeros((ls.size, 3))
    lab[:, 0] = ls
    ok = separate(model, lab).delta_e <= NEUTRAL_BLACK_DE00
    return float(ls[np.argmax(ok)]) if ok.any() else l_black


def black_ramp(model: HalftoneModel, points: int = 1025) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Return black tints 0..1 and the media-relative L* each prints alone on the paper."""
    t = np.linspace(0.0, 1.0, points)
    dev = np.zeros((points, model.n_inks))
    dev[:, -1] = t
    return t, device_to_lab(model, dev)[:, 0]


def black_rule(model: HalftoneModel, lab: ArrayLike) -> NDArray[np.float64]:
    """Return the black the condition's rule asks for (before the feasible-range clamp), shape ``lab.shape[:-1]``."""
    lab = np.asarray(lab, dtype=np.float64)
    bg = model.condition.black_generation
    if bg is None:
        raise ValueError("black_rule needs a CMYK condition")
    t, lk = black_ramp(model)
    l_black = print_black(model)[1][0]
    def k_gray(lightness: NDArray[np.float64]) -> NDArray[np.float64]:
        return np.interp(lightness, lk[::-1], t[::-1])
    k_start = k_gray(np.array(100.0 - bg.start * (100.0 - l_black)))
    g = np.clip((k_gray(lab[..., 0]) - k_start) / max(1.0 - k_start, 1e-9), 0.0, 1.0)
    return np.minimum(bg.max_black, bg.amount * g)


@lru_cache(maxsize=16)
def _seed_grid(model: HalftoneModel) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    steps = np.linspace(0.0, 1.0, SEED_STEPS)
    grid = np.stack(np.meshgrid(*([steps] * model.n_inks), indexing="ij"), axis=-1).reshape(-1, model.n_inks)
    grid = grid[grid.sum(axis=-1) <= model.tac + 1e-9]
    return grid, device_to_lab(model, grid)


def _seeds(model: HalftoneModel, target: NDArray[np.float64], k_rule: NDArray[np.float64]) -> NDArray[np.float64]:
    grid, glab = _seed_grid(model)
    w = 10.0  # seed choice favours the rule's black more than the solver does
    # float32 is plenty to pick a starting node and halves the cost of this brute-force search.
    g4 = np.ascontiguousarray(np.concatenate([glab, w * grid[:, 3:4]], axis=1).T, dtype=np.float32)
    t4 = np.concatenate([target, w * k_rule[:, None]], axis=1).astype(np.float32)
    gn = np.einsum("ji,ji->i", g4, g4)
    out = np.empty((len(target), model.n_inks))
    for s in range(0, len(target), 4096):
        d = t4[s : s + 4096] @ g4
        d *= -2.0
        d += gn
        out[s : s + 4096] = grid[np.argmin(d, axis=1)]
    return out


def _cost(lab: NDArray[np.float64], target: NDArray[np.float64], x: NDArray[np.float64], k_rule: NDArray[np.float64]) -> NDArray[np.float64]:
    r = lab - target
    cmy = x[:, :3]
    return (
        np.einsum("ij,ij->i", r, r)
        + (BLACK_RULE_WEIGHT * (x[:, 3] - k_rule)) ** 2
        + INK_WEIGHT**2 * np.einsum("ij,ij->i", cmy, cmy)
    )


def _solve(model: HalftoneModel, target: NDArray[np.float64], x0: NDArray[np.float64], k_rule: NDArray[np.float64]) -> NDArray[np.float64]:
    """Projected Levenberg–Marquardt for CMYK targets; returns device values (N, 4)."""
    n = len(target)
    tac = model.tac
    x = project_ink_limit(x0, tac)
    cost = _cost(device_to_lab(model, x), target, x, k_rule)
    mu = np.full(n, 1e-3)
    active = np.arange(n)
    eye4 = np.eye(4)
    lam2 = BLACK_RULE_WEIGHT**2
    for _ in range(MAX_ITERATIONS):
        if active.size == 0:
            break
        xa = x[active]
        lab, jac = device_to_lab_jacobian(model, xa)
        r = lab - target[active]
        rk = xa[:, 3] - k_rule[active]
        g = np.einsum("nji,nj->ni", jac, r)
        g[:, 3] += lam2 * rk
        g[:, :3] += INK_WEIGHT**2 * xa[:, :3]
        h = np.einsum("nji,njk->nik", jac, jac)
        h[:, 3, 3] += lam2
        h[:, [0, 1, 2], [0, 1, 2]] += INK_WEIGHT**2
        diag = np.einsum("nii->ni", h)
        a = h + (mu[active][:, None] * (diag + 1e-9))[:, :, None] * eye4
        fixed = ((xa <= _BOUND_EPS) & (g > 0)) | ((xa >= 1.0 - _BOUND_EPS) & (g < 0))
        free = ~fixed
        # Frozen variables: identity rows/columns, zero step.
        a = a * (free[:, :, None] & free[:, None, :]) + eye4 * fixed[:, :, None]
        rhs = -g * free
        step = np.linalg.solve(a, rhs[:, :, None])[:, :, 0]
        crossing = (xa + step).sum(axis=1) > tac + 1e-12
        if crossing.any():
            # Re-solve those with the ink limit as an equality: sum(step) = tac - sum(x).
            c = np.nonzero(crossing)[0]
            kkt = np.zeros((c.size, 5, 5))
            kkt[:, :4, :4] = a[c]
            f = free[c].astype(np.float64)
            kkt[:, :4, 4] = f
            kkt[:, 4, :4] = f
            kkt[:, 4, 4] = np.where(f.sum(axis=1) > 0, 0.0, 1.0)
            rhs5 = np.concatenate([rhs[c], (tac - xa[c].sum(axis=1))[:, None]], axis=1)
            step[c] = np.linalg.solve(kkt, rhs5[:, :, None])[:, :4, 0]
        trial = project_ink_limit(xa + step, tac)
        new_cost = _cost(device_to_lab(model, trial), target[active], trial, k_rule[active])
        better = new_cost < cost[active]
        moved = np.abs(trial - xa).max(axis=1)
        x[active[better]] = trial[better]
        cost[active[better]] = new_cost[better]
        mu[active] = np.where(better, np.maximum(mu[active] / 3.0, 1e-9), np.minimum(mu[active] * 4.0, 1e6))
        done = (better & (moved < _STOP_STEP)) | (~better & (mu[active] >= 1e6))
        active = active[~done]
    return x


def separate(model: HalftoneModel, lab: ArrayLike) -> Separation:
    """Return device values that print the given media-relative CIELAB as closely as the condition allows.

    Parameters
    ----------
    model
        Forward model of the condition.
    lab
        Media-relative CIELAB D50 targets, shape ``(..., 3)``. Targets outside the gamut
        end at a nearby gamut colour in the CIELAB least-squares sense; use
        :mod:`inkshift.printing.gamut_mapping` first for a rendering intent.

    Returns
    -------
    Separation
        Device values 0..1 of shape ``(..., k)`` (CMYK obeying the black rule and the
        ink limit, or the black tint), the media-relative CIELAB they print, and
        CIEDE2000 to the target.
    """
    target = np.asarray(lab, dtype=np.float64)
    shape = target.shape[:-1]
    flat = target.reshape(-1, 3)
    if model.n_inks == 1:
        t, lk = black_ramp(model, 4097)
        dev = np.interp(flat[:, 0], lk[::-1], t[::-1])[:, None]
    else:
        k_rule = black_rule(model, flat)
        dev = _solve(model, flat, _seeds(model, flat, k_rule), k_rule)
    out_lab = device_to_lab(model, dev)
    return Separation(
        device=dev.reshape(shape + (model.n_inks,)),
        lab=out_lab.reshape(shape + (3,)),
        delta_e=delta_e_2000(flat, out_lab).reshape(shape),
    )
