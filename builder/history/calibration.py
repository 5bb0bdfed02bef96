"""Calibration: the shop's real losses, learned from its own measured builds.

Which builds count: status `measured` or `verified` with a measured pedal effort (rejected
builds and drafts never do). Per build:

- apparent efficiency e = ideal effort / measured effort (ideal = the engine's peak pad
  force with no friction);
- travel factor t = measured slave travel / computed slave travel.

Per gearbox family and shop-wide: the median and the scaled MAD (1.4826 * median absolute
deviation, see `builder.history.robust`). A thin family is shrunk toward the shop-wide median:
value = w * family median + (1 - w) * shop-wide median, with w = n / (n + k * (1 - n / 10))
for n < 10 builds and w = 1 from ten builds on, so a well-recorded family is predicted from
its own history alone. k is what the shop-wide value is worth in builds of a family: the
normal hierarchical model's sigma^2 / tau^2 (Gelman et al., Bayesian Data Analysis, 3rd ed.,
section 5.4: the posterior mean of a group weighs its own mean by n / (n + sigma^2 / tau^2)),
with sigma the scaled MAD of builds about their family medians and tau the scaled MAD of the
family medians, clipped to 0.25..3 builds; 3 when fewer than three families have two or
more builds. A consistent family that differs from the rest keeps its own value; a scattered
one leans on the shop.

Leave-one-out: every counted build is predicted from all the others (the same rules, itself
removed from its family, from the shop-wide set and from the estimate of k); its relative
residual r = (measured - predicted) / predicted gives the reported errors (median and 90th
percentile of |r|).

Prediction interval: a conformal rank interval on those residuals (Vovk, Gammerman & Shafer,
Algorithmic Learning in a Random World, 2005; Lei et al., "Distribution-free predictive
inference for regression", JASA 113, 2018). With the m residuals of the other builds
sorted, r_(1) <= ... <= r_(m), the 80 % interval is predicted * (1 + r_(lo)) to
predicted * (1 + r_(hi)) with lo = floor(0.10 (m + 1)) and hi = ceil(0.90 (m + 1)): for
exchangeable residuals a new build's residual falls between them with probability at least
(hi - lo) / (m + 1) >= 80 %, whatever their distribution, for any m. It needs m >= 9
(hi <= m); the family's own residuals are used when it has that many, else the shop-wide
ones, else no interval. Residuals from leave-one-out fits are the jackknife's: their
guarantee is looser in the worst case (Barber et al., "Predictive inference with the
jackknife+", Annals of Statistics 49, 2021), so the coverage actually reached is measured:
each counted build's own residual against the interval made without it (leave-one-out
coverage), shown by `fitment calibration`. Fewer than three builds: no prediction.
"""
from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from builder.engine.result import Sizing
from builder.engine.travel import bearing_travel, travel_margin
from builder.history.robust import MAD_NORMAL_SCALE, medians_leaving_one_out, scaled_mad
from builder.model import Build

SHOP_WIDE = "shop-wide"
COUNTED_STATUSES = ("measured", "verified")
MIN_BUILDS = 3  # fewer builds than this in total: no calibrated prediction
PRIOR_BUILDS = 3.0  # k at most: the shop-wide value counts as this many builds of a family
MIN_PRIOR_BUILDS = 0.25  # k at least, however consistent the families look
FULL_WEIGHT_BUILDS = 10  # from this many builds a family stands on its own (w = 1)
INTERVAL_MISS = 0.20  # alpha: an 80 % interval
INTERVAL_PERCENT = round(100 * (1 - INTERVAL_MISS))
ERROR_QUANTILE = 0.90  # reported alongside the median absolute leave-one-out error


def conformal_ranks(m: int, miss: float = INTERVAL_MISS) -> tuple[int, int] | None:
    """1-based ranks (lo, hi) of the sorted residuals that bound a conformal interval of
    nominal coverage 1 - miss from m residuals: lo = floor(miss / 2 * (m + 1)),
    hi = ceil((1 - miss / 2) * (m + 1)); None when m is too small (lo < 1 or hi > m).
    Lei et al., JASA 113 (2018), split conformal; coverage >= (hi - lo) / (m + 1).

    >>> conformal_ranks(8), conformal_ranks(9), conformal_ranks(49)
    (None, (1, 9), (5, 45))
    """
    lo = int(np.floor(miss / 2 * (m + 1) + 1e-9))
    hi = int(np.ceil((1 - miss / 2) * (m + 1) - 1e-9))
    if lo < 1 or hi > m:
        return None
    return lo, hi


