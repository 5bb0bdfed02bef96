"""`fitment check`: size one file against the shop's history, as text or the JSON contract."""
from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from builder.model import Build
from builder.problems import InputError, Problem
from builder.tables import scaled


@dataclass(frozen=True)
class CheckResult:
    build: Build
    sizing: object  # builder.engine.result.Sizing
    prediction: object  # builder.history Prediction
    deltas: object  # builder.history Deltas
    similar: list  # builder.history SimilarBuild, nearest first


def check_file(analysis, path: Path, k: int) -> CheckResult:
    """Size FILE: a record of the shop (its own history left out) or a proposal anywhere."""
    from builder.history import analyse_proposal
    from builder.records import load_build_file

    if not path.is_file():
        raise InputError([Problem(str(path), 0, 0, "file", "no such file")])
    build = _recorded(analysis, path) or load_build_file(path, analysis.shop)
    sizing, prediction, similar, deltas = analyse_proposal(analysis, build, k)
    return CheckResult(build, sizing, prediction, deltas, similar)


def _recorded(analysis, path: Path) -> Build | None:
    """The shop's build loaded from `path`, if it is one (records are named by their id)."""
    build = analysis.builds.get(path.stem)
    if build is not None and Path(build.path).resolve() == path.resolve():
        return build
    return None


def predicted_effort(result: CheckResult) -> float:
    """Calibrated prediction when history allows, else ideal / shop default efficiency."""
    calibrated = result.prediction.effort if result.prediction is not None else None
    return calibrated if calibrated is not None else result.sizing.effort_predicted


def contract(result: CheckResult) -> dict:
    """The `check --json` object: every key present, unknown values null (DESIGN section 6)."""
    s, b, p = result.sizing, result.build, result.prediction
    measured = b.measured
    interval = p.interval if p is not None else None
    return {
        "id": b.id,
        "status": b.status,
        "ratios": {
            "pedal": round(s.ratio_pedal, 4),
            "hydraulic": round(s.ratio_hydraulic, 4),
            "fork": round(s.ratio_fork, 4),
            "overall": round(s.ratio_overall, 4),
        },
        "effort": {
            "ideal_N": scaled(1.0, 2, s.effort_ideal),
            "predicted_N": scaled(1.0, 2, predicted_effort(result)),
            "interval_N": None if interval is None else [scaled(1.0, 2, interval[0]), scaled(1.0, 2, interval[1])],
            "measured_N": scaled(1.0, 2, measured.pedal_effort if measured else None),
            "delta_pct": scaled(100.0, 2, result.deltas.effort if result.deltas else None),
            "basis": p.basis if p is not None else None,
            "builds_behind": p.n_builds if p is not None else 0,
            "note": p.note if p is not None else None,
        },
        "travel": {
            "master_stroke_used_mm": scaled(1e3, 3, s.master_stroke_used),
            "slave_mm": scaled(1e3, 3, s.slave_travel),
            "bearing_mm": scaled(1e3, 3, s.bearing_travel),
            "needed_bearing_mm": scaled(1e3, 3, s.needed_bearing_travel),
            "margin_pct": scaled(100.0, 2, s.margin),
            "release_point_pct": scaled(100.0, 2, s.release_point),
            "measured_slave_mm": scaled(1e3, 3, measured.slave_travel if measured else None),
            "delta_pct": scaled(100.0, 2, result.deltas.slave_travel if result.deltas else None),
            "calibrated_slave_mm": scaled(1e3, 3, p.slave_travel if p is not None else None),
            "calibrated_margin_pct": scaled(100.0, 2, p.travel_margin if p is not None else None),
        },
        "pressure_kPa": round(s.pressure / 1000.0, 1),
        "volume": {
            "master_swept_ml": scaled(1e6, 3, s.master_swept_volume),
            "needed_ml": scaled(1e6, 3, s.needed_volume),
            "losses_ml": scaled(1e6, 3, s.losses_volume),
        },
        "pedal": {"floor_gap_mm": scaled(1e3, 3, s.floor_gap)},
        "flags": [
            {"code": f.code, "severity": f.severity, "message": f.message} for f in s.flags
        ],
        "similar": [
            {
                "id": item.id,
                "distance": round(item.distance, 4),
                "differs": list(item.differs),
                "measured_effort_N": scaled(1.0, 2, item.measured_effort),
                "outcome": item.outcome,
            }
            for item in result.similar
        ],
    }


