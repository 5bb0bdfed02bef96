"""Suggestions: which master, slave and clevis hole to order for a proposal.

Numbers and codes only; builder.presentation words them.

What varies. The proposal keeps what the car fixes (gearbox, clutch, fork, line, pedal box)
and the master and the slave vary over every catalogue part of their kind (a slave keeps its
kind, external or concentric, and the way it acts where the record says so), plus, with
sizes "standard", the common bores the catalogue lacks: 1/16 in steps from 5/8 in to
1-1/8 in and whole millimetres from 15 mm to 28 mm (common practice, no source), each
written as the proposal's own cylinder with that bore (its stroke, rating and every other
field kept) and marked not catalogued. A bore within 0.002 in of one already tried is not
tried again. A slave given by piston area (an annular concentric slave) varies over the
catalogue only. Where the pedal lists other clevis holes (`pedal.clevis_positions`, lengths
from the pivot; on a layout pedal, holes on the line from the pivot through the clevis; or
`pedal.layout.clevis_positions`, points in the layout frame with the pushrod set to reach the
same seat), each hole is tried with each pair. (A layout's bore axis runs from the clevis at
rest through the seat, so for another hole it is the line from that hole through the same
seat: a hole a few millimetres away turns it by a degree or two.) The proposal as it stands is a candidate too when it qualifies (it is
always judged and shown apart).

How each is judged. Every candidate is sized by the engine (`builder.engine.size_build`),
predicted with the shop's calibration (`Calibration.predict`, interval included) and its
flags judged on history (`judged_on_history`), exactly as `fitment check` does. Its figures:

- effort: the calibrated prediction, or the engine's effort at the shop default efficiency
  when history is too thin;
- margin: the smaller of the engine's travel margin and the margin after the shop's
  measured travel losses (the one travel-short is judged on);
- worst-case pressure: static line pressure / efficiency (the calibrated efficiency, ideal
  effort / calibrated effort, else the shop default), as site_src/method.md defines it;
- pressure headroom: the lowest rating of master and slave / worst-case pressure - 1
  (None without a rating).

It qualifies when it misses no rule:

- effort-high / effort-low: the effort inside the shop's band;
- travel-short: margin at least the shop's minimum; travel-over: at most the shop's
  `max_travel_margin`, where the shop rules have one;
- release-late: the release point not later than the shop's latest (a clutch that never
  fully releases misses it too);
- pressure-over-rating: the worst-case pressure at most each rating given;
- master-bottoms-early: the master does not bottom before the pedal stop;
- and no other fail-severity flag (slave overtravel, a linkage over centre, a master too
  small for the volume while the margin rule is met, ...), each a miss under its flag code.

How far a candidate misses (for the nearest misses) is the sum over its misses of how far
past each rule it lies, as a fraction: effort / high - 1 (or low / effort - 1), margin points
short or over, release points late, worst-case pressure / rating - 1, floor gap / pad travel,
and 1.0 for any other fail flag. Rules of our own.

Order. Qualifying candidates first; among them, predicted effort nearest the shop's target
(`target_effort`, default the middle of the band), in steps of 5 % of the target (common
practice, no source: a driver does not feel less), and within one step, more evidence first
(measured or verified builds of the same family and fork direction that used the same master
and slave, `builder.history.similar.Combinations`), then the nearer effort. A qualifying
candidate whose master and slave a rejected build of the same family and fork direction used
comes last among the qualifying ones, shown with that build's outcome and flags, and is never
the recommendation. Candidates that miss follow, nearest miss first (those a rejected build
used after the others). Ties: fewer changes, catalogue parts before standard sizes, then the
parts' ids and sizes.

Sensitivities of the proposal: the change in effort and margin from one 1/16 in step up of
the master bore, and of the slave bore (not for a slave given by piston area).
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, replace

from builder.engine import GeometryError, size_build
from builder.engine.result import Sizing
from builder.history.analysis import Analysis, UnsizableBuilds, judged_on_history
from builder.history.calibration import Prediction
from builder.history.reference import AREA_TOLERANCE, BORE_TOLERANCE
from builder.history.similar import CombinationUse, RejectedUse
from builder.model import Build, Master, Pedal, ShopRules, Slave

Point = tuple[float, float]

INCH = 0.0254  # m, exact (NIST SP 811, appendix B)
STANDARD_INCH_BORES = tuple(sixteenths * INCH / 16 for sixteenths in range(10, 19))  # 5/8..1-1/8
STANDARD_MM_BORES = tuple(mm / 1000.0 for mm in range(15, 29))  # 15..28 mm
BORE_STEP = INCH / 16  # the sensitivity step
EFFORT_STEP = 0.05  # efforts within 5 % of the target of each other are equally near
SIZES = ("catalogue", "standard")
NEAREST_MISSES = 3
SAME_POINT = 1e-4  # m: a clevis hole this close to the one in use is that one
OTHER_FLAG_MISS = 1.0  # how far a candidate misses per other fail flag
COVERED_FLAGS = ("effort-high", "effort-low", "travel-short", "release-late",
                 "pressure-over-rating", "master-bottoms-early")  # judged by a rule above


@dataclass(frozen=True, slots=True)
class Change:
    """One thing a candidate changes from the proposal.

    what: "master", "slave" or "clevis". value and was: a bore (m), a piston area (m^2)
    for a slave given by area, a pivot-to-clevis length (m), or a clevis point (m, layout
    frame), as `dimension` says ("length", "area" or "point").
    """

    what: str
    part: str | None  # the catalogue part ordered instead; None for a size or a clevis hole
    catalogued: bool  # False: a standard size not in the catalogue
    value: float | Point
    dimension: str
    was_part: str | None
    was: float | Point
    stroke: float | None = None  # m, a cylinder's stroke
    was_stroke: float | None = None

    @property
    def same_size(self) -> bool:
        """A cylinder of the size it replaces (another part, stroke or rating)."""
        if self.what == "clevis" or self.dimension == "point":
            return False
        tolerance = BORE_TOLERANCE if self.dimension == "length" else AREA_TOLERANCE * self.was
        return abs(self.value - self.was) <= tolerance


@dataclass(frozen=True, slots=True)
class Miss:
    """A shop rule a candidate misses: its code, the candidate's value and the rule's limit
    (SI, in `dimension`; None where there is no number) and how far past it (a fraction)."""

    rule: str
    value: float | None
    limit: float | None
    dimension: str | None
    shortfall: float
    subject: str | None = None  # "master" or "slave" for a pressure rating


@dataclass(frozen=True, slots=True)
class Suggestion:
    """One candidate sized, predicted and judged."""

    build: Build  # the proposal with the candidate's master, slave and pedal
    changes: tuple[Change, ...]  # empty: the proposal as it stands
    sizing: Sizing  # flags judged on history
    prediction: Prediction
    effort: float  # N: calibrated, else the engine's at the shop default efficiency
    margin: float  # fraction: the smaller of the engine's and the after-losses margin
    pressure_worst: float  # Pa
    headroom: float | None  # fraction: lowest rating / worst-case pressure - 1
    misses: tuple[Miss, ...]
    use: CombinationUse  # finished builds with this master and slave on this gearbox

    @property
    def qualifies(self) -> bool:
        return not self.misses

    @property
    def release_point(self) -> float | None:
        return self.sizing.release_point

    @property
    def interval(self) -> tuple[float, float] | None:
        return self.prediction.interval

    @property
    def evidence(self) -> tuple[str, ...]:
        return self.use.evidence

    @property
    def rejected(self) -> tuple[RejectedUse, ...]:
        return self.use.rejected

    @property
    def in_catalogue(self) -> bool:
        return all(change.catalogued for change in self.changes)

    @property
    def miss_total(self) -> float:
        return sum(miss.shortfall for miss in self.misses)


@dataclass(frozen=True, slots=True)
class Sensitivity:
    """What one step up of a bore does to the proposal: effort (N) and margin (fraction)."""

    what: str  # "master" | "slave"
    step: float  # m
    effort_change: float
    margin_change: float


@dataclass(frozen=True)
class Suggestions:
    proposal: Suggestion  # the proposal as it stands, judged the same way
    ranked: tuple[Suggestion, ...]  # every candidate that sized, in the module's order
    target: float  # N
    sizes: str  # "catalogue" | "standard"
    tried: dict[str, int]  # "masters", "slaves", "clevis": how many of each were tried
    combinations: int  # sized, the proposal included
    unsizable: int  # candidates whose pedal could not push the master
    sensitivities: tuple[Sensitivity, ...]

    @property
    def recommendation(self) -> Suggestion | None:
        """The first row when it qualifies and no rejected build used it, else None."""
        first = self.ranked[0] if self.ranked else None
        return first if first is not None and first.qualifies and not first.rejected else None

    @property
    def qualifying(self) -> int:
        return sum(row.qualifies for row in self.ranked)

    def shown(self, top: int) -> tuple[Suggestion, ...]:
        """The rows to show: the first `top`, or when nothing is recommended (nothing
        qualifies, or only what a rejected build used) the first three at most."""
        count = top if self.recommendation is not None else min(top, NEAREST_MISSES)
        return self.ranked[:count]


def target_effort(rules: ShopRules) -> float:
    """The shop's target effort (N): `target_effort`, or the middle of the effort band."""
    if rules.target_effort is not None:
        return rules.target_effort
    low, high = rules.effort_band
    return 0.5 * (low + high)


