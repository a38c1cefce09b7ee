"""Time inkshift's CIEDE2000 against colour-science's on 10^6 colour pairs.

Run: python benchmarks/delta_e.py [pairs] [runs]
Prints the median wall time of each over several runs and their ratio; the
project's implementation should not be slower (ratio colour / inkshift >= 1).
"""

from __future__ import annotations

import statistics
import sys
import time
import warnings

import numpy as np

warnings.filterwarnings("ignore")
import colour  # noqa: E402

from inkshift.color.difference import delta_e_1976, delta_e_1994, delta_e_2000  # noqa: E402


def _median_seconds(fn, runs: int) -> float:
    times = []
    for _ in range(runs):
        start = time.perf_counter()
        fn()
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main() -> None:
    pairs = int(sys.argv[1]) if len(sys.argv) > 1 else 1_000_000
    runs = int(sys.argv[2]) if len(sys.argv) > 2 else 7
    rng = np.random.default_rng(2005)
    lo, hi = [0.0, -128.0, -128.0], [100.0, 127.0, 127.0]
    lab1 = rng.uniform(lo, hi, size=(pairs, 3))
    lab2 = rng.uniform(lo, hi, size=(pairs, 3))

    ours = delta_e_2000(lab1, lab2)
    theirs = colour.delta_E(lab1, lab2, method="CIE 2000")
    print(f"{pairs} pairs, median of {runs} runs; max |difference| vs colour-science: {np.abs(ours - theirs).max():.2e}")

    rows = [
        ("CIEDE2000", lambda: delta_e_2000(lab1, lab2), lambda: colour.delta_E(lab1, lab2, method="CIE 2000")),
        ("CIE 1994", lambda: delta_e_1994(lab1, lab2), lambda: colour.delta_E(lab1, lab2, method="CIE 1994")),
        ("CIE 1976", lambda: delta_e_1976(lab1, lab2), lambda: colour.delta_E(lab1, lab2, method="CIE 1976")),
    ]
    print(f"{'formula':<10} {'inkshift s':>11} {'colour s':>9} {'ratio':>6}")
    for name, mine, ref in rows:
        t_mine = _median_seconds(mine, runs)
        t_ref = _median_seconds(ref, runs)
        print(f"{name:<10} {t_mine:>11.3f} {t_ref:>9.3f} {t_ref / t_mine:>6.2f}")


if __name__ == "__main__":
    main()
