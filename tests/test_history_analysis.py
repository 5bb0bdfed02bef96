"""analyse() and analyse_proposal() over an invented shop sized by builder.engine."""
import dataclasses
import math

import pytest

from builder.engine import size_build
from builder.engine.result import Flag
from builder.history import UnsizableBuilds, analyse, analyse_proposal, calibrate
from builder.history.analysis import judged_on_history
from builder.history.calibration import Prediction
from builder.model import Pedal, PedalLayout, Shop
from factories import make_rules
from history_factories import INCH, make_build, make_sizing

RULES = make_rules()


def invented_shop() -> Shop:
    """Twelve builds in two families: efficiencies 0.78..0.88, one rejected, one draft."""
    builds = []
    for n in range(10):
        family = ("QX-5", "TR-4B")[n % 2]
        build = make_build(f"HW-{n:03d}", family=family, master_bore=(0.70 + 0.01 * n) * INCH,
                           release_load=1700.0 + 40 * n)
        ideal = size_build(build, RULES).effort_ideal
        builds.append(make_build(build.id, family=family, master_bore=build.master.bore,
                                 release_load=build.clutch.release_load,
                                 effort=ideal / (0.78 + 0.01 * n)))
    builds.append(make_build("HW-100", status="rejected", effort=400.0, outcome="dragged"))
    builds.append(make_build("HW-101", status="draft", measured=False))
    return Shop(root="records", rules=RULES, builds=tuple(builds))


def test_analyse_covers_every_build():
    shop = invented_shop()
    analysis = analyse(shop, k=3)
    ids = [b.id for b in shop.builds]
    assert list(analysis.sizings) == list(analysis.deltas) == list(analysis.predictions) == ids
    assert list(analysis.similar) == ids
    assert analysis.calibration.shop.n == 10  # the rejected build and the draft do not count
    # measured effort = ideal / e, so the deltas against the default 0.85 are 0.85 / e - 1
    assert analysis.deltas["HW-000"].effort == pytest.approx(0.85 / 0.78 - 1)
    assert analysis.deltas["HW-101"].effort is None


def test_predictions_leave_each_build_out():
    shop = invented_shop()
    analysis = analyse(shop)
    build = shop.builds[0]
    without = [b for b in shop.builds if b.id != build.id]
    alone = calibrate([(b, analysis.sizings[b.id]) for b in without])
    # recalibrating without the build by brute force gives the same effort
    expected = alone.predict(build, analysis.sizings[build.id]).effort
    assert analysis.predictions[build.id].effort == pytest.approx(expected)
    assert analysis.predictions[build.id].n_builds == 9


def test_similar_lists_exclude_the_build_itself():
    analysis = analyse(invented_shop(), k=3)
    for build_id in ("HW-000", "HW-101"):
        found = analysis.similar[build_id]
        assert len(found) == 3 and build_id not in [f.id for f in found]
        assert [f.distance for f in found] == sorted(f.distance for f in found)
    _, _, six, _ = analyse_proposal(analysis, analysis.builds["HW-000"], k=6)
    assert len(six) == 6 and "HW-000" not in [f.id for f in six]


def test_proposal_against_the_history():
    analysis = analyse(invented_shop(), k=4)
    proposal = make_build("HW-900", family="QX-5", measured=False)
    sizing, prediction, similar, deltas = analyse_proposal(analysis, proposal)
    assert sizing.build_id == "HW-900"
    assert prediction.effort == pytest.approx(
        sizing.effort_ideal / analysis.calibration.families["QX-5"].efficiency)
    assert prediction.n_builds == 10 and prediction.interval is not None
    assert len(similar) == 4 and deltas.effort is None
    # a record checked as a file is left out of its own prediction and similar list
    record = analysis.shop.builds[0]
    _, again, similar, _ = analyse_proposal(analysis, record, k=20)
    assert again == analysis.predictions[record.id]
    assert record.id not in [f.id for f in similar] and len(similar) == 10


def test_impossible_pedal_layout_is_reported_with_the_engine_reason():
    build = make_build("HW-500")
    seat = (-0.008, -0.053)  # the pushrod seat on the clevis: a pushrod of no length
    layout = PedalLayout(pivot=(0.0, 0.0), pad=(-0.06, -0.285), clevis=seat, pushrod_seat=seat,
                         rotation_to_stop=math.radians(30))
    broken = dataclasses.replace(build, pedal=Pedal(None, None, 0.15, layout=layout),
                                 path="records/builds/HW-500.yaml")
    shop = Shop(root="records", rules=RULES, builds=(broken,))
    with pytest.raises(UnsizableBuilds) as caught:
        analyse(shop)
    [(build, error)] = caught.value.failures
    assert (build.id, error.reason) == ("HW-500", "points-coincide")


