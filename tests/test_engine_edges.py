"""Edges of the engine: reading tables, the ends of the pedal's travel, the peak of the
effort in odd places, and the slider-crank solved backwards, each against an outside
reference (numpy's interpolation, scipy's root finder and bounded minimiser on Norton's
closed form, a rotation matrix) or a work balance.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.integrate
import scipy.optimize

from builder.engine import size_build
from builder.engine.effort import interpolate
from builder.engine.linkage import SliderCrankPedal
from builder.model import PedalLayout
from factories import INCH, make_build, make_rules, norton_layout, norton_slider, square_layout

LOSSLESS = make_rules(lossless=True)


def _trapezoid(points):
    return sum((x1 - x0) * (y0 + y1) / 2 for (x0, y0), (x1, y1) in zip(points, points[1:]))


def test_tables_are_read_as_numpy_reads_them():
    # numpy.interp: straight lines between points, the end values held past the ends.
    rng = np.random.default_rng(3)
    for _ in range(20):
        xs = np.sort(rng.uniform(0.0, 0.2, 5))
        ys = rng.uniform(-50.0, 300.0, 5)
        points = tuple(zip(xs.tolist(), ys.tolist()))
        for x in (-0.1, xs[0], *rng.uniform(-0.05, 0.25, 12), xs[-1], 0.3):
            assert interpolate(points, float(x)) == pytest.approx(float(np.interp(x, xs, ys)))


def test_no_release_when_the_pushrod_runs_out_though_the_slave_could():
    # 0.5 in release + 0.05 in clearance at a 2:1 fork needs 1.1 in of a 1.25 in slave, but
    # the master must push 0.6013 in^2 * 1.1 in / 0.4418 in^2 = 1.497 in and the pedal gives
    # 7 / 5.5 = 1.273 in (by hand): no release; the effort is taken where the travel ends.
    s = size_build(make_build(release_travel=0.5 * INCH), LOSSLESS)
    assert s.release_point is None and s.pad_travel_to_release is None
    assert s.effort_pad_travel == pytest.approx(7.0 * INCH)
    assert s.linkage.ratio_at_release is None


def test_no_release_when_the_slave_runs_out_though_the_master_could():
    # 0.35 in at the bearing is 0.70 in of slave on a 2:1 fork, more than its 0.6 in stroke;
    # the master would have pushed enough (0.42 in^3 of 0.56 in^3, by hand).
    s = size_build(make_build(slave_stroke=0.6 * INCH), LOSSLESS)
    assert s.release_point is None and s.slave_overtravel


def test_what_a_sizing_reports_about_itself():
    build = make_build(dead_stroke=0.0013, free_play=0.0007)
    s = size_build(build, LOSSLESS)
    assert s.build_id == build.id
    assert (s.dead_stroke, s.free_play, s.clearance) == (0.0013, 0.0007, 0.05 * INCH)
    assert s.effort_curve is None and s.efficiency == LOSSLESS.default_efficiency
    # a lever's sweep: rest and stop, constant ratio, no pushrod angle
    assert s.linkage.sweep == ((0.0, 0.0, 5.5, 0.0), (7.0 * INCH, 7.0 * INCH / 5.5, 5.5, 0.0))
    assert s.linkage.ratio_average == pytest.approx(5.5)


def test_lever_schematic_poses_hang_below_the_pivot():
    # The schematic: pad and clevis straight below the pivot at rest, the pushrod level from
    # the clevis, 0.45 of pivot-to-pad long (a drawing length, not a record value).
    s = size_build(make_build(), LOSSLESS)
    rest, stop = s.linkage.rest, s.linkage.stop
    assert rest.clevis == pytest.approx((0.0, -2 * INCH))
    assert rest.pushrod_seat == pytest.approx((0.45 * 11 * INCH, -2 * INCH))
    assert stop.pushrod_seat[1] == pytest.approx(-2 * INCH)
    assert stop.clevis[1] < 0.0 and math.hypot(*stop.clevis) == pytest.approx(2 * INCH)


def test_layout_poses_rotate_about_the_pivot():
    # Each point turns about the pivot by the swing (rotation matrix [[c, -s], [s, c]]).
    pivot = (0.31, -0.12)
    layout = PedalLayout(pivot, (0.25, -0.405), (0.302, -0.173), (0.17, -0.168),
                         math.radians(30))
    pedal = SliderCrankPedal(layout)
    theta = math.radians(12)
    turn = pedal.sense * theta
    matrix = np.array([[math.cos(turn), -math.sin(turn)], [math.sin(turn), math.cos(turn)]])
    pose = pedal.pose(theta)
    for name in ("pad", "clevis"):
        expected = np.array(pivot) + matrix @ (np.array(getattr(layout, name)) - pivot)
        assert getattr(pose, name) == pytest.approx(tuple(expected), abs=1e-12)
    assert pose.pivot == pivot
    assert math.dist(pose.clevis, pose.pushrod_seat) == pytest.approx(pedal.rod, rel=1e-9)


@pytest.mark.parametrize("frame", [(0.0, 0.0, 0.0), (0.3, -1.2, 2.1), (-0.05, 0.4, -0.7)])
def test_the_slider_crank_solved_backwards_matches_norton(frame):
    # solve(s): the crank angle where the pushrod has moved s, against scipy's brentq on
    # Norton's closed form; in any frame.
    r, l, t0 = 0.05, 0.14, math.radians(75)
    e = r * math.sin(t0)
    pedal = SliderCrankPedal(norton_layout(r, l, t0, math.radians(30), frame))
    x0 = norton_slider(r, l, e, t0)
    for stroke in (1e-4, 0.004, 0.011, 0.019, pedal.stroke_at_stop * 0.999):
        theta = scipy.optimize.brentq(
            lambda t: norton_slider(r, l, e, t0 - t) - x0 - stroke, 0.0, math.radians(30),
            xtol=1e-14)
        found, state = pedal.solve(stroke)
        assert found == pytest.approx(theta, abs=1e-10)
        assert state[0] == pytest.approx(stroke, abs=1e-12)
    assert pedal.solve(0.0)[0] == 0.0 and pedal.solve(-1.0)[0] == 0.0
    assert pedal.solve(1.0)[0] == pytest.approx(math.radians(30))
    assert pedal.solve(1.0)[1] == pedal.state(math.radians(30))


@pytest.mark.parametrize("rise", [0.0, 0.001])
def test_a_crank_along_the_bore_axis_turns_the_way_that_pushes(rise):
    # Crank (nearly) along +x, bore axis +x through a seat 30 mm above: the pushrod's offset
    # decides which way pushes (ccw here: the clevis rises towards the axis line), even
    # against a crank tilted 1 mm the other way. Norton's closed form with e = 0.03 and
    # t growing from t0 = asin(rise / r).
    r, e = math.hypot(0.05, rise), 0.03
    t0 = math.asin(rise / r)
    clevis = (r * math.cos(t0), rise)
    l = math.hypot(0.13, e - rise)
    layout = PedalLayout((0.0, 0.0), (0.15, 0.0), clevis, (clevis[0] + 0.13, e),
                         math.radians(7), bore_axis=0.0)  # the toggle is past 8 deg
    pedal = SliderCrankPedal(layout)
    x0 = norton_slider(r, l, e, t0)
    for deg in (2.0, 5.0, 6.5):
        t = t0 + math.radians(deg)
        assert pedal.state(math.radians(deg))[0] == pytest.approx(
            norton_slider(r, l, e, t) - x0, rel=1e-9)
    assert pedal.sense == 1.0


@pytest.mark.parametrize("clevis, seat, axis_deg", [
    ((0.0, -0.05), (0.14, -0.05), None), ((0.04, 0.03), (-0.06, 0.12), None),
    ((0.0, -0.05), (0.042, 0.0836), 126.87), ((-0.02, -0.05), (0.12, -0.02), 6.0),
    ((0.03, -0.04), (-0.10, -0.09), 200.0)])
def test_solving_backwards_undoes_the_forward_position(clevis, seat, axis_deg):
    # Whatever the frame and axis, the crank angle solve() finds moves the pushrod by the
    # stroke asked for (forward position analysis, Norton).
    layout = PedalLayout((0.0, 0.0), (4 * clevis[0], 4 * clevis[1]), clevis, seat,
                         math.radians(25), None if axis_deg is None else math.radians(axis_deg))
    pedal = SliderCrankPedal(layout)
    angles = []
    for share in (0.05, 0.3, 0.6, 0.95):
        stroke = share * pedal.stroke_at_stop
        theta = pedal.solve(stroke)[0]
        assert 0.0 < theta < pedal.stop_angle  # the clevis on its own side of pivot-seat
        assert pedal.state(theta)[0] == pytest.approx(stroke, rel=1e-9)
        angles.append(theta)
    assert angles == sorted(angles)
    end = pedal.solve(pedal.stroke_at_stop)
    assert end[0] == pedal.stop_angle and end[1] == pedal.state(pedal.stop_angle)


@pytest.mark.parametrize("degrees, seat", [((80.0, 260.0), (0.03, 0.09)),
                                           ((126.87, -53.13), (0.042, 0.0836))])
def test_a_steep_bore_axis_is_the_same_line_either_way(degrees, seat):
    # The bore axis is a line: a direction and its opposite give one linkage (the way into
    # the master is taken), here with the pushrod rising steeply at rest.
    states = []
    for deg in degrees:
        layout = PedalLayout((0.0, 0.0), (0.0, -0.28), (0.0, -0.05), seat,
                             math.radians(25), bore_axis=math.radians(deg))
        pedal = SliderCrankPedal(layout)
        states.append([pedal.state(math.radians(a)) for a in (0.0, 5.0, 15.0)])
        assert pedal.axis[1] > 0.0  # into the master, upwards here
    for one, other in zip(*states):
        assert one == pytest.approx(other, rel=1e-12, abs=1e-15)


def test_a_weak_but_working_pedal_is_not_refused():
    # A pushrod 10 deg off the crank's line still pushes the master (ds/dtheta =
    # r sin 10 deg = 8.7 mm/rad, Norton's velocity at rest): a poor pedal (ratio 32:1 at
    # rest), not an impossible one, over a short swing that stays clear of the toggle.
    tilt = math.radians(10)
    layout = PedalLayout((0.0, 0.0), (0.0, -0.28), (0.0, -0.05),
                         (0.14 * math.sin(tilt), -0.05 - 0.14 * math.cos(tilt)), 0.05)
    pedal = SliderCrankPedal(layout)
    assert pedal.state(0.0)[1] == pytest.approx(0.05 * math.sin(tilt), rel=1e-6)


def test_bare_pedal_force_kinks_inside_the_lost_travel_are_sampled():
    # Work balance (OpenStax College Physics, "Simple Machines"): the bare pedal force rises
    # and falls within the 13.75 mm the pad moves before the master pushes (free play 1 mm,
    # dead stroke 1.5 mm, R_p 5.5), then rises slowly; pad work = bearing work + bare work.
    curve = ((0.0, 0.0), (0.003, 1700.0), (0.006, 1850.0), (0.010, 1500.0))
    bare = ((0.0, 10.0), (0.005, 30.0), (0.010, 15.0), (0.5, 40.0))
    build = make_build(load_curve=curve, release_load=None, clearance=0.0015, free_play=0.001,
                       dead_stroke=0.0015, bare_effort=bare, slave_stroke=3 * INCH)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    end = s.effort_curve[-1][0]
    bare_work, _ = scipy.integrate.quad(lambda x: float(np.interp(x, *zip(*bare))), 0.0, end,
                                        points=[0.005, 0.010])
    bearing_work, _ = scipy.integrate.quad(
        lambda x: float(np.interp(x - 0.0015, *zip(*curve))) if x >= 0.0015 else 0.0,
        0.0, s.bearing_travel, points=[0.0015, 0.0045, 0.0075, 0.0115])
    assert _trapezoid(s.effort_curve) == pytest.approx(bearing_work + bare_work, rel=1e-9)
    pads = [pad for pad, _ in s.effort_curve]
    assert pads == sorted(pads) and pads[-1] == pytest.approx(7.0 * INCH)


def test_a_load_that_steps_up_at_contact_is_drawn_as_a_step():
    # A curve starting at 400 N: nothing before the clearance is taken up, 400 N from first
    # contact; the work balance (OpenStax, "Simple Machines") holds only with the step.
    curve = ((0.0, 400.0), (0.003, 1700.0), (0.008, 1500.0))
    build = make_build(load_curve=curve, release_load=None, clearance=0.0012,
                       slave_stroke=3 * INCH)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    work, _ = scipy.integrate.quad(
        lambda x: float(np.interp(x - 0.0012, *zip(*curve))) if x >= 0.0012 else 0.0,
        0.0, s.bearing_travel, points=[0.0012, 0.0042, 0.0092])
    assert _trapezoid(s.effort_curve) == pytest.approx(work, rel=1e-9)
    pads = [pad for pad, _ in s.effort_curve]
    step = [f for pad, f in s.effort_curve if pad == pytest.approx(pads[pads.index(pads[2])])]
    assert min(step) == 0.0 and max(step) > 0.0


def test_the_peak_can_sit_where_only_the_bare_pedal_pushes():
    # A strong return spring at rest and a light clutch in layout mode: the highest pad
    # force is the spring's at rest (before the master pushes), with the ratio at rest.
    curve = ((0.0, 0.0), (0.02, 8000.0))  # light within reach, heavy far past it
    layout = square_layout(11 * INCH, 2 * INCH, 5 * INCH, math.radians(28))
    build = make_build(layout=layout, pad_travel=11 * INCH * math.radians(28), load_curve=curve,
                       release_load=None, bare_effort=((0.0, 400.0), (0.01, 0.0)),
                       free_play=0.001)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    assert s.effort_ideal == 400.0 and s.effort_pad_travel == 0.0
    assert s.ratio_pedal == s.linkage.ratio_at_rest


def test_layout_curve_is_sampled_evenly_through_the_swing():
    # The plot samples the bearing travel at 1/48 steps in layout mode: no gap between
    # pad samples after contact is much wider than the typical one.
    curve = ((0.0, 0.0), (0.003, 1700.0), (0.006, 1850.0), (0.010, 1500.0))
    layout = square_layout(11 * INCH, 2 * INCH, 5 * INCH, math.radians(28))
    s = size_build(make_build(layout=layout, pad_travel=11 * INCH * math.radians(28),
                              load_curve=curve, clearance=0.0, slave_stroke=3 * INCH), LOSSLESS)
    gaps = np.diff([pad for pad, _ in s.effort_curve])
    gaps = gaps[gaps > 1e-9]
    assert gaps.max() < 1.5 * np.median(gaps) and len(gaps) >= 48


def test_refined_peak_against_a_bounded_minimiser_on_nortons_form():
    # The headline is the peak of F_b(x_b) dx_b / dx_pad over the stroke (virtual work,
    # Norton); scipy's bounded minimiser on the closed form finds it to 1e-12 in angle.
    r, l, t0, pad_r, swing = 0.05, 0.14, math.radians(80), 0.28, math.radians(30)
    e = r * math.sin(t0)
    layout = norton_layout(r, l, t0, swing, pad_radius=pad_r)
    curve = ((0.0, 0.0), (0.002, 1500.0), (0.0045, 1800.0), (0.008, 1300.0))
    s = size_build(make_build(layout=layout, pad_travel=pad_r * swing, load_curve=curve,
                              release_load=None, clearance=0.0, slave_stroke=2 * INCH),
                   LOSSLESS, efficiency=1.0)
    a_m, a_s = math.pi / 4 * (0.75 * INCH) ** 2, math.pi / 4 * (0.875 * INCH) ** 2
    x0 = norton_slider(r, l, e, t0)

    def bearing(theta):
        return a_m * (norton_slider(r, l, e, t0 - theta) - x0) / a_s / 2.0

    def force(theta):  # exact derivative of Norton's x: dx/dt = -r sin t - (r sin t - e) r cos t / root
        t = t0 - theta
        root = math.sqrt(l * l - (r * math.sin(t) - e) ** 2)
        dx = r * math.sin(t) + (r * math.sin(t) - e) * r * math.cos(t) / root
        load = float(np.interp(bearing(theta), *zip(*curve)))
        return load * (a_m / a_s / 2.0) * dx / pad_r

    best = max(np.linspace(0.001, swing, 400), key=force)
    found = scipy.optimize.minimize_scalar(lambda t: -force(t), bounds=(best - 0.01, best + 0.01),
                                           method="bounded", options={"xatol": 1e-12})
    assert s.effort_ideal == pytest.approx(-found.fun, rel=1e-8)


def test_a_peak_between_samples_is_found_where_the_ratio_is_lowest():
    # A constant load: F = F_b dx_b / dx_pad peaks where the pedal ratio is lowest, here in
    # mid-swing (the crank passes square to the bore axis at 10 deg of a 30 deg swing);
    # scipy's bounded minimiser on Norton's closed form, differentiated exactly.
    r, l, t0, pad_r, swing = 0.05, 0.14, math.radians(100), 0.28, math.radians(30)
    e = r * math.sin(t0)
    layout = norton_layout(r, l, t0, swing, pad_radius=pad_r)
    s = size_build(make_build(layout=layout, pad_travel=pad_r * swing,
                              load_curve=((0.0, 1800.0),), release_load=None, clearance=0.0,
                              slave_stroke=2 * INCH), LOSSLESS, efficiency=1.0)
    a_m, a_s = math.pi / 4 * (0.75 * INCH) ** 2, math.pi / 4 * (0.875 * INCH) ** 2

    def force(theta):
        t = t0 + math.copysign(theta, -1.0)
        root = math.sqrt(l * l - (r * math.sin(t) - e) ** 2)
        dx = r * math.sin(t) + (r * math.sin(t) - e) * r * math.cos(t) / root
        return 1800.0 * (a_m / a_s / 2.0) * dx / pad_r

    found = scipy.optimize.minimize_scalar(lambda t: -force(t), bounds=(0.0, swing),
                                           method="bounded", options={"xatol": 1e-12})
    assert 0.05 < found.x < 0.3  # inside the swing, between samples
    assert s.effort_ideal == pytest.approx(-found.fun, rel=1e-10)
    assert s.effort_pad_travel == pytest.approx(pad_r * found.x, rel=1e-4)


def test_hose_swell_starts_at_any_pressure_above_zero():
    # A line through zero: at 1 Pa a hose swells by its figure times 1 Pa.
    from builder.engine.hydraulics import expansion_per_length

    assert expansion_per_length(3e-13, 1.0) == 3e-13
    assert expansion_per_length(((1e6, 3e-7),), 0.5) == pytest.approx(1.5e-13)


def test_the_sweep_carries_the_pushrod_angle_at_every_sample():
    # The pushrod's largest angle can fall mid-swing (the crank passes square to the axis):
    # asin(|r sin t - e| / l) (Norton) peaks at t = 90 deg when t0 = 110 deg.
    r, l, t0 = 0.05, 0.14, math.radians(110)
    e = r * math.sin(t0)
    pedal = SliderCrankPedal(norton_layout(r, l, t0, math.radians(40)))
    for theta, row in zip(pedal._thetas, pedal.sweep()):
        assert row[3] == pytest.approx(math.asin(abs(r * math.sin(t0 - theta) - e) / l),
                                       abs=1e-12)
    peak = math.asin((r - e) / l)
    assert pedal.pushrod_angle_max(pedal.stroke_at_stop) == pytest.approx(peak, rel=1e-3)
    assert pedal.pushrod_angle_max(pedal.stroke_at_stop) > pedal.pushrod_angle(
        pedal.state(pedal.stop_angle)[2])
