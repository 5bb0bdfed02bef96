"""Record fields `fitment suggest` reads: the pedal's other clevis holes and the shop's
target effort. Loading, located problems, and the site's input table.

Outside references: pint (the shared registry in tests/factories.py) for the SI values;
NIST SP 811 appendix B (1 in = 0.0254 m, 1 lbf = 4.4482216152605 N). All codes are invented.
"""
from __future__ import annotations

import pytest

from builder.problems import InputError
from builder.records import parse_build, parse_catalogue, parse_rules
from builder.site.pages import Display, section_rows
from factories import si

SHOP = """\
site_title: Test shop (invented)
families: [QX-5]
display_units: imperial
effort_band:
  low: 15 lbf
  high: 40 lbf
{target}min_travel_margin: 10 %
latest_release_point: 85 %
default_efficiency: 0.85
hose_expansion:
  rubber: 0.31 mL/m/MPa
  braided_ptfe: 0.05 mL/m/MPa
  steel: 0.005 mL/m/MPa
fluid_bulk_modulus: 1.7 GPa
"""

RULES = parse_rules(SHOP.format(target=""))

BUILD = """\
id: QA-0101
status: draft
gearbox:
  family: QX-5
  fork_tip_moves: rearward
clutch:
  release_load: 410 lbf
  release_travel: 0.32 in
  clearance: 0.06 in
fork:
  pivot_to_slave: 5.6 in
  pivot_to_bearing: 2.8 in
master:
  bore: 3/4 in
  stroke: 1.40 in
slave:
  kind: external
  bore: 7/8 in
  stroke: 1.10 in
line:
  length: 38 in
  hose: braided_ptfe
  fluid: DOT 4
pedal:
{pedal}"""

LEVER = """\
  pivot_to_pad: 11.25 in
  pivot_to_clevis: 2.10 in
  pad_travel: 6.0 in
  clevis_positions: {positions}
"""

LAYOUT = """\
  pad_travel: 150 mm
  layout:
    pivot: [0 mm, 0 mm]
    pad: [-60 mm, -285 mm]
    clevis: [-8 mm, -53 mm]
    pushrod_seat: [-140 mm, -48 mm]
    rotation_to_stop: 30 deg
    clevis_positions: {positions}
"""

PEDALS = {"pedals": """\
kind: pedals
parts:
  - id: PD-11
    pivot_to_pad: 11.25 in
    pivot_to_clevis: 2.10 in
    pad_travel: 6.0 in
    clevis_positions: [1.9 in]
"""}


def lever(positions: str) -> str:
    return BUILD.format(pedal=LEVER.format(positions=positions))


def layout(positions: str) -> str:
    return BUILD.format(pedal=LAYOUT.format(positions=positions))


def problems(text: str) -> list:
    with pytest.raises(InputError) as caught:
        parse_build(text, {}, "proposal.yaml", rules=RULES)
    return caught.value.problems


def test_clevis_positions_load_in_si():
    build = parse_build(lever("[1.9 in, 2.3 in]"), {}, "proposal.yaml", rules=RULES)
    assert build.pedal.clevis_positions == pytest.approx((si("1.9 in"), si("2.3 in")))
    assert build.pedal.clevis_positions[0] == pytest.approx(0.04826)  # 1.9 x 0.0254, NIST


def test_no_clevis_positions_is_none():
    text = BUILD.format(pedal=LEVER.replace("  clevis_positions: {positions}\n", ""))
    assert parse_build(text, {}, "proposal.yaml", rules=RULES).pedal.clevis_positions is None


def test_layout_clevis_points_load_in_si():
    build = parse_build(layout("[[-8 mm, -60 mm], [-0.3 in, -1.9 in]]"), {}, "p.yaml", rules=RULES)
    points = build.pedal.layout.clevis_positions
    assert points[0] == pytest.approx((si("-8 mm"), si("-60 mm")))
    assert points[1] == pytest.approx((si("-0.3 in"), si("-1.9 in")))


