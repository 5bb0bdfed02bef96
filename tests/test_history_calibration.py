"""Deltas, calibration, leave-one-out and calibrated predictions on invented histories.

References: numpy (median, percentile), scipy.stats.median_abs_deviation; hand
calculations written out beside the checks.
"""
import dataclasses

import numpy as np
import pytest
import scipy.stats

from builder.history import Deltas, calibrate, deltas
from builder.history.calibration import conformal_ranks, shrink_weight
from history_factories import history, make_build, make_sizing


# ---- deltas -------------------------------------------------------------------------------

def test_deltas_are_measured_minus_computed_over_computed():
    build = make_build("QX-001", effort=132.0, slave_travel=0.019, floor_gap=0.030)
    sizing = make_sizing("QX-001", effort_predicted=120.0, slave_travel=0.020, floor_gap=0.025)
    result = deltas(build, sizing)
    # by hand: (132 - 120) / 120 = 0.10; (19 - 20) / 20 = -0.05; (30 - 25) / 25 = 0.20
    assert result.effort == pytest.approx(0.10)
    assert result.slave_travel == pytest.approx(-0.05)
    assert result.floor_gap == pytest.approx(0.20)


def test_deltas_unknown_when_not_measured_or_computed_zero():
    sizing = make_sizing("QX-001", floor_gap=0.0)
    assert deltas(make_build("QX-001", measured=False), sizing) == Deltas(None, None, None)
    result = deltas(make_build("QX-001", effort=None, floor_gap=0.01), sizing)
    assert result.effort is None  # not measured
    assert result.floor_gap is None  # computed 0: no relative delta
    assert result.slave_travel == pytest.approx(0.0)


# ---- which builds count, medians and MADs ---------------------------------------------------

def test_only_measured_and_verified_builds_with_an_effort_count():
    pairs = history({"QX-5": [0.80, 0.85, 0.90]})
    extra = [
        make_build("QX-010", status="rejected", effort=300.0),
        make_build("QX-011", status="draft", measured=False),
        make_build("QX-012", status="verified", effort=100 / 0.95),
        make_build("QX-013", status="measured", effort=None, slave_travel=0.030),
    ]
    pairs += [(b, make_sizing(b.id)) for b in extra]
    calibration = calibrate(pairs)
    assert calibration.shop.n == 4  # three measured and one verified with an effort
    assert calibration.shop.n_travel == 5  # QX-013 adds a measured slave travel
    # numpy.median of [0.80, 0.85, 0.90, 0.95]
    assert calibration.shop.efficiency_median == pytest.approx(np.median([0.80, 0.85, 0.90, 0.95]))


def test_a_zero_measured_effort_or_zero_computed_travel_does_not_count():
    # Neither ratio exists with a zero below the line (apparent efficiency = ideal / measured,
    # travel factor = measured / computed): such a build adds only its other figure.
    pairs = history({"QX-5": [0.80, 0.85, 0.90]})
    pairs += [(make_build("QX-020", effort=0.0), make_sizing("QX-020")),
              (make_build("QX-021", effort=100 / 0.95), make_sizing("QX-021", slave_travel=0.0))]
    calibration = calibrate(pairs)
    assert calibration.shop.n == 4  # QX-021's effort counts, QX-020's does not
    assert calibration.shop.n_travel == 4  # QX-020's travel counts, QX-021's does not
    assert calibration.shop.efficiency_median == pytest.approx(np.median([0.80, 0.85, 0.90, 0.95]))


def test_group_median_and_mad_agree_with_numpy_and_scipy():
    values = {"QX-5": [0.78, 0.83, 0.85, 0.86, 0.91, 0.62],
              "TR-4B": [0.70, 0.74, 0.69, 0.73]}
    factors = {"QX-5": [0.93, 0.95, 0.91, 0.97, 0.94, 0.96], "TR-4B": [0.88, 0.90, 0.86, 0.93]}
    calibration = calibrate(history(values, travel_factors=factors))
    everything = values["QX-5"] + values["TR-4B"]
    # numpy.median and scipy.stats.median_abs_deviation(scale="normal")
    assert calibration.shop.efficiency_median == pytest.approx(np.median(everything))
    assert calibration.shop.efficiency_mad == pytest.approx(
        scipy.stats.median_abs_deviation(everything, scale="normal"))
    for family in values:
        group = calibration.families[family]
        assert group.n == len(values[family])
        assert group.efficiency_median == pytest.approx(np.median(values[family]))
        assert group.efficiency_mad == pytest.approx(
            scipy.stats.median_abs_deviation(values[family], scale="normal"))
        assert group.travel_factor_median == pytest.approx(np.median(factors[family]))
        assert group.travel_factor_mad == pytest.approx(
            scipy.stats.median_abs_deviation(factors[family], scale="normal"))


