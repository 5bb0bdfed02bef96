"""`fitment import` end to end on small sheets made here: every broken cell kind refused with
its row and column, nothing written for a refused row, encodings and delimiters, exit codes,
and no traceback for any bad input.

Outside references: Python's codecs write the cp1252, UTF-8-with-BOM and UTF-16 files; PyYAML
reads the written records; the pint library checks the two shorthand cells (`35#` as pounds
of force is common practice, no source).
"""
from __future__ import annotations

import csv
import io
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pint
import pytest
import yaml
from click.testing import CliRunner

from builder.cli import main
from builder.units import parse_quantity
from clitools import tree_digest

ROOT = Path(__file__).resolve().parents[1]
UREG = pint.UnitRegistry()
HEADERS = ["Job", "Date", "Result", "Box", "Fork", "Load", "Travel", "Slave arm", "Bearing arm", "MC",
           "MC bore", "MC stroke", "SC bore", "SC stroke", "Line", "Pad arm", "Clevis", "Pad travel",
           "Effort", "Notes"]
GOOD = {"Job": "17", "Date": "14/03/2021", "Result": "OK", "Box": "QX-5", "Fork": "rwd", "Load": "410",
        "Travel": "0.30", "Slave arm": "5.6", "Bearing arm": "2.8", "MC": "", "MC bore": "3/4",
        "MC stroke": "1.4", "SC bore": '1 1/8"', "SC stroke": "1.1", "Line": "38", "Pad arm": "11.25",
        "Clevis": "2.1", "Pad travel": "6", "Effort": "35#", "Notes": "first"}
MAP = """\
id: {column: "Job", prefix: "OLD-", digits: 4}
date: {column: "Date", format: "%d/%m/%Y"}
status: {column: "Result", values: {OK: verified, "": measured}}
fields:
  gearbox.family: Box
  gearbox.fork_tip_moves: {column: Fork, values: {fwd: forward, rwd: rearward}}
  clutch.release_load: {column: Load, unit: lbf}
  clutch.release_travel: {column: Travel, unit: in}
  fork.pivot_to_slave: {column: Slave arm, unit: in}
  fork.pivot_to_bearing: {column: Bearing arm, unit: in}
  master.part: MC
  master.bore: {column: MC bore, unit: in}
  master.stroke: {column: MC stroke, unit: in}
  slave.bore: {column: SC bore, unit: in}
  slave.stroke: {column: SC stroke, unit: in}
  line.length: {column: Line, unit: in}
  pedal.pivot_to_pad: {column: Pad arm, unit: in}
  pedal.pivot_to_clevis: {column: Clevis, unit: in}
  pedal.pad_travel: {column: Pad travel, unit: in}
  measured.pedal_effort: {column: Effort, unit: lbf}
  notes: Notes
defaults:
  clutch.clearance: 0.06 in
  slave.kind: external
  line.hose: braided_ptfe
  line.fluid: DOT 4
"""


def column(name: str) -> int:
    return HEADERS.index(name) + 1


def sheet_text(*rows: dict, delimiter: str = ",") -> str:
    out = io.StringIO(newline="")
    writer = csv.writer(out, delimiter=delimiter, lineterminator="\r\n")
    writer.writerow(HEADERS)
    writer.writerows([[values[header] for header in HEADERS] for values in rows])
    return out.getvalue()


def row(**changes: str) -> dict:
    return {**GOOD, **{key.replace("_", " "): value for key, value in changes.items()}}


@pytest.fixture
def shop(tmp_path: Path) -> Path:
    shutil.copytree(ROOT / "records", tmp_path / "records", ignore=shutil.ignore_patterns("import"))
    shutil.copytree(ROOT / "schema", tmp_path / "schema")
    (tmp_path / "map.yaml").write_text(MAP, encoding="utf-8")
    return tmp_path / "records"


