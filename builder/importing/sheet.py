"""Reading a spreadsheet of past builds: CSV (delimiter and encoding found) or .xlsx.

CSV: UTF-8 with or without a byte-order mark, UTF-16 with one (a spreadsheet program's
"Unicode text"), or the Windows code page cp1252 that older exports use; the delimiter is
the one of `, ; tab |` that splits the heading row into the most columns consistently.
.xlsx needs openpyxl (the optional extra `fitment-builder[xlsx]`); the first worksheet is
read unless the map names another. Rows are numbered as a spreadsheet program numbers them,
counting the heading row; rows with nothing in them are left out.
"""
from __future__ import annotations

import csv
import io
import os
from dataclasses import dataclass, field
from pathlib import Path

from builder.importing.problems import MissingExtra
from builder.problems import InputError, Problem

MAX_BYTES = 32 * 1024 * 1024  # a shop's history is a few hundred kilobytes
MAX_ROWS = 100_000
MAX_COLUMNS = 1_000
DELIMITERS = (",", ";", "\t", "|")
_DELIMITER_NAMES = {",": "comma", ";": "semicolon", "\t": "tab", "|": "bar"}
_SNIFF_ROWS = 50
_XLSX_SUFFIXES = (".xlsx", ".xlsm")
_ZIP_MAGIC = b"PK\x03\x04"
_OLE_MAGIC = b"\xd0\xcf\x11\xe0"  # the old binary .xls


@dataclass(frozen=True, slots=True)
class Row:
    number: int  # as a spreadsheet program shows it (the heading row counts)
    cells: tuple  # str for CSV; str, int, float, bool, datetime, date, time or None for .xlsx


@dataclass
class Sheet:
    path: str
    headers: list[str]
    header_row: int
    rows: list[Row] = field(default_factory=list)
    kind: str = "csv"  # "csv" | "xlsx"
    encoding: str | None = None  # CSV only
    delimiter: str | None = None  # CSV only
    sheet_name: str | None = None  # .xlsx only

    def describe(self) -> str:
        """"CSV, UTF-8, semicolon-separated" or "xlsx, sheet Builds"."""
        if self.kind == "csv":
            return f"CSV, {self.encoding}, {_DELIMITER_NAMES.get(self.delimiter, self.delimiter)}-separated"
        return f"xlsx, sheet {self.sheet_name}"


class UnknownSheet(Exception):
    """The map names a worksheet the workbook does not have."""

    def __init__(self, name: str, available: list[str]):
        super().__init__(name)
        self.name = name
        self.available = available


def _problem(path: str, message: str, line: int = 0, col: int = 0) -> InputError:
    return InputError([Problem(path, line, col, "file", message)])


def read_sheet(path: str | os.PathLike, header_row: int = 1, sheet: str | None = None,
               delimiter: str | None = None) -> Sheet:
    """The heading and rows of a CSV or .xlsx file; InputError (MissingExtra for a missing
    openpyxl) when it cannot be read, UnknownSheet for a worksheet name not in it."""
    path = Path(path)
    shown = str(path)
    try:
        size = path.stat().st_size
        if not path.is_file():
            raise _problem(shown, "not a regular file")
        with path.open("rb") as handle:
            head = handle.read(8)
    except FileNotFoundError:
        raise _problem(shown, "no such file") from None
    except OSError as error:
        raise _problem(shown, f"cannot read: {error.strerror or error}") from None
    if size > MAX_BYTES:
        raise _problem(shown, f"file is {size} bytes; a sheet of past builds is limited to {MAX_BYTES} bytes")
    if head.startswith(_OLE_MAGIC):
        raise _problem(shown, "an old binary .xls workbook cannot be read; save it as .xlsx or as CSV")
    if path.suffix.lower() in _XLSX_SUFFIXES or head.startswith(_ZIP_MAGIC):
        return _read_xlsx(path, header_row, sheet)
    if path.suffix.lower() in (".xls", ".ods", ".numbers"):
        raise _problem(shown, f"a {path.suffix} file cannot be read; save it as .xlsx or as CSV")
    return _read_csv(path, header_row, delimiter)


def _decode(raw: bytes, shown: str) -> tuple[str, str]:
    """(text, encoding name) of CSV bytes."""
    if raw.startswith(b"\xef\xbb\xbf"):
        raw, encodings = raw[3:], ("utf-8",)
        label = "UTF-8 with BOM"
    elif raw.startswith((b"\xff\xfe", b"\xfe\xff")):
        encodings, label = ("utf-16",), "UTF-16"
    else:
        encodings, label = ("utf-8", "cp1252"), None
    first_error = None
    for encoding in encodings:
        try:
            return raw.decode(encoding), label or {"utf-8": "UTF-8", "cp1252": "Windows-1252 (cp1252)"}[encoding]
        except UnicodeDecodeError as error:
            first_error = first_error or error
    if encodings == ("utf-16",):
        raise _problem(shown, "starts with a UTF-16 byte-order mark but is not UTF-16 text")
    position = first_error.start
    line = raw.count(b"\n", 0, position) + 1
    col = position - (raw.rfind(b"\n", 0, position) + 1) + 1
    raise _problem(shown, f"byte 0x{raw[position]:02x} is neither UTF-8 nor Windows-1252 (cp1252) text; "
                          "save the sheet as CSV UTF-8", line, col)