# ---- leave-one-out ----------------------------------------------------------------------------

def test_leave_one_out_errors_match_a_hand_calculation():
    # One family, efficiencies 0.80, 0.85, 0.90, 0.95, ideal effort 100 N, measured = 100 / e.
    # Without each build the median of the other three is 0.90, 0.90, 0.85, 0.85
    # (family and shop-wide are the same set, so shrinking changes nothing), so
    # r = e_loo / e - 1 = 0.9/0.8 - 1 = 0.125, 0.9/0.85 - 1 = 0.0588235,
    #     0.85/0.9 - 1 = -0.0555556, 0.85/0.95 - 1 = -0.1052632.
    # |r| sorted: 0.0555556, 0.0588235, 0.1052632, 0.125
    # median |r| = (0.0588235 + 0.1052632) / 2 = 0.0820433
    # 90th percentile (linear, position 0.9 * 3 = 2.7): 0.1052632 + 0.7 * 0.0197368 = 0.1190789
    calibration = calibrate(history({"QX-5": [0.80, 0.85, 0.90, 0.95]}))
    for group in (calibration.shop, calibration.families["QX-5"]):
        assert group.residuals == pytest.approx(
            [-0.1052632, -0.0555556, 0.0588235, 0.125], abs=1e-7)
        assert group.loo_median_abs_err == pytest.approx(0.0820433, abs=1e-7)
        assert group.loo_p90_abs_err == pytest.approx(0.1190789, abs=1e-7)


def test_a_build_in_the_history_is_predicted_without_itself():
    # Families A: 0.80, 0.90 and B: 0.70, 0.72, 0.74; ideal effort 100 N.
    # Predicting A-001 (e = 0.80) without itself: family A keeps one build (0.90), weight
    # w(1) = 1 / (1 + 3 * (1 - 1/10)) = 1 / 3.7 = 0.2702703; shop-wide without it:
    # 0.90, 0.70, 0.72, 0.74 -> median (0.72 + 0.74) / 2 = 0.73.
    # e = 0.2702703 * 0.90 + 0.7297297 * 0.73 = 0.7759459 -> effort 100 / 0.7759459 = 128.8749 N
    pairs = history({"AA": [0.80, 0.90], "BB": [0.70, 0.72, 0.74]})
    calibration = calibrate(pairs)
    build, sizing = pairs[0]
    assert build.id == "AA-001"
    prediction = calibration.predict(build, sizing)
    assert prediction.effort == pytest.approx(128.8749, abs=1e-4)
    assert prediction.n_builds == 4  # the other four builds, never itself
    # the same build as a new proposal (another id) sees all five builds:
    # w(2) = 2 / (2 + 3 * 0.8) = 0.4545455; family median 0.85, shop median 0.74
    # e = 0.4545455 * 0.85 + 0.5454545 * 0.74 = 0.79 -> 100 / 0.79 = 126.5823 N
    proposal = make_build("AA-900", family="AA", measured=False)
    assert calibration.predict(proposal, sizing).effort == pytest.approx(126.5823, abs=1e-4)


def test_leave_one_out_shortcut_equals_recalibrating_without_each_build():
    rng = np.random.default_rng(11)
    pairs = history({"QX-5": list(rng.normal(0.85, 0.04, 12)),  # a family standing alone
                     "TR-4B": list(rng.normal(0.75, 0.04, 4)),  # a thin one
                     "ZD-3": list(rng.normal(0.80, 0.02, 3)),  # with these three, k is
                     "PL-6": list(rng.normal(0.78, 0.05, 2)),  # estimated from the spreads
                     "KM-2": [0.70]})  # one build
    calibration = calibrate(pairs)
    # the shrinkage strength itself moves when a build is left out
    from builder.history.calibration import prior_builds_leaving_one_out
    efficiency = calibration._efficiency
    assert len(set(np.round(prior_builds_leaving_one_out(efficiency.values, efficiency.members), 9))) > 3
    for build, sizing in pairs:
        others = [p for p in pairs if p[0].id != build.id]
        brute = calibrate(others).predict(build, sizing)  # refit from scratch without it
        assert calibration.predict(build, sizing).effort == pytest.approx(brute.effort, rel=1e-12)
    # a recorded build checked again with its gearbox family changed: still left out
    build, sizing = pairs[0]
    moved = dataclasses.replace(build, gearbox=dataclasses.replace(build.gearbox, family="TR-4B"))
    brute = calibrate(pairs[1:]).predict(moved, sizing)
    assert calibration.predict(moved, sizing).effort == pytest.approx(brute.effort, rel=1e-12)