def run(shop: Path, sheet: Path, *extra: str, map_file: Path | None = None):
    map_file = map_file or shop.parent / "map.yaml"
    return CliRunner().invoke(main, ["--records", str(shop), "import", str(sheet), "--map", str(map_file), *extra],
                              catch_exceptions=False)


def write_sheet(shop: Path, text: str, name: str = "old.csv", encoding: str = "utf-8", bom: bool = False) -> Path:
    path = shop.parent / name
    path.write_bytes((b"\xef\xbb\xbf" if bom else b"") + text.encode(encoding))
    return path


def refused_lines(result, sheet: Path) -> list[tuple[int, int, str, str]]:
    """(row, column, field, message) of every FILE:row:column: field: message line."""
    found = []
    for line in result.stderr.splitlines():
        if line.startswith(f"{sheet}:"):
            row_text, column_text, field, message = line[len(str(sheet)) + 1:].split(":", 3)
            found.append((int(row_text), int(column_text), field.strip(), message.strip()))
    return found


def test_a_good_row_is_written_and_its_shorthand_cells_match_pint(shop):
    sheet = write_sheet(shop, sheet_text(row()))
    result = run(shop, sheet)
    assert result.exit_code == 0, result.output
    assert "1 written, 0 skipped, 0 refused." in result.output
    record = yaml.safe_load((shop / "builds" / "2021" / "OLD-0017.yaml").read_text())
    assert record["measured"]["pedal_effort"] == "35 lbf"
    assert record["slave"]["bore"] == "1 1/8 in"
    # pint: 35 pound_force and 1.125 inch (the fraction's value computed apart, pint reads
    # `1 1/8` as 1 * 1/8)
    assert parse_quantity("35 lbf", "force") == pytest.approx(UREG.Quantity(35, "pound_force").to("N").magnitude)
    assert parse_quantity("1 1/8 in", "length") == pytest.approx(UREG.Quantity(1.125, "inch").to("m").magnitude)


@pytest.mark.parametrize("changes, header, field, words", [
    ({"MC_bore": "19.05 mn"}, "MC bore", "master.bore", ["unknown unit 'mn'"]),
    ({"MC_bore": "410 lbf"}, "MC bore", "master.bore", ["expected a length", "which is a force"]),
    ({"Effort": "35 mm"}, "Effort", "measured.pedal_effort", ["expected a force", "which is a length"]),
    ({"MC_bore": "75"}, "MC bore", "master.bore", ["outside the plausible range"]),
    ({"Date": "31/02/2021"}, "Date", "date", ["not a calendar date in the form %d/%m/%Y"]),
    ({"Date": ""}, "Date", "date", ["blank"]),
    ({"MC": "MC-AZ", "MC_bore": "", "MC_stroke": ""}, "MC", "master.part",
     ["unknown part 'MC-AZ'", "nearest: MC-A2"]),
    ({"Job": "17a"}, "Job", "id", ["does not make a build id"]),
    ({"Fork": "sideways"}, "Fork", "gearbox.fork_tip_moves", ["expected one of forward, rearward, none"]),
    # the records loader's own checks, put back on the row's cells
    ({"Effort": ""}, "Result", "status", ["needs a measured section"]),
    ({"Slave_arm": "", "Bearing_arm": ""}, "Slave arm", "fork", ["add a fork section"]),
    ({"MC_stroke": ""}, "MC stroke", "master.stroke", ["(blank)", "missing key 'stroke'"]),
])
def test_each_broken_cell_kind_is_refused_with_its_row_and_column(shop, changes, header, field, words):
    sheet = write_sheet(shop, sheet_text(row(Job="16"), row(**{"Job": "17", **changes}), row(Job="18")))
    result = run(shop, sheet)
    assert result.exit_code == 1, result.output
    problems = refused_lines(result, sheet)
    assert problems, result.output
    row_number, column_number, found_field, message = problems[0]
    assert (row_number, column_number, found_field) == (3, column(header), field), problems
    for word in words:
        assert word in message, message
    # nothing written for the refused row; the good rows on either side are written
    written = sorted(path.stem for path in (shop / "builds").rglob("OLD-*.yaml"))
    assert written == ["OLD-0016", "OLD-0018"]
    assert "2 written, 0 skipped, 1 refused (rows 3)." in result.output


