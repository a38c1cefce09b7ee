"""Printable replacement colours for a chart whose palette suffers in print.

:func:`suggest_replacements` takes a :class:`~inkshift.report.model.CheckReport`
and proposes, for the palette colours that fall out of gamut, shift, or merge
with another colour (in print, in a black-and-white print, or for a reader
with a colour-vision deficiency), screen sRGB colours that print well on the
same output profile. :func:`replace_colors` runs the check and the search in
one call; :func:`recolor_chart` draws the chart with the replacements and
:func:`write_replace_outputs` writes replace.json, a swatch sheet and that
preview atomically.

Method (the project's own; the reasoning is given for each step)
----------------------------------------------------------------
1. **Candidates.** A deterministic grid of :data:`GRID_LEVELS` levels per sRGB
   channel (8-code steps), plus, for each palette colour, the sRGB colour
   whose print comes closest to that colour's own print
   (:func:`inkshift.swatches.nearest_printable`). Every candidate is proofed
   once with :func:`inkshift.proof.proof_colors` on the output profile (same
   intent, black point compensation and view as the check) and on the
   grayscale profile; only candidates in gamut by the check's own rule (the
   relative colorimetric round trip misses by at most
   ``thresholds.out_of_gamut`` ΔE00) that do not shift either (screen to
   print ΔE00 at most ``thresholds.shift``) are kept, so a check of the
   recoloured chart flags none of the new colours. A replacement is
   therefore always a screen hex whose proofed print is the one reported.
2. **Pairs that matter.** Only pairs of palette colours clearly distinct on
   screen (ΔE00 >= ``thresholds.distinct``, the check's merge rule) are
   separated; the background is a palette colour, so its pairs with marks
   count (text and marks sit on it). A pair the designer drew close on purpose
   (a light gridline on white paper) is left alone.
3. **Figures.** For a palette, three smallest values over those pairs: print
   ΔE00, gray print ΔL* (CIE L* on the grayscale profile), and print ΔE00
   under simulated protanopia, deuteranopia and tritanopia
   (:func:`inkshift.color.vision.simulate_cvd_lab`, Machado et al. 2009).
   Each is divided by its target (``thresholds.merge``,
   :data:`inkshift.readability.GRAY_MERGE_DELTA_L`, and ``thresholds.merge``
   again for colour vision, as the check judges it): the *score* is the
   smallest of the three ratios, capped at 1 (all targets met).
4. **Objective per colour.** First the score (in steps of
   :data:`SCORE_STEP`, so that a negligible gain in separation cannot buy a
   large change of hue), then the closeness of the candidate's print to the
   original screen colour: a weighted Euclidean distance of the CIELAB
   lightness, chroma and hue differences ΔL*, ΔC*ab, ΔH*ab (CIE 015:2018,
   section 8.2) with weights :data:`HUE_WEIGHT` > :data:`CHROMA_WEIGHT` >
   :data:`LIGHTNESS_WEIGHT`. Hue carries a category's identity (the "blue
   series" should stay blue), chroma less, and lightness is the cheapest
   thing to change (and the one a gray print needs). ΔH*ab vanishes for
   neutrals, so grays are free to move in lightness only.
5. **Ascent, best move first.** The start is the original palette as it
   prints. Out-of-gamut colours must move and do so first, each to its best
   printable candidate. Then, in rounds, every movable colour proposes its
   best candidate and only the proposal best for the whole palette is made
   (highest score, then smallest total shortfall, then the smallest increase
   of its distance to the original). Visiting colours in a fixed order
   instead lets the first colour visited take all the room (measured on the
   sample charts: dark text was lightened by 24 ΔE00 to make room for a
   blue, where lightening the blue cost far less). Feasible candidates lower
   none of the three figures below the smaller of its current value and
   max(original value, target), so a figure only falls while it stays above
   both the original and its target and the result is never worse than the
   original; nor may any pair, distinct on screen or not, come closer in
   print than it was (or the merge target), so a light tint never turns into
   the paper. A move is made when it raises the score, or keeps it and
   lowers the *shortfall* (the summed shares of the targets that all pairs
   miss) by a :data:`SCORE_STEP`, or keeps both and lowers the distance to
   the original by :data:`COST_STEP`. The shortfall lets colours spread out
   while the single closest pair cannot move yet. Every move improves that
   key by a fixed step, so the ascent ends (at most :data:`MAX_MOVES` moves
   per movable colour).
6. **Who may move.** Locked colours (the background by default, and every
   colour the user names) never move. In a first pass only the *flagged*
   colours move: out of gamut, shifting (ΔE00 > ``thresholds.shift``) or in
   a pair below a target. Only when that pass ends with a target unmet do
   the unflagged, unlocked colours join (second pass), and then only moves
   that raise the score are made: an unproblematic colour moves only when
   that separates a pair the flagged colours alone could not.

The preview (:func:`recolor_chart`) gives every unique colour of the chart
that belongs to a replaced palette colour the replacement plus its own small
offset (JPEG noise), and every anti-aliasing blend of a replaced colour the
same mix of the replaced parents (plus its offset from the exact mix). The
mix is done in sRGB codes, which is exact for sRGB charts (the palette's
blend fractions are measured in the image's own device values) and an
approximation for charts in another colour space.
"""

from __future__ import annotations

import json
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any, Sequence

import numpy as np
from numpy.typing import NDArray
from PIL import Image

