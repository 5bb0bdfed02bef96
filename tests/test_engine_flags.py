"""The engine's flags as data: each code with its severity, every figure's name, SI value
and dimension, its subject and basis, on purpose-built cases, and each threshold at its
boundary (a margin exactly at the limit is not past it). builder.presentation words these
figures by name, so a renamed or dropped figure is a broken contract.

The sizings come from the engine; where a threshold must be met exactly, the figure is set
on a copy of a real sizing (dataclasses.replace) and the check function called directly.
"""
from __future__ import annotations

import dataclasses
import math
from types import SimpleNamespace

import pytest

from builder.engine import GeometryError, size_build
from builder.engine import flags as checks
from builder.engine.linkage import SliderCrankPedal
from builder.engine.result import Figure, Flag
from builder.engine.size import pedal_linkage
from builder.model import PedalLayout
from factories import INCH, POUND_FORCE, PSI, make_build, make_rules, square_layout

RULES = make_rules(lossless=True)


def by_code(sizing) -> dict[str, Flag]:
    return {flag.code: flag for flag in sizing.flags}


def test_travel_short_fail_and_warn_carry_exactly_their_figures():
    short = size_build(make_build(release_travel=0.6 * INCH), RULES)
    assert by_code(short)["travel-short"] == Flag("travel-short", "fail", (
        Figure("bearing", short.bearing_travel, "length"),
        Figure("needed", short.needed_bearing_travel, "length"),
        Figure("margin", short.margin, "fraction")))
    thin = size_build(make_build(release_travel=0.39 * INCH), RULES)
    assert by_code(thin)["travel-short"] == Flag("travel-short", "warn", (
        Figure("bearing", thin.bearing_travel, "length"),
        Figure("needed", thin.needed_bearing_travel, "length"),
        Figure("margin", thin.margin, "fraction"),
        Figure("minimum", 0.10, "fraction")), basis="computed")


def test_margin_exactly_at_the_minimum_or_zero_is_not_short():
    # margin = 0.011 / 0.01 - 1 is 0.1 in floating point only approximately: use the value
    # travel_margin really gives as the shop's minimum.
    from builder.engine.travel import travel_margin

    rules = SimpleNamespace(min_travel_margin=travel_margin(0.011, 0.010))
    assert checks.margin_flags(0.011, 0.010, rules) == []
    assert [f.severity for f in checks.margin_flags(0.010, 0.010, rules)] == ["warn"]
    assert checks.margin_flags(0.0099, 0.010, rules, basis="after_losses")[0].basis == "after_losses"
    assert checks.margin_flags(0.0105, 0.010, rules, basis="after_losses")[0].basis == "after_losses"


def test_margin_past_the_largest_warns_but_not_at_it():
    s = size_build(make_build(), RULES)
    at = dataclasses.replace(RULES, max_travel_margin=s.margin)
    assert "travel-margin-high" not in by_code(size_build(make_build(), at))
    below = dataclasses.replace(RULES, max_travel_margin=0.30)
    assert by_code(size_build(make_build(), below))["travel-margin-high"] == Flag(
        "travel-margin-high", "warn", (Figure("margin", s.margin, "fraction"),
                                       Figure("limit", 0.30, "fraction")))


def test_over_stroke_past_the_makers_figure_but_not_at_it():
    s = size_build(make_build(), RULES)
    travel = s.bearing_travel - s.clearance
    assert "over-stroke" not in by_code(size_build(make_build(max_release_travel=travel), RULES))
    flagged = size_build(make_build(max_release_travel=0.010), RULES)
    assert by_code(flagged)["over-stroke"] == Flag("over-stroke", "fail", (
        Figure("travel", travel, "length"), Figure("limit", 0.010, "length")))


