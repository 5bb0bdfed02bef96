"""size_build: one build through the whole chain, pedal pad to release bearing."""
from __future__ import annotations

import functools

from builder.engine import flags as checks
from builder.engine.effort import (
    CURVE_SAMPLES, PEAK_SAMPLES, Chain, effort_curve, effort_samples, interpolate, overall_ratio, pad_force, peak_effort,
    predicted_effort,
)
from builder.engine.fork import fork_ratio
from builder.engine.hydraulics import (
    bulk_modulus,
    compression_volume,
    hose_expansion_volume,
    hydraulic_load,
    hydraulic_ratio,
    line_pressure,
    line_volume,
    swept_volume,
    worst_pressure,
)
from builder.engine.linkage import GeometryError, LeverPedal, SliderCrankPedal
from builder.engine.result import Linkage, Sizing
from builder.engine.travel import (
    bearing_travel,
    displaced_volume,
    floor_gap,
    piston_travel,
    pushrod_for_volume,
    release_point,
    slave_travel,
    travel_margin,
    usable_pad_travel,
    volume_for_release,
)
from builder.model import Build, Pedal, ShopRules

HARD_LINE = "steel"  # the hose kind whose figure the hard part of a line takes


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


def line_losses(build: Build, rules: ShopRules, fluid_volume: float):
    """The line's losses as a function of pressure, dV(p) = L_hose v_hose(p) +
    L_hard v_steel(p) + V p / K(fluid) (m^3 from Pa): hose swell over the flexible length
    (the whole line when the record gives no hose_length), the shop's steel figure over
    the rest, compression of fluid_volume V (m^3) in the record's fluid. Sources as
    hydraulics.hose_expansion_volume and hydraulics.compression_volume; the parts add
    (volumes in series)."""
    line = build.line
    hose = line.length if line.hose_length is None else line.hose_length
    hard = line.length - hose
    expansion, steel = rules.hose_expansion[line.hose], rules.hose_expansion[HARD_LINE]
    modulus = bulk_modulus(rules.fluid_bulk_modulus, line.fluid)

    def losses(pressure: float) -> float:
        return (hose_expansion_volume(expansion, hose, pressure)
                + hose_expansion_volume(steel, hard, pressure)
                + compression_volume(fluid_volume, modulus, pressure))

    return losses


