"""One spreadsheet row -> the data of one build record (plain strings, as a record holds them),
or the cells refused, each with its row and column.

Sections: a required section (gearbox, clutch, master, slave, line, pedal) is filled from its
cells and the map's defaults; an optional one (fork, measured) appears only when a cell of the
row gives one of its fields, and then defaults fill the rest of it. In a section that names a
catalogue part, defaults are not applied: the part gives those values, and cells override it.
"""
from __future__ import annotations

import datetime as _dt
from dataclasses import dataclass, field

from builder.importing import cells
from builder.importing.fields import CHOICE, PART, QUANTITY, FieldSpec, record_fields
from builder.importing.mapping import ImportMap, Source
from builder.importing.problems import CellError, CellProblem
from builder.importing.sheet import Row


@dataclass
class RowRecord:
    """What one row gives: the record data (None when refused) and where each field came from."""

    row: int
    id: str | None = None
    id_column: int = 0
    date: _dt.date | None = None
    data: dict | None = None
    problems: list[CellProblem] = field(default_factory=list)
    # field -> (1-based column, heading, cell was blank); column 0 for a map default
    origin: dict[str, tuple[int, str, bool]] = field(default_factory=dict)


class RowReader:
    """Converts rows with one map, sheet heading and catalogue."""

    def __init__(self, imap: ImportMap, columns: dict[str, int], headers: list[str], catalogue: dict,
                 sheet_path: str):
        self.imap, self.columns, self.headers = imap, columns, headers
        self.catalogue, self.path = catalogue, sheet_path
        self.specs = record_fields()

    def read(self, row: Row) -> RowRecord:
        result = RowRecord(row.number)
        values: dict[str, str] = {}

        def refuse(column_name: str | None, name: str, message: str) -> None:
            index = self.columns.get(column_name) if column_name is not None else None
            column = 0 if index is None else index + 1
            header = "" if index is None else self.headers[index]
            where = f"column {header!r}: " if header else ""
            result.problems.append(CellProblem(self.path, row.number, column, name, where + message, header))

        rule = self.imap.id
        id_index = self.columns[rule.column]
        result.id_column = id_index + 1
        cell = row.cells[id_index]
        if cells.text(cell) == "":
            refuse(rule.column, "id", "blank: every row needs its job number or build id")
        else:
            try:
                result.id = cells.build_id(cell, rule.prefix, rule.digits)
            except CellError as error:
                refuse(rule.column, "id", error.message)
        result.origin["id"] = (result.id_column, self.headers[id_index], False)

        date_rule = self.imap.date
        cell = row.cells[self.columns[date_rule.column]]
        if cells.text(cell) == "":
            refuse(date_rule.column, "date", "blank: the build's year decides its folder (records/builds/<year>/)")
        else:
            try:
                result.date = cells.date(cell, date_rule.formats)
            except CellError as error:
                refuse(date_rule.column, "date", error.message)
        result.origin["date"] = (self.columns[date_rule.column] + 1, date_rule.column, False)

        sources = ([self.imap.status] if self.imap.status else []) + self.imap.sources
        for source in sources:
            spec = self.specs[source.field]
            typed, blank, column = self._typed(row, source)
            index = self.columns[column]
            result.origin[source.field] = (index + 1, self.headers[index], blank)
            if typed is None:
                continue
            try:
                values[source.field] = self._value(spec, typed, source)
            except CellError as error:
                refuse(column, source.field, error.message)

        self._apply_defaults(values, result)
        if "status" not in values and not any(p.field == "status" for p in result.problems):
            column = self.imap.status.columns[0] if self.imap.status else None
            refuse(column, "status", "blank, and neither the map's values nor its defaults give a status for a "
                                     "blank cell (add \"\": measured to the values, or defaults: {status: ...})")
        if not result.problems:
            result.data = self._record(result, values)
        return result

    def _typed(self, row: Row, source: Source) -> tuple[str | object | None, bool, str]:
        """(the cell's value after the map's values:, whether the cells were blank, the column to
        blame). A quantity cell keeps its workbook type (number or date); text is joined."""
        picked = [(name, row.cells[self.columns[name]]) for name in source.columns]
        texts = [(name, cells.text(cell)) for name, cell in picked]
        filled = [(name, text) for name, text in texts if text]
        column = filled[0][0] if filled else source.columns[0]
        joined = source.join.join(text for _, text in filled)
        mapped = source.mapped(joined) if source.values else None
        if mapped is not None:
            return (mapped or None), not filled, column
        if not filled:
            return None, True, column
        if len(source.columns) == 1 and self.specs[source.field].kind == QUANTITY:
            return picked[0][1], False, column  # 0.875 or a date stays what the workbook holds
        return joined, False, column

    def _value(self, spec: FieldSpec, typed, source: Source) -> str:
        if spec.kind == QUANTITY:
            return cells.quantity(typed, spec, source.unit, self.imap.decimal)
        typed = cells.text(typed)
        if spec.kind == CHOICE:
            return cells.choice(typed, spec)
        if spec.kind == PART:
            return cells.part(typed, spec, self.catalogue)
        return typed

    def _apply_defaults(self, values: dict[str, str], result: RowRecord) -> None:
        given_sections = {self.specs[name].section for name in values if self.specs[name].section}
        with_part = {self.specs[name].section for name in values if self.specs[name].kind == PART}
        with_part |= {self.specs[name].section for name in self.imap.defaults
                      if self.specs[name].kind == PART and not _section_given(values, self.specs[name].section,
                                                                                self.specs)}
        for name, value in self.imap.defaults.items():
            spec = self.specs[name]
            if name in values:
                continue
            if spec.section and spec.optional_section and spec.section not in given_sections:
                continue
            if spec.section in with_part and spec.kind != PART:
                continue
            if spec.kind == PART:
                if _section_given(values, spec.section, self.specs):
                    continue  # the row writes this section out itself
                try:
                    value = cells.part(value, spec, self.catalogue)
                except CellError:
                    continue  # reported once against the map, not on every row
            values[name] = value
            result.origin[name] = (0, "", True)

    def _record(self, result: RowRecord, values: dict[str, str]) -> dict:
        data: dict = {"id": result.id, "date": result.date}
        for name, spec in self.specs.items():  # record order
            if name not in values:
                continue
            if spec.section is None:
                data[name] = values[name]
            else:
                key = name.split(".", 1)[1]
                data.setdefault(spec.section, {})[key] = values[name]
        return data


def _section_given(values: dict[str, str], section: str, specs: dict[str, FieldSpec]) -> bool:
    """Whether the row's own cells give any field of `section`."""
    return any(specs[name].section == section for name in values)
