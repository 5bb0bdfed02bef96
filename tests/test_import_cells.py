"""Cells as people type them, parsed by builder.importing.cells, checked against pint.

Outside references: the pint library (0.25) as the unit registry for every conversion (its
own definitions: inch = 2.54 cm, pound_force = pound * g_0); Python's fractions module for
the exact value of a typed fraction (pint alone reads `1 1/8` as 1 * 1/8, so the magnitude is
computed apart); the shop shorthand `35#` for 35 pounds of force is common practice, no source.
"""
from __future__ import annotations

import datetime as dt
from fractions import Fraction

import pint
import pytest

from builder.importing import cells
from builder.importing.fields import record_fields
from builder.importing.problems import CellError
from builder.units import parse_quantity

UREG = pint.UnitRegistry()
FIELDS = record_fields()


def pint_si(magnitude: Fraction | float, unit: str) -> float:
    """The reference value: pint's `magnitude unit` in SI base units."""
    return UREG.Quantity(float(magnitude), unit).to_base_units().magnitude


@pytest.mark.parametrize("cell, field, column_unit, record, magnitude, pint_unit", [
    ("7/8", "master.bore", "in", "7/8 in", Fraction(7, 8), "inch"),
    (".875", "master.bore", "in", "0.875 in", Fraction(875, 1000), "inch"),
    ("22.2mm", "master.bore", "in", "22.2 mm", Fraction(222, 10), "millimeter"),
    ('1 1/8"', "slave.bore", None, "1 1/8 in", Fraction(9, 8), "inch"),
    ("1-1/16", "slave.bore", "in", "1-1/16 in", Fraction(17, 16), "inch"),
    ('1½"', "slave.bore", None, "1 1/2 in", Fraction(3, 2), "inch"),
    ('5½"', "pedal.pad_travel", None, "5 1/2 in", Fraction(11, 2), "inch"),
    ("35#", "measured.pedal_effort", None, "35 lbf", 35, "pound_force"),
    ("31 lbs", "measured.pedal_effort", None, "31 lbf", 31, "pound_force"),
    ("35", "measured.pedal_effort", "lbf", "35 lbf", 35, "pound_force"),
    ("156N", "measured.pedal_effort", "lbf", "156 N", 156, "newton"),
    ("1.9kN", "clutch.release_load", "lbf", "1.9 kN", Fraction(19, 10), "kilonewton"),
    ("1,650 N", "clutch.release_load", None, "1650 N", 1650, "newton"),
    ("1,200 psi", "master.rated_pressure", None, "1200 psi", 1200, "psi"),
    ("8 MPa", "master.rated_pressure", "psi", "8 MPa", 8, "megapascal"),
    ("1.2m", "line.length", "in", "1.2 m", Fraction(12, 10), "meter"),
    ("48\"", "line.length", None, "48 in", 48, "inch"),
    ("3 ft", "line.length", None, "3 ft", 3, "foot"),
    ("19.05 MM", "master.bore", None, "19.05 mm", Fraction(1905, 100), "millimeter"),
    ("0.75 inch", "master.bore", None, "0.75 in", Fraction(3, 4), "inch"),
    ("22.", "master.bore", "mm", "22 mm", 22, "millimeter"),
])
def test_typed_quantities_match_pint(cell, field, column_unit, record, magnitude, pint_unit):
    spec = FIELDS[field]
    written = cells.quantity(cell, spec, column_unit)
    assert written == record
    # the value a record with this text holds (the records loader's parser) against pint
    assert parse_quantity(written, spec.dimension) == pytest.approx(pint_si(magnitude, pint_unit), rel=1e-12)


def test_workbook_numbers_take_the_column_unit():
    spec = FIELDS["master.bore"]
    assert cells.quantity(0.875, spec, "in") == "0.875 in"
    assert cells.quantity(19.05, spec, "mm") == "19.05 mm"
    assert cells.quantity(1, spec, "in") == "1 in"
    # float noise from a computed cell is not written into the record
    assert cells.quantity(0.1 + 0.2 + 0.575, spec, "in") == "0.875 in"


def test_decimal_comma_when_the_map_says_so():
    spec = FIELDS["master.bore"]
    assert cells.quantity("22,2", spec, "mm", decimal=",") == "22.2 mm"
    with pytest.raises(CellError, match="decimal"):
        cells.quantity("22,2", spec, "mm")