def size_build(build: Build, rules: ShopRules, efficiency: float | None = None,
               with_curve: bool = True) -> Sizing:
    """Size one build (the chain in site_src/method.md). efficiency None = rules.default_efficiency.

    with_curve False leaves out the plotted effort-against-pad-travel series
    (effort_curve None) for callers that need only the figures; the headline effort of a
    build with a load curve still comes from the same samples.

    Raises GeometryError (with a reason code) when a pedal layout cannot push the
    master at all.

    Common practice, no source: a 5:1 pedal with equal bores and no fork turns a 100 lbf
    release into 20 lbf at the pad; 1 mm of free play and 1.5 mm of dead stroke cost
    5 * 2.5 = 12.5 mm of pad travel.

    >>> from builder.model import Build, Clutch, Gearbox, Line, Master, Pedal, ShopRules, Slave
    >>> build = Build("DC-001", None, "draft", None, None, Gearbox("ZZ-1", None, "none"),
    ...               Clutch(444.82, 0.007, 0.001), None, Master(0.019, 0.032),
    ...               Slave("concentric", 0.019, None, 0.030), Line(1.0, "steel", "DOT 4"),
    ...               Pedal(0.25, 0.05, 0.15, free_play=0.001))
    >>> rules = ShopRules("shop", "metric", (50.0, 200.0), 0.1, 0.9, 0.8,
    ...                   {"rubber": 0.0, "braided_ptfe": 0.0, "steel": 0.0}, float("inf"),
    ...                   0.003, 0.09, master_dead_stroke=0.0015)
    >>> s = size_build(build, rules)
    >>> round(s.effort_ideal / 4.4482216, 3), round(s.lost_pad_travel * 1e3, 3)
    (20.0, 12.5)
    """
    eff = rules.default_efficiency if efficiency is None else efficiency
    clutch, master, slave, line = build.clutch, build.master, build.slave, build.line
    pedal = pedal_linkage(build.pedal)
    dead = rules.master_dead_stroke if master.dead_stroke is None else master.dead_stroke
    play = rules.pushrod_free_play if build.pedal.free_play is None else build.pedal.free_play
    preload = 0.0 if slave.preload is None else slave.preload
    clearance = 0.0 if slave.preload is not None else clutch.clearance

    master_area, slave_area = master.area, slave.area
    r_h = hydraulic_ratio(slave_area, master_area)
    r_f = fork_ratio(build.fork)
    pressure = line_pressure(hydraulic_load(clutch.peak_load, preload), r_f, slave_area)

    master_swept = swept_volume(master_area, master.stroke)
    fluid = line_volume(rules.line_bore, line.length) + master_swept + swept_volume(
        slave_area, slave.stroke
    )
    losses_at = line_losses(build, rules, fluid)
    losses = losses_at(pressure)
    needed_bearing = clearance + clutch.release_travel
    needed_volume = volume_for_release(needed_bearing, r_f, slave_area, losses)

    # pushrod travel: at the stop, and where the piston bottoms
    rod_at_bottom = master.stroke + play
    bottoms_early = pedal.stroke_at_stop > rod_at_bottom
    rod_used = rod_at_bottom if bottoms_early else pedal.stroke_at_stop
    piston_used = piston_travel(rod_used, play, master.stroke)
    pad_used, _ = pedal.at_stroke(rod_used)
    _, ratio_rest = pedal.at_stroke(0.0)
    usable = usable_pad_travel(pedal.pad_travel_at_stop, pad_used)
    lost, _ = pedal.at_stroke(min(play + dead, rod_used))

    slave_reach = slave_travel(displaced_volume(master_area, piston_used, dead), losses,
                               slave_area)
    overtravel = slave_reach > slave.stroke
    slave_moved = slave.stroke if overtravel else slave_reach
    bearing = bearing_travel(slave_moved, r_f)

    rod_needed = pushrod_for_volume(needed_volume, master_area, dead, play)
    releases = rod_needed <= rod_used and needed_bearing * r_f <= slave.stroke
    pad_release = ratio_release = point = None
    if releases:
        pad_release, ratio_release = pedal.at_stroke(rod_needed)
        point = release_point(pad_release, usable)

    bare = build.pedal.bare_effort
    curve = None
    if clutch.load_curve:
        chain = Chain(pedal, clutch.load_curve, clearance, preload, master_area, slave_area,
                      r_f, dead, play, bare, losses_at)
        samples = effort_samples(chain, bearing, lost,
                                 CURVE_SAMPLES if with_curve else PEAK_SAMPLES)
        effort, effort_pad, ratio_effort = peak_effort(chain, samples)
        if with_curve:
            curve = effort_curve(samples, eff)
    else:  # the peak load, at the release point (where the travel ends if it never releases)
        effort_pad, ratio_effort = pedal.at_stroke(rod_needed if releases else rod_used)
        effort = pad_force(hydraulic_load(clutch.peak_load, preload), ratio_effort, r_h, r_f,
                           interpolate(bare, effort_pad) if bare else 0.0)

    rest, stop = pedal.poses()
    linkage = Linkage(
        mode=pedal.mode,
        ratio_at_rest=ratio_rest,
        ratio_at_release=ratio_release,
        ratio_at_stop=pedal.at_stroke(pedal.stroke_at_stop)[1],
        ratio_average=pad_used / rod_used,  # > 0: a pedal moves its pushrod
        pushrod_angle_max=pedal.pushrod_angle_max(rod_used),
        sweep=pedal.sweep(),
        rest=rest,
        stop=stop,
    )
    sizing = Sizing(
        build_id=build.id,
        ratio_pedal=ratio_effort,
        ratio_hydraulic=r_h,
        ratio_fork=r_f,
        ratio_overall=overall_ratio(ratio_effort, r_h, r_f),
        efficiency=eff,
        effort_ideal=effort,
        effort_predicted=predicted_effort(effort, eff),
        master_area=master_area,
        slave_area=slave_area,
        master_stroke_used=piston_used,
        slave_travel=slave_moved,
        slave_overtravel=overtravel,
        bearing_travel=bearing,
        needed_bearing_travel=needed_bearing,
        margin=travel_margin(bearing, needed_bearing),
        release_point=point,
        pad_travel_to_release=pad_release,
        pressure=pressure,
        master_swept_volume=displaced_volume(master_area, master.stroke, dead),
        needed_volume=needed_volume,
        losses_volume=losses,
        floor_gap=floor_gap(pedal.pad_travel_at_stop, pad_used) if bottoms_early else 0.0,
        effort_curve=curve,
        linkage=linkage,
        flags=(),
        pressure_worst=worst_pressure(pressure, eff),
        lost_pad_travel=lost,
        usable_pad_travel=usable,
        effort_pad_travel=effort_pad,
        dead_stroke=dead,
        free_play=play,
        clearance=clearance,
    )
    found = (
        checks.travel_flags(sizing, rules, build)
        + checks.effort_flags(sizing, rules)
        + checks.pressure_flags(sizing, build)
        + checks.linkage_flags(sizing, build, rules, pedal)
    )
    if found:  # finish construction: the checks read the sizing they belong to
        object.__setattr__(sizing, "flags", tuple(found))
    return sizing
