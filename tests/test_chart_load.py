"""Chart loading: formats, modes, profiles, limits and errors.

References: Pillow (the decoder) for the formats' own pixel values; the PNG
specification (ISO/IEC 15948, W3C PNG 2nd edition) for the hand-built 16-bit
and oversized files; ICC.1:2022 section 7.2.6 for the colour-space signature
at bytes 16-19 of a profile header.
"""

from __future__ import annotations

import hashlib
import io
import struct
import warnings
import zlib
from fractions import Fraction
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

from conftest import require_file
from inkshift.chart.load import MAX_PIXELS_DEFAULT, ChartImage, load_chart
from inkshift.errors import ImageError
from inkshift.icc.cms import srgb_profile_bytes

GRAY_ICC = "/usr/share/color/icc/ghostscript/sgray.icc"


def _png(width: int, height: int, bit_depth: int, color_type: int, raw_rows: bytes) -> bytes:
    """A minimal PNG (IHDR, IDAT, IEND) as in the PNG specification, section 11.2."""

    def chunk(kind: bytes, data: bytes) -> bytes:
        return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF)

    ihdr = struct.pack(">IIBBBBB", width, height, bit_depth, color_type, 0, 0, 0)
    return b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", ihdr) + chunk(b"IDAT", zlib.compress(raw_rows)) + chunk(b"IEND", b"")


def _rows16(arr: np.ndarray) -> bytes:
    """Filter type 0 rows of big-endian 16-bit samples."""
    h = arr.shape[0]
    flat = arr.reshape(h, -1).astype(">u2")
    return b"".join(b"\x00" + flat[y].tobytes() for y in range(h))


def _save(tmp_path: Path, im: Image.Image, name: str, **kw) -> Path:
    path = tmp_path / name
    im.save(path, **kw)
    return path


def _rgb_test_image() -> np.ndarray:
    rng = np.random.default_rng(7)
    return rng.integers(0, 256, (23, 31, 3), dtype=np.uint8)


@pytest.mark.parametrize(
    "name, kw",
    [
        ("c.png", {}),
        ("c.tif", {}),
        ("c.bmp", {}),
        ("c.webp", {"lossless": True}),
    ],
)
def test_lossless_formats_round_trip(tmp_path, name, kw):
    arr = _rgb_test_image()
    path = _save(tmp_path, Image.fromarray(arr), name, **kw)
    chart = load_chart(path)
    assert isinstance(chart, ChartImage)
    assert chart.space == "RGB" and chart.pixels.shape == (23, 31, 3)
    np.testing.assert_array_equal(chart.pixels, arr)
    assert chart.alpha is None and chart.path == str(path)
    assert (chart.width, chart.height) == (31, 23)
    assert chart.notes == []


def test_jpeg_is_decoded_like_pillow(tmp_path):
    arr = _rgb_test_image()
    path = _save(tmp_path, Image.fromarray(arr), "c.jpg", quality=90)
    chart = load_chart(path)
    np.testing.assert_array_equal(chart.pixels, np.asarray(Image.open(path).convert("RGB")))
    assert chart.format == "JPEG"


def test_rgba_alpha_kept_only_when_not_opaque(tmp_path):
    arr = np.dstack([_rgb_test_image(), np.full((23, 31), 255, np.uint8)])
    opaque = load_chart(_save(tmp_path, Image.fromarray(arr, "RGBA"), "o.png"))
    assert opaque.alpha is None and opaque.pixels.shape[2] == 3
    arr[0, 0, 3] = 0
    arr[1, 1, 3] = 128
    partly = load_chart(_save(tmp_path, Image.fromarray(arr, "RGBA"), "t.png"))
    assert partly.alpha is not None
    np.testing.assert_array_equal(partly.alpha, arr[..., 3])
    np.testing.assert_array_equal(partly.pixels, arr[..., :3])


def test_palette_image_with_transparency_and_profile(tmp_path):
    im = Image.new("P", (4, 3))
    im.putpalette([255, 0, 0, 0, 0, 255] + [0] * 762)
    im.putpixel((0, 0), 1)
    icc = srgb_profile_bytes()
    path = _save(tmp_path, im, "p.png", transparency=1, icc_profile=icc)
    chart = load_chart(path)
    assert chart.space == "RGB"
    assert tuple(chart.pixels[0, 1]) == (255, 0, 0)
    assert chart.alpha is not None and chart.alpha[0, 0] == 0 and chart.alpha[0, 1] == 255
    assert chart.icc == icc  # the profile describes the palette's RGB
    assert any("palette image expanded" in n for n in chart.notes)


def test_bilevel_gray_and_gray_alpha(tmp_path):
    one = Image.new("1", (3, 2), 0)
    one.putpixel((1, 0), 1)
    chart = load_chart(_save(tmp_path, one, "b.png"))
    assert chart.space == "GRAY" and chart.pixels.shape == (2, 3, 1)
    assert chart.pixels[0, 1, 0] == 255 and chart.pixels[0, 0, 0] == 0
    la = Image.fromarray(np.dstack([np.full((2, 2), 90, np.uint8), np.array([[0, 255], [255, 255]], np.uint8)]), "LA")
    chart = load_chart(_save(tmp_path, la, "la.png"))
    assert chart.space == "GRAY" and chart.alpha is not None and chart.alpha[0, 0] == 0


