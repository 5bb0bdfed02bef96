"""Hydraulic formulas against published values and the pint unit library."""
from __future__ import annotations

import math

import pytest

from builder.engine import size_build
import numpy as np
import scipy.interpolate

from builder.engine.hydraulics import (
    compression_volume, expansion_per_length, hydraulic_ratio, line_pressure, line_volume,
    swept_volume,
)
from builder.model import circle_area
from factories import INCH, PSI, UREG, make_build, make_rules, si


def test_piston_area_of_one_inch_bore():
    # A = pi D^2 / 4 (OpenStax College Physics, "Pascal's Principle"); 1 in -> 0.785398 in^2,
    # unit conversion by pint.
    assert circle_area(si("1 inch")) == pytest.approx(si("0.7853981634 inch**2"), rel=1e-9)


def test_pascal_puts_on_the_brakes_example():
    # OpenStax College Physics, "Pascal's Principle", example "Calculating Force of Slave
    # Cylinders: Pascal Puts on the Brakes": 500 N on a 0.500 cm master, 2.50 cm slave
    # -> 1.25e4 N at the slave (from memory).
    ratio = hydraulic_ratio(circle_area(0.025), circle_area(0.005))
    assert 500.0 * ratio == pytest.approx(1.25e4, rel=1e-9)


@pytest.mark.parametrize("master_in, slave_in", [
    (0.625, 0.75), (0.70, 0.875), (0.75, 0.75), (0.875, 0.8125), (1.0, 1.5),
])
def test_force_and_travel_ratios_for_bore_pairs(master_in, slave_in):
    # Pascal's law F2/F1 = A2/A1 and volume balance A1 d1 = A2 d2 (OpenStax College Physics,
    # "Pascal's Principle"): force ratio (Ds/Dm)^2, travel ratio its inverse.
    build = make_build(master_bore=master_in * INCH, slave_bore=slave_in * INCH,
                       slave_stroke=3 * INCH, pad_travel=5.0 * INCH)
    s = size_build(build, make_rules(lossless=True), efficiency=1.0)
    assert s.ratio_hydraulic == pytest.approx((slave_in / master_in) ** 2, rel=1e-12)
    assert s.slave_travel == pytest.approx(
        s.master_stroke_used * (master_in / slave_in) ** 2, rel=1e-12)
    # Force ratio through the whole chain: bearing load = pad effort * R.
    assert s.effort_ideal * s.ratio_overall == pytest.approx(build.clutch.release_load)


def test_line_pressure_is_force_over_area():
    # p = F / A (OpenStax College Physics, "Pascal's Principle"): 1000 lbf on 1 in^2 is
    # 1000 psi, converted by pint; a 2:1 fork halves the slave force (Shigley, levers).
    area = si("1 inch**2")
    assert line_pressure(si("1000 lbf"), 1.0, area) == pytest.approx(si("1000 psi"), rel=1e-9)
    assert line_pressure(si("2000 lbf"), 2.0, area) == pytest.approx(si("1000 psi"), rel=1e-9)


def test_swept_and_line_volumes():
    # V = A s and V = pi d^2/4 L (volume of a cylinder); 3/4 in x 1 in -> 0.441786 in^3 (pint).
    assert swept_volume(circle_area(0.75 * INCH), INCH) == pytest.approx(
        si("0.4417864669 inch**3"), rel=1e-9)
    assert line_volume(0.0032, 1.0) == pytest.approx(math.pi * 0.0016**2, rel=1e-12)


FMVSS_POINTS = ((si("1000 psi"), si("0.66 cc/ft")), (si("1500 psi"), si("0.79 cc/ft")))


