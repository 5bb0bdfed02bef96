"""The import itself: rows -> records, checked by the records loader, written exclusively.

A row is written only when every cell of it is usable and the record it makes loads through
builder.records exactly as a record written by hand would (catalogue parts, section
combinations, ranges). A build id already in the shop is never overwritten: when the shop's
file is the very record this row makes, the row is skipped (imported before); when it differs,
the row is refused. Rows sharing an id within the sheet are all refused. The valid rows are
written even when others are refused; the refused ones are listed, all at once, to be fixed
and imported again (rows written before are then skipped).

Each file is written to a hidden temporary name in its folder and linked to its real name,
which fails if that name exists, so a record is never half-written or overwritten; it is then
read back through the loader.
"""
from __future__ import annotations

import os
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

from builder import model
from builder.importing.mapping import ImportMap, bind, check_part_defaults, load_map
from builder.importing.problems import CellProblem
from builder.importing.rows import RowReader, RowRecord
from builder.importing.sheet import Sheet, UnknownSheet, read_sheet
from builder.importing.sheet import blank as blank_cell
from builder.problems import InputError, Problem
from builder.records import load_build_file, load_catalogue, load_rules, parse_build
from builder.records._schema import schema
from builder.records.writer import dump, ordered, schema_modeline

YAML_SUFFIXES = (".yaml", ".yml")


@dataclass(frozen=True)
class Outcome:
    """A row that was (or, in a dry run, would be) written, or was skipped."""

    row: int
    id: str
    path: str  # the record's file (for a skipped row: the one already in the shop)


@dataclass
class ImportReport:
    sheet: Sheet
    dry_run: bool
    written: list[Outcome] = field(default_factory=list)  # "would be written" in a dry run
    skipped: list[Outcome] = field(default_factory=list)
    refused: list[CellProblem] = field(default_factory=list)  # every problem of every refused row
    unused_columns: list[str] = field(default_factory=list)
    left_out: list[int] = field(default_factory=list)  # rows with nothing in the map's columns

    @property
    def refused_rows(self) -> list[int]:
        return sorted({problem.row for problem in self.refused})


def import_sheet(sheet_path: str | os.PathLike, map_path: str | os.PathLike, records_dir: str | os.PathLike,
                 dry_run: bool = False) -> ImportReport:
    """Import every row of a spreadsheet into records_dir/builds/<year>/<id>.yaml.

    Raises InputError (nothing written) when the map, the sheet or the shop's rules and catalogue
    cannot be used; otherwise returns what was written, skipped and refused.
    """
    records = Path(records_dir)
    imap = load_map(map_path)
    sheet = _read(sheet_path, imap)
    columns = bind(imap, sheet.headers, sheet.path)
    rules = load_rules(records)
    catalogue = load_catalogue(records)
    problems = check_part_defaults(imap, catalogue)
    if problems:
        raise InputError(problems)
    shop = model.Shop(root=str(records), rules=rules, parts=catalogue)
    reader = RowReader(imap, columns, sheet.headers, catalogue, sheet.path)
    report = ImportReport(sheet, dry_run)
    used = set(columns.values())
    report.unused_columns = [header for index, header in enumerate(sheet.headers) if header and index not in used]

    mapped = sorted(used)
    rows = []
    for row in sheet.rows:  # a totals row or a remark in unmapped columns is not a build
        if all(blank_cell(row.cells[index]) for index in mapped):
            report.left_out.append(row.number)
        else:
            rows.append(reader.read(row))
    _refuse_shared_ids(rows, sheet.path)
    existing = _existing_ids(records / "builds")
    builds_dir = records / "builds"
    for record in rows:
        if record.problems:
            report.refused += record.problems
            continue
        target = builds_dir / str(record.date.year) / f"{record.id}.yaml"
        text = record_text(record.data, target, records)
        if record.id in existing:
            _existing(record, text, existing[record.id], sheet.path, report)
            continue
        problems = _load_problems(record, text, target, shop, sheet.path)
        if not problems and not dry_run:
            problems = _write(record, text, target, builds_dir, shop, sheet.path)
        if problems:
            report.refused += problems
        else:
            report.written.append(Outcome(record.row, record.id, str(target)))
            existing[record.id] = target
    report.refused.sort(key=lambda p: (p.row, p.col, p.field))
    return report


def _read(sheet_path, imap: ImportMap) -> Sheet:
    try:
        return read_sheet(sheet_path, imap.header_row, imap.sheet, imap.delimiter)
    except UnknownSheet as missing:
        raise InputError([imap.problem(("sheet",), f"no worksheet {missing.name!r} in {sheet_path}; it has "
                                                   f"{', '.join(repr(n) for n in missing.available)}")]) from None


def record_text(data: dict, target: Path, records: Path) -> str:
    """The record's YAML: the schema line for an editor first, keys in the build schema's order."""
    return dump(ordered(data, schema("build")), modeline=schema_modeline(target, records))


def _refuse_shared_ids(rows: list[RowRecord], sheet_path: str) -> None:
    by_id: dict[str, list[RowRecord]] = {}
    for record in rows:
        if record.id is not None:
            by_id.setdefault(record.id, []).append(record)
    for build_id, sharing in by_id.items():
        if len(sharing) < 2:
            continue
        for record in sharing:
            others = ", ".join(str(other.row) for other in sharing if other is not record)
            column, header, _ = record.origin["id"]
            record.problems.append(CellProblem(
                sheet_path, record.row, column, "id",
                f"column {header!r}: {build_id} is also the id of row(s) {others}; "
                "no row with this id is imported until each has its own", header))
            record.data = None


