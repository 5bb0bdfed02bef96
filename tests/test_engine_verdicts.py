"""The physics that changes verdicts: free play and dead stroke, the travel the pedal really
has, effort where the load peaks (virtual work), springs in the pedal box and the slave,
over-stroke. Each check is a hand calculation written out beside it or an independent
derivation (Norton's closed-form slider-crank differentiated numerically, scipy's root
finder), never the engine's own formula again.
"""
from __future__ import annotations

import math

import numpy as np
import pytest
import scipy.optimize

from builder.engine import size_build
from factories import INCH, POUND_FORCE, make_build, make_rules, norton_layout, norton_slider

LOSSLESS = make_rules(lossless=True)


def codes(sizing) -> dict[str, str]:
    return {flag.code: flag.severity for flag in sizing.flags}


def test_free_play_and_dead_stroke_by_hand():
    # Lever pedal 11 in / 2 in (R_p = 5.5, Shigley, levers); 3/4 in master, 1.40 in stroke;
    # 7/8 in slave, 2:1 fork; lossless; free play 1 mm, dead stroke 1.5 mm; pad travel 7 in.
    #   lost pad travel  = 5.5 * (1 + 1.5) mm                      = 13.75 mm
    #   pushrod at stop  = 177.8 mm / 5.5                          = 32.3273 mm
    #   piston at stop   = 32.3273 - 1                              = 31.3273 mm (< 35.56)
    #   volume pushed    = A_m (31.3273 - 1.5) mm, A_m = 285.0229 mm^2 = 8501.42 mm^3
    #   slave travel     = 8501.42 / 387.9479 mm^2                  = 21.9139 mm
    #   bearing travel   = 21.9139 / 2                              = 10.9570 mm
    #   needed           = (0.05 + 0.30) in                         = 8.89 mm
    #   margin           = 10.9570 / 8.89 - 1                       = +23.25 %
    #   pushrod needed   = 8.89 * 2 * 387.9479 / 285.0229 + 1.5 + 1 = 26.7003 mm
    #   pad to release   = 5.5 * 26.7003                           = 146.852 mm
    #   release point    = 146.852 / 177.8                          = 82.59 %
    # Without them the same build shows +33.6 % margin and release at 74.9 % of the travel
    # (bearing 11.8754 mm; pad to release 5.5 * 24.2003 = 133.102 mm).
    build = make_build(free_play=0.001, dead_stroke=0.0015)
    s = size_build(build, LOSSLESS)
    assert s.lost_pad_travel == pytest.approx(0.01375, rel=1e-9)
    assert s.master_stroke_used == pytest.approx(0.0313273, rel=1e-5)
    assert s.slave_travel == pytest.approx(0.0219139, rel=1e-5)
    assert s.margin == pytest.approx(0.23251, abs=1e-4)
    assert s.pad_travel_to_release == pytest.approx(0.146852, rel=1e-5)
    assert s.release_point == pytest.approx(0.82594, abs=1e-4)
    old = size_build(make_build(), LOSSLESS)
    assert old.margin == pytest.approx(0.33580, abs=1e-4)
    assert old.release_point == pytest.approx(0.74861, abs=1e-4)


def test_shop_defaults_apply_when_a_record_gives_none():
    # The shop's master_dead_stroke and pushrod_free_play stand in for missing record values;
    # a record's own value wins, even 0. Lost pad travel R_p (c + d): 5.5 * 2.5 mm, 5.5 * 1 mm.
    rules = make_rules(lossless=True, master_dead_stroke=0.0015, pushrod_free_play=0.001)
    assert size_build(make_build(), rules).lost_pad_travel == pytest.approx(0.01375)
    assert size_build(make_build(dead_stroke=0.0), rules).lost_pad_travel == pytest.approx(0.0055)


def test_lost_travel_is_at_most_the_travel_the_pedal_has():
    # 10 mm of pad travel on the 5.5 lever moves the pushrod 10 / 5.5 = 1.818 mm, short of
    # the 1 mm free play plus 1.5 mm dead stroke: the whole 10 mm is lost (not 5.5 * 2.5 =
    # 13.75 mm) and the slave does not move (by hand, Shigley, levers).
    s = size_build(make_build(pad_travel=0.010, free_play=0.001, dead_stroke=0.0015), LOSSLESS)
    assert s.lost_pad_travel == pytest.approx(0.010, rel=1e-9)
    assert s.slave_travel == 0.0 and codes(s)["travel-short"] == "fail"