# ---- shrinkage --------------------------------------------------------------------------------

def test_shrink_weight_grows_to_one_at_ten_builds():
    weights = [shrink_weight(n) for n in range(0, 12)]
    assert weights[0] == 0.0
    assert all(a < b for a, b in zip(weights[:10], weights[1:11]))
    assert weights[10] == weights[11] == 1.0
    assert weights[1] == pytest.approx(1 / 3.7)  # by hand: 1 / (1 + 3 * 0.9)


def test_thin_family_is_pulled_toward_shop_wide():
    pairs = history({"QX-5": [0.85, 0.86, 0.84, 0.85, 0.87, 0.83, 0.85, 0.86],
                     "TR-4B": [0.60, 0.62]})
    calibration = calibrate(pairs)
    thin = calibration.families["TR-4B"]
    shop = calibration.shop.efficiency
    assert thin.weight == pytest.approx(2 / (2 + 3 * 0.8))  # by hand: 0.4545
    assert thin.efficiency_median == pytest.approx(0.61)
    assert thin.efficiency_median < thin.efficiency < shop
    assert thin.efficiency == pytest.approx(thin.weight * 0.61 + (1 - thin.weight) * shop)


def test_family_with_ten_consistent_builds_is_predicted_from_its_own_history():
    own = [0.70, 0.71, 0.69, 0.70, 0.72, 0.70, 0.68, 0.71, 0.70, 0.69, 0.71, 0.70]
    pairs = history({"TR-4B": own, "QX-5": [0.90] * 30})
    calibration = calibrate(pairs)
    proposal = make_build("TR-900", family="TR-4B", measured=False)
    sizing = make_sizing("TR-900", effort_ideal=100.0)
    own_prediction = 100.0 / np.median(own)  # numpy.median of the family's own history
    prediction = calibration.predict(proposal, sizing)
    assert prediction.effort == pytest.approx(own_prediction, rel=0.03)
    assert prediction.n_builds == len(own)
    # and each of its builds, predicted without itself
    for build, build_sizing in pairs[: len(own)]:
        effort = calibration.predict(build, build_sizing).effort
        assert effort == pytest.approx(own_prediction, rel=0.03)


def test_one_outlier_cannot_swing_the_estimate():
    steady = [0.84, 0.85, 0.86, 0.85, 0.84, 0.86, 0.85]
    before = calibrate(history({"QX-5": steady})).families["QX-5"].efficiency
    after = calibrate(history({"QX-5": steady + [0.20]})).families["QX-5"].efficiency
    assert after == pytest.approx(before, rel=0.01)
    assert np.mean(steady + [0.20]) < 0.78  # the mean would have moved by more than 8 %


# ---- predictions --------------------------------------------------------------------------

def test_not_enough_history_below_three_builds():
    pairs = history({"QX-5": [0.80, 0.85]})
    calibration = calibrate(pairs)
    proposal = make_build("QX-900", measured=False)
    prediction = calibration.predict(proposal, make_sizing("QX-900"))
    assert prediction.effort is None and prediction.interval is None
    assert (prediction.basis, prediction.n_builds) == (None, 2)
    # three builds: a proposal is predicted, but each of them sees only the other two
    pairs = history({"QX-5": [0.80, 0.85, 0.90]})
    calibration = calibrate(pairs)
    assert calibration.predict(proposal, make_sizing("QX-900")).effort == pytest.approx(100 / 0.85)
    alone = calibration.predict(*pairs[0])
    assert (alone.effort, alone.n_builds) == (None, 2)


