"""Colour lists: brand or specified colours typed on the command line or kept in a file.

Colour syntax (a subset of CSS Color Module Level 4, W3C)
----------------------------------------------------------
``#rrggbb``, ``#rgb``, ``rrggbb``
    Hexadecimal sRGB (CSS Color 4, section 5.2). The three-digit form
    repeats each digit (``#00f`` is ``#0000ff``) and needs the ``#``; the
    six-digit form may leave it out. The four- and eight-digit forms with
    alpha are refused: a print has no transparency.
``rgb(R, G, B)``, ``rgb(R G B)``
    sRGB components (CSS Color 4, section 5.1), commas or spaces, each an
    integer 0..255 or a percentage 0%..100% (100% = 255, rounded to the
    nearest integer, ties up). ``rgba()`` is the same function. An alpha
    after ``/`` (or as a fourth comma-separated value) is accepted only when
    it is 1 or 100%. Unlike CSS, values outside the range are refused
    rather than clamped: in a colour list they are typing mistakes.
``lab(L a b)``
    CIELAB under D50, as in CSS Color 4, section 8.2 (``lab()`` there is
    D50). Spaces or commas. L* is 0..100 or 0%..100%; a* and b* are
    numbers or percentages where 100% = 125. An opaque alpha is allowed as
    for ``rgb()``.

Function names and hex digits are case-insensitive.

Names
-----
Any colour may carry a name written before it with an equals sign:
``Brand blue = #0050a0``. No colour contains ``=``, so everything before
the last ``=`` is the name (spaces around it are dropped).

Text files
----------
One colour per line, with an optional name as above. Blank lines are
skipped. A ``#`` followed by a space (or ending the line) starts a comment,
so ``#0050a0`` stays a colour while ``# brand colours`` and
``#0050a0  # primary`` carry comments.

CSV files (``.csv``, or ``.tsv`` for tab-separated)
---------------------------------------------------
The first line is a header; column names are matched case-insensitively.
An optional ``name`` column names each colour. Exactly one kind of colour
column must be present:

- ``color`` (or ``colour``): any syntax above;
- ``hex``: a hex colour;
- ``rgb``: an ``rgb()`` colour or three numbers (``0 80 160``);
- ``lab``: a ``lab()`` colour or three numbers (``52 -3 -45``);
- ``L``, ``a``, ``b`` (also ``L*``, ``a*``, ``b*``): CIELAB in three columns.

Other columns are ignored. A comma-separated file may use semicolons
instead (as spreadsheets in many locales write them): the header decides.
Rows whose cells are all empty are skipped.

Every refusal is an :class:`inkshift.errors.InputError` with one line that
names the file and line number, e.g.
``brand.csv: line 4: 'lab(50 a 3)' is not a colour: 'a' is not a number``.
"""

from __future__ import annotations

import csv
import re
from dataclasses import dataclass
from pathlib import Path
from typing import Literal

import numpy as np
from numpy.typing import NDArray

from inkshift.errors import InputError

__all__ = ["ColorSpec", "parse_color", "parse_named_color", "read_color_file", "MAX_FILE_BYTES"]

MAX_FILE_BYTES = 10_000_000
"""Largest colour-list file read (a brand palette is a few kilobytes); larger
files are refused as probably not colour lists."""

# CSS Color 4, section 8.2: for a* and b*, 100% is 125.
_LAB_AB_PERCENT = 125.0


@dataclass(frozen=True, eq=False)
class ColorSpec:
    """One colour of a list.

    Attributes
    ----------
    name
        The name given to it, or None.
    text
        The colour as written (without its name).
    kind
        ``"rgb"`` for sRGB inputs (hex and ``rgb()``), ``"lab"`` for CIELAB.
    rgb
        ``(3,)`` uint8 sRGB for ``kind == "rgb"``, else None.
    lab
        ``(3,)`` float64 CIELAB (D50) for ``kind == "lab"``, else None.
    """

    name: str | None
    text: str
    kind: Literal["rgb", "lab"]
    rgb: NDArray[np.uint8] | None
    lab: NDArray[np.float64] | None

    @property
    def label(self) -> str:
        """The name if there is one, else the colour as written."""
        return self.name or self.text


