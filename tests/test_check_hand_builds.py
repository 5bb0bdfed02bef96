"""Builds worked by hand, against `fitment check --json` within 0.5 %.

Each build's calculation is written out beside it from the formulas of any mechanics text:
A = pi D^2 / 4 (a pull slave's annulus pi/4 (D^2 - d^2)), p = F / R_f / A_s, compression
dV = V p / K (Merritt), hose swell read between the FMVSS 106 figures (0.66 cc/ft at
1000 psi, 0.79 cc/ft at 1500 psi, from memory), levers (Shigley), Norton's offset
slider-crank for the angled master (its root found with scipy's brentq, its derivative by
central differences), virtual work for the effort. Unit facts: 1 in = 25.4 mm, 1 psi =
6894.757 Pa (NIST SP 811). Shop: default efficiency 80 %, dead stroke 1.5 mm and free play
1 mm unless a record gives its own, 3 mm line bore, 1 m lines, glycol K = 1.7 GPa, silicone
(DOT 5) K = 1.0 GPa (from memory).
"""
from __future__ import annotations

import json
import math

import pytest
import scipy.optimize
from click.testing import CliRunner

from builder.cli import main

SHOP = """\
site_title: Hand-check shop (invented)
families: [HC-1]
display_units: metric
effort_band: {low: 50 N, high: 250 N}
min_travel_margin: 5 %
latest_release_point: 97 %
default_efficiency: 80 %
hose_expansion:
  rubber:
    - [1000 psi, 0.66 cc/ft]
    - [1500 psi, 0.79 cc/ft]
  braided_ptfe: 0 mL/m/MPa
  steel: 0 mL/m/MPa
fluid_bulk_modulus: {DOT 3: 1.7 GPa, DOT 4: 1.7 GPa, DOT 5: 1.0 GPa, DOT 5.1: 1.7 GPa}
line_bore: 3 mm
master_dead_stroke: 1.5 mm
pushrod_free_play: 1 mm
"""

COMMON = """\
status: draft
gearbox: {family: HC-1, fork_tip_moves: rearward}
fork: {pivot_to_slave: 140 mm, pivot_to_bearing: 70 mm}
master: {bore: 19 mm, stroke: 32 mm}
"""

BUILDS = {
    # A: dead stroke and free play from the shop, lever pedal 280 / 50 mm (R_p = 5.6).
    "HC-0001": COMMON + """\
clutch: {release_load: 1800 N, release_travel: 7.5 mm, clearance: 1.2 mm}
slave: {kind: external, bore: 22 mm, stroke: 30 mm}
line: {length: 1000 mm, hose: steel, fluid: DOT 4}
pedal: {pivot_to_pad: 280 mm, pivot_to_clevis: 50 mm, pad_travel: 150 mm}
""",
    # B: a pull slave, 400 mm of rubber hose, silicone fluid, its own dead stroke and play.
    "HC-0002": COMMON.replace("stroke: 32 mm}", "stroke: 32 mm, dead_stroke: 2 mm}") + """\
clutch: {release_load: 1800 N, release_travel: 7.5 mm, clearance: 1.2 mm}
slave: {kind: external, acts: pull, bore: 7/8 in, rod_diameter: 0.3 in, stroke: 30 mm}
line: {length: 1000 mm, hose_length: 400 mm, hose: rubber, fluid: DOT 5}
pedal: {pivot_to_pad: 280 mm, pivot_to_clevis: 50 mm, pad_travel: 150 mm, free_play: 0.5 mm}
""",
    # C: a load curve (from first contact) and a bare pedal force, no release_load.
    "HC-0003": COMMON + """\
clutch:
  release_travel: 7.5 mm
  clearance: 1.2 mm
  load_curve: [[0 mm, 0 N], [3 mm, 1700 N], [5 mm, 1850 N], [7.5 mm, 1500 N]]
slave: {kind: external, bore: 22 mm, stroke: 30 mm}
line: {length: 1000 mm, hose: steel, fluid: DOT 4}
pedal:
  pivot_to_pad: 280 mm
  pivot_to_clevis: 50 mm
  pad_travel: 150 mm
  bare_effort: [[0 mm, 20 N], [150 mm, -10 N]]
""",
    # D: the master at an angle: bore axis along +x through a seat 20 mm above the clevis.
    "HC-0004": COMMON + """\
clutch: {release_load: 1800 N, release_travel: 7.5 mm, clearance: 1.2 mm}
slave: {kind: external, bore: 22 mm, stroke: 30 mm}
line: {length: 1000 mm, hose: steel, fluid: DOT 4}
pedal:
  pad_travel: 156.4 mm
  layout:
    pivot: [0 mm, 0 mm]
    pad: [0 mm, -280 mm]
    clevis: [0 mm, -50 mm]
    pushrod_seat: [140 mm, -30 mm]
    rotation_to_stop: 32 deg
    bore_axis: 0 deg
""",
    # E: a concentric slave with a 200 N internal spring (clearance taken as zero).
    "HC-0005": """\
status: draft
gearbox: {family: HC-1, fork_tip_moves: none}
master: {bore: 19 mm, stroke: 32 mm}
clutch: {release_load: 1900 N, release_travel: 7 mm, clearance: 1.2 mm}
slave: {kind: concentric, piston_area: 700 mm^2, stroke: 16 mm, preload: 200 N}
line: {length: 1000 mm, hose: steel, fluid: DOT 4}
pedal: {pivot_to_pad: 280 mm, pivot_to_clevis: 50 mm, pad_travel: 150 mm}
""",
}