def test_a_catalogue_pedal_brings_its_clevis_positions_and_a_build_may_override_them():
    catalogue = parse_catalogue(PEDALS)
    base = BUILD.format(pedal="  part: PD-11\n")
    assert parse_build(base, catalogue, "p.yaml", rules=RULES).pedal.clevis_positions == pytest.approx(
        (si("1.9 in"),))
    changed = BUILD.format(pedal="  part: PD-11\n  clevis_positions: [2.3 in, 2.5 in]\n")
    assert parse_build(changed, catalogue, "p.yaml", rules=RULES).pedal.clevis_positions == pytest.approx(
        (si("2.3 in"), si("2.5 in")))


@pytest.mark.parametrize("positions, field, words", [
    ("[1.9 in, 5 kg]", "pedal.clevis_positions[1]", "expected a length"),
    ("[1.9 in, 40 in]", "pedal.clevis_positions[1]", "outside the plausible range"),
    ("2 in", "pedal.clevis_positions", "expected a list"),
    ("[]", "pedal.clevis_positions", "found 0 items"),
    ("[1 in, 1 in, 1 in, 1 in, 1 in, 1 in, 1 in, 1 in, 1 in]", "pedal.clevis_positions",
     "found 9 items"),
])
def test_bad_clevis_positions_are_located(positions, field, words):
    found = problems(lever(positions))
    assert [p.field for p in found] == [field]
    assert words in found[0].message
    assert found[0].line == 28  # the clevis_positions line of the record


@pytest.mark.parametrize("positions, field, words", [
    ("[[-8 mm, -60 lbf]]", "pedal.layout.clevis_positions[0][1]", "expected a length"),
    ("[[-8 mm]]", "pedal.layout.clevis_positions[0]", "found 1 items"),
    ("[[-140.5 mm, -48 mm]]", "pedal.layout.clevis_positions[0]", "within 1 mm of pushrod_seat"),
    ("[[0.2 mm, 0 mm]]", "pedal.layout.clevis_positions[0]", "within 1 mm of pivot"),
])
def test_bad_layout_clevis_points_are_located(positions, field, words):
    found = {p.field: p.message for p in problems(layout(positions))}
    assert words in found[field]  # (a layout the schema refuses also leaves the lengths missing)


def test_target_effort_loads_and_defaults_to_none():
    assert parse_rules(SHOP.format(target="")).target_effort is None
    rules = parse_rules(SHOP.format(target="target_effort: 30 lbf\n"))
    assert rules.target_effort == pytest.approx(si("30 lbf"))
    assert rules.target_effort == pytest.approx(30 * 4.4482216152605)  # NIST SP 811


def test_target_effort_outside_the_band_is_located():
    with pytest.raises(InputError) as caught:
        parse_rules(SHOP.format(target="target_effort: 45 lbf\n"))
    [problem] = caught.value.problems
    assert (problem.field, problem.line) == ("target_effort", 7)
    assert "inside the effort band" in problem.message


def test_the_site_input_table_shows_the_alternatives_in_both_systems():
    rules = parse_rules(SHOP.format(target=""))
    build = parse_build(layout("[[-8 mm, -60 mm]]").replace(
        "  pad_travel: 150 mm\n", "  pad_travel: 150 mm\n  clevis_positions: [2 in]\n"),
        {}, "p.yaml", rules=rules)
    rows = dict((label, value) for label, value in section_rows(build.pedal, Display(rules), "pedal"))
    # a no-break space keeps each number with its unit in a narrow table cell
    shown = {label: value.replace("\u00a0", " ") for label, value in rows.items()}
    assert shown["other clevis positions"] == "2 in (50.8 mm)" != rows["other clevis positions"]
    assert shown["layout other clevis points (x, y)"] == (
        r"\-0.315 in (-8 mm), \-2.362 in (-60 mm)")  # a leading minus is Markdown-escaped
