"""builder.records: loading, part resolution and located problems, on small invented records.

Outside references: NIST SP 811 Appendix B.8 (1 in = 0.0254 m, 1 lbf = 4.4482216152605 N,
1 psi = 6894.757 Pa) for the SI values; the YAML 1.1 spec for what an unquoted scalar becomes
(int, bool); JSON Schema draft 2020-12 (jsonschema's Draft202012Validator) for the verdicts.
All codes (QX-5, MC-750, QA-0101 ...) are invented.
"""
from __future__ import annotations

import dataclasses
import datetime as dt
import math
import re
from pathlib import Path

import pytest
from click.testing import CliRunner

from builder.problems import InputError
from builder.records import load_build_file, load_catalogue, load_rules, load_shop, validate_paths
from builder.records.convert import PLAUSIBLE

IN, LBF, PSI = 0.0254, 4.4482216152605, 6894.757293168  # NIST SP 811, B.8

SHOP = """\
site_title: Test shop (invented)
display_units: metric
effort_band:
  low: 15 lbf
  high: 40 lbf
min_travel_margin: 10 %
latest_release_point: 85 %
default_efficiency: 0.85
hose_expansion:
  rubber: 0.31 mL/m/MPa
  braided_ptfe: 0.05 mL/m/MPa
  steel: 0.005 mL/m/MPa
fluid_bulk_modulus: 1.7 GPa
"""

PARTS = {
    "masters": """\
kind: masters
parts:
  - id: MC-750
    label: 3/4 in bore
    bore: 3/4 in
    stroke: 1.40 in
    rated_pressure: 1200 psi
  - id: MC-625
    bore: 5/8 in
    stroke: 1.25 in
""",
    "slaves": """\
kind: slaves
parts:
  - id: SC-875
    kind: external
    bore: 7/8 in
    stroke: 1.10 in
  - id: CS-190
    kind: concentric
    piston_area: 1.9 in^2
    stroke: 0.50 in
""",
    "gearboxes": """\
kind: gearboxes
parts:
  - id: GB-QX5
    family: QX-5
    variant: early case
    fork_tip_moves: rearward
  - id: GB-ZR6
    family: 2002
    fork_tip_moves: none
""",
    "clutches": """\
kind: clutches
parts:
  - id: CL-410
    release_load: 410 lbf
    release_travel: 0.32 in
    clearance: 0.06 in
""",
    "pedals": """\
kind: pedals
parts:
  - id: PD-11
    pivot_to_pad: 11.25 in
    pivot_to_clevis: 2.10 in
    pad_travel: 6.0 in
""",
}

BUILD = """\
# yaml-language-server: $schema=../../../schema/build.schema.json
id: QA-0101
date: 2025-03-14
status: measured
technician: RL
vehicle: two-door coupe, inline six
gearbox:
  family: QX-5
  variant: early case
  fork_tip_moves: rearward
clutch:
  release_load: 410 lbf
  release_travel: 0.32 in
  clearance: 0.06 in
  load_curve:
    - [0 in, 0 lbf]
    - [0.12 in, 380 lbf]
    - [0.25 in, 410 lbf]
fork:
  pivot_to_slave: 5.6 in
  pivot_to_bearing: 2.8 in
master:
  part: MC-750
  stroke: 1-1/8 in
slave:
  kind: external
  bore: 7/8 in
  stroke: 1.10 in
  rated_pressure: 1200 psi
  bracket: side flange
line:
  length: 38 in
  hose: braided_ptfe
  fluid: DOT 4
pedal:
  pivot_to_pad: 11.25 in
  pivot_to_clevis: 2.10 in
  pad_travel: 6.0 in
  pushrod: spherical end
  layout:
    pivot: [0 mm, 0 mm]
    pad: [-60 mm, -285 mm]
    clevis: [-8 mm, -53 mm]
    pushrod_seat: [-140 mm, -48 mm]
    rotation_to_stop: 30 deg
measured:
  pedal_effort: 27 lbf
  slave_travel: 0.93 in
  floor_gap: 1.0 in
  method: spring gauge at pad centre
outcome: full release
notes: |
  Free text.
"""

