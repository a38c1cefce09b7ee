"""The band-by-band PNG writer, checked against an independent decoder.

Reference: Pillow's PNG decoder (libpng-compatible reading of ISO/IEC
15948:2004 files) must give back exactly the pixels and the ICC profile that
were written.
"""

from __future__ import annotations

import numpy as np
import pytest
from PIL import Image

from inkshift.icc.cms import srgb_profile_bytes
from inkshift.report.heatmap import heatmap_bands, heatmap_overlay
from inkshift.report.png import PNG_SIGNATURE, write_png_bands


@pytest.mark.parametrize("shape, band", [((1, 1), 1), ((37, 53), 5), ((64, 200), 64), ((300, 7), 11)])
def test_written_png_decodes_to_the_same_pixels(tmp_path, shape, band):
    rng = np.random.default_rng(shape[0] * 7 + shape[1])
    img = rng.integers(0, 256, shape + (3,), dtype=np.uint8)
    img[: shape[0] // 2, : shape[1] // 2] = (12, 200, 99)  # flat areas as well as noise
    path = tmp_path / "x.png"
    write_png_bands(path, shape[1], shape[0], (img[y : y + band] for y in range(0, shape[0], band)))
    assert path.read_bytes()[:8] == PNG_SIGNATURE
    with Image.open(path) as im:
        assert im.format == "PNG" and im.mode == "RGB"
        assert np.array_equal(np.asarray(im), img)


def test_embedded_profile_reads_back(tmp_path):
    img = np.full((4, 5, 3), 128, np.uint8)
    path = tmp_path / "p.png"
    write_png_bands(path, 5, 4, [img], icc_profile=srgb_profile_bytes())
    with Image.open(path) as im:
        assert im.info.get("icc_profile") == srgb_profile_bytes()
        assert np.array_equal(np.asarray(im), img)


def test_strided_bands_are_accepted(tmp_path):
    rgbx = np.random.default_rng(1).integers(0, 256, (6, 9, 4), dtype=np.uint8)
    path = tmp_path / "s.png"
    write_png_bands(path, 9, 6, [rgbx[:3, :, :3], rgbx[3:, :, :3]])
    with Image.open(path) as im:
        assert np.array_equal(np.asarray(im), rgbx[..., :3])


@pytest.mark.parametrize(
    "bands, problem",
    [([np.zeros((2, 4, 3), np.uint8)], "not 3"), ([np.zeros((3, 5, 3), np.uint8)], "must be"), ([np.zeros((3, 4, 3), float)], "must be")],
)
def test_bad_bands_leave_no_file(tmp_path, bands, problem):
    path = tmp_path / "bad.png"
    with pytest.raises(ValueError, match=problem):
        write_png_bands(path, 4, 3, bands)
    assert list(tmp_path.iterdir()) == []


def test_heat_map_written_in_bands_equals_the_image(tmp_path):
    rng = np.random.default_rng(5)
    rgb = rng.integers(0, 256, (50, 30, 3), dtype=np.uint8)  # narrower than the legend: padded page
    de = rng.gamma(2.0, 2.0, (50, 30))
    oog = rng.random((50, 30)) < 0.2
    width, height, bands = heatmap_bands(rgb, de, oog)
    write_png_bands(tmp_path / "h.png", width, height, bands)
    with Image.open(tmp_path / "h.png") as im:
        assert np.array_equal(np.asarray(im), np.asarray(heatmap_overlay(rgb, de, oog)))


def test_scalar_map_painted_per_colour_equals_the_per_pixel_map(tmp_path):
    # compare's difference maps are painted once per unique colour from an
    # IndexedImage; the per-pixel array path is the reference.
    from inkshift.chart.unique import IndexedImage
    from inkshift.report.heatmap import scalar_bands, scalar_map

    rng = np.random.default_rng(6)
    per_colour = rng.gamma(2.0, 3.0, 40)
    index = rng.integers(0, 40, 70 * 90).astype(np.int32)
    per_pixel = per_colour[index].reshape(70, 90)
    kwargs = dict(title="difference", legend_label="dE00")
    width, height, bands = scalar_bands(IndexedImage(per_colour, index, (70, 90)), **kwargs)
    write_png_bands(tmp_path / "d.png", width, height, bands)
    with Image.open(tmp_path / "d.png") as im:
        assert np.array_equal(np.asarray(im), np.asarray(scalar_map(per_pixel, **kwargs)))
