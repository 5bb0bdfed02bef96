"""Robust statistics used by the calibration: median, scaled MAD, quantiles, leave-one-out.

Definitions (stated once here, quoted on the calibration page):

- median: the middle value, or the mean of the two middle values (numpy.median).
- scaled MAD: MAD_N = 1.4826 * median(|x - median(x)|), where 1.4826 = 1 / Phi^-1(3/4) makes
  it estimate the standard deviation of normally distributed data (Rousseeuw & Croux, 1993,
  JASA 88:1273; same as scipy.stats.median_abs_deviation(x, scale="normal")).
- quantile q: linear interpolation between order statistics, position q * (n - 1) in the
  sorted values (Hyndman & Fan, 1996, definition 7; numpy.percentile's default).
"""
from __future__ import annotations

from statistics import NormalDist

import numpy as np

MAD_NORMAL_SCALE = 1.0 / NormalDist().inv_cdf(0.75)  # 1.4826...


def scaled_mad(values: np.ndarray) -> float:
    """Scaled median absolute deviation, 1.4826 * median(|x - median(x)|); 0 for one value."""
    centre = float(np.median(values))
    return MAD_NORMAL_SCALE * float(np.median(np.abs(values - centre)))


def medians_leaving_one_out(values: np.ndarray) -> np.ndarray:
    """Element i is the median of `values` without element i (needs two or more values).

    O(n log n): sort once; dropping the element of rank j shifts every later order
    statistic down by one, so the middle of the n - 1 left is read straight off the sort.
    """
    n = len(values)
    order = np.argsort(values, kind="stable")
    ordered = values[order]
    rank = np.empty(n, dtype=np.intp)
    rank[order] = np.arange(n)
    left = n - 1
    return 0.5 * (
        _order_statistic_without(ordered, rank, (left - 1) // 2)
        + _order_statistic_without(ordered, rank, left // 2)
    )


def _order_statistic_without(ordered: np.ndarray, removed_rank: np.ndarray, k: int) -> np.ndarray:
    """The k-th smallest value once the value of rank `removed_rank` is taken out (k < n - 1)."""
    return np.where(k < removed_rank, ordered[k], ordered[k + 1])


def quantile_without(ordered: np.ndarray, q: float, removed_rank: int | None = None) -> float:
    """Quantile q (0..1, Hyndman & Fan definition 7) of sorted values, one optionally left out.

    `ordered` must be sorted ascending; `removed_rank` is the index of the value to leave
    out, or None to keep them all. Needs at least one value left.
    """
    skip = len(ordered) if removed_rank is None else removed_rank
    left = len(ordered) - (removed_rank is not None)
    position = q * (left - 1)
    below = int(position)
    above = min(below + 1, left - 1)
    low = float(ordered[below if below < skip else below + 1])
    high = float(ordered[above if above < skip else above + 1])
    return low + (position - below) * (high - low)
