"""Time the whole ``inkshift check`` command against the floor of its unavoidable work.

Two 24-megapixel inputs are generated: a chart (a shipped sample scaled up
with a resampling filter, so its edges are anti-aliased blends) and a
photo-like image with millions of unique colours. For each, the floor is
measured in the same run, in fresh processes:

* decoding the image,
* one LittleCMS RGB -> CMYK pass over all its pixels (default profile and
  intent), and
* writing one PNG of the same size,

and the whole command (start-up included) is timed in a fresh process. The
script prints seconds, the ratio to the floor, and peak memory (maximum
resident set size of the child) above a process that only decoded the image,
per pixel: medians of ``--repeat`` interleaved runs (default 3) with their
range, because a shared machine's timings vary by 10-20 % from run to run.

Run: ``python benchmarks/check_command.py [--megapixels 24] [--keep DIR] [--only chart|photo] [--repeat 3]``
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import textwrap
import time
from pathlib import Path

import numpy as np
from PIL import Image

REPO = Path(__file__).resolve().parents[1]
SAMPLE = REPO / "samples" / "ferry_ridership.png"


def run_child(args: list[str]) -> tuple[float, int]:
    """Run a child process; return (wall seconds, peak RSS bytes) of that child alone."""
    start = time.perf_counter()
    proc = subprocess.Popen(args, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(proc.pid, 0)
    elapsed = time.perf_counter() - start
    err = proc.stderr.read().decode() if proc.stderr else ""
    proc.returncode = os.waitstatus_to_exitcode(status)
    if proc.returncode != 0:
        raise SystemExit(f"child failed ({proc.returncode}): {' '.join(args)}\n{err}")
    return elapsed, usage.ru_maxrss * 1024  # ru_maxrss is in KiB on Linux


def python_child(code: str, *argv: str) -> tuple[float, int]:
    return run_child([sys.executable, "-c", textwrap.dedent(code), *argv])


DECODE = """
import sys
from PIL import Image
Image.MAX_IMAGE_PIXELS = None
im = Image.open(sys.argv[1]); im.load()
"""

SEPARATE = """
import sys
from PIL import Image, ImageCms
from inkshift.icc.cms import srgb_profile_bytes, cms_profile
from inkshift.shipped import resolve_profile, DEFAULT_PROFILE
Image.MAX_IMAGE_PIXELS = None
im = Image.open(sys.argv[1]); im.load()
t = ImageCms.buildTransform(cms_profile(srgb_profile_bytes()), cms_profile(resolve_profile(DEFAULT_PROFILE)),
                            "RGB", "CMYK", renderingIntent=ImageCms.Intent.RELATIVE_COLORIMETRIC,
                            flags=ImageCms.Flags.BLACKPOINTCOMPENSATION)