from inkshift.cautions import cautions_for
from inkshift.chart.load import ChartImage
from inkshift.chart.palette import BLEND, NOISE_DELTA_E, label_blends
from inkshift.chart.unique import expand
from inkshift.check import assumed_srgb, check, open_output_profile, shipped_in_use
from inkshift.colorlist import parse_color
from inkshift.color.difference import delta_e_1976, delta_e_2000
from inkshift.color.vision import simulate_cvd_lab
from inkshift.errors import InputError, ProfileError
from inkshift.files import output_folder
from inkshift.icc.cms import srgb_profile_bytes
from inkshift.icc.intent import Intent, parse_intent
from inkshift.icc.read import Profile
from inkshift.proof import lab_to_srgb8, proof_colors, screen_srgb8, srgb8_to_lab, srgb_profile
from inkshift.readability import CHECKED_DEFICIENCIES, GRAY_MERGE_DELTA_L, GRAY_PROFILE
from inkshift.report.model import CheckReport, ImageInfo, ProfileInfo, hex_rgb, rgb_hex
from inkshift.shipped import DEFAULT_PROFILE
from inkshift.swatches import nearest_printable
from inkshift.thresholds import Thresholds

__all__ = [
    "REPLACE_SCHEMA",
    "OUTPUT_FILES",
    "GRID_LEVELS",
    "HUE_WEIGHT",
    "CHROMA_WEIGHT",
    "LIGHTNESS_WEIGHT",
    "SCORE_STEP",
    "COST_STEP",
    "MAX_MOVES",
    "Figures",
    "Replacement",
    "ReplaceReport",
    "parse_hex",
    "candidate_grid",
    "suggest_replacements",
    "replace_colors",
    "recolor_chart",
    "write_replace_outputs",
    "format_replace",
]

REPLACE_SCHEMA = "inkshift.replace/1"
"""Name and version of the replacement report's JSON schema."""

OUTPUT_FILES: dict[str, str] = {
    "report": "replace.json",
    "swatches": "replace_swatches.png",
    "preview": "replace_preview.png",
}
"""File names written into the output folder."""

GRID_LEVELS = 33
"""Candidate levels per sRGB channel (0, 8, 16, ..., 255: 35 937 colours).
Chosen by this project: 8-code steps are about 2-4 ΔE00 apart in the
mid-tones, under the 5 ΔE00 merge threshold, and proofing them all takes
under a second on the shipped profiles (measured)."""

HUE_WEIGHT = 4.0
CHROMA_WEIGHT = 2.0
LIGHTNESS_WEIGHT = 1.0
"""Weights of ΔH*ab, ΔC*ab and ΔL* in the distance to the original colour.
The project's own choice (hue kept most, lightness changed most freely); the
decomposition of ΔE*ab into the three is CIE 015:2018, section 8.2."""

SCORE_STEP = 0.02
"""Steps of the score (share of the targets met) below which gains are
ignored in favour of hue: 2 % of a 5 ΔE00 target is 0.1 ΔE00, a tenth of the
CIEDE2000 JND (chosen by this project)."""

COST_STEP = 1.0
"""Smallest drop of the weighted distance to the original (in its ΔE*ab-like
units) worth a move at equal score: about one ΔE*ab, a just-noticeable
difference (common practice), so colours do not drift for nothing."""

MAX_MOVES = 12
"""Upper bound on moves per movable colour in one pass; the sample charts need
one to three (measured on coated: 4, 13 and 36 moves for 4, 9 and 16 colours
changed)."""



def parse_hex(text: str) -> NDArray[np.uint8]:
    """Return the 8-bit sRGB triple of a locked colour (any sRGB form :func:`inkshift.colorlist.parse_color`
    reads: ``#rrggbb``, ``rrggbb``, ``#rgb``, ``rgb()``); raise InputError otherwise."""
    spec = parse_color(str(text))
    if spec.rgb is None:
        raise InputError(f"'{text}': a locked colour must be an sRGB colour such as #rrggbb")
    return spec.rgb


def candidate_grid(levels: int = GRID_LEVELS) -> NDArray[np.uint8]:
    """Return the ``levels**3`` sRGB candidate colours, evenly spaced from 0 to 255 per channel."""
    if levels < 2:
        raise InputError(f"candidate grid needs at least 2 levels per channel, got {levels}")
    lv = np.rint(np.linspace(0.0, 255.0, levels)).astype(np.uint8)
    return np.stack(np.meshgrid(lv, lv, lv, indexing="ij"), axis=-1).reshape(-1, 3)


@dataclass(frozen=True)
class Figures:
    """The smallest separations of a palette over the pairs distinct on screen.

    ``None`` (JSON null) when the palette has no such pair. Each ``*_pair``
    names the two colours (original hex) that set the figure.
    """

    print_delta_e: float | None
    print_pair: tuple[str, str] | None
    gray_delta_l: float | None
    gray_pair: tuple[str, str] | None
    vision_delta_e: float | None
    vision_pair: tuple[str, str] | None
    vision_kind: str | None

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        r = lambda v: None if v is None else round(v, 2)  # noqa: E731
        return {
            "min_print_delta_e": r(self.print_delta_e),
            "min_print_pair": list(self.print_pair) if self.print_pair else None,
            "min_gray_delta_l": r(self.gray_delta_l),
            "min_gray_pair": list(self.gray_pair) if self.gray_pair else None,
            "min_vision_delta_e": r(self.vision_delta_e),
            "min_vision_pair": list(self.vision_pair) if self.vision_pair else None,
            "min_vision_kind": self.vision_kind,
        }