INTERVAL_LEAST = next(m for m in range(1, 1000) if conformal_ranks(m) is not None)  # 9


def shrink_weight(n: int, prior_builds: float = PRIOR_BUILDS) -> float:
    """Weight w of a family's own median: n / (n + k * (1 - n / 10)) below 10 builds, else 1."""
    if n >= FULL_WEIGHT_BUILDS:
        return 1.0
    if n <= 0:
        return 0.0
    return n / (n + prior_builds * (1.0 - n / FULL_WEIGHT_BUILDS))


def prior_builds(values: np.ndarray, members: dict[str, np.ndarray]) -> float:
    """k = sigma^2 / tau^2 (within-family over between-family spread), clipped to 0.25..3.

    Gelman et al., Bayesian Data Analysis, 3rd ed., section 5.4 (hierarchical normal model);
    robust spreads (scaled MAD) stand in for the variances.
    """
    groups = [values[i] for i in members.values() if len(i) >= 2]
    return _prior_from(groups)


def _prior_from(groups: list[np.ndarray]) -> float:
    """prior_builds for the values of each family with two or more builds."""
    if len(groups) < 3:
        return PRIOR_BUILDS
    within = scaled_mad(np.concatenate([g - np.median(g) for g in groups]))
    between = scaled_mad(np.array([np.median(g) for g in groups]))
    if between <= 0.0:
        return PRIOR_BUILDS
    return float(np.clip((within / between) ** 2, MIN_PRIOR_BUILDS, PRIOR_BUILDS))


def prior_builds_leaving_one_out(values: np.ndarray, members: dict[str, np.ndarray]) -> np.ndarray:
    """Element i: prior_builds computed without build i (its family loses it).

    The same as calling prior_builds on the values without i, for every i, in
    O(n log n) per family instead of O(n^2): leaving a build out moves its family's median
    to one of at most three values; for each, the other families' deviations are fixed and
    each spread is a median with one element left out (robust.medians_leaving_one_out).
    """
    n = len(values)
    loo = np.full(n, prior_builds(values, members))
    groups = {f: values[i] for f, i in members.items() if len(i) >= 2}
    for family, where in members.items():
        if len(where) < 2:
            continue  # a family of one is in no group: k does not change without it
        others = [g for f, g in groups.items() if f != family]
        if len(where) == 2:  # one build left: the family drops out of the groups
            loo[where] = _prior_from(others)
            continue
        other_deviations = [g - np.median(g) for g in others]
        other_medians = [float(np.median(g)) for g in others]
        own = values[where]
        medians = medians_leaving_one_out(own)
        for median in np.unique(medians):
            chosen = np.flatnonzero(medians == median)
            loo[where[chosen]] = _priors_without(other_deviations, other_medians, own,
                                                 float(median), chosen)
    return loo


def _priors_without(other_deviations: list[np.ndarray], other_medians: list[float],
                    own: np.ndarray, median: float, chosen: np.ndarray) -> np.ndarray:
    """k for each position in `chosen` left out of `own`, whose remaining median is `median`."""
    if len(other_medians) + 1 < 3:
        return np.full(len(chosen), PRIOR_BUILDS)
    between = scaled_mad(np.array(other_medians + [median]))
    if between <= 0.0:
        return np.full(len(chosen), PRIOR_BUILDS)
    deviations = np.concatenate(other_deviations + [own - median])
    at = len(deviations) - len(own) + chosen  # where each left-out build's deviation sits
    centres = medians_leaving_one_out(deviations)[at]
    within = np.empty(len(chosen))
    for centre in np.unique(centres):
        same = centres == centre
        spread = medians_leaving_one_out(np.abs(deviations - centre))[at[same]]
        within[same] = MAD_NORMAL_SCALE * spread
    return np.clip((within / between) ** 2, MIN_PRIOR_BUILDS, PRIOR_BUILDS)


