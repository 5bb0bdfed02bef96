"""Pedal effort: overall ratio, ideal and predicted effort, effort against pad travel."""
from __future__ import annotations

import bisect

from builder.engine.hydraulics import hydraulic_ratio, line_pressure, losses_volume
from builder.engine.linkage import LeverPedal, SliderCrankPedal
from builder.engine.travel import volume_for_release

CURVE_SAMPLES_LAYOUT = 48  # extra bearing-travel samples where the pedal ratio varies


def overall_ratio(pedal: float, hydraulic: float, fork: float) -> float:
    """Overall force ratio pad to bearing, R = R_p * R_h * R_f (plain ratios).

    Source: ratios of machines in series multiply (Shigley's Mechanical Engineering
    Design, levers; OpenStax College Physics, "Pascal's Principle" for R_h).
    """
    return pedal * hydraulic * fork


def ideal_effort(release_load: float, ratio: float) -> float:
    """Pad force with no friction, F_pad = F_bearing / R.

    release_load in N, ratio R plain; returns N. Source: work balance of an ideal
    machine, F_in * d_in = F_out * d_out (OpenStax College Physics, "Simple Machines").
    """
    return release_load / ratio


def predicted_effort(ideal: float, efficiency: float) -> float:
    """Pad force with losses, F = F_ideal / eta.

    ideal in N, efficiency eta as a fraction (0 < eta <= 1); returns N. Source:
    efficiency of a machine, eta = output work / input work (OpenStax College Physics,
    "Simple Machines").
    """
    return ideal / efficiency


def load_at(curve: tuple[tuple[float, float], ...], clearance: float, bearing: float,
            travels: list[float] | None = None) -> float:
    """Bearing load (N) at bearing travel x_b (m, from rest, the curve's own axis).

    0 before the bearing has taken up its clearance; after it, linear interpolation of
    the record's (travel m, load N) points, held flat beyond either end. Piecewise-
    linear interpolation, no physical law. `travels`: the curve's travels, when the
    caller already has them.
    """
    if bearing < clearance:
        return 0.0
    xs = [x for x, _ in curve] if travels is None else travels
    i = bisect.bisect_right(xs, bearing)
    if i == 0:
        return curve[0][1]
    if i == len(curve):
        return curve[-1][1]
    (x0, f0), (x1, f1) = curve[i - 1], curve[i]
    return f0 + (f1 - f0) * (bearing - x0) / (x1 - x0)


def effort_curve(
    pedal: LeverPedal | SliderCrankPedal,
    curve: tuple[tuple[float, float], ...],
    clearance: float,
    bearing_reached: float,
    stroke_used: float,
    areas: tuple[float, float],
    fork_ratio: float,
    compliance: float,
    efficiency: float,
) -> tuple[tuple[float, float], ...]:
    """Predicted pad effort against pad travel, ((x_pad m, F_pad N), ...), for a plot.

    For each bearing travel x_b up to the travel reached: load F_b from the curve,
    pressure p = F_b / R_f / A_s, master stroke s = (A_s R_f x_b + C p) / A_m, pad travel
    and instantaneous pedal ratio R_p from the linkage, F_pad = F_b / (R_p R_h R_f) / eta.
    areas = (A_master, A_slave) in m^2, compliance C in m^3/Pa. Sources: OpenStax
    College Physics, "Pascal's Principle" and "Simple Machines"; Shigley, levers.
    """
    master_area, slave_area = areas
    hydraulic = hydraulic_ratio(slave_area, master_area)
    travels = {0.0, bearing_reached}
    travels.update(x for x, _ in curve if 0.0 < x < bearing_reached)
    if pedal.mode == "layout":
        step = bearing_reached / CURVE_SAMPLES_LAYOUT
        travels.update(i * step for i in range(1, CURVE_SAMPLES_LAYOUT))
    if 0.0 < clearance < bearing_reached:
        travels.add(clearance)
    samples = []
    curve_travels = [x for x, _ in curve]
    for x_b in sorted(travels):
        load = load_at(curve, clearance, x_b, curve_travels)
        if x_b == clearance and load > 0.0:
            samples.append((x_b, 0.0))  # the step where the bearing meets the fingers
        samples.append((x_b, load))
    points = []
    for x_b, load in samples:
        pressure = line_pressure(load, fork_ratio, slave_area)
        losses = losses_volume(compliance, pressure)
        volume = volume_for_release(x_b, fork_ratio, slave_area, losses)
        pad, ratio = pedal.at_stroke(min(volume / master_area, stroke_used))
        force = ideal_effort(load, overall_ratio(ratio, hydraulic, fork_ratio))
        points.append((pad, predicted_effort(force, efficiency)))
    return tuple(points)