@dataclass(frozen=True)
class Replacement:
    """One palette colour and what to use instead.

    Attributes
    ----------
    original_hex, replacement_hex
        Screen sRGB colours (equal when the colour stays).
    locked, background
        Whether the colour was kept on purpose, and whether it is the background.
    reasons
        Why the colour was (or would have been) replaced, or why it stays.
    original_print_lab, replacement_print_lab
        CIELAB (D50) of the two prints.
    print_delta_e
        CIEDE2000 between the two prints.
    replacement_shift
        CIEDE2000 from the replacement's screen colour to its own print.
    replacement_print_hex
        sRGB showing the replacement's print.
    in_gamut
        Whether the replacement passes the gamut rule (False only for a
        locked colour that is out of gamut).
    original_gray_l, replacement_gray_l
        L* of the two on the grayscale profile.
    """

    original_hex: str
    replacement_hex: str
    locked: bool
    background: bool
    reasons: tuple[str, ...]
    original_print_lab: tuple[float, float, float]
    replacement_print_lab: tuple[float, float, float]
    print_delta_e: float
    replacement_shift: float
    replacement_print_hex: str
    in_gamut: bool
    original_gray_l: float
    replacement_gray_l: float

    @property
    def changed(self) -> bool:
        """True when the replacement differs from the original."""
        return self.replacement_hex != self.original_hex

    def to_dict(self) -> dict[str, Any]:
        """Return the JSON form."""
        return {
            "original": self.original_hex,
            "replacement": self.replacement_hex,
            "changed": self.changed,
            "locked": self.locked,
            "background": self.background,
            "reasons": list(self.reasons),
            "original_print_lab": [round(v, 2) for v in self.original_print_lab],
            "replacement_print_lab": [round(v, 2) for v in self.replacement_print_lab],
            "print_delta_e": round(self.print_delta_e, 2),
            "replacement_shift": round(self.replacement_shift, 2),
            "replacement_print_hex": self.replacement_print_hex,
            "replacement_in_gamut": self.in_gamut,
            "original_gray_l": round(self.original_gray_l, 2),
            "replacement_gray_l": round(self.replacement_gray_l, 2),
        }


@dataclass
class ReplaceReport:
    """Everything :func:`suggest_replacements` found; :meth:`to_dict` is replace.json."""

    image: ImageInfo
    output_profile: ProfileInfo
    gray_profile: str
    intent: str
    bpc: bool
    paper: bool
    colors: list[Replacement]
    before: Figures
    after: Figures
    targets: dict[str, float]
    distinct: float
    moves: int
    second_pass: bool
    notes: list[str]
    cautions: list[str]
    outputs: dict[str, str] = field(default_factory=dict)
    check: CheckReport | None = field(default=None, repr=False)

    def to_dict(self) -> dict[str, Any]:
        """Return the report as plain JSON-ready data (schema :data:`REPLACE_SCHEMA`)."""
        return {
            "schema": REPLACE_SCHEMA,
            "image": {**asdict(self.image), "notes": list(self.image.notes)},
            "output_profile": asdict(self.output_profile),
            "gray_profile": self.gray_profile,
            "intent": self.intent,
            "bpc": self.bpc,
            "paper_view": self.paper,
            "pairs": f"palette pairs with screen ΔE00 >= {self.distinct:g}",
            "targets": dict(self.targets),
            "before": self.before.to_dict(),
            "after": self.after.to_dict(),
            "colors": [c.to_dict() for c in self.colors],
            "moves": self.moves,
            "unflagged_colours_allowed_to_move": self.second_pass,
            "notes": list(self.notes),
            "outputs": dict(self.outputs),
            "cautions": list(self.cautions),
        }


@dataclass(frozen=True)
class _Options:
    """Everything a palette colour can be: the originals first, then the candidates."""

    rgb: NDArray[np.uint8]  # (M, 3) screen sRGB
    print_lab: NDArray[np.float64]  # (M, 3)
    print_rgb: NDArray[np.uint8]  # (M, 3)
    shift: NDArray[np.float64]  # (M,) screen -> print ΔE00
    gray_l: NDArray[np.float64]  # (M,)
    vision_lab: NDArray[np.float64]  # (V, M, 3)
    in_gamut: NDArray[np.bool_]  # (M,)


def _pair_minima(
    opts: _Options, state: NDArray[np.int64], considered: NDArray[np.bool_]
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], NDArray[np.int64]]:
    """Per-pair print ΔE00, gray ΔL*, vision ΔE00 (min over kinds) and the kind index, (K, K) each."""
    p = opts.print_lab[state]
    dp = delta_e_2000(p[:, None, :], p[None, :, :])
    g = opts.gray_l[state]
    dg = np.abs(g[:, None] - g[None, :])
    v = opts.vision_lab[:, state]  # (V, K, 3)
    dv_all = delta_e_2000(v[:, :, None, :], v[:, None, :, :])  # (V, K, K)
    kind = np.argmin(dv_all, axis=0)
    dv = np.min(dv_all, axis=0)
    inf = np.where(considered, 0.0, np.inf)
    return dp + inf, dg + inf, dv + inf, kind


