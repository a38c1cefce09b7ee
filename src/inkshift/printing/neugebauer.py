"""Forward halftone model: device values -> CIE XYZ -> CIELAB, by the Yule–Nielsen modified Neugebauer model.

Method
------
* Neugebauer primaries: every combination of solid inks on the paper (16 for
  CMYK, 2 for one ink). The paper, the solids and the overprints the condition
  gives are used as they are. A missing combination ``S`` is estimated by
  multiplicative transmittance (transparent inks act as filters, subtractive
  mixing): for every split of ``S`` into two non-empty parts ``A`` and ``B``,
  ``r + (XYZ_A - r) * (XYZ_B - r) / (XYZ_paper - r)`` per channel, where ``r``
  (:data:`SURFACE_REFLECTANCE`) is the light reflected at the top surface that
  never passes through the inks (without it four-ink stacks come out near
  L* = 1, far darker than any press prints), and the estimate is the geometric
  mean over all splits (so it does not depend on ink order). Combinations are
  built up by size, so a missing three-ink overprint uses the measured
  two-ink ones.
* Demichel (1924) weights: ink coverages are independent, so the area of
  primary ``S`` is ``prod(a_i for i in S) * prod(1 - a_i for i not in S)``.
* Yule & Nielsen (1951), in the spectral form of Viggiano (1990):
  ``R^(1/n) = sum_S w_S R_S^(1/n)``. This module applies it to the tristimulus
  values X, Y and Z instead of to spectral reflectance: a broadband
  approximation that keeps the model exact at every primary and at the paper,
  and is good to a few ΔE in between, which is what the aims of a printing
  standard allow anyway.
* Tone value increase: ISO 12647-1 defines the tone value of a tint by the
  Murray–Davies equation on densities relative to the paper. A nominal tint
  ``t`` gets the Murray–Davies tone value ``m(t) = t + TVI(t)`` (curve in
  :mod:`inkshift.printing.conditions`); the reflectance of that tint on paper,
  in the channel where the solid is densest (the tristimulus stand-in for the
  complementary status filter, e.g. X for cyan), is ``R_t = R_p - m (R_p - R_s)``;
  the effective coverage fed to the Yule–Nielsen equation is the one that
  reproduces ``R_t``: ``a = (R_p^(1/n) - R_t^(1/n)) / (R_p^(1/n) - R_s^(1/n))``.
  The model therefore reproduces the condition's tone value increase exactly.

All colours are absolute (as measured on the paper) unless a function says it
returns media-relative values: ``XYZ_rel = XYZ_abs * D50 / XYZ_paper``
(ICC.1 simple media-white scaling), so the paper is L* = 100, a* = b* = 0.
"""

from __future__ import annotations

from dataclasses import dataclass
from itertools import combinations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.color.convert import D50_XYZ, lab_to_xyz, xyz_to_lab
from inkshift.printing.conditions import Condition

__all__ = [
    "SURFACE_REFLECTANCE",
    "HalftoneModel",
    "halftone_model",
    "primary_names",
    "murray_davies_tone_value",
    "effective_coverage",
    "device_to_xyz",
    "device_to_lab",
    "device_to_lab_jacobian",
]

SURFACE_REFLECTANCE = 0.006
"""Luminance factor that no ink stack goes below: light reflected at the ink surface before it
meets any ink layer. Solid densities of offset inks stop growing near D = 2.2 (Y ≈ 0.006)
however much ink is stacked (from memory). Used only to estimate the overprints a condition
does not give; lowered to half the darkest given colour if that is darker."""

_EPSILON = 216.0 / 24389.0  # CIE 015:2018 eq. 8.12
_KAPPA = 24389.0 / 27.0


