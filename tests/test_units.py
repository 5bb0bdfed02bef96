"""builder.units against outside references.

Sources: NIST Special Publication 811 (2008), Appendix B.8 (inch = 2.54 E-02 m exactly,
pound-force = 4.448 222 E+00 N from the exact 4.4482216152605 N, psi = 6.894 757 E+03 Pa,
degree = 1.745 329 E-02 rad); the pint library (0.25) as the reference unit registry;
Python's fractions module for exact mixed-fraction arithmetic.
"""
from __future__ import annotations

import datetime as dt
import subprocess
import sys
from fractions import Fraction
from pathlib import Path

import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from builder import units
from builder.units import QuantityError, check_range, parse_quantity

UREG = pint.UnitRegistry()


def pint_si(magnitude: float, unit: str) -> float:
    """The reference: pint's value of `magnitude unit` in SI base units."""
    return UREG.Quantity(magnitude, unit).to_base_units().magnitude


def test_exact_definitions_nist_sp811():
    # NIST SP 811 B.8: 1 in = 0.0254 m exactly; 1 lbf = 4.4482216152605 N exactly.
    assert parse_quantity("1 in", "length") == 0.0254
    assert parse_quantity("25.4 mm", "length") == pytest.approx(0.0254, rel=1e-15)
    assert parse_quantity("1 lbf", "force") == 4.4482216152605
    # NIST SP 811 B.8: 1 psi = 6.894 757 E+03 Pa (lbf / in^2 exactly).
    assert parse_quantity("1 psi", "pressure") == pytest.approx(6894.757293168, rel=1e-12)
    assert parse_quantity("1 psi", "pressure") == pytest.approx(6.894757e3, rel=1e-7)
    # NIST SP 811 B.8: 1 degree = 1.745 329 E-02 rad (pi / 180).
    assert parse_quantity("1 deg", "angle") == pytest.approx(1.745329e-2, rel=1e-6)


# (text, dimension, exact magnitude, unit as pint spells it)
SPELLINGS = [
    ("7/8 in", "length", Fraction(7, 8), "inch"),
    ("1-1/8 in", "length", Fraction(9, 8), "inch"),
    ("1 1/8 in", "length", Fraction(9, 8), "inch"),
    ("0.875in", "length", Fraction(7, 8), "inch"),
    (".875 in", "length", Fraction(7, 8), "inch"),
    ("22.2 mm", "length", Fraction(222, 10), "millimeter"),
    ("1e-3 m", "length", Fraction(1, 1000), "meter"),
    ("2.5E1 mm", "length", Fraction(25), "millimeter"),
    ("410 lbf", "force", Fraction(410), "pound_force"),
    ("1.9 kN", "force", Fraction(19, 10), "kilonewton"),
    ("1500 psi", "pressure", Fraction(1500), "psi"),
    ("8.3 MPa", "pressure", Fraction(83, 10), "megapascal"),
    ("12 bar", "pressure", Fraction(12), "bar"),
    ("1.7 GPa", "pressure", Fraction(17, 10), "gigapascal"),
    ("30 deg", "angle", Fraction(30), "degree"),
    ("1.9 in^2", "area", Fraction(19, 10), "inch ** 2"),
    ("1226 mm^2", "area", Fraction(1226), "millimeter ** 2"),
    ("0.3 mL/m/MPa", "hose_expansion", Fraction(3, 10), "milliliter / meter / megapascal"),
    ("8 mL", "volume", Fraction(8), "milliliter"),
    ("2 inch", "length", Fraction(2), "inch"),  # not pre-seeded: resolved by pint
    ("3 ft", "length", Fraction(3), "foot"),
]


@pytest.mark.parametrize("text, dimension, magnitude, pint_unit", SPELLINGS)
def test_spellings_against_pint(text, dimension, magnitude, pint_unit):
    # Reference: pint's SI value of the exactly parsed magnitude (fractions module).
    assert parse_quantity(text, dimension) == pytest.approx(pint_si(float(magnitude), pint_unit), rel=1e-12)


def test_pint_alone_misreads_mixed_fraction():
    # Why we parse magnitudes ourselves: pint reads "1 1/16 in" as 1 * 1/16 in.
    assert UREG.Quantity("1 1/16 in").to("inch").magnitude == pytest.approx(0.0625)
    assert parse_quantity("1 1/16 in", "length") == pytest.approx(0.0254 * 17 / 16, rel=1e-15)


@pytest.mark.parametrize("unit", sorted(units.SEEDED_UNITS))
def test_each_seeded_factor_matches_pint(unit):
    factor, dimension = units.SEEDED_UNITS[unit]
    reference = UREG.Quantity(1.0, "percent" if unit == "%" else unit).to_base_units()
    assert factor == pytest.approx(reference.magnitude, rel=1e-12)
    wanted = units.DIMENSIONS[dimension][0]
    assert reference.dimensionality == UREG.Quantity(1.0, wanted).dimensionality


def test_seeded_units_never_import_pint():
    code = (
        "import sys, builder.units as u\n"
        "for t, d in [('7/8 in','length'), ('410 lbf','force'), ('1500 psi','pressure'),"
        " ('30 deg','angle'), ('1.9 in^2','area'), ('0.31 mL/m/MPa','hose_expansion')]:\n"
        "    u.parse_quantity(t, d)\n"
        "assert 'pint' not in sys.modules\n"
    )
    subprocess.run([sys.executable, "-c", code], check=True, cwd=str(_repo()))


