"""Time the float ICC evaluator against LittleCMS (Pillow.ImageCms) on the same colours.

Run: python benchmarks/icc_evaluate.py [colours] [runs]
For a matrix/TRC profile (LittleCMS's built-in sRGB) and a lut16/lut8 CMYK
profile (Ghostscript's default_cmyk.icc, if installed) it prints the median
wall time of device -> Lab and Lab -> device in float (inkshift) and in
8-bit through LittleCMS without optimisation (the same tables, evaluated in
16-bit fixed point), and the ratio inkshift / LittleCMS. LittleCMS's
optimised transform is listed as the floor a precomputed device link reaches.
"""

from __future__ import annotations

import statistics
import sys
import time
import warnings
from pathlib import Path

import numpy as np

warnings.filterwarnings("ignore")
from PIL import ImageCms  # noqa: E402

from inkshift.icc.cms import srgb_profile_bytes, transform_colors  # noqa: E402
from inkshift.icc.evaluate import device_to_lab, lab_to_device  # noqa: E402
from inkshift.icc.read import read_profile  # noqa: E402

LAB_D50 = ImageCms.ImageCmsProfile(ImageCms.createProfile("LAB"))
DEFAULT_CMYK = Path("/usr/share/color/icc/ghostscript/default_cmyk.icc")


def _median_seconds(fn, runs: int) -> float:
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 262_144
    runs = int(sys.argv[2]) if len(sys.argv) > 2 else 5
    rng = np.random.default_rng(4)
    cases = [("sRGB built-in", srgb_profile_bytes(), "RGB")]
    if DEFAULT_CMYK.is_file():
        cases.append(("default_cmyk", DEFAULT_CMYK.read_bytes(), "CMYK"))
    print(f"{n} colours, median of {runs} runs")
    print(f"{'profile':<14} {'direction':<13} {'inkshift s':>10} {'lcms noopt s':>12} {'lcms opt s':>10} {'ratio':>6}")
    for name, data, mode in cases:
        profile = read_profile(data)
        device8 = rng.integers(0, 256, (n, profile.channels), dtype=np.uint8)
        device = device8 / 255.0
        lab = device_to_lab(profile, device)
        lab8 = rng.integers(0, 256, (n, 3), dtype=np.uint8)
        rows = [
            ("device->Lab", lambda: device_to_lab(profile, device),
             lambda o: transform_colors(device8, data, LAB_D50, mode, "LAB", 1, optimise=o)),
            ("Lab->device", lambda: lab_to_device(profile, lab),
             lambda o: transform_colors(lab8, LAB_D50, data, "LAB", mode, 1, optimise=o)),
        ]
        for direction, ours, ref in rows:
            t_ours = _median_seconds(ours, runs)
            t_noopt = _median_seconds(lambda: ref(False), runs)
            t_opt = _median_seconds(lambda: ref(True), runs)
            print(f"{name:<14} {direction:<13} {t_ours:>10.3f} {t_noopt:>12.3f} {t_opt:>10.3f} {t_ours / t_noopt:>6.2f}")


if __name__ == "__main__":
    main()
