"""`fitment check --json`: one effort delta per meaning, and the new travel and pressure keys.

Each figure is recomputed from the others in the same object (a relative difference is
(measured - reference) / reference, by definition), over every demo build.
"""
from __future__ import annotations

import json
from pathlib import Path

import pytest
from click.testing import CliRunner

from builder.check import check_file, contract
from builder.cli import main
from builder.history import analyse
from builder.records import load_shop

ROOT = Path(__file__).resolve().parents[1]
RECORDS = ROOT / "records"


@pytest.fixture(scope="module")
def objects():
    analysis = analyse(load_shop(RECORDS))
    return [contract(check_file(analysis, Path(build.path), 5))
            for build in analysis.shop.builds]


def test_new_keys_are_present(objects):
    for data in objects:
        assert {"computed_N", "predicted_delta_pct", "builds_behind"} <= set(data["effort"])
        assert "lost_pad_travel_mm" in data["travel"]
        assert data["pressure_worst_kPa"] is not None


def test_each_effort_delta_is_against_the_figure_it_names(objects):
    measured = [d for d in objects if d["effort"]["measured_N"] is not None]
    assert len(measured) > 40
    for data in measured:
        e = data["effort"]
        assert e["delta_pct"] == pytest.approx(
            (e["measured_N"] / e["computed_N"] - 1) * 100, abs=0.02), data["id"]
        assert e["predicted_delta_pct"] == pytest.approx(
            (e["measured_N"] / e["predicted_N"] - 1) * 100, abs=0.02), data["id"]


def test_builds_behind_is_the_count_the_basis_cites(objects):
    for data in objects:
        e = data["effort"]
        if e["basis"] is None:
            continue
        # the estimate's own words: "median of N builds" (family), "shop-wide median of N
        # builds" (shop-wide or shrunk toward it): builds_behind is that N
        assert f"median of {e['builds_behind']} builds" in e["basis"], data["id"]
        if e["interval_N"] is not None:
            low, high = e["interval_N"]
            assert low <= e["predicted_N"] <= high, data["id"]


def test_worst_pressure_is_static_over_an_efficiency_no_better_than_ideal(objects):
    for data in objects:
        assert data["pressure_worst_kPa"] >= data["pressure_kPa"], data["id"]


def test_calibration_prints_the_leave_one_out_coverage():
    result = CliRunner().invoke(main, ["--records", str(RECORDS), "calibration"])
    assert result.exit_code == 0, result.output
    assert "Interval held" in result.output
    assert "Leave-one-out coverage: the 80 % effort interval" in result.output


def test_check_json_from_the_command_line_carries_the_new_keys():
    path = sorted(RECORDS.glob("builds/**/*.yaml"))[0]
    result = CliRunner().invoke(main, ["--records", str(RECORDS), "check", str(path), "--json"])
    data = json.loads(result.output)
    assert "pressure_worst_kPa" in data and "lost_pad_travel_mm" in data["travel"]