@pytest.mark.parametrize("cell, field, column_unit, words", [
    ("22.2 mn", "master.bore", None, ["unknown unit 'mn'"]),
    ("410 lbf", "master.bore", None, ["expected a length", "which is a force"]),
    ("35#", "master.bore", None, ["expected a length", "35 lbf", "which is a force"]),
    ("35 mm", "measured.pedal_effort", None, ["expected a force", "which is a length"]),
    ("75 in", "master.bore", None, ["outside the plausible range", "master.bore"]),
    ("0 in", "master.bore", None, ["outside the plausible range"]),
    ("-3 mm", "master.bore", None, ["outside the plausible range"]),
    ("0.875", "master.bore", None, ["no unit", "unit:"]),
    ("abc", "master.bore", "in", ["not a number"]),
    ("7/0", "master.bore", "in", ["divides by zero"]),
    ("1 9/8", "master.bore", "in", ["mixed fraction"]),
    ("1e999 mm", "master.bore", None, ["not a finite"]),
])
def test_refused_quantities_say_why(cell, field, column_unit, words):
    with pytest.raises(CellError) as caught:
        cells.quantity(cell, FIELDS[field], column_unit)
    for word in words:
        assert word in caught.value.message


def test_a_spreadsheet_date_in_a_quantity_column_is_explained():
    # a spreadsheet program turns a typed 7/8 into the 8th of July
    with pytest.raises(CellError, match="turns a typed 7/8 into 8 July"):
        cells.quantity(dt.datetime(2021, 7, 8), FIELDS["master.bore"], "in")


def test_choices_forgive_case_spaces_and_underscores():
    assert cells.choice("DOT4", FIELDS["line.fluid"]) == "DOT 4"
    assert cells.choice("dot 5.1", FIELDS["line.fluid"]) == "DOT 5.1"
    assert cells.choice("Braided PTFE", FIELDS["line.hose"]) == "braided_ptfe"
    with pytest.raises(CellError, match="expected one of rubber, braided_ptfe, steel"):
        cells.choice("nylon", FIELDS["line.hose"])


CATALOGUE = {"masters": {"MC-750": None, "MC-700": None, "MC-191": None}, "slaves": {"SC-875": None}}


def test_parts_match_any_case_and_name_the_nearest_ids():
    assert cells.part("mc-750", FIELDS["master.part"], CATALOGUE) == "MC-750"
    with pytest.raises(CellError) as caught:
        cells.part("MC-75O", FIELDS["master.part"], CATALOGUE)
    assert "unknown part 'MC-75O'" in caught.value.message and "nearest: MC-750" in caught.value.message
    with pytest.raises(CellError, match="parts/slaves.yaml, not parts/masters.yaml"):
        cells.part("SC-875", FIELDS["master.part"], CATALOGUE)


def test_build_ids_from_job_numbers():
    assert cells.build_id("17", "OLD-", 4) == "OLD-0017"
    assert cells.build_id(17.0, "OLD-", 4) == "OLD-0017"  # a workbook number
    assert cells.build_id("old-0017", None, None) == "OLD-0017"
    with pytest.raises(CellError, match="no prefix"):
        cells.build_id("17", None, None)
    with pytest.raises(CellError, match="does not make a build id"):
        cells.build_id("17a", "OLD-", 4)
    with pytest.raises(CellError, match="does not make a build id"):
        cells.build_id("1234567", "OLD-", 4)  # seven digits: the id pattern allows six


def test_dates_in_the_maps_format_or_from_a_workbook():
    assert cells.date("14/03/2021", ("%d/%m/%Y",)) == dt.date(2021, 3, 14)
    assert cells.date(dt.datetime(2021, 3, 14), ("%d/%m/%Y",)) == dt.date(2021, 3, 14)
    with pytest.raises(CellError, match="not a calendar date in the form %d/%m/%Y"):
        cells.date("31/09/2021", ("%d/%m/%Y",))  # September has 30 days
    with pytest.raises(CellError, match="not a date"):
        cells.date(44270, ("%d/%m/%Y",))


def test_text_cells_keep_their_words_and_lose_carriage_returns():
    assert cells.text("  two\r\nlines\rhere  ") == "two\nlines\nhere"
    assert cells.text(dt.datetime(2021, 3, 14)) == "2021-03-14"
    assert cells.text(142.0) == "142" and cells.text(0.30000000000000004) == "0.3"
