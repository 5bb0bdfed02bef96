"""Typed, immutable build records in SI units (m, m^2, N, Pa, rad).

`builder.records` produces these from YAML; `builder.engine` reads them. Nothing here
imports pint, YAML or mkdocs. Lengths are metres, areas square metres, forces newtons,
pressures pascals, angles radians, volumes cubic metres.
"""
from __future__ import annotations

import datetime as _dt
import math
from dataclasses import dataclass, field

Point = tuple[float, float]

BUILD_ID_PATTERN = r"^[A-Z]{2,6}-[0-9]{3,6}$"  # also the file name stem
STATUSES = ("draft", "measured", "verified", "rejected")
PUBLISHABLE = ("measured", "verified", "rejected")  # a draft is published only on request
FORK_TIP_MOVES = ("forward", "rearward", "none")
SLAVE_KINDS = ("external", "concentric")
HOSE_KINDS = ("rubber", "braided_ptfe", "steel")
FLUIDS = ("DOT 3", "DOT 4", "DOT 5", "DOT 5.1")
SLAVE_ACTS = ("push", "pull")
PART_KINDS = ("gearboxes", "clutches", "masters", "slaves", "pedals")


def circle_area(bore: float) -> float:
    """Area of a circular piston, A = pi * D^2 / 4.

    bore D in m; returns m^2. Source: area of a circle, as used in OpenStax College
    Physics, "Pascal's Principle" (hydraulic piston areas).
    """
    return math.pi * bore * bore / 4.0


@dataclass(frozen=True, slots=True)
class Gearbox:
    family: str
    variant: str | None
    fork_tip_moves: str  # one of FORK_TIP_MOVES; "none" for a concentric slave
    part: str | None = None


@dataclass(frozen=True, slots=True)
class Clutch:
    release_load: float | None  # N, peak load at the release bearing; may be left out with a curve
    release_travel: float  # m, bearing travel for full release
    clearance: float  # m, bearing travel before it meets the fingers
    # (bearing travel from first contact m, load N)
    load_curve: tuple[tuple[float, float], ...] | None = None
    part: str | None = None
    max_release_travel: float | None = None  # m, maker's limit past contact; fingers over-stroke past it

    @property
    def peak_load(self) -> float:
        """The peak load at the bearing (N): the load curve's highest point when the record
        gives a curve (release_load is then a cross-check), else release_load."""
        if self.load_curve:
            return max(load for _, load in self.load_curve)
        assert self.release_load is not None
        return self.release_load


@dataclass(frozen=True, slots=True)
class Fork:
    pivot_to_slave: float  # m
    pivot_to_bearing: float  # m


@dataclass(frozen=True, slots=True)
class Master:
    bore: float  # m
    stroke: float  # m
    rated_pressure: float | None = None  # Pa
    part: str | None = None
    dead_stroke: float | None = None  # m, piston travel before the compensating port closes

    @property
    def area(self) -> float:
        return circle_area(self.bore)


@dataclass(frozen=True, slots=True)
class Slave:
    kind: str  # one of SLAVE_KINDS
    bore: float | None  # m; None when piston_area is given
    piston_area: float | None  # m^2; an annular concentric slave gives this directly
    stroke: float  # m
    rated_pressure: float | None = None  # Pa
    bracket: str | None = None
    part: str | None = None
    acts: str | None = None  # one of SLAVE_ACTS; None reads as push
    rod_diameter: float | None = None  # m, pull slave: the rod through the fluid side
    preload: float | None = None  # N, concentric slave: internal spring force on the fingers

    @property
    def pulls(self) -> bool:
        return self.acts == "pull"

    @property
    def area(self) -> float:
        """Area the fluid pushes on (m^2): the given piston area, the annulus
        pi / 4 (D^2 - d^2) of a pull slave, else pi D^2 / 4."""
        if self.piston_area is not None:
            return self.piston_area
        assert self.bore is not None
        if self.pulls and self.rod_diameter is not None:
            return circle_area(self.bore) - circle_area(self.rod_diameter)
        return circle_area(self.bore)

    @property
    def equivalent_bore(self) -> float:
        """The bore, or for a slave that gives its piston area the bore of a round piston
        of that area, D = sqrt(4 A / pi) (m)."""
        return self.bore if self.bore is not None else math.sqrt(4.0 * self.piston_area / math.pi)


