"""Invented builds and sizings for the history tests (no tests here, only makers).

All values are invented; lengths in m, forces in N, as builder.model requires.
"""
from __future__ import annotations

from builder.engine.result import Linkage, Sizing
from builder.model import (
    Build, Clutch, Fork, Gearbox, Line, Master, Measured, Pedal, Slave,
)
from factories import INCH


def make_build(build_id: str, family: str = "QX-5", status: str = "measured",
               effort: float | None = 120.0, slave_travel: float | None = 0.020,
               fork_tip: str = "rearward", slave_kind: str = "external",
               master_bore: float = 0.75 * INCH, slave_bore: float | None = 0.875 * INCH,
               piston_area: float | None = None, release_load: float = 1800.0,
               floor_gap: float | None = None, measured: bool = True,
               outcome: str | None = "full release") -> Build:
    """A build record; `measured=False` leaves the measured section out."""
    return Build(
        id=build_id,
        date=None,
        status=status,
        technician="ZZ",
        vehicle="invented test coupe",
        gearbox=Gearbox(family=family, variant=None, fork_tip_moves=fork_tip),
        clutch=Clutch(release_load=release_load, release_travel=0.008, clearance=0.0015),
        fork=None if slave_kind == "concentric" else Fork(0.14, 0.07),
        master=Master(bore=master_bore, stroke=0.035),
        slave=Slave(kind=slave_kind, bore=slave_bore, piston_area=piston_area, stroke=0.028),
        line=Line(length=1.0, hose="braided_ptfe", fluid="DOT 4"),
        pedal=Pedal(pivot_to_pad=0.285, pivot_to_clevis=0.053, pad_travel=0.15),
        measured=Measured(pedal_effort=effort, slave_travel=slave_travel, floor_gap=floor_gap)
        if measured else None,
        outcome=outcome,
    )


def make_sizing(build_id: str, effort_ideal: float = 100.0, slave_travel: float = 0.020,
                ratio_pedal: float = 5.4, ratio_overall: float = 14.6,
                effort_predicted: float | None = None, floor_gap: float = 0.0) -> Sizing:
    """A sizing with the fields history reads set; the rest plausible and fixed."""
    linkage = Linkage(mode="simple", ratio_at_rest=ratio_pedal, ratio_at_release=ratio_pedal,
                      ratio_at_stop=ratio_pedal, ratio_average=ratio_pedal,
                      pushrod_angle_max=None, sweep=(), rest=None, stop=None)
    return Sizing(
        build_id=build_id, ratio_pedal=ratio_pedal, ratio_hydraulic=1.36, ratio_fork=2.0,
        ratio_overall=ratio_overall, efficiency=0.85, effort_ideal=effort_ideal,
        effort_predicted=effort_ideal / 0.85 if effort_predicted is None else effort_predicted,
        master_area=2.85e-4, slave_area=3.88e-4, master_stroke_used=0.028,
        slave_travel=slave_travel, slave_overtravel=False, bearing_travel=slave_travel / 2,
        needed_bearing_travel=0.0095, margin=0.05, release_point=0.7,
        pad_travel_to_release=0.105, pressure=2.3e6, master_swept_volume=1.0e-5,
        needed_volume=7.5e-6, losses_volume=2.0e-7, floor_gap=floor_gap, effort_curve=None,
        linkage=linkage, flags=(),
    )


def history(efficiencies: dict[str, list[float]], effort_ideal: float = 100.0,
            travel_factors: dict[str, list[float]] | None = None):
    """(build, sizing) pairs with the given apparent efficiencies per family.

    Measured effort = ideal / efficiency, so calibrate() sees exactly these efficiencies;
    build ids are FAM-001.. in order, the family code with its dash removed.
    """
    pairs = []
    for family, values in efficiencies.items():
        factors = (travel_factors or {}).get(family, [1.0] * len(values))
        for n, (efficiency, factor) in enumerate(zip(values, factors), start=1):
            build_id = f"{family.replace('-', '')[:6]}-{n:03d}"
            build = make_build(build_id, family=family, effort=effort_ideal / efficiency,
                               slave_travel=0.020 * factor)
            pairs.append((build, make_sizing(build_id, effort_ideal=effort_ideal)))
    return pairs
