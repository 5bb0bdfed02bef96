"""What the engine returns: plain frozen dataclasses of SI floats."""
from __future__ import annotations

from dataclasses import dataclass

Point = tuple[float, float]


@dataclass(frozen=True, slots=True)
class Figure:
    """One quantity a flag speaks of: its name in the flag, SI value and dimension."""

    name: str  # e.g. "bearing", "needed", "margin"
    value: float  # SI: m, N, Pa, m^3, rad; a plain fraction for "fraction"
    dimension: str  # "length" | "force" | "pressure" | "volume" | "angle" | "fraction"


@dataclass(frozen=True, slots=True)
class Flag:
    """A check that fired: a code of our own, its severity and the quantities behind it.

    builder.presentation words it; nothing here is a sentence.
    """

    code: str  # e.g. "travel-short"
    severity: str  # "warn" | "fail"
    values: tuple[Figure, ...] = ()
    subject: str | None = None  # which part, where a code can concern several ("master", "slave")
    basis: str = "computed"  # "computed" (engine), "calibrated" or "after_losses" (history)

    def value(self, name: str) -> float:
        """The SI value of the figure called `name`."""
        return next(figure.value for figure in self.values if figure.name == name)


@dataclass(frozen=True, slots=True)
class LinkagePose:
    """Pedal linkage points in the record's frame (m), for drawing."""

    pivot: Point
    pad: Point
    clevis: Point
    pushrod_seat: Point


@dataclass(frozen=True, slots=True)
class Linkage:
    mode: str  # "simple" | "layout"
    ratio_at_rest: float
    ratio_at_release: float | None  # None when the clutch never releases
    ratio_at_stop: float
    ratio_average: float  # over the used pad travel
    pushrod_angle_max: float | None  # rad, largest angle to the bore axis (layout mode)
    # (pad travel m, master stroke m, instantaneous ratio, pushrod angle rad) through the swing
    sweep: tuple[tuple[float, float, float, float], ...]
    rest: LinkagePose  # layout mode: the record's frame; simple mode: a schematic
    stop: LinkagePose  # where the pedal would be at its stop, master bottoming ignored


@dataclass(frozen=True, slots=True)
class Sizing:
    build_id: str
    # ratios
    ratio_pedal: float  # instantaneous, where the headline effort is taken
    ratio_hydraulic: float
    ratio_fork: float
    ratio_overall: float
    # effort, N
    efficiency: float  # the one used for effort_predicted
    effort_ideal: float  # peak over the stroke of the pad force, no friction
    effort_predicted: float
    # areas m^2
    master_area: float
    slave_area: float
    # travel, m (fractions where named so)
    master_stroke_used: float  # piston travel at the stop (or its full stroke when it bottoms)
    slave_travel: float
    slave_overtravel: bool  # slave stroke capped the travel
    bearing_travel: float
    needed_bearing_travel: float
    margin: float  # fraction: bearing_travel / needed - 1
    release_point: float | None  # fraction of the usable pad travel; None: never releases
    pad_travel_to_release: float | None  # m
    # pressure, Pa
    pressure: float  # static, at the peak load (the fluid's share of it)
    # volumes, m^3
    master_swept_volume: float  # A_master * (full stroke - dead stroke): what it can push
    needed_volume: float  # volume the master must push for full release, losses included
    losses_volume: float  # hose expansion + fluid compression
    # pedal, m
    floor_gap: float  # 0 when the master does not bottom early
    # (pad travel m, pad effort N) from the load curve; None without one
    effort_curve: tuple[tuple[float, float], ...] | None
    linkage: Linkage
    flags: tuple[Flag, ...]
    # (defaults: for makers of sizings outside the engine; size_build sets every one)
    pressure_worst: float | None = None  # Pa, static / efficiency; ratings are checked on it
    lost_pad_travel: float = 0.0  # m, pad travel before the master pushes fluid
    usable_pad_travel: float | None = None  # m, to the stop or where the master bottoms
    effort_pad_travel: float | None = None  # m, where the headline effort is taken
    dead_stroke: float = 0.0  # m, the master's, as used
    free_play: float = 0.0  # m, the pushrod's, as used
    clearance: float = 0.0  # m, as used (0 when a concentric slave's preload holds the bearing on)