def test_conformal_ranks_cover_as_probability_theory_says():
    # For m exchangeable continuous residuals and a new one, the new one's rank among all
    # m + 1 is uniform on 1..m+1 (any probability text on order statistics), so it falls
    # between the lo-th and hi-th smallest of the m with probability (hi - lo) / (m + 1).
    # Checked by simulation with numpy's generator: 40,000 draws, 3 standard errors.
    rng = np.random.default_rng(5)
    for m in (9, 14, 30):
        lo, hi = conformal_ranks(m)
        assert (hi - lo) / (m + 1) >= 0.80
        draws = rng.standard_t(4, size=(40_000, m + 1))  # heavy tails: no normality needed
        ordered = np.sort(draws[:, :m], axis=1)
        inside = (ordered[:, lo - 1] <= draws[:, m]) & (draws[:, m] <= ordered[:, hi - 1])
        expected = (hi - lo) / (m + 1)
        assert inside.mean() == pytest.approx(expected, abs=3 * np.sqrt(expected * (1 - expected) / 40_000))
    assert conformal_ranks(8) is None  # 8 residuals cannot bound an 80 % interval


def test_interval_from_family_residual_ranks():
    own = [0.78, 0.80, 0.81, 0.83, 0.84, 0.85, 0.86, 0.87, 0.88, 0.89, 0.90, 0.91, 0.92,
           0.93, 0.95, 0.79, 0.82, 0.94, 0.96, 0.77]
    pairs = history({"QX-5": own, "TR-4B": [0.70, 0.72, 0.75]})
    calibration = calibrate(pairs)
    residuals = np.sort(calibration.families["QX-5"].residuals)
    proposal = make_build("QX-900", measured=False)
    prediction = calibration.predict(proposal, make_sizing("QX-900"))
    # 20 residuals: lo = floor(0.1 * 21) = 2, hi = ceil(0.9 * 21) = 19 (by hand)
    assert prediction.interval == pytest.approx(
        (prediction.effort * (1 + residuals[1]), prediction.effort * (1 + residuals[18])))
    assert (prediction.basis.interval_source, prediction.basis.interval_count) == ("family", 20)
    # a build of the family leaves its own residual out: 19 left, lo = 2, hi = ceil(18) = 18
    build, sizing = pairs[2]
    mine = calibration.predict(build, sizing)
    loo_residual = 100.0 / own[2] / mine.effort - 1  # measured / predicted - 1
    others = np.delete(residuals, np.argmin(np.abs(residuals - loo_residual)))
    assert mine.interval == pytest.approx((mine.effort * (1 + others[1]),
                                           mine.effort * (1 + others[17])))


def test_thin_family_interval_comes_from_shop_wide_residuals():
    pairs = history({"QX-5": [0.78, 0.80, 0.83, 0.85, 0.86, 0.88, 0.81, 0.84],
                     "TR-4B": [0.70, 0.72]})
    calibration = calibrate(pairs)
    proposal = make_build("TR-900", family="TR-4B", measured=False)
    prediction = calibration.predict(proposal, make_sizing("TR-900"))
    ordered = np.sort(calibration.shop.residuals)  # 10 residuals: ranks 1 and 10 (by hand)
    assert prediction.interval == pytest.approx(
        (prediction.effort * (1 + ordered[0]), prediction.effort * (1 + ordered[9])))
    assert prediction.basis.interval_source == "shop-wide"
    # too few anywhere: no interval, and the words say so
    few = calibrate(history({"QX-5": [0.78, 0.80, 0.83, 0.85]}))
    assert few.predict(proposal, make_sizing("TR-900")).interval is None


def test_leave_one_out_coverage_by_hand():
    # Ten builds of one family: each build's interval comes from the other nine residuals,
    # ranks 1 and 9 of 9 (floor(0.1 * 10) = 1, ceil(0.9 * 10) = 9): their smallest and
    # largest. Only the builds with the smallest and the largest residual fall outside
    # theirs, so 8 of 10 are covered (worked by hand from the rank rule).
    values = [0.80, 0.81, 0.82, 0.83, 0.84, 0.85, 0.86, 0.87, 0.88, 0.90]
    calibration = calibrate(history({"QX-5": values}))
    for group in (calibration.shop, calibration.families["QX-5"]):
        assert (group.loo_covered, group.loo_intervals) == (8, 10)
        assert group.loo_coverage == pytest.approx(0.8)
    # brute force: the same count from predict() on each build and its measured effort
    covered = 0
    for build, sizing in history({"QX-5": values}):
        low, high = calibration.predict(build, sizing).interval
        covered += low <= build.measured.pedal_effort <= high
    assert covered == 8


