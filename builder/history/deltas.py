"""Computed against measured: relative deltas for one build."""
from __future__ import annotations

from dataclasses import dataclass

from builder.engine.result import Sizing
from builder.model import Build


@dataclass(frozen=True, slots=True)
class Deltas:
    """(measured - computed) / computed as fractions; None when either side is unknown or
    the computed value is 0 (floor gap of a master that does not bottom early)."""

    effort: float | None  # against Sizing.effort_predicted (the shop default efficiency)
    slave_travel: float | None  # against Sizing.slave_travel
    floor_gap: float | None  # against Sizing.floor_gap


def relative_delta(measured: float | None, computed: float) -> float | None:
    """(measured - computed) / computed, or None when measured is unknown or computed is 0."""
    if measured is None or computed == 0:
        return None
    return (measured - computed) / computed


def deltas(build: Build, sizing: Sizing) -> Deltas:
    """Deltas of a build's measured section against its sizing (all None when unmeasured)."""
    measured = build.measured
    if measured is None:
        return Deltas(None, None, None)
    return Deltas(
        effort=relative_delta(measured.pedal_effort, sizing.effort_predicted),
        slave_travel=relative_delta(measured.slave_travel, sizing.slave_travel),
        floor_gap=relative_delta(measured.floor_gap, sizing.floor_gap),
    )