def test_all_refused_cells_of_all_rows_are_listed_at_once(shop):
    sheet = write_sheet(shop, sheet_text(row(Job="16", MC_bore="1 mn", Effort="3 mm"), row(Job="17", Date="x")))
    result = run(shop, sheet)
    problems = refused_lines(result, sheet)
    assert [(p[0], p[2]) for p in problems] == [(2, "master.bore"), (2, "measured.pedal_effort"), (3, "date")]
    assert not list((shop / "builds").rglob("OLD-*.yaml"))


def test_a_duplicate_id_within_the_sheet_refuses_every_row_that_shares_it(shop):
    sheet = write_sheet(shop, sheet_text(row(Job="17"), row(Job="18"), row(Job="17", Notes="other")))
    result = run(shop, sheet)
    assert result.exit_code == 1
    problems = refused_lines(result, sheet)
    assert [(p[0], p[1], p[2]) for p in problems] == [(2, 1, "id"), (4, 1, "id")]
    assert "also the id of row(s) 4" in problems[0][3]
    assert sorted(p.stem for p in (shop / "builds").rglob("OLD-*.yaml")) == ["OLD-0018"]


def test_an_id_the_shop_has_with_other_content_is_refused_and_never_overwritten(shop):
    existing = next((shop / "builds").rglob("HW-0142.yaml"))
    before = existing.read_bytes()
    hw_map = shop.parent / "hw-map.yaml"
    hw_map.write_text(MAP.replace('prefix: "OLD-"', 'prefix: "HW-"'), encoding="utf-8")
    sheet = write_sheet(shop, sheet_text(row(Job="142")))
    result = run(shop, sheet, map_file=hw_map)
    assert result.exit_code == 1
    problems = refused_lines(result, sheet)
    assert [(p[0], p[1], p[2]) for p in problems] == [(2, 1, "id")]
    assert "already in the shop" in problems[0][3] and "differs" in problems[0][3]
    assert existing.read_bytes() == before
    assert len(list((shop / "builds").rglob("HW-0142.yaml"))) == 1


def test_the_same_row_imported_again_is_skipped(shop):
    sheet = write_sheet(shop, sheet_text(row()))
    assert run(shop, sheet).exit_code == 0
    before = tree_digest(shop)
    again = run(shop, sheet)
    assert again.exit_code == 0
    assert "0 written, 1 skipped, 0 refused." in again.output
    assert tree_digest(shop) == before


def test_dry_run_writes_nothing(shop):
    sheet = write_sheet(shop, sheet_text(row(), row(Job="18", MC_bore="1 mn")))
    before = tree_digest(shop)
    result = run(shop, sheet, "--dry-run")
    assert result.exit_code == 1
    assert "would write " in result.output and "Dry run, nothing written: 1 would be written" in result.output
    assert tree_digest(shop) == before


def test_a_dry_run_refuses_a_row_the_records_loader_refuses(shop):
    # the loader's own check (status measured needs a measured section) decides a dry run too
    sheet = write_sheet(shop, sheet_text(row(Job="16"), row(Job="17", Effort="")))
    before = tree_digest(shop)
    result = run(shop, sheet, "--dry-run")
    assert result.exit_code == 1, result.output
    problems = refused_lines(result, sheet)
    assert [(p[0], p[1], p[2]) for p in problems] == [(3, column("Result"), "status")]
    assert "needs a measured section" in problems[0][3]
    assert "Dry run, nothing written: 1 would be written" in result.output
    assert tree_digest(shop) == before