@dataclass(frozen=True, slots=True)
class Line:
    length: float  # m
    hose: str  # one of HOSE_KINDS
    fluid: str  # one of FLUIDS
    hose_length: float | None = None  # m, the flexible part of length; None: all of it


@dataclass(frozen=True, slots=True)
class PedalLayout:
    """Side view at rest, any consistent 2-D frame (m)."""

    pivot: Point
    pad: Point
    clevis: Point
    pushrod_seat: Point  # pushrod seat in the master piston, at rest
    rotation_to_stop: float  # rad, swing to the floor stop, the way that pushes the master in
    # other clevis holes at rest (the pushrod is set to reach the same seat); `fitment suggest`
    clevis_positions: tuple[Point, ...] | None = None
    bore_axis: float | None = None  # rad, direction of the master's bore axis in the frame;
    # None: from the clevis through the seat at rest


@dataclass(frozen=True, slots=True)
class Pedal:
    pivot_to_pad: float | None  # m; may be omitted when layout is given
    pivot_to_clevis: float | None  # m; may be omitted when layout is given
    pad_travel: float  # m, pad travel from rest to the floor stop
    pushrod: str | None = None
    layout: PedalLayout | None = None  # wins over the two lengths when given
    part: str | None = None
    # m, other pivot-to-clevis holes; with a layout, holes on the line from pivot to clevis
    clevis_positions: tuple[float, ...] | None = None
    free_play: float | None = None  # m, pushrod clearance at the master; None: shop default
    # (pad travel m, force N) measured with the pushrod off; negative where a spring helps
    bare_effort: tuple[tuple[float, float], ...] | None = None


@dataclass(frozen=True, slots=True)
class Measured:
    pedal_effort: float | None = None  # N, peak at the pad
    slave_travel: float | None = None  # m
    pad_travel_to_release: float | None = None  # m
    floor_gap: float | None = None  # m, pad to floor when the master bottoms
    method: str | None = None


@dataclass(frozen=True, slots=True)
class Build:
    id: str
    date: _dt.date | None
    status: str  # one of STATUSES
    technician: str | None
    vehicle: str | None
    gearbox: Gearbox
    clutch: Clutch
    fork: Fork | None  # None for a concentric slave
    master: Master
    slave: Slave
    line: Line
    pedal: Pedal
    measured: Measured | None = None
    outcome: str | None = None
    notes: str | None = None
    path: str = ""  # file the record came from, as given to the loader


@dataclass(frozen=True, slots=True)
class Part:
    """One catalogue entry: its kind, id, an optional label and the resolved section."""

    kind: str  # one of PART_KINDS
    id: str
    label: str | None
    section: Gearbox | Clutch | Master | Slave | Pedal
    path: str = ""


@dataclass(frozen=True, slots=True)
class ShopRules:
    site_title: str
    display_units: str  # "imperial" | "metric"; both are always shown, this one first
    effort_band: tuple[float, float]  # N, (low, high) pedal effort target
    min_travel_margin: float  # fraction, e.g. 0.10 for 10 %
    latest_release_point: float  # fraction of pad travel, e.g. 0.80
    default_efficiency: float  # fraction, used until history calibrates it
    # per hose kind: one figure, m^3 per m of hose per Pa (= m^2/Pa), or points
    # ((pressure Pa, volume per length of hose m^2), ...) with pressure increasing
    hose_expansion: dict[str, float | tuple[tuple[float, float], ...]]
    fluid_bulk_modulus: float | dict[str, float]  # Pa; one figure or one per fluid kind
    line_bore: float  # m, inner diameter of the line, for the fluid volume
    max_pushrod_angle: float  # rad, flag the pushrod past this angle to the bore axis
    target_effort: float | None = None  # N; None: the middle of the effort band
    families: tuple[str, ...] = ()  # gearbox family codes known besides the catalogue's
    publish: tuple[str, ...] = PUBLISHABLE  # statuses the published site shows
    master_dead_stroke: float = 0.0  # m, used when a master gives no dead_stroke
    pushrod_free_play: float = 0.0  # m, used when a pedal gives no free_play
    max_travel_margin: float | None = None  # fraction; warn past it (None: no upper limit)


@dataclass(frozen=True, slots=True)
class Shop:
    """Everything loaded from one records folder."""

    root: str
    rules: ShopRules
    parts: dict[str, dict[str, Part]] = field(default_factory=dict)  # kind -> id -> Part
    builds: tuple[Build, ...] = ()
