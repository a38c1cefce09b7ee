"""Tests of colour-list parsing (inkshift.colorlist).

Syntax checks follow W3C CSS Color Module Level 4 (cited per test as
"CSS Color 4" with the section) and the W3C web-platform-tests parsing cases
for lab() (css/css-color/parsing/color-valid-lab.html).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from inkshift.colorlist import ColorSpec, parse_color, parse_named_color, read_color_file
from inkshift.errors import InputError


def rgb(spec: ColorSpec) -> list[int]:
    assert spec.kind == "rgb" and spec.lab is None
    return [int(v) for v in spec.rgb]


# CSS Color 4, section 5.2 (hex notation): "#00f" is "#0000ff" (each digit doubled).
@pytest.mark.parametrize(
    "text, expected",
    [
        ("#0000ff", [0, 0, 255]),
        ("#0000FF", [0, 0, 255]),
        ("#00f", [0, 0, 255]),
        ("#fb0", [255, 187, 0]),  # CSS Color 4 / CSS1: #fb0 expands to #ffbb00
        ("0000ff", [0, 0, 255]),  # the project also accepts six digits without '#'
        ("#123456", [0x12, 0x34, 0x56]),
    ],
)
def test_hex(text: str, expected: list[int]) -> None:
    assert rgb(parse_color(text)) == expected


# CSS Color 4, section 5.1 (rgb()): legacy comma syntax, modern space syntax,
# percentages with 100% = 255; "rgb(0 255 0)" and "#00ff00" are the same colour.
@pytest.mark.parametrize(
    "text, expected",
    [
        ("rgb(0, 255, 0)", [0, 255, 0]),
        ("rgb(0 255 0)", [0, 255, 0]),
        ("RGB( 0 ,255 , 0 )", [0, 255, 0]),
        ("rgb(100%, 0%, 0%)", [255, 0, 0]),
        # 50% of 255 is 127.5; browsers serialise rgb(0%, 50%, 100%) as
        # rgb(0, 128, 255) (CSS Color 4 serialisation rounds to nearest, ties up; from memory).
        ("rgb(0%, 50%, 100%)", [0, 128, 255]),
        ("rgb(0% 20% 100%)", [0, 51, 255]),  # 20% of 255 = 51 exactly
        ("rgba(1, 2, 3, 1)", [1, 2, 3]),  # CSS Color 4: rgba() is an alias of rgb()
        ("rgb(1 2 3 / 100%)", [1, 2, 3]),  # opaque alpha accepted
    ],
)
def test_rgb_function(text: str, expected: list[int]) -> None:
    assert rgb(parse_color(text)) == expected


# CSS Color 4, section 8.2 (lab()): L in 0..100 or percent (100% = 100),
# a/b numbers or percent with 100% = 125; examples from the spec and MDN.
@pytest.mark.parametrize(
    "text, expected",
    [
        ("lab(29.2345% 39.3825 20.0664)", [29.2345, 39.3825, 20.0664]),
        ("lab(52.2345% 40.1645 59.9971)", [52.2345, 40.1645, 59.9971]),
        ("lab(50 -20 0)", [50.0, -20.0, 0.0]),  # web-platform-tests color-valid-lab
        ("lab(50 -160 160)", [50.0, -160.0, 160.0]),  # web-platform-tests: a/b are unbounded
        # web-platform-tests "lab(20 0 10/0.5)": '/' without spaces; opaque here.
        ("lab(20 0 10/1)", [20.0, 0.0, 10.0]),
        ("lab(50 100% -100%)", [50.0, 125.0, -125.0]),  # percent reference range +-125
        ("lab(50, -20, 30)", [50.0, -20.0, 30.0]),  # the project also accepts commas
    ],
)
def test_lab_function(text: str, expected: list[float]) -> None:
    spec = parse_color(text)
    assert spec.kind == "lab" and spec.rgb is None
    np.testing.assert_allclose(spec.lab, expected, atol=1e-12)


@pytest.mark.parametrize(
    "text, reason",
    [
        ("lab(50 a 3)", "'a' is not a number"),
        ("#00f8", "alpha"),  # CSS Color 4 #rgba: valid CSS, but a print has no transparency
        ("#0000ff80", "alpha"),
        ("lab(0 0 0 / 0.5)", "alpha"),  # web-platform-tests case, refused for print
        ("rgb(0, 0 0)", "commas or with spaces"),
        ("rgb(256, 0, 0)", "0..255"),
        ("rgb(1.5, 0, 0)", "0..255"),
        ("rgb(101%, 0%, 0%)", "0%..100%"),
        ("lab(400 0 10)", "outside 0..100"),  # CSS clamps (web-platform-tests); the project refuses
        ("rgb(1 2)", "3 components"),
        ("hsl(120 100% 50%)", "unknown colour function"),
        ("abc", "needs its '#'"),
        ("#ggg", "0-9 and a-f"),
        ("#12345", "3 or 6 digits"),
        ("", "empty"),
        ("blue", "expected"),
    ],
)
def test_bad_colours_are_refused_with_the_reason(text: str, reason: str) -> None:
    with pytest.raises(InputError) as info:
        parse_color(text)
    message = str(info.value)
    assert reason in message and "\n" not in message
    assert message.startswith(repr(text.strip()) + " is not a colour")


def test_named_colour_on_the_command_line() -> None:
    spec = parse_named_color("Brand blue = #0050a0")
    assert spec.name == "Brand blue" and spec.text == "#0050a0" and rgb(spec) == [0, 80, 160]
    assert spec.label == "Brand blue"
    assert parse_named_color("#0050a0").name is None
    assert parse_named_color("#0050a0").label == "#0050a0"


# Hex notation is exact: every 8-bit triple written as #rrggbb or rgb(r, g, b)
# comes back unchanged (CSS Color 4, sections 5.1 and 5.2 describe the same colour).
@given(st.tuples(st.integers(0, 255), st.integers(0, 255), st.integers(0, 255)))
def test_hex_and_rgb_agree(triple: tuple[int, int, int]) -> None:
    r, g, b = triple
    assert rgb(parse_color(f"#{r:02x}{g:02x}{b:02x}")) == [r, g, b]
    assert rgb(parse_color(f"rgb({r}, {g}, {b})")) == [r, g, b]
    # CSS Color 4: 100% = 255, so p% with p = 100 v / 255 gives v back.
    assert rgb(parse_color(f"rgb({100 * r / 255:.6f}% {100 * g / 255:.6f}% {100 * b / 255:.6f}%)")) == [r, g, b]


def test_text_file_with_names_comments_and_blank_lines(tmp_path) -> None:
    path = tmp_path / "brand.txt"
    path.write_text(
        "# brand colours\n"
        "\n"
        "#0050a0  # primary\n"
        "Accent = #abc\n"
        "   lab(52 -3 -45)\n"
        "#\n",
        encoding="utf-8",
    )
    colors = read_color_file(path)
    assert [c.name for c in colors] == [None, "Accent", None]
    assert rgb(colors[0]) == [0, 80, 160]
    assert rgb(colors[1]) == [0xAA, 0xBB, 0xCC]
    np.testing.assert_allclose(colors[2].lab, [52, -3, -45])


def test_text_file_bad_line_names_file_and_line(tmp_path) -> None:
    path = tmp_path / "brand.txt"
    path.write_text("#0050a0\n\n# note\nlab(50 a 3)\n", encoding="utf-8")
    with pytest.raises(InputError) as info:
        read_color_file(path)
    assert str(info.value).startswith(f"{path}: line 4: 'lab(50 a 3)' is not a colour: ")


def test_csv_with_name_and_color_columns(tmp_path) -> None:
    path = tmp_path / "brand.csv"
    path.write_text(
        "Name,Color,notes\n"
        "Primary,#0050a0,main\n"
        '"Green, light","rgb(0, 200, 100)",\n'
        ",,\n"
        "Ink,lab(30 10 -40),x\n",
        encoding="utf-8",
    )
    colors = read_color_file(path)
    assert [c.name for c in colors] == ["Primary", "Green, light", "Ink"]
    assert rgb(colors[1]) == [0, 200, 100]
    assert colors[2].kind == "lab"


@pytest.mark.parametrize(
    "header, row, expected",
    [
        ("name,hex", "a,0050a0", [0, 80, 160]),
        ("name,rgb", 'a,"0, 80, 160"', [0, 80, 160]),
        ("name,rgb", "a,0 80 160", [0, 80, 160]),
        ("name;lab", "a;52 -3 -45", [52.0, -3.0, -45.0]),
        ("name,L*,a*,b*", "a,52,-3,-45", [52.0, -3.0, -45.0]),
    ],
)
def test_csv_column_kinds(tmp_path, header: str, row: str, expected: list[float]) -> None:
    path = tmp_path / "c.csv"
    path.write_text(f"{header}\n{row}\n", encoding="utf-8")
    (spec,) = read_color_file(path)
    assert spec.name == "a"
    value = spec.rgb if spec.kind == "rgb" else spec.lab
    np.testing.assert_allclose(value, expected)


def test_csv_bad_line_names_file_and_line(tmp_path) -> None:
    path = tmp_path / "brand.csv"
    path.write_text("name,color\na,#000000\nb,#ffffff\nc,lab(50 a 3)\n", encoding="utf-8")
    with pytest.raises(InputError) as info:
        read_color_file(path)
    assert str(info.value) == f"{path}: line 4: 'lab(50 a 3)' is not a colour: 'a' is not a number"


@pytest.mark.parametrize(
    "header, problem",
    [("name,notes", "no colour column"), ("name,hex,lab", "several colour columns (hex, lab)")],
)
def test_csv_header_must_have_one_colour_column(tmp_path, header: str, problem: str) -> None:
    path = tmp_path / "c.csv"
    path.write_text(f"{header}\na,b,c\n", encoding="utf-8")
    with pytest.raises(InputError, match="line 1: header has " + problem.replace("(", r"\(").replace(")", r"\)")):
        read_color_file(path)


def test_csv_column_kind_is_enforced(tmp_path) -> None:
    path = tmp_path / "c.csv"
    path.write_text("name,hex\na,rgb(1, 2, 3)\n", encoding="utf-8")
    with pytest.raises(InputError, match="line 2: 'rgb"):
        read_color_file(path)


@pytest.mark.parametrize(
    "content, problem",
    [
        (None, "no such file"),
        (b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR", "binary file"),
        (b"\xff\xfe#\x00f\x00", "binary file"),
        (b"caf\xe9\n", "not UTF-8 text"),
        (b"# only a comment\n\n", "contains no colours"),
    ],
)
def test_unusable_files_give_one_line(tmp_path, content: bytes | None, problem: str) -> None:
    path = tmp_path / "colours.txt"
    if content is not None:
        path.write_bytes(content)
    with pytest.raises(InputError) as info:
        read_color_file(path)
    message = str(info.value)
    assert message.startswith(f"{path}: ") and problem in message and "\n" not in message


def test_directory_is_refused(tmp_path) -> None:
    with pytest.raises(InputError, match="not a regular file"):
        read_color_file(tmp_path)


def test_csv_from_a_spreadsheet_with_bom_and_crlf(tmp_path) -> None:
    # Spreadsheet programs often write a UTF-8 byte-order mark and CRLF line ends.
    path = tmp_path / "brand.csv"
    path.write_bytes("\ufeffName,Hex\r\nPrimary,#0050A0\r\n".encode("utf-8"))
    (spec,) = read_color_file(path)
    assert spec.name == "Primary" and rgb(spec) == [0, 80, 160]


def test_tsv(tmp_path) -> None:
    path = tmp_path / "brand.tsv"
    path.write_text("name\tcolor\nA, with comma\trgb(0, 80, 160)\n", encoding="utf-8")
    (spec,) = read_color_file(path)
    assert spec.name == "A, with comma" and rgb(spec) == [0, 80, 160]


def test_csv_header_only_has_no_colours(tmp_path) -> None:
    path = tmp_path / "empty.csv"
    path.write_text("name,color\n", encoding="utf-8")
    with pytest.raises(InputError, match="contains no colours"):
        read_color_file(path)


def test_csv_empty_colour_cell_names_the_line(tmp_path) -> None:
    path = tmp_path / "gap.csv"
    path.write_text("name,color\na,#000\nb,\n", encoding="utf-8")
    with pytest.raises(InputError, match=r"gap\.csv: line 3: the color cell is empty"):
        read_color_file(path)
