"""Shared pytest helpers."""

from __future__ import annotations

import os
from pathlib import Path

import pytest


def require_file(path: str | Path) -> Path:
    """Return ``path`` if it exists; otherwise fail under CI (CI=true) or skip."""
    p = Path(path)
    if not p.is_file():
        message = f"required file missing: {p} (install Debian's icc-profiles-free / libgs-common)"
        if os.environ.get("CI") == "true":
            pytest.fail(message)
        pytest.skip(message)
    return p
