"""`fitment check`: size one file against the shop's history, as text or the JSON contract."""
from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from builder import presentation as say
from builder.problems import InputError, Problem

if TYPE_CHECKING:
    from builder.engine import Sizing
    from builder.history import Analysis, Deltas, Prediction, SimilarBuild
    from builder.model import Build


@dataclass(frozen=True)
class CheckResult:
    build: Build
    sizing: Sizing
    prediction: Prediction
    deltas: Deltas
    similar: list[SimilarBuild]  # nearest first


def check_file(analysis: Analysis, path: Path, k: int) -> CheckResult:
    """Size FILE: a record of the shop (its own history left out) or a proposal anywhere."""
    from builder.history import analyse_proposal
    from builder.records import load_build_file

    if not path.is_file():
        raise InputError([Problem(str(path), 0, 0, "file", "no such file")])
    build = _recorded(analysis, path) or load_build_file(path, analysis.shop)
    sizing, prediction, similar, deltas = analyse_proposal(analysis, build, k)
    return CheckResult(build, sizing, prediction, deltas, similar)


def _recorded(analysis: Analysis, path: Path) -> Build | None:
    """The shop's build loaded from `path`, if it is one (records are named by their id)."""
    build = analysis.builds.get(path.stem)
    if build is not None and Path(build.path).resolve() == path.resolve():
        return build
    return None


def predicted_effort(result: CheckResult) -> float:
    """Calibrated prediction when history allows, else ideal / shop default efficiency."""
    calibrated = result.prediction.effort
    return calibrated if calibrated is not None else result.sizing.effort_predicted


def contract(result: CheckResult, primary: str = "imperial") -> dict:
    """The `check --json` object: every key present, unknown values null (DESIGN section 6).

    Numbers are SI-derived (N, mm, kPa, mL, %); messages are worded in the shop's units.
    """
    s, b, p, d = result.sizing, result.build, result.prediction, result.deltas
    measured = b.measured
    effort = predicted_effort(result)
    measured_effort = measured.pedal_effort if measured else None
    return {
        "id": b.id,
        "status": b.status,
        "ratios": {
            "pedal": say.in_unit(s.ratio_pedal, "1", 4),
            "hydraulic": say.in_unit(s.ratio_hydraulic, "1", 4),
            "fork": say.in_unit(s.ratio_fork, "1", 4),
            "overall": say.in_unit(s.ratio_overall, "1", 4),
        },
        "effort": {
            "ideal_N": say.in_unit(s.effort_ideal, "N", 2),
            "computed_N": say.in_unit(s.effort_predicted, "N", 2),
            "predicted_N": say.in_unit(effort, "N", 2),
            "interval_N": None if p.interval is None else [say.in_unit(v, "N", 2) for v in p.interval],
            "measured_N": say.in_unit(measured_effort, "N", 2),
            "delta_pct": say.in_unit(d.effort, "%", 2),
            "predicted_delta_pct": say.in_unit(
                None if measured_effort is None else measured_effort / effort - 1.0, "%", 2),
            "basis": say.basis_sentence(p.basis) or None,
            "builds_behind": p.n_builds,
            "note": say.prediction_note(p),
        },
        "travel": {
            "master_stroke_used_mm": say.in_unit(s.master_stroke_used, "mm", 3),
            "lost_pad_travel_mm": say.in_unit(s.lost_pad_travel, "mm", 3),
            "slave_mm": say.in_unit(s.slave_travel, "mm", 3),
            "bearing_mm": say.in_unit(s.bearing_travel, "mm", 3),
            "needed_bearing_mm": say.in_unit(s.needed_bearing_travel, "mm", 3),
            "margin_pct": say.in_unit(s.margin, "%", 2),
            "release_point_pct": say.in_unit(s.release_point, "%", 2),
            "measured_slave_mm": say.in_unit(measured.slave_travel if measured else None, "mm", 3),
            "delta_pct": say.in_unit(d.slave_travel, "%", 2),
            "calibrated_slave_mm": say.in_unit(p.slave_travel, "mm", 3),
            "calibrated_margin_pct": say.in_unit(p.travel_margin, "%", 2),
        },
        "pressure_kPa": say.in_unit(s.pressure, "kPa", 1),
        "pressure_worst_kPa": say.in_unit(s.pressure_worst, "kPa", 1),
        "volume": {
            "master_swept_ml": say.in_unit(s.master_swept_volume, "mL", 3),
            "needed_ml": say.in_unit(s.needed_volume, "mL", 3),
            "losses_ml": say.in_unit(s.losses_volume, "mL", 3),
        },
        "pedal": {"floor_gap_mm": say.in_unit(s.floor_gap, "mm", 3)},
        "flags": [
            {"code": f.code, "severity": f.severity, "message": say.flag_sentence(f, primary),
             "values": {v.name: v.value for v in f.values}}
            for f in s.flags
        ],
        "similar": [
            {
                "id": item.id,
                "distance": round(item.distance, 4),
                "differs": [say.difference_words(x, primary) for x in item.differs],
                "measured_effort_N": say.in_unit(item.measured_effort, "N", 2),
                "outcome": item.outcome,
            }
            for item in result.similar
        ],
    }