@pytest.fixture(scope="module")
def checked(tmp_path_factory) -> dict[str, dict]:
    root = tmp_path_factory.mktemp("hand") / "records"
    (root / "parts").mkdir(parents=True)
    (root / "builds").mkdir()
    (root / "shop.yaml").write_text(SHOP)
    for kind in ("gearboxes", "clutches", "masters", "slaves", "pedals"):
        (root / "parts" / f"{kind}.yaml").write_text(f"kind: {kind}\nparts: []\n")
    found = {}
    for build_id, body in BUILDS.items():
        path = root / "builds" / f"{build_id}.yaml"
        path.write_text(f"id: {build_id}\n" + body)
        result = CliRunner().invoke(main, ["--records", str(root), "check", str(path), "--json"])
        assert result.exit_code == 0, result.output
        found[build_id] = json.loads(result.output)
    return found


def close(value: float, expected: float) -> bool:
    return value == pytest.approx(expected, rel=0.005)


def test_dead_stroke_and_free_play_by_hand(checked):
    # A_m = pi/4 19^2 = 283.529 mm^2, A_s = pi/4 22^2 = 380.133 mm^2, R_h = 1.34072,
    # R_f = 140/70 = 2, R_p = 280/50 = 5.6.
    # p = 1800 / 2 / 380.133e-6 = 2367.59 kPa; fluid V = 7068.6 (line) + 9072.9 (master)
    # + 11404.0 (slave) = 27545.5 mm^3; dV = 27545.5 * 2.36759 / 1700 = 38.363 mm^3.
    # needed bearing 8.7 mm: V = 380.133 * 8.7 * 2 + 38.363 = 6652.67 mm^3;
    # pushrod 6652.67 / 283.529 + 1.5 + 1 = 25.964 mm -> pad 5.6 * 25.964 = 145.40 mm,
    # release point 145.40 / 150 = 96.93 %.
    # At the stop: pushrod 150 / 5.6 = 26.786 mm, piston 25.786 mm, pushed
    # 283.529 * (25.786 - 1.5) = 6885.70 mm^3; slave (6885.70 - 38.36) / 380.133 = 18.013 mm;
    # bearing 9.0065 mm; margin 9.0065 / 8.7 - 1 = +3.52 %. Lost pad travel 5.6 * 2.5 = 14 mm.
    # Effort 1800 / (5.6 * 1.34072 * 2) = 119.87 N ideal, / 0.8 = 149.84 N; worst-case
    # pressure 2367.59 / 0.8 = 2959.5 kPa. The master pushes 283.529 * 30.5 = 8.6476 mL.
    d = checked["HC-0001"]
    assert close(d["travel"]["lost_pad_travel_mm"], 14.0)
    assert close(d["travel"]["master_stroke_used_mm"], 25.786)
    assert close(d["travel"]["slave_mm"], 18.013)
    assert close(d["travel"]["bearing_mm"], 9.0065)
    assert d["travel"]["margin_pct"] == pytest.approx(3.52, abs=0.05)
    assert close(d["travel"]["release_point_pct"], 96.93)
    assert d["volume"]["losses_ml"] == pytest.approx(0.038363, abs=5e-4)  # JSON keeps 3 decimals
    assert close(d["volume"]["needed_ml"], 6.65267)
    assert close(d["volume"]["master_swept_ml"], 8.6476)
    assert close(d["pressure_kPa"], 2367.59) and close(d["pressure_worst_kPa"], 2959.5)
    assert close(d["effort"]["ideal_N"], 119.87) and close(d["effort"]["computed_N"], 149.84)
    assert "travel-short" in {f["code"] for f in d["flags"]}  # +3.5 % against the shop's 5 %


