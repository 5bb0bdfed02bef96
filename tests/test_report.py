"""builder.report.render: CSV cells a spreadsheet would run as a formula are made text.

Outside reference: OWASP, "CSV Injection" (cells starting with =, +, -, @, tab or carriage
return are read as formulas; prefix them with a single quote). The expected cells below are
written out by hand from that rule, and read back with Python's csv module (RFC 4180).
"""
from __future__ import annotations

import csv
import io
import json

import pytest

from builder.report import render


@pytest.mark.parametrize("text", ["=1+1", "+1+1", "-1+1", "@SUM(A1)", "\t=1+1", "\r=1+1"])
def test_a_formula_cell_is_quoted_as_text(text):
    rows = [{"id": "TG-0101", "family": text, "travel_margin_pct": -37.0}]
    read = list(csv.reader(io.StringIO(render(rows, "csv"), newline="")))
    assert read == [["id", "family", "travel_margin_pct"], ["TG-0101", "'" + text, "-37.0"]]


def test_plain_text_numbers_and_json_are_left_as_they_are():
    rows = [{"id": "TG-0101", "family": "QX-5", "margin": -0.5, "flags": None}]
    assert render(rows, "csv") == "id,family,margin,flags\r\nTG-0101,QX-5,-0.5,\r\n"
    assert json.loads(render([{"family": "=1+1"}], "json")) == [{"family": "=1+1"}]
