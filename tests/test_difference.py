"""Tests of inkshift.color.difference against published data and colour-science."""

from __future__ import annotations

import colour
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

from inkshift.color.difference import DE2000_PER_DE76, delta_e_2000_over, delta_e_1976, delta_e_1994, delta_e_2000
from inkshift.errors import InputError

# G. Sharma, W. Wu, E. N. Dalal (2005), "The CIEDE2000 color-difference formula:
# implementation notes, supplementary test data, and mathematical observations",
# Color Research and Application 30(1):21-30, table 1: L1, a1, b1, L2, a2, b2, ΔE00
# (kL = kC = kH = 1), as printed there to 4 decimals.
SHARMA_2005_TABLE_1 = [
    (50.0000, 2.6772, -79.7751, 50.0000, 0.0000, -82.7485, 2.0425),
    (50.0000, 3.1571, -77.2803, 50.0000, 0.0000, -82.7485, 2.8615),
    (50.0000, 2.8361, -74.0200, 50.0000, 0.0000, -82.7485, 3.4412),
    (50.0000, -1.3802, -84.2814, 50.0000, 0.0000, -82.7485, 1.0000),
    (50.0000, -1.1848, -84.8006, 50.0000, 0.0000, -82.7485, 1.0000),
    (50.0000, -0.9009, -85.5211, 50.0000, 0.0000, -82.7485, 1.0000),
    (50.0000, 0.0000, 0.0000, 50.0000, -1.0000, 2.0000, 2.3669),
    (50.0000, -1.0000, 2.0000, 50.0000, 0.0000, 0.0000, 2.3669),
    (50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0009, 7.1792),
    (50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0010, 7.1792),
    (50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0011, 7.2195),
    (50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0012, 7.2195),
    (50.0000, -0.0010, 2.4900, 50.0000, 0.0009, -2.4900, 4.8045),
    (50.0000, -0.0010, 2.4900, 50.0000, 0.0010, -2.4900, 4.8045),
    (50.0000, -0.0010, 2.4900, 50.0000, 0.0011, -2.4900, 4.7461),
    (50.0000, 2.5000, 0.0000, 50.0000, 0.0000, -2.5000, 4.3065),
    (50.0000, 2.5000, 0.0000, 73.0000, 25.0000, -18.0000, 27.1492),
    (50.0000, 2.5000, 0.0000, 61.0000, -5.0000, 29.0000, 22.8977),
    (50.0000, 2.5000, 0.0000, 56.0000, -27.0000, -3.0000, 31.9030),
    (50.0000, 2.5000, 0.0000, 58.0000, 24.0000, 15.0000, 19.4535),
    (50.0000, 2.5000, 0.0000, 50.0000, 3.1736, 0.5854, 1.0000),
    (50.0000, 2.5000, 0.0000, 50.0000, 3.2972, 0.0000, 1.0000),
    (50.0000, 2.5000, 0.0000, 50.0000, 1.8634, 0.5757, 1.0000),
    (50.0000, 2.5000, 0.0000, 50.0000, 3.2592, 0.3350, 1.0000),
    (60.2574, -34.0099, 36.2677, 60.4626, -34.1751, 39.4387, 1.2644),
    (63.0109, -31.0961, -5.8663, 62.8187, -29.7946, -4.0864, 1.2630),
    (61.2901, 3.7196, -5.3901, 61.4292, 2.2480, -4.9620, 1.8731),
    (35.0831, -44.1164, 3.7933, 35.0232, -40.0716, 1.5901, 1.8645),
    (22.7233, 20.0904, -46.6940, 23.0331, 14.9730, -42.5619, 2.0373),
    (36.4612, 47.8580, 18.3852, 36.2715, 50.5065, 21.2231, 1.4146),
    (90.8027, -2.0831, 1.4410, 91.1528, -1.6435, 0.0447, 1.4441),
    (90.9257, -0.5406, -0.9208, 88.6381, -0.8985, -0.7239, 1.5381),
    (6.7747, -0.2908, -2.4247, 5.8714, -0.0985, -2.2286, 0.6377),
    (2.0776, 0.0795, -1.1350, 0.9033, -0.0636, -0.5514, 0.9082),
]
_TABLE = np.array(SHARMA_2005_TABLE_1)
_LAB1, _LAB2, _DE00 = _TABLE[:, 0:3], _TABLE[:, 3:6], _TABLE[:, 6]


def _random_lab(seed: int, n: int) -> np.ndarray:
    rng = np.random.default_rng(seed)
    return rng.uniform([0.0, -128.0, -128.0], [100.0, 127.0, 127.0], size=(n, 3))


def test_table_has_34_pairs() -> None:
    assert _TABLE.shape == (34, 7)


def test_table_rows_agree_with_colour_science() -> None:
    # Guards the typed table: colour-science implements the same formula
    # (colour.difference.delta_E_CIE2000, after Sharma et al. 2005).
    reference = colour.delta_E(_LAB1, _LAB2, method="CIE 2000")
    np.testing.assert_array_equal(np.round(reference, 4), _DE00)


