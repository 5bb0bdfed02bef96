"""The demo shop's history recovers the losses its generator put in.

builder/demo/catalogue.py documents the "true" per-family losses (FAMILY_EFFICIENCY,
FAMILY_TRAVEL_FACTOR) and the car each build really is (its own free play, dead stroke, hose
swell and pedal springs, CAR_*), plus 1.5 % and 1 % gauge noise; calibration over the
committed records must find the family constants within 4 % (the generator's documented
promise: the car's free play averages 1.25 mm against the shop's 1 mm, and its hose swell
e^(0.35^2 / 2) = 1.06 times the shop's figure on average, so travel reads a little short).
"""
from pathlib import Path

import pytest

from builder.demo.catalogue import FAMILY_EFFICIENCY, FAMILY_TRAVEL_FACTOR
from builder.history import analyse
from builder.records import load_shop

RECORDS = Path(__file__).resolve().parents[1] / "records"


@pytest.fixture(scope="module")
def analysis():
    return analyse(load_shop(RECORDS))


def test_every_demo_family_is_calibrated(analysis):
    assert set(analysis.calibration.families) == set(FAMILY_EFFICIENCY)


@pytest.mark.parametrize("family", sorted(FAMILY_EFFICIENCY))
def test_calibration_recovers_the_generator_losses(analysis, family):
    group = analysis.calibration.families[family]
    # the family's own median, and the (possibly shrunk) value its predictions use
    assert group.efficiency_median == pytest.approx(FAMILY_EFFICIENCY[family], rel=0.04)
    assert group.efficiency == pytest.approx(FAMILY_EFFICIENCY[family], rel=0.04)
    assert group.travel_factor_median == pytest.approx(FAMILY_TRAVEL_FACTOR[family], rel=0.04)
    assert group.travel_factor == pytest.approx(FAMILY_TRAVEL_FACTOR[family], rel=0.04)


def test_leave_one_out_error_is_a_few_percent(analysis):
    # The car's unrecorded pedal springs (3.5 N, plus 15 N/m along the travel, on efforts of
    # 100-180 N) and 1.5 % gauge noise give a few percent of model mismatch, more than the
    # gauge's own median |error| of 0.674 * 1.5 % = 1.0 % (normal noise, any statistics
    # text) and less than 5 %.
    assert 0.015 < analysis.calibration.shop.loo_median_abs_err < 0.05
    measured = [b for b in analysis.shop.builds if b.status in ("measured", "verified")]
    assert all(analysis.predictions[b.id].effort is not None for b in measured)


def test_leave_one_out_coverage_is_near_the_nominal_80_percent(analysis):
    # Conformal intervals from leave-one-out residuals (see builder.history.calibration):
    # at least 70 % of the demo's 50 builds are covered (80 % nominal; with 50 builds a
    # binomial standard error is 5.7 points).
    shop = analysis.calibration.shop
    assert shop.loo_intervals >= 45
    assert shop.loo_coverage >= 0.70
