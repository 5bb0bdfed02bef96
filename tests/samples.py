"""Fixed records the tests edit, written over their demo namesakes so an edit never follows
the demo generator (no tests here). Invented data."""

# A measured build with every section written out: family BQ-4F, a fork, a load curve,
# inline master and slave (bores 0.811 in and 0.874 in), two pedal lengths, no layout.
HW_0134 = """\
# yaml-language-server: $schema=../../../schema/build.schema.json
id: HW-0134
date: 2025-02-02
status: measured
technician: RL
vehicle: 1960s small sedan, inline four
gearbox:
  family: BQ-4F
  variant: short tail
  fork_tip_moves: forward
clutch:
  release_load: 305 lbf       # bench-measured on the press
  release_travel: 0.26 in
  clearance: 0.06 in
  load_curve:
    - [0 in, 0 lbf]
    - [0.14 in, 265 lbf]
    - [0.22 in, 305 lbf]
    - [0.32 in, 244 lbf]
fork:
  pivot_to_slave: 5.0 in
  pivot_to_bearing: 2.4 in
master:
  bore: 0.811 in
  stroke: 1.18 in
  rated_pressure: 8 MPa
slave:
  kind: external
  bore: 0.874 in
  stroke: 1.18 in
  rated_pressure: 8 MPa
  bracket: cast boss, spacer plate
line:
  length: 50 in
  hose: braided_ptfe
  fluid: DOT 5.1
pedal:
  pivot_to_pad: 11.46 in
  pivot_to_clevis: 1.88 in
  pad_travel: 6.8 in
  pushrod: clevis pin, adjustable rod
measured:
  pedal_effort: 26.6 lbf
  slave_travel: 0.843 in
  pad_travel_to_release: 5.5 in
  floor_gap: 0 in
  method: spring gauge at pad centre, engine off; dial indicator on the slave rod
outcome: releases cleanly; engagement in the middle of the pedal
notes: |
  Bled from the slave end with a pressure bleeder.
"""
