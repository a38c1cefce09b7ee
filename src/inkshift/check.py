"""The main job: soft-proof a chart image against an output profile.

:func:`check` loads the image, finds its unique colours and the chart's
palette, proofs every unique colour once (:func:`inkshift.proof.proof_pixels`;
the palette colours in full with :func:`inkshift.proof.proof_colors`), keeps
the per-pixel maps per colour (:class:`~inkshift.chart.unique.IndexedImage`)
and judges which palette colours shift, leave the gamut or merge. :func:`write_check_outputs` writes the pictures and
report.json atomically.
"""

from __future__ import annotations

import json
from dataclasses import replace
from functools import partial
from itertools import combinations
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import NDArray
from PIL import Image

from inkshift.cautions import cautions_for
from inkshift.chart.load import ChartImage, load_chart
from inkshift.chart.palette import Palette, palette_evidence, palette_from_evidence
from inkshift.chart.unique import IndexedImage, pixel_runs, unique_colors
from inkshift.color.difference import delta_e_2000
from inkshift.errors import ImageError, InputError, ProfileError
from inkshift.files import output_folder
from inkshift.icc.cms import srgb_profile_bytes
from inkshift.icc.evaluate import codes_to_lab
from inkshift.icc.intent import Intent, parse_intent
from inkshift.icc.read import Profile, read_profile
from inkshift.memory import release_freed_memory
from inkshift.proof import (
    INK_NAMES,
    ColorProof,
    check_output_profile,
    ink_recipes,
    proof_colors,
    proof_pixels,
    screen_srgb8,
    srgb_profile,
)
from inkshift.readability import GRAY_MERGE_DELTA_L, GRAY_PROFILE, gray_check, vision_check
from inkshift.report.model import (
    CheckReport,
    ImageInfo,
    PaletteColor,
    PairVerdict,
    ProfileInfo,
    ProofMaps,
    Summary,
    hex_rgb,
    rgb_hex,
)
from inkshift.shipped import DEFAULT_PROFILE, profiles_dir, resolve_profile, shipped_names
from inkshift.thresholds import Thresholds

__all__ = [
    "check",
    "open_output_profile",
    "write_check_outputs",
    "weighted_summary",
    "weighted_percentile",
    "weighted_mean",
    "shipped_in_use",
    "assumed_srgb",
    "image_source",
    "composite_on_white",
    "pair_verdicts",
    "INK_NAMES",
    "OUTPUT_FILES",
]


OUTPUT_FILES: dict[str, str] = {
    "heatmap": "heatmap.png",
    "print": "print.png",
    "side_by_side": "side_by_side.png",
    "report": "report.json",
}
"""File names written into the output folder."""

_WHITE = {"RGB": 255, "GRAY": 255, "CMYK": 0}

def open_output_profile(spec: str | Path | Profile) -> tuple[Profile, ProfileInfo]:
    """Return the output profile named by ``spec`` (short name, path or Profile) and its info."""
    if isinstance(spec, Profile):
        profile = spec
        path = Path(profile.source)
    else:
        path = resolve_profile(spec)
        profile = read_profile(path)
    check_output_profile(profile)
    shipped = path.parent.resolve() == profiles_dir().resolve() if path.exists() else False
    name = path.stem if shipped else str(path)
    info = ProfileInfo(
        name=name,
        description=profile.description,
        path=str(path),
        color_space=profile.color_space,
        shipped=shipped,
    )
    return profile, info


def image_source(chart: ChartImage, output: Profile) -> tuple[NDArray[np.uint8], Profile, str, bool, list[str]]:
    """Return the pixels to proof, the image's profile, its name, whether it was assumed, and notes.

    Without an embedded profile an RGB or gray image is taken as sRGB (gray
    pixels are repeated into RGB) and a CMYK image as already in the output
    profile's CMYK, so it is proofed as it stands.
    """
    notes: list[str] = []
    label = chart.path or "image"
    if chart.icc:
        try:
            profile = read_profile(chart.icc, name=f"{label} (embedded profile)")
        except ProfileError as exc:
            raise ImageError(label, f"embedded ICC profile is unusable: {exc.problem}") from None
        if profile.color_space != chart.space:
            raise ImageError(
                label, f"embedded ICC profile is {profile.color_space} but the pixels are {chart.space}"
            )
        return chart.pixels, profile, profile.description or "embedded profile", False, notes
    if chart.space == "CMYK":
        notes.append("CMYK image without an embedded profile: taken to be in the output profile's CMYK.")
        return chart.pixels, output, f"{output.description} (output profile, assumed)", True, notes
    pixels = np.repeat(chart.pixels, 3, axis=-1) if chart.space == "GRAY" else chart.pixels
    return pixels, srgb_profile(), "sRGB IEC61966-2.1 (assumed)", True, notes


