"""size_build end to end: trade rules of thumb, work balance, flags on purpose-built cases."""
from __future__ import annotations

import math
import os

import pytest
import numpy as np
import scipy.integrate
from hypothesis import given, settings, strategies as st

from builder.engine import size_build
from builder.engine.effort import load_at
from factories import (
    INCH, POUND_FORCE, PSI, make_build, make_rules, square_layout,
)

LOSSLESS = make_rules(lossless=True)


def codes(sizing) -> dict[str, str]:
    return {flag.code: flag.severity for flag in sizing.flags}


def test_equal_bores_move_the_slave_as_far_as_the_master():
    # Common practice, no source: equal bores move the slave as far as the master.
    s = size_build(make_build(master_bore=0.75 * INCH, slave_bore=0.75 * INCH,
                              slave_stroke=2 * INCH), LOSSLESS)
    assert s.ratio_hydraulic == pytest.approx(1.0)
    assert s.slave_travel == pytest.approx(s.master_stroke_used, rel=1e-12)


def test_five_to_one_pedal_turns_100_lb_into_20_lb():
    # Common practice, no source: a 5:1 pedal turns a 100 lb release into 20 lb at the pad
    # (equal bores, concentric slave, no friction).
    build = make_build(pedal=(10 * INCH, 2 * INCH), master_bore=0.75 * INCH,
                       slave_bore=0.75 * INCH, fork=None, release_load=100 * POUND_FORCE)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    assert s.ratio_fork == 1.0 and s.ratio_pedal == pytest.approx(5.0)
    assert s.effort_ideal / POUND_FORCE == pytest.approx(20.0)
    assert s.effort_predicted == pytest.approx(s.effort_ideal)


def test_seven_tenths_master_into_seven_eighths_slave():
    # Common practice, no source: a 0.7 in bore, 1.5 in stroke master into a 7/8 in slave
    # gives a little under 1 in of slave travel (0.96 in lossless; losses take a little).
    build = make_build(master_bore=0.7 * INCH, master_stroke=1.5 * INCH,
                       slave_bore=0.875 * INCH, slave_stroke=1.5 * INCH,
                       pedal=(12 * INCH, 2 * INCH), pad_travel=9.5 * INCH)
    lossless = size_build(build, LOSSLESS)
    assert lossless.slave_travel / INCH == pytest.approx(0.96, rel=1e-9)
    with_losses = size_build(build, make_rules(), efficiency=1.0)
    assert 0.9 < with_losses.slave_travel / INCH < lossless.slave_travel / INCH


def test_master_that_bottoms_early_leaves_a_floor_gap():
    # Common practice, no source: floor gap = pad travel - master stroke * pedal ratio.
    build = make_build(pedal=(11 * INCH, 2 * INCH), master_stroke=1.0 * INCH,
                       pad_travel=7.0 * INCH)
    s = size_build(build, make_rules())
    assert s.floor_gap / INCH == pytest.approx(7.0 - 1.0 * 5.5)
    assert s.master_stroke_used == build.master.stroke
    assert codes(s)["master-bottoms-early"] == "warn"
    assert size_build(make_build(pad_travel=5.0 * INCH), make_rules()).floor_gap == 0.0


def test_release_point_inverts_the_chain_including_losses():
    # Volume balance A_m s = A_s x_s + dV (OpenStax "Pascal's Principle"; Merritt for dV)
    # and pad = R_p s (Shigley, levers): the release point reproduces the needed travel.
    build = make_build()
    s = size_build(build, make_rules())
    stroke = s.pad_travel_to_release / s.ratio_pedal
    bearing = (s.master_area * stroke - s.losses_volume) / s.slave_area / s.ratio_fork
    assert bearing == pytest.approx(s.needed_bearing_travel, rel=1e-12)
    assert s.release_point == pytest.approx(s.pad_travel_to_release / build.pedal.pad_travel)
    assert s.needed_volume == pytest.approx(s.master_area * stroke)
    assert s.linkage.ratio_at_release == s.ratio_pedal