@dataclass(frozen=True, eq=False)
class HalftoneModel:
    """The forward model of one condition, ready to evaluate.

    Attributes
    ----------
    condition
        The condition it was built from.
    primaries_xyz
        Absolute XYZ of the Neugebauer primaries, shape ``(2,)*k + (3,)``:
        axis ``i`` is ink ``i`` absent (0) or present at 100 % (1).
    paper_xyz
        Absolute XYZ of the paper (the media white point).
    n
        Yule–Nielsen n.
    tvi_gain
        Per ink, the curve parameter: ``v / (r (1 - r))`` of the parabola or ``b`` of the hyperbola.
    tvi_hyperbola
        Per ink, True when the curve is the hyperbola.
    channel
        Per ink, the XYZ channel used for its tone value (densest channel of the solid).
    tac
        Total area coverage as a fraction (3.3 for 330 %).
    """

    condition: Condition
    primaries_xyz: NDArray[np.float64]
    paper_xyz: NDArray[np.float64]
    n: float
    tvi_gain: NDArray[np.float64]
    tvi_hyperbola: NDArray[np.bool_]
    channel: NDArray[np.intp]
    tac: float

    @property
    def n_inks(self) -> int:
        return len(self.condition.inks)

    @property
    def relative_scale(self) -> NDArray[np.float64]:
        """Per-channel factor from absolute to media-relative XYZ."""
        return D50_XYZ / self.paper_xyz


def primary_names(condition: Condition) -> list[str]:
    """Return the names of the Neugebauer primaries in flat (C-order) index order ("paper", "cyan", "cyan+magenta" ...)."""
    k = len(condition.inks)
    names = []
    for idx in np.ndindex(*(2,) * k):
        inks = [condition.inks[i] for i in range(k) if idx[i]]
        names.append("+".join(inks) if inks else "paper")
    return names


def _estimate_primaries(condition: Condition) -> NDArray[np.float64]:
    k = len(condition.inks)
    paper = lab_to_xyz(condition.paper_lab)
    known: dict[frozenset[int], NDArray[np.float64]] = {frozenset(): paper}
    for i, ink in enumerate(condition.inks):
        known[frozenset([i])] = lab_to_xyz(condition.solids[ink])
    for key, lab in condition.overprints.items():
        known[frozenset(condition.inks.index(p) for p in key.split("+"))] = lab_to_xyz(lab)
    floor = np.minimum(SURFACE_REFLECTANCE, 0.5 * np.min(np.stack(list(known.values())), axis=0))
    for size in range(2, k + 1):
        for combo in combinations(range(k), size):
            s = frozenset(combo)
            if s in known:
                continue
            logs = []
            members = sorted(s)
            # r_s + prod(R_i - r_s) / (R_p - r_s)^(m-1): transmittance product of the ink-covered light only
            for r in range(1, size):
                for part in combinations(members, r):
                    a = frozenset(part)
                    b = s - a
                    if min(a) != members[0]:
                        continue  # each unordered split once
                    logs.append(np.log(known[a] - floor) + np.log(known[b] - floor) - np.log(paper - floor))
            known[s] = floor + np.exp(np.mean(logs, axis=0))
    out = np.empty((2,) * k + (3,))
    for idx in np.ndindex(*(2,) * k):
        out[idx] = known[frozenset(i for i in range(k) if idx[i])]
    return out


def halftone_model(condition: Condition) -> HalftoneModel:
    """Build the forward model of a condition (see the module docstring for the method)."""
    k = len(condition.inks)
    prim = _estimate_primaries(condition)
    paper = prim[(0,) * k]
    gains = np.empty(k)
    hyperbola = np.zeros(k, dtype=bool)
    channel = np.empty(k, dtype=np.intp)
    for i, ink in enumerate(condition.inks):
        tvi = condition.tvi[ink]
        r, v = tvi.reference_tint / 100.0, tvi.value / 100.0
        if tvi.curve == "hyperbola":
            hyperbola[i] = True
            gains[i] = v / (r * (1.0 - r - v))
        else:
            gains[i] = v / (r * (1.0 - r))
        solid = prim[tuple(1 if j == i else 0 for j in range(k))]
        channel[i] = int(np.argmax(np.log(paper / solid)))
    return HalftoneModel(
        condition=condition,
        primaries_xyz=prim,
        paper_xyz=paper,
        n=condition.yule_nielsen_n,
        tvi_gain=gains,
        tvi_hyperbola=hyperbola,
        channel=channel,
        tac=condition.total_area_coverage / 100.0,
    )