def test_master_volume_short_carries_the_dead_stroke_and_not_at_equality():
    s = size_build(make_build(master_stroke=0.45 * INCH, dead_stroke=0.002), RULES)
    assert by_code(s)["master-volume-short"] == Flag("master-volume-short", "fail", (
        Figure("swept", s.master_swept_volume, "volume"),
        Figure("needed", s.needed_volume, "volume"),
        Figure("losses", s.losses_volume, "volume"),
        Figure("dead_stroke", 0.002, "length")))
    build = make_build()
    equal = dataclasses.replace(size_build(build, RULES), flags=())
    equal = dataclasses.replace(equal, master_swept_volume=equal.needed_volume)
    assert "master-volume-short" not in {f.code for f in checks.travel_flags(equal, RULES, build)}


def test_master_volume_short_counts_the_line_losses():
    # By hand, the invented roadster with hose swell only (incompressible fluid): 400 lbf on a
    # 2:1 fork over a 7/8 in slave is p = 200 lbf / A_s (OpenStax, "Pascal's Principle");
    # the braided line swells 5e-14 m^2/Pa over its 36 in, dV = 5e-14 * L * p; the master
    # must push V = A_s * 0.35 in * 2 + dV. A 3/4 in master whose stroke sweeps V - dV / 2 is
    # short, though it would cover the travel with no losses at all.
    rules = make_rules(fluid_bulk_modulus=math.inf)
    a_s, a_m = math.pi / 4 * (0.875 * INCH) ** 2, math.pi / 4 * (0.75 * INCH) ** 2
    losses = 5.0e-14 * 36 * INCH * (200 * POUND_FORCE / a_s)
    needed = a_s * 0.35 * INCH * 2 + losses
    s = size_build(make_build(master_stroke=(needed - losses / 2) / a_m), rules)
    assert (s.losses_volume, s.needed_volume) == pytest.approx((losses, needed), rel=1e-9)
    assert by_code(s)["master-volume-short"].value("swept") == pytest.approx(needed - losses / 2)


def test_slave_overtravel_and_floor_gap_figures():
    s = size_build(make_build(slave_stroke=0.6 * INCH), RULES)
    assert by_code(s)["slave-overtravel"] == Flag("slave-overtravel", "fail", (
        Figure("slave_stroke", 0.6 * INCH, "length"),))
    # a slave whose stroke is exactly what the master pushes it is not over-travelled
    free = size_build(make_build(slave_stroke=3 * INCH), RULES)
    exact = size_build(make_build(slave_stroke=free.slave_travel), RULES)
    assert not exact.slave_overtravel and "slave-overtravel" not in by_code(exact)
    bottoms = size_build(make_build(master_stroke=1.0 * INCH), RULES)
    assert by_code(bottoms)["master-bottoms-early"] == Flag("master-bottoms-early", "warn", (
        Figure("floor_gap", bottoms.floor_gap, "length"),))


def test_release_late_figures_and_its_boundary():
    s = size_build(make_build(release_travel=0.38 * INCH), make_rules(lossless=True,
                                                                     latest_release_point=0.6))
    assert by_code(s)["release-late"] == Flag("release-late", "warn", (
        Figure("release_point", s.release_point, "fraction"),
        Figure("pad_travel", s.pad_travel_to_release, "length"),
        Figure("latest", 0.6, "fraction"),
        Figure("usable", s.usable_pad_travel, "length")))
    at = make_rules(lossless=True, latest_release_point=s.release_point)
    assert "release-late" not in by_code(size_build(make_build(release_travel=0.38 * INCH), at))


def test_effort_band_figures_and_boundaries():
    rules = SimpleNamespace(effort_band=(66.7, 177.9))
    assert checks.effort_band_flags(190.0, rules) == [Flag("effort-high", "warn", (
        Figure("effort", 190.0, "force"), Figure("low", 66.7, "force"),
        Figure("high", 177.9, "force")), basis="computed")]
    assert checks.effort_band_flags(50.0, rules, basis="calibrated") == [Flag(
        "effort-low", "warn", (Figure("effort", 50.0, "force"), Figure("low", 66.7, "force"),
                               Figure("high", 177.9, "force")), basis="calibrated")]
    assert checks.effort_band_flags(66.7, rules) == checks.effort_band_flags(177.9, rules) == []
    assert checks.effort_band_flags(190.0, rules, basis="calibrated")[0].basis == "calibrated"
    light = size_build(make_build(release_load=100 * POUND_FORCE), make_rules())
    assert by_code(light)["effort-low"].value("effort") == light.effort_predicted


