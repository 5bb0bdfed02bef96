"""The import map: which column fills which record field; checked against its own schema
(schema/import-map.schema.json) and then for meaning (known fields, units of the right
dimension, usable defaults), every problem located in the map file (path:line:col).
"""
from __future__ import annotations

import datetime as _dt
import os
import re
from dataclasses import dataclass, field
from pathlib import Path

from builder.importing import cells
from builder.importing.fields import CHOICE, LIST, PART, QUANTITY, SPECIAL, TEXT, FieldSpec, record_fields
from builder.importing.problems import CellError
from builder.problems import InputError, Problem, nearest
from builder.records._schema import dotted, schema_problems
from builder.records._yaml import Located, careful_load, read_text

MAP_SCHEMA = "import-map"  # schema/import-map.schema.json
DEFAULT_DATE_FORMATS = ("%Y-%m-%d",)
_TRUE_WORDS, _FALSE_WORDS = ("yes", "true", "on"), ("no", "false", "off")  # YAML 1.1 reads these as true/false


@dataclass(frozen=True)
class Source:
    """Where one record field comes from: column(s), the unit of a bare number, word mapping."""

    field: str
    columns: tuple[str, ...]
    unit: str | None = None
    values: tuple[tuple[str, str], ...] = ()  # (cell text, record value), in map order
    join: str = " "
    where: tuple = ()  # the entry's place in the map
    column_where: tuple[tuple, ...] = ()  # each column name's place in the map

    def mapped(self, typed: str) -> str | None:
        """The record value the map gives for a cell's text: exact match first, then any case."""
        for cell_text, value in self.values:
            if cell_text == typed:
                return value
        folded = typed.strip().casefold()
        for cell_text, value in self.values:
            if cell_text.strip().casefold() == folded:
                return value
        return None


@dataclass(frozen=True)
class IdRule:
    column: str
    prefix: str | None
    digits: int | None
    where: tuple


@dataclass(frozen=True)
class DateRule:
    column: str
    formats: tuple[str, ...]
    where: tuple


@dataclass
class ImportMap:
    path: str
    id: IdRule
    date: DateRule
    status: Source | None
    sources: list[Source]
    defaults: dict[str, str]  # field -> value as a record writes it
    default_where: dict[str, tuple]
    header_row: int = 1
    sheet: str | None = None
    delimiter: str | None = None
    decimal: str = "."
    doc: Located = field(default_factory=Located)

    def locate(self, where: tuple, at_key: bool = False) -> tuple[int, int]:
        return self.doc.where(where, at_key)

    def problem(self, where: tuple, message: str, at_key: bool = False) -> Problem:
        return Problem(self.path, *self.locate(where, at_key), dotted(where), message)

    def columns(self) -> list[tuple[str, tuple]]:
        """Every (column name, place in the map) the map uses."""
        used = [(self.id.column, self.id.where), (self.date.column, self.date.where)]
        for source in ([self.status] if self.status else []) + self.sources:
            used += list(zip(source.columns, source.column_where))
        return used


def load_map(path: str | os.PathLike) -> ImportMap:
    """The map in `path`; InputError with every problem, located in the map file."""
    shown = str(path)
    text, unreadable = read_text(Path(path))
    if unreadable:
        raise InputError([Problem(shown, *unreadable[:2], "file", unreadable[2])])
    doc = careful_load(text)
    problems = [Problem(shown, line, col, dotted(where), message) for where, line, col, message in doc.problems]
    if problems:
        raise InputError(problems)
    for where, at_key, name, message in schema_problems(MAP_SCHEMA, doc.data):
        problems.append(Problem(shown, *doc.where(where, at_key), name, message))
    if problems:
        raise InputError(problems)
    return _Reader(shown, doc).read()


