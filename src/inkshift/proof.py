"""One soft proof: colours in, per-colour screen and print colorimetry out.

The data flow follows DESIGN.md. LittleCMS (through :mod:`inkshift.icc.cms`)
decides the separation, because that is what a print workflow sends to the
press; the project's own float evaluator (:mod:`inkshift.icc.evaluate`) turns
the screen values and the separated device values into CIELAB, because
LittleCMS's 8-bit Lab is too coarse for differences of one or two ΔE00.
Everything here runs once per unique colour; callers map results back to
pixels with :func:`inkshift.chart.unique.expand`.

View conditions
---------------
Screen colours are media-relative to the source profile (the display white
is L* = 100). Print colours are media-relative to the paper (bare paper is
L* = 100) unless ``paper=True``, which gives ICC-absolute colorimetry: the
print as it looks on its paper, compared with the screen white. Absolute
colorimetric intent implies the paper view.
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import lru_cache
from typing import Callable

import numpy as np
from numpy.typing import NDArray

from inkshift.chart.unique import rgbx_rows
from inkshift.chunks import for_each_chunk
from inkshift.color.difference import delta_e_2000, delta_e_2000_over
from inkshift.errors import ProfileError
from inkshift.icc.cms import srgb_profile_bytes, transform_colors
from inkshift.icc.evaluate import codes_to_lab, device_to_lab, lab_to_device
from inkshift.icc.intent import Intent
from inkshift.icc.read import Profile, read_profile
from inkshift.thresholds import OUT_OF_GAMUT_DELTA_E, SRGB_GAMUT_DELTA_E

__all__ = ["ColorProof", "proof_colors", "PixelProof", "proof_pixels", "srgb_profile", "lab_to_srgb8", "screen_srgb8", "srgb8_to_lab", "in_srgb", "ink_percent", "ink_recipes", "INK_NAMES", "print_view", "print_side", "PILLOW_MODES", "check_output_profile"]

PILLOW_MODES: dict[str, str] = {"RGB": "RGB", "GRAY": "L", "CMYK": "CMYK"}
"""Pillow/LittleCMS buffer mode for each device colour space the proof handles."""

INK_NAMES: dict[str, tuple[str, ...]] = {
    "CMYK": ("c", "m", "y", "k"),
    "GRAY": ("k",),
    "RGB": ("r", "g", "b"),
}
"""Keys of the device recipe in the report, per output colour space."""

_PROOF_CHUNK = 1 << 14
"""Colours per step of the float evaluation: it bounds the temporaries, and
small steps stay in cache. Measured with two threads on 2 million random
colours: 2**17 took 4.2 s and 142 MiB, 2**14 2.8 s and 49 MiB, 2**12 4.5 s."""


@dataclass(frozen=True)
class ColorProof:
    """Per-colour results of a soft proof (arrays share their first axis).

    Attributes
    ----------
    screen_lab
        CIELAB (D50) of each colour on screen, media-relative to the source.
    device
        The separation: 8-bit output device values (for CMYK, C, M, Y, K).
    print_lab
        CIELAB (D50) of the printed colour (see the module notes on views).
    delta_e
        CIEDE2000 between ``screen_lab`` and ``print_lab``.
    out_of_gamut
        True where the relative colorimetric round trip through the output
        profile misses the screen colour by more than the tolerance given.
    roundtrip_delta_e
        The size of that miss, ΔE00.
    print_rgb
        8-bit sRGB showing the printed colour on screen.
    """

    screen_lab: NDArray[np.float64]
    device: NDArray[np.uint8]
    print_lab: NDArray[np.float64]
    delta_e: NDArray[np.float64]
    out_of_gamut: NDArray[np.bool_]
    roundtrip_delta_e: NDArray[np.float64]
    print_rgb: NDArray[np.uint8]


@dataclass(frozen=True)
class PixelProof:
    """What a check keeps for every unique colour of an image, in compact types.

    A photograph has millions of unique colours, so a check keeps only what
    its pixel maps and statistics need (13 bytes per colour against about 70
    for a :class:`ColorProof`); the same computation as :func:`proof_colors`.

    Attributes
    ----------
    print_lab
        CIELAB (D50) of the printed colour, float32 (ample for comparing
        prints), or None when not asked for.
    delta_e
        CIEDE2000 between screen and print, float64 as in :class:`ColorProof`.
    out_of_gamut
        The round-trip flag of :class:`ColorProof`.
    print_rgb
        8-bit sRGB showing the printed colour on screen.
    """

    print_lab: NDArray[np.float32] | None
    delta_e: NDArray[np.float64]
    out_of_gamut: NDArray[np.bool_]
    print_rgb: NDArray[np.uint8]


@lru_cache(maxsize=1)
def srgb_profile() -> Profile:
    """Return LittleCMS's built-in sRGB profile read by the project's reader."""
    return read_profile(srgb_profile_bytes(), name="sRGB (LittleCMS built-in)")


def lab_to_srgb8(lab: NDArray[np.float64]) -> NDArray[np.uint8]:
    """Return 8-bit sRGB showing CIELAB (D50) colours, clipped to the sRGB gamut."""
    rgb = lab_to_device(srgb_profile(), lab, Intent.RELATIVE)
    return np.clip(np.rint(rgb * 255.0), 0, 255).astype(np.uint8)


def srgb8_to_lab(rgb: NDArray[np.uint8]) -> NDArray[np.float64]:
    """Return CIELAB (D50) of 8-bit sRGB colours (the inverse view of :func:`lab_to_srgb8`)."""
    return codes_to_lab(srgb_profile(), np.asarray(rgb, dtype=np.uint8), Intent.RELATIVE)


def in_srgb(lab: NDArray[np.float64]) -> NDArray[np.bool_]:
    """True where CIELAB colours lie inside sRGB, by :data:`inkshift.thresholds.SRGB_GAMUT_DELTA_E`."""
    srgb = srgb_profile()
    back = device_to_lab(srgb, lab_to_device(srgb, lab, Intent.RELATIVE), Intent.RELATIVE)
    return delta_e_2000(lab, back) <= SRGB_GAMUT_DELTA_E


def screen_srgb8(colors: NDArray[np.uint8], source: Profile) -> NDArray[np.uint8]:
    """Return 8-bit sRGB showing 8-bit ``colors`` of ``source`` on screen (the colours themselves for sRGB).

    Works in chunks, so millions of colours need no large float temporaries.
    """
    colors = np.asarray(colors, dtype=np.uint8)
    if source is srgb_profile():
        return colors
    out = rgbx_rows(colors.shape[0])
    for s in range(0, colors.shape[0], _PROOF_CHUNK):
        out[s : s + _PROOF_CHUNK] = lab_to_srgb8(codes_to_lab(source, colors[s : s + _PROOF_CHUNK], Intent.RELATIVE))
    return out


def ink_percent(profile: Profile, device: NDArray[np.uint8]) -> NDArray[np.float64]:
    """Return ink amounts in percent for 8-bit device values of an output profile.

    CMYK values are ink amounts by the ICC convention. Gray data has no fixed
    polarity: a profile built from ink amounts (as the shipped ones are)
    prints bare paper at 0, while many third-party gray profiles follow the
    display convention (0 is black), so the profile's own A2B1 at both ends
    decides. RGB output values are returned as percent of full scale.
    """
    percent = np.asarray(device, dtype=np.float64) * (100.0 / 255.0)
    if profile.color_space == "GRAY":
        ends = device_to_lab(profile, np.array([[0.0], [1.0]]), Intent.RELATIVE)[:, 0]
        if ends[0] < ends[1]:
            percent = 100.0 - percent
    return percent


def ink_recipes(profile: Profile, device: NDArray[np.uint8]) -> list[dict[str, float]]:
    """Return each colour's device recipe, ink name -> percent (:func:`ink_percent`, keys :data:`INK_NAMES`)."""
    names = INK_NAMES[profile.color_space]
    return [{n: float(v) for n, v in zip(names, row)} for row in ink_percent(profile, device)]


