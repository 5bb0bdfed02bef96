"""The import map: its JSON Schema, and every problem in a map located (path:line:col).

Outside reference: the jsonschema library's Draft202012Validator (JSON Schema draft 2020-12)
for the schema itself and for the demo map; PyYAML to read the demo map independently.
"""
from __future__ import annotations

import json
from pathlib import Path

import pint
import pytest
import yaml
from jsonschema import Draft202012Validator

from builder.importing.mapping import bind, load_map
from builder.problems import InputError

ROOT = Path(__file__).resolve().parents[1]
SCHEMA = json.loads((ROOT / "schema" / "import-map.schema.json").read_text())
DEMO_MAP = ROOT / "records" / "import" / "old-builds.map.yml"
UREG = pint.UnitRegistry()

GOOD = """\
id: {column: "Job", prefix: "OLD-", digits: 4}
date: {column: "Date", format: "%d/%m/%Y"}
status: {column: "Result", values: {OK: verified, "": measured, no: rejected}}
fields:
  master.bore: {column: "MC bore", unit: "\\""}
  measured.pedal_effort: {column: "Effort", unit: "#"}
  line.hose: {column: "Hose", values: {braided: braided_ptfe}}
  notes: ["Notes", "Notes 2"]
defaults:
  line.fluid: DOT4
  clutch.clearance: 0.06 in
"""


def write(tmp_path: Path, text: str) -> Path:
    path = tmp_path / "map.yaml"
    path.write_text(text, encoding="utf-8")
    return path


def test_the_map_schema_is_valid_draft_2020_12():
    Draft202012Validator.check_schema(SCHEMA)
    assert SCHEMA["$schema"] == "https://json-schema.org/draft/2020-12/schema"


def test_the_demo_map_passes_the_schema_and_loads():
    Draft202012Validator(SCHEMA).validate(yaml.safe_load(DEMO_MAP.read_text()))
    loaded = load_map(DEMO_MAP)
    assert loaded.header_row == 2 and loaded.id.prefix == "OLD-"


def test_a_good_map_normalises_units_choices_and_yes_no_words(tmp_path):
    loaded = load_map(write(tmp_path, GOOD))
    by_field = {source.field: source for source in loaded.sources}
    assert by_field["master.bore"].unit == "in"
    assert by_field["measured.pedal_effort"].unit == "lbf"  # '#' is pounds of force
    assert by_field["notes"].columns == ("Notes", "Notes 2")
    assert loaded.defaults == {"line.fluid": "DOT 4", "clutch.clearance": "0.06 in"}
    # YAML 1.1 reads an unquoted `no:` key as false: it still matches a cell typed "no" or "No"
    assert loaded.status.mapped("No") == "rejected" and loaded.status.mapped("") == "measured"
    assert loaded.status.mapped(" ok ") == "verified"


def problems_of(tmp_path: Path, text: str) -> list:
    with pytest.raises(InputError) as caught:
        load_map(write(tmp_path, text))
    return caught.value.problems