def _figures(
    opts: _Options, state: NDArray[np.int64], considered: NDArray[np.bool_], labels: Sequence[str], kinds: Sequence[str]
) -> tuple[Figures, NDArray[np.float64]]:
    """Return the Figures of a palette state and its raw (print, gray, vision) minima."""
    dp, dg, dv, kind = _pair_minima(opts, state, considered)
    vals = []
    pairs = []
    for d in (dp, dg, dv):
        flat = int(np.argmin(d))
        i, j = divmod(flat, d.shape[1])
        v = float(d[i, j])
        vals.append(v)
        pairs.append((labels[i], labels[j]) if np.isfinite(v) else None)
    dv_flat = int(np.argmin(dv))
    vk = kinds[int(kind.flat[dv_flat])] if np.isfinite(vals[2]) else None
    out = [None if not np.isfinite(v) else v for v in vals]
    return (
        Figures(out[0], pairs[0], out[1], pairs[1], out[2], pairs[2], vk),
        np.array(vals),
    )


def _cost(print_lab: NDArray[np.float64], target_lab: NDArray[np.float64]) -> NDArray[np.float64]:
    """Weighted distance of ΔL*, ΔC*ab, ΔH*ab between prints and a target colour (step 4).

    ΔH*ab² = ΔE*ab² - ΔL*² - ΔC*ab² (CIE 015:2018, section 8.2).
    """
    dl = print_lab[..., 0] - target_lab[..., 0]
    dc = np.hypot(print_lab[..., 1], print_lab[..., 2]) - np.hypot(target_lab[..., 1], target_lab[..., 2])
    dh2 = np.maximum(delta_e_1976(print_lab, target_lab) ** 2 - dl**2 - dc**2, 0.0)
    return np.sqrt((LIGHTNESS_WEIGHT * dl) ** 2 + (CHROMA_WEIGHT * dc) ** 2 + HUE_WEIGHT**2 * dh2)


def _ascent(
    opts: _Options,
    state: NDArray[np.int64],
    movable: NDArray[np.bool_],
    must_move: NDArray[np.bool_],
    considered: NDArray[np.bool_],
    cost: NDArray[np.float64],
    before: NDArray[np.float64],
    targets: NDArray[np.float64],
    candidates: NDArray[np.int64],
    pair_floor: NDArray[np.float64],
    spread: bool = True,
) -> tuple[NDArray[np.int64], int]:
    """Best-move-first ascent of step 5; returns the new state and the moves made.

    Each round every movable colour proposes its best candidate (see
    :func:`_best_option`) and the proposal best for the whole palette is made:
    highest score, then smallest total shortfall, then the smallest increase of
    its colour's distance to the original. Every accepted move strictly
    improves that key by a fixed step, so the ascent ends. With ``spread``
    False only moves that raise the score are made (the second pass, where
    an unflagged colour may move only if that separates a pair).

    The separations of every candidate from every palette colour's current
    choice are kept in one table and only the moved colour's column is
    recomputed after a move.
    """
    state = state.copy()
    must_move = must_move.copy()
    moves = 0
    n, k_count = candidates.size, state.size
    table = np.empty((k_count, 3, n))  # print ΔE00, gray ΔL*, smallest CVD ΔE00
    short_table = np.empty((k_count, n))  # their summed shortfall
    cand_print = opts.print_lab[candidates]
    cand_vision = opts.vision_lab[:, candidates]
    cand_gray = opts.gray_l[candidates]

    def fill(col: int) -> None:
        o = int(state[col])
        table[col, 0] = delta_e_2000(cand_print, opts.print_lab[o])
        table[col, 1] = np.abs(cand_gray - opts.gray_l[o])
        table[col, 2] = np.min(delta_e_2000(cand_vision, opts.vision_lab[:, o][:, None, :]), axis=0)
        short_table[col] = _shortfall(table[col].T, targets)

    for col in range(k_count):
        fill(col)
    for _ in range(MAX_MOVES * max(int(movable.sum()), 1)):
        dp, dg, dv, _ = _pair_minima(opts, state, considered)
        pair_d = np.stack([dp, dg, dv], axis=-1)
        current = np.array([dp.min(), dg.min(), dv.min()])
        guard = np.minimum(current, np.maximum(before, targets))
        cur_score = _score(current[None, :], targets)[0]
        cur_short = _shortfall(pair_d, targets).sum() / 2.0
        forced = np.flatnonzero(must_move)
        if forced.size:
            k = int(forced[0])
            best, _, _, _ = _best_option(k, table, short_table, pair_d, considered, cost[k, candidates], guard, targets, pair_floor, True)
            state[k] = candidates[best]
            must_move[k] = False
            fill(k)
            moves += 1
            continue
        pick = None
        for k in np.flatnonzero(movable):
            best, score, short, feasible = _best_option(
                int(k), table, short_table, pair_d, considered, cost[k, candidates], guard, targets, pair_floor, False
            )
            if not feasible or candidates[best] == state[k]:
                continue
            gain = cost[k, candidates[best]] - cost[k, state[k]]
            better = (
                score > cur_score
                or (spread and score == cur_score and short <= cur_short - SCORE_STEP)
                or (spread and score == cur_score and abs(short - cur_short) < SCORE_STEP and gain <= -COST_STEP)
            )
            if better:
                key = (-score, round(short / SCORE_STEP), gain)
                if pick is None or key < pick[0]:
                    pick = (key, int(k), int(candidates[best]))
        if pick is None:
            break
        state[pick[1]] = pick[2]
        fill(pick[1])
        moves += 1
    return state, moves


