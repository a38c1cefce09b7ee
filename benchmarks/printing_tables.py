"""Time profile_tables() for the shipped printing conditions, on one core, and print the model's round trip.

Run: python benchmarks/printing_tables.py [runs] [names...]
BLAS is limited to one thread before numpy loads, so the figure is a one-core
time. The reference is the task's budget of 40 s per CMYK condition (A2B 17^4,
B2A 33^3 x 3 intents + gamt); ratio = budget / median time, >= 1 meets it.
The round trip is 5000 random CMYK within the ink limit (seed 2024) ->
forward model -> inverse (relative) -> forward, in CIEDE2000.
"""

from __future__ import annotations

import os

for _var in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS"):
    os.environ[_var] = "1"

import statistics  # noqa: E402
import sys  # noqa: E402
import time  # noqa: E402
import warnings  # noqa: E402
from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402

warnings.filterwarnings("ignore")

from inkshift.color.difference import delta_e_2000  # noqa: E402
from inkshift.printing.conditions import load_condition  # noqa: E402
from inkshift.printing.neugebauer import device_to_lab, halftone_model  # noqa: E402
from inkshift.printing.separation import separate  # noqa: E402
from inkshift.printing.tables import profile_tables  # noqa: E402

BUDGET_SECONDS = 40.0
PROFILES = Path(__file__).resolve().parents[1] / "profiles_open"


def main() -> None:
    runs = int(sys.argv[1]) if len(sys.argv) > 1 else 1
    names = sys.argv[2:] or ["coated", "uncoated", "newsprint", "office_gray"]
    import inkshift.color.vision  # noqa: F401  (import colour-science before timing)

    for name in names:
        condition = load_condition(PROFILES / f"{name}.toml")
        times = []
        for _ in range(runs):
            # A fresh condition object each run, so no cached model is reused.
            fresh = load_condition(PROFILES / f"{name}.toml")
            start = time.perf_counter()
            profile_tables(fresh)
            times.append(time.perf_counter() - start)
        median = statistics.median(times)
        line = f"{name:12s} profile_tables {median:7.2f} s (median of {runs})  ratio budget/time {BUDGET_SECONDS / median:5.2f}"
        if len(condition.inks) == 4:
            model = halftone_model(condition)
            rng = np.random.default_rng(2024)
            d = rng.random((15000, 4))
            d = d[d.sum(axis=1) <= model.tac][:5000]
            lab = device_to_lab(model, d)
            start = time.perf_counter()
            sep = separate(model, lab)
            t_inv = time.perf_counter() - start
            de = delta_e_2000(lab, device_to_lab(model, sep.device))
            line += (
                f"  | round trip dE00 mean {de.mean():.4f} p95 {np.percentile(de, 95):.4f} max {de.max():.3f}"
                f"  inverse {5000 / t_inv:,.0f} colours/s"
            )
        print(line, flush=True)


if __name__ == "__main__":
    main()
