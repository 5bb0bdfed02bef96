"""The demo's old spreadsheet: regenerated exactly, imported into a copy of the demo shop.

The counts below (30 rows, 3 slips) are the demo's own design (builder/demo/spreadsheet.py),
not outside facts. Outside references: openpyxl writes the .xlsx copy of the sheet; PyYAML
reads the imported records independently of the records loader; the generator's clean record
texts (written apart from the cells it types) are the expected values of every imported field.
"""
from __future__ import annotations

import csv
import datetime as dt
import io
import json
import shutil
from pathlib import Path

import pytest
import yaml
from click.testing import CliRunner

from builder.demo import spreadsheet as demo_spreadsheet
from builder.cli import main
from clitools import tree_digest

ROOT = Path(__file__).resolve().parents[1]
RECORDS = ROOT / "records"
SHEET = RECORDS / "import" / demo_spreadsheet.SHEET_NAME
MAP = RECORDS / "import" / demo_spreadsheet.MAP_NAME
SLIPS = {9: (14, "master.bore", "unknown unit 'mn'"),
         19: (2, "date", "'31/09/2021' is not a calendar date"),
         30: (13, "master.part", "unknown part 'MC-AZ' in parts/masters.yaml; nearest: MC-A2")}


def run(records: Path, *args: str):
    return CliRunner().invoke(main, ["--records", str(records), *args], catch_exceptions=False)


@pytest.fixture
def shop(tmp_path: Path) -> Path:
    """A copy of the demo shop, schema/ beside it as in a clone."""
    shutil.copytree(RECORDS, tmp_path / "records")
    shutil.copytree(ROOT / "schema", tmp_path / "schema")
    return tmp_path / "records"


@pytest.fixture(scope="module")
def planned():
    """The generator's rows: job -> the clean record it stands for."""
    return {row.job: row for row in demo_spreadsheet.make_rows(RECORDS)}


def imported(shop: Path) -> dict[str, Path]:
    return {path.stem: path for path in (shop / "builds").rglob("OLD-*.yaml")}


def test_generator_reproduces_the_committed_sheet_and_map(tmp_path):
    written = demo_spreadsheet.write_files(tmp_path, RECORDS)
    for path in written:
        committed = RECORDS / "import" / path.name
        assert path.read_bytes() == committed.read_bytes(), (
            f"regenerate with `python -m builder.demo.spreadsheet records/import/ --force`: {path.name}")
    with pytest.raises(FileExistsError):
        demo_spreadsheet.write_files(tmp_path, RECORDS)


def test_the_sheet_is_messy_like_a_real_export():
    raw = SHEET.read_bytes()
    assert raw.startswith(b"\xef\xbb\xbf") and b"\r\n" in raw
    rows = list(csv.reader(io.StringIO(raw[3:].decode("utf-8"), newline="")))
    cells = [cell for row in rows for cell in row]
    for typed in ('7/8"', ".75", "22.2mm", '11 1/4"', "5½\"", "1,650 N", "DOT4", "braided PTFE", "no good"):
        assert typed in cells, typed
    assert any(cell.endswith("#") for cell in cells)  # 35# style efforts
    assert any(row and not any(row) for row in rows)  # a blank row between years
    assert any(row[-1] for row in rows[2:])  # notes running on into the next column
    ids = [int(row[0]) for row in rows[2:] if row and row[0]]
    assert len(ids) == len(set(ids)) == 30
    assert all(not 101 <= job <= 170 for job in ids)  # clear of the demo shop's HW-0101..HW-0170


def test_demo_import_writes_valid_rows_and_lists_the_three_slips(shop, planned):
    result = run(shop, "import", str(SHEET), "--map", str(MAP))
    assert result.exit_code == 1, result.output
    assert "27 written, 0 skipped, 3 refused (rows 9, 19, 30)." in result.output
    assert "not imported (no field in the map): Hours" in result.output
    refused = [line for line in result.stderr.splitlines() if line.startswith(str(SHEET))]
    assert len(refused) == 3
    for line in refused:
        row, column, rest = line[len(str(SHEET)) + 1:].split(":", 2)
        expected_column, field, words = SLIPS[int(row)]
        assert int(column) == expected_column and rest.startswith(f" {field}: ") and words in rest, line
    written = imported(shop)
    assert len(written) == 27
    # each written record sits in its year's folder and holds what the row stood for
    for build_id, path in written.items():
        row = planned[int(build_id.split("-")[1])]
        assert path.parent.name == str(row.date.year)
        text = path.read_text(encoding="utf-8")
        assert text.startswith("# yaml-language-server: $schema=../../../schema/build.schema.json\n")
        data = yaml.safe_load(text)
        assert data["id"] == build_id and data["date"] == row.date and data["status"] == row.status
        for section, values in row.record.items():
            for key, value in values.items():
                assert data[section][key] == value, (build_id, section, key)


