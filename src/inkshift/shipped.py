"""The output profiles shipped in ``profiles_open/`` and how names resolve to files.

A shipped profile is a pair ``NAME.toml`` (the printing-condition
description) and ``NAME.icc`` (the profile built from it); ``NAME`` is its
short name. In an installed wheel the folder is ``inkshift/profiles_open``
inside the package; in a source checkout it is ``profiles_open/`` at the top
of the repository.
"""

from __future__ import annotations

from pathlib import Path

from inkshift.errors import ProfileError

__all__ = ["profiles_dir", "shipped_names", "resolve_profile", "DEFAULT_PROFILE"]

DEFAULT_PROFILE = "coated"
"""Short name of the default output profile (coated offset)."""


def profiles_dir() -> Path:
    """Return the folder holding the shipped profiles."""
    here = Path(__file__).resolve().parent
    for candidate in (here / "profiles_open", here.parents[1] / "profiles_open"):
        if candidate.is_dir():
            return candidate
    raise ProfileError(here / "profiles_open", "the shipped profiles folder is missing from this installation")


def shipped_names() -> list[str]:
    """Return the short names of the shipped profiles, sorted."""
    return sorted(p.stem for p in profiles_dir().glob("*.icc"))


def resolve_profile(spec: str | Path) -> Path:
    """Return the ICC file for a shipped short name or a path.

    A string that names an existing file is taken as a path; otherwise it
    must be a shipped short name.
    """
    path = Path(spec).expanduser()
    if path.is_file():
        return path
    if isinstance(spec, str) and "/" not in spec and "\\" not in spec and not spec.lower().endswith((".icc", ".icm")):
        candidate = profiles_dir() / f"{spec}.icc"
        if candidate.is_file():
            return candidate
        names = ", ".join(shipped_names()) or "none"
        raise ProfileError(spec, f"no such file and no shipped profile of that name (shipped: {names})")
    if path.exists():
        raise ProfileError(path, "not a regular file")
    raise ProfileError(path, "no such file")