def describe(result: CheckResult, primary: str) -> str:
    """The technician's view: every figure in both unit systems, flags as sentences.

    Record text is included as it is; the caller makes the whole text terminal-safe.
    """
    from builder.units import show

    s, b, p = result.sizing, result.build, result.prediction
    lines: list[str] = []

    def row(label: str, text: str) -> None:
        lines.append(f"{label:<11} {text}")

    lines.append(f"{b.id}  [{b.status}]  {b.path}")
    gearbox = f"{b.gearbox.family} {b.gearbox.variant or ''}".strip()
    lines.append(f"{b.vehicle or ''} | gearbox {gearbox}, fork tip {b.gearbox.fork_tip_moves}, "
                 f"{b.slave.kind} slave")
    if b.outcome:
        lines.append(f"Outcome: {b.outcome}")
    lines.append("")
    row("Ratios", f"pedal {s.ratio_pedal:.2f} ({s.linkage.mode})   hydraulic "
        f"{s.ratio_hydraulic:.2f}   fork {s.ratio_fork:.2f}   overall {s.ratio_overall:.1f}")
    if s.linkage.mode == "layout":
        release = ("never" if s.linkage.ratio_at_release is None
                   else f"{s.linkage.ratio_at_release:.2f}")
        angle = s.linkage.pushrod_angle_max
        row("", f"pedal ratio at rest {s.linkage.ratio_at_rest:.2f}, at release {release}, "
            f"at stop {s.linkage.ratio_at_stop:.2f}"
            + ("" if angle is None else f"; pushrod up to {angle * 57.29578:.1f} deg off axis"))
    row("Effort", f"ideal {show(s.effort_ideal, 'force', primary)}")
    effort = predicted_effort(result)
    if p is not None and p.effort is not None:
        spread = ""
        if p.interval is not None:
            spread = (f", likely {show(p.interval[0], 'force', primary)} to "
                      f"{show(p.interval[1], 'force', primary)}")
        row("", f"predicted {show(effort, 'force', primary)}{spread}")
        row("", f"from {p.basis}")
    else:
        note = p.note if p is not None and p.note else "not enough history"
        row("", f"predicted {show(effort, 'force', primary)} at the shop default efficiency "
            f"{s.efficiency:.0%} ({note})")
    if b.measured is not None and b.measured.pedal_effort is not None:
        delta = result.deltas.effort if result.deltas else None
        text = f"measured {show(b.measured.pedal_effort, 'force', primary)}"
        if delta is not None:
            text += (f", {delta:+.1%} against {show(s.effort_predicted, 'force', primary)} "
                     f"at the shop default efficiency {s.efficiency:.0%}")
        row("", text)
    row("Travel", f"master stroke used {show(s.master_stroke_used, 'length', primary)}, slave "
        f"{show(s.slave_travel, 'length', primary)}"
        + (" (slave stroke reached)" if s.slave_overtravel else ""))
    row("", f"bearing {show(s.bearing_travel, 'length', primary)} against "
        f"{show(s.needed_bearing_travel, 'length', primary)} needed: margin {s.margin:+.0%}")
    if p is not None and p.slave_travel is not None:
        row("", f"slave {show(p.slave_travel, 'length', primary)} after the shop's measured "
            f"travel losses: margin {p.travel_margin:+.0%}")
    release = ("never reached" if s.release_point is None
               else f"{s.release_point:.0%} of pad travel")
    row("", f"full release at {release}")
    if b.measured is not None and b.measured.slave_travel is not None:
        delta = result.deltas.slave_travel if result.deltas else None
        row("", f"measured slave travel {show(b.measured.slave_travel, 'length', primary)}"
            + ("" if delta is None else f", {delta:+.1%} against computed"))
    row("Pressure", f"{show(s.pressure, 'pressure', primary)} in the line at peak release load")
    row("Volume", f"master sweeps {show(s.master_swept_volume, 'volume', primary)}, release "
        f"needs {show(s.needed_volume, 'volume', primary)} including "
        f"{show(s.losses_volume, 'volume', primary)} of hose and fluid losses")
    row("Pedal", "master does not bottom before the stop" if s.floor_gap <= 0 else
        f"master bottoms {show(s.floor_gap, 'length', primary)} before the floor stop")
    lines.append("")
    if s.flags:
        for flag in s.flags:
            lines.append(f"{flag.severity.upper():<5} {flag.code}: {flag.message}")
    else:
        lines.append("No flags.")
    if result.similar:
        lines.append("")
        lines.append("Most similar past builds:")
        for item in result.similar:
            effort_text = ("no measured effort" if item.measured_effort is None
                           else f"measured {show(item.measured_effort, 'force', primary)}")
            lines.append(f"  {item.id}  distance {item.distance:.2f}  [{item.status}]  "
                         f"{effort_text}; {item.outcome or 'no outcome noted'}")
            if item.differs:
                lines.append(f"      differs: {'; '.join(item.differs)}")
            else:
                lines.append("      differs: nothing on the compared inputs")
    return "\n".join(lines)
