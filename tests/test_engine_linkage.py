"""Pedal linkage: levers and the slider-crank against textbook closed forms."""
from __future__ import annotations

import dataclasses
import math

import pytest
import scipy.optimize

from builder.engine import GeometryError, size_build
from builder.engine.linkage import LeverPedal, SliderCrankPedal, arc_length, lever_ratio
from builder.model import PedalLayout
from factories import INCH, make_build, make_rules, norton_layout, norton_slider, square_layout


def test_lever_ratio_and_arc():
    # Lever: R = a / b (Shigley's Mechanical Engineering Design, lever equilibrium);
    # arc s = r theta (OpenStax College Physics, "Rotation Angle and Angular Velocity").
    assert lever_ratio(10.0, 2.0) == 5.0
    assert arc_length(0.3, math.pi / 6) == pytest.approx(0.15707963, rel=1e-7)
    pedal = LeverPedal(10 * INCH, 2 * INCH, 6 * INCH)
    assert pedal.stroke_at_stop == pytest.approx(1.2 * INCH)
    assert pedal.at_stroke(1.0 * INCH) == pytest.approx((5.0 * INCH, 5.0))


@pytest.mark.parametrize("frame", [(0.0, 0.0, 0.0), (0.3, -1.2, 2.1), (-0.05, 0.4, -0.7)])
@pytest.mark.parametrize("t0", [math.radians(70), math.radians(110), math.radians(-60)])
def test_slider_crank_matches_norton_closed_form(t0, frame):
    # Offset slider-crank position (Norton, Design of Machinery): engine stroke at each
    # swing angle equals x(t0 -+ theta) - x(t0) from the closed form, in any frame.
    r, l = 0.05, 0.14
    e = r * math.sin(t0)
    crank = SliderCrankPedal(norton_layout(r, l, t0, math.radians(25), frame))
    pushing = -1.0 if e > 0 else 1.0  # dx/dt at rest = -r sin t0 = -e
    x0 = norton_slider(r, l, e, t0)
    for deg in (1.0, 5.0, 12.0, 25.0):
        theta = math.radians(deg)
        expected = norton_slider(r, l, e, t0 + pushing * theta) - x0
        assert crank.state(theta)[0] == pytest.approx(expected, rel=1e-9, abs=1e-13)


def test_slider_crank_velocity_matches_closed_form_derivative():
    # ds/dtheta against a central difference of Norton's closed form (Norton, Design of
    # Machinery, slider-crank velocity analysis).
    r, l, t0 = 0.05, 0.14, math.radians(75)
    e = r * math.sin(t0)
    crank = SliderCrankPedal(norton_layout(r, l, t0, math.radians(30)))
    h = 1e-6
    for deg in (0.0, 8.0, 20.0):
        t = t0 - math.radians(deg)
        numeric = -(norton_slider(r, l, e, t + h) - norton_slider(r, l, e, t - h)) / (2 * h)
        assert crank.state(math.radians(deg))[1] == pytest.approx(numeric, rel=1e-6)


@pytest.mark.parametrize("axis_deg", [0.0, 180.0])
@pytest.mark.parametrize("t0, e", [(math.radians(75), 0.030), (math.radians(100), 0.062),
                                   (math.radians(80), 0.0)])
def test_master_at_an_angle_matches_norton_offset_slider_crank(t0, e, axis_deg):
    # A bore axis given apart from the pushrod (layout.bore_axis): Norton's offset
    # slider-crank with the slider line y = e while the crank pin sits at r sin t0 != e, so
    # the pushrod meets the axis at an angle at rest. Slider travel x(t0 - theta) - x(t0),
    # pushrod angle asin((r sin t - e) / l) (Norton, Design of Machinery, position
    # analysis); the axis may be given either way along the line (0 or 180 deg).
    r, l = 0.05, 0.14
    clevis = (r * math.cos(t0), r * math.sin(t0))
    x0 = norton_slider(r, l, e, t0)
    layout = PedalLayout((0.0, 0.0), (3.0 * clevis[0], 3.0 * clevis[1]), clevis, (x0, e),
                         math.radians(25), bore_axis=math.radians(axis_deg))
    crank = SliderCrankPedal(layout)
    assert crank.rod == pytest.approx(l, rel=1e-12)
    for deg in (0.0, 3.0, 11.0, 25.0):
        t = t0 - math.radians(deg)
        stroke, _, offset = crank.state(math.radians(deg))
        assert stroke == pytest.approx(norton_slider(r, l, e, t) - x0, rel=1e-9, abs=1e-13)
        assert crank.pushrod_angle(offset) == pytest.approx(
            math.asin(abs(r * math.sin(t) - e) / l), rel=1e-9, abs=1e-12)
        pose = crank.pose(math.radians(deg))  # the seat stays on the slider line
        assert pose.pushrod_seat[1] == pytest.approx(e, abs=1e-12)
        assert math.dist(pose.clevis, pose.pushrod_seat) == pytest.approx(l, rel=1e-9)