def _shortfall(d: NDArray[np.float64], targets: NDArray[np.float64]) -> NDArray[np.float64]:
    """Summed shortfall of separations ``d`` (..., 3) below their targets, as shares of the targets."""
    return np.maximum(1.0 - d / targets, 0.0).sum(axis=-1)


def _best_option(
    k: int,
    table: NDArray[np.float64],
    short_table: NDArray[np.float64],
    pair_d: NDArray[np.float64],
    considered: NDArray[np.bool_],
    cost_k: NDArray[np.float64],
    guard: NDArray[np.float64],
    targets: NDArray[np.float64],
    pair_floor: NDArray[np.float64],
    forced: bool,
) -> tuple[int, float, float, bool]:
    """Best candidate for colour ``k``: (candidate position, score, total shortfall, feasible).

    ``table`` (K, 3, N) holds the (print, gray, vision) separations of every
    candidate from every palette colour's current choice and ``short_table``
    (K, N) their shortfalls; ``pair_d`` holds the separations among the
    palette colours (K, K, 3, infinite for pairs not considered).
    Feasible: none of the three minima falls below ``guard``, and no pair
    (distinct on screen or not) comes closer in print than ``pair_floor``
    (so a light tint never becomes the paper). Best: highest score, then
    smallest total shortfall of the palette's pairs below the targets (in
    steps of :data:`SCORE_STEP`; this lets the ascent spread colours apart
    where the single smallest pair cannot move yet), then lowest cost. With
    nothing feasible, a forced colour takes the candidate that violates the
    guard least (relative to the targets).
    """
    k_count = pair_d.shape[0]
    keep = np.ones(k_count, bool)
    keep[k] = False
    # Minima and shortfalls over the pairs that do not involve k stay as they are.
    inner = pair_d[np.ix_(keep, keep)]
    rest = inner.reshape(-1, 3).min(axis=0) if k_count > 1 else np.full(3, np.inf)
    rest_short = _shortfall(inner, targets).sum() / 2.0
    everyone = np.flatnonzero(keep)
    n = table.shape[2]
    apart = np.all(table[everyone, 0] >= pair_floor[k, everyone][:, None] - 1e-9, axis=0)
    others = keep & considered[k]
    if others.any():
        tot = np.minimum(table[others].min(axis=0).T, rest[None, :])  # (N, 3)
        short = rest_short + others.astype(np.float64) @ short_table
    else:
        tot = np.broadcast_to(rest, (n, 3))
        short = np.full(n, rest_short)
    feasible = np.all(tot >= guard - 1e-9, axis=1) & apart
    score = _score(tot, targets)
    steps = np.rint(short / SCORE_STEP)
    c = cost_k
    if feasible.any():
        idx = np.flatnonzero(feasible)
        best = int(idx[np.lexsort((c[idx], steps[idx], -score[idx]))[0]])
        return best, float(score[best]), float(short[best]), True
    if forced:
        viol = np.max((guard - tot) / targets, axis=1)
        best = int(np.lexsort((c, viol))[0])
        return best, float(score[best]), float(short[best]), False
    return 0, 0.0, float("inf"), False


def _score(tot: NDArray[np.float64], targets: NDArray[np.float64]) -> NDArray[np.float64]:
    """Smallest share of the targets met, capped at 1, in steps of SCORE_STEP."""
    ratio = np.min(np.minimum(tot / targets, 1.0), axis=-1)
    return np.floor(ratio / SCORE_STEP + 1e-9) * SCORE_STEP


def _match_locks(locks: Sequence[str], screen_lab: NDArray[np.float64], hexes: Sequence[str]) -> NDArray[np.bool_]:
    """Return which palette colours the user's locked hex codes name.

    A locked code names the palette colour with the same hex, else the
    nearest palette colour within the palette's noise radius
    (:data:`inkshift.chart.palette.NOISE_DELTA_E`): a JPEG chart's palette
    colour can differ from the drawn one by a code or two.
    """
    locked = np.zeros(len(hexes), bool)
    if not locks:
        return locked
    rgb = np.array([parse_hex(s) for s in locks], np.uint8)
    lab = srgb8_to_lab(rgb)
    for text, one_rgb, one_lab in zip(locks, rgb, lab):
        exact = [i for i, h in enumerate(hexes) if h == rgb_hex(one_rgb)]
        if exact:
            locked[exact[0]] = True
            continue
        d = delta_e_2000(screen_lab, one_lab)
        i = int(np.argmin(d)) if d.size else -1
        if i < 0 or d[i] > NOISE_DELTA_E:
            raise InputError(f"locked colour {text} is not among the chart's colours ({', '.join(hexes)})")
        locked[i] = True
    return locked


