"""Time and memory of the full-resolution heat map at 24 megapixels.

Run: python benchmarks/heatmap.py [--width 6000 --height 4000 --repeat 3]

Prints the median wall time of :func:`inkshift.report.heatmap.heatmap_overlay`,
its rate in megapixels per second, and the process's peak resident memory
above the inputs (Linux /proc: VmHWM after resetting it through clear_refs),
with ratios to two floors: the time Pillow takes just to copy the input into an
image, and the bytes of the output image itself; then the time of the
side-by-side previews of the same input; then the heat map written to PNG
band by band (:func:`inkshift.report.heatmap.heatmap_bands` and
:func:`inkshift.report.png.write_png_bands`, what ``inkshift check`` does)
against Pillow saving the whole picture at zlib level 1, with the peak memory
of each above the inputs.
"""

from __future__ import annotations

import argparse
import statistics
import tempfile
import time
import tracemalloc
from pathlib import Path

import numpy as np
from PIL import Image

from inkshift.report.heatmap import heatmap_bands, heatmap_overlay
from inkshift.report.png import write_png_bands
from inkshift.report.sheets import side_by_side


def _status_kb(key: str) -> int:
    for line in Path("/proc/self/status").read_text().splitlines():
        if line.startswith(key + ":"):
            return int(line.split()[1])
    raise KeyError(key)


def _reset_peak() -> bool:
    try:
        Path("/proc/self/clear_refs").write_text("5")  # resets VmHWM (Linux >= 4.0)
        return True
    except OSError:
        return False


def _inputs(h: int, w: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """A chart-like test image built in place: stripes, blocks, a ΔE ramp, a gamut patch."""
    rgb = np.empty((h, w, 3), np.uint8)
    rgb[...] = 255
    rgb[:: max(1, h // 200)] = 40
    rgb[h // 4 : h // 2, w // 8 : w // 2] = (30, 90, 210)
    rgb[h // 2 : 3 * h // 4, w // 2 : 7 * w // 8] = (250, 120, 20)
    de = np.empty((h, w), np.float32)
    de[...] = np.linspace(0.0, 30.0, w, dtype=np.float32)[None, :]
    de[: h // 8] = 0.0
    oog = np.zeros((h, w), bool)
    oog[h // 4 : h // 2, w // 8 : w // 2] = True
    return rgb, de, oog


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--width", type=int, default=6000)
    ap.add_argument("--height", type=int, default=4000)
    ap.add_argument("--repeat", type=int, default=3)
    args = ap.parse_args()
    h, w = args.height, args.width
    mp = h * w / 1e6
    rgb, de, oog = _inputs(h, w)
    heatmap_overlay(rgb[:64, :64], de[:64, :64], oog[:64, :64])  # warm the look-up tables

    floor_times = []
    for _ in range(args.repeat):
        t0 = time.perf_counter()
        Image.fromarray(rgb, mode="RGB")
        floor_times.append(time.perf_counter() - t0)

    base_kb = _status_kb("VmRSS")
    can_reset = _reset_peak()
    times = []
    for _ in range(args.repeat):
        t0 = time.perf_counter()
        img = heatmap_overlay(rgb, de, oog)
        times.append(time.perf_counter() - t0)
        del img
    peak_kb = _status_kb("VmHWM")

    tracemalloc.start()
    img = heatmap_overlay(rgb, de, oog)
    _, traced_peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    out_bytes = img.width * img.height * 3

    t, tf = statistics.median(times), statistics.median(floor_times)
    print(f"input {w}x{h} = {mp:.1f} MP, output {img.width}x{img.height}")
    print(f"heatmap_overlay: {t:.2f} s median of {args.repeat} ({mp / t:.1f} MP/s)")
    print(f"floor (Image.fromarray copy of the input): {tf:.3f} s; ratio {t / tf:.1f}x")
    if can_reset:
        extra = (peak_kb - base_kb) / 1024
        print(f"peak RSS above inputs: {extra:.0f} MB = {extra * 2**20 / out_bytes:.2f}x the output's RGB bytes ({out_bytes / 2**20:.0f} MB)")
    else:
        print(f"peak RSS (cannot reset on this system): {peak_kb / 1024:.0f} MB, inputs at {base_kb / 1024:.0f} MB")
    print(f"peak numpy working memory (tracemalloc): {traced_peak / 2**20:.0f} MB")
    del img
    t0 = time.perf_counter()
    side_by_side(rgb, rgb, [])
    t_sbs = time.perf_counter() - t0
    print(f"side_by_side previews of the same input (LANCZOS to 2400 px): {t_sbs:.2f} s; ratio to floor {t_sbs / tf:.1f}x")

    with tempfile.TemporaryDirectory() as tmp:
        figures = {}
        for label in ("Pillow, whole picture, level 1", "band by band"):
            base_kb = _status_kb("VmRSS")
            _reset_peak()
            t0 = time.perf_counter()
            if label == "band by band":
                width, height, bands = heatmap_bands(rgb, de, oog)
                write_png_bands(Path(tmp) / "bands.png", width, height, bands)
            else:
                heatmap_overlay(rgb, de, oog).save(Path(tmp) / "pillow.png", compress_level=1)
            figures[label] = (time.perf_counter() - t0, (_status_kb("VmHWM") - base_kb) / 1024)
        for label, (secs, mb) in figures.items():
            print(f"heat map drawn and written as PNG, {label}: {secs:.2f} s, peak RSS above inputs {mb:.0f} MB")
        (t_pil, m_pil), (t_band, m_band) = figures.values()
        print(f"band by band against Pillow: time ratio {t_band / t_pil:.2f}, memory ratio {m_band / max(m_pil, 1e-9):.2f}")


if __name__ == "__main__":
    main()