def test_bore_axis_square_to_the_pushrod_is_a_geometry_error():
    # A slider on a line square to its coupler cannot be pushed along it (Norton, toggle).
    layout = PedalLayout((0.0, 0.0), (0.0, -0.28), (0.0, -0.05), (0.14, -0.05), 0.5,
                         bore_axis=math.radians(90))
    with pytest.raises(GeometryError) as caught:
        SliderCrankPedal(layout)
    assert caught.value.reason == "axis-across-pushrod"
    # Short of square too: past asin(0.999) = 87.4 deg at rest (the engine's own limit, no
    # source) the pushrod pushes almost across the bore and is refused the same way; 87 is not.
    for degrees, refused in ((88.0, True), (87.0, False)):
        near = dataclasses.replace(layout, bore_axis=math.radians(degrees))
        if refused:
            with pytest.raises(GeometryError) as caught:
                SliderCrankPedal(near)
            assert caught.value.reason == "axis-across-pushrod"
        else:
            assert SliderCrankPedal(near).stroke_at_stop > 0.0


def test_pushrod_angle_matches_geometry():
    # Coupler angle to the slider axis, sin(phi) = (r sin t - e) / l (Norton, Design of
    # Machinery, slider-crank position analysis).
    r, l, t0 = 0.05, 0.14, math.radians(75)
    e = r * math.sin(t0)
    crank = SliderCrankPedal(norton_layout(r, l, t0, math.radians(30)))
    for deg in (5.0, 20.0, 30.0):
        t = t0 - math.radians(deg)
        expected = math.asin(abs(r * math.sin(t) - e) / l)
        assert crank.pushrod_angle(crank.state(math.radians(deg))[2]) == pytest.approx(
            expected, rel=1e-9)


def test_largest_pushrod_angle_over_the_used_swing_matches_geometry():
    # Pushrod on the bore axis at rest: the coupler angle, sin(phi) = (r sin t - e) / l
    # (Norton, Design of Machinery), grows through this swing, so its largest value over
    # the used swing is the value where the swing ends, between samples or at the stop.
    r, l, t0 = 0.05, 0.14, math.radians(75)
    e = r * math.sin(t0)
    crank = SliderCrankPedal(norton_layout(r, l, t0, math.radians(30)))
    for deg in (0.0, 7.3, 12.0, 30.0):
        stroke = crank.state(math.radians(deg))[0]
        expected = math.asin(abs(r * math.sin(t0 - math.radians(deg)) - e) / l)
        assert crank.pushrod_angle_max(stroke) == pytest.approx(expected, rel=1e-9, abs=1e-12)


def test_square_pushrod_converges_to_simple_ratio_for_small_swings():
    # With the pushrod square to the pedal arm the slider-crank acts as a lever of ratio
    # pad radius / clevis radius for small swings (Norton, Design of Machinery: crank
    # velocity r omega along the coupler; Shigley, levers).
    pad_r, clevis_r = 11.0 * INCH, 2.0 * INCH
    for deg, tolerance in ((0.5, 2e-4), (2.0, 2e-3), (5.0, 1e-2)):
        swing = math.radians(deg)
        build = make_build(layout=square_layout(pad_r, clevis_r, 5 * INCH, swing),
                           pad_travel=pad_r * swing)
        s = size_build(build, make_rules())
        assert s.linkage.mode == "layout"
        assert s.linkage.ratio_at_rest == pytest.approx(5.5, rel=1e-9)
        assert s.ratio_pedal == pytest.approx(5.5, rel=tolerance)
        assert s.linkage.ratio_at_stop == pytest.approx(5.5, rel=2 * tolerance)