def test_delta_e_2000_matches_sharma_2005_table_1() -> None:
    # Sharma, Wu & Dalal (2005), table 1, compared as printed (4 decimals); this
    # also covers pairs 9-15, whose hues lie at or around 180° apart.
    np.testing.assert_array_equal(np.round(delta_e_2000(_LAB1, _LAB2), 4), _DE00)


def test_delta_e_2000_table_1_each_pair_alone() -> None:
    # Same source; one pair at a time exercises the scalar path.
    for lab1, lab2, expected in zip(_LAB1, _LAB2, _DE00):
        value = delta_e_2000(lab1, lab2)
        assert value.shape == ()
        assert round(float(value), 4) == expected


def test_delta_e_2000_matches_colour_science_on_random_pairs() -> None:
    # Reference: colour.delta_E(method="CIE 2000") (colour-science 0.4.x).
    lab1, lab2 = _random_lab(1, 20000), _random_lab(2, 20000)
    near = lab1 + np.random.default_rng(3).normal(0.0, 2.0, lab1.shape)
    for other in (lab2, near):
        np.testing.assert_allclose(
            delta_e_2000(lab1, other), colour.delta_E(lab1, other, method="CIE 2000"), rtol=1e-10, atol=1e-12
        )


def test_delta_e_2000_neutral_against_every_hue() -> None:
    # Sharma et al. (2005) conventions for a zero chroma (h' = 0, Δh' = 0, h̄' = h1' + h2'),
    # checked against colour.delta_E(method="CIE 2000").
    hue = np.radians(np.arange(0.0, 360.0, 7.5))
    other = np.stack([np.full_like(hue, 45.0), 30.0 * np.cos(hue), 30.0 * np.sin(hue)], axis=-1)
    gray = np.array([55.0, 0.0, 0.0])
    for lab1, lab2 in ((gray, other), (other, gray)):
        expected = colour.delta_E(np.broadcast_to(lab1, other.shape), np.broadcast_to(lab2, other.shape), method="CIE 2000")
        np.testing.assert_allclose(delta_e_2000(lab1, lab2), expected, rtol=1e-10)


def test_delta_e_2000_lightness_weight_matches_colour_textiles() -> None:
    # colour-science's textiles=True is kL = 2, kC = kH = 1 (CIE 142-2001 parametric factors).
    lab1, lab2 = _random_lab(4, 2000), _random_lab(5, 2000)
    np.testing.assert_allclose(
        delta_e_2000(lab1, lab2, kL=2.0),
        colour.difference.delta_E_CIE2000(lab1, lab2, textiles=True),
        rtol=1e-10,
    )


def test_delta_e_2000_broadcasts() -> None:
    out = delta_e_2000(_LAB1[:, None, :], _LAB2[None, :5, :])
    assert out.shape == (34, 5)
    np.testing.assert_allclose(out[:5, :5].diagonal(), delta_e_2000(_LAB1[:5], _LAB2[:5]), rtol=1e-14)
    # One reference colour against many.
    np.testing.assert_allclose(
        delta_e_2000(_LAB1[0], _LAB2), colour.delta_E(np.broadcast_to(_LAB1[0], _LAB2.shape), _LAB2, method="CIE 2000"),
        rtol=1e-10,
    )


@pytest.mark.parametrize("f", [delta_e_1976, delta_e_1994, delta_e_2000])
def test_rejects_wrong_shapes_with_project_error(f) -> None:
    with pytest.raises(InputError):
        f(np.zeros((4, 2)), np.zeros((4, 2)))
    with pytest.raises(InputError):
        f(np.zeros((4, 3)), np.zeros((5, 3)))


def test_delta_e_1976_worked_example() -> None:
    # Hand-worked from CIE 015:2018 eq. 8.21: differences (3, 4, 12) give sqrt(9+16+144) = 13.
    assert float(delta_e_1976([50.0, 10.0, -20.0], [53.0, 14.0, -8.0])) == pytest.approx(13.0, abs=1e-12)


def test_delta_e_1976_matches_colour_science() -> None:
    # Reference: colour.delta_E(method="CIE 1976").
    lab1, lab2 = _random_lab(6, 5000), _random_lab(7, 5000)
    np.testing.assert_allclose(delta_e_1976(lab1, lab2), colour.delta_E(lab1, lab2, method="CIE 1976"), rtol=1e-10)


def test_delta_e_1994_worked_example() -> None:
    # Hand-worked from CIE 116-1995 (graphic arts): reference (50, 30, 40) has
    # C* = 50, so SC = 1 + 0.045*50 = 3.25 and SH = 1 + 0.015*50 = 1.75.
    # Sample (55, 40, 30) also has C* = 50: ΔC* = 0, ΔH*² = 10² + 10² = 200.
    # ΔE94 = sqrt(5² + 0 + 200 / 1.75²) = sqrt(25 + 65.306122...) = 9.50295...
    expected = np.sqrt(25.0 + 200.0 / 1.75**2)
    assert float(delta_e_1994([50.0, 30.0, 40.0], [55.0, 40.0, 30.0])) == pytest.approx(expected, rel=1e-12)
    # Textiles: kL = 2, SH = 1 + 0.014*50 = 1.7.
    expected_textiles = np.sqrt(2.5**2 + 200.0 / 1.7**2)
    assert float(delta_e_1994([50.0, 30.0, 40.0], [55.0, 40.0, 30.0], textiles=True)) == pytest.approx(
        expected_textiles, rel=1e-12
    )


