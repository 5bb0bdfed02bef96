"""Cells as people type them -> values written as a record writes them.

Quantities: `7/8`, `.875`, `22.2mm`, `1 1/8"`, `1-1/8 in`, `35#` (pounds of force), `1,200 psi`,
`1½"`; a bare number takes the unit the map gives its column. The magnitude is kept as typed
(a fraction stays a fraction) and the unit is written the way records spell it, so `1 1/8"`
becomes `1 1/8 in` and `35#` becomes `35 lbf`. builder.units (pint behind it) decides what a
unit is and what it is worth; every value is checked against the field's plausible range.

Every parser raises CellError with a message for the person fixing the sheet.
"""
from __future__ import annotations

import datetime as _dt
import math
import re

from builder import units
from builder.importing.fields import FieldSpec
from builder.importing.problems import CellError
from builder.model import BUILD_ID_PATTERN
from builder.presentation import quantity as show
from builder.problems import nearest
from builder.units import DIMENSIONS, QuantityError, parse_quantity

# How a unit is typed (case-folded) -> how a record spells it. Others go to builder.units as typed.
UNIT_ALIASES: dict[str, str] = {
    '"': "in", "''": "in", "in": "in", "in.": "in", "inch": "in", "inches": "in", "ins": "in",
    "'": "ft", "ft": "ft", "ft.": "ft", "foot": "ft", "feet": "ft",
    "mm": "mm", "cm": "cm", "m": "m",
    "#": "lbf", "lb": "lbf", "lb.": "lbf", "lbs": "lbf", "lbs.": "lbf", "lbf": "lbf",
    "pound": "lbf", "pounds": "lbf",
    "n": "N", "newton": "N", "newtons": "N", "kn": "kN",
    "psi": "psi", "bar": "bar", "kpa": "kPa", "mpa": "MPa", "pa": "Pa",
    "deg": "deg", "°": "deg", "degree": "deg", "degrees": "deg",
    "in^2": "in^2", "in²": "in^2", "sq in": "in^2", "sq. in.": "in^2",
    "mm^2": "mm^2", "mm²": "mm^2", "cm^2": "cm^2", "cm²": "cm^2",
}
# In a shop's shorthand pounds (`35#`, `35 lbs`) are pounds of force, whatever the column.
_VULGAR = {"½": "1/2", "¼": "1/4", "¾": "3/4", "⅛": "1/8", "⅜": "3/8", "⅝": "5/8", "⅞": "7/8",
           "⅙": "1/6", "⅚": "5/6", "⅕": "1/5", "⅖": "2/5", "⅗": "3/5", "⅘": "4/5", "⅓": "1/3", "⅔": "2/3"}
_SPACES = re.compile(r"[\s\u00a0\u2007\u202f]+")
_CELL_QUANTITY = re.compile(
    r"(?P<sign>[+-]?)\s*(?:"
    r"(?P<whole>\d+)(?P<sep>\s+|-)(?P<num>\d+)\s*/\s*(?P<den>\d+)"  # 1 1/8, 1-1/8
    r"|(?P<fnum>\d+)\s*/\s*(?P<fden>\d+)"  # 7/8
    r"|(?P<dec>(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+(?![A-Za-z]))?)"  # 0.875, .875, 22.
    r")\s*(?P<unit>.*?)\s*"
)
_THOUSANDS = re.compile(r"\d{1,3}(?:,\d{3})+(?:\.\d*)?")
_EXAMPLES = {"length": "7/8, .875, 22.2mm or 1 1/8\"", "force": "410 lbf, 35# or 1.9 kN", "pressure": "1200 psi, 8 MPa",
             "area": "1.9 in^2"}  # other dimensions: units.DIMENSIONS' example


def text(cell: object) -> str:
    """A cell as text: "" for blank; a workbook number without float noise (0.875, 142);
    a workbook date as YYYY-MM-DD; line breaks as LF; spaces around it dropped."""
    if cell is None:
        return ""
    if isinstance(cell, bool):
        return "TRUE" if cell else "FALSE"
    if isinstance(cell, int):
        return str(cell)
    if isinstance(cell, float):
        return number_text(cell)
    if isinstance(cell, _dt.datetime):
        return cell.date().isoformat() if cell.time() == _dt.time() else cell.isoformat(" ")
    if isinstance(cell, (_dt.date, _dt.time)):
        return cell.isoformat()
    return str(cell).replace("\r\n", "\n").replace("\r", "\n").strip()  # line ends as records have them