class _Reader:
    """Turns a schema-valid map document into an ImportMap, collecting located problems."""

    def __init__(self, path: str, doc: Located):
        self.path, self.doc, self.data = path, doc, doc.data
        self.problems: list[Problem] = []
        self.specs = record_fields()

    def report(self, where: tuple, message: str, at_key: bool = False) -> None:
        self.problems.append(Problem(self.path, *self.doc.where(where, at_key), dotted(where), message))

    def read(self) -> ImportMap:
        data = self.data
        id_rule = self._id_rule(data["id"])
        date_rule = self._date_rule(data["date"])
        status = self._source("status", data["status"], ("status",)) if "status" in data else None
        sources = []
        for name, raw in data["fields"].items():
            source = self._source(name, raw, ("fields", name))
            if source is not None:
                sources.append(source)
        defaults, default_where = {}, {}
        for name, value in data.get("defaults", {}).items():
            checked = self._default(name, value)
            if checked is not None:
                defaults[name], default_where[name] = checked, ("defaults", name)
        if status is None and "status" not in defaults and "status" not in data:
            self.report((), "the map gives no status: add status: {column: ..., values: {...}} "
                            "or defaults: {status: measured}")
        if self.problems:
            raise InputError(self.problems)
        return ImportMap(self.path, id_rule, date_rule, status, sources, defaults, default_where,
                         header_row=data.get("header_row", 1), sheet=data.get("sheet"),
                         delimiter=data.get("delimiter"), decimal=data.get("decimal", "."), doc=self.doc)

    def _id_rule(self, raw) -> IdRule:
        if isinstance(raw, str):
            return IdRule(raw, None, None, ("id",))
        return IdRule(raw["column"], raw.get("prefix"), raw.get("digits"), ("id", "column"))

    def _date_rule(self, raw) -> DateRule:
        if isinstance(raw, str):
            return DateRule(raw, DEFAULT_DATE_FORMATS, ("date",))
        formats = raw.get("format", DEFAULT_DATE_FORMATS)
        formats = (formats,) if isinstance(formats, str) else tuple(formats)
        sample = _dt.date(2025, 3, 14)
        for index, form in enumerate(formats):
            where = ("date", "format") + ((index,) if isinstance(raw.get("format"), list) else ())
            try:
                ok = _dt.datetime.strptime(sample.strftime(form), form).date() == sample
            except ValueError:
                ok = False
            if not ok:
                self.report(where, f"{form!r} does not read back a full date (day, month and year); "
                                   "write it with strftime codes such as %d/%m/%Y")
        return DateRule(raw["column"], formats, ("date", "column"))

    def _spec(self, name: str, where: tuple) -> FieldSpec | None:
        if name in SPECIAL and name != "status":
            self.report(where, f"{name} has its own entry at the top of the map, not under fields", at_key=True)
            return None
        spec = self.specs.get(name)
        if spec is None:
            close = nearest(name, self.specs, cutoff=0.6)
            hint = f"; did you mean {' or '.join(close)}?" if close else \
                "; fields are dotted record keys such as master.bore or notes"
            self.report(where, f"no record field {name!r}{hint}", at_key=True)
            return None
        if spec.kind == LIST:
            self.report(where, f"{name} is a list or a set of points in a record and cannot come from one "
                               "cell; add it to the records by hand after the import", at_key=True)
            return None
        return spec

    def _source(self, name: str, raw, where: tuple) -> Source | None:
        spec = self._spec(name, where)
        if spec is None:
            return None
        if isinstance(raw, dict):
            columns, base = raw["column"], where + ("column",)
            unit, join = raw.get("unit"), raw.get("join", " ")
            values = self._values(spec, raw.get("values", {}), where + ("values",), unit)
        else:
            columns, base, unit, join, values = raw, where, None, " ", ()
        if isinstance(columns, str):
            columns, column_where = (columns,), (base,)
        else:
            column_where = tuple(base + (index,) for index in range(len(columns)))
            columns = tuple(columns)
            if len(columns) > 1 and spec.kind != TEXT:
                self.report(base, f"{name} is not text: give it one column, not {len(columns)}")
        if unit is not None:
            unit = self._unit(spec, unit, where + ("unit",))
        return Source(name, columns, unit, values, join, where, column_where)

    def _unit(self, spec: FieldSpec, unit: str, where: tuple) -> str | None:
        if spec.kind != QUANTITY:
            self.report(where, f"{spec.path} is not a quantity; a unit means nothing here")
            return None
        spelled = cells.normalize_unit(unit)
        found = cells.unit_dimension(spelled)
        if found is None:
            self.report(where, f"unknown unit {unit!r}; expected {cells.expected(spec.dimension)}")
            return None
        if found != spec.dimension:
            self.report(where, f"{unit!r} is a unit of {cells.noun(found)}; "
                               f"{spec.path} is {cells.noun(spec.dimension, article=True)}")
            return None
        return spelled

    def _values(self, spec: FieldSpec, raw: dict, where: tuple, unit: str | None) -> tuple[tuple[str, str], ...]:
        pairs = []
        for key, value in raw.items():
            at = where + (key,)
            typed = _key_text(key)
            record = cells.text(value) if not isinstance(value, str) else value
            checked = self._value(spec, record, at, unit)
            if checked is not None:
                pairs.extend((word, checked) for word in typed)
        return tuple(pairs)

    def _value(self, spec: FieldSpec, value: str, where: tuple, unit: str | None = None) -> str | None:
        """A map value (in values: or defaults:) checked as the field's kind; parts are checked
        against the catalogue later."""
        try:
            if spec.kind == CHOICE:
                return cells.choice(value, spec)
            if spec.kind == QUANTITY:
                return cells.quantity(value, spec, cells.normalize_unit(unit) if unit else None)
        except CellError as error:
            self.report(where, error.message)
            return None
        return value

    def _default(self, name: str, value) -> str | None:
        where = ("defaults", name)
        spec = self._spec(name, where)
        if spec is None:
            return None
        if not isinstance(value, str):
            if spec.kind == QUANTITY:
                self.report(where, f"write the unit with the number, e.g. {value} in")
                return None
            value = cells.text(value)
        return self._value(spec, value, where)


