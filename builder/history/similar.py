"""Similar builds: how far apart two builds are.

The distance between two builds adds up:

- 1.0 when the gearbox family differs, 1.0 when the fork tip moves the other way (or one
  build has a concentric slave, "none"), 1.0 when the slave kind differs (external or
  concentric);
- for each of master bore, slave bore, pedal ratio, overall ratio and release load,
  |ln(a / b)| / ln(1.10): a 10 % difference in one of them adds 1.0, as much as a different
  gearbox family, and the same ratio counts the same for small and large parts. An annular
  (concentric) slave that gives its piston area is compared by the bore of a round piston
  of the same area.

An identical build is at distance 0. Candidates are the builds with a measured section
(measured, verified and rejected: a rejected build close to a proposal is a warning).

Order: gearbox family and fork direction come first, then slave kind, then distance. A build
that matches the proposal's family and fork direction always ranks above one that does not
(one that differs in one of the two above one that differs in both), and within those a build
with the same slave kind above one with the other kind; the distance orders builds that
agree on those, and equal distances are ordered by build id. A build of another family can
be nearer in numbers, but what it teaches about this gearbox is less. "What differs" names
each mismatch and each quantity that differs by 1 % or more, the similar build's value
first, then the build asked about.

Same combination (`Combinations`): finished builds of one gearbox family and fork direction
that used the same master and slave, by numbers (bores within 0.002 in, piston areas within
0.5 %, the fitment reference's tolerances): measured and verified ones are evidence for the
combination, rejected ones a warning with their outcome and flags.
"""
from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from builder.engine.result import Sizing
from builder.history.reference import AREA_TOLERANCE, BORE_TOLERANCE, within
from builder.model import Build, Master, Slave

CATEGORY_WEIGHTS = {"gearbox.family": 1.0, "gearbox.fork_tip_moves": 1.0, "slave.kind": 1.0}
NUMERIC_SCALE = math.log(1.10)  # a 10 % difference adds 1.0
NOTABLE_DIFFERENCE = 0.01  # quantities closer than 1 % are not listed as differing
CANDIDATE_STATUSES = ("measured", "verified", "rejected")
TIER_SPAN = 1.0e6  # more than any distance: ranks the category tiers ahead of the distance
EVIDENCE_STATUSES = ("measured", "verified")


@dataclass(frozen=True, slots=True)
class Difference:
    """One way a similar build differs: the field, its value, ours, and the dimension
    (None for a category such as the gearbox family; "ratio" for a plain ratio)."""

    field: str  # e.g. "gearbox.family", "master.bore", "ratio.pedal"
    theirs: float | str
    ours: float | str
    dimension: str | None


@dataclass(frozen=True, slots=True)
class SimilarBuild:
    id: str
    distance: float
    differs: tuple[Difference, ...]  # the similar build's value first
    measured_effort: float | None  # N
    outcome: str | None
    status: str
    measured_slave_travel: float | None = None  # m


def _categories(build: Build) -> tuple[str, str, str]:
    return build.gearbox.family, build.gearbox.fork_tip_moves, build.slave.kind


def _numbers(build: Build, sizing: Sizing) -> tuple[float, ...]:
    return (build.master.bore, build.slave.equivalent_bore, sizing.ratio_pedal,
            sizing.ratio_overall, build.clutch.peak_load)


def _log_scaled(values) -> np.ndarray:
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.log(np.asarray(values, dtype=float)) / NUMERIC_SCALE


class SimilarityIndex:
    """Measured builds in a feature matrix built once; `query` finds the nearest k."""

    def __init__(self, pairs: Sequence[tuple[Build, Sizing]]):
        self._pairs = [(b, s) for b, s in pairs
                       if b.measured is not None and b.status in CANDIDATE_STATUSES]
        self._index = {b.id: i for i, (b, _) in enumerate(self._pairs)}
        columns = list(zip(*(_categories(b) for b, _ in self._pairs))) or [(), (), ()]
        self._codes = [{value: code for code, value in enumerate(sorted(set(col)))}
                       for col in columns]
        self._categorical = np.array(
            [[codes[value] for value in col] for codes, col in zip(self._codes, columns)],
            dtype=np.int32).reshape(3, len(self._pairs))
        self._weights = np.array(list(CATEGORY_WEIGHTS.values()))
        self._numeric = _log_scaled([_numbers(b, s) for b, s in self._pairs]).reshape(-1, 5)
        ranks = np.argsort(np.array([b.id for b, _ in self._pairs], dtype=object), kind="stable")
        self._id_rank = np.empty(len(self._pairs), dtype=np.intp)
        self._id_rank[ranks] = np.arange(len(self._pairs))

    def __len__(self) -> int:
        return len(self._pairs)

    def _mismatches(self, build: Build) -> np.ndarray:
        """(3, candidates) booleans: family, fork direction and slave kind differ."""
        codes = np.array([codes.get(value, -1)
                          for codes, value in zip(self._codes, _categories(build))])
        return self._categorical != codes[:, None]

    def distances(self, build: Build, sizing: Sizing) -> np.ndarray:
        """Distance from the build to every candidate, in candidate order."""
        return self._distances(self._mismatches(build), build, sizing)

    def _distances(self, mismatch: np.ndarray, build: Build, sizing: Sizing) -> np.ndarray:
        apart = np.abs(self._numeric - _log_scaled(_numbers(build, sizing)))
        apart = np.where(np.isfinite(apart), apart, 1.0)  # a quantity not known counts 1.0
        return self._weights @ mismatch + apart.sum(axis=1)

    def query(self, build: Build, sizing: Sizing, k: int = 5,
              exclude_id: str | None = None) -> list[SimilarBuild]:
        """The k most similar measured builds in the module's order (family and fork
        direction, slave kind, distance, id); `exclude_id` left out."""
        mismatch = self._mismatches(build)
        distance = self._distances(mismatch, build, sizing)
        # tier 0..5: family and fork mismatches (0, 1, 2) twice over, plus a slave kind mismatch
        tier = 2 * (mismatch[0].astype(np.intp) + mismatch[1]) + mismatch[2]
        key = tier * TIER_SPAN + distance
        excluded = self._index.get(exclude_id) if exclude_id is not None else None
        if excluded is not None:
            key[excluded] = np.inf
        count = min(k, len(key) - (excluded is not None))
        if count <= 0:
            return []
        kth = np.partition(key, count - 1)[count - 1]
        near = np.flatnonzero(key <= kth)
        near = near[np.lexsort((self._id_rank[near], distance[near], tier[near]))][:count]
        return [self._similar(build, sizing, int(i), float(distance[i])) for i in near]

    def _similar(self, build: Build, sizing: Sizing, i: int, distance: float) -> SimilarBuild:
        other, other_sizing = self._pairs[i]
        measured = other.measured
        return SimilarBuild(
            id=other.id,
            distance=distance,
            differs=differences(other, other_sizing, build, sizing),
            measured_effort=measured.pedal_effort,
            outcome=other.outcome,
            status=other.status,
            measured_slave_travel=measured.slave_travel,
        )


