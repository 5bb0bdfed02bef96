"""builder.presentation: one rule for numbers, one sentence per code.

Outside references: NIST Special Publication 811 (2008), Appendix B.8 (1 in = 25.4 mm and
1 lbf = 4.4482216152605 N exactly; 1 psi = 6.894 757 E+03 Pa); the pint library (0.25) as the
reference unit registry for every conversion checked here.
"""
from __future__ import annotations

import math

import pint
import pytest

from builder import presentation as say
from builder.engine.linkage import GeometryError
from builder.engine.result import Figure, Flag
from builder.history.calibration import Basis
from builder.history.similar import Difference
from builder.units import QuantityError, parse_quantity

UREG = pint.UnitRegistry()


def pint_to(value_si: float, si_unit: str, unit: str) -> float:
    return UREG.Quantity(value_si, si_unit).to(unit).magnitude


@pytest.mark.parametrize("value_si, dimension, si_unit, first, second", [
    (0.022225, "length", "m", ("in", 3), ("mm", 1)),
    (410 * 4.4482216152605, "force", "N", ("lbf", 1), ("N", 1)),
    (1500 * 6894.757293168, "pressure", "Pa", ("psi", 0), ("kPa", 0)),
    (8e-6, "volume", "m**3", ("in**3", 3), ("mL", 2)),
    (1.9 * 0.0254**2, "area", "m**2", ("in**2", 3), ("mm**2", 1)),
])
def test_quantities_read_the_same_in_both_systems_as_pint_converts_them(
        value_si, dimension, si_unit, first, second):
    # Each half of the text is pint's conversion rounded by the rule: four significant
    # figures, at most the unit's decimals, trailing zeros dropped.
    text = say.quantity(value_si, dimension, "imperial")
    imperial, metric = text.removesuffix(")").split(" (")
    for shown, (unit, decimals) in ((imperial, first), (metric, second)):
        number = float(shown.split(" ")[0])
        reference = pint_to(value_si, si_unit, unit)
        digits = max(0, min(decimals, 3 - math.floor(math.log10(abs(reference)))))
        assert number == pytest.approx(round(reference, digits), abs=10 ** -digits / 2)
    assert say.quantity(value_si, dimension, "metric") == f"{metric} ({imperial})"


def test_the_number_rule_by_example():
    # 7/8 in = 22.225 mm exactly (NIST SP 811): shown 0.875 in and 22.2 mm.
    assert say.quantity(0.022225, "length") == "0.875 in (22.2 mm)"
    assert say.quantity(math.radians(30), "angle") == "30 deg"
    assert say.quantity(0.0, "length", "metric") == "0 mm (0 in)"
    assert say.quantity(None, "force") == say.NONE
    assert say.percent(0.0823) == "8.2 %" and say.percent(0.0823, signed=True) == "+8.2 %"
    assert say.percent(-0.37, signed=True) == "-37.0 %"
    assert say.ratio(5.6) == "5.60 : 1"


def test_same_value_same_text_wherever_it_appears():
    # The complaint this rule answers: 0.331 in shown as 0.33 in a flag and 0.331 in a table.
    flag = Flag("travel-short", "warn", (Figure("bearing", 0.00841, "length"),
                                         Figure("needed", 0.0084074, "length"),
                                         Figure("margin", 0.0003, "fraction"),
                                         Figure("minimum", 0.10, "fraction")))
    sentence = say.flag_sentence(flag)
    assert say.quantity(0.0084074, "length") in sentence
    assert say.quantity(0.00841, "length") in sentence
    assert "+0.0 %" in sentence and "10.0 %" in sentence


