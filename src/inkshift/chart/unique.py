"""Unique colours of an 8-bit image, with counts and the pixel-to-colour index.

Everything costly in a proof runs once per unique colour and is mapped back to
the pixels with :func:`expand`. A chart of tens of megapixels usually has a few
hundred to a few hundred thousand distinct colours, so this is where the time
goes to nothing or to everything.

Method. Each pixel's channels are packed into one integer key, most significant
channel first (RGB -> ``r << 16 | g << 8 | b``; CMYK -> 32 bits; GRAY -> 8 bits),
so that ascending keys are the lexicographic order of the colour rows (the
order ``np.unique(..., axis=0)`` returns). For keys of up to 24 bits the unique
set is found by marking a table over the whole key space (2**24 booleans,
16 MB) instead of sorting: marking and the later table look-up are linear in
the pixel count, a sort is not. The look-up writes the colour index over the
key array in place, so the extra memory is the 4-byte key per pixel (which
becomes the returned ``inverse``) plus the two tables (16 MB + 64 MB for RGB).
For 32-bit CMYK keys the two 16-bit halves are ranked separately by the same
table method and combined into a dense key; only when that dense space is too
large does it fall back to ``np.unique``'s sort.

Charts are mostly long runs of one colour along a row, so when there are at
most a quarter as many runs as pixels, only the first key of each run is
ranked and ``np.repeat`` spreads the ranks back; fewer than 2**16 keys are
simply sorted. ``benchmarks/unique_colors.py`` compares this with
``np.unique`` on 24 megapixels (measured on the shared 2-core machine: a chart
0.18 s and 6.7 bytes per pixel against 1.3 s and 37 bytes per pixel; uniform
noise, the worst case, 1.4 s and 14 bytes per pixel against 7.0 s). The
marking and the look-up share their chunks between two threads.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from inkshift.chunks import for_each_chunk

__all__ = [
    "UniqueColors",
    "PixelRuns",
    "IndexedImage",
    "as_pixel_map",
    "rgbx_rows",
    "unique_colors",
    "pack_colors",
    "pixel_runs",
    "expand",
    "MAX_TABLE_BITS",
]

MAX_TABLE_BITS = 24
"""Largest key space (bits) ranked by a direct table: 2**24 int32 = 64 MB, the
RGB cube. Larger keys are compacted first (see the module docstring)."""

_CHUNK = 1 << 20  # pixels per step of the chunked loops (4 MB of keys)
_SORT_BELOW = 1 << 16  # fewer keys than this are ranked by np.unique's sort
_RUN_GAIN = 4  # use the run route when runs are at most a quarter of the pixels


@dataclass(frozen=True)
class UniqueColors:
    """The distinct colours of an image.

    Attributes
    ----------
    colors
        ``(N, C)`` uint8, in ascending key order (lexicographic by channel).
    counts
        ``(N,)`` pixels of each colour: int32 for images under 2**31 pixels,
        else int64.
    inverse
        ``(H*W,)`` int32, index into ``colors`` of each pixel (row-major).
    shape
        ``(H, W)`` of the image.
    """

    colors: NDArray[np.uint8]
    counts: NDArray[np.signedinteger]
    inverse: NDArray[np.int32]
    shape: tuple[int, int]

    def __len__(self) -> int:
        return int(self.colors.shape[0])


def pack_colors(colors: ArrayLike) -> NDArray[np.uint32]:
    """Pack 8-bit colours (``(..., C)``, C <= 4) into uint32 keys, first channel highest.

    Written byte by byte into a little-endian uint32 view, so no wider
    temporary array is made.
    """
    colors = np.asarray(colors)
    if colors.dtype != np.uint8 or colors.ndim < 1 or not 1 <= colors.shape[-1] <= 4:
        raise ValueError(f"pack_colors needs (..., C<=4) uint8 colours, got {colors.dtype} {colors.shape}")
    lead = colors.shape[:-1]
    c = colors.shape[-1]
    flat = colors.reshape(-1, c)
    keys = np.zeros(flat.shape[0], dtype="<u4")
    as_bytes = keys.view(np.uint8).reshape(-1, 4)
    for ch in range(c):
        as_bytes[:, c - 1 - ch] = flat[:, ch]
    return keys.astype(np.uint32, copy=False).reshape(lead)


def _unpack(keys: NDArray[np.uint32], c: int) -> NDArray[np.uint8]:
    as_bytes = np.ascontiguousarray(keys, dtype="<u4").view(np.uint8).reshape(-1, 4)
    if c == 3:
        out = rgbx_rows(keys.size)
        out[:] = as_bytes[:, 2::-1]
        return out
    return np.ascontiguousarray(as_bytes[:, c - 1 :: -1] if c > 0 else as_bytes[:, :0])


def rgbx_rows(n: int) -> NDArray[np.uint8]:
    """Return an (n, 3) uint8 array laid out as 4-byte RGBX words (a view of an
    (n, 4) array, the fourth byte 0).

    An :class:`IndexedImage` of such values gathers the words directly instead of
    keeping a packed copy (4 bytes a colour; a photograph has millions).
    """
    return np.zeros((n, 4), np.uint8)[:, :3]


def _rgbx_words(values: NDArray) -> NDArray[np.uint32] | None:
    """The uint32 words behind an (N, 3) uint8 view made by :func:`rgbx_rows`, else None."""
    base = values.base
    if (
        isinstance(base, np.ndarray)
        and base.dtype == np.uint8
        and base.shape == (values.shape[0], 4)
        and base.flags.c_contiguous
        and values.strides == (4, 1)
        and values.__array_interface__["data"][0] == base.__array_interface__["data"][0]
    ):
        return base.view(np.uint32).reshape(-1)
    return None


def _rank_in_place(keys: NDArray, bits: int) -> tuple[NDArray[np.int64], NDArray[np.int32]]:
    """Replace ``keys`` (uint32, < 2**bits) by the rank of each among the distinct keys.

    Returns the sorted distinct keys and ``keys`` reinterpreted as int32 ranks.
    Works in chunks so that each step's temporaries stay small and in cache.
    """
    present = np.zeros(1 << bits, dtype=bool)

    def mark(s: int) -> None:
        # Threads may set the same entry at once; every write stores True.
        present[keys[s : s + _CHUNK]] = True

    for_each_chunk(mark, keys.size, _CHUNK)
    distinct = np.flatnonzero(present)
    present = None  # 16 MB, not needed for the look-up
    table = np.zeros(1 << bits, dtype=np.int32)
    table[distinct] = np.arange(distinct.size, dtype=np.int32)
    ranks = keys.view(np.int32)

    def rank(s: int) -> None:
        # mode="clip" with out= writes straight into the key buffer (each element
        # is read before it is overwritten); every key is < 2**bits, so the clip
        # never changes a value.
        np.take(table, keys[s : s + _CHUNK], out=ranks[s : s + _CHUNK], mode="clip")

    for_each_chunk(rank, keys.size, _CHUNK)
    return distinct, ranks


def _rank(keys: NDArray[np.uint32], bits: int) -> tuple[NDArray[np.uint32], NDArray[np.int32]]:
    """Distinct keys (ascending) and the int32 rank of every key, overwriting ``keys``."""
    if keys.size < _SORT_BELOW:
        # Few keys: sorting them is cheaper than clearing a 2**bits table.
        distinct, ranks = np.unique(keys, return_inverse=True)
        return distinct.astype(np.uint32), ranks.reshape(-1).astype(np.int32)
    if bits <= MAX_TABLE_BITS:
        distinct, ranks = _rank_in_place(keys, bits)
        return distinct.astype(np.uint32), ranks
    return _rank_wide(keys)


def _count_dtype(n_pixels: int) -> type[np.signedinteger]:
    """int32 while no count can reach 2**31 (a photograph has millions of colours:
    half the memory of int64), else int64."""
    return np.int32 if n_pixels < 2**31 else np.int64


def _counts(ranks: NDArray[np.int32], n: int) -> NDArray[np.signedinteger]:
    counts = np.zeros(n, dtype=_count_dtype(ranks.size))
    # Each step makes an n-long count array, so with millions of colours fewer,
    # larger steps win (24 MP photo, 6 M colours: 0.73 s with 2**20, 0.49 s with 2**22).
    step = _CHUNK if n <= _CHUNK else 4 * _CHUNK
    for s in range(0, ranks.size, step):
        counts += np.bincount(ranks[s : s + step], minlength=n)
    return counts


def unique_colors(pixels: ArrayLike) -> UniqueColors:
    """Return the distinct colours of ``pixels`` with counts and the per-pixel index.

    Parameters
    ----------
    pixels
        ``(H, W, C)`` uint8 with C in 1..4 (GRAY, RGB, CMYK).

    Returns
    -------
    UniqueColors
        Equal to ``np.unique(pixels.reshape(-1, C), axis=0, return_inverse=True,
        return_counts=True)``, in the same order (counts as int32 under 2**31 pixels).

    Notes
    -----
    Charts are mostly long runs of one colour along a row, so the pixels are
    first reduced to runs (one key per run of equal keys); the ranking then
    works on the runs and ``np.repeat`` spreads the ranks back. When runs are
    not much fewer than pixels (noise, photographs) the keys are ranked directly.
    """
    pixels = np.asarray(pixels)
    if pixels.dtype != np.uint8 or pixels.ndim != 3 or not 1 <= pixels.shape[2] <= 4:
        raise ValueError(f"unique_colors needs (H, W, C<=4) uint8 pixels, got {pixels.dtype} {pixels.shape}")
    h, w, c = pixels.shape
    n = h * w
    bits = 8 * c
    keys = pack_colors(pixels).reshape(-1)
    change = _run_changes(keys)
    if int(np.count_nonzero(change)) <= n // _RUN_GAIN:
        starts = np.flatnonzero(change)
        del change
        run_keys = keys[starts]
        lengths = np.diff(np.append(starts, n))
        del keys
        ukeys, run_rank = _rank(run_keys, bits)
        counts = np.bincount(run_rank, weights=lengths, minlength=ukeys.size).astype(_count_dtype(n))
        inverse = np.repeat(run_rank, lengths)
    else:
        del change
        ukeys, inverse = _rank(keys, bits)
        counts = _counts(inverse, ukeys.size)
    return UniqueColors(
        colors=_unpack(ukeys, c),
        counts=counts,
        inverse=inverse,
        shape=(h, w),
    )


def _run_changes(keys: NDArray[np.uint32]) -> NDArray[np.bool_]:
    """True where a new run of equal keys begins (always at 0)."""
    change = np.empty(keys.size, dtype=bool)
    if keys.size:
        change[0] = True
        np.not_equal(keys[1:], keys[:-1], out=change[1:])
    return change


def _rank_wide(keys: NDArray[np.uint32]) -> tuple[NDArray[np.uint32], NDArray[np.int32]]:
    """Rank 32-bit keys: rank both 16-bit halves by table, then the dense pair key."""
    hi = (keys >> 16).astype(np.uint32)
    lo = (keys & 0xFFFF).astype(np.uint32)
    hi_keys, hi_rank = _rank_in_place(hi, 16)
    lo_keys, lo_rank = _rank_in_place(lo, 16)
    n_lo = lo_keys.size
    if hi_keys.size * n_lo <= (1 << MAX_TABLE_BITS):
        # Dense key hi_rank * n_lo + lo_rank keeps the order of the original keys.
        dense = hi_rank.astype(np.uint32) * np.uint32(n_lo) + lo_rank.astype(np.uint32)
        del hi, lo, hi_rank, lo_rank
        bits = max(1, int(hi_keys.size * n_lo - 1).bit_length())
        distinct, inverse = _rank_in_place(dense, bits)
        ukeys = (hi_keys[distinct // n_lo].astype(np.uint32) << 16) | lo_keys[distinct % n_lo].astype(np.uint32)
        return ukeys, inverse
    ukeys, inverse = np.unique(keys, return_inverse=True)
    return ukeys.astype(np.uint32), inverse.reshape(-1).astype(np.int32)


@dataclass(frozen=True)
class PixelRuns:
    """Runs of equal colour indices in row-major pixel order: ``colors[k]`` repeated
    ``lengths[k]`` times, ending before pixel ``ends[k]``."""

    colors: NDArray[np.int32]
    lengths: NDArray[np.intp]
    ends: NDArray[np.intp]


def pixel_runs(inverse: ArrayLike) -> PixelRuns | None:
    """Return the runs of ``inverse`` (``UniqueColors.inverse``), or None when they
    are not at most a quarter as many as the pixels (a photograph), where
    :func:`expand` is faster without them."""
    inverse = np.asarray(inverse)
    change = _run_changes(inverse)
    if int(np.count_nonzero(change)) > inverse.size // _RUN_GAIN:
        return None
    starts = np.flatnonzero(change)
    del change
    ends = np.append(starts[1:], inverse.size)
    return PixelRuns(colors=inverse[starts], lengths=ends - starts, ends=ends)


def expand(
    values_per_color: ArrayLike, inverse: ArrayLike, shape: tuple[int, ...], runs: PixelRuns | None = None
) -> NDArray:
    """Map per-colour values back to pixels with one ``np.take``.

    Parameters
    ----------
    values_per_color
        ``(N, ...)`` values, one row per unique colour.
    inverse
        ``(H*W,)`` colour index of each pixel (``UniqueColors.inverse``).
    shape
        ``(H, W)`` of the image.
    runs
        :func:`pixel_runs` of ``inverse``, if known: the values are then spread
        run by run with ``np.repeat`` (measured on a 24-megapixel chart: 0.17 s
        per map against 0.3-0.65 s for the gather).

    Returns
    -------
    ndarray
        ``shape + values_per_color.shape[1:]``.
    """
    values = np.asarray(values_per_color)
    inverse = np.asarray(inverse)
    if runs is not None:
        out = np.repeat(values[runs.colors], runs.lengths, axis=0)
    else:
        # In chunks: np.take widens int32 indices to intp, and a chunk's copy stays
        # in cache (24 MP photo: 0.35 -> 0.15 s per map).
        out = np.empty((inverse.size,) + values.shape[1:], values.dtype)
        for s in range(0, inverse.size, _CHUNK):
            np.take(values, inverse[s : s + _CHUNK], axis=0, out=out[s : s + _CHUNK])
    return out.reshape(tuple(shape) + values.shape[1:])


class IndexedImage:
    """A per-pixel map held as one value per unique colour and each pixel's colour index.

    The generalisation of an indexed-colour (palette) image to any values:
    ``image[y0:y1]`` expands only those rows, ``np.asarray(image)`` the whole
    map. A proof keeps its maps this way, so a map costs its per-colour values
    plus the shared index (4 bytes per pixel) until a picture is drawn band by
    band, instead of 1-4 bytes per pixel per map.
    """

    def __init__(
        self, values: ArrayLike, index: ArrayLike, shape: tuple[int, int], runs: PixelRuns | None = None
    ) -> None:
        self.values = np.asarray(values)
        index = np.asarray(index)
        # Kept as the very object given when already flat: maps built on one
        # index are recognised as sharing it (``a.index is b.index``).
        self.index = index if index.ndim == 1 else index.reshape(-1)
        if self.index.size != shape[0] * shape[1]:
            raise ValueError(f"an index of {self.index.size} pixels does not fit shape {shape}")
        self.shape: tuple[int, ...] = tuple(shape) + self.values.shape[1:]
        # The runs of the index (:func:`pixel_runs`), when given: a chart's rows
        # are then spread run by run, several times faster than a gather.
        self.runs = runs
        # 8-bit RGB is gathered as one uint32 per colour: a one-dimensional take
        # of 4-byte items is 2-3 times faster than taking 3-byte rows.
        self._packed: NDArray[np.uint32] | None = None
        if self.values.dtype == np.uint8 and self.values.ndim == 2 and self.values.shape[1] == 3:
            self._packed = _rgbx_words(self.values)
            if self._packed is None:
                padded = rgbx_rows(self.values.shape[0])
                padded[:] = self.values
                self._packed = _rgbx_words(padded)

    @property
    def dtype(self) -> np.dtype:
        """The dtype of the values (and of every expanded band)."""
        return self.values.dtype

    @property
    def ndim(self) -> int:
        """2 for a map of scalars, 3 for one of vectors (RGB)."""
        return len(self.shape)

    def __len__(self) -> int:
        return self.shape[0]

    def __getitem__(self, rows: slice) -> NDArray:
        """Rows ``rows`` (a slice with step 1) expanded to pixels."""
        if not isinstance(rows, slice) or rows.step not in (None, 1):
            raise TypeError("an IndexedImage is read by row slices, image[y0:y1]")
        y0, y1, _ = rows.indices(self.shape[0])
        return self._expand(y0, max(y0, y1))

    def packed_rows(self, y0: int, y1: int) -> NDArray[np.uint32]:
        """Rows ``y0:y1`` of an 8-bit RGB map as (h, W) uint32 RGBX words (Pillow's "RGBX" raw layout)."""
        if self._packed is None:
            raise TypeError("packed_rows needs an (N, 3) uint8 IndexedImage")
        return self._spread(self._packed, y0, y1)

    def _expand(self, y0: int, y1: int) -> NDArray:
        if self._packed is not None:
            rgbx = self.packed_rows(y0, y1).view(np.uint8).reshape(y1 - y0, self.shape[1], 4)
            return np.ascontiguousarray(rgbx[..., :3])
        return self._spread(self.values, y0, y1)

    def _spread(self, values: NDArray, y0: int, y1: int) -> NDArray:
        """Per-colour ``values`` spread over rows ``y0:y1``."""
        w = self.shape[1]
        p0, p1 = y0 * w, y1 * w
        if self.runs is None or p1 <= p0:
            return expand(values, self.index[p0:p1], (y1 - y0, w))
        ends = self.runs.ends
        r0 = int(np.searchsorted(ends, p0, side="right"))
        r1 = int(np.searchsorted(ends, p1 - 1, side="right")) + 1
        lengths = self.runs.lengths[r0:r1].copy()
        lengths[0] -= p0 - (ends[r0] - self.runs.lengths[r0])  # the first run may start above the band
        lengths[-1] -= ends[r1 - 1] - p1  # and the last end below it
        out = np.repeat(values[self.runs.colors[r0:r1]], lengths, axis=0)
        return out.reshape((y1 - y0, w) + values.shape[1:])

    def __array__(self, dtype: np.dtype | None = None, copy: bool | None = None) -> NDArray:
        # Expanding always makes a new array, whatever ``copy`` asks.
        out = self._expand(0, self.shape[0])
        return out if dtype is None else out.astype(dtype, copy=False)


def as_pixel_map(image: ArrayLike | IndexedImage) -> NDArray | IndexedImage:
    """Return ``image`` as it stands if it is an :class:`IndexedImage` (read band by
    band, never expanded whole), else as a numpy array."""
    return image if isinstance(image, IndexedImage) else np.asarray(image)