def test_pull_slave_with_a_rubber_hose_in_silicone_by_hand(checked):
    # A_s = pi/4 (0.875^2 - 0.3^2) in^2 = 0.530635 in^2 = 342.344 mm^2; R_h = 1.207441.
    # p = 1800 / 2 / 342.344e-6 = 2628.93 kPa = 381.29 psi: below the first point, so the
    # hose swells 0.66 cc/ft * 381.29 / 1000 = 0.25165 cc/ft = 0.82564 mL/m; 0.4 m of it
    # takes 330.26 mm^3. Fluid V = 7068.6 + 9072.9 + 342.344 * 30 = 26411.8 mm^3, in
    # silicone dV = 26411.8 * 2.62893 / 1000 = 69.435 mm^3. Losses 399.69 mm^3.
    # Needed V = 342.344 * 8.7 * 2 + 399.69 = 6356.48 mm^3; pushrod 6356.48 / 283.529 + 2
    # + 0.5 = 24.919 mm; pad 139.55 mm; release point 93.03 %.
    # At the stop: piston 26.786 - 0.5 = 26.286 mm, pushed 283.529 * 24.286 = 6885.70 mm^3;
    # slave (6885.70 - 399.69) / 342.344 = 18.946 mm; bearing 9.4729 mm; margin +8.88 %.
    # Effort 1800 / (5.6 * 1.207441 * 2) = 133.10 N ideal, 166.38 N at 80 %.
    d = checked["HC-0002"]
    assert close(d["volume"]["losses_ml"], 0.39969)
    assert close(d["travel"]["slave_mm"], 18.946)
    assert d["travel"]["margin_pct"] == pytest.approx(8.88, abs=0.05)
    assert close(d["travel"]["release_point_pct"], 93.03)
    assert close(d["pressure_kPa"], 2628.93)
    assert close(d["effort"]["ideal_N"], 133.10) and close(d["effort"]["computed_N"], 166.38)
    assert close(d["ratios"]["hydraulic"], 1.207441)


def test_load_curve_and_bare_pedal_force_by_hand(checked):
    # With a lever and losses proportional to the load, the pad force is straight between
    # the curve's points, so its peak is at one of them. At each, bearing x_b = 1.2 + x mm,
    # p = F / 2 / 380.133 mm^2, dV = 27545.5 mm^3 * p / 1.7 GPa, pushrod
    # (380.133 * x_b * 2 + dV) / 283.529 + 2.5 mm, pad 5.6 * pushrod, bare force
    # 20 - 30 * pad / 150 N, F = load / (5.6 * 1.34072 * 2) + bare:
    #   x = 3 mm:   dV 36.231, pushrod 13.890 mm, pad  77.78 mm: 113.212 + 4.443  = 117.656 N
    #   x = 5 mm:   dV 39.428, pushrod 19.264 mm, pad 107.88 mm: 123.201 - 1.576  = 121.626 N
    #   x = 7.5 mm: dV 31.969, pushrod 25.941 mm, pad 145.27 mm:  99.893 - 9.054  =  90.839 N
    # Peak 121.63 N at 107.9 mm of pad travel; 152.03 N at 80 %. The release load is the
    # curve's peak, 1850 N: p = 2433.36 kPa.
    d = checked["HC-0003"]
    assert close(d["effort"]["ideal_N"], 121.626)
    assert close(d["effort"]["computed_N"], 121.626 / 0.8)
    assert close(d["pressure_kPa"], 2433.36)
    assert close(d["ratios"]["pedal"], 5.6)


