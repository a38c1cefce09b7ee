"""Forward halftone model: Yule–Nielsen modified Neugebauer with Demichel weights and tone value increase."""

from __future__ import annotations

import copy
import itertools
from pathlib import Path

import numpy as np
import pytest

from inkshift.color.convert import D50_XYZ, lab_to_xyz, xyz_to_lab
from inkshift.printing.conditions import load_condition, parse_condition
from inkshift.printing.neugebauer import (
    SURFACE_REFLECTANCE,
    device_to_lab,
    device_to_lab_jacobian,
    device_to_xyz,
    halftone_model,
    murray_davies_tone_value,
    primary_names,
)

PROFILES = Path(__file__).resolve().parents[1] / "profiles_open"
SHIPPED = ("coated", "uncoated", "newsprint", "office_gray")


@pytest.fixture(scope="module", params=SHIPPED)
def model(request):
    return halftone_model(load_condition(PROFILES / f"{request.param}.toml"))


def _one_ink(model, i, tints):
    d = np.zeros((len(tints), model.n_inks))
    d[:, i] = tints
    return d


def test_paper_solids_and_given_overprints_are_exact(model):
    c = model.condition
    k = model.n_inks
    assert np.allclose(device_to_lab(model, np.zeros(k), relative=False), c.paper_lab, atol=1e-9)
    # Media-relative: the paper is L* = 100, a* = b* = 0 (ICC.1 media-relative colorimetry).
    assert np.allclose(device_to_lab(model, np.zeros(k)), [100.0, 0.0, 0.0], atol=1e-9)
    for i, ink in enumerate(c.inks):
        d = np.zeros(k)
        d[i] = 1.0
        assert np.allclose(device_to_lab(model, d, relative=False), c.solids[ink], atol=1e-9)
    for key, lab in c.overprints.items():
        d = np.array([1.0 if ink in key.split("+") else 0.0 for ink in c.inks])
        assert np.allclose(device_to_lab(model, d, relative=False), lab, atol=1e-9)


def test_tone_value_increase_matches_the_condition_by_iso_12647_1(model):
    # ISO 12647-1: tone value by the Murray-Davies equation on densities relative to the
    # paper, A = (1 - 10^-D_t) / (1 - 10^-D_s); here with D = log10(R_paper / R) in the
    # channel where the solid is densest (the tristimulus stand-in for the status filter).
    c = model.condition
    for i, ink in enumerate(c.inks):
        tvi = c.tvi[ink]
        r = tvi.reference_tint / 100.0
        xyz = device_to_xyz(model, _one_ink(model, i, [0.0, r, 1.0]))
        ch = model.channel[i]
        rp, rt, rs = xyz[:, ch]
        d_t, d_s = np.log10(rp / rt), np.log10(rp / rs)
        tone = (1.0 - 10.0**-d_t) / (1.0 - 10.0**-d_s)
        assert abs(100.0 * (tone - r) - tvi.value) <= 0.5
        # the reflectance form agrees with the density form
        assert murray_davies_tone_value(rt, rp, rs) == pytest.approx(tone, abs=1e-12)


def test_lightness_falls_monotonically_along_every_single_ink_ramp(model):
    t = np.linspace(0.0, 1.0, 401)
    for i in range(model.n_inks):
        lightness = device_to_lab(model, _one_ink(model, i, t))[:, 0]
        assert np.all(np.diff(lightness) < 0)


def test_model_equals_a_direct_sum_over_the_16_demichel_primaries():
    # Demichel (1924) weights and the Yule-Nielsen (1951) / Viggiano (1990) sum, written out
    # term by term for comparison with the vectorised contraction.
    m = halftone_model(load_condition(PROFILES / "coated.toml"))
    from inkshift.printing.neugebauer import effective_coverage

    rng = np.random.default_rng(3)
    d = rng.random((50, 4))
    a, _ = effective_coverage(m, d)
    total = np.zeros((50, 3))
    weight_sum = np.zeros(50)
    for bits in itertools.product((0, 1), repeat=4):
        w = np.prod([a[:, i] if b else 1.0 - a[:, i] for i, b in enumerate(bits)], axis=0)
        weight_sum += w
        total += w[:, None] * m.primaries_xyz[bits] ** (1.0 / m.n)
    assert np.allclose(weight_sum, 1.0)
    assert np.allclose(device_to_xyz(m, d), total**m.n, rtol=1e-12)
    assert primary_names(m.condition)[0] == "paper" and primary_names(m.condition)[-1] == "cyan+magenta+yellow+black"


def _gray_condition(n: float, tvi: float) -> dict:
    return {
        "name": "g", "description": "d", "note": "n", "licence": "CC0-1.0", "created": "2026-01-01T00:00:00",
        "inks": ["black"], "yule_nielsen_n": n, "total_area_coverage": 100,
        "paper": {"lab": [95.0, 0.0, 0.0]}, "solids": {"black": [20.0, 0.0, 0.0]},
        "tone_value_increase": {"reference_tint": 50, "curve": "parabola", "black": tvi},
    }