@pytest.mark.parametrize("encoding, bom, delimiter", [
    ("cp1252", False, ","), ("cp1252", False, ";"), ("utf-8", True, ","), ("utf-8", True, ";"),
    ("utf-8", False, "\t"), ("utf-8", False, "|"), ("utf-16", False, "\t"),
])
def test_exports_in_other_encodings_and_delimiters_give_the_same_record(shop, encoding, bom, delimiter):
    reference = write_sheet(shop, sheet_text(row(Notes="pushrod at 12°, café bracket")), name="ref.csv")
    assert run(shop, reference).exit_code == 0
    path = next((shop / "builds").rglob("OLD-0017.yaml"))
    expected = path.read_bytes()
    path.unlink()
    assert "pushrod at 12°, café bracket" in expected.decode("utf-8")
    text = sheet_text(row(Notes="pushrod at 12°, café bracket"), delimiter=delimiter)
    sheet = write_sheet(shop, text, name="export.csv", encoding=encoding, bom=bom)
    result = run(shop, sheet)
    assert result.exit_code == 0, result.output
    assert path.read_bytes() == expected


def test_decimal_commas_with_a_semicolon_export(shop):
    (shop.parent / "comma-map.yaml").write_text('decimal: ","\n' + MAP, encoding="utf-8")
    sheet = write_sheet(shop, sheet_text(row(Travel="0,30", MC_bore="19,05 mm"), delimiter=";"), encoding="cp1252")
    result = run(shop, sheet, map_file=shop.parent / "comma-map.yaml")
    assert result.exit_code == 0, result.output
    record = yaml.safe_load(next((shop / "builds").rglob("OLD-0017.yaml")).read_text())
    assert record["clutch"]["release_travel"] == "0.30 in" and record["master"]["bore"] == "19.05 mm"


@pytest.mark.parametrize("setup, words", [
    (lambda d: (d / "old.csv").write_bytes(b"Job,Date\r\n17,\x81\r\n"), ["neither UTF-8 nor Windows-1252"]),
    (lambda d: ((d / "old.csv").unlink(), (d / "old.csv").mkdir()), ["not a regular file"]),
    (lambda d: (d / "old.csv").unlink(), ["old.csv", "no such file"]),
    (lambda d: (d / "map.yaml").write_text("id: [\n"), ["map.yaml:", "YAML"]),
    (lambda d: (d / "map.yaml").write_text(MAP.replace("Pad arm", "Pad Arms")), ["no column 'Pad Arms'"]),
    (lambda d: (d / "map.yaml").write_text(MAP + "sheet: Builds\n"), []),  # a CSV ignores sheet
    (lambda d: (d / "map.yaml").write_text(MAP.replace("master.part", "master.parts")),
     ["no record field 'master.parts'", "master.part"]),
    (lambda d: (d / "records" / "shop.yaml").unlink(), ["shop.yaml", "no such file"]),
])
def test_bad_input_exits_1_with_located_problems_and_no_traceback(shop, setup, words):
    folder = shop.parent
    sheet = folder / "old.csv"
    sheet.write_text(sheet_text(row()))
    setup(folder)
    result = run(shop, sheet)
    if not words:
        assert result.exit_code == 0, result.output
        return
    assert result.exit_code == 1, result.output
    assert "Traceback" not in result.output
    for word in words:
        assert word in result.stderr, result.stderr


def test_an_unknown_worksheet_is_located_in_the_map(shop):
    openpyxl = pytest.importorskip("openpyxl")
    workbook = openpyxl.Workbook()
    workbook.active.append(HEADERS)
    book = shop.parent / "old.xlsx"
    workbook.save(book)
    (shop.parent / "map.yaml").write_text(MAP + "sheet: Builds\n")
    result = run(shop, book)
    assert result.exit_code == 1
    line = len(MAP.splitlines()) + 1
    assert f"map.yaml:{line}:8: sheet: no worksheet 'Builds'" in result.stderr