def misses(build: Build, sizing: Sizing, effort: float, margin: float, pressure: float,
           rules: ShopRules) -> tuple[Miss, ...]:
    """The rules a sized candidate misses (see the module's list)."""
    found: list[Miss] = []
    low, high = rules.effort_band
    if effort > high:
        found.append(Miss("effort-high", effort, high, "force", effort / high - 1.0))
    elif effort < low:
        found.append(Miss("effort-low", effort, low, "force", low / effort - 1.0))
    if margin < rules.min_travel_margin:
        found.append(Miss("travel-short", margin, rules.min_travel_margin, "fraction",
                          rules.min_travel_margin - margin))
    most = rules.max_travel_margin
    if most is not None and margin > most:
        found.append(Miss("travel-over", margin, most, "fraction", margin - most))
    latest, release = rules.latest_release_point, sizing.release_point
    if release is None or release > latest:
        found.append(Miss("release-late", release, latest, "fraction",
                          (1.0 if release is None else release) - latest))
    for name, rating in (("master", build.master.rated_pressure),
                         ("slave", build.slave.rated_pressure)):
        if rating is not None and pressure > rating:
            found.append(Miss("pressure-over-rating", pressure, rating, "pressure",
                              pressure / rating - 1.0, subject=name))
    if sizing.floor_gap > 0.0:
        found.append(Miss("master-bottoms-early", sizing.floor_gap, 0.0, "length",
                          sizing.floor_gap / build.pedal.pad_travel))
    seen = set(COVERED_FLAGS)
    if any(miss.rule == "travel-short" for miss in found):
        seen.add("master-volume-short")  # the same shortfall seen from the master's side
    for flag in sizing.flags:
        if flag.severity == "fail" and flag.code not in seen:
            seen.add(flag.code)
            found.append(Miss(flag.code, None, None, None, OTHER_FLAG_MISS, flag.subject))
    return tuple(found)


