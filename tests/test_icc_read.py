"""The ICC reader: header and tag values against LittleCMS's own reading (Pillow's
CmsProfile attributes), tag-type details against ICC.1:2022, and a corpus of
malformed profiles that must each raise ProfileError naming the file."""

from __future__ import annotations

import io
import struct
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from PIL import ImageCms

import icc_bytes
from conftest import require_file
from inkshift.errors import ProfileError
from inkshift.icc.cms import srgb_profile_bytes
from inkshift.icc.read import MAX_CLUT_ENTRIES, read_profile

ICC = "/usr/share/color/icc"
GS = "/usr/share/color/icc/ghostscript"
DEBIAN_PROFILES = [
    f"{ICC}/sRGB.icc", f"{ICC}/compatibleWithAdobeRGB1998.icc", f"{ICC}/LStar-RGB.icc", f"{ICC}/Gray.icc",
    f"{ICC}/Gray-CIE_L.icc", f"{ICC}/ITULab.icc", f"{ICC}/LCMSLABI.ICM", f"{ICC}/LCMSXYZI.ICM",
    f"{ICC}/CineLogCurve.icc", f"{ICC}/CineonLog_M.icc",
    f"{GS}/default_cmyk.icc", f"{GS}/ps_cmyk.icc", f"{GS}/ps_rgb.icc", f"{GS}/ps_gray.icc",
    f"{GS}/gray_to_k.icc", f"{GS}/lab.icc", f"{GS}/esrgb.icc",
]


# --- values against LittleCMS (Pillow.ImageCms.core.CmsProfile) ------------------------

@pytest.mark.parametrize("path", DEBIAN_PROFILES + ["builtin"], ids=lambda p: p.rsplit("/", 1)[-1])
def test_header_and_tags_agree_with_littlecms(path: str) -> None:
    data = srgb_profile_bytes() if path == "builtin" else require_file(path).read_bytes()
    ours = read_profile(data, name=path)
    ref = ImageCms.ImageCmsProfile(io.BytesIO(data)).profile
    assert ours.source == path and ours.data == data
    assert round(ours.version[0] + ours.version[1] / 10, 1) == pytest.approx(ref.version)
    assert ours.device_class == ref.device_class
    assert ours.color_space == ref.xcolor_space.strip().upper()
    assert ours.pcs == ref.connection_space.strip().upper()
    assert ours.rendering_intent == ref.rendering_intent
    assert ours.description == ref.profile_description.strip()  # the reader trims padding
    assert ours.copyright == ref.copyright.strip()
    for mine, theirs in ((ours.media_white, ref.media_white_point), (ours.media_black, ref.media_black_point)):
        if theirs is None:
            assert mine is None
        else:
            np.testing.assert_allclose(mine, theirs[0], atol=1e-9)
    if ref.red_colorant is not None:
        for i, col in enumerate((ref.red_colorant, ref.green_colorant, ref.blue_colorant)):
            np.testing.assert_allclose(ours.colorants[:, i], col[0], atol=1e-9)
    if ref.chromatic_adaptation is not None:
        np.testing.assert_allclose(ours.chad, ref.chromatic_adaptation[0], atol=1e-9)
    # LittleCMS's cmsIsIntentSupported (input direction): the intent's own A2Bn tag, or a
    # matrix/TRC or gray TRC model.
    for intent in range(3):
        supported = bool(ref.is_intent_supported(intent, ImageCms.Direction.INPUT))
        assert (f"A2B{intent}" in ours.luts or ours.trcs is not None) == supported


def test_table_profile_structure() -> None:
    # default_cmyk.icc: ICC.1:2022 10.10 lut16 (9^4 CLUT, CMYK -> Lab) and 10.11 lut8 B2A.
    profile = read_profile(require_file(f"{GS}/default_cmyk.icc"))
    a2b = profile.luts["A2B0"]
    assert (a2b.kind, a2b.n_in, a2b.n_out, a2b.clut.grid) == ("lut16", 4, 3, (9, 9, 9, 9))
    assert a2b.clut.table.shape == (9**4, 3)
    b2a = profile.luts["B2A1"]
    assert (b2a.kind, b2a.n_in, b2a.n_out, b2a.clut.grid) == ("lut8", 3, 4, (33, 33, 33))
    assert profile.tags["A2B0"][2] == "mft2" and profile.tags["B2A0"][2] == "mft1"
    assert profile.channels == 4 and profile.trcs is None and profile.gamut is None


def test_curve_kinds() -> None:
    # curveType with 0 entries = identity, 1 = u8Fixed8 gamma, more = table (ICC.1:2022 10.6);
    # LittleCMS's built-in sRGB uses parametricCurveType function 3 (10.18).
    gray = read_profile(require_file(f"{GS}/sgray.icc"))
    assert gray.trcs[0].kind == "gamma" and gray.trcs[0].gamma == pytest.approx(461 / 256)
    scrgb = read_profile(require_file(f"{GS}/scrgb.icc"))
    assert [c.kind for c in scrgb.trcs] == ["identity"] * 3
    srgb = read_profile(require_file(f"{ICC}/sRGB.icc"))
    assert srgb.trcs[0].kind == "table" and srgb.trcs[0].table.size == 1024
    builtin = read_profile(srgb_profile_bytes())
    curve = builtin.trcs[0]
    assert curve.kind == "parametric" and curve.function == 3
    # IEC 61966-2-1 parameters, as s15Fixed16 numbers (1/65536 resolution).
    np.testing.assert_allclose(curve.params, [2.4, 1 / 1.055, 0.055 / 1.055, 1 / 12.92, 0.04045], atol=2e-5)