def test_usage_errors_exit_2(shop):
    sheet = write_sheet(shop, sheet_text(row()))
    result = CliRunner().invoke(main, ["--records", str(shop), "import", str(sheet)])
    assert result.exit_code == 2 and "--map" in result.output
    result = CliRunner().invoke(main, ["--records", str(shop), "import", str(sheet), "--map", "m", "--bogus"])
    assert result.exit_code == 2


def test_a_real_process_prints_no_traceback_for_a_bad_workbook(shop):
    book = shop.parent / "old.xlsx"
    book.write_bytes(b"PK\x03\x04 damaged")
    result = subprocess.run([sys.executable, "-m", "builder.cli", "--records", str(shop), "import", str(book),
                             "--map", str(shop.parent / "map.yaml")], capture_output=True, text=True,
                            env={**os.environ, "PYTHONPATH": str(ROOT)})
    assert result.returncode == 1
    assert "Traceback" not in result.stderr and "not a readable .xlsx workbook" in result.stderr


def test_a_file_planted_at_the_target_is_never_replaced(shop, monkeypatch):
    sheet = write_sheet(shop, sheet_text(row()))
    target = shop / "builds" / "2021" / "OLD-0017.yaml"
    # another process creates the file between the import's checks and its write
    from builder.importing import write as writing

    real_create = writing._create

    def racing(path, data):
        path.write_text("planted\n")
        return real_create(path, data)

    monkeypatch.setattr(writing, "_create", racing)
    result = run(shop, sheet)
    assert result.exit_code == 1
    assert "appeared while importing; nothing written" in result.stderr
    assert target.read_text() == "planted\n"
    assert not [p for p in target.parent.iterdir() if p.name.startswith(".")]  # no temporary left


def test_a_link_planted_at_the_target_is_left_alone(shop, tmp_path):
    outside = tmp_path / "outside.yaml"
    outside.write_text("not a record\n")
    target = shop / "builds" / "2021" / "OLD-0017.yaml"
    target.parent.mkdir(parents=True, exist_ok=True)
    target.symlink_to(outside)
    sheet = write_sheet(shop, sheet_text(row()))
    result = run(shop, sheet)
    assert result.exit_code == 1
    assert [p[2] for p in refused_lines(result, sheet)] == ["id"]
    assert target.is_symlink() and outside.read_text() == "not a record\n"


def test_a_year_folder_leading_outside_the_shop_is_not_written_into(shop, tmp_path):
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    (shop / "builds" / "2021").symlink_to(elsewhere, target_is_directory=True)
    sheet = write_sheet(shop, sheet_text(row()))
    result = run(shop, sheet)
    assert result.exit_code == 1
    assert "leads outside" in result.stderr
    assert list(elsewhere.iterdir()) == []


def test_a_row_with_nothing_in_the_maps_columns_is_left_out(shop):
    sheet = write_sheet(shop, sheet_text(row()) + "," * (len(HEADERS) - 1) + "total: 1 build\r\n")
    (shop.parent / "map.yaml").write_text(MAP.replace("  notes: Notes\n", ""))
    result = run(shop, sheet)
    assert result.exit_code == 0, result.output
    assert "left out (nothing in the map's columns): row 3" in result.output


def test_a_year_folder_that_is_a_loop_of_links_is_refused_without_a_traceback(shop):
    year = shop / "builds" / "2021"
    loop = shop / "builds" / "loop"
    year.symlink_to(loop)
    loop.symlink_to(year)
    sheet = write_sheet(shop, sheet_text(row()))
    result = run(shop, sheet)
    assert result.exit_code == 1, result.output
    assert [(p[0], p[2]) for p in refused_lines(result, sheet)] == [(2, "id")], result.output
    assert "2021 is not a folder" in result.stderr and "appeared" not in result.stderr
    assert year.is_symlink() and loop.is_symlink()