def judge(analysis: Analysis, build: Build, changes: tuple[Change, ...] = (),
          use: CombinationUse | None = None) -> Suggestion:
    """Size, predict and judge one candidate build. Raises GeometryError when its pedal
    cannot push its master."""
    rules = analysis.shop.rules
    sizing = size_build(build, rules, with_curve=False)
    prediction = analysis.calibration.predict(build, sizing)
    sizing = judged_on_history(sizing, prediction, rules, build)
    effort = prediction.effort if prediction.effort is not None else sizing.effort_predicted
    margin = sizing.margin if prediction.travel_margin is None else min(
        sizing.margin, prediction.travel_margin)
    pressure = sizing.pressure_worst
    ratings = [r for r in (build.master.rated_pressure, build.slave.rated_pressure)
               if r is not None]
    if use is None:
        use = analysis.finished_combinations.use(
            build.gearbox.family, build.gearbox.fork_tip_moves, build.master, build.slave,
            exclude_id=build.id)
    return Suggestion(
        build=build, changes=changes, sizing=sizing, prediction=prediction, effort=effort,
        margin=margin, pressure_worst=pressure,
        headroom=min(ratings) / pressure - 1.0 if ratings and pressure > 0 else None,
        misses=misses(build, sizing, effort, margin, pressure, rules), use=use)