def test_hose_expansion_points_interpolate_as_numpy_does():
    # FMVSS 106 expansion ceiling for hose of 1/8 in bore or less: about 0.66 cc/ft at
    # 1000 psi and 0.79 cc/ft at 1500 psi (from memory). Between the points: numpy.interp;
    # below the first: numpy.interp with (0, 0) put in front (a line through zero); past
    # the last: scipy's interp1d extrapolating the last segment (reference libraries).
    pressures = [p for p, _ in FMVSS_POINTS]
    volumes = [v for _, v in FMVSS_POINTS]
    beyond = scipy.interpolate.interp1d(pressures, volumes, fill_value="extrapolate")
    for psi in (100, 500, 999, 1000, 1200, 1250, 1500, 1800, 2500):
        p = si(f"{psi} psi")
        if psi <= 1000:
            expected = np.interp(p, [0.0, *pressures], [0.0, *volumes])
        elif psi <= 1500:
            expected = np.interp(p, pressures, volumes)
        else:
            expected = float(beyond(p))
        assert expansion_per_length(FMVSS_POINTS, p) == pytest.approx(expected, rel=1e-12), psi
    assert expansion_per_length(FMVSS_POINTS, 0.0) == 0.0
    # 1250 psi, half way: (0.66 + 0.79) / 2 = 0.725 cc/ft (by hand), converted by pint
    assert expansion_per_length(FMVSS_POINTS, si("1250 psi")) == pytest.approx(si("0.725 cc/ft"))
    # one figure e: a line through zero, v = e p; one point: the same line through it
    one = ((si("1000 psi"), si("0.66 cc/ft")),)
    assert expansion_per_length(one, si("1500 psi")) == pytest.approx(si("0.99 cc/ft"))


def test_rubber_hose_at_the_fmvss_ceiling_loses_its_figure_at_1000_psi():
    # A build whose line pressure is exactly 1000 psi (release load = 1000 psi * slave area
    # * fork ratio) with 14 in of rubber hose at the FMVSS 106 ceiling (0.66 cc/ft at
    # 1000 psi, from memory) and the rest hard line that does not swell, incompressible
    # fluid: the losses are 0.66 cc/ft * 14 in, which pint works out as 0.77 cc.
    rules = make_rules(hose_expansion={"rubber": FMVSS_POINTS, "braided_ptfe": 0.0, "steel": 0.0},
                       fluid_bulk_modulus=math.inf)
    area = circle_area(0.875 * INCH)
    build = make_build(hose="rubber", line_length=40 * INCH, hose_length=14 * INCH,
                       release_load=si("1000 psi") * area * 2.0)
    s = size_build(build, rules)
    assert s.pressure == pytest.approx(si("1000 psi"), rel=1e-12)
    assert s.losses_volume == pytest.approx(UREG.Quantity("0.66 cc/ft * 14 in").to("m**3").magnitude,
                                            rel=1e-9)
    # the whole 40 in as rubber hose when hose_length is left out: 0.66 * 40 / 12 = 2.2 cc
    whole = size_build(make_build(hose="rubber", line_length=40 * INCH,
                                  release_load=si("1000 psi") * area * 2.0), rules)
    assert whole.losses_volume == pytest.approx(si("2.2 cc"), rel=1e-9)


def test_hard_part_of_the_line_takes_the_steel_figure():
    # Hose and hard line expand side by side (volumes add): 10 in of hose at 1e-13 m^2/Pa
    # and 30 in of hard line at 1e-14 m^2/Pa, at 1000 psi, worked by hand:
    # 6894757.29 Pa * (0.254 m * 1e-13 + 0.762 m * 1e-14) = 2.2767e-7 m^3 = 0.2277 mL.
    rules = make_rules(hose_expansion={"rubber": 1e-13, "braided_ptfe": 0.0, "steel": 1e-14},
                       fluid_bulk_modulus=math.inf)
    area = circle_area(0.875 * INCH)
    build = make_build(hose="rubber", line_length=40 * INCH, hose_length=10 * INCH,
                       release_load=si("1000 psi") * area * 2.0)
    assert size_build(build, rules).losses_volume == pytest.approx(si("0.22767 mL"), rel=1e-4)


def test_demo_rubber_hose_is_at_the_fmvss_106_ceiling():
    # The demo shop's rubber hose sits at the FMVSS 106 ceiling for hose of 1/8 in bore or
    # less (about 0.66 cc/ft at 1000 psi and 0.79 cc/ft at 1500 psi, from memory), not a
    # quarter of it; braided PTFE and steel swell less (common practice, no source).
    from builder.demo import rules as demo_rules

    expansion = demo_rules().hose_expansion
    for psi, ceiling in ((1000, "0.66 cc/ft"), (1500, "0.79 cc/ft")):
        p = si(f"{psi} psi")
        assert expansion_per_length(expansion["rubber"], p) == pytest.approx(si(ceiling), rel=0.01)
        assert expansion_per_length(expansion["braided_ptfe"], p) < 0.5 * si(ceiling)
        assert expansion_per_length(expansion["steel"], p) < 0.1 * si(ceiling)


