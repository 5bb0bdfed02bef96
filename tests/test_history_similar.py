"""Similar builds: distance, order, candidates and what differs (as data)."""
import math

import numpy as np
import pytest

from builder.history import SimilarityIndex
from builder.history.similar import CATEGORY_WEIGHTS, NUMERIC_SCALE, Difference, differences
from history_factories import INCH, make_build, make_sizing


def pair(build_id, sizing_kwargs=None, **build_kwargs):
    return make_build(build_id, **build_kwargs), make_sizing(build_id, **(sizing_kwargs or {}))


def test_identical_build_is_at_distance_zero():
    build, sizing = pair("QX-001")
    index = SimilarityIndex([(build, sizing)])
    [found] = index.query(make_build("QX-900", measured=False), make_sizing("QX-900"))
    assert found.id == "QX-001" and found.distance == 0.0 and found.differs == ()


def test_each_term_adds_its_weight():
    base = pair("QX-001")
    index = SimilarityIndex([base])
    # a different family adds 1.0; a 10 % larger slave bore adds ln(1.1)/ln(1.1) = 1.0
    other_family = make_build("QX-900", family="TR-4B")
    assert index.distances(other_family, base[1])[0] == pytest.approx(1.0)
    bigger = make_build("QX-901", slave_bore=0.875 * INCH * 1.1)
    assert index.distances(bigger, base[1])[0] == pytest.approx(1.0)
    # pedal ratio 6.1 against 5.4: ln(6.1/5.4)/ln(1.1) = 1.27856 (math.log by hand)
    steeper = make_sizing("QX-902", ratio_pedal=6.1)
    assert index.distances(base[0], steeper)[0] == pytest.approx(
        math.log(6.1 / 5.4) / math.log(1.1))


def test_vectorised_distance_matches_a_plain_loop():
    rng = np.random.default_rng(7)
    pairs = []
    for n in range(60):
        kind = "concentric" if n % 5 == 0 else "external"
        build = make_build(
            f"RN-{n:03d}", family=f"F{n % 4}", fork_tip="none" if kind == "concentric" else
            ("forward", "rearward")[n % 2], slave_kind=kind,
            master_bore=rng.uniform(0.6, 1.0) * INCH,
            slave_bore=None if kind == "concentric" else rng.uniform(0.7, 1.1) * INCH,
            piston_area=rng.uniform(1.0e-3, 1.4e-3) if kind == "concentric" else None,
            release_load=rng.uniform(1200, 2600))
        pairs.append((build, make_sizing(build.id, ratio_pedal=rng.uniform(4.5, 7),
                                         ratio_overall=rng.uniform(10, 30))))
    index = SimilarityIndex(pairs)
    probe_build, probe_sizing = pairs[17]

    def kinds(b):
        return b.gearbox.family, b.gearbox.fork_tip_moves, b.slave.kind

    def plain(build, sizing):
        total = sum(w * (a != b) for w, a, b in zip(
            CATEGORY_WEIGHTS.values(), kinds(build), kinds(probe_build)))
        # the slave is compared by equivalent bore; area goes as bore^2, so half its log
        for a, b, scale in ((build.master.bore, probe_build.master.bore, 1),
                            (build.slave.area, probe_build.slave.area, 2),
                            (sizing.ratio_pedal, probe_sizing.ratio_pedal, 1),
                            (sizing.ratio_overall, probe_sizing.ratio_overall, 1),
                            (build.clutch.release_load, probe_build.clutch.release_load, 1)):
            total += abs(math.log(a / b)) / (scale * NUMERIC_SCALE)
        return total

    expected = [plain(b, s) for b, s in pairs]
    np.testing.assert_allclose(index.distances(probe_build, probe_sizing), expected, atol=1e-9)
    found = index.query(probe_build, probe_sizing, k=8, exclude_id=probe_build.id)

    def tier(b):  # family and fork direction first, then slave kind (the module's order)
        family, fork, slave = (x != y for x, y in zip(kinds(b), kinds(probe_build)))
        return (family + fork, slave)

    ranked = sorted((tier(b), d, b.id) for d, (b, _) in zip(expected, pairs)
                    if b.id != probe_build.id)[:8]
    assert [f.id for f in found] == [i for _, _, i in ranked]


def test_nearest_first_ties_by_id_and_exclusion():
    pairs = [
        pair("QX-004", slave_bore=0.75 * INCH),  # 15 % smaller slave bore
        pair("QX-005", slave_bore=0.70 * INCH),  # 20 % smaller
        pair("QX-003"),  # identical
        pair("QX-002", master_bore=0.7 * INCH),  # 7 % smaller master bore
        pair("QX-001", master_bore=0.7 * INCH),  # the same as QX-002: id breaks the tie
    ]
    index = SimilarityIndex(pairs)
    probe, sizing = pair("QX-900")
    found = index.query(probe, sizing, k=4)
    assert [f.id for f in found] == ["QX-003", "QX-001", "QX-002", "QX-004"]
    assert [f.distance for f in found] == sorted(f.distance for f in found)
    assert [f.id for f in index.query(probe, sizing, k=3, exclude_id="QX-003")] == [
        "QX-001", "QX-002", "QX-004"]
    assert len(index.query(probe, sizing, k=10, exclude_id="QX-003")) == 4