class _Bad(Exception):
    """A colour text is not valid; the message says why (no file or line)."""


_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?%?\Z")
_HEX = re.compile(r"#?[0-9a-fA-F]+\Z")
_FUNC = re.compile(r"([a-zA-Z]+)\s*\((.*)\)\Z", re.S)
_COMMENT = re.compile(r"(?:^|\s)#(?:\s|$)")


def _split_args(body: str) -> tuple[list[str], str | None]:
    """Split a function body into its components and an alpha (or None)."""
    alpha = None
    if "/" in body:
        body, alpha = body.split("/", 1)
        alpha = alpha.strip()
        if not alpha:
            raise _Bad("nothing after '/'")
    parts = [p for p in re.split(r"[\s,]+", body.strip()) if p] if body.strip() else []
    if "," in body:
        # Legacy comma syntax: exactly one comma between components, no empty ones.
        parts = [p.strip() for p in body.split(",")]
        if any(not p or re.search(r"\s", p) for p in parts):
            raise _Bad("separate the components with commas or with spaces, not both")
        if len(parts) == 4 and alpha is None:
            alpha = parts.pop()
    return parts, alpha


def _number(token: str, what: str) -> tuple[float, bool]:
    """Return (value, is_percentage) of a CSS number or percentage token."""
    if not _NUMBER.match(token):
        raise _Bad(f"{token!r} is not a number")
    pct = token.endswith("%")
    value = float(token[:-1] if pct else token)
    if not np.isfinite(value):
        raise _Bad(f"{what} {token!r} is not a finite number")
    return value, pct


def _check_opaque(alpha: str | None) -> None:
    if alpha is None:
        return
    value, pct = _number(alpha, "alpha")
    if (value / 100.0 if pct else value) != 1.0:
        raise _Bad(f"alpha {alpha} given; only opaque colours can be printed (leave it out or use 1)")


def _parse_hex(text: str) -> NDArray[np.uint8]:
    digits = text[1:] if text.startswith("#") else text
    if len(digits) == 3 and text.startswith("#"):
        digits = "".join(c * 2 for c in digits)
    elif len(digits) in (4, 8):
        raise _Bad("hex colours with alpha are not supported; only opaque colours can be printed")
    elif len(digits) == 3:
        raise _Bad("a three-digit hex colour needs its '#' (write '#" + digits + "')")
    if len(digits) != 6:
        raise _Bad(f"a hex colour has 3 or 6 digits, not {len(digits)}")
    return np.array([int(digits[i:i + 2], 16) for i in (0, 2, 4)], dtype=np.uint8)


def _parse_rgb(body: str) -> NDArray[np.uint8]:
    parts, alpha = _split_args(body)
    if len(parts) != 3:
        raise _Bad(f"rgb() needs 3 components, got {len(parts)}")
    out = []
    for name, token in zip("RGB", parts):
        value, pct = _number(token, name)
        if pct:
            if not 0.0 <= value <= 100.0:
                raise _Bad(f"{name} {token} is outside 0%..100%")
            # CSS Color 4: 100% is 255; round to nearest, ties up.
            out.append(int(np.floor(value * 255.0 / 100.0 + 0.5)))
        else:
            if value != int(value) or not 0 <= value <= 255:
                raise _Bad(f"{name} {token} is not an integer 0..255")
            out.append(int(value))
    _check_opaque(alpha)
    return np.array(out, dtype=np.uint8)


def _parse_lab(body: str) -> NDArray[np.float64]:
    parts, alpha = _split_args(body)
    if len(parts) != 3:
        raise _Bad(f"lab() needs 3 components (L a b), got {len(parts)}")
    lightness, pct = _number(parts[0], "L")
    if not 0.0 <= lightness <= 100.0:
        raise _Bad(f"L {parts[0]} is outside 0..100")
    lab = [lightness]
    for name, token in zip("ab", parts[1:]):
        value, pct = _number(token, name)
        lab.append(value * _LAB_AB_PERCENT / 100.0 if pct else value)
    _check_opaque(alpha)
    return np.array(lab, dtype=np.float64)