def number_text(value: float) -> str:
    """A workbook's float as a person typed it: 12 significant digits, no trailing zeros."""
    if not math.isfinite(value):
        return str(value)
    out = format(value, ".12g")
    if "e" in out:
        mantissa, exponent = out.split("e")
        out = f"{mantissa}e{int(exponent)}"
    return out


def _is_date(cell: object) -> bool:
    return isinstance(cell, (_dt.date, _dt.datetime))


def quantity(cell: object, spec: FieldSpec, column_unit: str | None, decimal: str = ".") -> str:
    """The record form of a quantity cell for `spec` ("7/8 in", "35 lbf"); CellError if not usable."""
    if _is_date(cell):
        shown = text(cell)
        raise CellError(f"the spreadsheet holds a date ({shown}) here, not a {noun(spec.dimension)}; a "
                        "spreadsheet program turns a typed 7/8 into 8 July: format the column as text and "
                        "type the value again")
    if isinstance(cell, bool):
        raise CellError(f"expected {expected(spec.dimension)}; found {text(cell)}")
    typed = text(cell)
    if isinstance(cell, (int, float)):
        magnitude, unit = typed, ""
    else:
        magnitude, unit = _split(typed, spec.dimension, decimal)
    unit = unit or column_unit or ""
    if not unit:
        raise CellError(f"{typed!r} has no unit and the map gives none for this column; write the unit in "
                        f"the cell or add unit: to the map's entry for {spec.path}")
    spelled = normalize_unit(unit)
    found = unit_dimension(spelled)
    if found is None:
        raise CellError(f"unknown unit {unit!r} in {typed!r} (no length, area, force, pressure or angle "
                        f"unit); expected {expected(spec.dimension)}")
    record = f"{magnitude} {spelled}"
    if found != spec.dimension:
        meaning = "" if typed == record else f" ({record})"
        raise CellError(f"expected {expected(spec.dimension)}; found {typed!r}{meaning}, which is "
                        f"{noun(found, article=True)}")
    try:
        value = parse_quantity(record, spec.dimension, signed=True)
    except QuantityError:  # the magnitude and unit each passed: only a value overflowing is left
        raise CellError(f"{typed!r} is not a finite {noun(spec.dimension)}") from None
    if not spec.low <= value <= spec.high:
        raise CellError(f"{typed!r} is outside the plausible range {show(spec.low, spec.dimension)} to "
                        f"{show(spec.high, spec.dimension)} for {spec.path}")
    return record


def _split(typed: str, dimension: str, decimal: str) -> tuple[str, str]:
    """(magnitude as a record writes it, unit as typed) of a quantity cell."""
    cleaned = _SPACES.sub(" ", typed).replace("\u2212", "-").replace("\u2044", "/").strip()
    for glyph, fraction in _VULGAR.items():
        cleaned = re.sub(rf"(\d)\s*{glyph}", rf"\1 {fraction}", cleaned).replace(glyph, fraction)
    if decimal == ",":
        cleaned = re.sub(r"(?<=\d),(?=\d)", ".", cleaned)
    else:
        thousands = _THOUSANDS.match(cleaned)
        if thousands:
            cleaned = thousands.group().replace(",", "") + cleaned[thousands.end():]
        elif re.match(r"\s*[+-]?\d*,\d", cleaned):
            raise CellError(f"{typed!r} has a comma in the number; if the sheet writes decimals with a comma, "
                            "add decimal: \",\" to the map")
    match = _CELL_QUANTITY.fullmatch(cleaned)
    if match is None or not cleaned:
        raise CellError(f"{typed!r} is not a number with a unit; expected {expected(dimension)}")
    sign = "-" if match["sign"] == "-" else ""
    if match["dec"] is not None:
        number = match["dec"]
        number = ("0" + number) if number.startswith(".") else number
        number = number.removesuffix(".") if "e" not in number.lower() else number
        magnitude = sign + number
    elif match["den"]:
        if int(match["den"]) == 0 or int(match["num"]) >= int(match["den"]):
            raise CellError(f"{typed!r} is not a proper mixed fraction such as 1 1/8")
        separator = "-" if match["sep"] == "-" else " "
        magnitude = f"{sign}{int(match['whole'])}{separator}{int(match['num'])}/{int(match['den'])}"
    else:
        if int(match["fden"]) == 0:
            raise CellError(f"{typed!r} divides by zero")
        magnitude = f"{sign}{int(match['fnum'])}/{int(match['fden'])}"
    return magnitude, match["unit"]