def test_release_point_is_on_the_travel_the_pedal_really_has():
    # The master bottoms before the floor stop, so the pedal's usable travel ends there:
    # 11 in / 2 in lever (R_p 5.5), 1.0 in stroke, 1 mm free play, 8 in to the stop.
    #   pad where it bottoms = 5.5 * (25.4 + 1) mm           = 145.2 mm   (floor gap 58.0 mm)
    #   pushrod needed       = 8.89 * 2 * 387.9479 / 285.0229 + 1 = 25.2003 mm (no dead stroke)
    #   pad to release       = 5.5 * 25.2003                  = 138.602 mm
    #   release point        = 138.602 / 145.2                = 95.46 %  (not 68 % of 203.2 mm)
    build = make_build(master_stroke=1.0 * INCH, pad_travel=8.0 * INCH, free_play=0.001)
    s = size_build(build, LOSSLESS)
    assert s.usable_pad_travel == pytest.approx(0.1452, rel=1e-9)
    assert s.floor_gap == pytest.approx(0.2032 - 0.1452, rel=1e-9)
    assert s.release_point == pytest.approx(0.95455, abs=1e-4)
    assert codes(s)["release-late"] == "warn"
    flag = next(f for f in s.flags if f.code == "release-late")
    assert flag.value("usable") == s.usable_pad_travel


def test_headline_effort_is_the_virtual_work_peak_of_the_slider_crank():
    # Virtual work (Norton, Design of Machinery): F_pad = F_b dx_b / dx_pad. Worked here on
    # Norton's own closed form, differentiated by central differences, over 4,000 crank
    # angles; the engine's headline must equal the peak (to the grid) and sit where it is.
    r, l, t0, pad_r, swing = 0.05, 0.14, math.radians(80), 0.28, math.radians(30)
    e = r * math.sin(t0)
    layout = norton_layout(r, l, t0, swing, pad_radius=pad_r)
    curve = ((0.0, 0.0), (0.002, 1500.0), (0.0045, 1800.0), (0.008, 1300.0))
    play, dead, clearance = 0.001, 0.0015, 0.0012
    build = make_build(layout=layout, pad_travel=pad_r * swing, load_curve=curve,
                       release_load=1800.0, clearance=clearance, free_play=play,
                       dead_stroke=dead, slave_stroke=2 * INCH)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    a_m, a_s = math.pi / 4 * (0.75 * INCH) ** 2, math.pi / 4 * (0.875 * INCH) ** 2
    x0 = norton_slider(r, l, e, t0)

    def bearing(theta):  # pushing turns the crank towards smaller t: the slider moves +x
        rod = norton_slider(r, l, e, t0 - theta) - x0
        return max(0.0, a_m * (rod - play - dead)) / a_s / 2.0

    thetas = np.linspace(0.0, swing, 4001)
    h = 1e-7
    forces = []
    for theta in thetas[1:-1]:
        x_b = bearing(theta)
        load = float(np.interp(x_b - clearance, [c[0] for c in curve], [c[1] for c in curve])
                     ) if x_b >= clearance else 0.0
        dxb = (bearing(theta + h) - bearing(theta - h)) / (2 * h)
        forces.append(load * dxb / pad_r)  # dx_pad = r_pad d theta
    best = int(np.argmax(forces))
    assert s.effort_ideal == pytest.approx(forces[best], rel=2e-4)
    assert s.effort_pad_travel == pytest.approx(pad_r * thetas[1:-1][best], abs=0.5e-3)
    assert max(force for _, force in s.effort_curve) == pytest.approx(s.effort_ideal)


def test_without_a_curve_effort_is_taken_at_the_release_point():
    # Constant release load: F = F / (R_p(release) R_h R_f), R_p(release) = r_pad / (ds/dt)
    # where the pushrod has travelled V/A_m + d + c (Norton, closed form, derivative by
    # central differences; the crank angle found with scipy's brentq).
    r, l, t0, pad_r, swing = 0.05, 0.14, math.radians(80), 0.28, math.radians(40)
    e = r * math.sin(t0)
    layout = norton_layout(r, l, t0, swing, pad_radius=pad_r)
    build = make_build(layout=layout, pad_travel=pad_r * swing, free_play=0.001,
                       dead_stroke=0.0015)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    a_m, a_s = math.pi / 4 * (0.75 * INCH) ** 2, math.pi / 4 * (0.875 * INCH) ** 2
    rod_needed = (0.35 * INCH) * 2.0 * a_s / a_m + 0.0015 + 0.001
    x0 = norton_slider(r, l, e, t0)

    def travel(theta):
        return norton_slider(r, l, e, t0 - theta) - x0

    theta = scipy.optimize.brentq(lambda t: travel(t) - rod_needed, 1e-9, swing)
    h = 1e-7
    ratio = pad_r / ((travel(theta + h) - travel(theta - h)) / (2 * h))
    assert s.linkage.ratio_at_release == pytest.approx(ratio, rel=1e-6)
    assert s.effort_ideal == pytest.approx(400 * POUND_FORCE / (ratio * (a_s / a_m) * 2.0),
                                           rel=1e-6)
    assert s.pad_travel_to_release == pytest.approx(pad_r * theta, rel=1e-7)


def test_bare_pedal_effort_adds_where_the_effort_is_taken():
    # Virtual work with the pedal's own force (Norton): F = F_b / R + F_bare(x_pad). Lever
    # build, lossless, no free play: pad to release 5.5 * 8.89 * 2 * 387.9479 / 285.0229
    # = 133.102 mm; the bare force there, read between (0, 4 lbf) and (6 in, -3 lbf):
    # 4 - 7 * 133.102 / 152.4 = -2.1136 lbf; F_b / R = 400 lbf / 14.9722 = 26.7161 lbf.
    bare = ((0.0, 4 * POUND_FORCE), (6 * INCH, -3 * POUND_FORCE))
    s = size_build(make_build(bare_effort=bare), LOSSLESS, efficiency=1.0)
    assert s.pad_travel_to_release == pytest.approx(0.133102, rel=1e-5)
    assert s.effort_ideal / POUND_FORCE == pytest.approx(26.7161 - 2.1136, abs=2e-4)


