"""The fitment reference: finished builds grouped into combinations, by numbers.

A combination is one gearbox family and fork direction with one master, one slave and one
pedal. Parts from the catalogue are the same part by id; parts written out in the record
are the same when their bores (or piston areas) agree within a tolerance, and a pedal
within a pedal ratio tolerance, so `0.874 in` and `0.875 in` bores share a row. The figures
per row are the median measured effort (numpy.median) and the least computed travel margin.
The published reference groups only the builds the shop publishes.
"""
from __future__ import annotations

from collections import defaultdict
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from builder.engine.result import Sizing
from builder.model import Build

REFERENCE_STATUSES = ("verified", "rejected")
BORE_TOLERANCE = 0.0254e-3 * 2  # m: 0.002 in; bores closer than this are the same bore
AREA_TOLERANCE = 0.005  # relative, for piston areas
RATIO_TOLERANCE = 0.05  # pedal ratios closer than this are the same pedal


@dataclass(frozen=True, slots=True)
class Combination:
    """One row of the reference: what was fitted and how the builds behind it came out."""

    family: str
    fork_tip_moves: str
    master_part: str | None
    master_bore: float  # m
    slave_part: str | None
    slave_bore: float | None  # m; None when the slave gives its piston area
    slave_area: float  # m^2
    pedal_part: str | None
    pedal_ratio: float
    builds: tuple[Build, ...]  # newest first
    median_measured_effort: float | None  # N
    least_margin: float  # fraction
    verified: int
    rejected: int


def within(a: float | None, b: float | None, tolerance: float, relative: bool = False) -> bool:
    """Whether two figures are the same within a tolerance (absolute, or relative to the
    larger); two unknown figures are the same, an unknown and a known one are not."""
    if a is None or b is None:
        return a is b
    return abs(a - b) <= (tolerance * max(abs(a), abs(b)) if relative else tolerance)


def _same(a: tuple[Build, Sizing], b: tuple[Build, Sizing]) -> bool:
    (x, xs), (y, ys) = a, b
    return (x.master.part == y.master.part and x.slave.part == y.slave.part
            and x.pedal.part == y.pedal.part
            and within(x.master.bore, y.master.bore, BORE_TOLERANCE)
            and within(x.slave.bore, y.slave.bore, BORE_TOLERANCE)
            and within(x.slave.area, y.slave.area, AREA_TOLERANCE, relative=True)
            and within(xs.ratio_pedal, ys.ratio_pedal, RATIO_TOLERANCE))


def combinations(pairs: Sequence[tuple[Build, Sizing]]) -> dict[tuple[str, str], list[Combination]]:
    """(family, fork direction) -> combinations, sorted by master bore, slave area, pedal
    ratio; only builds with a status in REFERENCE_STATUSES."""
    grouped: dict[tuple[str, str], list[list[tuple[Build, Sizing]]]] = defaultdict(list)
    for pair in sorted(pairs, key=lambda p: p[0].id):
        build = pair[0]
        if build.status not in REFERENCE_STATUSES:
            continue
        rows = grouped[(build.gearbox.family, build.gearbox.fork_tip_moves)]
        match = next((row for row in rows if _same(row[0], pair)), None)
        if match is None:
            rows.append([pair])
        else:
            match.append(pair)
    return {key: sorted((_combination(row) for row in rows),
                        key=lambda c: (c.master_bore, c.slave_area, c.pedal_ratio))
            for key, rows in sorted(grouped.items())}


def _combination(row: list[tuple[Build, Sizing]]) -> Combination:
    first, sizing = row[0]
    efforts = [b.measured.pedal_effort for b, _ in row
               if b.measured is not None and b.measured.pedal_effort is not None]
    builds = tuple(sorted((b for b, _ in row), key=lambda b: (b.date is not None, b.date, b.id),
                          reverse=True))
    return Combination(
        family=first.gearbox.family, fork_tip_moves=first.gearbox.fork_tip_moves,
        master_part=first.master.part, master_bore=first.master.bore,
        slave_part=first.slave.part, slave_bore=first.slave.bore, slave_area=first.slave.area,
        pedal_part=first.pedal.part, pedal_ratio=sizing.ratio_pedal, builds=builds,
        median_measured_effort=float(np.median(efforts)) if efforts else None,
        least_margin=min(s.margin for _, s in row),
        verified=sum(b.status == "verified" for b, _ in row),
        rejected=sum(b.status == "rejected" for b, _ in row),
    )