@dataclass(frozen=True, slots=True)
class GroupCalibration:
    """Calibration of one gearbox family, or of the whole shop (name "shop-wide")."""

    name: str
    n: int  # builds with a measured effort
    efficiency: float | None  # used for predictions (shrunk for a thin family)
    efficiency_median: float | None  # the group's own median
    efficiency_mad: float | None  # scaled MAD (1.4826 * MAD)
    weight: float  # shrink weight w of the group's own median (1 for shop-wide)
    travel_factor: float | None  # used for predictions (shrunk for a thin family)
    travel_factor_median: float | None
    travel_factor_mad: float | None
    n_travel: int  # builds with a measured slave travel
    loo_median_abs_err: float | None  # median |r| of leave-one-out effort predictions
    loo_p90_abs_err: float | None  # 90th percentile of |r|
    residuals: tuple[float, ...]  # leave-one-out relative residuals r, ascending
    loo_covered: int = 0  # builds whose measured effort fell inside the interval made without them
    loo_intervals: int = 0  # builds that had such an interval
    interval_percent: int = 0  # nominal coverage of the intervals, e.g. 80
    interval_least: int = 0  # fewest residuals that give an interval, e.g. 9

    @property
    def loo_coverage(self) -> float | None:
        """Share of leave-one-out intervals that held the measured effort (None without any)."""
        return self.loo_covered / self.loo_intervals if self.loo_intervals else None


@dataclass(frozen=True, slots=True)
class Basis:
    """Which history a calibrated prediction and its interval come from."""

    source: str  # "family" (its own median), "shrunk" (toward the shop-wide), "shop-wide"
    family: str
    n_family: int  # the family's other counted builds
    n_shop: int  # every other counted build
    weight: float  # the family median's weight w
    interval_source: str | None  # "family" | "shop-wide" | None without an interval
    interval_count: int  # leave-one-out residuals behind the interval
    interval_percent: int = 0  # nominal coverage of the interval, e.g. 80


@dataclass(frozen=True, slots=True)
class Prediction:
    """A calibrated effort prediction for one build."""

    effort: float | None  # N; None with not enough history
    interval: tuple[float, float] | None  # N, 80 % conformal interval
    n_builds: int  # builds behind the estimate (never the build itself)
    basis: Basis | None  # None with not enough history
    slave_travel: float | None = None  # m, computed slave travel * calibrated travel factor
    travel_margin: float | None = None  # fraction, the bearing margin at that slave travel
    efficiency: float | None = None  # the calibrated apparent efficiency behind `effort`


@dataclass(frozen=True, slots=True)
class _Estimate:
    value: float | None
    weight: float
    n_family: int
    n_shop: int


class _ShrunkMedians:
    """Per-family medians shrunk toward the shop-wide median, with leave-one-out values.

    `rows` are (build id, gearbox family, value), one per counted build.
    """

    def __init__(self, rows: list[tuple[str, str, float]]):
        self.index = {build_id: i for i, (build_id, _, _) in enumerate(rows)}
        self.families = [family for _, family, _ in rows]
        self.values = np.array([value for _, _, value in rows], dtype=float)
        self.members = _members(self.families)
        n = len(rows)
        self.shop_median = float(np.median(self.values)) if n else None
        self.family_median = {f: float(np.median(self.values[i])) for f, i in self.members.items()}
        self.prior_builds = prior_builds(self.values, self.members)
        self.prior_loo = prior_builds_leaving_one_out(self.values, self.members)
        # medians without build i: shop-wide, and of its own family (NaN when it is alone)
        self.shop_loo = medians_leaving_one_out(self.values) if n >= 2 else np.full(n, np.nan)
        self.family_loo = np.full(n, np.nan)
        for members in self.members.values():
            if len(members) >= 2:
                self.family_loo[members] = medians_leaving_one_out(self.values[members])

    def leave_one_out(self) -> np.ndarray:
        """Element i: the shrunk value for build i's family from the others (NaN when
        too few are left)."""
        return np.array([_or_nan(self.estimate(family, build_id).value)
                         for build_id, family in zip(self.index, self.families)])

    def count(self, family: str | None) -> int:
        return len(self.members.get(family, ())) if family is not None else len(self.values)

    def summary(self, family: str | None) -> tuple[int, float | None, float | None,
                                                    float | None, float]:
        """(n, value used for predictions, own median, own scaled MAD, shrink weight);
        family None is the shop-wide group."""
        if family is None:
            mad = scaled_mad(self.values) if len(self.values) else None
            return len(self.values), self.estimate(None).value, self.shop_median, mad, 1.0
        estimate = self.estimate(family)
        members = self.members.get(family)
        mad = scaled_mad(self.values[members]) if members is not None else None
        return (self.count(family), estimate.value, self.family_median.get(family), mad,
                estimate.weight)

    def estimate(self, family: str | None, exclude_id: str | None = None) -> _Estimate:
        """The shrunk value for `family` (None: shop-wide), the build `exclude_id` left out."""
        n_family, n_shop = (self.count(family) if family is not None else 0), len(self.values)
        family_median, shop_median = self.family_median.get(family), self.shop_median
        i = self.index.get(exclude_id) if exclude_id is not None else None
        prior = self.prior_builds
        if i is not None:
            n_shop -= 1
            shop_median = float(self.shop_loo[i])
            prior = float(self.prior_loo[i])
            if self.families[i] == family:
                n_family -= 1
                family_median = float(self.family_loo[i])
        weight = shrink_weight(n_family, prior)
        if n_shop < MIN_BUILDS:
            return _Estimate(None, weight, n_family, n_shop)
        value = shop_median if weight == 0 else weight * family_median + (1 - weight) * shop_median
        return _Estimate(value, weight, n_family, n_shop)


