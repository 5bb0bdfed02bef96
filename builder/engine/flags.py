"""Checks on a sizing: plain codes, severity warn | fail, one sentence with the numbers.

Numbers are shown in both unit systems, the shop's display system first. Thresholds come
from ShopRules. The codes are our own.
"""
from __future__ import annotations

import math

from builder.engine.linkage import LeverPedal, SliderCrankPedal
from builder.engine.result import Flag, Sizing
from builder.engine.travel import travel_margin
from builder.model import Build, ShopRules
from builder.units import INCH, POUND_FORCE  # builder.units loads pint only on demand

PSI = POUND_FORCE / INCH**2  # Pa
CUBIC_INCH = INCH**3  # m^3
PAD_TRAVEL_TOLERANCE = 0.05  # layout swing vs recorded pad travel (common practice)


def _both(imperial: str, metric: str, rules: ShopRules) -> str:
    """Both systems, the shop's display system first: "0.38 in (9.7 mm)".
    Conversions: inch and pound-force exact by definition (NIST SP 811, appendix B)."""
    if rules.display_units == "metric":
        return f"{metric} ({imperial})"
    return f"{imperial} ({metric})"


def length(value: float, rules: ShopRules) -> str:
    return _both(f"{value / INCH:.2f} in", f"{value * 1e3:.1f} mm", rules)


def force(value: float, rules: ShopRules) -> str:
    return _both(f"{value / POUND_FORCE:.0f} lbf", f"{value:.0f} N", rules)


def pressure(value: float, rules: ShopRules) -> str:
    return _both(f"{value / PSI:.0f} psi", f"{value / 1e3:.0f} kPa", rules)


def volume(value: float, rules: ShopRules) -> str:
    return _both(f"{value / CUBIC_INCH:.3f} in^3", f"{value * 1e6:.2f} mL", rules)


def _pct(fraction: float) -> str:
    return f"{fraction * 100:.0f} %"


def _deg(angle: float) -> str:
    return f"{math.degrees(angle):.1f} deg"


def travel_flags(s: Sizing, rules: ShopRules) -> list[Flag]:
    """travel-short, slave-overtravel, master-bottoms-early, release-late,
    master-volume-short."""
    flags = margin_flags(s.bearing_travel, s.needed_bearing_travel, rules, "Bearing travel")
    if s.master_swept_volume < s.needed_volume:
        flags.append(Flag("master-volume-short", "fail",
            f"The master's full stroke sweeps {volume(s.master_swept_volume, rules)} but full"
            f" release needs {volume(s.needed_volume, rules)}, of which"
            f" {volume(s.losses_volume, rules)} goes to hose and fluid losses."))
    if s.slave_overtravel:
        flags.append(Flag("slave-overtravel", "fail",
            f"The master pushes the slave to the end of its {length(s.slave_travel, rules)}"
            " stroke; limit the pedal or master stroke so the slave cannot bottom."))
    if s.floor_gap > 0.0:
        flags.append(Flag("master-bottoms-early", "warn",
            f"The master bottoms {length(s.floor_gap, rules)} of pad travel before the pedal"
            " stop; set the stop there so the master is not the stop."))
    if s.release_point is not None and s.release_point > rules.latest_release_point:
        flags.append(Flag("release-late", "warn",
            f"Full release comes at {_pct(s.release_point)} of pad travel"
            f" ({length(s.pad_travel_to_release or 0.0, rules)}), later than the shop's"
            f" {_pct(rules.latest_release_point)}."))
    return flags


def margin_flags(bearing: float, needed: float, rules: ShopRules, which: str) -> list[Flag]:
    """travel-short for a bearing travel (m) against the travel needed (m);
    `which` names the estimate, e.g. "Bearing travel"."""
    margin = travel_margin(bearing, needed)
    if margin < 0.0:
        return [Flag("travel-short", "fail",
            f"{which} {length(bearing, rules)} is short of the {length(needed, rules)}"
            " needed (clearance plus release travel): the clutch will not fully release.")]
    if margin < rules.min_travel_margin:
        return [Flag("travel-short", "warn",
            f"{which} {length(bearing, rules)} is only {_pct(margin)} over the"
            f" {length(needed, rules)} needed; the shop asks for"
            f" {_pct(rules.min_travel_margin)}.")]
    return []


EFFORT_CODES = ("effort-high", "effort-low")


def effort_flags(s: Sizing, rules: ShopRules) -> list[Flag]:
    """effort-high, effort-low against the shop's effort band."""
    return effort_band_flags(s.effort_predicted, rules, "Predicted")


def effort_band_flags(effort: float, rules: ShopRules, which: str) -> list[Flag]:
    """effort-high, effort-low for one pad effort (N); `which` names the estimate."""
    low, high = rules.effort_band
    band = f"{force(low, rules)} to {force(high, rules)}"
    if effort > high:
        return [Flag("effort-high", "warn",
            f"{which} pedal effort {force(effort, rules)} is above the shop's band of {band}.")]
    if effort < low:
        return [Flag("effort-low", "warn",
            f"{which} pedal effort {force(effort, rules)} is below the shop's band of {band}.")]
    return []


def pressure_flags(s: Sizing, build: Build, rules: ShopRules) -> list[Flag]:
    """pressure-over-rating for the master and the slave, where a rating is given."""
    flags = []
    for name, rating in (("master", build.master.rated_pressure),
                         ("slave", build.slave.rated_pressure)):
        if rating is not None and s.pressure > rating:
            flags.append(Flag("pressure-over-rating", "fail",
                f"Line pressure {pressure(s.pressure, rules)} at the release load is above"
                f" the {name}'s rating of {pressure(rating, rules)}; follow the maker's"
                " rating."))
    return flags


def linkage_flags(s: Sizing, build: Build, rules: ShopRules,
                  pedal: LeverPedal | SliderCrankPedal) -> list[Flag]:
    """pushrod-off-axis, linkage-over-centre, pad-travel-mismatch (layout mode only)."""
    layout = build.pedal.layout
    if pedal.mode != "layout" or layout is None:
        return []
    flags = []
    angle = s.linkage.pushrod_angle_max
    if angle is not None and angle > rules.max_pushrod_angle:
        flags.append(Flag("pushrod-off-axis", "warn",
            f"The pushrod swings {_deg(angle)} off the master's bore axis, past the shop's"
            f" {_deg(rules.max_pushrod_angle)}; the side load wears the master bore."))
    if pedal.binds:
        flags.append(Flag("linkage-over-centre", "fail",
            f"The linkage goes over centre after {_deg(pedal.end_angle)} of the"
            f" {_deg(layout.rotation_to_stop)} swing to the stop; past that the pedal"
            " pulls the master back."))
    swing, recorded = pedal.pad_travel_at_stop, build.pedal.pad_travel
    if abs(swing - recorded) > PAD_TRAVEL_TOLERANCE * recorded:
        flags.append(Flag("pad-travel-mismatch", "warn",
            f"The layout's {_deg(layout.rotation_to_stop)} swing moves the pad"
            f" {length(swing, rules)} but the record gives {length(recorded, rules)} of"
            " pad travel; the layout is used."))
    return flags
