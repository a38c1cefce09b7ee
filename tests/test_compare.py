"""Tests of `inkshift compare` and `inkshift.compare.compare`.

Fact of the trade checked: coated offset stock holds a larger gamut than
newsprint, so a saturated chart keeps more of its colour on coated.
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from PIL import Image

from inkshift.check import check
from inkshift.compare import compare

SATURATED = [(0, 0, 255), (0, 255, 0), (255, 140, 0), (230, 0, 120), (0, 170, 230), (120, 0, 200)]


def _chart() -> np.ndarray:
    img = np.full((60, 40 * (2 * len(SATURATED) + 1), 3), 255, np.uint8)
    for k, c in enumerate(SATURATED):
        img[10:50, 40 * (2 * k + 1) : 40 * (2 * k + 2)] = c
    return img


@pytest.fixture(scope="module")
def chart_path(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("cmp") / "saturated.png"
    Image.fromarray(_chart()).save(path)
    return path


def test_coated_keeps_a_saturated_chart_better_than_newsprint(chart_path):
    report = compare(chart_path, ["newsprint", "coated"])
    assert report.best == "coated"
    assert "coated" in report.verdict
    by_name = {p.name: p for p in report.profiles}
    assert by_name["coated"].gamut_volume > by_name["newsprint"].gamut_volume
    assert by_name["coated"].source_coverage > by_name["newsprint"].source_coverage
    assert by_name["coated"].palette_delta_e_mean < by_name["newsprint"].palette_delta_e_mean


def test_figures_equal_separate_check_runs(chart_path):
    report = compare(chart_path, ["coated", "newsprint"])
    for outcome in report.profiles:
        alone = check(chart_path, outcome.name)
        assert outcome.delta_e_mean == alone.summary.delta_e_mean
        assert outcome.delta_e_p95 == alone.summary.delta_e_p95
        assert outcome.delta_e_max == alone.summary.delta_e_max
        assert outcome.out_of_gamut_share == alone.summary.out_of_gamut_share
        assert outcome.merge_count == len(alone.merges)
        assert [c.to_dict() for c in outcome.check.colors] == [c.to_dict() for c in alone.colors]


def test_print_difference_is_symmetric_and_zero_on_white(chart_path):
    report = compare(chart_path, ["coated", "newsprint"])
    diff = report.differences[0]
    white = np.where((report.profiles[0].check.unique.colors == 255).all(axis=1))[0][0]
    assert diff.values[white] < 0.5  # both print white as bare paper, media-relative
    assert diff.delta_e_max >= diff.delta_e_p95 >= 0


def run_cli(*args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "inkshift", *args], capture_output=True, text=True)


def test_cli_writes_report_and_maps(chart_path, tmp_path):
    out = tmp_path / "cmp"
    res = run_cli("compare", str(chart_path), "-p", "coated", "-p", "newsprint", "--out", str(out), "--json")
    assert res.returncode == 0, res.stderr
    data = json.loads(res.stdout)
    assert data["schema"] == "inkshift.compare/1"
    assert data["best"] == "coated"
    for p in data["profiles"]:
        for key in ("name", "delta_e_mean", "delta_e_p95", "out_of_gamut_share", "merge_count", "gamut_volume", "source_coverage"):
            assert key in p
    assert (out / "report.json").is_file() and (out / "palettes.png").is_file()
    assert (out / "difference_coated_vs_newsprint.png").is_file()
    assert data["cautions"]


@pytest.mark.parametrize("args", [
    ["-p", "coated"],  # only one profile
    ["-p", "coated", "-p", "no_such_profile"],
    ["-p", "coated", "-p", "coated"],
])
def test_cli_bad_input_exit_2(chart_path, tmp_path, args):
    out = tmp_path / "never"
    res = run_cli("compare", str(chart_path), *args, "--out", str(out))
    assert res.returncode == 2
    assert "Traceback" not in res.stderr and len(res.stderr.strip().splitlines()) == 1
    assert not out.exists()
