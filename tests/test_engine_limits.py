"""Layouts the engine refuses, the ratio it reports through the swing, and sizing many builds.

Outside references: Norton, Design of Machinery, position of an in-line slider-crank: a
pushrod of length l square to a crank of radius r at rest moves its seat by
s(theta) = r sin theta - (l - sqrt(l^2 - (r (1 - cos theta))^2)), so ds/dtheta = r at rest
and the pedal ratio there is R_pad / r (arc length, OpenStax College Physics, "Rotation
Angle and Angular Velocity"); scipy.optimize.brentq for where ds/dtheta falls to zero (the
dead centre); central differences of Norton's s(theta) for the ratio through the swing.
"""
from __future__ import annotations

import dataclasses
import math

import pytest
import scipy.optimize

from builder.engine import GeometryError, size_build
from builder.engine.batch import pedal_refusals, size_all
from builder.engine.linkage import RATIO_RANGE, SliderCrankPedal
from builder.model import PedalLayout
from factories import make_build, make_rules


def square(pad: float, clevis: float, rod: float = 0.14, swing: float = 0.2) -> PedalLayout:
    """Pedal hanging from the pivot, the pushrod square to the arm at rest, pointing +x."""
    return PedalLayout((0.0, 0.0), (0.0, -pad), (0.0, -clevis), (rod, -clevis), swing)


def norton_stroke(r: float, l: float, theta: float) -> float:
    return r * math.sin(theta) - (l - math.sqrt(l * l - (r * (1.0 - math.cos(theta))) ** 2))


def test_the_ratio_range_is_the_two_length_pedal_extremes():
    # 50 mm / 300 mm and 1000 mm / 5 mm: pivot-to-pad and pivot-to-clevis ranges of the field table
    assert RATIO_RANGE == (50.0 / 300.0, 1000.0 / 5.0)


def test_a_ratio_past_the_top_of_the_range_is_refused_with_its_figures():
    # 0.30 m pad over 1.2 mm of crank: 250 : 1 at rest (Norton: ds/dtheta = r there)
    with pytest.raises(GeometryError) as caught:
        SliderCrankPedal(square(0.30, 0.0012, swing=0.05))
    error = caught.value
    assert (error.reason, error.angle, error.swing, error.bounds) == (
        "ratio-out-of-range", 0.0, 0.05, RATIO_RANGE)
    assert error.ratio == pytest.approx(0.30 / 0.0012, rel=1e-9)


def test_a_ratio_under_the_bottom_of_the_range_is_refused():
    with pytest.raises(GeometryError) as caught:  # 0.04 / 0.30 = 0.133 : 1
        SliderCrankPedal(square(0.04, 0.30, rod=0.4, swing=0.05))
    assert caught.value.reason == "ratio-out-of-range"
    assert caught.value.ratio == pytest.approx(0.04 / 0.30, rel=1e-9)


@pytest.mark.parametrize("pad, clevis, rod", [(0.30, 0.0016, 0.14), (0.06, 0.30, 0.4)])
def test_ratios_inside_the_range_are_worked(pad, clevis, rod):
    pedal = SliderCrankPedal(square(pad, clevis, rod, swing=0.05))
    assert pedal.sweep()[0][2] == pytest.approx(pad / clevis, rel=1e-9)


def test_the_sweep_gives_pad_arc_over_seat_travel_through_the_swing():
    r, l, pad = 0.05, 0.14, 0.28
    pedal = SliderCrankPedal(square(pad, r, l, swing=0.5))
    assert pedal.pad_travel_at_stop == pytest.approx(pad * 0.5, rel=1e-12)  # arc length r theta
    h = 1e-6
    for pad_travel, stroke, ratio, _ in pedal.sweep():
        theta = pad_travel / pad
        assert stroke == pytest.approx(norton_stroke(r, l, theta), abs=1e-12)
        rate = (norton_stroke(r, l, theta + h) - norton_stroke(r, l, theta - h)) / (2 * h)
        assert ratio == pytest.approx(pad / rate, rel=1e-6)


def test_a_swing_through_dead_centre_names_the_angle_and_the_swing():
    r, l = 0.05, 0.14
    toggle = scipy.optimize.brentq(
        lambda t: norton_stroke(r, l, t + 1e-7) - norton_stroke(r, l, t - 1e-7), 0.5, 1.9)
    with pytest.raises(GeometryError) as caught:
        SliderCrankPedal(square(0.28, r, l, swing=2.0))
    error = caught.value
    assert (error.reason, error.swing) == ("dead-centre", 2.0)
    assert error.angle == pytest.approx(toggle, abs=1e-6)


def test_size_all_sizes_what_it_can_and_names_what_it_cannot():
    rules = make_rules()
    curve = ((0.0, 0.0), (0.003, 1500.0), (0.007, 1800.0), (0.010, 1600.0))
    good = make_build(load_curve=curve, release_load=None)
    bad = dataclasses.replace(make_build(layout=square(0.30, 0.0012, swing=0.05)), id="TS-002")
    sizings, failures = size_all([good, bad], rules)
    assert list(sizings) == [good.id]
    assert sizings[good.id] == size_build(good, rules, with_curve=False)
    assert sizings[good.id].effort_curve is None
    [(build, error)] = failures
    assert build is bad and error.reason == "ratio-out-of-range"


def test_pedal_refusals_are_the_refusals_of_sizing():
    # `fitment validate` asks only which pedals cannot push their master; the answer must be
    # size_all's, build for build and reason for reason.
    rules = make_rules()
    good = make_build()
    past_range = dataclasses.replace(make_build(layout=square(0.30, 0.0012, swing=0.05)), id="TS-002")
    over_centre = dataclasses.replace(make_build(layout=square(0.28, 0.05, 0.14, swing=2.0)), id="TS-003")
    no_lengths = dataclasses.replace(good, id="TS-004", pedal=dataclasses.replace(
        good.pedal, pivot_to_clevis=None))
    builds = [good, past_range, over_centre, no_lengths]
    reasons = [(build.id, error.reason) for build, error in pedal_refusals(builds)]
    assert reasons == [("TS-002", "ratio-out-of-range"), ("TS-003", "dead-centre"),
                       ("TS-004", "no-lengths")]
    assert reasons == [(build.id, error.reason) for build, error in size_all(builds, rules)[1]]