def test_family_and_fork_direction_dominate_then_slave_kind():
    """A build of another family or fork direction never ranks above one of the same family
    and direction, however near in numbers; slave kind likewise within them."""
    pairs = [
        pair("QX-001", family="TR-4B"),  # identical numbers, another family: distance 1.0
        pair("QX-002", fork_tip="forward"),  # identical numbers, fork the other way: 1.0
        pair("QX-003", family="TR-4B", fork_tip="forward"),  # both differ: 2.0
        pair("QX-004", master_bore=0.5 * INCH, slave_bore=1.1 * INCH),  # far in numbers
        pair("QX-005", slave_kind="concentric", slave_bore=None, piston_area=3.9e-4),
        pair("QX-006", family="TR-4B", master_bore=0.5 * INCH),  # another family and far
    ]
    index = SimilarityIndex(pairs)
    probe, sizing = pair("QX-900")
    found = index.query(probe, sizing, k=6)
    # QX-005 is an external-slave proposal's same family and fork, but a concentric slave
    assert [f.id for f in found] == ["QX-004", "QX-005", "QX-001", "QX-002", "QX-006", "QX-003"]
    near, far = found[0], found[2]
    assert near.distance > far.distance  # the order is not by distance alone
    # ids the same family and direction keep first place with any k
    assert [f.id for f in index.query(probe, sizing, k=1)] == ["QX-004"]


def test_candidates_have_a_measured_section_rejected_included():
    pairs = [pair("QX-001", status="draft", measured=False),
             pair("QX-002", status="rejected", effort=300.0, outcome="dragged at idle"),
             pair("QX-003", status="verified"),
             pair("QX-004", status="measured", effort=None)]
    index = SimilarityIndex(pairs)
    found = index.query(*pair("QX-900"), k=10)
    assert sorted(f.id for f in found) == ["QX-002", "QX-003", "QX-004"]
    rejected = next(f for f in found if f.id == "QX-002")
    assert (rejected.status, rejected.measured_effort, rejected.outcome) == (
        "rejected", 300.0, "dragged at idle")
    assert rejected.measured_slave_travel == pytest.approx(0.020)


def test_empty_index():
    assert SimilarityIndex([]).query(*pair("QX-900")) == []


def test_differs_as_data():
    other = make_build("QX-001", family="TR-4B", slave_bore=0.875 * INCH)
    build = make_build("QX-900", family="QX-5", slave_bore=0.750 * INCH)
    found = differences(other, make_sizing("QX-001", ratio_pedal=6.1),
                        build, make_sizing("QX-900", ratio_pedal=5.4))
    # the other build's value first; bores in m (1 in = 0.0254 m exactly, NIST SP 811)
    assert found == (Difference("gearbox.family", "TR-4B", "QX-5", None),
                     Difference("slave.bore", 0.875 * INCH, 0.75 * INCH, "length"),
                     Difference("ratio.pedal", 6.1, 5.4, "ratio"))


def test_differs_names_piston_area_and_categories():
    other = make_build("QX-001", slave_kind="concentric", fork_tip="none",
                       slave_bore=None, piston_area=1.9 * INCH**2, release_load=1900.0)
    build = make_build("QX-900", release_load=1800.0)
    found = differences(other, make_sizing("QX-001"), build, make_sizing("QX-900"))
    # a piston area is compared as an area: 7/8 in bore is pi/4 * 0.875^2 in^2
    assert found[:2] == (Difference("gearbox.fork_tip_moves", "none", "rearward", None),
                         Difference("slave.kind", "concentric", "external", None))
    area = next(d for d in found if d.field == "slave.piston_area")
    assert (area.theirs, area.ours) == (pytest.approx(1.9 * INCH**2),
                                        pytest.approx(math.pi / 4 * (0.875 * INCH) ** 2))
    load = next(d for d in found if d.field == "clutch.release_load")
    assert (load.theirs, load.ours, load.dimension) == (1900.0, 1800.0, "force")


def test_distance_is_documented_with_its_weights_and_scale():
    import inspect

    from builder.history import similar

    text = inspect.getdoc(similar)
    assert all(weight == 1.0 for weight in CATEGORY_WEIGHTS.values())
    assert NUMERIC_SCALE == math.log(1.10)
    assert "ln(1.10)" in text and "1.0 when the gearbox family differs" in text
    assert "distance 0" in text


def test_combinations_find_evidence_and_rejected_uses_by_numbers():
    from dataclasses import replace

    from builder.engine.result import Flag
    from builder.history.similar import Combinations, RejectedUse

    def used(build_id, status="verified", **kwargs):
        return make_build(build_id, status=status, outcome=f"outcome of {build_id}", **kwargs)

    rejected_sizing = replace(make_sizing("QX-004"), flags=(Flag("travel-short", "fail"),))
    pairs = [
        (used("QX-001"), make_sizing("QX-001")),
        (used("QX-002", status="measured", master_bore=0.7501 * INCH), make_sizing("QX-002")),
        (used("QX-003", master_bore=0.8125 * INCH), make_sizing("QX-003")),  # other master
        (used("QX-004", status="rejected"), rejected_sizing),
        (used("QX-005", fork_tip="forward"), make_sizing("QX-005")),  # other direction
        (used("QX-006", status="draft", measured=False), make_sizing("QX-006")),
    ]
    combos = Combinations(pairs)
    probe = make_build("QX-900", measured=False)
    found = combos.use("QX-5", "rearward", probe.master, probe.slave)
    assert found.evidence == ("QX-001", "QX-002")  # 0.0001 in apart is the same bore
    assert found.rejected == (RejectedUse("QX-004", "outcome of QX-004", ("travel-short",)),)
    assert combos.use("QX-5", "rearward", probe.master, probe.slave,
                      exclude_id="QX-001").evidence == ("QX-002",)
    assert combos.use("QX-5", "forward", probe.master, probe.slave).evidence == ("QX-005",)
    assert combos.use("TR-4B", "rearward", probe.master, probe.slave).evidence == ()
