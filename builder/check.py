"""`fitment check` and `fitment suggest`: one file (or recorded build) against the shop's
history, as text or JSON.

The verdict: "not_ready" when a fail-severity flag fires (the command exits 3), "warnings"
when a warning flag fires or a rejected build of the same gearbox family and fork direction
used the same master and slave, else "ready". When not ready, the best three suggestions
(builder.history.suggest, catalogue parts) follow.
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from builder import presentation as say
from builder.model import BUILD_ID_PATTERN
from builder.problems import InputError, Problem, nearest

if TYPE_CHECKING:
    from builder.engine import Sizing
    from builder.history import Analysis, Deltas, Prediction, SimilarBuild
    from builder.history.similar import RejectedUse
    from builder.history.suggest import Suggestion, Suggestions
    from builder.model import Build

CHECK_SUGGESTIONS = 3  # suggestions shown by `check` when a build is not ready
VERDICTS = ("ready", "warnings", "not_ready")
EXIT_NOT_READY = 3


@dataclass(frozen=True)
class CheckResult:
    build: Build
    sizing: Sizing
    prediction: Prediction
    deltas: Deltas
    similar: list[SimilarBuild]  # nearest first
    rejected: tuple[RejectedUse, ...] = ()  # rejected builds with this master and slave
    suggestions: Suggestions | None = None  # computed when not ready

    @property
    def verdict(self) -> str:
        return verdict(self.sizing, self.rejected)[0]


def verdict(sizing: Sizing, rejected: tuple = ()) -> tuple[str, tuple[str, ...]]:
    """("ready" | "warnings" | "not_ready", the codes behind it): the fail flags' codes when
    not ready, else the warnings' (say.REJECTED_CODE for a rejected build's combination)."""
    fails = tuple(f.code for f in sizing.flags if f.severity == "fail")
    if fails:
        return "not_ready", fails
    warnings = tuple(f.code for f in sizing.flags if f.severity != "fail")
    if rejected:
        warnings += (say.REJECTED_CODE,)
    return ("warnings", warnings) if warnings else ("ready", ())


def resolve(analysis: Analysis, path: Path) -> Build:
    """The build FILE names: a recorded build of the shop, a proposal anywhere, or, when
    the argument is a build id and no such file exists, the shop's build with that id."""
    from builder.records import load_build_file

    if not path.is_file():
        name = str(path)
        if re.fullmatch(BUILD_ID_PATTERN, name):
            build = analysis.builds.get(name)
            if build is not None:
                return build
            close = nearest(name, analysis.builds, cutoff=0.6)
            hint = f"; nearest: {', '.join(close)}" if close else ""
            raise InputError([Problem(name, 0, 0, "id", f"no build {name} in the records and "
                                      f"no such file{hint}")])
        raise InputError([Problem(name, 0, 0, "file", "no such file")])
    return _recorded(analysis, path) or load_build_file(path, analysis.shop)


def check_file(analysis: Analysis, path: Path, k: int) -> CheckResult:
    """Size FILE (or a recorded build's id): a record of the shop (its own history left out)
    or a proposal anywhere; suggestions follow when it is not ready."""
    return check_build(analysis, resolve(analysis, path), k)


def check_build(analysis: Analysis, build: Build, k: int) -> CheckResult:
    """Size a build against the shop's history, with its verdict and, when it is not
    ready, the best CHECK_SUGGESTIONS suggestions."""
    from builder.history import analyse_proposal
    from builder.history.suggest import suggest

    sizing, prediction, similar, deltas = analyse_proposal(analysis, build, k)
    use = analysis.finished_combinations.use(build.gearbox.family, build.gearbox.fork_tip_moves, build.master,
                           build.slave, exclude_id=build.id)
    suggestions = None
    if verdict(sizing, use.rejected)[0] == "not_ready":
        suggestions = suggest(analysis, build, "catalogue")
    return CheckResult(build, sizing, prediction, deltas, similar, use.rejected, suggestions)


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
    """The `check --json` object: every key present, unknown values null (README, "check --json").

    Numbers are SI-derived (N, mm, kPa, mL, %); messages are worded in the shop's units.
    """
    from builder.history.deltas import relative_delta

    s, b, p, d = result.sizing, result.build, result.prediction, result.deltas
    measured = b.measured
    effort = predicted_effort(result)
    measured_effort = measured.pedal_effort if measured else None
    return {
        "id": b.id,
        "status": b.status,
        "verdict": result.verdict,
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
            "predicted_delta_pct": say.in_unit(relative_delta(measured_effort, effort), "%", 2),
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
                "distance": say.in_unit(item.distance, "1", 4),
                "differs": [say.difference_words(x, primary) for x in item.differs],
                "measured_effort_N": say.in_unit(item.measured_effort, "N", 2),
                "outcome": item.outcome,
                "status": item.status,
            }
            for item in result.similar
        ],
        "rejected_before": [rejected_row(use) for use in result.rejected],
        "suggestions": [] if result.suggestions is None else suggestion_rows(
            result.suggestions, CHECK_SUGGESTIONS, primary),
    }


def rejected_row(use: RejectedUse) -> dict:
    return {"id": use.id, "outcome": use.outcome, "flags": list(use.flags)}


def _value(value, dimension: str | None) -> tuple[float | list | None, str | None]:
    """(JSON number, its unit) for an SI value of `dimension`."""
    unit = {"length": "mm", "area": "mm^2", "force": "N", "pressure": "kPa", "fraction": "%",
            "point": "mm"}.get(dimension)
    if value is None or unit is None:
        return None, unit
    if dimension == "point":
        return [say.in_unit(v, "mm", 3) for v in value], unit
    return say.in_unit(value, unit, 3), unit