def _parse(text: str) -> ColorSpec:
    """Parse a colour without a name; raise _Bad with the reason."""
    t = text.strip()
    if not t:
        raise _Bad("empty")
    if _HEX.match(t) and (t.startswith("#") or len(t) in (3, 4, 6, 8)):
        return ColorSpec(None, t, "rgb", _parse_hex(t), None)
    if t.startswith("#"):
        raise _Bad("a hex colour has only the digits 0-9 and a-f")
    m = _FUNC.match(t)
    if m is None:
        raise _Bad("expected #rrggbb, rgb(R, G, B) or lab(L a b)")
    func = m.group(1).lower()
    if func in ("rgb", "rgba"):
        return ColorSpec(None, t, "rgb", _parse_rgb(m.group(2)), None)
    if func == "lab":
        return ColorSpec(None, t, "lab", None, _parse_lab(m.group(2)))
    raise _Bad(f"unknown colour function '{m.group(1)}()' (use rgb() or lab())")


def parse_color(text: str) -> ColorSpec:
    """Parse one colour (hex, ``rgb()`` or ``lab()``, see the module notes).

    Parameters
    ----------
    text
        The colour, without a name.

    Returns
    -------
    ColorSpec
        With ``name`` None.

    Raises
    ------
    InputError
        ``'<text>' is not a colour: <reason>``.
    """
    try:
        return _parse(text)
    except _Bad as exc:
        raise InputError(f"{text.strip()!r} is not a colour: {exc}") from None


def _split_name(text: str) -> tuple[str | None, str]:
    if "=" not in text:
        return None, text.strip()
    name, _, color = text.rpartition("=")
    return (name.strip() or None), color.strip()


def parse_named_color(text: str) -> ColorSpec:
    """Parse ``[name =] colour`` as typed on the command line or in a text file.

    Raises
    ------
    InputError
        ``'<colour>' is not a colour: <reason>``.
    """
    name, color = _split_name(text)
    spec = parse_color(color)
    return ColorSpec(name, spec.text, spec.kind, spec.rgb, spec.lab)


def _read_text(path: Path) -> str:
    label = str(path)
    try:
        if not path.exists():
            raise InputError(f"{label}: no such file")
        if not path.is_file():
            raise InputError(f"{label}: not a regular file")
        size = path.stat().st_size
        if size > MAX_FILE_BYTES:
            raise InputError(f"{label}: {size} bytes is too large for a colour list (limit {MAX_FILE_BYTES})")
        data = path.read_bytes()
    except OSError as exc:
        raise InputError(f"{label}: cannot be read ({exc.strerror or type(exc).__name__})") from None
    if b"\0" in data:
        raise InputError(f"{label}: is a binary file, not a colour list")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError(f"{label}: is not UTF-8 text") from None


def _strip_comment(line: str) -> str:
    m = _COMMENT.search(line)
    return line[: m.start()] if m else line


def _read_lines(label: str, text: str) -> list[ColorSpec]:
    out = []
    for number, raw in enumerate(text.splitlines(), start=1):
        line = _strip_comment(raw).strip()
        if not line:
            continue
        name, color = _split_name(line)
        try:
            spec = _parse(color)
        except _Bad as exc:
            raise InputError(f"{label}: line {number}: {color!r} is not a colour: {exc}") from None
        out.append(ColorSpec(name, spec.text, spec.kind, spec.rgb, spec.lab))
    return out


_COLOR_COLUMNS = {"color": "any", "colour": "any", "hex": "hex", "rgb": "rgb", "lab": "lab"}
_LAB_SPLIT = (("l", "l*"), ("a", "a*"), ("b", "b*"))