def test_lut_atob_structure_and_mluc() -> None:
    profile = read_profile(icc_bytes.rgb_lab_ab_profile())
    assert profile.version == (4, 4, 0)
    assert profile.description == "inkshift test RGB lutAtoB"
    a2b = profile.luts["A2B1"]
    kinds = [type(s).__name__ for s in a2b.stages]
    assert kinds == ["CurveSet", "Clut", "CurveSet", "MatrixStage", "CurveSet"]  # ICC.1:2022 10.12.1 order
    assert [c.function for c in a2b.stages[0].curves] == [0, 1, 2]
    assert a2b.clut.grid == (5, 7, 6)
    np.testing.assert_allclose(a2b.stages[3].offset, [0.02, 0.01, 0.03], atol=2e-5)
    b2a = profile.luts["B2A1"]
    assert [type(s).__name__ for s in b2a.stages] == ["CurveSet", "MatrixStage", "CurveSet", "Clut", "CurveSet"]


def test_mluc_prefers_en_us() -> None:
    # ICC.1:2022 10.15: several records; the reader takes en/US, else the first.
    german, english = "Testprofil".encode("utf-16-be"), "Test profile".encode("utf-16-be")
    mluc = b"mluc\0\0\0\0" + struct.pack(">II", 2, 12)
    mluc += struct.pack(">2s2sII", b"de", b"DE", len(german), 40)
    mluc += struct.pack(">2s2sII", b"en", b"US", len(english), 40 + len(german))
    mluc += german + english
    data = icc_bytes.profile_bytes({"desc": mluc, "wtpt": icc_bytes.xyz_tag([0.9642, 1, 0.8249]),
                                    "kTRC": icc_bytes.curv_gamma(2.2)}, space=b"GRAY", pcs=b"XYZ ")
    profile = read_profile(data)
    assert profile.description == "Test profile"
    assert profile.is_gray_trc and profile.trcs[0].gamma == pytest.approx(2.2, abs=1 / 256)


# --- malformed profiles ----------------------------------------------------------------

def _tag_entry(data: bytes, sig: bytes) -> int:
    """Byte position of ``sig``'s entry in the tag table."""
    count = struct.unpack_from(">I", data, 128)[0]
    for i in range(count):
        pos = 132 + 12 * i
        if data[pos:pos + 4] == sig:
            return pos
    raise AssertionError(f"no tag {sig!r}")


def _tag_offset(data: bytes, sig: bytes) -> int:
    return struct.unpack_from(">I", data, _tag_entry(data, sig) + 4)[0]


def _patch(data: bytes, pos: int, new: bytes) -> bytes:
    return data[:pos] + new + data[pos + len(new):]


def _set_u32(data: bytes, pos: int, value: int) -> bytes:
    return _patch(data, pos, struct.pack(">I", value))