def composite_on_white(pixels: NDArray[np.uint8], alpha: NDArray[np.uint8] | None, space: str) -> tuple[NDArray[np.uint8], list[str]]:
    """Composite transparent areas onto white in the image's own space.

    White separates to bare paper, so on the print side transparent areas
    show the paper, and on the screen side they show the display white.
    """
    if alpha is None:
        return pixels, []
    a = alpha.astype(np.float32)[..., None] / 255.0
    mixed = pixels.astype(np.float32) * a + _WHITE[space] * (1.0 - a)
    note = "Transparent areas were composited onto white (bare paper in print)."
    return np.rint(mixed).astype(np.uint8), [note]


def shipped_in_use(outputs: list[ProfileInfo], gray: Any = None) -> list[str]:
    """Return the short names of the shipped profiles a result used (outputs, then the gray one)."""
    names = [info.name for info in outputs if info.shipped]
    if gray is not None and gray.gray_profile in shipped_names():
        names.append(gray.gray_profile)
    return list(dict.fromkeys(names))


def assumed_srgb(profile_assumed: bool, color_space: str) -> bool:
    """True when an image was taken to be sRGB for want of an embedded profile
    (a CMYK image without one is taken to be in the output profile's CMYK)."""
    return profile_assumed and color_space != "CMYK"


_PERCENTILE_BINS = 1 << 16  # histogram bins of weighted_percentile: a photograph's millions of values leave ~100 a bin
_STATS_CHUNK = 1 << 20  # colours per step of the pixel-weighted statistics


def weighted_percentile(values: NDArray[np.float64], counts: NDArray[np.int64], share: float) -> float:
    """Return the smallest value with at least ``share`` of the pixels at or below it.

    ``values`` are per colour and ``counts`` their pixels, so this is the
    per-pixel percentile without expanding to pixels. Exact, in linear time:
    a pixel-weighted histogram finds the bin that holds the percentile, and
    only the values in that bin are sorted (a photograph has millions).
    """
    values = np.asarray(values)
    counts = np.asarray(counts)
    target = share * float(counts.sum(dtype=np.float64))
    lo, hi = float(values.min()), float(values.max())
    scale = _PERCENTILE_BINS / (hi - lo) if hi > lo else np.inf
    if np.isfinite(scale):  # else one value, or a span too wide or narrow to bin: sort them all
        # Bins are monotone in the value, so every value of a lower bin is smaller.

        def bins_of(part: slice) -> NDArray[np.int32]:
            bins = ((values[part] - lo) * scale).astype(np.int32)
            return np.minimum(bins, _PERCENTILE_BINS - 1, out=bins)

        hist = np.zeros(_PERCENTILE_BINS)
        parts = [slice(s, s + _STATS_CHUNK) for s in range(0, values.size, _STATS_CHUNK)]
        for part in parts:
            hist += np.bincount(bins_of(part), weights=counts[part], minlength=_PERCENTILE_BINS)
        cum = np.cumsum(hist)
        b = min(int(np.searchsorted(cum, target, side="left")), _PERCENTILE_BINS - 1)
        below = float(cum[b - 1]) if b > 0 else 0.0
        inside = np.concatenate([np.flatnonzero(bins_of(part) == b) + part.start for part in parts])
        values, counts, target = values[inside], counts[inside], target - below
    counts = np.asarray(counts, dtype=np.float64)
    # Any sort will do: equal values have the same percentile whatever their order.
    order = np.argsort(values)
    cum = np.cumsum(counts[order])
    k = min(int(np.searchsorted(cum, target, side="left")), order.size - 1)
    return float(values[order[k]])




def weighted_summary(delta_e: NDArray[np.float64], out_of_gamut: NDArray[np.bool_], counts: NDArray[np.integer]) -> Summary:
    """Return per-pixel statistics from per-colour values weighted by pixel counts."""
    return Summary(
        delta_e_mean=weighted_mean(delta_e, counts),
        delta_e_p95=weighted_percentile(delta_e, counts, 0.95),
        delta_e_max=float(delta_e.max()),
        out_of_gamut_share=weighted_mean(out_of_gamut, counts),
    )