def test_concentric_slave_with_annular_area():
    # R_f = 1 without a fork; p = F / A for the given annular area (OpenStax, "Pascal's
    # Principle").
    area = 1.9 * INCH**2
    build = make_build(fork=None, slave_bore=None, piston_area=area, slave_stroke=0.5 * INCH,
                       release_load=950 * POUND_FORCE)
    s = size_build(build, make_rules())
    assert s.ratio_fork == 1.0 and s.slave_area == area
    assert s.pressure / PSI == pytest.approx(500.0)
    assert s.bearing_travel == s.slave_travel


def test_efficiency_defaults_to_the_shop_rule():
    # Machine efficiency eta = ideal / actual effort (OpenStax College Physics, "Simple
    # Machines").
    s = size_build(make_build(), make_rules(default_efficiency=0.8))
    assert s.efficiency == 0.8 and s.effort_predicted == pytest.approx(s.effort_ideal / 0.8)
    assert size_build(make_build(), make_rules(), efficiency=0.7).efficiency == 0.7


def _trapezoid(points):
    return sum((x1 - x0) * (y0 + y1) / 2 for (x0, y0), (x1, y1) in zip(points, points[1:]))


def _read(points, x):
    """A table of points read as numpy does: straight lines between, flat past the ends."""
    return float(np.interp(x, [p for p, _ in points], [f for _, f in points]))


def _bearing_work(curve, clearance, reached, preload=0.0):
    """Work done on the bearing, the integral of max(0, load - preload) over bearing travel
    from rest: no load before the clearance, then the curve from first contact (scipy's
    quad over numpy's interpolation, each curve point a break point)."""
    if reached <= clearance:
        return 0.0
    breaks = [clearance + x for x, _ in curve if clearance < clearance + x < reached]
    work, _ = scipy.integrate.quad(
        lambda x: max(0.0, _read(curve, x - clearance) - preload), clearance, reached,
        points=breaks or None, limit=200, epsabs=1e-10)
    return work


load_curves = st.lists(
    st.tuples(st.floats(0.0005, 0.012), st.floats(50.0, 3000.0)), min_size=1, max_size=6,
    unique_by=lambda point: round(point[0], 6),
).map(lambda points: ((0.0, 0.0), *sorted(points)))


@settings(max_examples=10 if "MUTANT_UNDER_TEST" in os.environ else 60, deadline=None)
@given(curve=load_curves,
       pedal_ratio=st.floats(3.0, 8.0),
       master_in=st.floats(0.5, 1.0),
       slave_in=st.floats(0.625, 1.25),
       fork=st.one_of(st.none(), st.floats(1.2, 3.0)),
       clearance=st.floats(0.0, 0.003),
       free_play=st.floats(0.0, 0.003),
       dead_stroke=st.floats(0.0, 0.003))
def test_work_balance_pad_equals_bearing(curve, pedal_ratio, master_in, slave_in, fork,
                                         clearance, free_play, dead_stroke):
    # Work balance of an ideal machine (OpenStax College Physics, "Simple Machines";
    # energy conservation): no losses, efficiency 1, the work put in at the pad equals the
    # work done at the bearing, free play and dead stroke included (the pad moves through
    # them doing no work).
    build = make_build(
        load_curve=curve, pedal=(pedal_ratio * 2 * INCH, 2 * INCH),
        master_bore=master_in * INCH, slave_bore=slave_in * INCH, slave_stroke=4 * INCH,
        fork=None if fork is None else (fork * 2.5 * INCH, 2.5 * INCH), clearance=clearance,
        release_load=max(load for _, load in curve), free_play=free_play,
        dead_stroke=dead_stroke)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    pad_work = _trapezoid(s.effort_curve)
    bearing_work = _bearing_work(curve, clearance, s.bearing_travel)
    assert pad_work == pytest.approx(bearing_work, rel=1e-7, abs=1e-7)
    assert s.effort_curve[0] == (0.0, 0.0)


