"""size_build: one build through the whole chain, pedal pad to release bearing."""
from __future__ import annotations

import functools

from builder.engine import flags as checks
from builder.engine.effort import effort_curve, ideal_effort, overall_ratio, predicted_effort
from builder.engine.fork import fork_ratio
from builder.engine.hydraulics import (
    hydraulic_ratio,
    line_compliance,
    line_pressure,
    line_volume,
    losses_volume,
    swept_volume,
)
from builder.engine.linkage import GeometryError, LeverPedal, SliderCrankPedal
from builder.engine.result import Linkage, Sizing
from builder.engine.travel import (
    bearing_travel,
    floor_gap,
    slave_travel,
    travel_margin,
    volume_for_release,
)
from builder.model import Build, Pedal, ShopRules


@functools.lru_cache(maxsize=256)
def pedal_linkage(pedal: Pedal) -> LeverPedal | SliderCrankPedal:
    """The layout when the record gives one, else the two lever lengths.

    Made once per pedal (a frozen record; the linkage is not changed after it is made):
    `fitment suggest` sizes hundreds of masters and slaves behind the same pedal."""
    if pedal.layout is not None:
        return SliderCrankPedal(pedal.layout)
    if pedal.pivot_to_pad is None or pedal.pivot_to_clevis is None:
        raise GeometryError("no-lengths")
    return LeverPedal(pedal.pivot_to_pad, pedal.pivot_to_clevis, pedal.pad_travel)


def size_build(build: Build, rules: ShopRules, efficiency: float | None = None,
               with_curve: bool = True) -> Sizing:
    """Size one build (DESIGN section 4). efficiency None = rules.default_efficiency.

    with_curve False leaves out the plotted effort-against-pad-travel series
    (effort_curve None), about half the cost of a build with a load curve, for callers
    that need only the figures.

    Raises GeometryError (with a reason code) when a pedal layout cannot push the
    master at all.
    """
    eff = rules.default_efficiency if efficiency is None else efficiency
    clutch, master, slave, line = build.clutch, build.master, build.slave, build.line
    pedal = pedal_linkage(build.pedal)

    master_area, slave_area = master.area, slave.area
    r_h = hydraulic_ratio(slave_area, master_area)
    r_f = fork_ratio(build.fork)
    pressure = line_pressure(clutch.release_load, r_f, slave_area)

    master_swept = swept_volume(master_area, master.stroke)
    fluid = line_volume(rules.line_bore, line.length) + master_swept + swept_volume(
        slave_area, slave.stroke
    )
    compliance = line_compliance(
        rules.hose_expansion[line.hose], line.length, fluid, rules.fluid_bulk_modulus
    )
    losses = losses_volume(compliance, pressure)
    needed_bearing = clutch.clearance + clutch.release_travel
    needed_volume = volume_for_release(needed_bearing, r_f, slave_area, losses)

    bottoms_early = pedal.stroke_at_stop > master.stroke
    stroke_used = master.stroke if bottoms_early else pedal.stroke_at_stop
    pad_used, _ = pedal.at_stroke(stroke_used)
    _, ratio_rest = pedal.at_stroke(0.0)
    r_p = pad_used / stroke_used if stroke_used > 0.0 else ratio_rest

    slave_reach = slave_travel(master_area * stroke_used, losses, slave_area)
    overtravel = slave_reach > slave.stroke
    slave_moved = slave.stroke if overtravel else slave_reach
    bearing = bearing_travel(slave_moved, r_f)

    stroke_needed = needed_volume / master_area
    releases = stroke_needed <= stroke_used and needed_bearing * r_f <= slave.stroke
    pad_release = ratio_release = release_point = None
    if releases:
        pad_release, ratio_release = pedal.at_stroke(stroke_needed)
        release_point = pad_release / pedal.pad_travel_at_stop

    ratio = overall_ratio(r_p, r_h, r_f)
    effort = ideal_effort(clutch.release_load, ratio)
    curve = None
    if clutch.load_curve and with_curve:
        curve = effort_curve(
            pedal, clutch.load_curve, clutch.clearance, bearing, stroke_used,
            (master_area, slave_area), r_f, compliance, eff,
        )
    rest, stop = pedal.poses()
    linkage = Linkage(
        mode=pedal.mode,
        ratio_at_rest=ratio_rest,
        ratio_at_release=ratio_release,
        ratio_at_stop=pedal.at_stroke(pedal.stroke_at_stop)[1],
        ratio_average=r_p,
        pushrod_angle_max=pedal.pushrod_angle_max(stroke_used),
        sweep=pedal.sweep(),
        rest=rest,
        stop=stop,
    )
    sizing = Sizing(
        build_id=build.id,
        ratio_pedal=r_p,
        ratio_hydraulic=r_h,
        ratio_fork=r_f,
        ratio_overall=ratio,
        efficiency=eff,
        effort_ideal=effort,
        effort_predicted=predicted_effort(effort, eff),
        master_area=master_area,
        slave_area=slave_area,
        master_stroke_used=stroke_used,
        slave_travel=slave_moved,
        slave_overtravel=overtravel,
        bearing_travel=bearing,
        needed_bearing_travel=needed_bearing,
        margin=travel_margin(bearing, needed_bearing),
        release_point=release_point,
        pad_travel_to_release=pad_release,
        pressure=pressure,
        master_swept_volume=master_swept,
        needed_volume=needed_volume,
        losses_volume=losses,
        floor_gap=floor_gap(pedal.pad_travel_at_stop, pad_used) if bottoms_early else 0.0,
        effort_curve=curve,
        linkage=linkage,
        flags=(),
    )
    found = (
        checks.travel_flags(sizing, rules)
        + checks.effort_flags(sizing, rules)
        + checks.pressure_flags(sizing, build)
        + checks.linkage_flags(sizing, build, rules, pedal)
    )
    if found:  # finish construction: the checks read the sizing they belong to
        object.__setattr__(sizing, "flags", tuple(found))
    return sizing
