"""Everything the report and the site need about a shop's builds, computed once."""
from __future__ import annotations

import functools
from collections.abc import Iterator, Mapping
from dataclasses import dataclass, field, replace

from builder.engine import GeometryError, size_build
from builder.engine.batch import size_all
from builder.engine.flags import (EFFORT_CODES, PRESSURE_CODES, effort_band_flags, margin_flags,
                                  pressure_rating_flags)
from builder.engine.hydraulics import worst_pressure
from builder.engine.result import Sizing
from builder.engine.travel import bearing_travel
from builder.history.calibration import Calibration, Prediction, calibrate
from builder.history.deltas import Deltas, deltas
from builder.history.reference import Combination, combinations
from builder.history.similar import Combinations, SimilarBuild, SimilarityIndex
from builder.model import Build, Shop, ShopRules


class UnsizableBuilds(Exception):
    """Builds whose pedal cannot push their master: (build, GeometryError) pairs.

    The command line places each at its record's `pedal.layout` key and words it.
    """

    def __init__(self, failures: list[tuple[Build, GeometryError]]):
        super().__init__(", ".join(build.id for build, _ in failures))
        self.failures = failures


class SimilarLists(Mapping[str, list[SimilarBuild]]):
    """Build id -> its k most similar measured builds (itself left out), found on first use.

    A query per build for the whole shop would be wasted work for a command that shows one
    build; the site asks for each page's list as it writes the page.
    """

    def __init__(self, builds: Mapping[str, Build], sizings: Mapping[str, Sizing],
                 index: SimilarityIndex, k: int):
        self._builds, self._sizings, self._index, self._k = builds, sizings, index, k
        self._found: dict[str, list[SimilarBuild]] = {}

    def __getitem__(self, build_id: str) -> list[SimilarBuild]:
        if build_id not in self._found:
            build = self._builds[build_id]
            self._found[build_id] = self._index.query(
                build, self._sizings[build_id], k=self._k, exclude_id=build_id)
        return self._found[build_id]

    def __iter__(self) -> Iterator[str]:
        return iter(self._builds)

    def __len__(self) -> int:
        return len(self._builds)


@dataclass(frozen=True)
class Analysis:
    """Sizing, deltas, calibration, calibrated predictions and similar builds of a shop."""

    shop: Shop
    builds: dict[str, Build]  # every build by id, in the shop's order
    sizings: dict[str, Sizing]  # every build
    deltas: dict[str, Deltas]  # every build (all None without a measured section)
    calibration: Calibration
    predictions: dict[str, Prediction]  # every build; a build never predicts itself
    similar: SimilarLists  # every build, computed on first access
    index: SimilarityIndex
    reference: dict[tuple[str, str], list[Combination]]  # (family, fork direction) -> rows
    k: int = 5
    _curves: dict[str, tuple[tuple[float, float], ...] | None] = field(default_factory=dict)

    @functools.cached_property
    def finished_combinations(self) -> Combinations:
        """The shop's finished builds grouped by gearbox and master and slave, made on first
        use and kept: `check`, `suggest` and every draft page of the site ask for it."""
        return Combinations([(build, self.sizings[build.id]) for build in self.builds.values()])

    def effort_curve(self, build_id: str) -> tuple[tuple[float, float], ...] | None:
        """(pad travel m, pad effort N) for a build with a load curve, else None.

        Sized again with the series on first use: the whole-shop pass leaves it out.
        """
        if build_id not in self._curves:
            build = self.builds[build_id]
            self._curves[build_id] = None if not build.clutch.load_curve else size_build(
                build, self.shop.rules, efficiency=self.sizings[build_id].efficiency
            ).effort_curve
        return self._curves[build_id]


def analyse(shop: Shop, k: int = 5) -> Analysis:
    """Size every build with the shop rules, then deltas, calibration, predictions.

    A pedal layout that cannot push its master raises UnsizableBuilds naming every such build.
    """
    sizings, failures = size_all(shop.builds, shop.rules)
    if failures:
        raise UnsizableBuilds(failures)
    pairs = [(b, sizings[b.id]) for b in shop.builds]
    calibration = calibrate(pairs)
    index = SimilarityIndex(pairs)
    predictions = {b.id: calibration.predict(b, s) for b, s in pairs}
    sizings = {b.id: judged_on_history(s, predictions[b.id], shop.rules, b)
               for b, s in pairs}
    builds = {b.id: b for b in shop.builds}
    return Analysis(
        shop=shop,
        builds=builds,
        sizings=sizings,
        deltas={b.id: deltas(b, s) for b, s in pairs},
        calibration=calibration,
        predictions=predictions,
        similar=SimilarLists(builds, sizings, index, k),
        index=index,
        reference=combinations([(b, sizings[b.id]) for b in shop.builds]),
        k=k,
    )


def analyse_proposal(analysis: Analysis, build: Build, k: int | None = None
                     ) -> tuple[Sizing, Prediction, list[SimilarBuild], Deltas]:
    """Size and predict a build against the shop's history (for `fitment check FILE`).

    A file that is also in the records is left out of its own prediction and similar list.
    """
    try:
        sizing = size_build(build, analysis.shop.rules)
    except GeometryError as error:
        raise UnsizableBuilds([(build, error)]) from None
    prediction = analysis.calibration.predict(build, sizing)
    sizing = judged_on_history(sizing, prediction, analysis.shop.rules, build)
    similar = analysis.index.query(build, sizing, k=analysis.k if k is None else k,
                                   exclude_id=build.id)
    return sizing, prediction, similar, deltas(build, sizing)


def judged_on_history(sizing: Sizing, prediction: Prediction, rules: ShopRules,
                      build: Build | None = None) -> Sizing:
    """The sizing with its effort, pressure and travel flags judged on what the shop's
    history says.

    The effort band is about what the driver will feel, so once history calibrates the
    effort the effort flags follow that figure. The worst-case pressure is the static
    pressure over the calibrated efficiency (all losses after the slave), and the ratings
    of `build` are checked against it. The shop's measured travel losses can only
    shorten the travel, so travel-short is judged on the smaller of the two margins. Every
    other computed value stays as the engine gave it.
    """
    flags = sizing.flags
    changes: dict = {}
    if prediction.effort is not None:
        flags = tuple(f for f in flags if f.code not in EFFORT_CODES) + tuple(
            effort_band_flags(prediction.effort, rules, basis="calibrated"))
    if prediction.efficiency is not None and build is not None:
        worst = worst_pressure(sizing.pressure, prediction.efficiency)
        changes["pressure_worst"] = worst
        flags = tuple(f for f in flags if f.code not in PRESSURE_CODES) + tuple(
            pressure_rating_flags(worst, prediction.efficiency, build, basis="calibrated"))
    if prediction.travel_margin is not None and prediction.travel_margin < sizing.margin:
        bearing = bearing_travel(prediction.slave_travel, sizing.ratio_fork)
        after_losses = margin_flags(bearing, sizing.needed_bearing_travel, rules,
                                    basis="after_losses")
        if after_losses:
            flags = tuple(f for f in flags if f.code != "travel-short") + tuple(after_losses)
    if flags != sizing.flags:
        changes["flags"] = flags
    return replace(sizing, **changes) if changes else sizing