def test_fluid_compression_from_bulk_modulus():
    # dV = V p / K, definition of bulk modulus (Merritt, Hydraulic Control Systems;
    # OpenStax College Physics, "Stress, Strain and Elastic Modulus"); water K = 2.2e9 Pa
    # (OpenStax bulk moduli table, from memory): 1 L at 1 MPa shrinks by 0.4545 mL.
    shrink = compression_volume(si("1 L"), 2.2e9, si("1 MPa"))
    assert shrink == pytest.approx(si("0.45454545 mL"), rel=1e-6)


def test_the_records_fluid_sets_the_bulk_modulus():
    # dV = V p / K (definition of bulk modulus; Merritt, Hydraulic Control Systems) with
    # K of the build's own fluid: silicone (DOT 5) at 1.0 GPa against glycol at 1.7 GPa
    # (from memory) loses 1.7 times the volume in the same line at the same pressure.
    moduli = {"DOT 3": 1.7e9, "DOT 4": 1.7e9, "DOT 5": 1.0e9, "DOT 5.1": 1.7e9}
    rules = make_rules(hose_expansion={"rubber": 0.0, "braided_ptfe": 0.0, "steel": 0.0},
                       fluid_bulk_modulus=moduli)
    glycol = size_build(make_build(fluid="DOT 4"), rules)
    silicone = size_build(make_build(fluid="DOT 5"), rules)
    assert silicone.losses_volume / glycol.losses_volume == pytest.approx(1.7, rel=1e-12)


def test_pull_slave_pushes_on_the_annulus():
    # Annulus area pi / 4 (D^2 - d^2) (area of a ring, any geometry handbook): a 7/8 in bore
    # with a 0.3 in rod, by hand: 0.785398 * (0.765625 - 0.09) in^2 = 0.530634 in^2.
    # Line pressure p = F / A on that area (OpenStax, "Pascal's Principle").
    build = make_build(slave_acts="pull", rod_diameter=0.3 * INCH)
    s = size_build(build, make_rules())
    assert s.slave_area == pytest.approx(si("0.530634 inch**2"), rel=2e-6)
    assert s.pressure == pytest.approx(
        build.clutch.peak_load / 2.0 / si("0.530634 inch**2"), rel=2e-6)


def test_worst_pressure_is_static_over_efficiency_and_ratings_use_it():
    # All friction after the slave: the slave must push F / eta (efficiency of a machine,
    # OpenStax College Physics, "Simple Machines"): 400 lbf over a 2:1 fork on a 7/8 in
    # slave is 332.6 psi static (p = F / A by hand: 200 / 0.601320 in^2); at 85 %, 391.3 psi.
    rules = make_rules(default_efficiency=0.85)
    s = size_build(make_build(master_rating=360 * PSI), rules)
    assert s.pressure / PSI == pytest.approx(332.60, rel=1e-4)
    assert s.pressure_worst / PSI == pytest.approx(391.30, rel=1e-4)
    [flag] = [f for f in s.flags if f.code == "pressure-over-rating"]  # 391 psi > 360 psi
    assert flag.value("pressure") == s.pressure_worst


def test_losses_include_line_master_and_slave_fluid():
    # dV = e L p + V p / K with V = line + master swept + slave swept (Merritt).
    # Hand calculation of the default test build (7/8 in slave, 2:1 fork, 400 lbf, 36 in of
    # braided hose at 5e-14 m^2/Pa, 3.2 mm line bore, 3/4 in x 1.40 in master, 1.25 in slave
    # stroke, K = 1.5 GPa):
    #   p  = 400 * 4.44822 / 2 / 3.87948e-4 m^2            = 2.29321e6 Pa
    #   V  = 8.04248e-6 * 0.9144 + 2.85023e-4 * 0.03556 + 3.87948e-4 * 0.03175
    #      = 7.35404e-6 + 1.01354e-5 + 1.23173e-5           = 2.98068e-5 m^3
    #   dV = 5e-14 * 0.9144 * 2.29321e6 + 2.98068e-5 * 2.29321e6 / 1.5e9
    #      = 1.04845e-7 + 4.55688e-8                        = 1.50414e-7 m^3
    s = size_build(make_build(), make_rules())
    assert s.pressure == pytest.approx(2.29321e6, rel=1e-5)
    assert s.losses_volume == pytest.approx(1.50414e-7, rel=1e-5)