CONCENTRIC = """\
id: QA-0102
status: draft
gearbox: {part: GB-ZR6}
clutch: {part: CL-410}
master: {part: MC-625}
slave: {part: CS-190}
line: {length: 1.2 m, hose: rubber, fluid: DOT 3}
pedal: {part: PD-11}
"""


@pytest.fixture
def records(tmp_path: Path) -> Path:
    root = tmp_path / "records"
    (root / "parts").mkdir(parents=True)
    (root / "builds" / "2025").mkdir(parents=True)
    (root / "shop.yaml").write_text(SHOP)
    for kind, text in PARTS.items():
        (root / "parts" / f"{kind}.yaml").write_text(text)
    (root / "builds" / "2025" / "QA-0101.yaml").write_text(BUILD)
    (root / "builds" / "QA-0102.yaml").write_text(CONCENTRIC)
    return root


def test_load_shop_converts_everything_to_si(records):
    shop = load_shop(records)
    rules = shop.rules
    assert rules.effort_band == pytest.approx((15 * LBF, 40 * LBF))
    assert rules.min_travel_margin == pytest.approx(0.10)
    assert rules.default_efficiency == pytest.approx(0.85)
    assert rules.hose_expansion["rubber"] == pytest.approx(0.31e-6 / 1e6)  # mL/m/MPa -> m^2/Pa
    assert rules.fluid_bulk_modulus == pytest.approx(1.7e9)
    assert rules.line_bore == pytest.approx(3.2e-3)  # model default when omitted
    first, second = shop.builds
    assert (first.id, second.id) == ("QA-0101", "QA-0102")
    assert first.date == dt.date(2025, 3, 14)
    assert first.clutch.release_load == pytest.approx(410 * LBF)
    assert first.clutch.load_curve[1] == pytest.approx((0.12 * IN, 380 * LBF))
    assert first.fork.pivot_to_slave == pytest.approx(5.6 * IN)
    assert first.slave.bore == pytest.approx(0.875 * IN)
    assert first.slave.rated_pressure == pytest.approx(1200 * PSI)
    assert first.pedal.layout.pad == pytest.approx((-0.060, -0.285))
    assert first.pedal.layout.rotation_to_stop == pytest.approx(math.radians(30))
    assert first.measured.pedal_effort == pytest.approx(27 * LBF)
    assert first.measured.pad_travel_to_release is None
    assert first.line.hose == "braided_ptfe" and first.line.fluid == "DOT 4"
    assert first.notes == "Free text.\n"
    assert first.path == str(records / "builds" / "2025" / "QA-0101.yaml")


def test_part_fields_with_overrides(records):
    first, second = load_shop(records).builds
    assert first.master.part == "MC-750"
    assert first.master.bore == pytest.approx(0.75 * IN)  # from the part
    assert first.master.stroke == pytest.approx(1.125 * IN)  # the build's override
    assert first.master.rated_pressure == pytest.approx(1200 * PSI)
    # YAML 1.1: an unquoted 2002 is an int; the family code keeps it as text.
    assert second.gearbox.family == "2002" and second.gearbox.part == "GB-ZR6"
    assert second.fork is None and second.measured is None and second.date is None
    assert second.slave.piston_area == pytest.approx(1.9 * IN**2) and second.slave.bore is None


def test_slave_bore_override_replaces_part_piston_area(records, tmp_path):
    proposal = tmp_path / "proposal.yaml"
    proposal.write_text(CONCENTRIC.replace("slave: {part: CS-190}", "slave: {part: CS-190, bore: 1.5 in}"))
    build = load_build_file(proposal, load_shop(records))
    assert build.slave.bore == pytest.approx(1.5 * IN) and build.slave.piston_area is None


def test_catalogue_and_rules_alone(records):
    catalogue = load_catalogue(records, load_rules(records))
    assert sorted(catalogue["masters"]) == ["MC-625", "MC-750"]
    part = catalogue["masters"]["MC-750"]
    assert part.label == "3/4 in bore" and part.section.bore == pytest.approx(0.75 * IN)
    assert part.path == str(records / "parts" / "masters.yaml")