def murray_davies_tone_value(r_tint: ArrayLike, r_paper: ArrayLike, r_solid: ArrayLike) -> NDArray[np.float64]:
    """Return the Murray–Davies tone value ``(R_p - R_t) / (R_p - R_s)`` (ISO 12647-1, from reflectances).

    Equivalent to ISO 12647-1's ``(1 - 10^-Dt) / (1 - 10^-Ds)`` with densities relative to the paper.
    """
    rp = np.asarray(r_paper, dtype=np.float64)
    return (rp - np.asarray(r_tint, dtype=np.float64)) / (rp - np.asarray(r_solid, dtype=np.float64))


def _tone_value(model: HalftoneModel, t: NDArray[np.float64]) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Murray–Davies tone value m(t) and dm/dt for tints t (..., k) in 0..1."""
    g = model.tvi_gain
    par_m = t + g * t * (1.0 - t)
    par_d = 1.0 + g * (1.0 - 2.0 * t)
    if not model.tvi_hyperbola.any():
        return par_m, par_d
    den = 1.0 + g * t
    hyp_m = t * (1.0 + g) / den
    hyp_d = (1.0 + g) / den**2
    return np.where(model.tvi_hyperbola, hyp_m, par_m), np.where(model.tvi_hyperbola, hyp_d, par_d)


def effective_coverage(model: HalftoneModel, tints: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Return the Yule–Nielsen effective coverages and their derivatives for nominal tints.

    Parameters
    ----------
    model
        The halftone model.
    tints
        Nominal device values 0..1, shape ``(..., k)`` (values outside are clipped).

    Returns
    -------
    (a, da_dt)
        Effective coverages 0..1 and ``da/dt``, both of the input's shape.
    """
    t = np.clip(np.asarray(tints, dtype=np.float64), 0.0, 1.0)
    m, dm = _tone_value(model, t)
    k = model.n_inks
    inv_n = 1.0 / model.n
    idx = np.arange(k)
    rp = model.paper_xyz[model.channel]
    rs = model.primaries_xyz.reshape(-1, 3)[2 ** (k - 1 - idx), model.channel]
    rt = rp - m * (rp - rs)
    denom = rp**inv_n - rs**inv_n
    rt_n = rt**inv_n
    a = (rp**inv_n - rt_n) / denom
    da = inv_n * rt_n / rt * (rp - rs) * dm / denom
    return np.clip(a, 0.0, 1.0), da


def _contract(q: NDArray[np.float64], weights: list[tuple[NDArray[np.float64], NDArray[np.float64]]]) -> NDArray[np.float64]:
    """Sum over primaries of prod_i weight_i(bit) * q: a multilinear contraction, one ink axis at a time."""
    w0, w1 = weights[0]
    t = w0[:, None] * q[0].reshape(1, -1) + w1[:, None] * q[1].reshape(1, -1)
    for w0, w1 in weights[1:]:
        half = t.shape[1] // 2
        t = w0[:, None] * t[:, :half] + w1[:, None] * t[:, half:]
    return t  # (N, 3)


def _ynsn_gradient(q: NDArray[np.float64], a: NDArray[np.float64]) -> NDArray[np.float64]:
    """dS/da_i for all inks, shape (N, 3, k)."""
    n, k = a.shape
    if k == 4:
        # Demichel weights of ink pairs, shared by the four derivatives: (N, 4) each.
        f = np.stack([1.0 - a, a], axis=-1)  # (N, 4, 2)
        p01 = (f[:, 0, :, None] * f[:, 1, None, :]).reshape(n, 4)
        p23 = (f[:, 2, :, None] * f[:, 3, None, :]).reshape(n, 4)
        dq = [np.diff(q, axis=i).reshape(8, 3) for i in range(4)]  # primaries with ink i minus without
        out = np.empty((n, 3, 4))
        out[:, :, 0] = (f[:, 1, :, None] * p23[:, None, :]).reshape(n, 8) @ dq[0]
        out[:, :, 1] = (f[:, 0, :, None] * p23[:, None, :]).reshape(n, 8) @ dq[1]
        out[:, :, 2] = (p01[:, :, None] * f[:, 3, None, :]).reshape(n, 8) @ dq[2]
        out[:, :, 3] = (p01[:, :, None] * f[:, 2, None, :]).reshape(n, 8) @ dq[3]
        return out
    ones = np.ones(n)
    out = np.empty((n, 3, k))
    for i in range(k):
        weights = [(1.0 - a[:, j], a[:, j]) if j != i else (-ones, ones) for j in range(k)]
        out[:, :, i] = _contract(q, weights)
    return out