def suggest(analysis: Analysis, build: Build, sizes: str = "catalogue") -> Suggestions:
    """Every candidate for the proposal `build`, sized, judged and ranked (module docstring).

    Raises UnsizableBuilds when the proposal itself cannot be sized.
    """
    if sizes not in SIZES:
        raise ValueError(f"sizes must be one of {SIZES}")
    rules = analysis.shop.rules
    combinations = analysis.finished_combinations
    try:
        proposal = judge(analysis, build)
    except GeometryError as error:
        raise UnsizableBuilds([(build, error)]) from None
    masters = _masters(build.master, analysis.shop.parts.get("masters", {}), sizes)
    slaves = _slaves(build.slave, analysis.shop.parts.get("slaves", {}), sizes)
    pedals = _pedals(build.pedal)
    family, fork = build.gearbox.family, build.gearbox.fork_tip_moves
    rows: list[Suggestion] = []
    unsizable = 0
    for master, master_change in masters:
        for slave, slave_change in slaves:
            use = combinations.use(family, fork, master, slave, exclude_id=build.id)
            for pedal, pedal_change in pedals:
                changes = tuple(c for c in (master_change, slave_change, pedal_change) if c)
                if not changes:
                    if proposal.qualifies:
                        rows.append(proposal)
                    continue
                candidate = replace(build, master=master, slave=slave, pedal=pedal)
                try:
                    rows.append(judge(analysis, candidate, changes, use))
                except GeometryError:
                    unsizable += 1
    target = target_effort(rules)
    rows.sort(key=lambda row: _rank(row, target))
    return Suggestions(
        proposal=proposal, ranked=tuple(rows), target=target, sizes=sizes,
        tried={"masters": len(masters), "slaves": len(slaves), "clevis": len(pedals)},
        combinations=len(masters) * len(slaves) * len(pedals) - unsizable, unsizable=unsizable, sensitivities=sensitivities(analysis, build, proposal),
    )


def sensitivities(analysis: Analysis, build: Build, proposal: Suggestion
                  ) -> tuple[Sensitivity, ...]:
    """Effort and margin change from one BORE_STEP up of the master bore and of the slave
    bore (the slave only when it is given by bore)."""
    stepped = [("master", replace(build, master=replace(build.master, bore=build.master.bore
                                                        + BORE_STEP, part=None)))]
    if build.slave.bore is not None:
        stepped.append(("slave", replace(build, slave=replace(
            build.slave, bore=build.slave.bore + BORE_STEP, part=None))))
    found = []
    for what, candidate in stepped:
        row = judge(analysis, candidate, use=proposal.use)
        found.append(Sensitivity(what, BORE_STEP, row.effort - proposal.effort,
                                 row.margin - proposal.margin))
    return tuple(found)


# --- candidates -----------------------------------------------------------------------------

def _near(bore: float, bores: Sequence[float]) -> bool:
    return any(abs(bore - other) <= BORE_TOLERANCE for other in bores)