def describe(result: CheckResult, primary: str) -> str:
    """The technician's view: every figure in both unit systems, flags as sentences.

    Record text is included as it is; the caller makes the whole text terminal-safe.
    """
    s, b, p = result.sizing, result.build, result.prediction

    def q(value: float | None, dimension: str) -> str:
        return say.quantity(value, dimension, primary)

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
    row("Ratios", f"pedal {say.ratio(s.ratio_pedal)} ({s.linkage.mode}), hydraulic "
        f"{say.ratio(s.ratio_hydraulic)}, fork {say.ratio(s.ratio_fork)}, overall "
        f"{say.ratio(s.ratio_overall)}")
    if s.linkage.mode == "layout":
        release = ("never" if s.linkage.ratio_at_release is None
                   else say.ratio(s.linkage.ratio_at_release))
        angle = s.linkage.pushrod_angle_max
        row("", f"pedal ratio at rest {say.ratio(s.linkage.ratio_at_rest)}, at release {release}, "
            f"at stop {say.ratio(s.linkage.ratio_at_stop)}"
            + ("" if angle is None else f"; pushrod up to {q(angle, 'angle')} off axis"))
    row("Effort", f"ideal {q(s.effort_ideal, 'force')}; at the shop default efficiency "
        f"{say.percent(s.efficiency)}, {q(s.effort_predicted, 'force')}")
    if p.effort is not None:
        spread = ("" if p.interval is None else
                  f", likely {q(p.interval[0], 'force')} to {q(p.interval[1], 'force')}")
        row("", f"calibrated {q(p.effort, 'force')}{spread}")
        row("", f"from {say.basis_sentence(p.basis)}")
    else:
        row("", f"no calibrated figure: {say.prediction_note(p)}")
    if b.measured is not None and b.measured.pedal_effort is not None:
        delta = result.deltas.effort
        row("", f"measured {q(b.measured.pedal_effort, 'force')}"
            + ("" if delta is None else f", {say.percent(delta, signed=True)} against "
               f"{q(s.effort_predicted, 'force')}"))
    row("Travel", f"master stroke used {q(s.master_stroke_used, 'length')}, slave "
        f"{q(s.slave_travel, 'length')}" + (" (slave stroke reached)" if s.slave_overtravel else ""))
    row("", f"pad moves {q(s.lost_pad_travel, 'length')} before the master pushes fluid "
        f"(free play {q(s.free_play, 'length')}, dead stroke {q(s.dead_stroke, 'length')})")
    row("", f"bearing {q(s.bearing_travel, 'length')} against "
        f"{q(s.needed_bearing_travel, 'length')} needed: margin "
        f"{say.percent(s.margin, signed=True)}")
    if p.slave_travel is not None:
        row("", f"slave {q(p.slave_travel, 'length')} after the shop's measured travel losses: "
            f"margin {say.percent(p.travel_margin, signed=True)}")
    release = ("never reached" if s.release_point is None
               else f"{say.percent(s.release_point)} of pad travel")
    row("", f"full release at {release}")
    if b.measured is not None and b.measured.slave_travel is not None:
        delta = result.deltas.slave_travel
        row("", f"measured slave travel {q(b.measured.slave_travel, 'length')}"
            + ("" if delta is None else f", {say.percent(delta, signed=True)} against computed"))
    row("Pressure", f"{q(s.pressure, 'pressure')} in the line at peak release load; "
        f"{q(s.pressure_worst, 'pressure')} worst case (friction after the slave)")
    row("Volume", f"master sweeps {q(s.master_swept_volume, 'volume')}, release needs "
        f"{q(s.needed_volume, 'volume')} including {q(s.losses_volume, 'volume')} of hose and "
        "fluid losses")
    row("Pedal", "master does not bottom before the stop" if s.floor_gap <= 0 else
        f"master bottoms {q(s.floor_gap, 'length')} before the floor stop")
    lines.append("")
    if s.flags:
        lines.extend(say.flag_line(flag, primary) for flag in s.flags)
    else:
        lines.append("No flags.")
    if result.similar:
        lines.append("")
        lines.append("Most similar past builds:")
        for item in result.similar:
            effort_text = ("no measured effort" if item.measured_effort is None
                           else f"measured {q(item.measured_effort, 'force')}")
            lines.append(f"  {item.id}  distance {say.factor(item.distance)}  [{item.status}]  "
                         f"{effort_text}; {item.outcome or 'no outcome noted'}")
            lines.append(f"      differs: {say.differences_text(item.differs, primary) or 'nothing on the compared inputs'}")
    return "\n".join(lines)