def test_layout_sweep_average_and_release_point_are_consistent():
    # Average ratio = pad travel used / stroke used; the sweep runs rest to stop; the
    # instantaneous ratio equals d(pad arc)/ds (Norton slider-crank; arc s = r theta).
    layout = PedalLayout((0.0, 0.0), (-0.060, -0.285), (-0.008, -0.053), (-0.140, -0.048),
                         math.radians(30))
    build = make_build(layout=layout, pad_travel=math.hypot(0.060, 0.285) * math.radians(30))
    s = size_build(build, make_rules())
    sweep = s.linkage.sweep
    assert sweep[0][:2] == (0.0, 0.0)
    assert sweep[-1][0] == pytest.approx(math.hypot(0.060, 0.285) * math.radians(30))
    assert s.linkage.ratio_average == pytest.approx(sweep[-1][0] / s.master_stroke_used, rel=1e-9)
    # no load curve: the headline ratio is the instantaneous one at the release point
    assert s.ratio_pedal == s.linkage.ratio_at_release
    for (p0, s0, r0, _), (p1, s1, r1, _) in zip(sweep[::10], sweep[1::10]):
        assert (p1 - p0) / (s1 - s0) == pytest.approx((r0 + r1) / 2, rel=1e-4)
    assert s.linkage.ratio_at_rest < s.linkage.ratio_at_release < s.linkage.ratio_at_stop
    assert s.linkage.rest.pad == layout.pad
    assert s.pad_travel_to_release == pytest.approx(s.release_point * sweep[-1][0])


def test_over_centre_linkage_is_a_geometry_error_at_the_toggle():
    # Slider-crank toggle (Norton, Design of Machinery): dx/dt = 0 where crank and coupler
    # line up; found here with scipy's brentq on the closed-form derivative. Past it the
    # pedal pulls the master back and the ratio there is infinite: the engine refuses the
    # layout and says where the toggle is.
    r, l, t0 = 0.05, 0.14, math.radians(90)
    e = r * math.sin(t0)

    def velocity(t):
        return -r * math.sin(t) - (r * math.sin(t) - e) * r * math.cos(t) / math.sqrt(
            l * l - (r * math.sin(t) - e) ** 2)

    toggle = scipy.optimize.brentq(velocity, math.radians(-30), math.radians(30))
    layout = norton_layout(r, l, t0, math.radians(120))
    with pytest.raises(GeometryError) as refused:
        size_build(make_build(layout=layout, pad_travel=0.15 * math.radians(120)), make_rules())
    assert refused.value.reason == "dead-centre"
    assert refused.value.angle == pytest.approx(t0 - toggle, abs=1e-9)


def test_pushrod_in_line_with_the_arm_is_a_geometry_error():
    # A crank in line with its coupler cannot drive the slider (Norton, toggle position).
    layout = PedalLayout((0.0, 0.0), (0.0, -0.28), (0.0, -0.05), (0.0, -0.19), 0.5)
    with pytest.raises(GeometryError) as caught:
        size_build(make_build(layout=layout), make_rules())
    assert caught.value.reason == "pushrod-along-crank"


def test_lever_pedal_schematic_poses_follow_its_lengths_and_travel():
    # Arc length s = r * theta (OpenStax College Physics, "Rotation Angle and Angular
    # Velocity"); lever travel ratio x_pad = R_p * s (Shigley): the stop pose swings the pad
    # through 6 in of arc on an 11 in radius and moves the seat by 6 / 5.5 in.
    inch = INCH
    rest, stop = LeverPedal(11 * inch, 2 * inch, 6 * inch).poses()
    assert rest.pivot == stop.pivot == (0.0, 0.0)
    assert rest.pad == pytest.approx((0.0, -11 * inch))
    assert math.hypot(*stop.pad) == pytest.approx(11 * inch)
    assert math.atan2(stop.pad[0], -stop.pad[1]) * 11 * inch == pytest.approx(6 * inch)
    assert math.hypot(*stop.clevis) == pytest.approx(2 * inch)
    assert stop.pushrod_seat[0] - rest.pushrod_seat[0] == pytest.approx(6 / 5.5 * inch)
