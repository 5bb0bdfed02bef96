"""End-to-end tests of the `fitment` commands on real files (the demo shop and copies of it)."""
from __future__ import annotations

import csv
import io
import json
import subprocess
import sys
from pathlib import Path

import pytest
import yaml
from click.testing import CliRunner

from builder.cli import main
from clitools import copy_demo_shop, tree_digest

ROOT = Path(__file__).resolve().parents[1]
RECORDS = ROOT / "records"
ALL_BUILDS = sorted(RECORDS.glob("builds/**/*.yaml"))

CONTRACT = {
    "ratios": {"pedal", "hydraulic", "fork", "overall"},
    "effort": {"ideal_N", "predicted_N", "interval_N", "measured_N", "delta_pct"},
    "travel": {"master_stroke_used_mm", "slave_mm", "bearing_mm", "needed_bearing_mm",
               "margin_pct", "release_point_pct", "measured_slave_mm", "delta_pct"},
    "volume": {"master_swept_ml", "needed_ml", "losses_ml"},
    "pedal": {"floor_gap_mm"},
}
TOP_KEYS = {"id", "status", "verdict", "ratios", "effort", "travel", "pressure_kPa", "volume",
            "pedal", "flags", "similar", "suggestions"}


def run(*args: str, records: Path = RECORDS):
    return CliRunner().invoke(main, ["--records", str(records), *args], catch_exceptions=False)


@pytest.fixture
def shop_copy(tmp_path: Path) -> Path:
    """A private copy of the demo shop (records/ plus schema/ beside it, as in a clone)."""
    return copy_demo_shop(tmp_path)


def test_validate_demo_is_clean():
    result = run("validate")
    assert result.exit_code == 0, result.output
    assert "valid" in result.output


@pytest.mark.parametrize("path", ALL_BUILDS, ids=lambda p: p.stem)
def test_check_json_has_every_contract_key(path: Path):
    result = run("check", str(path), "--json")
    data = json.loads(result.output)
    fails = [flag for flag in data["flags"] if flag["severity"] == "fail"]
    # exit 3 exactly when a fail-severity flag fires (sized, not ready to order)
    assert result.exit_code == (3 if fails else 0), result.output
    assert data["verdict"] == ("not_ready" if fails else "warnings" if data["flags"]
                               or data["rejected_before"] else "ready")
    assert (data["suggestions"] != []) == bool(fails)  # suggestions only when not ready
    assert set(data) >= TOP_KEYS
    for section, keys in CONTRACT.items():
        assert set(data[section]) >= keys, section
    assert data["id"] == path.stem
    for flag in data["flags"]:
        assert set(flag) == {"code", "severity", "message", "values"}
        assert flag["severity"] in ("warn", "fail")
    for item in data["similar"]:
        assert set(item) >= {"id", "distance", "differs", "measured_effort_N", "outcome"}
        assert item["id"] != data["id"]  # a build is never its own neighbour


def test_check_proposal_outside_records_with_similar_k(tmp_path: Path):
    proposal = tmp_path / "proposal.yaml"
    source = (RECORDS / "builds").rglob("*.yaml")
    draft = next(p for p in sorted(source) if "status: draft" in p.read_text())
    proposal.write_text(draft.read_text().replace(f"id: {draft.stem}", "id: PR-0001"))
    result = run("check", str(proposal), "--json", "--similar", "3")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert data["id"] == "PR-0001"
    assert data["effort"]["measured_N"] is None and data["travel"]["measured_slave_mm"] is None
    assert len(data["similar"]) == 3
    distances = [item["distance"] for item in data["similar"]]
    assert distances == sorted(distances)
    assert data["effort"]["predicted_N"] is not None


def test_check_text_reads_in_both_unit_systems():
    path = ALL_BUILDS[0]
    result = run("check", str(path))
    assert result.exit_code == 0, result.output
    assert " lbf (" in result.output and " N)" in result.output
    assert " in (" in result.output and " mm)" in result.output
    assert "Most similar past builds" in result.output


