"""Reading spreadsheets: CSV encodings and delimiters, .xlsx through openpyxl, bad files.

Outside references: Python's codecs for UTF-8, UTF-16 and Windows-1252 (cp1252) bytes; the
csv module (RFC 4180 quoting) to write the test files; openpyxl to write workbooks.
"""
from __future__ import annotations

import datetime as dt
import sys

import pytest

from builder.importing.problems import MissingExtra
from builder.importing.sheet import UnknownSheet, read_sheet, sniff_delimiter
from builder.problems import InputError

ROWS = [["Job", "Date", "MC bore", "Notes"],
        ["17", "14/03/2021", "7/8", "pushrod at 12°, café racer bracket"],
        ["18", "15/03/2021", "22,2 mm", 'said "fine"; second bleed'],
        ["19", "16/03/2021", "1 1/8\"", "two\nlines"]]


def csv_bytes(rows, delimiter=",", encoding="utf-8", bom=False, newline="\r\n") -> bytes:
    def quote(cell: str) -> str:
        if any(ch in cell for ch in (delimiter, '"', "\n", "\r")):
            return '"' + cell.replace('"', '""') + '"'
        return cell
    text = newline.join(delimiter.join(quote(cell) for cell in row) for row in rows) + newline
    return (b"\xef\xbb\xbf" if bom else b"") + text.encode(encoding)


@pytest.mark.parametrize("delimiter", [",", ";", "\t", "|"])
@pytest.mark.parametrize("encoding, bom, label", [
    ("utf-8", False, "UTF-8"), ("utf-8", True, "UTF-8 with BOM"), ("cp1252", False, "Windows-1252 (cp1252)"),
    ("utf-16", False, "UTF-16"),  # Python's utf-16 codec writes its byte-order mark itself
])
def test_csv_encodings_and_delimiters(tmp_path, delimiter, encoding, bom, label):
    path = tmp_path / "old.csv"
    path.write_bytes(csv_bytes(ROWS, delimiter, encoding, bom))
    sheet = read_sheet(path)
    assert sheet.delimiter == delimiter
    assert sheet.encoding == label
    assert sheet.headers == ROWS[0]
    assert [row.number for row in sheet.rows] == [2, 3, 4]
    assert [list(row.cells) for row in sheet.rows] == ROWS[1:]


def test_rows_are_numbered_as_a_spreadsheet_shows_them(tmp_path):
    rows = [["Old book"], ["Job", "Date"], ["17", "x"], ["", ""], ["18", "y\nstill y"], ["19", "z"]]
    path = tmp_path / "old.csv"
    path.write_bytes(csv_bytes(rows))
    sheet = read_sheet(path, header_row=2)
    assert sheet.headers == ["Job", "Date"]
    # the blank row 4 is left out; the quoted line break does not shift the numbers
    assert [(row.number, row.cells[0]) for row in sheet.rows] == [(3, "17"), (5, "18"), (6, "19")]


def test_short_rows_are_padded_and_trailing_blank_headings_dropped(tmp_path):
    path = tmp_path / "old.csv"
    path.write_bytes(b"Job,Date,,\r\n17\r\n18,x,extra,more\r\n")
    sheet = read_sheet(path)
    assert sheet.headers == ["Job", "Date"]
    assert [row.cells for row in sheet.rows] == [("17", None), ("18", "x")]


def test_the_delimiter_is_the_one_that_splits_the_heading(tmp_path):
    # semicolons inside the comma-separated notes do not fool it, nor commas in a ; sheet
    assert sniff_delimiter("Job,Date,Notes\n1,2,a;b;c;d\n") == ","
    assert sniff_delimiter("Job;Date;Bore\n1;2;22,2 mm\n") == ";"
    assert sniff_delimiter("Job Date Notes\n") is None


@pytest.mark.parametrize("data, words", [
    (b"Job,Date\n17,\x81\x8d\n", ["byte 0x81", "neither UTF-8 nor Windows-1252", "CSV UTF-8"]),
    (b"", ["empty file"]),
    (b"Job,Date\n17,\x00x\n", ["NUL"]),
    (b"\xd0\xcf\x11\xe0rest of an old workbook", [".xls workbook", "save it as .xlsx"]),
    (b"Job Date\n17 x\n", ["cannot tell the delimiter", "delimiter in the map"]),
])
def test_unreadable_csv_is_a_located_problem_not_a_traceback(tmp_path, data, words):
    path = tmp_path / "old.csv"
    path.write_bytes(data)
    with pytest.raises(InputError) as caught:
        read_sheet(path)
    problem = caught.value.problems[0]
    assert problem.path == str(path)
    for word in words:
        assert word in problem.message
    if words[0] == "byte 0x81":
        assert (problem.line, problem.col) == (2, 4)


def test_missing_file_and_folder(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        read_sheet(tmp_path / "nothing.csv")
    with pytest.raises(InputError, match="not a regular file"):
        read_sheet(tmp_path)


def test_xlsx_cells_keep_their_types(tmp_path):
    openpyxl = pytest.importorskip("openpyxl")
    workbook = openpyxl.Workbook()
    sheet = workbook.active
    sheet.title = "Builds"
    sheet.append(["Job", "Date", "MC bore", "Notes", "Notes 2"])
    sheet.append([17, dt.datetime(2021, 3, 14), 0.875, "long note", None])
    sheet.merge_cells("D2:E2")  # a note merged across two columns
    sheet.append([])
    sheet.append([18, "15/03/2021", "22.2mm", "a", "b"])
    workbook.create_sheet("Other").append(["Job", "Date"])
    workbook.create_sheet("Empty")
    path = tmp_path / "old.xlsx"
    workbook.save(path)
    read = read_sheet(path)
    assert read.kind == "xlsx" and read.sheet_name == "Builds"
    assert read.headers == ["Job", "Date", "MC bore", "Notes", "Notes 2"]
    assert [row.number for row in read.rows] == [2, 4]
    assert read.rows[0].cells == (17, dt.datetime(2021, 3, 14), 0.875, "long note", None)
    assert read.rows[1].cells == (18, "15/03/2021", "22.2mm", "a", "b")
    assert read_sheet(path, sheet="Other").rows == []
    with pytest.raises(InputError, match="has 0 rows; the map puts the heading in row 1"):
        read_sheet(path, sheet="Empty")
    with pytest.raises(UnknownSheet) as caught:
        read_sheet(path, sheet="Nope")
    assert caught.value.available == ["Builds", "Other", "Empty"]


def test_a_damaged_workbook_is_a_problem_not_a_traceback(tmp_path):
    pytest.importorskip("openpyxl")
    path = tmp_path / "old.xlsx"
    path.write_bytes(b"PK\x03\x04 not really a zip")
    with pytest.raises(InputError, match="not a readable .xlsx workbook"):
        read_sheet(path)


def test_without_openpyxl_the_message_names_the_extra(tmp_path, monkeypatch):
    path = tmp_path / "old.xlsx"
    path.write_bytes(b"PK\x03\x04")
    monkeypatch.setitem(sys.modules, "openpyxl", None)  # import openpyxl now raises ImportError
    with pytest.raises(MissingExtra) as caught:
        read_sheet(path)
    assert caught.value.package == "openpyxl" and caught.value.extra == "xlsx"
    assert "pip install 'fitment-builder[xlsx]'" in caught.value.problems[0].message