def test_bare_pedal_effort_with_a_curve_peaks_where_the_sum_does():
    # With a load curve and a bare pedal force, the headline is the peak of the sum over
    # the stroke, checked on a dense grid of pad travel worked by hand in closed form for a
    # lever pedal without losses: x_b = (x_pad / 5.5) * A_m / A_s / 2 (no free play).
    curve = ((0.0, 0.0), (0.004, 1800.0), (0.008, 1750.0))
    bare = ((0.0, 30.0), (0.05, 60.0), (0.10, -40.0), (0.18, -40.0))
    build = make_build(load_curve=curve, release_load=None, clearance=0.0, bare_effort=bare)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    a_m, a_s = math.pi / 4 * (0.75 * INCH) ** 2, math.pi / 4 * (0.875 * INCH) ** 2
    pads = np.linspace(0.0, s.effort_curve[-1][0], 20001)
    x_b = pads / 5.5 * a_m / a_s / 2.0
    force = (np.interp(x_b, [c[0] for c in curve], [c[1] for c in curve]) / (5.5 * a_s / a_m * 2)
             + np.interp(pads, [b[0] for b in bare], [b[1] for b in bare]))
    assert s.effort_ideal == pytest.approx(force.max(), rel=1e-5)


def test_concentric_preload_takes_its_share_and_the_clearance():
    # Concentric slave with a 250 N internal spring: the bearing rests on the fingers
    # (clearance 0) and the fluid carries F - 250 N (equilibrium of the bearing, Shigley).
    # 1,900 N on 700 mm^2: p = 1650 / 7e-4 = 2.357 MPa; lever 5.5, R_h = 700 / 285.0229:
    # F = 1650 / (5.5 * 2.45594) = 122.153 N.
    build = make_build(fork=None, slave_bore=None, piston_area=7.0e-4, slave_stroke=0.02,
                       release_load=1900.0, preload=250.0, clearance=0.0015)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    assert s.clearance == 0.0 and s.needed_bearing_travel == pytest.approx(0.30 * INCH)
    assert s.pressure == pytest.approx(1650.0 / 7e-4)
    assert s.effort_ideal == pytest.approx(122.153, rel=1e-5)


def test_release_load_may_be_left_out_with_a_curve():
    # The curve's peak stands for the release load: p = 1850 N / 2 / 387.9479 mm^2 (by hand
    # 2.38434 MPa).
    curve = ((0.0, 0.0), (0.003, 1700.0), (0.006, 1850.0), (0.010, 1500.0))
    s = size_build(make_build(load_curve=curve, release_load=None), LOSSLESS)
    assert s.pressure == pytest.approx(2.38434e6, rel=1e-5)


def test_over_stroke_fails_and_a_long_margin_warns():
    # Lossless default test build, by hand: pushrod at the stop 177.8 / 5.5 = 32.3273 mm,
    # 285.0229 mm^2 * 32.3273 = 9214.07 mm^3, slave 9214.07 / 387.9479 = 23.7508 mm,
    # bearing 11.8754 mm; past the 1.27 mm clearance 10.6054 mm against a maker's 10 mm;
    # margin 11.8754 / 8.89 - 1 = +33.6 % against a 30 % limit.
    s = size_build(make_build(max_release_travel=0.010), make_rules(lossless=True,
                                                                     max_travel_margin=0.30))
    assert s.bearing_travel == pytest.approx(0.0118754, rel=1e-5)
    assert codes(s)["over-stroke"] == "fail" and codes(s)["travel-margin-high"] == "warn"
    flag = next(f for f in s.flags if f.code == "over-stroke")
    assert flag.value("travel") == pytest.approx(s.bearing_travel - 0.05 * INCH)
    assert flag.value("limit") == 0.010
    fine = size_build(make_build(max_release_travel=0.015), make_rules(lossless=True))
    assert "over-stroke" not in codes(fine) and "travel-margin-high" not in codes(fine)


def test_master_volume_short_counts_the_dead_stroke():
    # 3/4 in master, 0.45 in stroke: 285.0229 mm^2 * 11.43 mm = 3257.8 mm^3 swept; with a
    # 2 mm dead stroke it pushes 285.0229 * 9.43 = 2687.8 mm^3; release needs
    # 8.89 mm * 2 * 387.9479 mm^2 = 6897.7 mm^3 lossless.
    s = size_build(make_build(master_stroke=0.45 * INCH, dead_stroke=0.002), LOSSLESS)
    assert s.master_swept_volume == pytest.approx(2687.8e-9, rel=1e-4)
    assert s.needed_volume == pytest.approx(6897.7e-9, rel=1e-4)
    assert codes(s)["master-volume-short"] == "fail"