def suggest_replacements(
    report: CheckReport,
    *,
    locks: Sequence[str] = (),
    lock_background: bool = True,
    gray_profile: str | Path | Profile = GRAY_PROFILE,
    gray_target: float = GRAY_MERGE_DELTA_L,
    vision_target: float | None = None,
    grid_levels: int = GRID_LEVELS,
) -> ReplaceReport:
    """Propose printable replacements for the palette colours of a check (see the module docstring).

    Parameters
    ----------
    report
        The result of :func:`inkshift.check.check` (its palette, proof and
        source profile are used; ``keep_maps`` may be False).
    locks
        Hex codes of palette colours to keep exactly (brand colours).
    lock_background
        Keep the background (the colour with most pixels) exactly (default).
    gray_profile
        Grayscale output profile of the black-and-white figure.
    gray_target, vision_target
        Targets of the smallest gray ΔL* and the smallest simulated-CVD
        print ΔE00 (default: ``report.thresholds.merge``, the threshold the
        check's own colour-vision verdict used); the print target is
        ``report.thresholds.merge``.
    grid_levels
        Candidate levels per sRGB channel (:data:`GRID_LEVELS`).

    Returns
    -------
    ReplaceReport
    """
    palette = report.palette
    if palette is None or report.source_profile is None:
        raise InputError("the check report carries no palette; run inkshift.check.check() to make one")
    if vision_target is None:
        vision_target = report.thresholds.merge
    for name, value in (("gray target", gray_target), ("vision target", vision_target)):
        if not value > 0:
            raise InputError(f"the {name} must be positive, got {value}")
    t = report.thresholds
    colors = report.colors
    k = len(colors)
    hexes = [c.hex for c in colors]
    screen_lab = np.array([c.screen_lab for c in colors], np.float64).reshape(k, 3)
    user_locked = _match_locks(locks, screen_lab, hexes)
    locked = user_locked | (np.asarray(palette.is_background, bool) if lock_background else False)

    intent = parse_intent(report.intent)
    output = report.output
    gray, gray_info = open_output_profile(gray_profile)
    if gray.color_space != "GRAY":
        raise ProfileError(gray.source, f"is a {gray.color_space} profile; the black-and-white figure needs a grayscale output profile")
    source = report.source_profile
    kinds = tuple(CHECKED_DEFICIENCIES)

    # Step 1: the original palette's own proof, then the candidates'.
    orig = proof_colors(palette.colors, source, output, intent, report.bpc, report.paper, out_of_gamut_delta_e=t.out_of_gamut)
    orig_gray = proof_colors(palette.colors, source, gray, intent, report.bpc).print_lab[:, 0]
    if k:
        start_rgb, _, _ = nearest_printable(orig.print_lab, output, intent, report.bpc)
    else:
        start_rgb = np.zeros((0, 3), np.uint8)
    grid = np.concatenate([candidate_grid(grid_levels), start_rgb])
    grid = np.unique(grid, axis=0)
    cand = proof_colors(grid, srgb_profile(), output, intent, report.bpc, report.paper, out_of_gamut_delta_e=t.out_of_gamut)
    keep = ~cand.out_of_gamut & (cand.delta_e <= t.shift)
    grid = grid[keep]
    cand_gray = proof_colors(grid, srgb_profile(), gray, intent, report.bpc).print_lab[:, 0]
    orig_rgb = np.array([hex_rgb(h) for h in hexes], np.uint8).reshape(k, 3)
    print_lab = np.concatenate([orig.print_lab, cand.print_lab[keep]])
    opts = _Options(
        rgb=np.concatenate([orig_rgb, grid]),
        print_lab=print_lab,
        print_rgb=np.concatenate([orig.print_rgb, cand.print_rgb[keep]]),
        shift=np.concatenate([orig.delta_e, cand.delta_e[keep]]),
        gray_l=np.concatenate([orig_gray, cand_gray]),
        vision_lab=np.stack([simulate_cvd_lab(print_lab, kind) for kind in kinds]),
        in_gamut=np.concatenate([~orig.out_of_gamut, np.ones(grid.shape[0], bool)]),
    )
    candidates = np.arange(k, k + grid.shape[0])

    # Step 2: pairs distinct on screen.
    considered = delta_e_2000(screen_lab[:, None, :], screen_lab[None, :, :]) >= t.distinct
    np.fill_diagonal(considered, False)

    targets = np.array([t.merge, gray_target, vision_target])
    state = np.arange(k)
    before_fig, before = _figures(opts, state, considered, hexes, kinds)
    # Any pair, distinct on screen or not, keeps its print ΔE00 or the merge target.
    pair_floor = np.minimum(delta_e_2000(orig.print_lab[:, None, :], orig.print_lab[None, :, :]), targets[0])

    # Step 6: flagged colours.
    dp, dg, dv, kind_idx = _pair_minima(opts, state, considered)
    reasons: list[list[str]] = [[] for _ in range(k)]
    for i in range(k):
        if orig.out_of_gamut[i]:
            reasons[i].append("out of gamut")
        if orig.delta_e[i] > t.shift:
            reasons[i].append(f"shifts (ΔE00 {orig.delta_e[i]:.1f})")
        # Per figure, the closest partner below the target and how many more there are.
        for d, target, where in ((dp, targets[0], "in print (ΔE00"), (dg, targets[1], "in gray (ΔL*"), (dv, targets[2], None)):
            close = np.flatnonzero(d[i] < target)
            if close.size == 0:
                continue
            j = int(close[np.argmin(d[i, close])])
            label = where or f"for {kinds[kind_idx[i, j]]} (ΔE00"
            more = f" and {close.size - 1} more" if close.size > 1 else ""
            reasons[i].append(f"close to {hexes[j]}{more} {label} {d[i, j]:.1f})")
    flagged = np.array([bool(r) for r in reasons], bool)
    must_move = ~locked & orig.out_of_gamut
    cost = _cost(opts.print_lab[None, :, :], screen_lab[:, None, :])  # (K, M)

    state, moves = _ascent(opts, state, ~locked & flagged, must_move, considered, cost, before, targets, candidates, pair_floor)
    _, reached = _figures(opts, state, considered, hexes, kinds)
    second = bool(np.any(~locked & ~flagged)) and bool(_score(reached[None, :], targets)[0] < 1.0)
    moved_unflagged = np.zeros(k, bool)
    if second:
        state, more = _ascent(opts, state, ~locked, np.zeros(k, bool), considered, cost, before, targets, candidates, pair_floor, spread=False)
        moves += more
        moved_unflagged = ~flagged & (state != np.arange(k))
    after_fig, _ = _figures(opts, state, considered, hexes, kinds)

    out: list[Replacement] = []
    for i in range(k):
        why = list(reasons[i])
        if locked[i]:
            why.insert(0, "locked" if user_locked[i] else "background, kept")
        if moved_unflagged[i]:
            why.append("moved to make room for the flagged colours")
        s = int(state[i])
        rhex = rgb_hex(opts.rgb[s]) if s >= k else hexes[i]
        out.append(
            Replacement(
                original_hex=hexes[i],
                replacement_hex=rhex,
                locked=bool(locked[i]),
                background=bool(palette.is_background[i]),
                reasons=tuple(why) or ("fine as it is",),
                original_print_lab=tuple(float(v) for v in opts.print_lab[i]),
                replacement_print_lab=tuple(float(v) for v in opts.print_lab[s]),
                print_delta_e=float(delta_e_2000(opts.print_lab[i], opts.print_lab[s])),
                replacement_shift=float(opts.shift[s]),
                replacement_print_hex=rgb_hex(opts.print_rgb[s]),
                in_gamut=bool(opts.in_gamut[s]),
                original_gray_l=float(opts.gray_l[i]),
                replacement_gray_l=float(opts.gray_l[s]),
            )
        )

    notes: list[str] = []
    if source is not srgb_profile():
        notes.append("The chart is not in sRGB: replacements are sRGB colours and the preview mixes edges in sRGB.")
    for r in out:
        if r.locked and not r.in_gamut:
            notes.append(f"{r.original_hex} is locked but out of gamut: it will not print as it looks on screen.")
    unmet = [
        word for word, v, target in zip(("print", "gray", "colour-vision"), (after_fig.print_delta_e, after_fig.gray_delta_l, after_fig.vision_delta_e), targets)
        if v is not None and v < target
    ]
    if unmet:
        notes.append(
            f"Not every target is met ({', '.join(unmet)}): {k} colours, {int(locked.sum())} of them locked, leave "
            "too little room on this profile; fewer colours, direct labels or patterns would help."
        )
    if not considered.any():
        notes.append(f"No two chart colours are {t.distinct:g} ΔE00 or more apart on screen; nothing to separate.")
    return ReplaceReport(
        image=report.image,
        output_profile=report.output_profile,
        gray_profile=gray_info.name,
        intent=report.intent,
        bpc=report.bpc,
        paper=report.paper,
        colors=out,
        before=before_fig,
        after=after_fig,
        targets={"print_delta_e": float(targets[0]), "gray_delta_l": float(targets[1]), "vision_delta_e": float(targets[2])},
        distinct=t.distinct,
        moves=moves,
        second_pass=second,
        notes=notes,
        cautions=cautions_for(
            shipped_profile=shipped_in_use([report.output_profile, gray_info]),
            vision=True,
            assumed_srgb=assumed_srgb(report.image.profile_assumed, report.image.color_space),
        ),
        check=report,
    )