def _change_row(change, primary: str) -> dict:
    value, unit = _value(change.value, change.dimension)
    was, _ = _value(change.was, change.dimension)
    return {"what": change.what, "part": change.part, "in_catalogue": change.catalogued,
            "value": value, "was_part": change.was_part, "was": was, "unit": unit,
            "words": say.change_words(change, primary)}


def _miss_row(miss, primary: str) -> dict:
    value, unit = _value(miss.value, miss.dimension)
    limit, _ = _value(miss.limit, miss.dimension)
    return {"rule": miss.rule, "subject": miss.subject, "value": value, "limit": limit,
            "unit": unit, "message": say.miss_words(miss, primary)}


def suggestion_row(row: Suggestion, rank: int | None, recommended: bool,
                   primary: str = "imperial") -> dict:
    """One candidate as `suggest --json` and `check --json` give it; every key present."""
    b, s = row.build, row.sizing
    layout = b.pedal.layout
    return {
        "rank": rank,
        "recommended": recommended,
        "qualifies": row.qualifies,
        "in_catalogue": row.in_catalogue,
        "changes": [_change_row(change, primary) for change in row.changes],
        "summary": say.changes_text(row.changes, primary),
        "master": {"part": b.master.part, "bore_mm": say.in_unit(b.master.bore, "mm", 3)},
        "slave": {"part": b.slave.part, "kind": b.slave.kind,
                  "bore_mm": say.in_unit(b.slave.bore, "mm", 3),
                  "piston_area_mm2": say.in_unit(b.slave.piston_area, "mm^2", 2)},
        "pedal": {"pivot_to_clevis_mm": None if layout is not None else say.in_unit(
                      b.pedal.pivot_to_clevis, "mm", 3),
                  "clevis_mm": None if layout is None else [
                      say.in_unit(v, "mm", 3) for v in layout.clevis],
                  "ratio": say.in_unit(s.ratio_pedal, "1", 4)},
        "effort": {"predicted_N": say.in_unit(row.effort, "N", 2),
                   "interval_N": None if row.interval is None else [
                       say.in_unit(v, "N", 2) for v in row.interval],
                   "computed_N": say.in_unit(s.effort_predicted, "N", 2),
                   "builds_behind": row.prediction.n_builds},
        "margin_pct": say.in_unit(row.margin, "%", 2),
        "release_point_pct": say.in_unit(row.release_point, "%", 2),
        "pressure_worst_kPa": say.in_unit(row.pressure_worst, "kPa", 1),
        "pressure_headroom_pct": say.in_unit(row.headroom, "%", 2),
        "evidence": list(row.evidence),
        "rejected_before": [rejected_row(use) for use in row.rejected],
        "misses": [_miss_row(miss, primary) for miss in row.misses],
        "flags": [{"code": f.code, "severity": f.severity} for f in s.flags],
    }


def suggestion_rows(result: Suggestions, top: int, primary: str = "imperial") -> list[dict]:
    """The rows shown: the first `top`, or the nearest misses when nothing is recommended."""
    recommended = result.recommendation is not None
    return [suggestion_row(row, rank, recommended and rank == 1, primary)
            for rank, row in enumerate(result.shown(top), start=1)]


def suggest_contract(result: Suggestions, build: Build, top: int,
                     primary: str = "imperial") -> dict:
    """The `suggest --json` object; every key present, unknown values null."""
    return {
        "id": build.id,
        "sizes": result.sizes,
        "target_effort_N": say.in_unit(result.target, "N", 2),
        "tried": dict(result.tried),
        "combinations": result.combinations,
        "qualifying": result.qualifying,
        "unsizable": result.unsizable,
        "nothing_qualifies": result.recommendation is None,
        "proposal": suggestion_row(result.proposal, None, False, primary),
        "suggestions": suggestion_rows(result, top, primary),
        "sensitivity": [
            {"what": item.what, "step_mm": say.in_unit(item.step, "mm", 4),
             "effort_change_N": say.in_unit(item.effort_change, "N", 2),
             "margin_change_pct": say.in_unit(item.margin_change, "%", 2)}
            for item in result.sensitivities
        ],
    }


def describe(result: CheckResult, primary: str) -> str:
    """The technician's view: every figure in both unit systems, flags as sentences.

    Record text is included as it is; the caller makes the whole text terminal-safe.
    """
    s, b, p = result.sizing, result.build, result.prediction

    def q(value: float | None, dimension: str) -> str:
        return say.quantity(value, dimension, primary)

    lines: list[str] = [say.verdict_line(*verdict(s, result.rejected)), ""]

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
    row("", "full release never reached" if s.release_point is None
        else f"full release at {say.percent(s.release_point)} of pad travel")
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
    if result.rejected:
        lines.append("")
        lines.append(f"Warning: rejected builds of {b.gearbox.family}, fork tip "
                     f"{b.gearbox.fork_tip_moves}, used this master and slave:")
        lines.extend(f"  {say.rejected_line(use)}" for use in result.rejected)
    if result.suggestions is not None:
        found = result.suggestions
        lines.append("")
        shown = found.shown(CHECK_SUGGESTIONS)
        if found.recommendation is None:
            lines.append(say.no_recommendation_line(
                found, len(shown), "in the catalogue",
                "`fitment suggest --sizes standard` also tries sizes not in the catalogue"))
        else:
            lines.append(f"Best {len(shown)} of {found.combinations} catalogue combinations "
                         f"({found.qualifying} meet the shop's rules; `fitment suggest` lists more):")
        for rank, item in enumerate(shown, start=1):
            lines.extend(say.suggestion_lines(item, rank, primary, recommended=rank == 1
                                              and found.recommendation is not None))
    return "\n".join(lines)
