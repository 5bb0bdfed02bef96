"""`fitment report` and `fitment calibration`: one row per build (or per group), as a text
table in the shop's display units with headings in words, or as CSV / JSON in SI-derived
units whose keys name the unit (master_bore_mm, computed_effort_N, travel_margin_pct)."""
from __future__ import annotations

import csv
import io
import json
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from builder import presentation as say

if TYPE_CHECKING:
    from builder.history import Analysis
    from builder.model import Build

# Cells a spreadsheet would read as a formula are prefixed with a quote (OWASP CSV injection).
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


@dataclass(frozen=True)
class Column:
    """One report column: its CSV/JSON key (SI-derived, unit in the name), the heading a
    person reads, and how a value is shown. `dimension` None is text; "ratio" a plain
    ratio; "fraction" a percentage. `unit` and `digits` are for CSV/JSON (in_unit)."""

    key: str
    words: str
    dimension: str | None = None
    unit: str = "1"
    digits: int = 0
    signed: bool = False
    table: bool = True  # shown in the terminal table; CSV and JSON carry every column


REPORT_COLUMNS = (
    Column("id", "Build"),
    Column("date", "Date"),
    Column("status", "Status"),
    Column("family", "Family"),
    Column("fork_tip_moves", "Fork tip"),
    Column("master_bore_mm", "Master bore", "length", "mm", 2),
    Column("slave_bore_mm", "Slave bore", "length", "mm", 2),
    Column("slave_area_mm2", "Slave area", "area", "mm^2", 1, table=False),
    Column("pedal_ratio", "Pedal ratio", "ratio", "1", 2),
    Column("hydraulic_ratio", "Hydraulic ratio", "ratio", "1", 3, table=False),
    Column("fork_ratio", "Fork ratio", "ratio", "1", 3, table=False),
    Column("overall_ratio", "Overall ratio", "ratio", "1", 2),
    Column("computed_effort_N", "Effort computed", "force", "N", 1),
    Column("calibrated_effort_N", "Effort calibrated", "force", "N", 1, table=False),
    Column("measured_effort_N", "Effort measured", "force", "N", 1),
    Column("effort_delta_pct", "Difference", "fraction", "%", 1, signed=True),
    Column("travel_margin_pct", "Travel margin", "fraction", "%", 1, signed=True),
    Column("flags", "Flags"),
)


@dataclass(frozen=True)
class Filters:
    """Which builds a report shows; None lets every value through."""

    family: str | None = None
    fork: str | None = None
    status: str | None = None

    def keep(self, build: Build) -> bool:
        return ((self.family is None or build.gearbox.family == self.family)
                and (self.fork is None or build.gearbox.fork_tip_moves == self.fork)
                and (self.status is None or build.status == self.status))


def _builds(analysis: Analysis, filters: Filters | None) -> list[Build]:
    """The builds a report shows, newest first."""
    chosen = [b for b in analysis.shop.builds if filters is None or filters.keep(b)]
    return sorted(chosen, key=lambda b: (str(b.date or ""), b.id), reverse=True)


def _facts(analysis: Analysis, build: Build) -> dict:
    """A build's report values: SI numbers, text and flag codes, by column key."""
    sizing = analysis.sizings[build.id]
    measured = build.measured
    return {
        "id": build.id,
        "date": build.date.isoformat() if build.date else None,
        "status": build.status,
        "family": build.gearbox.family,
        "fork_tip_moves": build.gearbox.fork_tip_moves,
        "master_bore_mm": build.master.bore,
        "slave_bore_mm": build.slave.bore,
        "slave_area_mm2": sizing.slave_area,
        "pedal_ratio": sizing.ratio_pedal,
        "hydraulic_ratio": sizing.ratio_hydraulic,
        "fork_ratio": sizing.ratio_fork,
        "overall_ratio": sizing.ratio_overall,
        "computed_effort_N": sizing.effort_predicted,
        "calibrated_effort_N": analysis.predictions[build.id].effort,
        "measured_effort_N": measured.pedal_effort if measured else None,
        "effort_delta_pct": analysis.deltas[build.id].effort,
        "travel_margin_pct": sizing.margin,
        "flags": tuple(f.code for f in sizing.flags),
    }


