"""Unique colours: checked against numpy's own np.unique (sort-based reference)."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra.numpy import arrays

from inkshift.chart.unique import IndexedImage, UniqueColors, expand, pack_colors, pixel_runs, rgbx_rows, unique_colors


def _reference(pixels: np.ndarray):
    c = pixels.shape[2]
    # Rows viewed as one opaque item each (what np.unique(axis=0) does inside,
    # without its per-call overhead on large inputs).
    rows = np.ascontiguousarray(pixels.reshape(-1, c)).view(np.dtype((np.void, c))).reshape(-1)
    items, inverse, counts = np.unique(rows, return_inverse=True, return_counts=True)
    colors = items.view(np.uint8).reshape(-1, c)
    return colors, inverse.reshape(-1), counts


def _check(pixels: np.ndarray) -> UniqueColors:
    u = unique_colors(pixels)
    colors, inverse, counts = _reference(pixels)
    np.testing.assert_array_equal(u.colors, colors)
    np.testing.assert_array_equal(u.inverse, inverse)
    np.testing.assert_array_equal(u.counts, counts)
    assert u.colors.dtype == np.uint8
    assert u.inverse.dtype == np.int32
    assert u.counts.dtype == np.int32  # under 2**31 pixels no count can overflow it
    assert u.shape == pixels.shape[:2]
    # Round trip: one np.take rebuilds the image exactly.
    np.testing.assert_array_equal(expand(u.colors, u.inverse, u.shape), pixels)
    return u


@pytest.mark.parametrize("channels", [1, 3, 4])
def test_matches_np_unique_noise(channels):
    # Every pixel differs from its neighbour and there are more than 2**16
    # pixels: the direct table route (no runs, no small-input sort).
    rng = np.random.default_rng(1)
    _check(rng.integers(0, 256, (300, 301, channels), dtype=np.uint8))


@pytest.mark.parametrize("channels", [1, 3, 4])
def test_matches_np_unique_runs(channels):
    # Long runs of one colour, as in charts: the run route.
    rng = np.random.default_rng(2)
    base = rng.integers(0, 6, (20, 9, channels), dtype=np.uint8) * 50
    _check(np.repeat(base, 12, axis=1))
    # More than 2**16 runs: the runs are ranked by the table.
    many = rng.integers(0, 256, (170, 400, channels), dtype=np.uint8)
    _check(np.repeat(many, 4, axis=1))


def test_cmyk_with_many_colours_uses_the_sort_fallback_correctly():
    # > 4096 distinct values in both 16-bit halves: the dense key space would
    # exceed 2**24, so the CMYK route falls back to np.unique; results must agree.
    rng = np.random.default_rng(3)
    _check(rng.integers(0, 256, (300, 300, 4), dtype=np.uint8))


def test_pack_colors_is_most_significant_channel_first():
    # Reference: the arithmetic definition r * 65536 + g * 256 + b.
    rng = np.random.default_rng(4)
    c = rng.integers(0, 256, (1000, 3), dtype=np.uint8)
    ref = c[:, 0].astype(np.uint64) * 65536 + c[:, 1].astype(np.uint64) * 256 + c[:, 2]
    np.testing.assert_array_equal(pack_colors(c), ref)
    k = rng.integers(0, 256, (1000, 4), dtype=np.uint8)
    ref4 = ((k[:, 0].astype(np.uint64) * 256 + k[:, 1]) * 256 + k[:, 2]) * 256 + k[:, 3]
    np.testing.assert_array_equal(pack_colors(k), ref4)
    u = unique_colors(c.reshape(10, 100, 3))
    # The unique colours come in ascending key order.
    np.testing.assert_array_equal(pack_colors(u.colors), np.unique(ref))


def test_expand_maps_per_colour_vectors():
    pixels = np.array([[[0, 0, 0], [9, 9, 9]], [[9, 9, 9], [0, 0, 0]]], np.uint8)
    u = unique_colors(pixels)
    values = np.array([[1.5, 2.5], [3.5, 4.5]])  # per colour: black, then gray 9
    out = expand(values, u.inverse, u.shape)
    assert out.shape == (2, 2, 2)
    np.testing.assert_array_equal(out[0, 0], [1.5, 2.5])
    np.testing.assert_array_equal(out[0, 1], [3.5, 4.5])


def test_rejects_wrong_input():
    with pytest.raises(ValueError):
        unique_colors(np.zeros((4, 4, 3), np.uint16))
    with pytest.raises(ValueError):
        unique_colors(np.zeros((4, 4), np.uint8))


@settings(max_examples=60, deadline=None)
@given(
    arrays(
        np.uint8,
        st.tuples(st.integers(1, 12), st.integers(1, 12), st.sampled_from([1, 3, 4])),
        elements=st.sampled_from([0, 1, 127, 128, 254, 255]),
    )
)
def test_property_equals_np_unique(pixels):
    _check(pixels)


def test_expand_by_runs_equals_the_plain_gather():
    from inkshift.chart.unique import pixel_runs

    img = np.zeros((40, 60, 3), np.uint8)
    img[5:30, 10:50] = (200, 30, 30)
    img[:, 55:] = (0, 0, 255)
    u = unique_colors(img)
    runs = pixel_runs(u.inverse)
    assert runs is not None
    values = np.arange(len(u), dtype=np.float32) * 1.5
    np.testing.assert_array_equal(expand(values, u.inverse, img.shape[:2], runs=runs), expand(values, u.inverse, img.shape[:2]))


def _stripes(rng: np.random.Generator, h: int, w: int) -> np.ndarray:
    """A chart-like image: long runs of a few colours, with some noise pixels."""
    img = np.repeat(rng.integers(0, 6, (h, w // 9 + 1, 3), dtype=np.uint8) * 40, 9, axis=1)[:, :w]
    noisy = rng.random((h, w)) < 0.05
    img[noisy] = rng.integers(0, 256, (int(noisy.sum()), 3), dtype=np.uint8)
    return np.ascontiguousarray(img)


@pytest.mark.parametrize("with_runs", [False, True])
def test_indexed_image_rows_equal_the_expanded_map(with_runs):
    # Reference: the per-pixel arrays (the image itself and values[inverse]).
    rng = np.random.default_rng(8)
    img = _stripes(rng, 41, 67)
    u = unique_colors(img)
    runs = pixel_runs(u.inverse) if with_runs else None
    assert (runs is not None) == with_runs
    rgb = IndexedImage(u.colors, u.inverse, u.shape, runs)
    per_colour = rng.random(len(u))
    values = IndexedImage(per_colour, u.inverse, u.shape, runs)
    want_values = per_colour[u.inverse].reshape(u.shape)
    assert rgb.shape == img.shape and values.shape == u.shape
    np.testing.assert_array_equal(np.asarray(rgb), img)
    for y0 in range(0, 41, 6):
        for y1 in (y0, y0 + 1, y0 + 7, 41, 60):
            np.testing.assert_array_equal(rgb[y0:y1], img[y0:y1])
            np.testing.assert_array_equal(values[y0:y1], want_values[y0:y1])
    with pytest.raises(TypeError):
        rgb[3]


def test_rgbx_rows_are_gathered_without_a_packed_copy():
    rng = np.random.default_rng(9)
    img = _stripes(rng, 20, 30)
    u = unique_colors(img)
    # unique_colors lays RGB out as RGBX words; a copy into a plain array is packed.
    assert u.colors.strides == (4, 1)
    direct = IndexedImage(u.colors, u.inverse, u.shape)
    plain = IndexedImage(np.ascontiguousarray(u.colors), u.inverse, u.shape)
    assert np.shares_memory(direct._packed, u.colors)
    assert not np.shares_memory(plain._packed, u.colors)
    np.testing.assert_array_equal(np.asarray(direct), img)
    np.testing.assert_array_equal(np.asarray(plain), img)
    rows = rgbx_rows(5)
    assert rows.shape == (5, 3) and rows.base.shape == (5, 4) and not rows.any()
