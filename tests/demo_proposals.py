"""Invented proposals against the demo shop, shared by the suggestion tests and
tests/perf/bench_suggest.py (texts only, no tests).

Both are not ready as drawn (a 5/8 in master cannot move a 1 in slave far enough:
master-volume-short, travel-short), so `fitment check` exits 3 and `fitment suggest` has
work to do.
"""
from __future__ import annotations

_COMMON = """\
status: draft
vehicle: estate car, inline six (invented)
gearbox:
  family: JH-5R
  fork_tip_moves: rearward
clutch:
  release_load: 1.5 kN
  release_travel: 8 mm
  clearance: 1.5 mm
fork:
  pivot_to_slave: 150 mm
  pivot_to_bearing: 80 mm
master:
  bore: 5/8 in
  stroke: 1.0 in
  rated_pressure: 1200 psi
slave:
  kind: external
  bore: 1 in
  stroke: 1.0 in
  rated_pressure: 1000 psi
line:
  length: 30 in
  hose: braided_ptfe
  fluid: DOT 4
"""
DEMO_PROPOSALS = {
    "lever": "id: PR-0301\n" + _COMMON + """\
pedal:
  pivot_to_pad: 11 in
  pivot_to_clevis: 2.0 in
  pad_travel: 6 in
  clevis_positions: [1.75 in, 2.3 in]
""",
    "layout": "id: PR-0302\n" + _COMMON + """\
pedal:
  pad_travel: 152 mm
  clevis_positions: [48 mm, 58 mm]
  layout:
    pivot: [0 mm, 0 mm]
    pad: [-63.5 mm, -276.8 mm]
    clevis: [-12.1 mm, -50.5 mm]
    pushrod_seat: [122.2 mm, -51.0 mm]
    rotation_to_stop: 30.5 deg
    clevis_positions: [[-12 mm, -45 mm], [-13 mm, -60 mm]]
""",
}