def _repo() -> Path:
    return Path(__file__).resolve().parents[1]


def test_unseen_unit_is_resolved_once_and_cached():
    parse_quantity("4 inches", "length")
    assert units._units["inches"] == pytest.approx((0.0254, "length"))


def test_fraction_accepts_percent_or_plain_number():
    assert parse_quantity("10 %", "fraction") == pytest.approx(0.10)
    assert parse_quantity("0.85", "fraction") == pytest.approx(0.85)
    assert parse_quantity(0.85, "fraction") == pytest.approx(0.85)


def test_signed_values_only_when_asked():
    assert parse_quantity("-60 mm", "length", signed=True) == pytest.approx(-0.06)
    with pytest.raises(QuantityError) as caught:
        parse_quantity("-7/8 in", "length")
    assert caught.value.reason == "negative"


@pytest.mark.parametrize(
    "value, dimension, reason, found_dimension",
    [
        ("410 lbf", "length", "wrong-dimension", "force"),
        ("3/4 in", "force", "wrong-dimension", "length"),
        ("22", "length", "no-unit", None),
        (22, "length", "not-text", None),
        (22.5, "pressure", "not-text", None),
        ("7 furlongz", "length", "unknown-unit", None),
        ("7 2 in", "length", "not-a-unit", None),
        ("NaN in", "length", "no-number", None),
        ("inf psi", "pressure", "no-number", None),
        ("1e999 in", "length", "not-finite", None),
        ("1/0 in", "length", "divides-by-zero", None),
        ("5 m/s", "length", "wrong-dimension", "[length] / [time]"),
        ("20 degC", "angle", "wrong-dimension", "[temperature]"),
        ("30 %", "angle", "wrong-dimension", "fraction"),
        (True, "length", "not-text", None),
        (None, "force", "not-text", None),
        (dt.date(2025, 3, 14), "length", "not-text", None),
        (["1 in"], "length", "not-text", None),
        ("", "length", "no-number", None),
        ("-7/8 in", "length", "negative", None),
    ],
)
def test_errors_carry_their_reason_and_what_was_found(value, dimension, reason, found_dimension):
    # Dimensions as pint (the reference registry) names them: m/s is [length] / [time].
    with pytest.raises(QuantityError) as caught:
        parse_quantity(value, dimension)
    error = caught.value
    assert (error.reason, error.dimension, error.found_dimension) == (reason, dimension, found_dimension)


def test_check_range_carries_the_bounds():
    with pytest.raises(QuantityError) as caught:
        check_range(1.905, 0.003, 0.060, "length", "75 in")
    assert (caught.value.reason, caught.value.low, caught.value.high) == ("out-of-range", 0.003, 0.060)
    check_range(0.022225, 0.003, 0.060, "length", "7/8 in")


@given(
    whole=st.integers(0, 40),
    numerator=st.integers(0, 63),
    denominator=st.sampled_from([2, 4, 8, 16, 32, 64]),
    joiner=st.sampled_from([" ", "-"]),
)
def test_mixed_fractions_exact(whole, numerator, denominator, joiner):
    # Reference: exact rational arithmetic (fractions.Fraction) times 0.0254 m (NIST SP 811).
    numerator %= denominator
    text = f"{whole}{joiner}{numerator}/{denominator} in" if whole else f"{numerator}/{denominator} in"
    expected = float(Fraction(whole) + Fraction(numerator, denominator)) * 0.0254
    assert parse_quantity(text, "length") == pytest.approx(expected, rel=1e-15, abs=1e-18)


@pytest.mark.parametrize("value, dimension, reason, meant", [
    # ISO 80000-1:2009 7.3.2: a comma may be a decimal sign; digits are never grouped by one
    ("22,2 mm", "length", "comma", ("22.2 mm",)),
    ("0,875 in", "length", "comma", ("0.875 in",)),
    ("1,200 psi", "pressure", "comma", ("1200 psi", "1.200 psi")),
    ("1,200,000 Pa", "pressure", "comma", ("1200000 Pa",)),
    # the inch mark (double prime) and foot mark (prime); NIST SP 811 writes in and ft
    ('7/8"', "length", "inch-mark", ("7/8 in",)),
    ("1-1/8''", "length", "inch-mark", ("1-1/8 in",)),
    ("2'", "length", "foot-mark", ("2 ft",)),
    # NIST SP 811 8.1: lb is a unit of mass, lbf of force
    ("410 lb", "force", "mass-for-force", ("410 lbf",)),
    ("410 lbs", "force", "mass-for-force", ("410 lbf",)),
])
def test_slips_carry_what_was_probably_meant(value, dimension, reason, meant):
    with pytest.raises(QuantityError) as caught:
        parse_quantity(value, dimension)
    assert (caught.value.reason, caught.value.meant) == (reason, meant)
    for reading in meant:  # every reading offered reads as pint reads it (mixed fractions aside)
        if "-" not in reading:
            assert parse_quantity(reading, dimension) == pytest.approx(
                UREG.Quantity(reading).to_base_units().magnitude, rel=1e-12)
    assert UREG.Quantity(1, "lb").dimensionality == UREG.Quantity(1, "kg").dimensionality  # a mass


def test_a_mass_where_a_length_belongs_is_a_plain_wrong_dimension():
    with pytest.raises(QuantityError) as caught:
        parse_quantity("410 lb", "length")
    assert (caught.value.reason, caught.value.meant) == ("wrong-dimension", ())
