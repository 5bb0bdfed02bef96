"""builder.records.writer: whatever it writes reads back as the data given.

Outside references: PyYAML's safe loader (a YAML 1.1 parser, stricter than 1.2 about what a
plain scalar may be) and the records loader's own libyaml-based Loader; the YAML 1.2 spec
(section 10.3.2, core schema) for the number forms a 1.2 reader takes that 1.1 does not.
"""
from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest
import yaml
from hypothesis import given, settings
from hypothesis import strategies as st

from builder.records._schema import schema
from builder.records._yaml import Loader
from builder.records.writer import UnwritableValue, dump, ordered

ROOT = Path(__file__).resolve().parents[1]


def read_back(text: str) -> object:
    return yaml.safe_load(text)


def test_record_layout_plain_where_possible():
    data = {"id": "HW-0142", "date": dt.date(2025, 3, 14), "status": "measured",
            "master": {"part": "MC-750", "bore": "7/8 in"},
            "clutch": {"load_curve": [["0 in", "0 lbf"], ["0.12 in", "380 lbf"]]},
            "pedal": {"clevis_positions": ["1.9 in", "2.3 in"]},
            "notes": "Two lines\nof notes.\n"}
    text = dump(data, modeline="yaml-language-server: $schema=../../../schema/build.schema.json")
    assert text == (
        "# yaml-language-server: $schema=../../../schema/build.schema.json\n"
        "id: HW-0142\n"
        "date: 2025-03-14\n"
        "status: measured\n"
        "master:\n"
        "  part: MC-750\n"
        "  bore: 7/8 in\n"
        "clutch:\n"
        "  load_curve:\n"
        "    - [0 in, 0 lbf]\n"
        "    - [0.12 in, 380 lbf]\n"
        "pedal:\n"
        "  clevis_positions: [1.9 in, 2.3 in]\n"
        "notes: |\n"
        "  Two lines\n"
        "  of notes.\n"
    )


@pytest.mark.parametrize("value", [
    "yes", "No", "on", "off", "~", "null", "true", "2002", "1.5", "0x1F", "0o17", ".inf", "-.nan",
    "2025-03-14", "1e3", "#1 case", "a: b", "- a", "[x]", "{x}", "&anchor", "*alias", "!tag", "%x",
    "@x", "`x", "'x'", '"x"', " leading", "trailing ", "", "a #b", "tab\there", "bell\x07", "nel\x85",
    "\u2028", "é ü 😀", "3/4 in", "1-1/8 in", ">", "|", "?", ":", "-", "a,b", "a, b",
])
def test_awkward_strings_read_back_as_the_same_string(value):
    # A YAML 1.1 reader (PyYAML) would turn many of these into booleans, numbers, dates or
    # syntax; YAML 1.2 core schema (spec 10.3.2) reads 0o17 as an integer.
    text = dump({"k": value, "list": [value, "x"]})
    assert read_back(text) == {"k": value, "list": [value, "x"]}
    assert yaml.load(text, Loader=Loader) == {"k": value, "list": [value, "x"]}
    if value in ("0o17", "0x1F", "yes", "2002", "2025-03-14"):
        assert f'"{value}"' in text


@pytest.mark.parametrize("value", [
    "one\ntwo", "one\ntwo\n", "one\n\n\n", "  indented first\nsecond", "trailing spaces  \nx  ",
    "\nstarts with a newline", "a\n\tb", "control \x07\nchar",
])
def test_multiline_text_reads_back(value):
    text = dump({"notes": value, "nested": {"notes": value}})
    assert read_back(text) == {"notes": value, "nested": {"notes": value}}


def test_numbers_booleans_dates_and_nothing():
    data = {"i": 3, "f": 1.5, "tiny": 1e-05, "big": 1e20, "t": True, "f2": False, "n": None,
            "d": dt.date(2024, 2, 29), "empty_list": [], "empty_map": {}}
    back = read_back(dump(data))
    assert back == data  # PyYAML reads 2024-02-29 as a date, as it was given


def test_lists_of_mappings_as_a_parts_catalogue_writes_them():
    data = {"kind": "masters", "parts": [{"id": "MC-1", "bore": "3/4 in"}, {"id": "MC-2", "bore": "1 in"}]}
    text = dump(data)
    assert "  - id: MC-1\n    bore: 3/4 in\n" in text
    assert read_back(text) == data


def test_comments_go_after_their_key():
    text = dump({"clutch": {"release_load": "410 lbf"}}, comments={("clutch", "release_load"): "bench press"})
    assert "  release_load: 410 lbf       # bench press\n" in text  # as the demo aligns them
    assert read_back(text) == {"clutch": {"release_load": "410 lbf"}}


def test_values_without_a_yaml_form_are_refused_with_their_place():
    with pytest.raises(UnwritableValue) as caught:
        dump({"a": {"b": {1, 2}}})
    assert caught.value.where == ("a", "b")
    with pytest.raises(UnwritableValue):
        dump({1: "x"})


def test_ordered_follows_the_build_schema():
    data = {"notes": "n", "pedal": {"pad_travel": "6 in", "part": "PD-1"}, "id": "HW-0001", "extra": 1}
    out = ordered(data, schema("build"))
    assert list(out) == ["id", "pedal", "notes", "extra"]
    assert list(out["pedal"]) == ["part", "pad_travel"]


def test_every_demo_record_reads_back_after_a_rewrite():
    # The demo records, loaded by the records Loader, written again and read back by PyYAML.
    for path in sorted((ROOT / "records").rglob("*.yaml")):
        data = yaml.load(path.read_text(encoding="utf-8"), Loader=Loader)
        assert yaml.load(dump(data), Loader=Loader) == data, path


text_values = st.text(st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=30)
keys = st.text(st.characters(codec="utf-8", exclude_categories=("Cs",)), min_size=1, max_size=12)
trees = st.recursive(
    st.one_of(text_values, st.integers(-10**6, 10**6), st.booleans(), st.none()),
    lambda inner: st.one_of(st.lists(inner, max_size=4), st.dictionaries(keys, inner, max_size=4)),
    max_leaves=20,
)


@settings(max_examples=300, deadline=None)
@given(st.dictionaries(keys, trees, min_size=1, max_size=6))
def test_any_plain_data_reads_back(data):
    text = dump(data)
    assert read_back(text) == data