def _existing_ids(builds_dir: Path) -> dict[str, Path]:
    """Build id (file name) -> file, for every record under builds/ (hidden names skipped)."""
    found: dict[str, Path] = {}
    for directory, subfolders, names in os.walk(builds_dir):
        subfolders[:] = sorted(name for name in subfolders if not name.startswith("."))
        for name in sorted(names):
            if name.endswith(YAML_SUFFIXES) and not name.startswith("."):
                found.setdefault(Path(name).stem, Path(directory, name))
    return found


def _existing(record: RowRecord, text: str, path: Path, sheet_path: str, report: ImportReport) -> None:
    try:
        same = path.read_bytes() == text.encode("utf-8")
    except OSError:
        same = False
    if same:
        report.skipped.append(Outcome(record.row, record.id, str(path)))
        return
    column, header, _ = record.origin["id"]
    report.refused.append(CellProblem(
        sheet_path, record.row, column, "id",
        f"column {header!r}: {record.id} is already in the shop ({path}) and differs from what this row "
        "makes; nothing written (give the row another id, or leave it out if that record is this build "
        "edited since)", header))


def _load_problems(record: RowRecord, text: str, target: Path, shop: model.Shop, sheet_path: str) -> list[CellProblem]:
    """The loader's verdict on the record text (read as the file `target` would be, without
    writing it anywhere), each problem put on the cell it came from."""
    try:
        parse_build(text, shop.parts, str(target), stem=target.stem, rules=shop.rules)
    except InputError as error:
        return [_on_cell(record, problem, sheet_path) for problem in error.problems]
    return []


def _on_cell(record: RowRecord, problem: Problem, sheet_path: str) -> CellProblem:
    """A loader problem (located in the record text) moved to the row's cell for that field."""
    name = problem.field
    candidates = [name] + [other for other in record.origin if other.startswith(name + ".")]
    parent = name
    while "." in parent:
        parent = parent.rsplit(".", 1)[0]
        candidates.append(parent)
    candidates += [other for other in record.origin if other.startswith(name.split(".", 1)[0] + ".")]
    for candidate in candidates:
        if candidate in record.origin:
            column, header, blank = record.origin[candidate]
            break
    else:
        column, header, blank = 0, "", True
    if column and header:
        where = f"column {header!r}" + (" (blank)" if blank else "")
    elif name in record.origin:
        where = "from the map's defaults"
    else:
        where = "no column of the map gives it"
    return CellProblem(sheet_path, record.row, column, name, f"{where}: {problem.message}", header)


def _write(record: RowRecord, text: str, target: Path, builds_dir: Path, shop: model.Shop,
           sheet_path: str) -> list[CellProblem]:
    """Create `target` with `text`, never replacing anything, then read it back through the loader."""
    column, header, _ = record.origin["id"]

    def refused(message: str) -> list[CellProblem]:
        return [CellProblem(sheet_path, record.row, column, "id", f"column {header!r}: {message}", header)]

    try:
        target.parent.mkdir(parents=True, exist_ok=True)
    except FileExistsError:  # a file, or a link leading nowhere (a loop included), at its name
        return refused(f"{target.parent} is not a folder (a file, or a link that leads nowhere); "
                       "nothing written")
    except OSError as error:
        return refused(f"cannot make the folder {target.parent}: {error.strerror or error}; nothing written")
    try:
        if not target.parent.resolve().is_relative_to(builds_dir.resolve()):
            return refused(f"{target.parent} leads outside {builds_dir} (a link?); nothing written")
        data = text.encode("utf-8")
        _create(target, data)
    except FileExistsError:
        return refused(f"{target} appeared while importing; nothing written")
    except OSError as error:
        return refused(f"cannot write {target}: {error.strerror or error}; nothing written")
    try:
        load_build_file(target, shop)
    except InputError as error:  # never expected: the same text loaded a moment ago
        _remove_own(target, data)
        return [_on_cell(record, problem, sheet_path) for problem in error.problems]
    return []


def _create(target: Path, data: bytes) -> None:
    """Write `data` to a new file `target` whole: a hidden temporary file in the same folder,
    synced, then hard-linked to the real name (fails if the name exists, a link included)."""
    handle, temporary = tempfile.mkstemp(prefix=f".{target.stem}.", suffix=".tmp", dir=target.parent)
    try:
        with os.fdopen(handle, "wb") as out:
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
        try:
            os.link(temporary, target)
        except FileExistsError:
            raise
        except OSError:  # a file system without hard links: exclusive create instead
            with open(target, "xb") as out:
                try:
                    out.write(data)
                    out.flush()
                    os.fsync(out.fileno())
                except OSError:
                    out.close()
                    _remove_own(target, None)
                    raise
    finally:
        os.unlink(temporary)


def _remove_own(target: Path, data: bytes | None) -> None:
    """Remove a file this import has just created: only a regular file, at this very path, and
    (when `data` is given) still holding exactly what was written."""
    try:
        if target.is_symlink() or not target.is_file():
            return
        if data is not None and target.read_bytes() != data:
            return
        os.unlink(target)
    except OSError:
        pass