def test_work_balance_with_free_play_preload_and_a_bare_pedal():
    # Work balance (OpenStax College Physics, "Simple Machines"), lever pedal, no losses:
    # pad work = work on the bearing by the fluid (load less the concentric slave's
    # preload) + work against the bare pedal's own force over the whole pad travel.
    curve = ((0.0, 300.0), (0.003, 1700.0), (0.006, 1850.0), (0.010, 1500.0))
    bare = ((0.0, 20.0), (0.20, -10.0))  # a return spring that an over-centre spring beats
    build = make_build(fork=None, slave_bore=None, piston_area=7.0e-4, slave_stroke=0.02,
                       load_curve=curve, release_load=None, preload=250.0, clearance=0.0015,
                       free_play=0.001, dead_stroke=0.0015, bare_effort=bare,
                       pedal=(11 * INCH, 2 * INCH), pad_travel=6.5 * INCH)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    pad_end = s.effort_curve[-1][0]
    bare_work, _ = scipy.integrate.quad(lambda x: _read(bare, x), 0.0, pad_end)
    # with a preload the bearing rests on the fingers: no clearance
    assert s.clearance == 0.0 and s.needed_bearing_travel == build.clutch.release_travel
    expected = _bearing_work(curve, 0.0, s.bearing_travel, preload=250.0) + bare_work
    assert _trapezoid(s.effort_curve) == pytest.approx(expected, rel=2e-4)


def test_work_balance_in_layout_mode():
    # Work balance of an ideal machine (OpenStax College Physics, "Simple Machines"):
    # holds with the varying slider-crank ratio too, to the sampling of the plot.
    curve = ((0.0, 0.0), (0.003, 1700.0), (0.006, 1850.0), (0.010, 1500.0))
    layout = square_layout(11 * INCH, 2 * INCH, 5 * INCH, math.radians(28))
    build = make_build(layout=layout, pad_travel=11 * INCH * math.radians(28),
                       load_curve=curve, clearance=0.001, slave_stroke=4 * INCH,
                       free_play=0.0008, dead_stroke=0.0012)
    s = size_build(build, LOSSLESS, efficiency=1.0)
    assert _trapezoid(s.effort_curve) == pytest.approx(
        _bearing_work(curve, 0.001, s.bearing_travel), rel=2e-3)


def test_effort_curve_peaks_at_the_headline_effort():
    # F_pad = F_bearing / R / eta (OpenStax College Physics, "Simple Machines"): the plotted
    # curve and the headline effort are the same function, so the curve's peak is it.
    curve = ((0.0, 0.0), (0.003, 1700.0), (0.006, 1850.0), (0.010, 1500.0))
    s = size_build(make_build(load_curve=curve, release_load=1850.0), make_rules())
    assert max(force for _, force in s.effort_curve) == pytest.approx(s.effort_predicted)
    pads = [pad for pad, _ in s.effort_curve]
    assert pads == sorted(pads) and pads[0] == 0.0
    # lever pedal: the peak load over the overall ratio, 1850 N / (5.5 * 1.3611 * 2) by hand
    assert s.effort_ideal == pytest.approx(1850.0 / (5.5 * (0.875 / 0.75) ** 2 * 2.0))


def test_load_curve_is_read_from_first_contact():
    # The curve's travel is counted from first contact: at clearance + x the load is the
    # curve's at x (numpy.interp), so there is no step inside the first segment.
    curve = ((0.0, 0.0), (0.003, 1300.0), (0.006, 1500.0))
    for x in (0.0, 0.0005, 0.0015, 0.004, 0.009):
        assert load_at(curve, 0.0012, 0.0012 + x) == pytest.approx(_read(curve, x))
    assert load_at(curve, 0.0012, 0.0011) == 0.0


# --- flags, each on a purpose-built case --------------------------------------------


def test_a_sound_build_raises_no_flags():
    assert size_build(make_build(), make_rules()).flags == ()


