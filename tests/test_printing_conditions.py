"""Printing-condition files: the shipped ones load with their stated aims; bad ones fail naming the key."""

from __future__ import annotations

import copy
from datetime import datetime
from pathlib import Path

import numpy as np
import pytest

from inkshift.errors import ConditionError, InkshiftError
from inkshift.printing.conditions import CMYK_INKS, GRAY_INKS, load_condition, parse_condition

PROFILES = Path(__file__).resolve().parents[1] / "profiles_open"
SHIPPED = ("coated", "uncoated", "newsprint", "office_gray")

# Aims as given in each condition's note; all recalled "from memory" (ISO 12647-2:2004
# paper types 1/2 and 4, ISO 12647-3) or "common practice" (office_gray), not checked
# against the standards. The test pins the files to what their notes claim.
STATED = {
    "coated": {
        "paper": (95, 0, -2), "cyan": (55, -37, -50), "magenta": (48, 74, -3), "yellow": (89, -5, 93),
        "black": (16, 0, 0), "magenta+yellow": (47, 68, 48), "cyan+yellow": (50, -65, 27),
        "cyan+magenta": (24, 22, -46), "tvi": (14, 14, 14, 17), "ref": 50, "tac": 330,
    },
    "uncoated": {
        "paper": (92, 0, -3), "cyan": (58, -25, -43), "magenta": (54, 58, -2), "yellow": (86, -4, 75),
        "black": (31, 1, 1), "magenta+yellow": (52, 55, 26), "cyan+yellow": (52, -46, 16),
        "cyan+magenta": (36, 12, -32), "tvi": (18, 18, 18, 20), "ref": 50, "tac": 300,
    },
    "newsprint": {
        "paper": (82, 0, 3), "cyan": (57, -23, -27), "magenta": (52, 46, 0), "yellow": (78, -3, 58),
        "black": (32, 1, 1), "tvi": (26, 26, 26, 26), "ref": 40, "tac": 240,
    },
    "office_gray": {"paper": (95, 0, 0), "black": (20, 0, 0), "tvi": (20,), "ref": 50, "tac": 100},
}


def _base() -> dict:
    return {
        "name": "test",
        "description": "a test condition",
        "note": "numbers invented for the test",
        "licence": "CC0-1.0",
        "created": "2026-01-01T00:00:00",
        "inks": list(CMYK_INKS),
        "yule_nielsen_n": 1.8,
        "total_area_coverage": 320,
        "paper": {"lab": [94.0, 0.0, -1.0]},
        "solids": {"cyan": [55.0, -37.0, -50.0], "magenta": [48.0, 74.0, -3.0], "yellow": [89.0, -5.0, 93.0], "black": [16.0, 0.0, 0.0]},
        "overprints": {"yellow+magenta": [47.0, 68.0, 48.0]},
        "tone_value_increase": {"reference_tint": 50, "curve": "parabola", "cyan": 14, "magenta": 14, "yellow": 14, "black": 17},
        "black_generation": {"start": 0.2, "amount": 0.6, "max_black": 0.95},
    }


@pytest.mark.parametrize("name", SHIPPED)
def test_shipped_conditions_load_with_their_stated_aims(name):
    c = load_condition(PROFILES / f"{name}.toml")
    want = STATED[name]
    assert c.name == name
    assert c.licence == "CC0-1.0"
    datetime.fromisoformat(c.created)
    assert np.array_equal(c.paper_lab, want["paper"])
    for ink in c.inks:
        assert np.array_equal(c.solids[ink], want[ink])
    for key, lab in c.overprints.items():
        assert np.array_equal(lab, want[key])
    assert tuple(c.tvi[i].value for i in c.inks) == want["tvi"]
    assert all(c.tvi[i].reference_tint == want["ref"] for i in c.inks)
    assert c.total_area_coverage == want["tac"]
    assert 1.0 <= c.yule_nielsen_n <= 10.0
    # Every recalled number must be labelled as such in the note (project rule).
    assert ("from memory" in c.note.lower()) or ("common practice" in c.note.lower())
    if name == "office_gray":
        assert c.inks == GRAY_INKS and c.black_generation is None and c.is_gray
    else:
        assert c.inks == CMYK_INKS and c.black_generation is not None


def test_overprint_keys_are_put_in_ink_order():
    c = parse_condition(_base(), "t.toml")
    assert list(c.overprints) == ["magenta+yellow"]