def test_effort_band_is_judged_on_the_calibrated_effort():
    # A 150 N default-efficiency figure is above a 60..140 N band; the shop's own history
    # (apparent efficiency 1.0 here) predicts 100 N, inside it: the flag must follow history.
    rules = make_rules(effort_band=(60.0, 140.0))
    sizing = dataclasses.replace(
        make_sizing("QX-001", effort_ideal=100.0, effort_predicted=150.0),
        flags=(Flag("effort-high", "warn"), Flag("travel-short", "fail")))
    calibrated = Prediction(effort=100.0, interval=None, n_builds=12, basis=None)
    judged = judged_on_history(sizing, calibrated, rules)
    assert [f.code for f in judged.flags] == ["travel-short"]
    assert judged.effort_predicted == 150.0  # computed values are left as the engine gave them
    heavy = Prediction(effort=160.0, interval=None, n_builds=12, basis=None)
    flagged = judged_on_history(sizing, heavy, rules)
    assert [f.code for f in flagged.flags] == ["travel-short", "effort-high"]
    assert (flagged.flags[1].basis, flagged.flags[1].value("effort")) == ("calibrated", 160.0)
    unknown = Prediction(effort=None, interval=None, n_builds=1, basis=None)
    assert judged_on_history(sizing, unknown, rules) is sizing


def test_effort_curve_is_sized_on_demand_and_matches_a_full_sizing():
    # the whole-shop pass leaves the plotted series out; asking for it gives the engine's own
    rules = make_rules()
    base = make_build("QX-001")
    curve = ((0.0, 0.0), (0.003, 1500.0), (0.007, 1800.0), (0.010, 1600.0))
    build = dataclasses.replace(base, clutch=dataclasses.replace(base.clutch, load_curve=curve))
    analysis = analyse(Shop(root=".", rules=rules, builds=(build,)))
    assert analysis.sizings["QX-001"].effort_curve is None
    full = size_build(build, rules)
    assert analysis.effort_curve("QX-001") == full.effort_curve
    assert full.effort_curve is not None


def test_travel_short_is_judged_on_the_smaller_margin_after_measured_losses():
    # make_sizing: 20 mm computed slave travel, fork 2, 9.5 mm needed -> engine margin +5 %
    # (a warn against the 10 % minimum). History's travel factor 0.9 -> 18 mm -> 9 mm at the
    # bearing: 9 / 9.5 - 1 = -5.3 %, so the clutch would not release: the flag must fail.
    rules = make_rules()
    sizing = dataclasses.replace(
        make_sizing("QX-001"), flags=(Flag("travel-short", "warn"),))
    shorter = Prediction(effort=None, interval=None, n_builds=8, basis=None,
                         slave_travel=0.018, travel_margin=9.0 / 9.5 - 1.0)
    judged = judged_on_history(sizing, shorter, rules)
    assert [(f.code, f.severity) for f in judged.flags] == [("travel-short", "fail")]
    assert judged.flags[0].basis == "after_losses"
    assert judged.flags[0].value("bearing") == pytest.approx(0.009)  # 18 mm / fork ratio 2
    longer = dataclasses.replace(shorter, slave_travel=0.021, travel_margin=10.5 / 9.5 - 1.0)
    assert judged_on_history(sizing, longer, rules) is sizing  # the engine's margin is smaller


def test_worst_pressure_and_ratings_follow_the_calibrated_efficiency():
    # Worst-case pressure = static / efficiency (all losses after the slave; efficiency of a
    # machine, OpenStax College Physics, "Simple Machines"): 2.3 MPa static at a calibrated
    # 0.70 is 3.2857 MPa (by hand), above a 3.2 MPa master rating though under it at 0.85.
    rules = make_rules()
    build = dataclasses.replace(make_build("QX-001"), master=dataclasses.replace(
        make_build("QX-001").master, rated_pressure=3.2e6))
    sizing = dataclasses.replace(make_sizing("QX-001"), pressure_worst=2.3e6 / 0.85)
    calibrated = Prediction(effort=100.0 / 0.70, interval=None, n_builds=12, basis=None,
                            efficiency=0.70)
    judged = judged_on_history(sizing, calibrated, rules, build)
    assert judged.pressure_worst == pytest.approx(3.2857143e6)
    [flag] = [f for f in judged.flags if f.code == "pressure-over-rating"]
    assert (flag.subject, flag.basis, flag.value("efficiency")) == ("master", "calibrated", 0.70)
    assert judged.pressure == sizing.pressure  # the static figure stays the engine's
    kinder = dataclasses.replace(calibrated, efficiency=0.95)
    assert not [f for f in judged_on_history(sizing, kinder, rules, build).flags
                if f.code == "pressure-over-rating"]


def test_history_imports_no_wording_units_yaml_or_site():
    # Project rule (DEVELOPERS.md): history returns numbers, codes and fields; words are made
    # in builder.presentation only, and history never reads records itself.
    import pathlib
    import subprocess
    import sys
    modules = ", ".join(f"builder.history.{name}" for name in (
        "analysis", "calibration", "deltas", "reference", "robust", "similar", "suggest"))
    code = (f"import sys, {modules}; "
            "print(sorted(m for m in ('pint', 'yaml', 'mkdocs', 'builder.presentation', "
            "'builder.units', 'builder.records', 'builder.site') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=pathlib.Path(__file__).parents[1]).stdout.strip()
    assert out == "[]"