def _records(text: str, delimiter: str, limit: int | None = None) -> list[list[str]]:
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter, strict=False)
    rows = []
    for row in reader:
        rows.append(row)
        if limit is not None and len(rows) >= limit:
            break
        if len(rows) > MAX_ROWS + 1:
            raise ValueError(f"more than {MAX_ROWS} rows")
    return rows


def sniff_delimiter(text: str, header_row: int = 1) -> str | None:
    """The delimiter among , ; tab | that splits the heading row into the most columns and the
    rows after it into as many; None when none splits the heading at all."""
    best, best_score = None, None
    for candidate in DELIMITERS:
        try:
            rows = _records(text, candidate, header_row + _SNIFF_ROWS)
        except (csv.Error, ValueError):
            continue
        if len(rows) < header_row:
            continue
        width = len(rows[header_row - 1])
        if width < 2:
            continue
        body = [row for row in rows[header_row:] if any(cell.strip() for cell in row)]
        agreeing = sum(len(row) == width for row in body) / len(body) if body else 1.0
        score = (agreeing, width)
        if best_score is None or score > best_score:
            best, best_score = candidate, score
    return best


def _read_csv(path: Path, header_row: int, delimiter: str | None) -> Sheet:
    shown = str(path)
    try:
        raw = path.read_bytes()
    except OSError as error:
        raise _problem(shown, f"cannot read: {error.strerror or error}") from None
    text, encoding = _decode(raw, shown)
    if "\x00" in text:
        line = text.count("\n", 0, text.index("\x00")) + 1
        raise _problem(shown, "holds NUL characters: not a text file (a workbook saved under a .csv name?)", line)
    if not text.strip():
        raise _problem(shown, "empty file", 1, 1)
    chosen = delimiter or sniff_delimiter(text, header_row)
    if chosen is None:
        raise _problem(shown, f"cannot tell the delimiter: row {header_row} (the heading) does not split into "
                              "columns at a comma, semicolon, tab or bar; give delimiter in the map", header_row)
    try:
        rows = _records(text, chosen)
    except csv.Error as error:
        raise _problem(shown, f"not readable as CSV: {error}") from None
    except ValueError as error:
        raise _problem(shown, f"{error}; split the sheet") from None
    sheet = _sheet(shown, rows, header_row, "csv")
    sheet.encoding, sheet.delimiter = encoding, chosen
    return sheet


def _sheet(shown: str, rows: list[list], header_row: int, kind: str) -> Sheet:
    if len(rows) < header_row:
        raise _problem(shown, f"has {len(rows)} rows; the map puts the heading in row {header_row}")
    headers = ["" if cell is None else str(cell).strip() for cell in rows[header_row - 1]]
    while headers and not headers[-1]:
        headers.pop()
    if len(headers) > MAX_COLUMNS:
        raise _problem(shown, f"the heading row has {len(headers)} columns; at most {MAX_COLUMNS} are read")
    width = len(headers)
    sheet = Sheet(shown, headers, header_row, kind=kind)
    for number, cells in enumerate(rows[header_row:], header_row + 1):
        cells = tuple(cells[:width]) + (None,) * (width - len(cells))
        if any(not blank(cell) for cell in cells):
            sheet.rows.append(Row(number, cells))
    return sheet


def blank(cell: object) -> bool:
    """An empty cell: nothing, or text of spaces only."""
    return cell is None or (isinstance(cell, str) and not cell.strip())


def _read_xlsx(path: Path, header_row: int, name: str | None) -> Sheet:
    shown = str(path)
    try:
        import openpyxl
    except ImportError:
        raise MissingExtra(shown, "openpyxl", "xlsx", "reading an .xlsx workbook") from None
    import warnings

    try:
        with warnings.catch_warnings():  # openpyxl warns about styles and extensions it ignores
            warnings.simplefilter("ignore")
            workbook = openpyxl.load_workbook(path, read_only=True, data_only=True)
    except Exception as error:  # openpyxl raises its own kinds for a damaged workbook
        raise _problem(shown, f"not a readable .xlsx workbook ({type(error).__name__}: {error})") from None
    try:
        names = workbook.sheetnames
        if name is not None and name not in names:
            raise UnknownSheet(name, names)
        worksheet = workbook[name] if name is not None else workbook.worksheets[0]
        rows = []
        try:
            for values in worksheet.iter_rows(min_row=1, values_only=True):
                rows.append(list(values))
                if len(rows) > MAX_ROWS + header_row:
                    raise _problem(shown, f"more than {MAX_ROWS} rows; split the sheet")
        except InputError:
            raise
        except Exception as error:  # a damaged sheet part
            raise _problem(shown, f"worksheet {worksheet.title!r} cannot be read ({type(error).__name__}: {error})") from None
        sheet = _sheet(shown, rows, header_row, "xlsx")
        sheet.sheet_name = worksheet.title
        return sheet
    finally:
        workbook.close()
