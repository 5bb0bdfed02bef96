"""Checks on a sizing: plain codes, severity warn | fail, and the quantities behind each.

Thresholds come from ShopRules. The codes are our own; builder.presentation words them.
"""
from __future__ import annotations

from builder.engine.linkage import LeverPedal, SliderCrankPedal
from builder.engine.result import Figure, Flag, Sizing
from builder.engine.travel import finger_travel, travel_margin
from builder.model import Build, ShopRules

PAD_TRAVEL_TOLERANCE = 0.05  # layout swing vs recorded pad travel (common practice, no source)
EFFORT_CODES = ("effort-high", "effort-low")
PRESSURE_CODES = ("pressure-over-rating",)


def travel_flags(s: Sizing, rules: ShopRules, build: Build) -> list[Flag]:
    """travel-short, travel-margin-high, over-stroke, slave-overtravel,
    master-bottoms-early, release-late, master-volume-short."""
    flags = margin_flags(s.bearing_travel, s.needed_bearing_travel, rules)
    if rules.max_travel_margin is not None and s.margin > rules.max_travel_margin:
        flags.append(Flag("travel-margin-high", "warn", (
            Figure("margin", s.margin, "fraction"),
            Figure("limit", rules.max_travel_margin, "fraction"))))
    limit = build.clutch.max_release_travel
    if limit is not None and finger_travel(s.bearing_travel, s.clearance) > limit:
        flags.append(Flag("over-stroke", "fail", (
            Figure("travel", finger_travel(s.bearing_travel, s.clearance), "length"),
            Figure("limit", limit, "length"))))
    if s.master_swept_volume < s.needed_volume:
        flags.append(Flag("master-volume-short", "fail", (
            Figure("swept", s.master_swept_volume, "volume"),
            Figure("needed", s.needed_volume, "volume"),
            Figure("losses", s.losses_volume, "volume"),
            Figure("dead_stroke", s.dead_stroke, "length"))))
    if s.slave_overtravel:
        flags.append(Flag("slave-overtravel", "fail",
                          (Figure("slave_stroke", s.slave_travel, "length"),)))
    if s.floor_gap > 0.0:
        flags.append(Flag("master-bottoms-early", "warn",
                          (Figure("floor_gap", s.floor_gap, "length"),)))
    if s.release_point is not None and s.release_point > rules.latest_release_point:
        flags.append(Flag("release-late", "warn", (
            Figure("release_point", s.release_point, "fraction"),
            Figure("pad_travel", s.pad_travel_to_release, "length"),  # set with a release point
            Figure("latest", rules.latest_release_point, "fraction"),
            Figure("usable", s.usable_pad_travel, "length"))))
    return flags


def margin_flags(bearing: float, needed: float, rules: ShopRules,
                 basis: str = "computed") -> list[Flag]:
    """travel-short for a bearing travel (m) against the travel needed (m): fail when it is
    short, warn when the margin (travel.travel_margin) is under the shop's minimum.

    >>> from types import SimpleNamespace
    >>> rules = SimpleNamespace(min_travel_margin=0.10)
    >>> [(f.code, f.severity) for f in margin_flags(0.0095, 0.009, rules)]  # +5.6 %
    [('travel-short', 'warn')]
    >>> margin_flags(0.0105, 0.009, rules), margin_flags(0.0085, 0.009, rules)[0].severity
    ([], 'fail')
    """
    margin = travel_margin(bearing, needed)
    figures = (Figure("bearing", bearing, "length"), Figure("needed", needed, "length"),
               Figure("margin", margin, "fraction"))
    if margin < 0.0:
        return [Flag("travel-short", "fail", figures, basis=basis)]
    if margin < rules.min_travel_margin:
        return [Flag("travel-short", "warn",
                     figures + (Figure("minimum", rules.min_travel_margin, "fraction"),),
                     basis=basis)]
    return []


def effort_flags(s: Sizing, rules: ShopRules) -> list[Flag]:
    """effort-high, effort-low against the shop's effort band."""
    return effort_band_flags(s.effort_predicted, rules)


def effort_band_flags(effort: float, rules: ShopRules, basis: str = "computed") -> list[Flag]:
    """effort-high, effort-low for one pad effort (N) against the shop's band (N).

    >>> from types import SimpleNamespace
    >>> rules = SimpleNamespace(effort_band=(66.7, 177.9))
    >>> [f.code for f in effort_band_flags(190.0, rules)], effort_band_flags(120.0, rules)
    (['effort-high'], [])
    """
    low, high = rules.effort_band
    figures = (Figure("effort", effort, "force"), Figure("low", low, "force"),
               Figure("high", high, "force"))
    if effort > high:
        return [Flag("effort-high", "warn", figures, basis=basis)]
    if effort < low:
        return [Flag("effort-low", "warn", figures, basis=basis)]
    return []


def pressure_flags(s: Sizing, build: Build, basis: str = "computed") -> list[Flag]:
    """pressure-over-rating for the master and the slave, where a rating is given, on the
    worst-case pressure (static / efficiency)."""
    return pressure_rating_flags(s.pressure_worst, s.efficiency, build, basis)


def pressure_rating_flags(worst: float, efficiency: float, build: Build,
                          basis: str = "computed") -> list[Flag]:
    """pressure-over-rating for a worst-case line pressure (Pa) at an efficiency, for the
    master and the slave where the record gives a rating (Pa).

    >>> from types import SimpleNamespace
    >>> build = SimpleNamespace(master=SimpleNamespace(rated_pressure=8e6),
    ...                         slave=SimpleNamespace(rated_pressure=6e6))
    >>> [(f.code, f.subject) for f in pressure_rating_flags(7e6, 0.8, build)]
    [('pressure-over-rating', 'slave')]
    """
    flags = []
    for name, rating in (("master", build.master.rated_pressure),
                         ("slave", build.slave.rated_pressure)):
        if rating is not None and worst > rating:
            flags.append(Flag("pressure-over-rating", "fail", (
                Figure("pressure", worst, "pressure"),
                Figure("rating", rating, "pressure"),
                Figure("efficiency", efficiency, "fraction")), subject=name, basis=basis))
    return flags


def linkage_flags(s: Sizing, build: Build, rules: ShopRules,
                  pedal: LeverPedal | SliderCrankPedal) -> list[Flag]:
    """pushrod-off-axis, pad-travel-mismatch (layout mode only); a swing that goes over
    centre never gets here: the linkage refuses it (GeometryError "dead-centre")."""
    if pedal.mode != "layout":
        return []
    layout = build.pedal.layout
    flags = []
    angle = s.linkage.pushrod_angle_max  # always a figure in layout mode
    if angle > rules.max_pushrod_angle:
        flags.append(Flag("pushrod-off-axis", "warn", (
            Figure("angle", angle, "angle"), Figure("limit", rules.max_pushrod_angle, "angle"))))
    swing, recorded = pedal.pad_travel_at_stop, build.pedal.pad_travel
    if abs(swing - recorded) > PAD_TRAVEL_TOLERANCE * recorded:
        flags.append(Flag("pad-travel-mismatch", "warn", (
            Figure("swing", layout.rotation_to_stop, "angle"),
            Figure("swing_travel", swing, "length"),
            Figure("recorded", recorded, "length"))))
    return flags