def test_travel_short_fails_and_warns():
    # Margin = bearing / needed - 1: short -> fail, thin -> warn.
    short = size_build(make_build(release_travel=0.6 * INCH), make_rules())
    assert short.margin < 0 and codes(short)["travel-short"] == "fail"
    flag = short.flags[0]
    assert (flag.value("bearing"), flag.value("needed"), flag.value("margin")) == (
        short.bearing_travel, short.needed_bearing_travel, short.margin)
    assert short.release_point is None and short.linkage.ratio_at_release is None
    thin = size_build(make_build(release_travel=0.39 * INCH), make_rules())
    assert 0 <= thin.margin < 0.10 and codes(thin)["travel-short"] == "warn"


def test_slave_overtravel():
    s = size_build(make_build(slave_stroke=0.6 * INCH), make_rules())
    assert s.slave_overtravel and s.slave_travel == 0.6 * INCH
    assert codes(s)["slave-overtravel"] == "fail"


def test_release_late():
    s = size_build(make_build(release_travel=0.38 * INCH), make_rules(latest_release_point=0.6))
    assert s.release_point > 0.6 and codes(s)["release-late"] == "warn"


def test_effort_high_and_low():
    heavy = size_build(make_build(release_load=900 * POUND_FORCE), make_rules())
    assert codes(heavy)["effort-high"] == "warn"
    light = size_build(make_build(release_load=100 * POUND_FORCE), make_rules())
    assert codes(light)["effort-low"] == "warn"
    band = make_rules().effort_band
    assert [light.flags[0].value(name) for name in ("effort", "low", "high")] == [
        light.effort_predicted, *band]


def test_pressure_over_rating_names_the_cylinder():
    s = size_build(make_build(master_rating=300 * PSI, slave_rating=2000 * PSI), make_rules())
    [flag] = [f for f in s.flags if f.code == "pressure-over-rating"]
    assert flag.subject == "master" and flag.value("rating") == 300 * PSI
    assert flag.value("pressure") == s.pressure_worst == s.pressure / 0.85
    # by hand: 400 lbf / 2 on a 7/8 in piston (0.60132 in^2) is 332.60 psi static (p = F / A,
    # OpenStax "Pascal's Principle"), 391.30 psi at the shop's 0.85 and 665.20 psi at an
    # efficiency of 0.5 given to the engine (static / efficiency, OpenStax "Simple Machines")
    assert s.pressure_worst == pytest.approx(391.30 * PSI, rel=2e-5)
    halved = size_build(make_build(), make_rules(), efficiency=0.5)
    assert halved.pressure_worst == pytest.approx(665.20 * PSI, rel=2e-5)


def test_master_volume_short():
    s = size_build(make_build(master_stroke=0.5 * INCH, release_travel=0.45 * INCH),
                   make_rules())
    assert s.master_swept_volume < s.needed_volume
    assert codes(s)["master-volume-short"] == "fail"


def test_pushrod_off_axis_and_pad_travel_mismatch():
    # A short pushrod swung far goes off the bore axis; a recorded pad travel far from
    # r_pad * swing disagrees with the layout.
    layout = square_layout(11 * INCH, 2 * INCH, 2 * INCH, math.radians(30))
    s = size_build(make_build(layout=layout, pad_travel=7.0 * INCH), make_rules())
    assert s.linkage.pushrod_angle_max > math.radians(5)
    assert codes(s)["pushrod-off-axis"] == codes(s)["pad-travel-mismatch"] == "warn"
    matched = make_build(layout=layout, pad_travel=11 * INCH * math.radians(30))
    assert "pad-travel-mismatch" not in codes(size_build(matched, make_rules()))


def test_engine_imports_no_pint_yaml_mkdocs_numpy_or_wording():
    # Project rule (DEVELOPERS.md): the engine is pure functions on SI floats and returns no words.
    import pathlib
    import subprocess
    import sys
    code = ("import sys, builder.engine; "
            "print(sorted(m for m in ('pint', 'yaml', 'mkdocs', 'numpy', 'builder.presentation',"
            " 'builder.units') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=pathlib.Path(__file__).parents[1]).stdout.strip()
    assert out == "[]"