def _set(d: dict, path: str, value) -> None:
    keys = path.split(".")
    for k in keys[:-1]:
        d = d[k]
    if value is _DELETE:
        del d[keys[-1]]
    else:
        d[keys[-1]] = value


_DELETE = object()

BAD = [
    ("name", _DELETE, "name"),
    ("name", "Coated Paper", "name"),
    ("description", 3, "description"),
    ("created", "yesterday", "created"),
    ("inks", ["cyan", "magenta"], "inks"),
    ("paper", _DELETE, "paper"),
    ("paper.lab", [95, 0], "paper.lab"),
    ("paper.lab", [120, 0, 0], "paper.lab"),
    ("solids.cyan", _DELETE, "solids.cyan"),
    ("solids.cyan", "blue", "solids.cyan"),
    ("solids.yellow", [96.0, -5.0, 93.0], "solids.yellow"),  # lighter than the paper
    ("overprints.yellow+magenta", [99.0, 0.0, 0.0], "overprints.yellow+magenta"),
    ("overprints.yellow+orange", [40.0, 0.0, 0.0], "overprints.yellow+orange"),
    ("tone_value_increase.cyan", 55, "tone_value_increase.cyan"),
    ("tone_value_increase.cyan", -1, "tone_value_increase.cyan"),
    ("tone_value_increase.cyan", True, "tone_value_increase.cyan"),
    ("tone_value_increase.black", 30, "tone_value_increase.black"),  # parabola would fold over
    ("tone_value_increase.curve", "cubic", "tone_value_increase.curve"),
    ("tone_value_increase.reference_tint", 100, "tone_value_increase.reference_tint"),
    ("total_area_coverage", 90, "total_area_coverage"),
    ("total_area_coverage", 401, "total_area_coverage"),
    ("total_area_coverage", "330%", "total_area_coverage"),
    ("yule_nielsen_n", 0.5, "yule_nielsen_n"),
    ("yule_nielsen_n", 12, "yule_nielsen_n"),
    ("black_generation.amount", 1.5, "black_generation.amount"),
    ("black_generation.start", 1.0, "black_generation.start"),
    ("black_generation.max_black", _DELETE, "black_generation.max_black"),
    ("black_generation", _DELETE, "black_generation"),
]


@pytest.mark.parametrize(("path", "value", "key"), BAD)
def test_bad_values_raise_condition_error_naming_the_key(path, value, key):
    data = copy.deepcopy(_base())
    _set(data, path, value)
    with pytest.raises(ConditionError) as info:
        parse_condition(data, "bad.toml")
    assert info.value.key == key
    message = str(info.value)
    assert message.startswith("bad.toml: ") and f"'{key}'" in message and "\n" not in message


def test_one_ink_condition_requires_100_percent_coverage():
    data = copy.deepcopy(_base())
    data["inks"] = ["black"]
    data["solids"] = {"black": [20.0, 0.0, 0.0]}
    data["overprints"] = {}
    data["tone_value_increase"] = {"reference_tint": 50, "curve": "parabola", "black": 20}
    del data["black_generation"]
    with pytest.raises(ConditionError, match="total_area_coverage"):
        parse_condition(data, "gray.toml")
    data["total_area_coverage"] = 100
    c = parse_condition(data, "gray.toml")
    assert c.is_gray and c.black_generation is None


def test_hyperbola_accepts_what_the_parabola_cannot():
    data = copy.deepcopy(_base())
    data["tone_value_increase"].update({"reference_tint": 40, "cyan": 26})
    with pytest.raises(ConditionError, match="hyperbola"):
        parse_condition(data, "t.toml")
    data["tone_value_increase"]["curve"] = "hyperbola"
    assert parse_condition(data, "t.toml").tvi["cyan"].curve == "hyperbola"


def test_file_problems_are_condition_errors(tmp_path):
    with pytest.raises(ConditionError, match="no such file"):
        load_condition(tmp_path / "missing.toml")
    bad = tmp_path / "broken.toml"
    bad.write_text("name = \n", encoding="utf-8")
    with pytest.raises(InkshiftError, match="broken.toml.*not valid TOML"):
        load_condition(bad)
    binary = tmp_path / "binary.toml"
    binary.write_bytes(b"\xff\xfe\x00name")
    with pytest.raises(ConditionError, match="binary.toml"):
        load_condition(binary)