def differences(other: Build, other_sizing: Sizing, build: Build, sizing: Sizing
                ) -> tuple[Difference, ...]:
    """What differs: each category that does not match, and each compared quantity that
    differs by NOTABLE_DIFFERENCE or more; `other`'s value first, then `build`'s."""
    found = [Difference(name, theirs, ours, None)
             for name, theirs, ours in zip(CATEGORY_WEIGHTS, _categories(other), _categories(build))
             if theirs != ours]
    area_given = other.slave.piston_area is not None or build.slave.piston_area is not None
    slave = (("slave.piston_area", other.slave.area, build.slave.area, "area") if area_given
             else ("slave.bore", other.slave.equivalent_bore, build.slave.equivalent_bore, "length"))
    quantities = (
        ("master.bore", other.master.bore, build.master.bore, "length"),
        slave,
        ("ratio.pedal", other_sizing.ratio_pedal, sizing.ratio_pedal, "ratio"),
        ("ratio.overall", other_sizing.ratio_overall, sizing.ratio_overall, "ratio"),
        ("clutch.release_load", other.clutch.peak_load, build.clutch.peak_load, "force"),
    )
    found += [Difference(name, theirs, ours, dimension)
              for name, theirs, ours, dimension in quantities
              if ours > 0 and abs(theirs / ours - 1.0) >= NOTABLE_DIFFERENCE]
    return tuple(found)


# --- same master and slave on the same gearbox ----------------------------------------------

@dataclass(frozen=True, slots=True)
class RejectedUse:
    """A rejected build that used a combination: its id, outcome and the flags it raised."""

    id: str
    outcome: str | None
    flags: tuple[str, ...]  # codes of the flags its own sizing raised


@dataclass(frozen=True, slots=True)
class CombinationUse:
    """Finished builds of one family and fork direction with one master and slave."""

    evidence: tuple[str, ...]  # measured or verified build ids, by id
    rejected: tuple[RejectedUse, ...]  # rejected builds, by id


def same_cylinders(master: Master, slave: Slave, other_master: Master, other_slave: Slave) -> bool:
    """Same master and slave by numbers: bores within BORE_TOLERANCE, slave kind equal and
    piston areas within AREA_TOLERANCE (relative)."""
    return (within(master.bore, other_master.bore, BORE_TOLERANCE)
            and slave.kind == other_slave.kind
            and within(slave.area, other_slave.area, AREA_TOLERANCE, relative=True))


class Combinations:
    """Finished builds grouped by (family, fork direction) and then by master and slave, so a
    query compares against the few combinations of one gearbox, not every build."""

    def __init__(self, pairs: Sequence[tuple[Build, Sizing]]):
        self._groups: dict[tuple[str, str], list[tuple[Master, Slave, list[tuple[str, str, object]]]]] = {}
        for build, sizing in sorted(pairs, key=lambda pair: pair[0].id):
            if build.measured is None or build.status not in CANDIDATE_STATUSES:
                continue
            rows = self._groups.setdefault(
                (build.gearbox.family, build.gearbox.fork_tip_moves), [])
            entry = (build.id, build.status, RejectedUse(
                build.id, build.outcome, tuple(flag.code for flag in sizing.flags)))
            for master, slave, members in rows:
                if same_cylinders(build.master, build.slave, master, slave):
                    members.append(entry)
                    break
            else:
                rows.append((build.master, build.slave, [entry]))

    def use(self, family: str, fork_tip_moves: str, master: Master, slave: Slave,
            exclude_id: str | None = None) -> CombinationUse:
        """Which finished builds of this family and fork direction used this master and
        slave; `exclude_id` (the build asked about, when it is a record) left out."""
        evidence: list[str] = []
        rejected: list[RejectedUse] = []
        for other_master, other_slave, members in self._groups.get((family, fork_tip_moves), ()):
            if not same_cylinders(master, slave, other_master, other_slave):
                continue
            for build_id, status, use in members:
                if build_id == exclude_id:
                    continue
                if status in EVIDENCE_STATUSES:
                    evidence.append(build_id)
                else:
                    rejected.append(use)
        return CombinationUse(tuple(sorted(evidence)),
                              tuple(sorted(rejected, key=lambda use: use.id)))
