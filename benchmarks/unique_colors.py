"""Time unique_colors against np.unique's sort on 24-megapixel images.

Run: ``python benchmarks/unique_colors.py [megapixels]`` (default 24).

Two images of the same size:
- *chart*: the sample ferry_ridership.png scaled up (nearest neighbour, so its
  runs stay long) to the target size, plus a JPEG-like +-2 code noise on a
  tenth of the rows: a realistic chart with a few thousand colours;
- *noise*: uniform random RGB, the worst case (every pixel a new run).

For each, both routes are timed (best of 3) and their peak extra memory is
measured with tracemalloc (numpy reports its buffers to it), in bytes per pixel
beyond the input image. The np.unique reference packs the same 24-bit keys
first, so the comparison is of the ranking step, not of row sorting.
"""

from __future__ import annotations

import sys
import time
import tracemalloc
from pathlib import Path

import numpy as np
from PIL import Image

from inkshift.chart.unique import pack_colors, unique_colors

SAMPLE = Path(__file__).resolve().parent.parent / "samples" / "ferry_ridership.png"


def _chart(megapixels: float) -> np.ndarray:
    base = Image.open(SAMPLE).convert("RGB")
    scale = (megapixels * 1e6 / (base.width * base.height)) ** 0.5
    size = (round(base.width * scale), round(base.height * scale))
    arr = np.array(base.resize(size, Image.Resampling.NEAREST))
    rng = np.random.default_rng(0)
    rows = rng.choice(arr.shape[0], arr.shape[0] // 10, replace=False)
    noisy = arr[rows].astype(np.int16) + rng.integers(-2, 3, arr[rows].shape, dtype=np.int16)
    arr[rows] = np.clip(noisy, 0, 255).astype(np.uint8)
    return arr


def _noise(shape: tuple[int, ...]) -> np.ndarray:
    return np.random.default_rng(1).integers(0, 256, shape, dtype=np.uint8)


def _with_np_unique(pixels: np.ndarray):
    keys = pack_colors(pixels).reshape(-1)
    return np.unique(keys, return_inverse=True, return_counts=True)


def _measure(fn, pixels: np.ndarray) -> tuple[float, float]:
    best = float("inf")
    for _ in range(3):
        t0 = time.perf_counter()
        result = fn(pixels)
        best = min(best, time.perf_counter() - t0)
        del result
    tracemalloc.start()
    result = fn(pixels)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    del result
    return best, peak / (pixels.shape[0] * pixels.shape[1])


def main() -> int:
    megapixels = float(sys.argv[1]) if len(sys.argv) > 1 else 24.0
    chart = _chart(megapixels)
    images = {"chart": chart, "noise": _noise(chart.shape)}
    print(f"image {chart.shape[1]} x {chart.shape[0]} = {chart.shape[0] * chart.shape[1] / 1e6:.1f} MP RGB")
    for name, pixels in images.items():
        u = unique_colors(pixels)
        ref = _with_np_unique(pixels)
        assert np.array_equal(u.inverse, ref[1].reshape(-1)) and np.array_equal(u.counts, ref[2])
        t_table, m_table = _measure(unique_colors, pixels)
        t_sort, m_sort = _measure(_with_np_unique, pixels)
        print(
            f"{name:6s} {len(u):9d} colours | unique_colors {t_table:6.2f} s {m_table:5.1f} B/px"
            f" | np.unique {t_sort:6.2f} s {m_sort:5.1f} B/px | speed-up x{t_sort / t_table:.1f}"
        )
    return 0


if __name__ == "__main__":
    sys.exit(main())