def test_pressure_ratings_on_the_worst_case_pressure_and_at_the_rating():
    s = size_build(make_build(master_rating=300 * PSI, slave_rating=2000 * PSI), make_rules())
    assert [f for f in s.flags if f.code == "pressure-over-rating"] == [Flag(
        "pressure-over-rating", "fail", (Figure("pressure", s.pressure_worst, "pressure"),
                                         Figure("rating", 300 * PSI, "pressure"),
                                         Figure("efficiency", 0.85, "fraction")),
        subject="master", basis="computed")]
    at = size_build(make_build(master_rating=s.pressure_worst), make_rules())
    assert "pressure-over-rating" not in by_code(at)
    build = SimpleNamespace(master=SimpleNamespace(rated_pressure=None),
                            slave=SimpleNamespace(rated_pressure=1e6))
    [flag] = checks.pressure_rating_flags(2e6, 0.7, build, basis="calibrated")
    assert (flag.subject, flag.basis) == ("slave", "calibrated")
    assert checks.pressure_rating_flags(2e6, 0.7, build)[0].basis == "computed"
    full = make_build(master_rating=300 * PSI)
    [again] = checks.pressure_flags(s, full, basis="calibrated")
    assert again.basis == "calibrated"


def test_linkage_flags_figures_and_boundaries():
    layout = square_layout(11 * INCH, 2 * INCH, 2 * INCH, math.radians(30))
    s = size_build(make_build(layout=layout, pad_travel=7.0 * INCH), make_rules())
    flags = by_code(s)
    assert flags["pushrod-off-axis"] == Flag("pushrod-off-axis", "warn", (
        Figure("angle", s.linkage.pushrod_angle_max, "angle"),
        Figure("limit", math.radians(5), "angle")))
    assert flags["pad-travel-mismatch"] == Flag("pad-travel-mismatch", "warn", (
        Figure("swing", math.radians(30), "angle"),
        Figure("swing_travel", 11 * INCH * math.radians(30), "length"),
        Figure("recorded", 7.0 * INCH, "length")))
    at = make_rules(max_pushrod_angle=s.linkage.pushrod_angle_max)
    assert "pushrod-off-axis" not in by_code(size_build(make_build(layout=layout,
                                                                   pad_travel=7.0 * INCH), at))


def test_a_lever_pedal_raises_no_linkage_flags_and_needs_both_lengths():
    build = make_build()
    s = size_build(build, make_rules())
    assert checks.linkage_flags(s, build, make_rules(), pedal_linkage(build.pedal)) == []
    for lengths in ((None, 2 * INCH), (11 * INCH, None)):
        no_length = dataclasses.replace(build.pedal, pivot_to_pad=lengths[0],
                                        pivot_to_clevis=lengths[1])
        with pytest.raises(GeometryError) as caught:
            pedal_linkage(no_length)
        assert caught.value.reason == str(caught.value) == "no-lengths"


def test_coinciding_points_are_a_geometry_error():
    for layout in (PedalLayout((0, 0), (0, -0.28), (0, -0.05), (0, -0.05), 0.5),
                   PedalLayout((0, 0), (0, -0.28), (0, 0), (0.14, 0), 0.5),
                   PedalLayout((0, 0), (0, 0), (0, -0.05), (0.14, -0.05), 0.5)):
        with pytest.raises(GeometryError) as caught:
            SliderCrankPedal(layout)
        assert caught.value.reason == "points-coincide"
    # a pivot away from the origin: every distance is measured from it
    shifted = SliderCrankPedal(PedalLayout((0.3, 0.2), (0.3, -0.08), (0.3, 0.15), (0.44, 0.15), 0.5))
    assert (shifted.pad_radius, shifted.rod) == pytest.approx((0.28, 0.14))