def _line_of(text: str, marker: str) -> int:
    """1-based number of the first line where `marker` starts a word."""
    pattern = re.compile(r"(^|\s)" + re.escape(marker))
    return next(number for number, line in enumerate(text.splitlines(), 1) if pattern.search(line))


def _problems(records: Path, text: str, name: str = "2025/QA-0101.yaml") -> list:
    path = records / "builds" / name
    path.write_text(text)
    return validate_paths(records, [path])


# (replace this, with this, expected field, marker on the expected line, message pattern)
MISTAKES = [
    *(("  bore: 7/8 in", f"  bore: {value}", "slave.bore", f"bore: {value}", message) for value, message in [
        ("410 lbf", "expected a length .* which is a force"),
        ("75 in", r"outside the plausible range 0.118 in \(3 mm\)"),
        ("0 in", "outside the plausible range"),
        ("-7/8 in", "zero or more"),
        ("1e308 in", "outside the plausible range"),
        ("NaN in", "does not start with a number"),
        ("22", "bare number 22 with no unit"),
    ]),
    ("  bore: 7/8 in", "  bore: 22 mm\n  colour: red", "slave.colour", "colour", "unknown key 'colour'"),
    ("  stroke: 1.10 in", "  strok: 1.10 in", "slave.strok", "strok:", "did you mean stroke"),
    ("  stroke: 1.10 in\n", "", "slave.stroke", "slave:", "missing key 'stroke'"),
    ("hose: braided_ptfe", "hose: braided", "line.hose", "braided", "expected one of rubber, braided_ptfe, steel"),
    ("part: MC-750", "part: MC-751", "master.part", "MC-751", "unknown part 'MC-751'.*nearest: MC-750"),
    ("part: MC-750", "part: SC-875", "master.part", "SC-875", "SC-875 is in slaves, not masters"),
    ("pad: [-60 mm, -285 mm]", "pad: [-60 mm]", "pedal.layout.pad", "pad: [-60", r"As \[x, y\].*found 1 items"),
    ("pad: [-60 mm, -285 mm]", "pad: [-60 mm, -285 lbf]", "pedal.layout.pad[1]", "pad:", "expected a length"),
    ("date: 2025-03-14", "date: 2025-13-40", "date", "2025-13-40", "not a calendar date"),
    ("id: QA-0101", "id: QA-0199", "id", "QA-0199", "must equal the file name 'QA-0101'"),
    ("id: QA-0101", "id: ../../etc/x", "id", "../../etc", "is not in the expected form"),
    ("status: measured", "status: finished", "status", "finished", "expected one of draft, measured"),
    ("outcome: full release", "outcome: yes", "outcome", "outcome: yes", "found true .*quote it"),
    ("    - [0.25 in, 410 lbf]", "    - [0.10 in, 410 lbf]", "clutch.load_curve[2]", "- [0.10 in",
     "bearing travel must increase"),
    ("    - [0.12 in, 380 lbf]", "    - [0.12 in, 380]", "clutch.load_curve[1][1]", "- [0.12 in, 380]",
     "expected a force .* bare number 380 with no unit"),
    ("  kind: external", "  kind: external\n  piston_area: 1.9 in^2", "slave", "slave:",
     "either bore or piston_area, not both"),
    ("  pivot_to_pad: 11.25 in\n  pivot_to_clevis: 2.10 in\n", "", "pedal.pivot_to_pad", "pedal:",
     "missing key 'pivot_to_pad' \\(or give a layout\\)"),
    ("  kind: external\n  bore: 7/8 in", "  kind: external", "slave.bore", "slave:", r"missing key 'bore' \(or piston_area\)"),
    ("clevis: [-8 mm, -53 mm]", "clevis: [0 mm, 0.5 mm]", "pedal.layout.clevis", "clevis:", "within 1 mm of pivot"),
    ("  release_travel: 0.32 in", "  release_travel: 0.32 in\n  release_travel: 0.3 in", "clutch.release_travel",
     "release_travel: 0.3 in", "duplicate key 'release_travel'"),
]