def print_view(intent: Intent, paper: bool = False) -> Intent:
    """Return how print colours are measured: ICC-absolute on the paper, else media-relative.

    The paper view is asked for with ``paper`` and implied by the absolute
    colorimetric intent (see the module notes).
    """
    return Intent.ABSOLUTE if (paper or intent is Intent.ABSOLUTE) else Intent.RELATIVE


def print_side(
    screen_lab: NDArray[np.float64], device: NDArray[np.uint8], output: Profile, view: Intent
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], NDArray[np.uint8]]:
    """Return (print Lab, ΔE00 from screen, round-trip Lab, print sRGB) for separated colours.

    ``device`` is the 8-bit separation of colours whose screen CIELAB is
    ``screen_lab``. The round trip is relative colorimetric, Lab -> B2A1 ->
    A2B1 through the float evaluator, whatever the view; how far it lands
    from ``screen_lab`` is the out-of-gamut measure.
    """
    prt = codes_to_lab(output, np.asarray(device, dtype=np.uint8), view)
    reached = device_to_lab(output, lab_to_device(output, screen_lab, Intent.RELATIVE), Intent.RELATIVE)
    return prt, delta_e_2000(screen_lab, prt), reached, lab_to_srgb8(prt)


def check_output_profile(profile: Profile) -> None:
    """Raise :class:`ProfileError` unless ``profile`` can serve as a print output profile."""
    if profile.device_class != "prtr":
        raise ProfileError(
            profile.source,
            f"is a '{profile.device_class}' class profile, not an output (printer) profile",
        )
    if profile.color_space not in PILLOW_MODES:
        raise ProfileError(profile.source, f"output colour space {profile.color_space} is not supported (use CMYK, gray or RGB)")
    if not any(k.startswith("B2A") for k in profile.luts) and profile.trcs is None:
        raise ProfileError(profile.source, "has no B2A table, so colours cannot be separated for it")


