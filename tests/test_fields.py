"""The field table (builder.fields) is the one declaration of every record field.

Outside reference: JSON Schema draft 2020-12, through the jsonschema library's
Draft202012Validator.check_schema (each written schema is itself valid).
"""
from __future__ import annotations

from pathlib import Path

import pytest
from jsonschema import Draft202012Validator

from builder import fields, units
from builder.records import convert

SCHEMA_DIR = Path(__file__).resolve().parents[1] / "schema"


@pytest.mark.parametrize("name", sorted(fields.SCHEMAS))
def test_committed_schemas_are_what_the_table_writes(name):
    committed = (SCHEMA_DIR / f"{name}.schema.json").read_text(encoding="utf-8")
    assert committed == fields.schema_text(name), (
        "schema out of date: run `python -m builder.fields --write schema`")


@pytest.mark.parametrize("name", sorted(fields.SCHEMAS))
def test_written_schemas_are_valid_draft_2020_12(name):
    Draft202012Validator.check_schema(fields.SCHEMAS[name]())


def test_every_quantity_has_a_dimension_a_range_and_words():
    checked = set()
    for key, field in fields.FIELDS.items():
        assert field.label and field.description, key
        if field.kind in fields.MEASURED_KINDS:  # one quantity, a point, or a list of either
            low, high = field.bounds
            assert field.dimension in units.DIMENSIONS and low < high, key
            checked.add(field.kind)
    assert checked == set(fields.MEASURED_KINDS)


def test_the_loader_reads_its_ranges_and_sections_from_the_table():
    assert convert.PLAUSIBLE["master.bore"] == ("length", 0.003, 0.060)
    assert convert.SECTION_FIELDS["slave"]["piston_area"] == fields.QUANTITY
    assert set(convert.SECTION_FIELDS) == {section.name for section in fields.SECTIONS}


def test_write_command_writes_all_three(tmp_path):
    assert fields.main(["--write", str(tmp_path)]) == 0
    assert sorted(p.name for p in tmp_path.iterdir()) == [
        "build.schema.json", "parts.schema.json", "shop.schema.json"]