def _key_text(key: object) -> tuple[str, ...]:
    """The cell texts a `values:` key stands for. YAML reads an unquoted yes/no/on/off as true or
    false, and ~ as nothing, so those are taken back to the words a cell could hold."""
    if key is None:
        return ("",)
    if key is True:
        return _TRUE_WORDS
    if key is False:
        return _FALSE_WORDS
    return (cells.text(key) if not isinstance(key, str) else key,)


def _folded(name: str) -> str:
    return re.sub(r"\s+", " ", name).strip().casefold()


def bind(imap: ImportMap, headers: list[str], sheet_path: str) -> dict[str, int]:
    """Column name in the map -> its 0-based index in `headers`; InputError, located in the map,
    for a name the sheet does not have (nearest headings given) or has twice."""
    found: dict[str, int] = {}
    problems = []
    for name, where in imap.columns():
        if name in found:
            continue
        exact = [index for index, header in enumerate(headers) if header == name]
        loose = [index for index, header in enumerate(headers) if _folded(header) == _folded(name)]
        matches = exact or loose
        if len(matches) == 1:
            found[name] = matches[0]
            continue
        if matches:
            places = ", ".join(str(index + 1) for index in matches)
            problems.append(imap.problem(where, f"{len(matches)} columns of {sheet_path} are headed {name!r} "
                                                f"(columns {places}); rename all but one in the sheet"))
            continue
        close = nearest(name, [h for h in headers if h])
        hint = f"; nearest: {', '.join(repr(c) for c in close)}" if close else \
            f"; its headings are {', '.join(repr(h) for h in headers if h)}"
        problems.append(imap.problem(where, f"no column {name!r} in row {imap.header_row} of {sheet_path}{hint}"))
    if problems:
        raise InputError(problems)
    return found


def check_part_defaults(imap: ImportMap, catalogue: dict) -> list[Problem]:
    """Catalogue ids given in defaults: or values: that the shop's catalogue does not have."""
    specs = record_fields()
    problems = []
    checks = [(name, value, imap.default_where[name]) for name, value in imap.defaults.items()]
    for source in imap.sources:
        checks += [(source.field, value, source.where + ("values", word)) for word, value in source.values]
    for name, value, where in checks:
        spec = specs.get(name)
        if spec is None or spec.kind != PART or not value:
            continue
        try:
            cells.part(value, spec, catalogue)
        except CellError as error:
            problems.append(imap.problem(where, error.message))
    return problems