@pytest.mark.parametrize("textiles", [False, True])
def test_delta_e_1994_matches_colour_science(textiles: bool) -> None:
    # Reference: colour.difference.delta_E_CIE1994 (first argument is the reference).
    lab1, lab2 = _random_lab(8, 5000), _random_lab(9, 5000)
    np.testing.assert_allclose(
        delta_e_1994(lab1, lab2, textiles=textiles),
        colour.difference.delta_E_CIE1994(lab1, lab2, textiles=textiles),
        rtol=1e-10,
    )


def test_delta_e_1994_is_asymmetric() -> None:
    # CIE 116-1995 weights by the reference's chroma, so swapping arguments
    # changes the result when the chromas differ (here C* = 0 vs 50).
    forward = float(delta_e_1994([50.0, 0.0, 0.0], [50.0, 30.0, 40.0]))
    backward = float(delta_e_1994([50.0, 30.0, 40.0], [50.0, 0.0, 0.0]))
    assert forward == pytest.approx(50.0, rel=1e-12)  # SC = 1 for a neutral reference
    assert backward == pytest.approx(50.0 / 3.25, rel=1e-12)


_lab = st.tuples(
    st.floats(0.0, 100.0),
    st.floats(-128.0, 127.0),
    st.floats(-128.0, 127.0),
)
_lab_arrays = arrays(
    np.float64,
    (8, 3),
    elements=st.floats(-128.0, 127.0, allow_nan=False),
)


# Properties of a metric (ΔE*ab, CIEDE2000) or of a difference in general (ΔE94,
# which is not symmetric: see test_delta_e_1994_is_asymmetric).
@settings(max_examples=200, deadline=None)
@given(_lab, _lab)
def test_symmetric_non_negative_finite(lab1: tuple, lab2: tuple) -> None:
    for f in (delta_e_1976, delta_e_2000):
        forward, backward = float(f(lab1, lab2)), float(f(lab2, lab1))
        assert np.isfinite(forward) and forward >= 0.0
        assert forward == pytest.approx(backward, rel=1e-12, abs=1e-12)
    d94 = float(delta_e_1994(lab1, lab2))
    assert np.isfinite(d94) and d94 >= 0.0


@settings(max_examples=200, deadline=None)
@given(_lab_arrays)
def test_zero_for_identical_colours(lab: np.ndarray) -> None:
    for f in (delta_e_1976, delta_e_1994, delta_e_2000):
        np.testing.assert_array_equal(f(lab, lab), np.zeros(8))


@settings(max_examples=100, deadline=None)
@given(_lab_arrays, _lab_arrays)
def test_arrays_non_negative_finite(lab1: np.ndarray, lab2: np.ndarray) -> None:
    for f in (delta_e_1976, delta_e_1994, delta_e_2000):
        out = f(lab1, lab2)
        assert out.shape == (8,)
        assert np.all(np.isfinite(out)) and np.all(out >= 0.0)


def test_delta_e_2000_over_equals_the_plain_comparison():
    # The ΔE*ab shortcut must never change the answer: compared with
    # delta_e_2000(...) > limit on pairs spread from identical to far apart,
    # many of them near the limit, neutrals and saturated colours included.
    rng = np.random.default_rng(17)
    n = 200_000
    lab1 = np.column_stack([rng.uniform(0, 100, n), rng.uniform(-128, 128, n), rng.uniform(-128, 128, n)])
    lab1[: n // 4, 1:] *= 0.02  # near-neutral
    step = rng.normal(size=(n, 3))
    step *= (rng.uniform(0.0, 3.0, n) / np.linalg.norm(step, axis=1))[:, None]
    lab2 = lab1 + step
    for limit in (0.5, 1.0, 2.0, 2.3):
        want = delta_e_2000(lab1, lab2) > limit
        assert np.array_equal(delta_e_2000_over(lab1, lab2, limit), want)


def test_de2000_per_de76_bounds_the_ratio():
    # The derived bound (Sharma, Wu & Dalal 2005 terms, see DE2000_PER_DE76)
    # checked on random pairs: small steps from anywhere, where the weights
    # matter most, and arbitrary pairs.
    rng = np.random.default_rng(23)
    n = 500_000
    lab1 = np.column_stack([rng.uniform(0, 100, n), rng.uniform(-128, 128, n), rng.uniform(-128, 128, n)])
    lab1[: n // 3, 1:] *= rng.uniform(0, 0.05, (n // 3, 1))
    lab2 = lab1 + rng.normal(0, 0.5, (n, 3))
    lab2[n // 2 :] = np.column_stack([rng.uniform(0, 100, n - n // 2), rng.uniform(-128, 128, (n - n // 2, 2))])
    ratio = delta_e_2000(lab1, lab2) / delta_e_1976(lab1, lab2)
    assert np.nanmax(ratio) < DE2000_PER_DE76