@pytest.mark.parametrize("code, severity, names, subject", [
    ("travel-short", "fail", ("bearing", "needed", "margin"), None),
    ("travel-short", "warn", ("bearing", "needed", "margin", "minimum"), None),
    ("master-volume-short", "fail", ("swept", "needed", "losses", "dead_stroke"), None),
    ("travel-margin-high", "warn", ("margin", "limit"), None),
    ("over-stroke", "fail", ("travel", "limit"), None),
    ("slave-overtravel", "fail", ("slave_stroke",), None),
    ("master-bottoms-early", "warn", ("floor_gap",), None),
    ("release-late", "warn", ("release_point", "pad_travel", "latest", "usable"), None),
    ("effort-high", "warn", ("effort", "low", "high"), None),
    ("effort-low", "warn", ("effort", "low", "high"), None),
    ("pressure-over-rating", "fail", ("pressure", "rating", "efficiency"), "slave"),
    ("pushrod-off-axis", "warn", ("angle", "limit"), None),
    ("pad-travel-mismatch", "warn", ("swing", "swing_travel", "recorded"), None),
])
def test_every_flag_code_has_a_sentence_with_every_figure(code, severity, names, subject):
    dimensions = {"margin": "fraction", "minimum": "fraction", "release_point": "fraction",
                  "latest": "fraction", "swept": "volume", "needed": "volume", "losses": "volume",
                  "efficiency": "fraction",
                  "effort": "force", "low": "force", "high": "force", "pressure": "pressure",
                  "rating": "pressure", "angle": "angle", "limit": "angle", "swing": "angle"}
    if code == "travel-short":
        dimensions["needed"] = "length"
    if code == "travel-margin-high":
        dimensions["limit"] = "fraction"
    figures = tuple(Figure(name, 0.01 * (i + 1), dimensions.get(name, "length"))
                    for i, name in enumerate(names))
    sentence = say.flag_sentence(Flag(code, severity, figures, subject), "metric")
    for figure in figures:
        shown = (say.percent(figure.value, signed=True) if (code, figure.name) in _SIGNED
                 else say.quantity(figure.value, figure.dimension, "metric"))
        assert shown in sentence, figure.name
    if subject:
        assert subject in sentence


_SIGNED = {("travel-short", "margin"), ("travel-margin-high", "margin")}


def test_pressure_sentence_names_the_efficiency_it_rests_on():
    figures = (Figure("pressure", 8.4e6, "pressure"), Figure("rating", 8.0e6, "pressure"),
               Figure("efficiency", 0.82, "fraction"))
    calibrated = say.flag_sentence(Flag("pressure-over-rating", "fail", figures, "master",
                                        basis="calibrated"))
    assert "the calibrated efficiency 82.0 %" in calibrated and "8400 kPa" in calibrated
    computed = say.flag_sentence(Flag("pressure-over-rating", "fail", figures, "master"))
    assert "the shop's default efficiency 82.0 %" in computed


@pytest.mark.parametrize("reason", ["points-coincide", "pushrod-along-crank", "no-lengths",
                                    "axis-across-pushrod", "dead-centre", "ratio-out-of-range"])
def test_every_geometry_reason_has_words(reason):
    error = GeometryError(reason, angle=0.5, swing=1.0, ratio=250.0, bounds=(1 / 6, 200.0))
    words = say.geometry_message(error)
    assert words and "{" not in words
    if reason == "dead-centre":  # 0.5 rad = 28.6 deg, 1 rad = 57.3 deg (pint: radian to degree)
        assert "28.6 deg" in words and "57.3 deg" in words
    if reason == "ratio-out-of-range":
        assert "250.00 : 1" in words and "200.00 : 1" in words


def test_volume_per_length_reads_in_cc_per_foot_and_ml_per_metre():
    # 1 cc/ft = 1 cm^3 / 0.3048 m = 3.28084 mL/m (NIST SP 811: 1 ft = 0.3048 m exactly; pint)
    value = UREG.Quantity(0.66, "cc/ft").to("m**2").magnitude
    assert say.quantity(value, "volume_per_length") == "0.66 cc/ft (2.165 mL/m)"


def test_basis_words():
    family = Basis("family", "QX-5", 13, 49, 1.0, "family", 13, 80)
    assert say.basis_sentence(family) == ("family QX-5: median of 13 builds; 80 % interval from "
                                          "13 family leave-one-out residuals")
    shrunk = Basis("shrunk", "BQ-4F", 4, 49, 0.62, None, 0, 80)
    assert say.basis_sentence(shrunk).startswith("family BQ-4F (4 builds) shrunk toward")
    assert "family weight 0.62; no interval" in say.basis_sentence(shrunk)


def test_difference_words_give_both_systems_and_the_relative_difference():
    # 0.875 / 0.750 - 1 = +16.7 % (by hand); 1 in = 25.4 mm exactly (NIST SP 811).
    words = say.difference_words(Difference("slave.bore", 0.875 * 0.0254, 0.75 * 0.0254, "length"))
    assert words == "slave bore 0.875 in (22.2 mm) vs 0.75 in (19.1 mm) (+16.7 %)"
    assert say.difference_words(Difference("gearbox.family", "TR-4B", "QX-5", None)) == \
        "family TR-4B vs QX-5"