def test_reduces_to_murray_davies_and_yule_nielsen_without_dot_gain():
    paper, solid = lab_to_xyz([95.0, 0.0, 0.0]), lab_to_xyz([20.0, 0.0, 0.0])
    # n = 1: the Murray-Davies equation R = (1 - a) R_p + a R_s (Murray 1936).
    m1 = halftone_model(parse_condition(_gray_condition(1.0, 0.0), "g"))
    assert np.allclose(device_to_xyz(m1, [[0.3]]), 0.7 * paper + 0.3 * solid, rtol=1e-12)
    # n = 2 with no tone value increase: the print still has the Murray-Davies reflectance
    # (a tone value increase of 0 %, ISO 12647-1), reached through the Yule-Nielsen (1951)
    # equation R = ((1 - a) R_p^(1/2) + a R_s^(1/2))^2 with the effective coverage a
    # that the module docstring gives.
    from inkshift.printing.neugebauer import effective_coverage

    m2 = halftone_model(parse_condition(_gray_condition(2.0, 0.0), "g"))
    assert np.allclose(device_to_xyz(m2, [[0.5]]), 0.5 * paper + 0.5 * solid, rtol=1e-12)
    a = effective_coverage(m2, [[0.5]])[0][0, 0]
    rt = 0.5 * paper[1] + 0.5 * solid[1]
    assert a == pytest.approx((np.sqrt(paper[1]) - np.sqrt(rt)) / (np.sqrt(paper[1]) - np.sqrt(solid[1])), rel=1e-12)
    assert ((1 - a) * np.sqrt(paper) + a * np.sqrt(solid)) ** 2 == pytest.approx(0.5 * paper + 0.5 * solid, rel=1e-12)
    assert a < 0.5  # the optical gain of n > 1 takes part of the tone value


def test_missing_overprints_follow_the_documented_multiplicative_rule():
    m = halftone_model(load_condition(PROFILES / "newsprint.toml"))
    c = m.condition
    paper = lab_to_xyz(c.paper_lab)
    cyan, yellow = lab_to_xyz(c.solids["cyan"]), lab_to_xyz(c.solids["yellow"])
    r = SURFACE_REFLECTANCE
    want = r + (cyan - r) * (yellow - r) / (paper - r)
    assert np.allclose(m.primaries_xyz[1, 0, 1, 0], want, rtol=1e-12)
    # Every estimated stack is darker than each of its inks alone (subtractive mixing).
    names = primary_names(c)
    flat = m.primaries_xyz.reshape(-1, 3)
    for idx, name in enumerate(names):
        for ink in name.split("+") if name != "paper" else []:
            assert flat[idx, 1] <= lab_to_xyz(c.solids[ink])[1] + 1e-12


def test_jacobian_matches_central_differences(model):
    rng = np.random.default_rng(11)
    d = rng.uniform(0.02, 0.98, (200, model.n_inks))
    lab, jac = device_to_lab_jacobian(model, d)
    assert np.allclose(lab, device_to_lab(model, d), atol=1e-12)
    h = 1e-6
    for i in range(model.n_inks):
        e = np.zeros(model.n_inks)
        e[i] = h
        numeric = (device_to_lab(model, d + e) - device_to_lab(model, d - e)) / (2 * h)
        assert np.allclose(jac[:, :, i], numeric, atol=1e-5)


def test_relative_is_absolute_scaled_by_the_media_white(model):
    # ICC.1 media-relative colorimetry: XYZ_rel = XYZ_abs * D50 / XYZ_mediawhite.
    d = np.random.default_rng(5).random((20, model.n_inks))
    rel = device_to_xyz(model, d, relative=True)
    absolute = device_to_xyz(model, d)
    assert np.allclose(rel, absolute * D50_XYZ / model.paper_xyz, rtol=1e-12)
    assert np.allclose(xyz_to_lab(rel), device_to_lab(model, d), atol=1e-9)


def test_hyperbola_tone_curve_is_exact_at_its_reference_and_monotonic():
    data = _gray_condition(1.8, 26.0)
    data["tone_value_increase"].update({"reference_tint": 40, "curve": "hyperbola"})
    m = halftone_model(parse_condition(copy.deepcopy(data), "g"))
    xyz = device_to_xyz(m, [[0.0], [0.4], [1.0]])[:, 1]
    assert 100.0 * murray_davies_tone_value(xyz[1], xyz[0], xyz[2]) == pytest.approx(66.0, abs=1e-9)
    y = device_to_xyz(m, np.linspace(0, 1, 201)[:, None])[:, 1]
    assert np.all(np.diff(y) < 0)
