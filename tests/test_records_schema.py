"""The JSON Schemas in schema/: valid draft 2020-12, documented, and the compiled fast check
agrees with the reference validator.

Outside references: the JSON Schema draft 2020-12 meta-schema (jsonschema's
Draft202012Validator.check_schema) and jsonschema's verdicts as the reference for fastjsonschema.
"""
from __future__ import annotations

import copy
from pathlib import Path

import pytest
import yaml
from jsonschema import Draft202012Validator

from builder.records import fields
from builder.records._schema import is_valid_fast, reference_validator, schema
from builder.records._yaml import Loader

REPO = Path(__file__).resolve().parents[1]
NAMES = ("build", "parts", "shop")

BUILD = {
    "id": "QA-0101", "date": "2025-03-14", "status": "measured", "technician": "RL",
    "vehicle": "two-door coupe",
    "gearbox": {"family": "QX-5", "variant": "early", "fork_tip_moves": "rearward"},
    "clutch": {"release_load": "410 lbf", "release_travel": "0.32 in", "clearance": "0.06 in",
               "load_curve": [["0 in", "0 lbf"], ["0.25 in", "410 lbf"]]},
    "fork": {"pivot_to_slave": "5.6 in", "pivot_to_bearing": "2.8 in"},
    "master": {"part": "MC-750", "stroke": "1.4 in"},
    "slave": {"kind": "external", "bore": "7/8 in", "stroke": "1.10 in", "bracket": "flange"},
    "line": {"length": "38 in", "hose": "steel", "fluid": "DOT 5.1"},
    "pedal": {"pad_travel": "6 in", "layout": {
        "pivot": ["0 mm", "0 mm"], "pad": ["-60 mm", "-285 mm"], "clevis": ["-8 mm", "-53 mm"],
        "pushrod_seat": ["-140 mm", "-48 mm"], "rotation_to_stop": "30 deg"}},
    "measured": {"pedal_effort": "27 lbf"},
    "outcome": "ok", "notes": "text",
}


def _mutations(document: dict) -> list[dict]:
    """Valid and invalid variants: every key removed, unknown keys, wrong types and forms."""
    variants = [document]
    for key in document:
        variants.append({k: v for k, v in document.items() if k != key})
        if isinstance(document[key], dict):
            for inner in document[key]:
                changed = copy.deepcopy(document)
                del changed[key][inner]
                variants.append(changed)
                for wrong in (22, True, None, "22", "abc", ["1 in"], {}, "-3 in"):
                    changed = copy.deepcopy(document)
                    changed[key][inner] = wrong
                    variants.append(changed)
            changed = copy.deepcopy(document)
            changed[key]["colour"] = "red"
            variants.append(changed)
        for wrong in (2002, 1.5, False, None, [], "Q"):
            variants.append({**document, key: wrong})
    return variants


def _demo_documents(folder: str) -> list[dict]:
    return [yaml.load(path.read_text(), Loader=Loader) for path in sorted((REPO / "records" / folder).rglob("*.yaml"))]


@pytest.mark.parametrize("name", NAMES)
def test_schema_is_valid_draft_2020_12(name):
    document = schema(name)
    assert document["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    Draft202012Validator.check_schema(document)
    assert document["title"] and document["description"]


@pytest.mark.parametrize("name", NAMES)
def test_every_property_is_described_for_editors(name):
    def walk(node, where):
        if isinstance(node, dict):
            for key, sub in node.get("properties", {}).items():
                assert "description" in sub, f"{where}.{key}"
            for key, value in node.items():
                if key != "allOf":  # kind selectors, not shown to people
                    walk(value, f"{where}.{key}")
        elif isinstance(node, list):
            for item in node:
                walk(item, where)

    walk(schema(name), name)


def test_build_sections_match_the_records_code():
    properties = schema("build")["properties"]
    for section, known in fields.SECTION_FIELDS.items():
        assert set(properties[section]["properties"]) - {"part"} == set(known), section
    assert set(properties) == {"id", "date", "status", "technician", "vehicle", "outcome", "notes",
                               *fields.SECTION_FIELDS}


def test_fast_and_reference_validators_agree_on_builds():
    documents = _mutations(BUILD) + _demo_documents("builds")
    verdicts = set()
    for document in documents:
        reference = reference_validator("build").is_valid(document)
        assert is_valid_fast("build", document) == reference, document
        verdicts.add(reference)
    assert verdicts == {True, False}


def test_fast_and_reference_validators_agree_on_parts_and_shop():
    part = {"id": "MC-750", "label": "x", "bore": "3/4 in", "stroke": "1.4 in"}
    parts = {"kind": "masters", "parts": [part]}
    shop = {"site_title": "t", "display_units": "metric", "effort_band": {"low": "15 lbf", "high": "40 lbf"},
            "min_travel_margin": "10 %", "latest_release_point": 0.85, "default_efficiency": "85 %",
            "hose_expansion": {"rubber": "0.3 mL/m/MPa", "braided_ptfe": "0.05 mL/m/MPa", "steel": "0 mL/m/MPa"},
            "fluid_bulk_modulus": "1.7 GPa"}
    cases = [("parts", d) for d in _mutations(parts) + _demo_documents("parts")]
    cases += [("parts", {"kind": "slaves", "parts": [part]}), ("parts", {"kind": "masters", "parts": [{"id": "x"}]})]
    cases += [("shop", d) for d in _mutations(shop)]
    for name, document in cases:
        assert is_valid_fast(name, document) == reference_validator(name).is_valid(document), (name, document)