ImageCms.applyTransform(im, t)
"""

WRITE = """
import sys
from PIL import Image
Image.MAX_IMAGE_PIXELS = None
im = Image.open(sys.argv[1]); im.load()
im.save(sys.argv[2], format="PNG")
"""


def make_chart(path: Path, width: int, height: int) -> None:
    with Image.open(SAMPLE) as im:
        im.convert("RGB").resize((width, height), Image.Resampling.BICUBIC).save(path)


def make_photo(path: Path, width: int, height: int) -> None:
    rng = np.random.default_rng(7)
    y = np.linspace(0.0, 1.0, height, dtype=np.float32)[:, None]
    x = np.linspace(0.0, 1.0, width, dtype=np.float32)[None, :]
    img = np.empty((height, width, 3), np.uint8)
    for c, (fx, fy, ph) in enumerate(((3.1, 2.3, 0.0), (1.7, 4.2, 1.3), (5.3, 1.1, 2.9))):
        field = 0.5 + 0.35 * np.sin(2 * np.pi * (fx * x + ph)) * np.cos(2 * np.pi * fy * y)
        field = field + rng.normal(0.0, 0.04, size=(height, width)).astype(np.float32)
        img[..., c] = np.clip(field * 255.0, 0, 255).astype(np.uint8)
    Image.fromarray(img).save(path)


UNIQUE = """
import sys
import numpy as np
from PIL import Image
Image.MAX_IMAGE_PIXELS = None
from inkshift.chart.unique import unique_colors
print(len(unique_colors(np.asarray(Image.open(sys.argv[1]).convert("RGB")))))
"""

MAKE = """
import sys
from pathlib import Path
sys.path.insert(0, sys.argv[1])
import check_command as bench
bench.make_chart(Path(sys.argv[2]), int(sys.argv[4]), int(sys.argv[5]))
bench.make_photo(Path(sys.argv[3]), int(sys.argv[4]), int(sys.argv[5]))
"""


def bench(label: str, image: Path, work: Path, repeat: int) -> None:
    """Time the floor and the command ``repeat`` times, interleaved, and print medians and ranges."""
    with Image.open(image) as im:
        w, h = im.size
    pixels = w * h
    rows = []
    for _ in range(repeat):
        decode_t, decode_rss = python_child(DECODE, str(image))
        sep_t, _ = python_child(SEPARATE, str(image))
        write_t, _ = python_child(WRITE, str(image), str(work / "floor.png"))
        floor = decode_t + max(sep_t - decode_t, 0.0) + max(write_t - decode_t, 0.0)
        out = work / f"{label}_out"
        check_t, check_rss = run_child([sys.executable, "-m", "inkshift", "check", str(image), "--out", str(out)])
        rows.append((decode_t, sep_t - decode_t, write_t - decode_t, floor, check_t, check_t / floor, check_rss, decode_rss))
    # In a child: Linux keeps a process's peak RSS across exec, so a parent that
    # once held big arrays would inflate every later child's figure.
    uniq = int(subprocess.run([sys.executable, "-c", UNIQUE, str(image)], check=True, capture_output=True, text=True).stdout)
    col = list(zip(*rows))
    med = [statistics.median(c) for c in col]
    above = [(c - d) / pixels for c, d in zip(col[6], col[7])]
    print(f"{label}: {w} x {h} = {pixels / 1e6:.1f} MP, {uniq} unique colours (median of {repeat} runs, range in brackets)")
    print(f"  floor: decode {med[0]:.2f} s + LittleCMS RGB->CMYK {med[1]:.2f} s + PNG write {med[2]:.2f} s = {med[3]:.2f} s")
    print(f"  inkshift check (whole command, start-up included): {med[4]:.2f} s  "
          f"ratio {med[5]:.2f}x [{min(col[5]):.2f}-{max(col[5]):.2f}]")
    print(f"  peak RSS: check {med[6] / 2**20:.0f} MiB, decode-only process {med[7] / 2**20:.0f} MiB, "
          f"above decoded image {statistics.median(above):.1f} bytes/pixel [{min(above):.1f}-{max(above):.1f}]")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--megapixels", type=float, default=24.0)
    parser.add_argument("--keep", type=Path, default=None, help="keep the generated files in this folder")
    parser.add_argument("--only", choices=("chart", "photo"), default=None, help="time one of the two inputs")
    parser.add_argument("--repeat", type=int, default=3, help="runs of the floor and the command (medians are printed)")
    args = parser.parse_args()
    height = int(round((args.megapixels * 1e6 / 1.5) ** 0.5))
    width = int(round(height * 1.5))
    with tempfile.TemporaryDirectory() as tmp:
        work = args.keep or Path(tmp)
        work.mkdir(parents=True, exist_ok=True)
        chart, photo = work / "chart.png", work / "photo.png"
        # Made in a child process for the same reason as the unique count.
        subprocess.run(
            [sys.executable, "-c", MAKE, str(Path(__file__).resolve().parent), str(chart), str(photo), str(width), str(height)],
            check=True,
        )
        for label, image in (("chart", chart), ("photo", photo)):
            if args.only in (None, label):
                bench(label, image, work, max(1, args.repeat))


if __name__ == "__main__":
    main()