def _malformed() -> list[tuple[str, bytes, str]]:
    """(case name, bytes, expected words in the message) built from valid profiles."""
    srgb = srgb_profile_bytes()  # v4 matrix/TRC with para curves, chad, mluc
    ab = icc_bytes.rgb_lab_ab_profile()  # v4 lutAtoB / lutBtoA
    cmyk16 = icc_bytes.cmyk_lut16_profile(3)  # v2 lut16 CMYK
    cmyk_ab = icc_bytes.cmyk_xyz_ab_profile()
    rxyz = _tag_offset(srgb, b"rXYZ")
    rtrc = _tag_offset(srgb, b"rTRC")
    a2b = _tag_offset(ab, b"A2B1")
    a2b16 = _tag_offset(cmyk16, b"A2B0")
    a2b_cmyk = _tag_offset(cmyk_ab, b"A2B1")
    clut_off = struct.unpack_from(">I", cmyk_ab, a2b_cmyk + 12 + 12)[0]
    return [
        ("empty", b"", "truncated header"),
        ("truncated-in-header", srgb[:100], "truncated header"),
        ("truncated-in-tag-table", srgb[:140], "declares"),
        ("truncated-in-tag-data", srgb[:len(srgb) - 40], "truncated"),
        ("wrong-acsp", _patch(srgb, 36, b"acsq"), "acsp"),
        ("size-field-too-large", _set_u32(srgb, 0, len(srgb) + 100), "declares"),
        ("size-field-too-small", _set_u32(srgb, 0, 64), "impossible size"),
        ("tag-count-huge", _set_u32(srgb, 128, 10**6), "tag table"),
        ("tag-offset-outside", _set_u32(srgb, _tag_entry(srgb, b"rXYZ") + 4, len(srgb) + 8), "runs past"),
        ("tag-size-outside", _set_u32(srgb, _tag_entry(srgb, b"gXYZ") + 8, 10**7), "runs past"),
        ("tag-offset-in-header", _set_u32(srgb, _tag_entry(srgb, b"bXYZ") + 4, 16), "overlaps"),
        ("zero-length-tag", _set_u32(srgb, _tag_entry(srgb, b"wtpt") + 8, 0), "zero-length"),
        ("xyz-tag-too-short", _set_u32(srgb, _tag_entry(srgb, b"rXYZ") + 8, 12), "20 bytes"),
        ("wrong-xyz-type", _patch(srgb, rxyz, b"curv"), "unknown tag type"),
        ("wrong-trc-type", _patch(srgb, rtrc, b"XYZ "), "unknown tag type"),
        ("para-function-9", _patch(srgb, rtrc + 8, struct.pack(">H", 9)), "function type 9"),
        ("unknown-colour-space", _patch(srgb, 16, b"QQQQ"), "colour space"),
        ("unknown-class", _patch(srgb, 12, b"zzzz"), "profile class"),
        ("pcs-not-xyz-or-lab", _patch(srgb, 20, b"RGB "), "connection space"),
        ("unknown-lut-type", _patch(ab, a2b, b"mft3"), "unknown tag type"),
        ("lut-inputs-vs-colour-space", _patch(ab, a2b + 8, bytes([4])), "inputs"),
        ("lut16-absurd-grid", _patch(cmyk16, a2b16 + 10, bytes([255])), "exceeds the limit"),
        ("lut16-one-point-grid", _patch(cmyk16, a2b16 + 10, bytes([1])), "fewer than 2"),
        ("lut16-zero-table-entries", _patch(cmyk16, a2b16 + 48, struct.pack(">H", 0)), "at least 2 entries"),
        ("lut16-clut-past-tag", _patch(cmyk16, a2b16 + 10, bytes([9])), "CLUT needs"),
        ("mab-absurd-grid", _patch(cmyk_ab, a2b_cmyk + clut_off, bytes([200, 200, 200, 200])), "exceeds the limit"),
        ("mab-precision-3", _patch(cmyk_ab, a2b_cmyk + clut_off + 16, bytes([3])), "precision"),
        ("mab-offset-outside", _set_u32(ab, a2b + 12, 10**6), "outside"),
        ("mab-curve-type", _patch(ab, a2b + struct.unpack_from(">I", ab, a2b + 28)[0], b"zzzz"), "curve type"),
        ("mab-no-b-curves", _set_u32(ab, a2b + 12, 0), "without B curves"),
    ]


MALFORMED = _malformed()


def test_the_malformed_corpus_is_large_enough() -> None:
    assert len(MALFORMED) >= 15
    assert MAX_CLUT_ENTRIES == 2**26


@pytest.mark.parametrize(("case", "data", "words"), MALFORMED, ids=[m[0] for m in MALFORMED])
def test_malformed_profile_raises_profile_error(case: str, data: bytes, words: str) -> None:
    name = f"{case}.icc"
    with pytest.raises(ProfileError) as info:
        read_profile(data, name=name)
    message = str(info.value)
    assert message.startswith(name + ":")
    assert words in message
    assert "\n" not in message


def test_tag_named_in_the_message() -> None:
    srgb = srgb_profile_bytes()
    bad = _patch(srgb, _tag_offset(srgb, b"rXYZ"), b"curv")
    with pytest.raises(ProfileError) as info:
        read_profile(bad, name="x.icc")
    assert info.value.tag == "rXYZ" and "tag 'rXYZ'" in str(info.value)


def test_unreadable_paths(tmp_path: Path) -> None:
    with pytest.raises(ProfileError, match="missing.icc: cannot read"):
        read_profile(tmp_path / "missing.icc")
    with pytest.raises(ProfileError, match="cannot read"):
        read_profile(tmp_path)


FUZZ_BASES = [srgb_profile_bytes(), icc_bytes.rgb_lab_ab_profile(), icc_bytes.cmyk_lut16_profile(3),
              icc_bytes.cmyk_xyz_ab_profile()]


@settings(max_examples=150, deadline=None)
@given(data=st.data())
def test_random_corruption_never_escapes_as_another_error(data) -> None:
    # Overwrite random bytes of valid profiles: the reader either reads a profile or
    # raises ProfileError; struct/Index/Value errors must never escape.
    base = data.draw(st.sampled_from(FUZZ_BASES))
    edits = data.draw(st.lists(st.tuples(st.integers(0, len(base) - 1), st.integers(0, 255)), min_size=1, max_size=6))
    cut = data.draw(st.integers(len(base) // 2, len(base)))
    buf = bytearray(base)
    for pos, value in edits:
        buf[pos] = value
    try:
        read_profile(bytes(buf[:cut]), name="fuzz.icc")
    except ProfileError as exc:
        assert str(exc).startswith("fuzz.icc")
