"""Acceptance check: the wheel installs on its own and carries the shipped profiles.

Builds the wheel from this checkout, installs it without dependencies into a
fresh virtual environment that sees the system site-packages (for numpy,
Pillow, colour-science, typer), and runs the installed ``inkshift`` command.
It runs in CI like every other test; it takes about 10-20 s (the wheel build
is the slow part).
"""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
SHIPPED = ("coated", "uncoated", "newsprint", "office_gray")


def _run(args: list[str], cwd: Path) -> subprocess.CompletedProcess[str]:
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "VIRTUAL_ENV")}
    proc = subprocess.run(args, cwd=cwd, env=env, capture_output=True, text=True, timeout=300)
    assert proc.returncode == 0, f"{' '.join(args)} failed:\n{proc.stdout}\n{proc.stderr}"
    return proc


def test_wheel_installs_and_lists_the_shipped_profiles(tmp_path):
    wheels = tmp_path / "wheels"
    _run([sys.executable, "-m", "pip", "wheel", str(REPO), "--no-deps", "-q", "-w", str(wheels)], tmp_path)
    (wheel,) = wheels.glob("inkshift-*.whl")

    venv = tmp_path / "venv"
    _run([sys.executable, "-m", "venv", "--system-site-packages", "--without-pip", str(venv)], tmp_path)
    py = venv / "bin" / "python"
    # The system pip is visible through --system-site-packages and installs into the venv;
    # --ignore-installed because CI has already installed the same version system-wide.
    _run([str(py), "-m", "pip", "install", "--no-deps", "--no-index", "--ignore-installed", "-q", str(wheel)], tmp_path)

    where = _run([str(py), "-c", "import inkshift, sys; print(inkshift.__file__)"], tmp_path).stdout.strip()
    assert Path(where).resolve().is_relative_to(venv.resolve()), where
    assert not Path(where).resolve().is_relative_to(REPO / "src")

    listing = _run([str(venv / "bin" / "inkshift"), "profiles", "list"], tmp_path).stdout
    for name in SHIPPED:
        assert any(line.startswith(name + " ") for line in listing.splitlines()), listing
    # The installed copy's profiles folder is inside the package, not the checkout.
    folder = _run([str(py), "-c", "from inkshift.shipped import profiles_dir; print(profiles_dir())"], tmp_path)
    assert Path(folder.stdout.strip()).resolve().is_relative_to(venv.resolve())