def replace_colors(
    image: str | Path | Image.Image | NDArray[Any] | ChartImage,
    profile: str | Path | Profile = DEFAULT_PROFILE,
    intent: Intent | str | int = Intent.RELATIVE,
    *,
    bpc: bool = True,
    paper: bool = False,
    thresholds: Thresholds = Thresholds(),
    max_pixels: int | None = None,
    locks: Sequence[str] = (),
    lock_background: bool = True,
    gray_profile: str | Path | Profile = GRAY_PROFILE,
) -> ReplaceReport:
    """Check a chart (:func:`inkshift.check.check`) and propose replacements for its palette.

    The locked hex codes are checked for form before the chart is read, so a
    typo fails fast. Other parameters as for :func:`inkshift.check.check` and
    :func:`suggest_replacements`.
    """
    for text in locks:
        parse_hex(text)
    report = check(
        image, profile, intent, bpc=bpc, paper=paper, thresholds=thresholds, max_pixels=max_pixels,
        keep_maps=False, gray_profile=gray_profile,
    )
    return suggest_replacements(report, locks=locks, lock_background=lock_background, gray_profile=gray_profile)


def recolor_chart(result: ReplaceReport) -> NDArray[np.uint8]:
    """Return the chart in sRGB with the replacement colours, ``(H, W, 3)`` uint8.

    Each unique colour labelled as a replaced palette colour becomes the
    replacement plus its own offset from the palette colour; each blend of a
    replaced colour becomes the same mix of the replaced parents plus its
    offset from the exact mix (see the module docstring). Everything else is
    unchanged.
    """
    rep = result.check
    if rep is None or rep.unique is None or rep.palette is None:
        raise InputError("the replacement report carries no check with unique colours; use replace_colors()")
    uniq, palette = rep.unique, label_blends(rep.palette, rep.unique.colors)
    u_rgb = screen_srgb8(uniq.colors, rep.source_profile).astype(np.float64)
    old = np.array([hex_rgb(c.original_hex) for c in result.colors], np.float64).reshape(-1, 3)
    new = np.array([hex_rgb(c.replacement_hex) for c in result.colors], np.float64).reshape(-1, 3)
    changed = np.any(old != new, axis=1)
    labels = palette.labels
    out = u_rgb.copy()
    own = labels >= 0
    own_changed = own & changed[np.maximum(labels, 0)]
    li = labels[own_changed]
    out[own_changed] = new[li] + (u_rgb[own_changed] - old[li])
    p = palette.parents
    is_blend = (labels == BLEND) & (p[:, 0] >= 0) & (p[:, 1] >= 0)
    blend_changed = is_blend & (changed[np.maximum(p[:, 0], 0)] | changed[np.maximum(p[:, 1], 0)])
    if blend_changed.any():
        m = palette.mix[blend_changed][:, None]
        p0, p1 = p[blend_changed, 0], p[blend_changed, 1]
        exact_old = m * old[p0] + (1.0 - m) * old[p1]
        out[blend_changed] = m * new[p0] + (1.0 - m) * new[p1] + (u_rgb[blend_changed] - exact_old)
    colors = np.clip(np.rint(out), 0, 255).astype(np.uint8)
    return expand(colors, uniq.inverse, uniq.shape)