def _cell_color(kind: str, cell: str) -> str:
    """Return the colour text a CSV cell stands for in a column of ``kind``."""
    if kind == "hex":
        if not _HEX.match(cell):
            raise _Bad("not a hex colour")
    elif kind in ("rgb", "lab"):
        if not _FUNC.match(cell):
            return f"{kind}({cell})"
        if not cell.lower().startswith(kind):
            raise _Bad(f"expected a {kind}() colour in the '{kind}' column")
    return cell


def _read_csv(label: str, text: str, tab: bool) -> list[ColorSpec]:
    lines = text.splitlines()
    header_line = lines[0] if lines else ""
    delimiter = "\t" if tab else (";" if ";" in header_line and "," not in header_line else ",")
    reader = csv.reader(lines, delimiter=delimiter)
    try:
        header = [h.strip().lower() for h in next(reader)]
    except StopIteration:
        raise InputError(f"{label}: is empty; a colour CSV needs a header line") from None
    except csv.Error as exc:
        raise InputError(f"{label}: line 1: not valid CSV ({exc})") from None
    name_col = header.index("name") if "name" in header else None
    kinds = [(header.index(h), _COLOR_COLUMNS[h]) for h in header if h in _COLOR_COLUMNS]
    split = [next((header.index(v) for v in variants if v in header), None) for variants in _LAB_SPLIT]
    has_split = all(i is not None for i in split)
    found = [header[i] for i, _ in kinds] + (["L, a, b"] if has_split else [])
    if len(found) != 1:
        what = "no colour column" if not found else "several colour columns (" + ", ".join(found) + ")"
        raise InputError(
            f"{label}: line 1: header has {what}; use one of: color, hex, rgb, lab, or L, a, b"
        )
    out = []
    try:
        for row in reader:
            number = reader.line_num
            cells = [c.strip() for c in row]
            if not any(cells):
                continue
            get = lambda i: cells[i] if i is not None and i < len(cells) else ""  # noqa: E731
            if has_split:
                values = [get(i) for i in split]
                color = " ".join(values)
                if not all(values):
                    raise InputError(f"{label}: line {number}: {color!r} is not a colour: L, a or b is empty")
                color = f"lab({color})"
            else:
                col, kind = kinds[0]
                cell = get(col)
                if not cell:
                    raise InputError(f"{label}: line {number}: the {header[col]} cell is empty")
                try:
                    color = _cell_color(kind, cell)
                except _Bad as exc:
                    raise InputError(f"{label}: line {number}: {cell!r} is not a colour: {exc}") from None
            try:
                spec = _parse(color)
            except _Bad as exc:
                raise InputError(f"{label}: line {number}: {color!r} is not a colour: {exc}") from None
            if not has_split and kinds[0][1] != "any" and spec.kind != ("lab" if kinds[0][1] == "lab" else "rgb"):
                raise InputError(f"{label}: line {number}: {color!r} is not a colour for the '{header[kinds[0][0]]}' column")
            out.append(ColorSpec(get(name_col) or None, spec.text, spec.kind, spec.rgb, spec.lab))
    except csv.Error as exc:
        raise InputError(f"{label}: line {reader.line_num}: not valid CSV ({exc})") from None
    return out


def read_color_file(path: str | Path) -> list[ColorSpec]:
    """Read a colour list: CSV for ``.csv``/``.tsv`` files, else one colour per line.

    See the module notes for both formats.

    Parameters
    ----------
    path
        The file.

    Returns
    -------
    list of ColorSpec
        In file order.

    Raises
    ------
    InputError
        One line naming the file (and line number for a bad colour) when the
        file is missing, unreadable, binary, empty of colours or holds a bad
        line.
    """
    p = Path(path)
    label = str(path)
    text = _read_text(p)
    suffix = p.suffix.lower()
    if suffix in (".csv", ".tsv"):
        colors = _read_csv(label, text, tab=suffix == ".tsv")
    else:
        colors = _read_lines(label, text)
    if not colors:
        raise InputError(f"{label}: contains no colours")
    return colors