@pytest.mark.parametrize("old, new, field, marker, message", MISTAKES, ids=[m[2] + ":" + m[4][:20] for m in MISTAKES])
def test_each_mistake_is_located(records, old, new, field, marker, message):
    text = BUILD.replace(old, new, 1)
    assert text != BUILD
    if not new:
        text = BUILD.replace(old, "", 1)
    if "pivot_to_pad" in old:  # without the two lengths the layout is still there: drop it too
        text = text[: text.index("  layout:")] + text[text.index("measured:"):]
    problems = _problems(records, text)
    matching = [p for p in problems if p.field == field]
    assert matching, problems
    problem = matching[0]
    assert re.search(message, problem.message), problem
    assert problem.line == _line_of(text, marker), problem
    assert problem.col >= 1
    assert str(problem) == f"{problem.path}:{problem.line}:{problem.col}: {field}: {problem.message}"


def test_all_problems_reported_at_once(records):
    text = BUILD.replace("bore: 7/8 in", "bore: 75 in").replace("hose: braided_ptfe", "hose: hemp")
    text = text.replace("  pushrod: spherical end", "  pushrod: spherical end\n  colour: red")
    fields = {p.field for p in _problems(records, text)}
    assert {"slave.bore", "line.hose", "pedal.colour"} <= fields
    no_line = BUILD.replace("bore: 7/8 in", "bore: 75 in").replace("line:\n  length: 38 in\n", "line_:\n  length: 38 in\n")
    assert {"line", "line_", "slave.bore"} <= {p.field for p in _problems(records, no_line)}


def test_status_and_slave_kind_rules(records):
    no_measured = BUILD[: BUILD.index("measured:\n")] + "outcome: ok\n"
    assert [p.field for p in _problems(records, no_measured)] == ["status"]
    assert _problems(records, no_measured.replace("status: measured", "status: draft")) == []
    no_fork = BUILD.replace("fork:\n  pivot_to_slave: 5.6 in\n  pivot_to_bearing: 2.8 in\n", "")
    assert [(p.field, p.line) for p in _problems(records, no_fork)] == [("fork", _line_of(no_fork, "kind: external"))]
    concentric = BUILD.replace("  kind: external\n  bore: 7/8 in", "  kind: concentric\n  piston_area: 1.9 in^2")
    problems = {p.field: p for p in _problems(records, concentric)}
    assert set(problems) == {"fork", "gearbox.fork_tip_moves"}
    assert "without a fork" in problems["fork"].message
    external_none = CONCENTRIC.replace("{part: CS-190}", "{part: SC-875}")
    found = _problems(records, external_none, "QA-0102.yaml")
    assert {p.field for p in found} == {"fork", "gearbox.fork_tip_moves"}


def test_shop_problems(records):
    (records / "shop.yaml").write_text(
        SHOP.replace("low: 15 lbf", "low: 50 lbf").replace("high: 40 lbf", "high: 30 lbf")
        .replace("fluid_bulk_modulus: 1.7 GPa", "fluid_bulk_modulus: 1.7")
        .replace("display_units: metric", "display_units: furlongs")
    )
    with pytest.raises(InputError) as error:
        load_rules(records)
    found = {p.field: p for p in error.value.problems}
    assert set(found) == {"effort_band", "fluid_bulk_modulus", "display_units"}
    assert "found the bare number 1.7 with no unit" in found["fluid_bulk_modulus"].message
    assert found["fluid_bulk_modulus"].line == 13


def test_parts_problems(records):
    masters = records / "parts" / "masters.yaml"
    masters.write_text(PARTS["masters"].replace("MC-625", "MC-750").replace("bore: 5/8 in", "bore: 5/8 lbf"))
    (records / "parts" / "hoses.yaml").write_text("kind: hoses\nparts: []\n")
    problems = validate_paths(records, [records / "parts"])
    by_field = {(Path(p.path).name, p.field): p for p in problems}
    assert "already used" in by_field[("masters.yaml", "parts[1].id")].message
    assert by_field[("masters.yaml", "parts[1].id")].line == 8
    assert "expected a length" in by_field[("masters.yaml", "parts[1].bore")].message
    assert ("hoses.yaml", "file") in by_field


def test_parts_kind_must_match_file(records):
    (records / "parts" / "pedals.yaml").write_text(PARTS["masters"].replace("MC-", "MD-"))
    problems = validate_paths(records, [records / "parts" / "pedals.yaml"])
    assert [(p.field, p.line) for p in problems] == [("kind", 1)]