def proof_colors(
    colors: NDArray[np.uint8],
    source: Profile,
    output: Profile,
    intent: Intent = Intent.RELATIVE,
    bpc: bool = True,
    paper: bool = False,
    out_of_gamut_delta_e: float = OUT_OF_GAMUT_DELTA_E,
) -> ColorProof:
    """Soft-proof 8-bit ``colors`` in ``source``'s colour space on ``output``.

    Parameters
    ----------
    colors
        ``(N, C)`` uint8 device values of the source (RGB, gray or CMYK).
    source, output
        The image's profile and the print output profile.
    intent, bpc
        Rendering intent and black point compensation of the separation.
    paper
        Give print colours ICC-absolute (on the paper) instead of
        media-relative.
    out_of_gamut_delta_e
        Round-trip tolerance for the out-of-gamut flag (ΔE00).

    A CMYK source whose profile is the output profile itself is proofed as it
    stands: the device values are the pixels (no separation).
    """
    n = len(colors)
    screen_lab = np.empty((n, 3))
    print_lab = np.empty((n, 3))
    delta_e = np.empty(n)
    roundtrip = np.empty(n)
    print_rgb = np.empty((n, 3), np.uint8)

    def keep(part: slice, scr: NDArray[np.float64], side: _PrintSide) -> None:
        screen_lab[part] = scr
        print_lab[part], delta_e[part], reached, print_rgb[part] = side
        roundtrip[part] = delta_e_2000(scr, reached)

    device = _proof_parts(colors, source, output, intent, bpc, paper, keep)
    return ColorProof(
        screen_lab=screen_lab,
        device=device,
        print_lab=print_lab,
        delta_e=delta_e,
        out_of_gamut=roundtrip > out_of_gamut_delta_e,
        roundtrip_delta_e=roundtrip,
        print_rgb=print_rgb,
    )


def proof_pixels(
    colors: NDArray[np.uint8],
    source: Profile,
    output: Profile,
    intent: Intent = Intent.RELATIVE,
    bpc: bool = True,
    paper: bool = False,
    out_of_gamut_delta_e: float = OUT_OF_GAMUT_DELTA_E,
    *,
    keep_print_lab: bool = False,
) -> PixelProof:
    """Return the :class:`PixelProof` of ``colors``: :func:`proof_colors` keeping less.

    Same parameters; ``keep_print_lab`` also keeps the print CIELAB (float32).
    """
    n = len(colors)
    print_lab = np.empty((n, 3), np.float32) if keep_print_lab else None
    delta_e = np.empty(n)
    out_of_gamut = np.empty(n, bool)
    print_rgb = rgbx_rows(n)  # drawn as pictures: IndexedImage gathers RGBX words

    def keep(part: slice, scr: NDArray[np.float64], side: _PrintSide) -> None:
        prt, delta_e[part], reached, print_rgb[part] = side
        out_of_gamut[part] = delta_e_2000_over(scr, reached, out_of_gamut_delta_e)
        if print_lab is not None:
            print_lab[part] = prt

    _proof_parts(colors, source, output, intent, bpc, paper, keep)
    return PixelProof(print_lab=print_lab, delta_e=delta_e, out_of_gamut=out_of_gamut, print_rgb=print_rgb)


_PrintSide = tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], NDArray[np.uint8]]


def _proof_parts(
    colors: NDArray[np.uint8],
    source: Profile,
    output: Profile,
    intent: Intent,
    bpc: bool,
    paper: bool,
    keep: Callable[[slice, NDArray[np.float64], _PrintSide], None],
) -> NDArray[np.uint8]:
    """Separate ``colors`` and hand each chunk's screen Lab and :func:`print_side` to ``keep``.

    Returns the separation (8-bit device values of every colour).
    """
    colors = np.asarray(colors, dtype=np.uint8)
    in_mode = PILLOW_MODES.get(source.color_space)
    if in_mode is None:
        raise ProfileError(source.source, f"image colour space {source.color_space} is not supported")
    check_output_profile(output)
    out_mode = PILLOW_MODES[output.color_space]

    if source.color_space == output.color_space and source.data == output.data:
        device = colors.copy()
    else:
        # One LittleCMS pass over all colours (building the transform costs more
        # than a chunk); its 8-bit output is compact.
        device = transform_colors(colors, source, output, in_mode, out_mode, intent, bpc)
    view = print_view(intent, paper)
    n = colors.shape[0]

    def run(s: int) -> None:
        part = slice(s, min(n, s + _PROOF_CHUNK))
        scr = codes_to_lab(source, colors[part], Intent.RELATIVE)
        keep(part, scr, print_side(scr, device[part], output, view))

    # Each colour is computed on its own, so chunks change nothing but the size
    # of the float temporaries (the evaluators make several per colour). numpy
    # releases the GIL inside its array loops, so with many colours two threads
    # share the chunks (measured below in benchmarks/check_command.py).
    for_each_chunk(run, n, _PROOF_CHUNK)
    return device
