"""Issue 10: a pedal layout the engine cannot work is a located problem for every command.

The issue's layout (pivot [0, 0], pad [-90, -296], clevis [54, 12], pushrod seat [114, -60] mm,
77 deg to the stop) goes over centre inside its swing. Where: the slider-crank toggle
(Norton, Design of Machinery: the slider's velocity is zero where crank and coupler line up),
found here independently with scipy's brentq on the closed-form velocity of the seat.
"""
from __future__ import annotations

import math
import re
from pathlib import Path

import pytest
import scipy.optimize
from click.testing import CliRunner

from builder.cli import main
from clitools import copy_demo_shop

PIVOT, PAD, CLEVIS, SEAT, SWING = (0, 0), (-90, -296), (54, 12), (114, -60), 77.0  # mm, deg
COMMANDS = [["validate"], ["check", "{record}"], ["report"], ["calibration"],
            ["site", "build", "--out", "{out}"]]


def toggle_degrees() -> float:
    """Crank angle (deg) where the seat stops moving along the bore axis, by brentq."""
    crank = (CLEVIS[0] - PIVOT[0], CLEVIS[1] - PIVOT[1])
    rod = math.dist(CLEVIS, SEAT)
    axis = ((SEAT[0] - CLEVIS[0]) / rod, (SEAT[1] - CLEVIS[1]) / rod)

    def seat_along_axis(turn: float) -> float:
        c, s = math.cos(turn), math.sin(turn)
        # clevis displacement from rest: the seat's line runs through the clevis at rest
        x, y = crank[0] * c - crank[1] * s - crank[0], crank[0] * s + crank[1] * c - crank[1]
        along = x * axis[0] + y * axis[1]
        across = x * axis[1] - y * axis[0]
        return along + math.sqrt(rod * rod - across * across)

    # the turning sense that pushes the seat along the axis at rest
    sense = 1.0 if seat_along_axis(1e-6) > seat_along_axis(0.0) else -1.0
    velocity = lambda t: (seat_along_axis(sense * (t + 1e-7)) - seat_along_axis(sense * (t - 1e-7))) / 2e-7
    return math.degrees(scipy.optimize.brentq(velocity, math.radians(1), math.radians(SWING)))


@pytest.fixture
def shop(tmp_path: Path) -> tuple[Path, Path, int]:
    copy_demo_shop(tmp_path)
    records = tmp_path / "records"
    target = next(path for path in sorted((records / "builds").rglob("HW-*.yaml"))  # a measured
                  if "\n  layout:" in path.read_text() and "\nmeasured:" in path.read_text())  # layout
    lines = target.read_text().splitlines()
    at = next(i for i, line in enumerate(lines) if line.startswith("  layout:"))
    values = {"pivot": f"[{PIVOT[0]} mm, {PIVOT[1]} mm]", "pad": f"[{PAD[0]} mm, {PAD[1]} mm]",
              "clevis": f"[{CLEVIS[0]} mm, {CLEVIS[1]} mm]", "pushrod_seat": f"[{SEAT[0]} mm, {SEAT[1]} mm]",
              "rotation_to_stop": f"{SWING:g} deg"}
    for i in range(at + 1, at + 6):
        key = lines[i].split(":")[0].strip()
        lines[i] = f"    {key}: {values[key]}"
    if lines[at + 6].startswith("    bore_axis:"):  # the axis from the clevis through the seat
        del lines[at + 6]
    target.write_text("\n".join(lines) + "\n")
    return records, target, at + 1


@pytest.mark.parametrize("command", COMMANDS, ids=[c[0] if c[0] != "site" else "site build" for c in COMMANDS])
def test_the_issues_layout_is_located_at_its_layout_key_by_every_command(shop, tmp_path, command):
    records, target, line = shop
    args = [arg.format(record=target, out=tmp_path / "published") for arg in command]
    result = CliRunner().invoke(main, ["--records", str(records), *args])
    assert result.exit_code == 1, result.output
    assert isinstance(result.exception, SystemExit), repr(result.exception)
    assert "Traceback" not in result.output and "e+" not in result.output
    found = re.search(rf"^{re.escape(str(target))}:{line}:3: pedal\.layout: .*dead centre ([0-9.]+) deg",
                      result.output, re.M)
    assert found, result.output
    assert float(found[1]) == pytest.approx(toggle_degrees(), abs=0.05)
    assert not (tmp_path / "published").exists()