def test_failing_check_prints_the_caution(tmp_path: Path):
    path = ALL_BUILDS[0]
    text = path.read_text()
    proposal = tmp_path / "short.yaml"
    # a master stroke far too short to release the clutch
    lines = []
    in_master = False
    for line in text.splitlines():
        if line.startswith("master:"):
            in_master = True
            lines.append("master:\n  bore: 5/8 in\n  stroke: 0.3 in")
            continue
        if in_master and line.startswith("  "):
            continue
        in_master = False
        lines.append(line)
    proposal.write_text("\n".join(lines).replace(f"id: {path.stem}", "id: PR-0002") + "\n")
    result = run("check", str(proposal))
    assert result.exit_code == 3, result.output
    assert result.output.startswith("Not ready to order: ")
    assert "FAIL" in result.output
    assert "makers' specifications" in result.output


def test_check_missing_file_is_located_error():
    result = run("check", "no/such/file.yaml")
    assert result.exit_code == 1
    assert "no/such/file.yaml:0:0: file: no such file" in result.output


def test_report_csv_parses_back_one_row_per_build():
    result = run("report", "--format", "csv")
    assert result.exit_code == 0, result.output
    rows = list(csv.DictReader(io.StringIO(result.output)))
    assert {row["id"] for row in rows} == {p.stem for p in ALL_BUILDS}
    row = rows[0]
    for column in ("date", "status", "family", "fork_tip_moves", "master_bore_mm",
                   "pedal_ratio", "overall_ratio", "computed_effort_N", "measured_effort_N",
                   "effort_delta_pct", "travel_margin_pct", "flags"):
        assert column in row
    measured = [r for r in rows if r["measured_effort_N"]]
    assert measured and all(float(r["computed_effort_N"]) > 0 for r in measured)


def test_report_json_and_table():
    data = json.loads(run("report", "--format", "json").output)
    assert len(data) == len(ALL_BUILDS)
    table = run("report").output.splitlines()
    assert table[0].startswith("Build") and len(table) == len(ALL_BUILDS) + 2


def _table(output: str) -> list[dict]:
    """A report table read back: heading -> cell, split on the heading rule's columns."""
    lines = output.splitlines()
    spans, at = [], 0
    for dashes in lines[1].split("  "):
        spans.append((at, at + len(dashes)))
        at += len(dashes) + 2
    cells = [[line[a:b].strip() for a, b in spans] for line in lines]
    return [dict(zip(cells[0], row)) for row in cells[2:]]


def test_report_table_speaks_words_in_the_shops_display_units():
    table = run("report")
    assert table.exit_code == 0
    heading = table.output.splitlines()[0]
    assert "_" not in heading  # words, not CSV keys
    assert "Master bore (in)" in heading and "Effort measured (lbf)" in heading
    rows = {row["Build"]: row for row in _table(table.output)}
    csv_rows = {r["id"]: r for r in csv.DictReader(io.StringIO(run("report", "--format", "csv").output))}
    for build_id, row in csv_rows.items():
        # CSV keeps SI-derived units; the table shows inches and lbf (NIST SP 811 B.8:
        # 1 in = 25.4 mm, 1 lbf = 4.4482216152605 N)
        assert float(rows[build_id]["Master bore (in)"]) == pytest.approx(
            float(row["master_bore_mm"]) / 25.4, abs=0.0006)
        if row["measured_effort_N"]:
            assert float(rows[build_id]["Effort measured (lbf)"]) == pytest.approx(
                float(row["measured_effort_N"]) / 4.4482216152605, abs=0.06)
    assert "pushrod off axis" in table.output and "pushrod-off-axis" not in table.output


def test_report_table_follows_a_metric_shop(shop_copy: Path):
    rules = shop_copy / "shop.yaml"
    rules.write_text(rules.read_text().replace("display_units: imperial", "display_units: metric"))
    heading = run("report", records=shop_copy).output.splitlines()[0]
    assert "Master bore (mm)" in heading and "Effort computed (N)" in heading


