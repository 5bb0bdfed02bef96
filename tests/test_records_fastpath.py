"""Shortcuts of the fast path give what the plain path gives: catalogue parts named alone,
remembered quantities, the screen for deeply nested compact markers.

Outside references: the YAML 1.1 spec (compact nested sequences "- - x" and explicit keys
"? x", sections 2.1 and 7.2); jsonschema's verdict on the schema's quantity patterns.
"""
from __future__ import annotations

from pathlib import Path

import pytest

from builder.records import convert as fields
from builder.records import load_catalogue
from builder.records._schema import quantity_message, reference_validator, schema_problems
from builder.records._yaml import Located, NeedsCare, careful_load, fast_load

REPO = Path(__file__).resolve().parents[1]


def test_a_part_named_alone_resolves_as_make_section_does():
    catalogue = load_catalogue(REPO / "records")
    for kind, parts in catalogue.items():
        section = fields.SECTION_OF_KIND[kind]
        for part in parts.values():
            plain = fields.make_section(section, fields.section_fields(part.section),
                                        fields.ProblemCollector("x"), (section,), part.id)
            assert fields.referenced(part) == plain, part.id


@pytest.mark.parametrize("text", ["+3 mm", "-0 mm", "3\tmm", " -3 mm"])
def test_remembered_quantities_keep_the_schema_form(text):
    # jsonschema refuses these forms for a length (schema pattern) though the number reads.
    document = {"kind": "masters", "parts": [{"id": "MC-1", "bore": text, "stroke": "1 in"}]}
    assert not reference_validator("parts").is_valid(document)
    assert fields.quantity("3 mm", "master.bore", fields.ProblemCollector("x"), ("bore",)) == 0.003
    with pytest.raises(NeedsCare):  # the fast path hands it to the careful path
        fields.quantity(text, "master.bore", fields.ProblemCollector("x"), ("bore",))
    report = fields.ProblemCollector("x", Located())  # worded as the careful path's schema check words it
    assert fields.quantity(text, "master.bore", report, ("bore",)) is None
    ((_, _, _, said),) = schema_problems("parts", document)
    assert report.problems[0].message == said + fields.accepted("master.bore")



@pytest.mark.parametrize("text, dimension, example", [("+410 lbf", "force", "e.g. 410 lbf or 1.9 kN"),
                                                      ("+3 mm", "length", "e.g. 7/8 in or 22.2 mm")])
def test_refused_form_is_explained_with_an_example_of_its_own_dimension(text, dimension, example):
    # The number reads, the schema's pattern refuses the sign: the hint shows the field's own units.
    assert example in quantity_message(text, dimension, False)

@pytest.mark.parametrize("marker, position, message", [
    ("- ", (3, 129), "nesting is deeper than 64 levels"), ("? ", (3, 129), "nesting is deeper than 64 levels"),
    ("-\t", (3, 4), "YAML:"), ("?\t", (3, 4), "YAML:")])
def test_deep_compact_runs_are_caught_whatever_the_marker(marker, position, message):
    # Each compact marker opens one nesting level (YAML 1.1, 7.2): with the root mapping, the
    # 64th marker (column 3 + 2 * 63) opens level 65. libyaml refuses a tab after a marker.
    text = "a: 1\nb:\n  " + marker * 70 + "x\n"
    with pytest.raises(NeedsCare):
        fast_load(text)
    (problem,) = careful_load(text).problems
    assert problem[1:3] == position and problem[3].startswith(message)