def report_rows(analysis: Analysis, filters: Filters | None = None) -> list[dict]:
    """One row per build, newest first, in SI-derived columns named with their unit (for
    CSV and JSON); flags as their codes separated by spaces."""
    rows = []
    for build in _builds(analysis, filters):
        facts = _facts(analysis, build)
        row = {}
        for column in REPORT_COLUMNS:
            value = facts[column.key]
            if column.key == "flags":
                value = " ".join(value)
            elif column.dimension is not None:
                value = say.in_unit(value, column.unit, column.digits)
            row[column.key] = value
        rows.append(row)
    return rows


def report_table(analysis: Analysis, primary: str, filters: Filters | None = None) -> str:
    """The terminal table: headings in words with the display unit, figures in `primary`
    units (the shop's display units), flags in words."""
    columns = [c for c in REPORT_COLUMNS if c.table]
    headers = [_heading(c, primary) for c in columns]
    cells = []
    for build in _builds(analysis, filters):
        facts = _facts(analysis, build)
        cells.append([_cell(c, facts[c.key], primary) for c in columns])
    if not cells:
        return "No builds.\n"
    return aligned(headers, cells)


def _heading(column: Column, primary: str) -> str:
    unit = say.unit_label(column.dimension, primary) if column.dimension else ""
    return f"{column.words} ({unit})" if unit else column.words


def _cell(column: Column, value, primary: str) -> str:
    if column.key == "flags":
        return ", ".join(say.flag_words(code) for code in value)
    if column.key == "fork_tip_moves":
        return say.choice("gearbox.fork_tip_moves", value)
    if column.dimension is not None:
        return say.number_in(value, column.dimension, primary, signed=column.signed)
    return say.NONE if value is None else str(value)


def _groups(analysis: Analysis) -> list:
    calibration = analysis.calibration
    return [("shop-wide", calibration.shop)] + sorted(calibration.families.items())


def calibration_table(analysis: Analysis) -> str:
    """`fitment calibration`: the calibration page's figures as a terminal table."""
    return aligned(list(say.CALIBRATION_HEADINGS),
                   [say.calibration_cells(group) for _, group in _groups(analysis)])


def coverage_note(analysis: Analysis) -> str:
    """One line under the calibration table: how often the effort intervals held."""
    return say.coverage_sentence(analysis.calibration.shop)


def _spreadsheet_safe(value):
    if isinstance(value, str) and value.startswith(_FORMULA_STARTS):
        return "'" + value
    return value


def render(rows: list[dict], fmt: str) -> str:
    """Rows as CSV (header first) or a JSON array. Record text is included as it is; the
    caller makes the output terminal-safe."""
    if fmt == "json":
        return json.dumps(rows, indent=2, ensure_ascii=True) + "\n"
    if not rows:
        return ""
    headers = list(rows[0])
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\r\n")
    writer.writerow(headers)
    for row in rows:
        writer.writerow(["" if row[h] is None else _spreadsheet_safe(row[h]) for h in headers])
    return buffer.getvalue()


def aligned(headers: Sequence[str], cells: Sequence[Sequence[str]]) -> str:
    """An aligned text table: headings, a rule, then one line per row; numbers right-aligned."""
    cells = [[str(cell).replace("\n", " ") for cell in row] for row in cells]
    widths = [max(len(h), *(len(row[i]) for row in cells)) if cells else len(h)
              for i, h in enumerate(headers)]
    numeric = [bool(cells) and all(_numeric(row[i]) for row in cells) for i in range(len(headers))]

    def line(row: Sequence[str]) -> str:
        return "  ".join(c.rjust(w) if right else c.ljust(w)
                         for c, w, right in zip(row, widths, numeric)).rstrip()

    out = [line(headers), "  ".join("-" * w for w in widths)]
    out.extend(line(row) for row in cells)
    return "\n".join(out) + "\n"


def _numeric(text: str) -> bool:
    return text == say.NONE or text.lstrip("+-").replace(".", "", 1).isdigit()
