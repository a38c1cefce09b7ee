"""The project's own exceptions.

Every failure the user can cause (a bad file, a bad option, an image that is
too large) is raised as an :class:`InkshiftError` subclass whose message is a
single line naming the file and the problem. The command line prints that line
and exits with status 2; nothing else is allowed to reach the user as a
traceback.
"""

from __future__ import annotations

from pathlib import Path

__all__ = [
    "InkshiftError",
    "ProfileError",
    "ImageError",
    "ConditionError",
    "InputError",
    "CmsError",
    "one_line",
]


class InkshiftError(Exception):
    """Base class of every error the project raises on purpose."""


class ProfileError(InkshiftError):
    """An ICC profile cannot be read or used.

    Parameters
    ----------
    source
        The file (or a name such as ``"<bytes>"``) the profile came from.
    problem
        What is wrong, in plain words.
    tag
        The four-character tag signature involved, if any.
    """

    def __init__(self, source: str | Path, problem: str, tag: str | None = None) -> None:
        self.source = str(source)
        self.tag = tag
        self.problem = problem
        where = f"{self.source}: tag '{tag}': " if tag else f"{self.source}: "
        super().__init__(where + problem)


class ImageError(InkshiftError):
    """A chart image cannot be read or is not acceptable."""

    def __init__(self, source: str | Path, problem: str) -> None:
        self.source = str(source)
        self.problem = problem
        super().__init__(f"{self.source}: {problem}")


class ConditionError(InkshiftError):
    """A printing-condition description is missing a value or has an impossible one."""

    def __init__(self, source: str | Path, key: str, problem: str) -> None:
        self.source = str(source)
        self.key = key
        self.problem = problem
        super().__init__(f"{self.source}: key '{key}': {problem}")


class InputError(InkshiftError):
    """Any other bad input: a colour list, an option value, an output folder."""


class CmsError(InkshiftError):
    """LittleCMS (through Pillow.ImageCms) refused or failed a transform."""


def one_line(exc: BaseException, limit: int = 200) -> str:
    """Return a library exception's message as one line of at most ``limit``
    characters (its type name when it has no message), for the project's errors."""
    return " ".join(str(exc).split())[:limit] or type(exc).__name__
