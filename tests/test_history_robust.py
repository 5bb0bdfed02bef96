"""Robust statistics against numpy and scipy (reference libraries)."""
import numpy as np
import pytest
import scipy.stats

from builder.history.robust import (
    MAD_NORMAL_SCALE, medians_leaving_one_out, quantile_without, scaled_mad,
)

RNG = np.random.default_rng(20250314)
SAMPLES = [
    np.array([0.85]),
    np.array([0.80, 0.90]),
    np.array([0.70, 0.72, 0.74, 0.90, 0.72]),  # a tie
    RNG.normal(0.85, 0.05, 40),
    RNG.lognormal(0.0, 0.3, 101),
]


def test_mad_scale_is_one_over_normal_quartile():
    # scipy.stats.norm.ppf(0.75) = 0.6744897..., the normal distribution's upper quartile
    assert MAD_NORMAL_SCALE == pytest.approx(1 / scipy.stats.norm.ppf(0.75), rel=1e-12)
    assert MAD_NORMAL_SCALE == pytest.approx(1.4826, abs=1e-4)


@pytest.mark.parametrize("values", SAMPLES, ids=lambda v: f"n{len(v)}")
def test_scaled_mad_agrees_with_scipy(values):
    # scipy.stats.median_abs_deviation(x, scale="normal") is the same scaled MAD
    expected = scipy.stats.median_abs_deviation(values, scale="normal")
    assert scaled_mad(values) == pytest.approx(expected, rel=1e-12, abs=1e-15)


@pytest.mark.parametrize("values", SAMPLES[1:], ids=lambda v: f"n{len(v)}")
def test_leave_one_out_medians_agree_with_numpy(values):
    # numpy.median of the array with element i deleted, for every i
    expected = [np.median(np.delete(values, i)) for i in range(len(values))]
    np.testing.assert_allclose(medians_leaving_one_out(values), expected, rtol=1e-12)


@pytest.mark.parametrize("values", SAMPLES, ids=lambda v: f"n{len(v)}")
@pytest.mark.parametrize("q", [0.0, 0.1, 0.5, 0.9, 1.0])
def test_quantile_agrees_with_numpy_percentile(values, q):
    # numpy.percentile's default "linear" method is Hyndman & Fan definition 7
    ordered = np.sort(values)
    assert quantile_without(ordered, q) == pytest.approx(np.percentile(values, 100 * q))


@pytest.mark.parametrize("values", SAMPLES[1:], ids=lambda v: f"n{len(v)}")
@pytest.mark.parametrize("q", [0.0, 0.1, 0.5, 0.9, 1.0])
def test_quantile_leaving_one_out_agrees_with_numpy(values, q):
    ordered = np.sort(values)
    for rank in range(len(ordered)):
        expected = np.percentile(np.delete(ordered, rank), 100 * q)  # numpy reference
        assert quantile_without(ordered, q, rank) == pytest.approx(expected)