@pytest.mark.parametrize("text, dimension, words", [
    ("410 lbf", "length", "expected a length with its unit, e.g. 7/8 in or 22.2 mm; found '410 lbf', which is a force"),
    ("22", "length", "found '22' with no unit"),
    ("7 furlongz", "length", "unknown unit 'furlongz'"),
    ("1/0 in", "length", "divides by zero"),
])
def test_quantity_error_sentences(text, dimension, words):
    with pytest.raises(QuantityError) as caught:
        parse_quantity(text, dimension)
    assert words in say.quantity_message(caught.value)


def test_out_of_range_sentence_shows_both_systems():
    error = QuantityError("out-of-range", "length", "75 in", low=0.003, high=0.060)
    assert say.quantity_message(error) == ("75 in is outside the plausible range 0.118 in (3 mm) "
                                           "to 2.362 in (60 mm) for this field")


def test_coverage_sentence_counts_what_held():
    from builder.history.calibration import GroupCalibration

    group = GroupCalibration("shop-wide", 50, 0.85, 0.85, 0.05, 1.0, 1.0, 1.0, 0.01, 50, 0.02,
                             0.04, (), loo_covered=41, loo_intervals=50, interval_percent=80,
                             interval_least=9)
    assert say.coverage_sentence(group) == (
        "Leave-one-out coverage: the 80 % effort interval made without each build held its "
        "measured effort for 41 of 50 builds (82.0 %).")
    none = GroupCalibration("shop-wide", 4, 0.85, 0.85, 0.05, 1.0, 1.0, 1.0, 0.01, 4, 0.02,
                            0.04, (), interval_percent=80, interval_least=9)
    assert "needs 9 other builds" in say.coverage_sentence(none)


def test_miss_words_put_the_candidates_value_before_the_shops_limit():
    # Figures by hand: 45 lbf = 200.2 N and 12 lbf = 53.4 N, 1200 psi = 8274 kPa and
    # 1000 psi = 6895 kPa (NIST SP 811 B.8: 1 lbf = 4.4482216152605 N, 1 psi = 6894.757 Pa).
    from builder.history.suggest import Miss

    lbf, psi = 4.4482216152605, 6894.757293168
    heavy = Miss("effort-high", 45 * lbf, 40 * lbf, "force", 0.125)
    assert say.miss_words(heavy) == "effort-high: effort 45 lbf (200.2 N) is above 40 lbf (177.9 N)"
    light = Miss("effort-low", 12 * lbf, 15 * lbf, "force", 0.25)
    assert say.miss_words(light) == "effort-low: effort 12 lbf (53.4 N) is below 15 lbf (66.7 N)"
    over = Miss("travel-over", 0.62, 0.50, "fraction", 0.12)
    assert say.miss_words(over) == "travel-over: margin +62.0 % is over the shop's 50.0 %"
    late = Miss("release-late", 0.91, 0.85, "fraction", 0.06)
    assert say.miss_words(late) == ("release-late: release at 91.0 % of pad travel, later than "
                                    "85.0 %")
    rated = Miss("pressure-over-rating", 1200 * psi, 1000 * psi, "pressure", 0.2, "slave")
    assert say.miss_words(rated) == ("pressure-over-rating: worst-case pressure 1200 psi "
                                     "(8274 kPa) is over the slave's 1000 psi (6895 kPa)")


def test_change_words_for_a_same_size_part_and_a_slave_given_by_area():
    # 7/8 in = 22.225 mm; 1.2 in^2 = 774.2 mm^2; 0.5 in^2 = 322.6 mm^2 (NIST SP 811 B.8:
    # 1 in = 25.4 mm exactly), worked by hand.
    from builder.history.suggest import Change

    inch = 0.0254
    same = Change("master", "MC-A2", True, 0.875 * inch, "length", "MC-A1", 0.875 * inch,
                  stroke=1.2 * inch, was_stroke=1.2 * inch)
    assert say.change_words(same) == "master MC-A2: same 0.875 in (22.2 mm) bore and stroke"
    area = Change("slave", "SC-C3", True, 1.2 * inch**2, "area", None, 0.5 * inch**2)
    assert say.change_words(area) == ("slave SC-C3: 1.2 in^2 (774.2 mm^2) piston area instead "
                                      "of 0.5 in^2 (322.6 mm^2)")
