"""Build an ICC output profile from a printing-condition description.

``build_profile`` is the whole pipeline: the condition's halftone model and
its inversion give the profile tables (:mod:`inkshift.printing.tables`), and
the ICC writer (:mod:`inkshift.icc.write`) serialises them with the
condition's fixed ``created`` date, so the same description always gives the
same bytes.
"""

from __future__ import annotations

import re
from dataclasses import asdict, dataclass
from pathlib import Path

from inkshift.errors import InputError
from inkshift.files import write_bytes_atomic
from inkshift.icc.read import read_profile
from inkshift.icc.write import printer_profile_bytes
from inkshift.printing.conditions import Condition, load_condition
from inkshift.printing.tables import profile_tables
from inkshift.shipped import profiles_dir, shipped_names

__all__ = [
    "build_profile",
    "build_profile_file",
    "write_profile_atomic",
    "ShippedProfile",
    "shipped_profiles",
    "first_sentence",
]


def build_profile(condition: Condition) -> bytes:
    """Return the bytes of the ICC v2.4 output profile for ``condition``.

    The tables come from :func:`inkshift.printing.tables.profile_tables`
    with its default grid sizes; the header date is ``condition.created``.
    """
    return printer_profile_bytes(profile_tables(condition), created=condition.created)


def write_profile_atomic(data: bytes, path: str | Path) -> Path:
    """Write profile bytes to ``path`` through a temporary file in the same folder.

    The temporary file is renamed over ``path`` only after it is complete
    (``os.replace``); on any failure it is removed and ``path`` is left as it
    was. Raises :class:`~inkshift.errors.InputError` when the folder is
    missing or not writable.
    """
    path = _check_target(path)
    try:
        return write_bytes_atomic(path, data)
    except OSError as exc:
        raise InputError(f"{path}: cannot write the profile ({exc.strerror or type(exc).__name__})") from None


def _check_target(path: str | Path) -> Path:
    path = Path(path)
    if not path.parent.is_dir():
        raise InputError(f"{path}: the output folder {path.parent} does not exist")
    if path.is_dir():
        raise InputError(f"{path}: is a folder, not a file name")
    return path


def build_profile_file(condition_path: str | Path, output: str | Path) -> Path:
    """Load a condition file, build its profile and write it atomically to ``output``.

    The output path is checked first and a bad condition raises
    :class:`~inkshift.errors.ConditionError`, both before the (slow) build
    and before anything is written.
    """
    target = _check_target(output)
    condition = load_condition(condition_path)
    return write_profile_atomic(build_profile(condition), target)


@dataclass(frozen=True)
class ShippedProfile:
    """One shipped profile as listed by ``inkshift profiles list``."""

    name: str
    description: str
    note: str  # the first sentence of the condition's note
    licence: str
    path: str

    def to_dict(self) -> dict[str, str]:
        """Return the fields as a JSON-ready dict."""
        return asdict(self)


def shipped_profiles() -> list[ShippedProfile]:
    """Return the shipped profiles, sorted by short name, with their conditions' texts.

    Description, note and licence come from ``NAME.toml``; a profile without
    a condition file falls back to its own description and an unknown licence.
    """
    folder = profiles_dir()
    out = []
    for name in shipped_names():
        icc = folder / f"{name}.icc"
        toml = folder / f"{name}.toml"
        if toml.is_file():
            cond = load_condition(toml)
            out.append(ShippedProfile(name, cond.description, first_sentence(cond.note), cond.licence, str(icc)))
        else:
            out.append(ShippedProfile(name, read_profile(icc).description, "", "unknown", str(icc)))
    return out


def first_sentence(text: str) -> str:
    """Return the first sentence of ``text`` with its white space collapsed."""
    flat = " ".join(text.split())
    match = re.search(r"[.!?](\s|$)", flat)
    return flat[: match.start() + 1] if match else flat