def weighted_mean(values: NDArray[np.floating | np.bool_], counts: NDArray[np.integer]) -> float:
    """Return the per-pixel mean of per-colour ``values`` weighted by pixel ``counts``
    (of a boolean flag: the share of pixels where it is set)."""
    total = weighted = 0.0
    for s in range(0, len(counts), _STATS_CHUNK):  # float64 counts of millions of colours are not needed at once
        part = np.asarray(counts[s : s + _STATS_CHUNK], dtype=np.float64)
        total += float(part.sum())
        weighted += float(np.dot(np.asarray(values[s : s + _STATS_CHUNK], dtype=np.float64), part))
    return weighted / total


def pair_verdicts(
    labels: list[str],
    screen_lab: NDArray[np.float64],
    other_lab: NDArray[np.float64],
    thresholds: Thresholds,
) -> tuple[list[PairVerdict], list[PairVerdict]]:
    """Return (merges, separation losses) among colours from screen to another rendition.

    A merge is a pair clearly distinct on screen (ΔE00 >= ``thresholds.distinct``)
    and closer than ``thresholds.merge`` in the other rendition; a separation
    loss keeps less than ``thresholds.separation_loss`` of its screen ΔE00
    without merging.
    """
    merges: list[PairVerdict] = []
    losses: list[PairVerdict] = []
    if len(labels) < 2:
        return merges, losses
    i, j = np.array(list(combinations(range(len(labels)), 2))).T
    screen = delta_e_2000(screen_lab[i], screen_lab[j])
    other = delta_e_2000(other_lab[i], other_lab[j])
    for a, b, s, o in zip(i, j, screen, other):
        if s < thresholds.distinct:
            continue
        if o < thresholds.merge:
            merges.append(PairVerdict(labels[a], labels[b], float(s), float(o), "merge"))
        elif o < thresholds.separation_loss * s:
            losses.append(PairVerdict(labels[a], labels[b], float(s), float(o), "separation loss"))
    merges.sort(key=lambda p: p.print_delta_e)
    losses.sort(key=lambda p: p.print_delta_e / p.screen_delta_e)
    return merges, losses


def _palette_colors(
    palette: Palette,
    proof: ColorProof,
    source: Profile,
    output: Profile,
    thresholds: Thresholds,
) -> list[PaletteColor]:
    inks = ink_recipes(output, proof.device)
    screen_rgb = screen_srgb8(palette.colors, source)
    out: list[PaletteColor] = []
    for k in range(len(palette.colors)):
        ink = inks[k]
        verdicts = []
        if proof.out_of_gamut[k]:
            verdicts.append("out of gamut")
        if proof.delta_e[k] > thresholds.shift:
            verdicts.append("shifts")
        out.append(
            PaletteColor(
                hex=rgb_hex(screen_rgb[k]),
                share=float(palette.shares[k]),
                background=bool(palette.is_background[k]),
                screen_lab=tuple(float(v) for v in proof.screen_lab[k]),
                print_lab=tuple(float(v) for v in proof.print_lab[k]),
                delta_e=float(proof.delta_e[k]),
                out_of_gamut=bool(proof.out_of_gamut[k]),
                ink=ink,
                coverage=sum(ink.values()) if output.color_space != "RGB" else None,
                print_hex=rgb_hex(proof.print_rgb[k]),
                verdicts=tuple(verdicts),
            )
        )
    return out


