"""The JSON Schemas in schema/: valid draft 2020-12, documented, and the fast path (the compiled
lighter schema plus the conversion) never accepts what the reference validator refuses.

Outside references: the JSON Schema draft 2020-12 meta-schema (jsonschema's
Draft202012Validator.check_schema) and jsonschema's verdicts as the reference for the fast path.
"""
from __future__ import annotations

import copy
from pathlib import Path

import pytest
import yaml
from jsonschema import Draft202012Validator

from builder.records import convert as fields
from builder.records import load_catalogue
from builder.records._load import _build_converter, _convert_rules, _parts_converter
from builder.records._schema import fast_schema, is_valid_fast, quantity_patterns, reference_validator, schema
from builder.records._yaml import Loader, Located, NeedsCare

REPO = Path(__file__).resolve().parents[1]
NAMES = ("build", "parts", "shop")

BUILD = {
    "id": "QA-0101", "date": "2025-03-14", "status": "measured", "technician": "RL",
    "vehicle": "two-door coupe",
    "gearbox": {"family": "QX-5", "variant": "early", "fork_tip_moves": "rearward"},
    "clutch": {"release_load": "410 lbf", "release_travel": "0.32 in", "clearance": "0.06 in",
               "load_curve": [["0 in", "0 lbf"], ["0.25 in", "410 lbf"]]},
    "fork": {"pivot_to_slave": "5.6 in", "pivot_to_bearing": "2.8 in"},
    "master": {"part": "MC-A3", "stroke": "1.4 in"},
    "slave": {"kind": "external", "bore": "7/8 in", "stroke": "1.10 in", "bracket": "flange"},
    "line": {"length": "38 in", "hose": "steel", "fluid": "DOT 5.1"},
    "pedal": {"pad_travel": "6 in", "layout": {
        "pivot": ["0 mm", "0 mm"], "pad": ["-60 mm", "-285 mm"], "clevis": ["-8 mm", "-53 mm"],
        "pushrod_seat": ["-140 mm", "-48 mm"], "rotation_to_stop": "30 deg"}},
    "measured": {"pedal_effort": "27 lbf"},
    "outcome": "ok", "notes": "text",
}


# Strings parse_quantity reads but the schema's quantity patterns refuse (or the reverse), beside
# plain mistakes: the fast path must still refuse exactly what the reference refuses.
WRONG = (22, True, None, "22", "abc", ["1 in"], {}, "-3 in", "+3 in", "-0 in", "3\tin", "1/2", "3 in\n",
         " 0.5", "5 %", "1e1 mm", ". in")


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
                for wrong in WRONG:
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


def _deep_mutations(document: dict, paths: list[tuple]) -> list[dict]:
    """Each WRONG value at each path (keys and list indices) inside `document`."""
    variants = []
    for path in paths:
        for wrong in WRONG:
            changed = copy.deepcopy(document)
            inner = changed
            for step in path[:-1]:
                inner = inner[step]
            inner[path[-1]] = wrong
            variants.append(changed)
    return variants


def _verdicts(name: str, document: dict, convert) -> tuple[object, object]:
    """(fast path result, reference result) for one document; None where that path refuses it.

    Fast: the compiled lighter schema, then the conversion with no positions (any problem
    sends the file to the careful path). Reference: jsonschema on the full schema, then the
    conversion reporting problems.
    """
    try:
        fast = convert(document, fields.ProblemCollector("doc")) if is_valid_fast(name, document) else None
    except NeedsCare:
        fast = None
    reference = None
    if reference_validator(name).is_valid(document):
        report = fields.ProblemCollector("doc", Located())
        result = convert(document, report)
        reference = None if report.problems else result
    return fast, reference


def _check_verdicts(name: str, documents: list[dict], convert) -> int:
    """Assert the fast path accepts only what the reference accepts, with the same result;
    return how many documents the fast path accepted."""
    accepted = 0
    for document in documents:
        fast, reference = _verdicts(name, document, convert)
        assert fast is None or fast == reference, (name, document)
        accepted += fast is not None
    return accepted


def test_fast_path_refuses_what_the_reference_refuses_in_builds():
    catalogue = load_catalogue(REPO / "records")
    convert = _build_converter(catalogue, None)
    demo = _demo_documents("builds")
    points = [("pedal", "layout", point, axis) for point in ("pivot", "pad", "clevis", "pushrod_seat") for axis in (0, 1)]
    curve = [("clutch", "load_curve", index, axis) for index in (0, 1) for axis in (0, 1)]
    documents = _mutations(BUILD) + _deep_mutations(BUILD, points + curve)
    documents += [{**BUILD, "slave": {**BUILD["slave"], "piston_area": "0.6 in^2"}},  # the schema's `not`
                  {**BUILD, "slave": {"part": "SC-B1", "bore": "0.75 in", "piston_area": "0.6 in^2"}}]
    assert _check_verdicts("build", demo, convert) == len(demo)  # every demo build takes the fast path
    accepted = _check_verdicts("build", documents, convert)
    assert 0 < accepted < len(documents)
    assert any(_verdicts("build", d, convert) == (None, None) for d in documents)


def test_fast_path_refuses_what_the_reference_refuses_in_parts_and_shop():
    part = {"id": "MC-750", "label": "x", "bore": "3/4 in", "stroke": "1.4 in"}
    parts = {"kind": "masters", "parts": [part]}
    shop = {"site_title": "t", "display_units": "metric", "effort_band": {"low": "15 lbf", "high": "40 lbf"},
            "min_travel_margin": "10 %", "latest_release_point": 0.85, "default_efficiency": "85 %",
            "hose_expansion": {"rubber": "0.3 mL/m/MPa", "braided_ptfe": "0.05 mL/m/MPa", "steel": "0 mL/m/MPa"},
            "fluid_bulk_modulus": "1.7 GPa"}
    part_documents = _mutations(parts) + _deep_mutations(parts, [("parts", 0, key) for key in part])
    part_documents += [{"kind": "slaves", "parts": [part]}, {"kind": "masters", "parts": [{"id": "x"}]}]
    demo_parts = _demo_documents("parts")
    for document in part_documents + demo_parts:
        kind = document.get("kind") if isinstance(document.get("kind"), str) else "masters"
        _check_verdicts("parts", [document], _parts_converter(Path(f"{kind}.yaml"), {}))
    assert all(_verdicts("parts", d, _parts_converter(Path(f"{d['kind']}.yaml"), {}))[0] for d in demo_parts)
    shop_documents = _mutations(shop) + _deep_mutations(shop, [("effort_band", "low"), ("hose_expansion", "steel")])
    assert 0 < _check_verdicts("shop", shop_documents, _convert_rules) < len(shop_documents)


def test_fast_schema_leaves_out_only_what_the_records_code_checks():
    for name in NAMES:
        assert quantity_patterns(name) == quantity_patterns("build")  # fields.quantity reads the build's
        text = repr(fast_schema(name))
        assert "$ref" not in text and "anyOf" not in text and "'not'" not in text
        assert not any(repr(pattern) in text for pattern in quantity_patterns(name).values())