def test_master_at_an_angle_by_hand(checked):
    # Norton's offset slider-crank: crank 50 mm straight down, pushrod l = sqrt(140^2 + 20^2)
    # = 141.421 mm to a seat on the line y = -30 mm (the bore axis, 0 deg); at rest the
    # pushrod is asin(20 / 141.421) = 8.13 deg off the axis. Turning by phi:
    # x(phi) = 50 sin(phi) + sqrt(l^2 - (30 - 50 cos(phi))^2), s = x(phi) - 140 mm.
    # The release needs the same pushrod travel as build A, 25.964 mm: phi = 30.213 deg,
    # ds/dphi = 45.568 mm/rad, R_p = 280 / 45.568 = 6.1446; pad 280 * 0.52731 = 147.65 mm of
    # 280 * 32 deg = 156.38 mm: 94.42 %. Effort 1800 / (6.1446 * 1.34072 * 2) = 109.25 N.
    # At the stop: s = 27.372 mm, piston 26.372, bearing 9.2253 mm, margin +6.04 %.
    l = math.hypot(140.0, 20.0)

    def travel(phi):
        return 50 * math.sin(phi) + math.sqrt(l * l - (30 - 50 * math.cos(phi)) ** 2) - 140.0

    phi = scipy.optimize.brentq(lambda t: travel(t) - 25.9638, 0.0, math.radians(32))
    assert math.degrees(phi) == pytest.approx(30.213, abs=1e-3)
    ratio = 280 / ((travel(phi + 1e-7) - travel(phi - 1e-7)) / 2e-7)
    assert ratio == pytest.approx(6.1446, rel=1e-4)
    d = checked["HC-0004"]
    assert close(d["travel"]["release_point_pct"], 94.42)
    assert close(d["effort"]["ideal_N"], 109.25)
    assert close(d["ratios"]["pedal"], 6.1446)
    assert close(d["travel"]["bearing_mm"], 9.2253)
    assert close(d["travel"]["lost_pad_travel_mm"], 13.956)  # s(phi) = 2.5 mm at 2.856 deg
    offaxis = next(f for f in d["flags"] if f["code"] == "pushrod-off-axis")
    assert math.degrees(offaxis["values"]["angle"]) >= 8.13


def test_concentric_preload_by_hand(checked):
    # The spring holds the bearing on the fingers: needed travel is the release travel,
    # 7 mm, and the fluid carries 1900 - 200 = 1700 N: p = 1700 / 700e-6 = 2428.57 kPa.
    # R_h = 700 / 283.529 = 2.46888; effort 1700 / (5.6 * 2.46888) = 122.96 N, 153.70 N at
    # 80 %. Fluid 7068.6 + 9072.9 + 700 * 16 = 27341.5 mm^3, dV = 39.059 mm^3; needed
    # 700 * 7 + 39.059 = 4939.06 mm^3, pushrod 19.920 mm, pad 111.55 mm: 74.37 %.
    # At the stop: (6885.70 - 39.06) / 700 = 9.7809 mm, margin +39.73 %.
    d = checked["HC-0005"]
    assert close(d["travel"]["needed_bearing_mm"], 7.0)
    assert close(d["pressure_kPa"], 2428.57)
    assert close(d["effort"]["ideal_N"], 122.96)
    assert close(d["travel"]["release_point_pct"], 74.37)
    assert close(d["travel"]["bearing_mm"], 9.7809)