def _ynsn_sum(model: HalftoneModel, a: NDArray[np.float64]) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    q = model.primaries_xyz ** (1.0 / model.n)
    if model.n_inks == 4:
        n = len(a)
        f = np.stack([1.0 - a, a], axis=-1)
        p01 = (f[:, 0, :, None] * f[:, 1, None, :]).reshape(n, 4)
        p23 = (f[:, 2, :, None] * f[:, 3, None, :]).reshape(n, 4)
        return q, (p01[:, :, None] * p23[:, None, :]).reshape(n, 16) @ q.reshape(16, 3)
    weights = [(1.0 - a[:, i], a[:, i]) for i in range(model.n_inks)]
    return q, _contract(q, weights)


def device_to_xyz(model: HalftoneModel, device: ArrayLike, *, relative: bool = False) -> NDArray[np.float64]:
    """Return CIE XYZ (absolute, or media-relative when ``relative``) for device values 0..1, shape ``(..., k)``."""
    d = np.asarray(device, dtype=np.float64)
    shape = d.shape[:-1]
    a, _ = effective_coverage(model, d.reshape(-1, model.n_inks))
    _, s = _ynsn_sum(model, a)
    xyz = s**model.n
    if relative:
        xyz = xyz * model.relative_scale
    return xyz.reshape(shape + (3,))


def device_to_lab(model: HalftoneModel, device: ArrayLike, *, relative: bool = True) -> NDArray[np.float64]:
    """Return CIELAB D50 (media-relative by default, absolute when ``relative=False``) for device values 0..1."""
    xyz = device_to_xyz(model, device, relative=relative)
    return xyz_to_lab(xyz)


def device_to_lab_jacobian(
    model: HalftoneModel, device: ArrayLike, *, relative: bool = True
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Return CIELAB and its analytic Jacobian with respect to the device values.

    Parameters
    ----------
    model
        The halftone model.
    device
        Device values, shape ``(N, k)``.
    relative
        Media-relative (default) or absolute CIELAB.

    Returns
    -------
    (lab, jac)
        ``lab`` of shape ``(N, 3)`` and ``jac`` of shape ``(N, 3, k)``: ``d Lab_j / d device_i``
        (exact derivative of the model, including the tone value curve; one-sided at 0 and 1).
    """
    d = np.asarray(device, dtype=np.float64)
    a, da_dt = effective_coverage(model, d)
    q, s = _ynsn_sum(model, a)
    scale = model.relative_scale if relative else np.ones(3)
    xyz = s**model.n * scale
    lab = xyz_to_lab(xyz)
    # d XYZ / d a_i = n s^(n-1) dS/da_i * scale; S is multilinear, so dS/da_i is S with
    # ink i's weights (1 - a_i, a_i) replaced by (-1, +1).
    pref = model.n * s ** (model.n - 1.0) * scale
    ds = _ynsn_gradient(q, a)
    dxyz = pref[:, :, None] * ds * da_dt[:, None, :]
    r = xyz / D50_XYZ  # absolute CIELAB is also taken against the PCS white D50 (ICC.1 convention)
    dfdr = np.where(r > _EPSILON, 1.0 / (3.0 * np.cbrt(np.maximum(r, _EPSILON)) ** 2), _KAPPA / 116.0) / D50_XYZ
    df = dfdr[:, :, None] * dxyz  # (N, 3 [fx, fy, fz], k)
    jac = np.empty_like(df)
    jac[:, 0] = 116.0 * df[:, 1]
    jac[:, 1] = 500.0 * (df[:, 0] - df[:, 1])
    jac[:, 2] = 200.0 * (df[:, 1] - df[:, 2])
    return lab, jac