def test_gray_with_rgb_profile_is_repeated_to_rgb(tmp_path):
    icc = srgb_profile_bytes()
    assert icc[16:20] == b"RGB "  # ICC.1:2022 7.2.6 data colour space field
    gray = Image.fromarray(np.array([[10, 200]], np.uint8), "L")
    chart = load_chart(_save(tmp_path, gray, "g.png", icc_profile=icc))
    assert chart.space == "RGB"
    np.testing.assert_array_equal(chart.pixels[0, 1], [200, 200, 200])
    assert chart.icc == icc
    assert any("repeated to RGB" in n for n in chart.notes)


def test_gray_with_gray_profile_keeps_it(tmp_path):
    icc = require_file(GRAY_ICC).read_bytes()
    assert icc[16:20] == b"GRAY"
    gray = Image.fromarray(np.array([[10, 200]], np.uint8), "L")
    chart = load_chart(_save(tmp_path, gray, "g.png", icc_profile=icc))
    assert chart.space == "GRAY" and chart.icc == icc


def test_mismatched_profile_is_dropped_with_a_note(tmp_path):
    icc = require_file(GRAY_ICC).read_bytes()
    chart = load_chart(_save(tmp_path, Image.fromarray(_rgb_test_image()), "m.png", icc_profile=icc))
    assert chart.icc is None
    assert any("does not fit" in n for n in chart.notes)


def test_16_bit_gray_png_is_rounded(tmp_path):
    values = np.array([[0, 128, 129, 385, 32767, 32896, 65407, 65535]], np.uint16)
    path = tmp_path / "g16.png"
    path.write_bytes(_png(values.shape[1], 1, 16, 0, _rows16(values)))
    chart = load_chart(path)
    # Reference: exact rational rounding of v * 255 / 65535.
    expected = [round(Fraction(int(v) * 255, 65535)) for v in values[0]]
    assert chart.pixels[0, :, 0].tolist() == expected
    assert any("16-bit" in n for n in chart.notes)


def test_16_bit_rgb_png_is_reduced_with_a_note(tmp_path):
    values = np.array([[[0, 200, 65535], [32896, 384, 65407]]], np.uint16)
    path = tmp_path / "rgb16.png"
    path.write_bytes(_png(2, 1, 16, 2, _rows16(values)))
    chart = load_chart(path)
    exact = np.vectorize(lambda v: float(Fraction(int(v) * 255, 65535)))(values)
    assert chart.space == "RGB"
    assert np.all(np.abs(chart.pixels - exact) < 1.0)  # Pillow keeps the high byte
    assert any("16-bit" in n for n in chart.notes)


def test_cmyk_jpeg_with_adobe_marker_is_not_inverted(tmp_path):
    inks = np.zeros((16, 16, 4), np.uint8)
    inks[:, :8] = (200, 30, 0, 10)
    inks[:, 8:] = (0, 0, 0, 230)
    path = _save(tmp_path, Image.fromarray(inks, "CMYK"), "k.jpg", quality=95)
    with Image.open(path) as im:
        assert "adobe" in im.info  # the APP14 marker Pillow reads to undo the inversion
    chart = load_chart(path)
    assert chart.space == "CMYK"
    assert np.abs(chart.pixels.astype(int) - inks).max() <= 6  # JPEG error, not 255 - v


def test_ycbcr_is_converted_to_rgb():
    ycc = Image.new("YCbCr", (2, 2), (128, 90, 200))
    chart = load_chart(ycc)
    assert chart.space == "RGB"
    # Reference: Pillow's own ITU-R BT.601 conversion.
    np.testing.assert_array_equal(chart.pixels, np.asarray(ycc.convert("RGB")))


def test_gif_first_frame_with_a_note(tmp_path):
    frames = [Image.new("P", (5, 5), i) for i in range(3)]
    for i, f in enumerate(frames):
        f.putpalette([0, 0, 0, 255, 0, 0, 0, 255, 0] + [0] * 759)
    path = tmp_path / "a.gif"
    frames[0].save(path, save_all=True, append_images=frames[1:], duration=100)
    chart = load_chart(path)
    assert chart.space == "RGB"
    assert tuple(chart.pixels[0, 0]) == (0, 0, 0)
    assert any("first frame of 3" in n for n in chart.notes)


def test_int_and_float_modes():
    ok_i = Image.fromarray(np.array([[0, 65535]], np.int32), "I")
    assert load_chart(ok_i).pixels[0, :, 0].tolist() == [0, 255]
    with pytest.raises(ImageError, match="outside 0..65535"):
        load_chart(Image.fromarray(np.array([[-1, 70000]], np.int32), "I"))
    ok_f = Image.fromarray(np.array([[0.0, 0.5, 1.0]], np.float32), "F")
    assert load_chart(ok_f).pixels[0, :, 0].tolist() == [0, 128, 255]
    with pytest.raises(ImageError, match="outside 0..1"):
        load_chart(Image.fromarray(np.array([[0.0, 2.0]], np.float32), "F"))