def test_report_filters_by_family_fork_and_status():
    every = list(csv.DictReader(io.StringIO(run("report", "--format", "csv").output)))
    chosen = run("report", "--format", "csv", "--family", "QX-5", "--fork", "rearward",
                 "--status", "verified")
    rows = list(csv.DictReader(io.StringIO(chosen.output)))
    assert rows and {(r["family"], r["fork_tip_moves"], r["status"]) for r in rows} == {
        ("QX-5", "rearward", "verified")}
    assert len(rows) == sum(r["family"] == "QX-5" and r["status"] == "verified" for r in every)
    drafts = _table(run("report", "--status", "draft").output)
    assert drafts and {row["Status"] for row in drafts} == {"draft"}
    unknown = run("report", "--family", "QX5")
    assert unknown.exit_code == 2 and "nearest: QX-5" in unknown.output
    assert run("report", "--fork", "sideways").exit_code == 2


def test_report_family_filter_knows_the_families_rule_of_shop_yaml(shop_copy: Path):
    # A family the shop lists under `families` but no catalogue gearbox or build uses yet
    # is a family of the shop: no builds, not a usage error.
    rules = shop_copy / "shop.yaml"
    rules.write_text(rules.read_text() + "families: [ZZ-7]\n")
    listed = run("report", "--family", "ZZ-7", records=shop_copy)
    assert listed.exit_code == 0, listed.output
    assert listed.output == "No builds.\n"
    assert run("report", "--family", "ZZ-8", records=shop_copy).exit_code == 2


def test_calibration_lists_every_family_and_shop_wide():
    result = run("calibration")
    assert result.exit_code == 0, result.output
    assert "shop-wide" in result.output
    for family in ("QX-5", "VK-4", "YC-6"):
        assert family in result.output
    rows = {row["Group"]: row for row in _table(result.output)}
    assert "Typical error" in result.output and "_pct" not in result.output
    # as the calibration page shows them: efficiency in percent, weight and travel factor as
    # factors near 1 (the demo's invented losses: 0.78 to 0.97, builder.demo)
    shop = rows["shop-wide"]
    assert shop["Efficiency used"].endswith(" %") and 70 < float(shop["Efficiency used"][:-2]) < 100
    assert 0.8 < float(shop["Travel factor used"]) < 1.0 and float(shop["Weight"]) == 1.0


def test_help_shows_each_commands_whole_line():
    result = run("--help")
    commands = result.output.split("Commands:")[1]
    assert "..." not in commands
    words = " ".join(result.output.split())
    assert "Write a new draft record BUILD_ID (never overwrites an existing file)." in words
    assert "Check the shop rules, parts catalogue and build records (or only PATHS)." in words
    site = " ".join(run("site", "--help").output.split())
    assert "the previous site stays if anything fails." in site


def test_new_like_copies_inputs_then_refuses_a_second_time(shop_copy: Path):
    like = ALL_BUILDS[0]
    result = run("new", "HW-0999", "--like", like.stem, records=shop_copy)
    assert result.exit_code == 0, result.output
    written = next(shop_copy.glob("builds/*/HW-0999.yaml"))
    text = written.read_text()
    assert "id: HW-0999" in text and "status: draft" in text
    assert "measured:" not in text
    assert text.startswith("# yaml-language-server: $schema=")
    before = written.read_bytes()
    again = run("new", "HW-0999", "--like", like.stem, records=shop_copy)
    assert again.exit_code == 1
    assert "already exists" in again.output
    assert written.read_bytes() == before
    assert run("validate", records=shop_copy).exit_code == 0


def leaves(mapping: dict, prefix: str = "") -> set[str]:
    """Dotted keys of every value in a mapping that is not itself a mapping."""
    found = set()
    for key, value in mapping.items():
        name = f"{prefix}{key}"
        found |= leaves(value, name + ".") if isinstance(value, dict) else {name}
    return found


