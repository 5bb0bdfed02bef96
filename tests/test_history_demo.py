"""The demo shop's history recovers the losses its generator put in.

builder/demo/catalogue.py documents the "true" per-family losses it spoiled the measurements with
(FAMILY_EFFICIENCY, FAMILY_TRAVEL_FACTOR, plus 2 % and 1 % seeded noise); calibration over
the committed records must find them within 3 % (the generator's documented promise).
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
    assert group.efficiency_median == pytest.approx(FAMILY_EFFICIENCY[family], rel=0.03)
    assert group.efficiency == pytest.approx(FAMILY_EFFICIENCY[family], rel=0.03)
    assert group.travel_factor_median == pytest.approx(FAMILY_TRAVEL_FACTOR[family], rel=0.03)
    assert group.travel_factor == pytest.approx(FAMILY_TRAVEL_FACTOR[family], rel=0.03)


def test_leave_one_out_error_is_about_the_generator_noise(analysis):
    # 2 % effort noise (builder/demo/catalogue.py EFFORT_NOISE): for normal noise the median |error|
    # is 0.674 sigma = 1.3 % (any statistics text); allow up to 3 % for the estimate's own
    # error and the rounding of the recorded values
    assert analysis.calibration.shop.loo_median_abs_err < 0.03
    measured = [b for b in analysis.shop.builds if b.status in ("measured", "verified")]
    assert all(analysis.predictions[b.id].effort is not None for b in measured)
