"""inkshift: check how a chart drawn on an RGB screen will come out in print.

The public surface is small: the functions re-exported here and the
command line in :mod:`inkshift.cli`.
"""

from __future__ import annotations

from importlib.metadata import PackageNotFoundError, version as _version

from inkshift.errors import (
    CmsError,
    ConditionError,
    ImageError,
    InkshiftError,
    InputError,
    ProfileError,
)

try:
    __version__ = _version("inkshift")
except PackageNotFoundError:  # running from a source tree without installing
    __version__ = "0.0.0+unknown"

__all__ = [
    "__version__",
    "InkshiftError",
    "ProfileError",
    "ImageError",
    "ConditionError",
    "InputError",
    "CmsError",
]