def write_replace_outputs(result: ReplaceReport, out_dir: str | Path) -> dict[str, Path]:
    """Write replace.json, the swatch sheet and the recoloured preview into ``out_dir`` atomically.

    As :func:`inkshift.check.write_check_outputs`: on failure, files already
    written by this call and a folder it created are removed again.
    """
    from inkshift.report.images import Swatch, swatch_sheet

    preview = recolor_chart(result)
    with output_folder(out_dir) as out:
        paths = {key: out.path / name for key, name in OUTPUT_FILES.items()}
        rows = [
            ("original", [
                Swatch(hex_rgb(c.original_hex), lab_to_srgb8(np.array(c.original_print_lab)), label=c.original_hex,
                       delta_e=_shift_of(result, i), marks=_marks(c, original=True))
                for i, c in enumerate(result.colors)
            ]),
            ("replacement", [
                Swatch(hex_rgb(c.replacement_hex), hex_rgb(c.replacement_print_hex), label=c.replacement_hex,
                       delta_e=c.replacement_shift, marks=_marks(c, original=False))
                for c in result.colors
            ]),
        ]
        out.image(OUTPUT_FILES["swatches"], swatch_sheet(rows), icc_profile=srgb_profile_bytes())
        img = Image.fromarray(preview, mode="RGB")
        out.image(OUTPUT_FILES["preview"], img, icc_profile=srgb_profile_bytes())
        result.outputs = {key: str(p) for key, p in paths.items()}
        out.text(OUTPUT_FILES["report"], json.dumps(result.to_dict(), indent=2, ensure_ascii=False) + "\n")
    return paths


def _shift_of(result: ReplaceReport, i: int) -> float:
    rep = result.check
    return float(rep.colors[i].delta_e) if rep is not None else float("nan")


def _marks(c: Replacement, *, original: bool) -> tuple[str, ...]:
    if c.locked:
        return ("LOCKED",)
    if original:
        return ("OUT",) if any(r == "out of gamut" for r in c.reasons) else ()
    return ("NEW",) if c.changed else ("SAME",)


def format_replace(result: ReplaceReport) -> str:
    """Return the console summary: original -> replacement table, figures before/after, outputs, cautions."""
    from inkshift.report.console import closing_lines, format_table

    img, prof = result.image, result.output_profile
    lines = [
        f"Chart:    {img.path or '(in memory)'}  {img.width} x {img.height} px",
        f"Printer:  {prof.name}  ({prof.description}); black and white on {result.gray_profile}",
        "",
        "Replacement colours",
    ]
    rows = [
        [c.original_hex, "->", c.replacement_hex if c.changed else "(same)", c.replacement_print_hex,
         f"{c.print_delta_e:.1f}", "; ".join(c.reasons)]
        for c in result.colors
    ]
    headers = ["original", "", "use", "prints as", "ΔE00 moved", "why"]
    lines.extend("  " + ln for ln in format_table(headers, rows, [False, False, False, False, True, False]))
    lines.append("")
    lines.append(f"Smallest separations (pairs at least {result.distinct:g} ΔE00 apart on screen)")
    fig_rows = []
    for word, key, unit in (
        ("print", "print_delta_e", "ΔE00"),
        ("gray print", "gray_delta_l", "ΔL*"),
        ("print, colour-vision simulated", "vision_delta_e", "ΔE00"),
    ):
        b = getattr(result.before, key)
        a = getattr(result.after, key)
        fig_rows.append([word, unit, _num(b), _num(a), f"{result.targets[key]:g}"])
    lines.extend("  " + ln for ln in format_table(["figure", "unit", "before", "after", "target"], fig_rows,
                                                   [False, False, True, True, True]))
    for note in result.notes:
        lines.append(f"Note: {note}")
    lines.extend(closing_lines(result.outputs, result.cautions))
    return "\n".join(lines)


def _num(v: float | None) -> str:
    return "n/a" if v is None else f"{v:.1f}"