def normalize_unit(unit: str) -> str:
    """How a record spells a unit typed in a cell or a map ('"' -> in, '#' and lbs -> lbf)."""
    key = _SPACES.sub(" ", unit).strip().casefold()
    return UNIT_ALIASES.get(key, unit.strip())


def unit_dimension(unit: str) -> str | None:
    """The builder.units dimension of a unit spelling, or None when it is no unit a cell can use
    (a percentage is not: no column holds a fraction)."""
    found = units.unit_dimension(unit)
    return None if found == "fraction" else found


def noun(dimension: str | None, article: bool = False) -> str:
    noun = (dimension or "value").replace("_", " ")
    if not article:
        return noun
    return f"an {noun}" if noun[0] in "aeiou" else f"a {noun}"


def expected(dimension: str) -> str:
    """What a quantity of `dimension` looks like, for a message: "a length, e.g. 7/8, ..."."""
    example = _EXAMPLES.get(dimension) or DIMENSIONS[dimension][1]
    return f"{noun(dimension, article=True)}, e.g. {example}"


def _key(value: str) -> str:
    return re.sub(r"[\s_\-]+", "", value.casefold())


def choice(typed: str, spec: FieldSpec) -> str:
    """One of spec.choices, matched without regard to case, spaces, hyphens or underscores
    (DOT4 -> DOT 4, braided PTFE -> braided_ptfe)."""
    wanted = _key(typed)
    for option in spec.choices:
        if _key(option) == wanted:
            return option
    close = nearest(typed, spec.choices, n=1)
    hint = f"; did you mean {close[0]}?" if close else ""
    raise CellError(f"expected one of {', '.join(spec.choices)}; found {typed!r}{hint} "
                    "(or map the sheet's word with values: in the map)")


def part(typed: str, spec: FieldSpec, catalogue: dict) -> str:
    """A catalogue id of the right kind (matched without regard to case); nearest ids when unknown."""
    wanted = _SPACES.sub("", typed).upper()
    ids = list(catalogue.get(spec.catalogue, {}))
    for part_id in ids:
        if part_id.upper() == wanted:
            return part_id
    elsewhere = next((kind for kind, parts in catalogue.items()
                      if kind != spec.catalogue and any(p.upper() == wanted for p in parts)), None)
    if elsewhere:
        raise CellError(f"part {typed!r} is in parts/{elsewhere}.yaml, not parts/{spec.catalogue}.yaml")
    close = nearest(wanted, ids, cutoff=0.4)
    hint = f"; nearest: {', '.join(close)}" if close else f"; the catalogue has {len(ids)} {spec.catalogue}"
    raise CellError(f"unknown part {typed!r} in parts/{spec.catalogue}.yaml{hint}")


def build_id(cell: object, prefix: str | None, digits: int | None) -> str:
    """A build id from a job number (with the map's prefix and zero padding) or a typed id."""
    typed = text(cell)
    if re.fullmatch(r"\d+", typed):
        if not prefix:
            raise CellError(f"{typed!r} is a bare job number and the map gives no prefix; "
                            "add prefix: (e.g. HW-) to the map's id")
        candidate = prefix + typed.zfill(digits or 0)
    else:
        candidate = typed.upper()
    if not re.fullmatch(BUILD_ID_PATTERN, candidate):
        raise CellError(f"{typed!r} does not make a build id: expected a job number or an id of 2-6 "
                        f"capitals, a hyphen and 3-6 digits, e.g. {(prefix or 'HW-')}0142; got {candidate!r}")
    return candidate


def date(cell: object, formats: tuple[str, ...]) -> _dt.date:
    """A date cell: a workbook date, or text in one of `formats`."""
    if isinstance(cell, _dt.datetime):
        return cell.date()
    if isinstance(cell, _dt.date):
        return cell
    if isinstance(cell, (int, float)) and not isinstance(cell, bool):
        raise CellError(f"the number {text(cell)} is not a date; format the column as dates or text")
    typed = text(cell)
    for form in formats:
        try:
            return _dt.datetime.strptime(typed, form).date()
        except ValueError:
            continue
    sample = _dt.date(2025, 3, 14)
    expected = " or ".join(f"{form} (e.g. {sample.strftime(form)})" for form in formats)
    raise CellError(f"{typed!r} is not a calendar date in the form {expected}")