def test_unknown_family_uses_shop_wide_value():
    calibration = calibrate(history({"QX-5": [0.80, 0.85, 0.90, 0.82]}))
    proposal = make_build("ZZ-900", family="ZZ-1", measured=False)
    prediction = calibration.predict(proposal, make_sizing("ZZ-900"))
    assert prediction.effort == pytest.approx(100 / np.median([0.80, 0.85, 0.90, 0.82]))
    assert prediction.n_builds == 4
    assert (prediction.basis.source, prediction.basis.n_family) == ("shop-wide", 0)


def test_calibrated_slave_travel_uses_the_travel_factor():
    factors = {"QX-5": [0.90, 0.92, 0.94]}
    calibration = calibrate(history({"QX-5": [0.80, 0.85, 0.90]}, travel_factors=factors))
    proposal = make_build("QX-900", measured=False)
    prediction = calibration.predict(proposal, make_sizing("QX-900", slave_travel=0.020))
    # one family: shrunk and shop-wide medians agree, 0.92 (numpy.median)
    assert prediction.slave_travel == pytest.approx(0.020 * np.median(factors["QX-5"]))


def test_empty_history():
    calibration = calibrate([])
    assert calibration.shop.n == 0 and calibration.shop.efficiency is None
    assert calibration.families == {}
    prediction = calibration.predict(make_build("QX-900", measured=False), make_sizing("QX-900"))
    assert (prediction.effort, prediction.n_builds, prediction.basis) == (None, 0, None)


def test_prior_builds_follow_within_and_between_family_spread():
    # Gelman et al., Bayesian Data Analysis, 3rd ed., sec. 5.4: weight n / (n + sigma^2/tau^2).
    from builder.history.calibration import MIN_PRIOR_BUILDS, PRIOR_BUILDS, prior_builds

    tight = np.array([0.80, 0.801, 0.799, 0.90, 0.901, 0.899, 0.70, 0.701, 0.699])
    members = {"A": np.arange(0, 3), "B": np.arange(3, 6), "C": np.arange(6, 9)}
    # families far apart, builds consistent: the shop-wide value is worth little
    assert prior_builds(tight, members) == MIN_PRIOR_BUILDS
    scattered = np.array([0.70, 0.90, 0.80, 0.72, 0.88, 0.80, 0.71, 0.89, 0.81])
    # families alike, builds scattered: the most conservative prior
    assert prior_builds(scattered, members) == PRIOR_BUILDS
    # fewer than three families with two or more builds: no estimate of tau, default prior
    assert prior_builds(tight[:6], {"A": np.arange(0, 3), "B": np.arange(3, 6)}) == PRIOR_BUILDS


def test_prediction_carries_the_travel_margin_after_the_shops_travel_losses():
    # Hand check: travel factor 0.9 on a computed 20 mm slave travel -> 18 mm; fork ratio 2
    # -> 9 mm at the bearing against 9.5 mm needed -> margin 9 / 9.5 - 1 = -5.26 %.
    pairs = history({"QX-5": [0.85] * 6}, travel_factors={"QX-5": [0.9] * 6})
    proposal = make_build("QX-900", family="QX-5", status="draft", measured=False)
    prediction = calibrate(pairs).predict(proposal, make_sizing("QX-900"))
    assert prediction.slave_travel == pytest.approx(0.018)
    assert prediction.travel_margin == pytest.approx(9.0 / 9.5 - 1.0)


def test_shrinkage_strength_without_each_build_equals_recomputing_it():
    # The O(n log n) leave-one-out k against prior_builds called afresh on the values
    # without each build (numpy medians), with ties from rounding and families of 1-3 builds.
    from builder.history.calibration import _members, prior_builds, prior_builds_leaving_one_out

    rng = np.random.default_rng(21)
    for _ in range(25):
        n = int(rng.integers(3, 40))
        families = [f"F{int(rng.integers(0, 5))}" for _ in range(n)]
        values = np.round(rng.normal(0.85, 0.05, n), int(rng.integers(2, 6)))
        fast = prior_builds_leaving_one_out(values, _members(families))
        for i in range(n):
            keep = np.delete(np.arange(n), i)
            brute = prior_builds(values[keep], _members([families[j] for j in keep]))
            assert fast[i] == pytest.approx(brute, rel=1e-12)
