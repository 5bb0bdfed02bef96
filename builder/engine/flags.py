"""Checks on a sizing: plain codes, severity warn | fail, and the quantities behind each.

Thresholds come from ShopRules. The codes are our own; builder.presentation words them.
"""
from __future__ import annotations

from builder.engine.linkage import LeverPedal, SliderCrankPedal
from builder.engine.result import Figure, Flag, Sizing
from builder.engine.travel import travel_margin
from builder.model import Build, ShopRules

PAD_TRAVEL_TOLERANCE = 0.05  # layout swing vs recorded pad travel (common practice, no source)
EFFORT_CODES = ("effort-high", "effort-low")


def travel_flags(s: Sizing, rules: ShopRules) -> list[Flag]:
    """travel-short, slave-overtravel, master-bottoms-early, release-late,
    master-volume-short."""
    flags = margin_flags(s.bearing_travel, s.needed_bearing_travel, rules)
    if s.master_swept_volume < s.needed_volume:
        flags.append(Flag("master-volume-short", "fail", (
            Figure("swept", s.master_swept_volume, "volume"),
            Figure("needed", s.needed_volume, "volume"),
            Figure("losses", s.losses_volume, "volume"))))
    if s.slave_overtravel:
        flags.append(Flag("slave-overtravel", "fail",
                          (Figure("slave_stroke", s.slave_travel, "length"),)))
    if s.floor_gap > 0.0:
        flags.append(Flag("master-bottoms-early", "warn",
                          (Figure("floor_gap", s.floor_gap, "length"),)))
    if s.release_point is not None and s.release_point > rules.latest_release_point:
        flags.append(Flag("release-late", "warn", (
            Figure("release_point", s.release_point, "fraction"),
            Figure("pad_travel", s.pad_travel_to_release or 0.0, "length"),
            Figure("latest", rules.latest_release_point, "fraction"))))
    return flags


def margin_flags(bearing: float, needed: float, rules: ShopRules,
                 basis: str = "computed") -> list[Flag]:
    """travel-short for a bearing travel (m) against the travel needed (m): fail when it is
    short, warn when the margin is under the shop's minimum."""
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
    """effort-high, effort-low for one pad effort (N)."""
    low, high = rules.effort_band
    figures = (Figure("effort", effort, "force"), Figure("low", low, "force"),
               Figure("high", high, "force"))
    if effort > high:
        return [Flag("effort-high", "warn", figures, basis=basis)]
    if effort < low:
        return [Flag("effort-low", "warn", figures, basis=basis)]
    return []


def pressure_flags(s: Sizing, build: Build) -> list[Flag]:
    """pressure-over-rating for the master and the slave, where a rating is given."""
    flags = []
    for name, rating in (("master", build.master.rated_pressure),
                         ("slave", build.slave.rated_pressure)):
        if rating is not None and s.pressure > rating:
            flags.append(Flag("pressure-over-rating", "fail", (
                Figure("pressure", s.pressure, "pressure"),
                Figure("rating", rating, "pressure")), subject=name))
    return flags


def linkage_flags(s: Sizing, build: Build, rules: ShopRules,
                  pedal: LeverPedal | SliderCrankPedal) -> list[Flag]:
    """pushrod-off-axis, pad-travel-mismatch (layout mode only); a swing that goes over
    centre never gets here: the linkage refuses it (GeometryError "dead-centre")."""
    layout = build.pedal.layout
    if pedal.mode != "layout" or layout is None:
        return []
    flags = []
    angle = s.linkage.pushrod_angle_max
    if angle is not None and angle > rules.max_pushrod_angle:
        flags.append(Flag("pushrod-off-axis", "warn", (
            Figure("angle", angle, "angle"), Figure("limit", rules.max_pushrod_angle, "angle"))))
    swing, recorded = pedal.pad_travel_at_stop, build.pedal.pad_travel
    if abs(swing - recorded) > PAD_TRAVEL_TOLERANCE * recorded:
        flags.append(Flag("pad-travel-mismatch", "warn", (
            Figure("swing", layout.rotation_to_stop, "angle"),
            Figure("swing_travel", swing, "length"),
            Figure("recorded", recorded, "length"))))
    return flags