@pytest.mark.parametrize("change, line, col, field, words", [
    # schema problems
    ((None, "header_row: 0\n"), 1, 13, "header_row", ["minimum"]),  # None: put before the map
    (("fields:\n", "field:\n"), 4, 1, "field", ["unknown key 'field'", "fields"]),
    (('prefix: "OLD-"', 'prefix: "old"'), 1, 29, "id.prefix", ["expected form"]),
    # meaning
    (("  master.bore:", "  master.bores:"), 5, 3, "fields.master.bores", ["no record field", "master.bore"]),
    (('unit: "\\""', "unit: lbf"), 5, 42, "fields.master.bore.unit", ["lbf", "force", "length"]),
    (('unit: "\\""', "unit: furlongs_per_bar"), 5, 42, "fields.master.bore.unit", ["unknown unit"]),
    (('  master.bore: {column: "MC bore", unit: "\\""}', '  slave.piston_area: {column: "Area", unit: mL/m}'),
     5, 45, "fields.slave.piston_area.unit", ["'mL/m' is a unit of volume per length; slave.piston_area is an area"]),
    # a number is no part of a unit: `3` in the column would otherwise become "3 1/8 in"
    (('unit: "\\""', 'unit: "1/8 in"'), 5, 42, "fields.master.bore.unit", ["unknown unit '1/8 in'"]),
    (("line.fluid: DOT4", "line.fluid: DOT 7"), 10, 15, "defaults.line.fluid", ["expected one of DOT 3"]),
    (("clutch.clearance: 0.06 in", "clutch.clearance: 0.06"), 11, 21, "defaults.clutch.clearance",
     ["write the unit"]),
    (('"%d/%m/%Y"', '"%d/%m"'), 2, 32, "date.format", ["full date"]),
    (("braided: braided_ptfe", "braided: braid"), 7, 49, "fields.line.hose.values.braided",
     ["expected one of rubber"]),
    (('  notes: ["Notes", "Notes 2"]', '  clutch.load_curve: "Curve"'), 8, 3, "fields.clutch.load_curve",
     ["cannot come from one"]),
    (('  notes: ["Notes", "Notes 2"]', '  slave.bore: ["A", "B"]'), 8, 3, "fields.slave.bore",
     ["one column"]),
])
def test_map_problems_are_located(tmp_path, change, line, col, field, words):
    old, new = change
    if old is None:
        text = new + GOOD
    else:
        assert old in GOOD
        text = GOOD.replace(old, new, 1)
    problems = problems_of(tmp_path, text)
    matching = [p for p in problems if p.field == field]
    assert matching, problems
    problem = matching[0]
    assert (problem.line, problem.col) == (line, col), problem
    for word in words:
        assert word in problem.message, problem


def test_an_unknown_unit_is_answered_with_an_example_of_the_fields_own_dimension(tmp_path):
    text = GOOD.replace('  notes: ["Notes", "Notes 2"]', '  slave.piston_area: {column: "Area", unit: furlongs_per_bar}')
    problem = next(p for p in problems_of(tmp_path, text) if p.field == "fields.slave.piston_area.unit")
    assert "unknown unit 'furlongs_per_bar'" in problem.message and "an area" in problem.message, problem
    assert "psi" not in problem.message and "MPa" not in problem.message, problem  # pressure units
    # the example unit it gives is an area: pint reads in^2 as [length] ** 2
    assert "in^2" in problem.message, problem
    assert UREG.Quantity(1, "in^2").dimensionality == UREG.Quantity(1, "m").dimensionality ** 2


def test_broken_yaml_and_missing_keys_are_located(tmp_path):
    problems = problems_of(tmp_path, "id: [unclosed\n")
    assert problems[0].line >= 1 and "YAML" in problems[0].message
    problems = problems_of(tmp_path, "id: Job\n")
    assert {p.field for p in problems} >= {"date", "fields"}
    problems = problems_of(tmp_path, 'id: Job\ndate: Date\nfields: {notes: Notes}\n')
    assert "no status" in problems[0].message


def test_columns_the_sheet_lacks_are_located_with_the_nearest_heading(tmp_path):
    loaded = load_map(write(tmp_path, GOOD))
    headers = ["Job", "Date", "Result", "MC Bore ", "Effort", "Hose", "Notes"]
    with pytest.raises(InputError) as caught:
        bind(loaded, headers, "old.csv")
    problem = caught.value.problems[0]
    # "MC bore" matches "MC Bore " (case and spaces); "Notes 2" is missing
    assert problem.field == "fields.notes[1]" and problem.line == 8
    assert "no column 'Notes 2'" in problem.message and "nearest: 'Notes'" in problem.message
    columns = bind(loaded, headers + ["Notes 2"], "old.csv")
    assert columns["MC bore"] == 3


def test_a_heading_used_twice_in_the_sheet_is_refused(tmp_path):
    loaded = load_map(write(tmp_path, GOOD))
    headers = ["Job", "Date", "Result", "MC bore", "Effort", "Hose", "Notes", "Notes 2", "Effort"]
    with pytest.raises(InputError, match="columns 5, 9"):
        bind(loaded, headers, "old.csv")