def check(
    image: str | Path | Image.Image | NDArray[Any] | ChartImage,
    profile: str | Path | Profile = DEFAULT_PROFILE,
    intent: Intent | str | int = Intent.RELATIVE,
    *,
    bpc: bool = True,
    paper: bool = False,
    thresholds: Thresholds = Thresholds(),
    max_pixels: int | None = None,
    keep_maps: bool = True,
    gray_profile: str | Path | Profile | None = GRAY_PROFILE,
    gray_delta_l: float = GRAY_MERGE_DELTA_L,
    vision_severity: float | None = 1.0,
    reuse: dict[bytes, Any] | None = None,
    keep_print_lab: bool = False,
) -> CheckReport:
    """Soft-proof a chart image on an output profile and judge its palette.

    Parameters
    ----------
    image
        A path, a PIL image or a numpy array (see :func:`inkshift.chart.load.load_chart`).
    profile
        A shipped short name, a path to an ICC output profile, or a Profile.
    intent
        Rendering intent of the separation (default relative colorimetric).
    bpc
        Black point compensation for the separation (default on).
    paper
        Show and measure the print on its paper white (ICC-absolute view).
    thresholds
        Verdict thresholds (:mod:`inkshift.thresholds`).
    max_pixels
        Refuse images with more pixels than this (default: the loader's limit).
    keep_maps
        Keep the per-pixel maps in ``report.maps`` for the pictures (as
        :class:`~inkshift.chart.unique.IndexedImage`, expanded band by band).
    gray_profile, gray_delta_l
        Grayscale output profile of the black-and-white check and the gray
        ΔL* under which distinct colours merge there (None skips the check).
    vision_severity
        Severity (0..1) of the simulated colour-vision deficiencies (None
        skips the check).
    reuse
        A dict shared by calls on the same chart (:func:`inkshift.compare.compare`
        passes one): the unique colours and the palette depend only on the
        screen side, so they are computed once per source profile and reused.
    keep_print_lab
        Keep each unique colour's print CIELAB in ``report.proof.print_lab``
        (:func:`inkshift.compare.compare` maps where two prints differ with it).

    Notes
    -----
    Memory: the pixels are needed until the palette is found; after that the
    unique colours and each pixel's colour index stand for them, and every
    per-pixel map is kept per colour (:class:`~inkshift.proof.PixelProof`).
    """
    intent = parse_intent(intent)
    output, profile_info = open_output_profile(profile)
    if isinstance(image, ChartImage):
        chart = image
    else:
        chart = load_chart(image, **({} if max_pixels is None else {"max_pixels": max_pixels}))
    pixels, source, source_name, assumed, notes = image_source(chart, output)
    pixels, composite_notes = composite_on_white(pixels, chart.alpha, chart.space)

    image_info = ImageInfo(
        path=chart.path,
        width=chart.width,
        height=chart.height,
        color_space=chart.space,
        source_profile=source_name,
        profile_assumed=assumed,
        notes=tuple(chart.notes) + tuple(notes) + tuple(composite_notes),
    )
    screen_side = reuse.get(source.data) if reuse is not None else None
    uniq = unique_colors(pixels) if screen_side is None else screen_side[0]
    # From here on the unique colours and each pixel's index stand for the
    # pixels (3 bytes a pixel less); this function's own copies can go (a
    # caller may still hold the image).
    del pixels, chart
    release_freed_memory()  # at each step's end: its temporaries would stay resident (inkshift.memory)
    runs = pixel_runs(uniq.inverse)
    if screen_side is None:
        evidence = [palette_evidence(IndexedImage(uniq.colors, uniq.inverse, uniq.shape, runs), uniq)]
        release_freed_memory()
        # Handed over without a name left here, so the evidence counts are
        # freed inside once the palette colours are chosen.
        palette = palette_from_evidence(uniq, evidence.pop(), partial(codes_to_lab, source), blends=False)
        release_freed_memory()
        if reuse is not None:
            reuse[source.data] = (uniq, palette)
    else:
        palette = screen_side[1]

    proof = proof_pixels(
        uniq.colors, source, output, intent, bpc, paper,
        out_of_gamut_delta_e=thresholds.out_of_gamut, keep_print_lab=keep_print_lab,
    )
    summary = weighted_summary(proof.delta_e, proof.out_of_gamut, uniq.counts)
    release_freed_memory()
    pal_proof = proof_colors(
        palette.colors, source, output, intent, bpc, paper, out_of_gamut_delta_e=thresholds.out_of_gamut
    )
    colors = _palette_colors(palette, pal_proof, source, output, thresholds)
    labels = [c.hex for c in colors]
    merges, losses = pair_verdicts(labels, pal_proof.screen_lab, pal_proof.print_lab, thresholds)
    merged = {m.a for m in merges} | {m.b for m in merges}
    colors = [replace(c, verdicts=c.verdicts + ("merges",)) if c.hex in merged else c for c in colors]
    gray = None
    if gray_profile is not None:
        gray = gray_check(
            palette.colors, source, labels, gray_profile=gray_profile, intent=intent, bpc=bpc,
            thresholds=thresholds, min_delta_l=gray_delta_l,
        )
    vision = None
    if vision_severity is not None:
        vision = vision_check(
            labels, pal_proof.screen_lab, pal_proof.print_lab, severity=vision_severity, thresholds=thresholds
        )

    maps = None
    if keep_maps:
        shape = uniq.shape
        maps = ProofMaps(
            screen_rgb=IndexedImage(screen_srgb8(uniq.colors, source), uniq.inverse, shape, runs),
            print_rgb=IndexedImage(proof.print_rgb, uniq.inverse, shape, runs),
            delta_e=IndexedImage(proof.delta_e, uniq.inverse, shape, runs),
            out_of_gamut=IndexedImage(proof.out_of_gamut, uniq.inverse, shape, runs),
        )

    extra: dict[str, Any] = {}
    if image_info.color_space == "CMYK":
        coverage = uniq.colors.astype(np.float64).sum(axis=1) * 100.0 / 255.0
        extra["ink_coverage"] = {
            "max": round(float(coverage.max()), 1),
            "mean": round(float(np.dot(coverage, uniq.counts) / uniq.counts.sum()), 1),
        }
    return CheckReport(
        image=image_info,
        output_profile=profile_info,
        intent=intent.label,
        bpc=bpc,
        paper=paper,
        summary=summary,
        colors=colors,
        merges=merges,
        separation_losses=losses,
        thresholds=thresholds,
        gray=gray,
        vision=vision,
        cautions=cautions_for(
            shipped_profile=shipped_in_use([profile_info], gray),
            vision=vision is not None,
            assumed_srgb=assumed_srgb(assumed, image_info.color_space),
        ),
        extra=extra,
        maps=maps,
        unique=uniq,
        proof=proof,
        source_profile=source,
        output=output,
        palette=palette,
    )