def test_unsupported_mode_is_refused():
    with pytest.raises(ImageError, match="mode HSV is not supported"):
        load_chart(Image.new("HSV", (2, 2)))


def test_exif_orientation_is_applied(tmp_path):
    arr = np.zeros((4, 6, 3), np.uint8)
    arr[0, 0] = (255, 0, 0)
    im = Image.fromarray(arr)
    exif = Image.Exif()
    exif[0x0112] = 6  # rotate 90° clockwise to display (EXIF 2.32, Orientation)
    path = _save(tmp_path, im, "o.png", exif=exif)
    chart = load_chart(path)
    assert chart.pixels.shape == (6, 4, 3)
    assert tuple(chart.pixels[0, 3]) == (255, 0, 0)
    assert any("EXIF orientation" in n for n in chart.notes)


def test_file_is_not_modified(tmp_path):
    path = _save(tmp_path, Image.fromarray(_rgb_test_image()), "c.png")
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    load_chart(path)
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before


# --- Limits ---------------------------------------------------------------


def test_default_limit_is_above_a_60_megapixel_poster():
    assert MAX_PIXELS_DEFAULT > 60_000_000


def test_declared_size_over_the_limit_is_refused_before_decoding(tmp_path):
    # Header says 30000 x 30000 (900 MP); the pixel data is absent. Pillow would
    # raise DecompressionBombError; the loader must answer with its own one line.
    path = tmp_path / "huge.png"
    path.write_bytes(_png(30000, 30000, 8, 2, b""))
    with pytest.raises(ImageError) as info:
        load_chart(path)
    msg = str(info.value)
    assert "30000 x 30000 = 900000000 pixels, over the limit of 200000000" in msg
    assert "\n" not in msg


def test_pillow_bomb_check_is_replaced_by_the_project_limit(tmp_path, monkeypatch):
    monkeypatch.setattr(Image, "MAX_IMAGE_PIXELS", 100)
    path = _save(tmp_path, Image.fromarray(_rgb_test_image()), "c.png")  # 713 px > 2 x 100
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        chart = load_chart(path)
    assert chart.pixels.shape == (23, 31, 3)
    assert Image.MAX_IMAGE_PIXELS == 100  # restored
    with pytest.raises(ImageError, match="over the limit of 500"):
        load_chart(path, max_pixels=500)


# --- Errors -----------------------------------------------------------------


def _one_line_error(source) -> str:
    with pytest.raises(ImageError) as info:
        load_chart(source)
    msg = str(info.value)
    assert "\n" not in msg
    return msg


def test_errors_are_one_line_and_name_the_file(tmp_path):
    missing = tmp_path / "nope.png"
    assert _one_line_error(missing) == f"{missing}: file not found"
    assert "is a directory" in _one_line_error(tmp_path)
    empty = tmp_path / "empty.png"
    empty.write_bytes(b"")
    assert _one_line_error(empty) == f"{empty}: file is empty"
    text = tmp_path / "notes.png"
    text.write_text("these are not pixels\n")
    assert "not a PNG, JPEG, TIFF, WebP, BMP or GIF image" in _one_line_error(text)
    good = io.BytesIO()
    Image.fromarray(_rgb_test_image()).save(good, "PNG")
    truncated = tmp_path / "cut.png"
    truncated.write_bytes(good.getvalue()[: len(good.getvalue()) // 2])
    msg = _one_line_error(truncated)
    assert msg.startswith(f"{truncated}: ")
    psd_like = tmp_path / "c.ico"
    Image.fromarray(_rgb_test_image()).save(psd_like, "ICO")
    assert "not a PNG" in _one_line_error(psd_like)


# --- Arrays -----------------------------------------------------------------


def test_numpy_arrays():
    g = load_chart(np.zeros((3, 4), np.uint8))
    assert g.space == "GRAY" and g.pixels.shape == (3, 4, 1) and g.path is None
    rgb = _rgb_test_image()
    r = load_chart(rgb)
    np.testing.assert_array_equal(r.pixels, rgb)
    assert r.pixels is not rgb  # a copy: the caller's array is never touched
    rgba = np.dstack([rgb, np.full(rgb.shape[:2], 7, np.uint8)])
    a = load_chart(rgba)
    assert a.space == "RGB" and a.alpha is not None and int(a.alpha[0, 0]) == 7
    f = load_chart(np.array([[[0.0, 0.5, 1.0]]]))
    assert f.pixels[0, 0].tolist() == [0, 128, 255]
    with pytest.raises(ImageError, match="0..1"):
        load_chart(np.array([[[0.0, 1.5, 1.0]]]))
    with pytest.raises(ImageError, match="dtype int16"):
        load_chart(np.zeros((2, 2, 3), np.int16))
    with pytest.raises(ImageError, match="shape"):
        load_chart(np.zeros((2, 2, 2), np.uint8))
    with pytest.raises(ImageError, match="over the limit"):
        load_chart(np.zeros((10, 10, 3), np.uint8), max_pixels=99)
