"""Row tables for `fitment report` and `fitment calibration`: text, CSV or JSON."""
from __future__ import annotations

import csv
import io
import json

# Cells a spreadsheet would read as a formula are prefixed with a quote (OWASP CSV injection).
_FORMULA_STARTS = ("=", "+", "-", "@", "\t", "\r")


def scaled(factor: float, digits: int, value: float | None) -> float | None:
    """value * factor rounded to `digits`, or None when unknown (SI to a display unit)."""
    return None if value is None else round(value * factor, digits)


def report_rows(analysis) -> list[dict]:
    """One row per build, newest first, in SI-derived columns named with their unit."""
    rows = []
    builds = sorted(analysis.shop.builds, key=lambda b: (str(b.date or ""), b.id), reverse=True)
    for build in builds:
        sizing = analysis.sizings[build.id]
        prediction = analysis.predictions.get(build.id)
        deltas = analysis.deltas.get(build.id)
        measured = build.measured
        rows.append({
            "id": build.id,
            "date": build.date.isoformat() if build.date else None,
            "status": build.status,
            "family": build.gearbox.family,
            "fork_tip_moves": build.gearbox.fork_tip_moves,
            "master_bore_mm": scaled(1e3, 2, build.master.bore),
            "slave_bore_mm": scaled(1e3, 2, build.slave.bore),
            "slave_area_mm2": scaled(1e6, 1, sizing.slave_area),
            "pedal_ratio": scaled(1.0, 2, sizing.ratio_pedal),
            "hydraulic_ratio": scaled(1.0, 3, sizing.ratio_hydraulic),
            "fork_ratio": scaled(1.0, 3, sizing.ratio_fork),
            "overall_ratio": scaled(1.0, 2, sizing.ratio_overall),
            "computed_effort_N": scaled(1.0, 1, sizing.effort_predicted),
            "calibrated_effort_N": scaled(1.0, 1, prediction.effort if prediction else None),
            "measured_effort_N": scaled(1.0, 1, measured.pedal_effort if measured else None),
            "effort_delta_pct": scaled(100.0, 1, deltas.effort if deltas else None),
            "travel_margin_pct": scaled(100.0, 1, sizing.margin),
            "flags": " ".join(f.code for f in sizing.flags),
        })
    return rows


def calibration_rows(analysis) -> list[dict]:
    """Shop-wide first, then each gearbox family by name."""
    calibration = analysis.calibration
    groups = [("shop-wide", calibration.shop)] + sorted(calibration.families.items())
    return [
        {
            "group": name,
            "builds": group.n,
            "efficiency_pct": scaled(100.0, 1, group.efficiency),
            "efficiency_spread_pct": scaled(100.0, 1, group.efficiency_mad),
            "travel_factor_pct": scaled(100.0, 1, group.travel_factor),
            "travel_spread_pct": scaled(100.0, 1, group.travel_factor_mad),
            "own_weight_pct": scaled(100.0, 1, group.weight),
            "loo_median_err_pct": scaled(100.0, 1, group.loo_median_abs_err),
            "loo_p90_err_pct": scaled(100.0, 1, group.loo_p90_abs_err),
        }
        for name, group in groups
    ]


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