def test_duplicate_id_in_another_subfolder_names_both_files(records):
    copy = records / "builds" / "2024" / "QA-0101.yaml"
    copy.parent.mkdir()
    copy.write_text(BUILD)
    with pytest.raises(InputError) as error:
        load_shop(records)
    (problem,) = error.value.problems
    original = str(records / "builds" / "2025" / "QA-0101.yaml")
    assert problem.field == "id" and problem.line == 2
    assert {problem.path, re.search(r"used by (\S+);", problem.message).group(1)} == {original, str(copy)}


def test_proposal_outside_records_needs_no_matching_name(records, tmp_path):
    proposal = tmp_path / "idea.yaml"
    proposal.write_text(BUILD.replace("status: measured", "status: draft"))
    assert load_build_file(proposal, load_shop(records)).id == "QA-0101"


def test_careful_path_gives_the_same_build(records, tmp_path):
    # A '&' sends the file down the careful (position-tracking) path; the result must not change.
    shop = load_shop(records)
    fast = shop.builds[0]
    careful_file = tmp_path / "careful.yaml"
    careful_file.write_text(BUILD.replace("Free text.", "Free text & more."))
    careful = load_build_file(careful_file, shop)
    assert dataclasses.replace(careful, path=fast.path, notes=fast.notes) == fast


def test_small_anchors_are_fine(records, tmp_path):
    text = BUILD.replace("pad_travel: 6.0 in", "pad_travel: &travel 6.0 in").replace(
        "slave_travel: 0.93 in", "slave_travel: 0.93 in\n  pad_travel_to_release: *travel")
    path = tmp_path / "anchors.yaml"
    path.write_text(text)
    assert load_build_file(path, load_shop(records)).measured.pad_travel_to_release == pytest.approx(6.0 * IN)


def test_validation_never_writes(records):
    def snapshot():
        return sorted((str(p), p.stat().st_mtime_ns, p.stat().st_size) for p in records.rglob("*"))

    before = snapshot()
    validate_paths(records, [])
    load_shop(records)
    assert snapshot() == before


def test_validate_paths_everything_and_missing_paths(records):
    assert validate_paths(records, []) == []
    (problem,) = validate_paths(records, [records / "builds" / "nope.yaml"])
    assert (problem.line, problem.field) == (0, "file")


def test_plausible_table_is_documented_and_consistent():
    for key, (dimension, low, high) in PLAUSIBLE.items():
        assert low < high, key
        assert "." in key and dimension in ("length", "area", "force", "pressure", "angle", "fraction",
                                            "hose_expansion", "volume_per_length")
    assert PLAUSIBLE["master.bore"][1:] == pytest.approx((0.003, 0.060))


def test_cli_validate_end_to_end(records):
    from builder.cli import main

    text = BUILD.replace("bore: 7/8 in", "bore: 75 in").replace("hose: braided_ptfe", "hose: hemp")
    (records / "builds" / "2025" / "QA-0101.yaml").write_text(text)
    result = CliRunner().invoke(main, ["--records", str(records), "validate"])
    assert result.exit_code == 1
    lines = [line for line in result.stderr.splitlines() if re.match(r"^\S+:\d+:\d+: \S+: .+", line)]
    assert any(f":{_line_of(text, '75 in')}:" in line and ": slave.bore: " in line for line in lines)
    assert any(": line.hose: expected one of" in line for line in lines)
    ok = CliRunner().invoke(main, ["--records", str(records), "validate", str(records / "builds" / "QA-0102.yaml")])
    assert ok.exit_code == 0, ok.output


def test_a_repeated_section_is_located_where_its_kept_value_is(records):
    # YAML mappings keep the last of a repeated key (PyYAML's constructor): a problem in the
    # kept section must point at that section, not at the one the data no longer holds.
    text = BUILD + "measured:\n  pedal_effort: 9000 lbf\n"
    problems = {p.field: p for p in _problems(records, text)}
    assert "duplicate key 'measured'" in problems["measured"].message
    assert problems["measured.pedal_effort"].line == _line_of(text, "pedal_effort: 9000 lbf")