def _or_nan(value: float | None) -> float:
    return np.nan if value is None else value


def _members(families: list[str]) -> dict[str, np.ndarray]:
    groups: dict[str, list[int]] = {}
    for i, family in enumerate(families):
        groups.setdefault(family, []).append(i)
    return {f: np.asarray(groups[f], dtype=np.intp) for f in sorted(groups)}


class _Residuals:
    """Sorted leave-one-out residuals of one group, and where each build's own one sits."""

    def __init__(self, ids: list[str], residuals: np.ndarray):
        order = np.argsort(residuals, kind="stable")
        self.ordered = residuals[order]
        self.rank = {ids[i]: r for r, i in enumerate(order)}

    def count_without(self, build_id: str) -> int:
        return len(self.ordered) - (build_id in self.rank)

    def bounds_without(self, build_id: str) -> tuple[float, float] | None:
        """(r_(lo), r_(hi)) of the conformal interval from every residual but the build's
        own; None when too few are left."""
        ranks = conformal_ranks(self.count_without(build_id))
        if ranks is None:
            return None
        skip = self.rank.get(build_id, len(self.ordered))
        lo, hi = (rank - 1 + (rank - 1 >= skip) for rank in ranks)  # 0-based, own one skipped
        return float(self.ordered[lo]), float(self.ordered[hi])


