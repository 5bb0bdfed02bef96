"""`fitment report` and `fitment calibration`: rows of SI-derived columns, rendered as a
text table, CSV or JSON."""
from __future__ import annotations

import csv
import io
import json
from typing import TYPE_CHECKING

from builder.presentation import in_unit

if TYPE_CHECKING:
    from builder.history import Analysis

# Cells a spreadsheet would read as a formula are prefixed with a quote (OWASP CSV injection).
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def report_rows(analysis: Analysis) -> list[dict]:
    """One row per build, newest first, in SI-derived columns named with their unit."""
    rows = []
    builds = sorted(analysis.shop.builds, key=lambda b: (str(b.date or ""), b.id), reverse=True)
    for build in builds:
        sizing = analysis.sizings[build.id]
        prediction = analysis.predictions[build.id]
        deltas = analysis.deltas[build.id]
        measured = build.measured
        rows.append({
            "id": build.id,
            "date": build.date.isoformat() if build.date else None,
            "status": build.status,
            "family": build.gearbox.family,
            "fork_tip_moves": build.gearbox.fork_tip_moves,
            "master_bore_mm": in_unit(build.master.bore, "mm", 2),
            "slave_bore_mm": in_unit(build.slave.bore, "mm", 2),
            "slave_area_mm2": in_unit(sizing.slave_area, "mm^2", 1),
            "pedal_ratio": in_unit(sizing.ratio_pedal, "1", 2),
            "hydraulic_ratio": in_unit(sizing.ratio_hydraulic, "1", 3),
            "fork_ratio": in_unit(sizing.ratio_fork, "1", 3),
            "overall_ratio": in_unit(sizing.ratio_overall, "1", 2),
            "computed_effort_N": in_unit(sizing.effort_predicted, "N", 1),
            "calibrated_effort_N": in_unit(prediction.effort, "N", 1),
            "measured_effort_N": in_unit(measured.pedal_effort if measured else None, "N", 1),
            "effort_delta_pct": in_unit(deltas.effort, "%", 1),
            "travel_margin_pct": in_unit(sizing.margin, "%", 1),
            "flags": " ".join(f.code for f in sizing.flags),
        })
    return rows


def calibration_rows(analysis: Analysis) -> list[dict]:
    """Shop-wide first, then each gearbox family by name."""
    calibration = analysis.calibration
    groups = [("shop-wide", calibration.shop)] + sorted(calibration.families.items())
    return [
        {
            "group": name,
            "builds": group.n,
            "efficiency_pct": in_unit(group.efficiency, "%", 1),
            "efficiency_spread_pct": in_unit(group.efficiency_mad, "%", 1),
            "travel_factor_pct": in_unit(group.travel_factor, "%", 1),
            "travel_spread_pct": in_unit(group.travel_factor_mad, "%", 1),
            "own_weight_pct": in_unit(group.weight, "%", 1),
            "loo_median_err_pct": in_unit(group.loo_median_abs_err, "%", 1),
            "loo_p90_err_pct": in_unit(group.loo_p90_abs_err, "%", 1),
            "loo_covered": f"{group.loo_covered}/{group.loo_intervals}",
            "loo_coverage_pct": in_unit(group.loo_coverage, "%", 1),
        }
        for name, group in groups
    ]


def coverage_note(analysis: Analysis) -> str:
    """One line under the calibration table: how often the effort intervals held."""
    from builder.presentation import coverage_sentence

    return coverage_sentence(analysis.calibration.shop)


def _spreadsheet_safe(value):
    if isinstance(value, str) and value.startswith(_FORMULA_STARTS):
        return "'" + value
    return value


# The terminal table keeps what fits a wide terminal; CSV and JSON carry every column.
REPORT_TABLE_COLUMNS = ("id", "date", "status", "family", "fork_tip_moves", "master_bore_mm",
                        "slave_bore_mm", "pedal_ratio", "overall_ratio", "computed_effort_N",
                        "measured_effort_N", "effort_delta_pct", "travel_margin_pct", "flags")


def render(rows: list[dict], fmt: str, table_columns: tuple[str, ...] | None = None) -> str:
    """Rows as an aligned text table, CSV (header first) or a JSON array.

    Record text is included as it is; the caller makes the output terminal-safe."""
    if fmt == "json":
        return json.dumps(rows, indent=2, ensure_ascii=True) + "\n"
    if not rows:
        return "" if fmt == "csv" else "No builds.\n"
    headers = list(rows[0])
    if fmt == "csv":
        buffer = io.StringIO()
        writer = csv.writer(buffer, lineterminator="\r\n")
        writer.writerow(headers)
        for row in rows:
            writer.writerow(["" if row[h] is None else _spreadsheet_safe(row[h]) for h in headers])
        return buffer.getvalue()
    if table_columns:
        headers = [h for h in headers if h in table_columns]
    cells = [[_text(row[h]) for h in headers] for row in rows]
    widths = [max(len(h), *(len(c[i]) for c in cells)) for i, h in enumerate(headers)]
    out = ["  ".join(h.ljust(w) for h, w in zip(headers, widths))]
    out.append("  ".join("-" * w for w in widths))
    out.extend("  ".join(c.ljust(w) for c, w in zip(line, widths)) for line in cells)
    return "\n".join(line.rstrip() for line in out) + "\n"


def _text(value) -> str:
    if value is None:
        return "-"
    if isinstance(value, float):
        return f"{value:g}"
    return str(value).replace("\n", " ")
