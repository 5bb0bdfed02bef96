"""Exact output of `check`, `report` and `calibration` on a small fixed shop.

The shop in tests/golden/shop is invented and never regenerated. When an output changes on
purpose, rewrite the expected files with ``pytest tests/test_golden.py --update-golden`` and
read the diff of tests/golden/*.txt before committing it.
"""
from __future__ import annotations

from pathlib import Path

import pytest
from click.testing import CliRunner

from builder.cli import main

ROOT = Path(__file__).resolve().parents[1]
GOLDEN = Path("tests") / "golden"
SHOP = GOLDEN / "shop"

CASES = {
    "check-measured.txt": ["check", str(SHOP / "builds" / "TG-0142.yaml")],
    "check-flagged.json": ["check", str(SHOP / "builds" / "TG-0109.yaml"), "--json"],
    "check-layout-draft.txt": ["check", str(SHOP / "builds" / "TG-0155.yaml"), "--similar", "3"],
    "check-concentric.json": ["check", str(SHOP / "builds" / "TG-0101.yaml"), "--json"],
    "report.txt": ["report"],
    "report.csv": ["report", "--format", "csv"],
    "report.json": ["report", "--format", "json"],
    "calibration.txt": ["calibration"],
}


@pytest.mark.parametrize("name", sorted(CASES))
def test_output_is_exactly_the_recorded_one(name, update_golden, monkeypatch):
    monkeypatch.chdir(ROOT)  # paths in the output are as given, relative to the repository
    result = CliRunner().invoke(main, ["--records", str(SHOP), *CASES[name]])
    assert result.exception is None or isinstance(result.exception, SystemExit), result.output
    expected = ROOT / GOLDEN / name
    if update_golden:
        expected.write_text(result.output, encoding="utf-8", newline="")
    assert result.output == expected.read_text(encoding="utf-8"), (
        f"{name} changed: if on purpose, rerun with --update-golden and read the diff")