class Calibration:
    """Shop-wide and per-family calibration; `predict` gives a calibrated effort."""

    def __init__(self, efficiency: _ShrunkMedians, travel: _ShrunkMedians):
        self._efficiency = efficiency
        self._travel = travel
        # effort residual: measured / predicted - 1 = e_loo / e - 1 (predicted = ideal / e_loo)
        residuals = efficiency.leave_one_out() / efficiency.values - 1.0
        ids = list(efficiency.index)
        known = np.isfinite(residuals)
        groups = {SHOP_WIDE: np.flatnonzero(known)}
        groups.update((f, members[known[members]]) for f, members in efficiency.members.items())
        self._residuals = {name: _Residuals([ids[i] for i in where], residuals[where])
                           for name, where in groups.items()}
        self._coverage = self._leave_one_out_coverage(residuals, ids, known)
        self.shop = self._group(SHOP_WIDE, None)
        names = sorted(set(efficiency.members) | set(travel.members))
        self.families = {name: self._group(name, name) for name in names}

    def _leave_one_out_coverage(self, residuals: np.ndarray, ids: list[str],
                                known: np.ndarray) -> dict[str, tuple[int, int]]:
        """Group name -> (covered, intervals): each build's own residual against the
        interval its own prediction would carry (made without it)."""
        counts = {name: [0, 0] for name in self._residuals}
        for i in np.flatnonzero(known):
            family = self._efficiency.families[i]
            found = self._interval_bounds(family, ids[i])
            if found is None:
                continue
            (low, high), _, _ = found
            inside = int(low <= residuals[i] <= high)
            for name in (SHOP_WIDE, family):
                counts[name][0] += inside
                counts[name][1] += 1
        return {name: (covered, total) for name, (covered, total) in counts.items()}

    @property
    def n_builds(self) -> int:
        """Builds that count toward the calibration (a measured effort)."""
        return len(self._efficiency.values)

    def _group(self, name: str, family: str | None) -> GroupCalibration:
        n, efficiency, efficiency_median, efficiency_mad, weight = self._efficiency.summary(family)
        n_travel, travel, travel_median, travel_mad, _ = self._travel.summary(family)
        residuals = self._residuals.get(name)
        ordered = residuals.ordered if residuals is not None else np.empty(0)
        abs_err = np.abs(ordered)
        return GroupCalibration(
            name=name,
            n=n,
            efficiency=efficiency,
            efficiency_median=efficiency_median,
            efficiency_mad=efficiency_mad,
            weight=weight,
            travel_factor=travel,
            travel_factor_median=travel_median,
            travel_factor_mad=travel_mad,
            n_travel=n_travel,
            loo_median_abs_err=float(np.median(abs_err)) if len(abs_err) else None,
            loo_p90_abs_err=float(np.percentile(abs_err, 100 * ERROR_QUANTILE))
            if len(abs_err) else None,
            residuals=tuple(float(r) for r in ordered),
            loo_covered=self._coverage.get(name, (0, 0))[0],
            loo_intervals=self._coverage.get(name, (0, 0))[1],
            interval_percent=INTERVAL_PERCENT,
            interval_least=INTERVAL_LEAST,
        )

    def predict(self, build: Build, sizing: Sizing) -> Prediction:
        """Calibrated effort for a build; a build in the history is left out of its own."""
        family = build.gearbox.family
        estimate = self._efficiency.estimate(family, exclude_id=build.id)
        if estimate.value is None:
            return Prediction(None, None, estimate.n_shop, None)
        effort = sizing.effort_ideal / estimate.value
        travel = self._travel.estimate(family, exclude_id=build.id).value
        slave = sizing.slave_travel * travel if travel is not None else None
        interval, interval_source, interval_count = self._interval(family, build.id, effort)
        full_weight = estimate.weight == 1.0
        source = "family" if full_weight else "shop-wide" if estimate.weight == 0.0 else "shrunk"
        return Prediction(
            effort=effort,
            interval=interval,
            n_builds=estimate.n_family if full_weight else estimate.n_shop,
            basis=Basis(source, family, estimate.n_family, estimate.n_shop, estimate.weight,
                        interval_source, interval_count, INTERVAL_PERCENT),
            slave_travel=slave,
            travel_margin=None if slave is None else travel_margin(
                bearing_travel(slave, sizing.ratio_fork), sizing.needed_bearing_travel),
            efficiency=estimate.value,
        )

    def _interval_bounds(self, family: str, build_id: str
                         ) -> tuple[tuple[float, float], str, int] | None:
        """((r_lo, r_hi), "family" | "shop-wide", residuals behind it), or None."""
        for name in (family, SHOP_WIDE):
            residuals = self._residuals.get(name)
            bounds = None if residuals is None else residuals.bounds_without(build_id)
            if bounds is not None:
                source = "family" if name == family else SHOP_WIDE
                return bounds, source, residuals.count_without(build_id)
        return None

    def _interval(self, family: str, build_id: str, effort: float
                  ) -> tuple[tuple[float, float] | None, str | None, int]:
        """(interval N, "family" | "shop-wide" | None, residuals behind it)."""
        found = self._interval_bounds(family, build_id)
        if found is None:
            return None, None, 0
        (low, high), source, count = found
        return (effort * (1 + low), effort * (1 + high)), source, count


def calibrate(pairs: Sequence[tuple[Build, Sizing]]) -> Calibration:
    """Calibrate from (build, sizing) pairs; only measured or verified builds count."""
    effort_rows: list[tuple[str, str, float]] = []
    travel_rows: list[tuple[str, str, float]] = []
    for build, sizing in pairs:
        measured = build.measured
        if build.status not in COUNTED_STATUSES or measured is None:
            continue
        family = build.gearbox.family
        effort = measured.pedal_effort
        if effort is not None and effort > 0 and sizing.effort_ideal > 0:
            effort_rows.append((build.id, family, sizing.effort_ideal / effort))
        if measured.slave_travel is not None and sizing.slave_travel > 0:
            travel_rows.append((build.id, family, measured.slave_travel / sizing.slave_travel))
    return Calibration(_ShrunkMedians(effort_rows), _ShrunkMedians(travel_rows))