def _standard(bores_tried: list[float]) -> list[float]:
    """The standard bores not within BORE_TOLERANCE of one tried (inch sizes first)."""
    found = []
    for bore in STANDARD_INCH_BORES + STANDARD_MM_BORES:
        if not _near(bore, bores_tried + found):
            found.append(bore)
    return found


def _masters(own: Master, parts: dict, sizes: str) -> list[tuple[Master, Change | None]]:
    found: list[tuple[Master, Change | None]] = [(own, None)]
    for part_id in sorted(parts):
        if part_id == own.part:
            continue
        master = replace(parts[part_id].section, part=part_id)
        found.append((master, Change("master", part_id, True, master.bore, "length", own.part,
                                     own.bore, master.stroke, own.stroke)))
    if sizes == "standard":
        for bore in _standard([m.bore for m, _ in found]):
            found.append((replace(own, bore=bore, part=None),
                          Change("master", None, False, bore, "length", own.part, own.bore,
                                 own.stroke, own.stroke)))
    return found


def _slave_value(slave: Slave) -> tuple[float, str]:
    return (slave.bore, "length") if slave.bore is not None else (slave.area, "area")


def _slaves(own: Slave, parts: dict, sizes: str) -> list[tuple[Slave, Change | None]]:
    found: list[tuple[Slave, Change | None]] = [(own, None)]
    was, dimension = _slave_value(own)
    for part_id in sorted(parts):
        slave = parts[part_id].section
        if part_id == own.part or slave.kind != own.kind or slave.pulls != own.pulls:
            continue
        slave = replace(slave, part=part_id)
        value, its_dimension = _slave_value(slave)
        if its_dimension != dimension:  # a bore against an area: compare as areas
            value, was_shown, its_dimension = slave.area, own.area, "area"
        else:
            was_shown = was
        found.append((slave, Change("slave", part_id, True, value, its_dimension, own.part,
                                    was_shown, slave.stroke, own.stroke)))
    if sizes == "standard" and own.bore is not None:
        tried = [s.bore for s, _ in found if s.bore is not None]
        for bore in _standard(tried):
            found.append((replace(own, bore=bore, part=None),
                          Change("slave", None, False, bore, "length", own.part, own.bore,
                                 own.stroke, own.stroke)))
    return found


def arm_point(pivot: Point, clevis: Point, length: float) -> Point:
    """The point `length` (m) from the pivot on the line from the pivot through the clevis."""
    dx, dy = clevis[0] - pivot[0], clevis[1] - pivot[1]
    scale = length / math.hypot(dx, dy)
    return pivot[0] + dx * scale, pivot[1] + dy * scale


def _pedals(own: Pedal) -> list[tuple[Pedal, Change | None]]:
    found: list[tuple[Pedal, Change | None]] = [(own, None)]
    layout = own.layout
    if layout is not None:
        points = list(layout.clevis_positions or ())
        points += [arm_point(layout.pivot, layout.clevis, length)
                   for length in own.clevis_positions or ()]
        seen = [layout.clevis]
        for point in points:
            if any(math.dist(point, other) < SAME_POINT for other in seen):
                continue
            seen.append(point)
            found.append((replace(own, layout=replace(layout, clevis=point)),
                          Change("clevis", None, True, point, "point", None, layout.clevis)))
        return found
    seen_lengths = [own.pivot_to_clevis]
    for length in own.clevis_positions or ():
        if any(abs(length - other) < SAME_POINT for other in seen_lengths):
            continue
        seen_lengths.append(length)
        found.append((replace(own, pivot_to_clevis=length),
                      Change("clevis", None, True, length, "length", None, own.pivot_to_clevis)))
    return found


def _rank(row: Suggestion, target: float) -> tuple:
    ties = (len(row.changes), not row.in_catalogue, tuple(
        (c.what, c.part or "", str(c.value)) for c in row.changes))
    if row.qualifies:
        near = abs(row.effort / target - 1.0)
        return (0, bool(row.rejected), int(near / EFFORT_STEP), -len(row.evidence), near, ties)
    return (1, bool(row.rejected), 0, 0, row.miss_total, ties)
