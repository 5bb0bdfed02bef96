"""Hydraulic formulas against published values and the pint unit library."""
from __future__ import annotations

import math

import pytest

from builder.engine import size_build
from builder.engine.hydraulics import (
    hydraulic_ratio, line_compliance, line_pressure, line_volume, losses_volume, swept_volume,
)
from builder.model import circle_area
from factories import INCH, make_build, make_rules, si


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


def test_hose_expansion_at_the_fmvss_106_figure():
    # FMVSS 106 / SAE J1401: hose expansion limit about 0.66 cc per ft at 1000 psi for
    # 1/8 in hose (from memory). A hose at that limit, no fluid compression.
    limit = si("0.66 cc / foot / (1000 psi)")
    assert losses_volume(line_compliance(limit, si("1 ft"), 0.0, 1.5e9), si("1000 psi")) == \
        pytest.approx(si("0.66 cc"), rel=1e-9)


def test_hose_losses_in_a_build_stay_within_the_fmvss_106_bound():
    # FMVSS 106 / SAE J1401 about 0.66 cc/ft at 1000 psi (from memory): a rubber hose at
    # that limit loses at most limit * length * p (fluid compression switched off).
    limit = si("0.66 cc / foot / (1000 psi)")
    rules = make_rules(hose_expansion={"rubber": limit, "braided_ptfe": limit / 4,
                                       "steel": 0.0}, fluid_bulk_modulus=math.inf)
    for hose, bound in (("rubber", 1.0), ("braided_ptfe", 0.25), ("steel", 0.0)):
        s = size_build(make_build(hose=hose), rules)
        assert s.losses_volume == pytest.approx(
            bound * limit * make_build().line.length * s.pressure, rel=1e-9, abs=1e-15)


def test_fluid_compression_from_bulk_modulus():
    # dV = V p / K, definition of bulk modulus (Merritt, Hydraulic Control Systems;
    # OpenStax College Physics, "Stress, Strain and Elastic Modulus"); water K = 2.2e9 Pa
    # (OpenStax bulk moduli table, from memory): 1 L at 1 MPa shrinks by 0.4545 mL.
    shrink = losses_volume(line_compliance(0.0, 0.0, si("1 L"), 2.2e9), si("1 MPa"))
    assert shrink == pytest.approx(si("0.45454545 mL"), rel=1e-6)


def test_losses_include_line_master_and_slave_fluid():
    # dV = e L p + V p / K with V = line + master swept + slave swept (Merritt).
    rules = make_rules()
    build = make_build()
    s = size_build(build, rules)
    fluid = (line_volume(rules.line_bore, build.line.length)
             + s.master_swept_volume + s.slave_area * build.slave.stroke)
    expected = (rules.hose_expansion["braided_ptfe"] * build.line.length * s.pressure
                + fluid * s.pressure / rules.fluid_bulk_modulus)
    assert s.losses_volume == pytest.approx(expected, rel=1e-12)
