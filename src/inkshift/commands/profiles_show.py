"""Commands under `inkshift profiles` (filled in by its owner)."""

from inkshift.cli import profiles_app  # noqa: F401