# What a technician types over the template's stand-ins, top to bottom (invented values).
FILLED = [("technician: XX", "technician: RL"), ("describe the car generically", "invented sedan"),
          ("family: FAMILY", "family: VK-4"), ("fork_tip_moves: xx", "fork_tip_moves: forward"),
          ("release_load: xx lbf", "release_load: 400 lbf"), ("release_travel: xx in", "release_travel: 0.30 in"),
          ("clearance: xx in", "clearance: 0.06 in"), ("pivot_to_slave: xx in", "pivot_to_slave: 5.5 in"),
          ("pivot_to_bearing: xx in", "pivot_to_bearing: 2.75 in"), ("bore: xx in", "bore: 3/4 in"),
          ("stroke: xx in", "stroke: 1.40 in"), ("kind: xx", "kind: external"), ("bore: xx in", "bore: 7/8 in"),
          ("stroke: xx in", "stroke: 1.10 in"), ("length: xx in", "length: 36 in"),
          ("hose: xx", "hose: braided_ptfe"), ("fluid: xx", "fluid: DOT 4"),
          ("pivot_to_pad: xx in", "pivot_to_pad: 11 in"), ("pivot_to_clevis: xx in", "pivot_to_clevis: 2 in"),
          ("pad_travel: xx in", "pad_travel: 6 in")]


def test_new_template_lists_what_to_fill_in_and_rejects_bad_ids(shop_copy: Path):
    written = run("new", "HW-0998", records=shop_copy)
    assert written.exit_code == 0, written.output
    assert "fill in before sizing it" in written.output
    path = next(shop_copy.glob("builds/*/HW-0998.yaml"))
    left = run("validate", records=shop_copy)  # the template's placeholders are problems
    assert left.exit_code == 1
    fields = {line.split(": ")[1] for line in left.output.splitlines() if line.startswith(str(path))}
    # every value the template writes is a stand-in (its header says so): each leaf of the
    # file except id, date and status, read back with PyYAML, must be reported
    assert fields == leaves(yaml.safe_load(path.read_text())) - {"id", "date", "status"}
    assert left.output.count("fill in the ") == len(fields) == 20
    lines = [line for line in written.output.splitlines() if "fill in the " in line]
    assert [int(line.split(":")[1]) for line in lines] == sorted(int(line.split(":")[1]) for line in lines)
    # filled in, the same file is a record
    filled = path.read_text()
    for stand_in, value in FILLED:
        filled = filled.replace(stand_in, value, 1)
    path.write_text(filled)
    assert run("validate", records=shop_copy).exit_code == 0, run("validate", records=shop_copy).output
    path.unlink()
    bad = run("new", "../evil", records=shop_copy)
    assert bad.exit_code == 1 and "expected an id like" in bad.output
    existing = run("new", ALL_BUILDS[0].stem, records=shop_copy)
    assert existing.exit_code == 1 and "already exists" in existing.output


def test_reading_commands_leave_records_byte_identical(shop_copy: Path, tmp_path: Path):
    before = tree_digest(shop_copy)
    for args in (["validate"], ["check", str(ALL_BUILDS[0])], ["report", "--format", "csv"],
                 ["calibration"], ["site", "build", "--out", str(tmp_path / "out")]):
        result = run(*args, records=shop_copy)
        assert result.exit_code == 0, (args, result.output)
    assert tree_digest(shop_copy) == before


def test_usage_error_exits_2():
    assert run("report", "--format", "pdf").exit_code == 2
    assert run("no-such-command").exit_code == 2


def test_console_script_runs_as_a_process():
    done = subprocess.run([sys.executable, "-m", "builder.cli", "--records", str(RECORDS),
                           "validate"], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr


def test_readme_test_command_is_what_ci_runs():
    readme = (ROOT / "README.md").read_text()
    ci = (ROOT / ".ci" / "run").read_text()
    command = next(line for line in ci.splitlines() if line.startswith("python3 -m venv"))
    assert command in readme
