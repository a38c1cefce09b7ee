"""Rebuild every shipped profile (profiles_open/NAME.icc) from its NAME.toml.

Usage: ``python scripts/build_profiles.py [--check]``. With ``--check`` nothing
is written; the script exits 1 if any shipped .icc differs from a fresh build.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

from inkshift.printing.build import build_profile, write_profile_atomic
from inkshift.printing.conditions import load_condition

PROFILES = Path(__file__).resolve().parents[1] / "profiles_open"


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--check", action="store_true", help="compare with the shipped files instead of writing")
    args = parser.parse_args(argv)
    stale = 0
    for toml in sorted(PROFILES.glob("*.toml")):
        start = time.perf_counter()
        data = build_profile(load_condition(toml))
        target = toml.with_suffix(".icc")
        seconds = time.perf_counter() - start
        if args.check:
            same = target.is_file() and target.read_bytes() == data
            stale += not same
            print(f"{target.name}: {'up to date' if same else 'DIFFERS'} ({len(data)} bytes, {seconds:.1f} s)")
        else:
            write_profile_atomic(data, target)
            print(f"{target.name}: {len(data)} bytes written ({seconds:.1f} s)")
    return 1 if stale else 0


if __name__ == "__main__":
    sys.exit(main())