def test_imported_records_validate_and_size(shop):
    run(shop, "import", str(SHEET), "--map", str(MAP))
    result = run(shop, "validate")
    assert result.exit_code == 0, result.output
    report = json.loads(run(shop, "report", "--format", "json").output)  # sizes every build
    old = [row for row in report if row["id"].startswith("OLD-")]
    assert len(old) == 27 and all(row["overall_ratio"] > 1 for row in old)
    paths = imported(shop)
    for build_id in ("OLD-0030", "OLD-0022", "OLD-0033"):  # rejected, concentric, inline master
        checked = run(shop, "check", str(paths[build_id]), "--json")
        assert checked.exit_code in (0, 3), checked.output
        contract = json.loads(checked.output)
        assert contract["id"] == build_id and contract["ratios"]["overall"] > 1
        assert contract["effort"]["measured_N"] > 0


def test_a_second_import_adds_nothing(shop):
    run(shop, "import", str(SHEET), "--map", str(MAP))
    before = tree_digest(shop)
    again = run(shop, "import", str(SHEET), "--map", str(MAP))
    assert again.exit_code == 1  # the three slips are still in the sheet
    assert "0 written, 27 skipped, 3 refused" in again.output
    assert tree_digest(shop) == before


def test_dry_run_writes_nothing_and_says_what_it_would_do(shop):
    before = tree_digest(shop)
    result = run(shop, "import", str(SHEET), "--map", str(MAP), "--dry-run")
    assert result.exit_code == 1
    assert "Dry run, nothing written: 27 would be written, 0 skipped, 3 refused" in result.output
    assert result.output.count("would write ") == 27
    assert tree_digest(shop) == before


def test_fixing_the_slips_imports_the_rest(shop, tmp_path):
    run(shop, "import", str(SHEET), "--map", str(MAP))
    fixed = SHEET.read_bytes().replace(b"19.05 mn", b"19.05 mm").replace(b"31/09/2021", b"30/09/2021")
    fixed = fixed.replace(b"MC-AZ", b"MC-A2")
    sheet = tmp_path / "fixed.csv"
    sheet.write_bytes(fixed)
    result = run(shop, "import", str(sheet), "--map", str(MAP))
    assert result.exit_code == 0, result.output
    assert "3 written, 27 skipped, 0 refused." in result.output
    assert run(shop, "validate").exit_code == 0


def _as_typed_in_a_workbook(cell: str, date_format: str):
    """What a spreadsheet program stores for a typed cell: a number, a date or the text."""
    try:
        return dt.datetime.strptime(cell, date_format)
    except ValueError:
        pass
    try:
        number = float(cell)
    except ValueError:
        return cell if cell else None
    if format(number, ".12g") == cell:
        return int(number) if number.is_integer() else number
    return cell  # ".75" or "0.30" stay text, as in a text-formatted column


def test_xlsx_round_trip_gives_byte_identical_records(tmp_path):
    openpyxl = pytest.importorskip("openpyxl")
    rows = list(csv.reader(io.StringIO(SHEET.read_bytes()[3:].decode("utf-8"), newline="")))
    workbook = openpyxl.Workbook()
    sheet = workbook.active
    sheet.title = "Old build book"
    for index, row in enumerate(rows):
        sheet.append([_as_typed_in_a_workbook(cell, "%d/%m/%Y") if index >= 2 else (cell or None) for cell in row])
    sheet.merge_cells(start_row=1, start_column=1, end_row=1, end_column=8)  # the title across the top
    book = tmp_path / "old-builds.xlsx"
    workbook.save(book)
    assert isinstance(openpyxl.load_workbook(book)["Old build book"]["A3"].value, int)

    shops = {}
    for name, source in (("csv", SHEET), ("xlsx", book)):
        shutil.copytree(RECORDS, tmp_path / name / "records")
        shutil.copytree(ROOT / "schema", tmp_path / name / "schema")
        shops[name] = tmp_path / name / "records"
        result = run(shops[name], "import", str(source), "--map", str(MAP))
        assert "27 written, 0 skipped, 3 refused (rows 9, 19, 30)." in result.output, result.output
    from_csv = {p.relative_to(shops["csv"]): p.read_bytes() for p in imported(shops["csv"]).values()}
    from_xlsx = {p.relative_to(shops["xlsx"]): p.read_bytes() for p in imported(shops["xlsx"]).values()}
    assert from_csv == from_xlsx