def default_out_dir(image: str | Path) -> Path:
    """Return the default output folder: beside the image, named after it."""
    path = Path(image)
    return path.with_name(path.stem)


def write_check_outputs(report: CheckReport, out_dir: str | Path) -> dict[str, Path]:
    """Write the pictures and report.json of ``report`` into ``out_dir`` atomically.

    Each file is written under a temporary name and renamed; if anything
    fails, files already renamed by this call are removed again and a folder
    this call created is removed, so no partial output is left behind.
    """
    from inkshift.report.images import Swatch, heatmap_bands, rgb_bands, side_by_side, write_png_bands

    if report.maps is None:
        raise InputError("the report has no pixel maps (check(..., keep_maps=False)); nothing to draw")
    maps = report.maps
    release_freed_memory()
    icc = srgb_profile_bytes()
    height, width = maps.print_rgb.shape[:2]
    # The full-size pictures are written band by band (never held whole), the
    # heat map and the simulated print in two worker threads at once: drawing a
    # band and zlib both release the GIL (24 MP chart: 1.1 s for both).
    with output_folder(out_dir, workers=2) as out:
        paths = {key: out.path / name for key, name in OUTPUT_FILES.items()}
        heat_w, heat_h, heat = heatmap_bands(maps.screen_rgb, maps.delta_e, maps.out_of_gamut)
        out.file(OUTPUT_FILES["heatmap"], lambda path: write_png_bands(path, heat_w, heat_h, heat), background=True)
        out.file(
            OUTPUT_FILES["print"],
            lambda path: write_png_bands(path, width, height, rgb_bands(maps.print_rgb), icc_profile=icc),
            background=True,
        )
        swatches = [
            Swatch(
                screen_rgb=hex_rgb(c.hex),
                print_rgb=hex_rgb(c.print_hex),
                label=c.hex,
                delta_e=c.delta_e,
                marks=tuple(_MARKS[v] for v in c.verdicts if v in _MARKS),
            )
            for c in report.colors
        ]
        pair = side_by_side(maps.screen_rgb, maps.print_rgb, swatches)
        out.image(OUTPUT_FILES["side_by_side"], pair, icc_profile=icc)
        del pair
        out.wait()
        report.outputs = {k: str(p) for k, p in paths.items()}
        out.text(OUTPUT_FILES["report"], json.dumps(report.to_dict(), indent=2) + "\n")
    return paths


_MARKS = {"out of gamut": "OUT", "shifts": "SHIFT", "merges": "MERGE"}
