"""`fitment suggest` and the verdict of `fitment check`, end to end on files: a small fixed
shop with exact output, the demo shop, exit codes and the JSON rows.

Outside references for the figures in the exact output, derived by hand in
`test_the_exact_figures_follow_from_the_textbook_relations`: lever ratio (Shigley's
Mechanical Engineering Design), Pascal's principle and p = F / A (OpenStax College Physics),
the bulk modulus dV = V p / K (OpenStax, "Stress, Strain and Elastic Modulus"), 1 in =
0.0254 m and 1 lbf = 4.4482216152605 N (NIST SP 811, appendix B). All codes are invented.
"""
from __future__ import annotations

import json
import math
from pathlib import Path

import pytest
from click.testing import CliRunner

from builder.cli import main
from demo_proposals import DEMO_PROPOSALS

ROOT = Path(__file__).resolve().parents[1]
DEMO = ROOT / "records"

# Row 3's release point is on the pad travel the pedal really has: the master bottoms 0.304 in
# before the 7 in stop, so 4.242 in to release is 4.242 / 6.696 = 63.3 % (by hand).
# A small invented shop: two catalogue masters and slaves, one verified build (MC-110 with
# SC-210) and one rejected (MC-120 with SC-210, "dragged when hot"); the hoses do not swell
# and the fluid is stiff (10 GPa), so the hand derivation below stays short.
SMALL_SHOP = {
    "builds/ZZ-0101.yaml": """\
id: ZZ-0101
status: verified
gearbox:
  family: ZZ-9
  fork_tip_moves: rearward
clutch:
  release_load: 400 lbf
  release_travel: 0.30 in
  clearance: 0.05 in
fork:
  pivot_to_slave: 5.6 in
  pivot_to_bearing: 2.8 in
master:
  part: MC-110
slave:
  part: SC-210
line:
  length: 36 in
  hose: braided_ptfe
  fluid: DOT 4
pedal:
  pivot_to_pad: 11 in
  pivot_to_clevis: 2 in
  pad_travel: 7 in
measured:
  pedal_effort: 31 lbf
outcome: full release, light pedal
""",
    "builds/ZZ-0102.yaml": """\
id: ZZ-0102
status: rejected
gearbox:
  family: ZZ-9
  fork_tip_moves: rearward
clutch:
  release_load: 400 lbf
  release_travel: 0.30 in
  clearance: 0.05 in
fork:
  pivot_to_slave: 5.6 in
  pivot_to_bearing: 2.8 in
master:
  part: MC-120
slave:
  part: SC-210
line:
  length: 36 in
  hose: braided_ptfe
  fluid: DOT 4
pedal:
  pivot_to_pad: 11 in
  pivot_to_clevis: 2 in
  pad_travel: 7 in
measured:
  pedal_effort: 28 lbf
outcome: dragged when hot
""",
    "parts/masters.yaml": """\
kind: masters
parts:
  - id: MC-110
    label: invented 1 in master
    bore: 1 in
    stroke: 1.40 in
  - id: MC-120
    label: invented 15/16 in master
    bore: 15/16 in
    stroke: 1.40 in
    rated_pressure: 1200 psi
""",
    "parts/slaves.yaml": """\
kind: slaves
parts:
  - id: SC-210
    label: invented 1-1/8 in slave
    kind: external
    bore: 1-1/8 in
    stroke: 1.25 in
    rated_pressure: 1000 psi
  - id: SC-220
    label: invented 1/2 in slave
    kind: external
    bore: 1/2 in
    stroke: 1.0 in
""",
    "shop.yaml": """\
site_title: Small invented shop
families: [ZZ-9]
display_units: imperial
effort_band:
  low: 15 lbf
  high: 45 lbf
min_travel_margin: 10 %
latest_release_point: 85 %
default_efficiency: 85 %
hose_expansion:
  rubber: 0 mL/m/MPa
  braided_ptfe: 0 mL/m/MPa
  steel: 0 mL/m/MPa
fluid_bulk_modulus: 10 GPa
master_dead_stroke: 0 mm      # the figures below are worked by hand without lost travel
pushrod_free_play: 0 mm
""",
}

PROPOSAL = """\
id: PR-0001
status: draft
gearbox:
  family: ZZ-9
  fork_tip_moves: rearward
clutch:
  release_load: 400 lbf
  release_travel: 0.30 in
  clearance: 0.05 in
fork:
  pivot_to_slave: 5.6 in
  pivot_to_bearing: 2.8 in
master:
  bore: 5/8 in
  stroke: 1.40 in
slave:
  kind: external
  bore: 7/8 in
  stroke: 1.25 in
line:
  length: 36 in
  hose: braided_ptfe
  fluid: DOT 4
pedal:
  pivot_to_pad: 11 in
  pivot_to_clevis: 2 in
  pad_travel: 7 in
  clevis_positions: [2.3 in]
"""

SUGGEST_TOP_3 = """\
Suggestions for PR-0001: gearbox ZZ-9, fork tip rearward, external slave; catalogue parts

As proposed
    effort 21.8 lbf (97.1 N) at the shop default efficiency: not enough history (1 build)
    margin -7.3 %; never fully releases
    worst-case pressure 391 psi (2698 kPa), no rating given
    evidence: none yet
    misses: travel-short: margin -7.3 % is under the shop's 10.0 %; release-late: the clutch never fully releases

Tried 3 masters x 3 slaves x 2 clevis holes: 18 combinations, 2 meet the shop's rules; target effort 30 lbf (133.4 N).

 1. master MC-110: 1 in (25.4 mm) bore instead of 0.625 in (15.9 mm); slave SC-210: 1.125 in (28.6 mm) bore instead of 0.875 in (22.2 mm)  <- recommended
    effort 33.8 lbf (150.4 N) at the shop default efficiency: not enough history (1 build)
    margin +43.6 %; release at 69.6 % of pad travel
    worst-case pressure 237 psi (1632 kPa), headroom +322.5 % to the lowest rating
    evidence: ZZ-0101
 2. master MC-120: 0.938 in (23.8 mm) bore instead of 0.625 in (15.9 mm); slave SC-210: 1.125 in (28.6 mm) bore instead of 0.875 in (22.2 mm)
    effort 29.7 lbf (132.2 N) at the shop default efficiency: not enough history (1 build)
    margin +26.2 %; release at 79.2 % of pad travel
    worst-case pressure 237 psi (1632 kPa), headroom +322.5 % to the lowest rating
    evidence: none yet
    warning, rejected before: ZZ-0102 (rejected): dragged when hot
 3. master MC-110: 1 in (25.4 mm) bore instead of 0.625 in (15.9 mm); slave SC-210: 1.125 in (28.6 mm) bore instead of 0.875 in (22.2 mm); clevis hole 2.3 in (58.4 mm) from the pivot instead of 2 in (50.8 mm)
    effort 38.9 lbf (172.9 N) at the shop default efficiency: not enough history (1 build)
    margin +58.0 %; release at 63.3 % of pad travel
    worst-case pressure 237 psi (1632 kPa), headroom +322.5 % to the lowest rating
    evidence: ZZ-0101
    misses: master-bottoms-early: the master bottoms 0.304 in (7.7 mm) before the pedal stop

One 1/16 in (1.6 mm) step up in bore, as proposed: master effort +4.6 lbf (+20.4 N), margin +19.5 points; slave effort -2.8 lbf (-12.5 N), margin -11.9 points.

Caution: clutch hydraulics run at several hundred psi; brake fluid is toxic, strips paint and takes up water; a clutch that does not fully release can let a car creep. Follow the component makers' specifications, local vehicle codes and licensed practice.
"""


def write_shop(tmp_path: Path) -> tuple[Path, Path]:
    records = tmp_path / "records"
    for name, text in SMALL_SHOP.items():
        path = records / name
        path.parent.mkdir(parents=True, exist_ok=True)
        path.write_text(text, encoding="utf-8")
    proposal = tmp_path / "proposal.yaml"
    proposal.write_text(PROPOSAL, encoding="utf-8")
    return records, proposal


def run(records: Path, *args: str):
    return CliRunner().invoke(main, ["--records", str(records), *args], catch_exceptions=False)


@pytest.fixture
def small(tmp_path: Path) -> tuple[Path, Path]:
    return write_shop(tmp_path)


def test_suggest_text_on_a_small_fixed_shop_is_exact(small):
    records, proposal = small
    result = run(records, "suggest", str(proposal), "--top", "3")
    assert result.exit_code == 0, result.output
    assert result.output == SUGGEST_TOP_3


def figures(master: float, slave: float) -> tuple[float, float, float, float]:
    """(effort lbf, margin, release point, worst-case pressure psi) of the small shop's
    proposal with a `master` and `slave` bore (in), by hand in inches."""
    pedal, fork, needed, load, efficiency = 11 / 2, 5.6 / 2.8, 0.30 + 0.05, 400.0, 0.85
    line_volume = 36 * math.pi / 4 * (3.2 / 25.4) ** 2  # in^3, the shop's default 3.2 mm bore
    bulk_psi = 10e9 / 6894.757293168  # 10 GPa
    area_m, area_s = math.pi / 4 * master**2, math.pi / 4 * slave**2
    effort = load / (pedal * (area_s / area_m) * fork) / efficiency
    pressure = load / fork / area_s  # psi
    fluid = line_volume + area_m * 1.40 + area_s * 1.25
    lost = fluid * pressure / bulk_psi  # in^3, compression of the fluid
    stroke = 7 / pedal  # the master does not bottom (1.27 in of 1.40 in)
    margin = (area_m * stroke - lost) / area_s / fork / needed - 1
    release = (needed * fork * area_s + lost) / area_m * pedal / 7
    return effort, margin, release, pressure / efficiency


def test_the_exact_figures_follow_from_the_textbook_relations():
    """The proposal and the recommended row of SUGGEST_TOP_3, derived by hand in inches."""
    effort, margin, _, worst = figures(0.625, 0.875)
    assert f"effort {effort:.1f} lbf" in SUGGEST_TOP_3 and f"margin {100 * margin:+.1f} %" in SUGGEST_TOP_3
    assert f"worst-case pressure {worst:.0f} psi" in SUGGEST_TOP_3
    effort, margin, release, worst = figures(1.0, 1.125)
    recommended = SUGGEST_TOP_3.split(" 1. ")[1].split(" 2. ")[0]
    assert f"effort {effort:.1f} lbf ({effort * 4.4482216152605:.1f} N)" in recommended
    assert f"margin {100 * margin:+.1f} %; release at {100 * release:.1f} % of pad travel" in recommended
    assert f"headroom {100 * (1000 / worst - 1):+.1f} % to the lowest rating" in recommended


def test_suggest_json_rows_have_every_key_and_nulls(small):
    records, proposal = small
    result = run(records, "suggest", str(proposal), "--json", "--top", "4")
    assert result.exit_code == 0, result.output
    data = json.loads(result.output)
    assert set(data) == {"id", "sizes", "target_effort_N", "tried", "combinations", "qualifying",
                         "unsizable", "nothing_qualifies", "proposal", "suggestions", "sensitivity"}
    rows = data["suggestions"]
    assert [row["rank"] for row in rows] == [1, 2, 3, 4]
    keys = set(rows[0])
    assert all(set(row) == keys for row in rows + [data["proposal"]])
    assert rows[0]["recommended"] and not any(row["recommended"] for row in rows[1:])
    assert rows[0]["master"]["part"] == "MC-110" and rows[0]["slave"]["part"] == "SC-210"
    assert rows[0]["evidence"] == ["ZZ-0101"]
    assert rows[1]["rejected_before"] == [{"id": "ZZ-0102", "outcome": "dragged when hot",
                                           "flags": []}]
    assert rows[0]["effort"]["interval_N"] is None  # present, null: not enough history
    assert data["proposal"]["release_point_pct"] is None
    assert data["proposal"]["rank"] is None
    assert [item["what"] for item in data["sensitivity"]] == ["master", "slave"]
    # Percentages in the JSON, by hand: headroom to SC-210's 1000 psi rating is
    # 1000 / worst - 1; one 1/16 in step up in master bore moves the margin by the difference
    # of the two hand-worked margins, in percentage points.
    *_, worst = figures(1.0, 1.125)
    assert rows[0]["pressure_headroom_pct"] == pytest.approx(100 * (1000 / worst - 1), abs=0.01)
    _, stepped, _, _ = figures(0.625 + 1 / 16, 0.875)
    _, proposed, _, _ = figures(0.625, 0.875)
    assert data["sensitivity"][0]["margin_change_pct"] == pytest.approx(
        100 * (stepped - proposed), abs=0.01)


def test_check_on_a_failing_proposal_exits_3_with_a_verdict_and_three_suggestions(small):
    records, proposal = small
    result = run(records, "check", str(proposal))
    assert result.exit_code == 3, result.output
    lines = result.output.splitlines()
    assert lines[0] == "Not ready to order: travel-short."
    assert "Best 3 of 18 catalogue combinations (2 meet the shop's rules; `fitment suggest` lists more):" in lines
    suggested = SUGGEST_TOP_3.split(" 1. ")[1].split("\n\nOne 1/16 in")[0]
    assert " 1. " + suggested in result.output  # the same rows as suggest
    assert "makers' specifications" in result.output
    as_json = run(records, "check", str(proposal), "--json")
    assert as_json.exit_code == 3
    data = json.loads(as_json.output)
    assert data["verdict"] == "not_ready"
    rows = json.loads(run(records, "suggest", str(proposal), "--json", "--top", "3").output)
    assert data["suggestions"] == rows["suggestions"]


def test_check_exit_codes(small, tmp_path):
    records, proposal = small
    assert run(records, "check", "ZZ-0101").exit_code == 0  # ready
    bad = tmp_path / "bad.yaml"
    bad.write_text(PROPOSAL.replace("bore: 5/8 in", "bore: 5/8 lbf"), encoding="utf-8")
    assert run(records, "check", str(bad)).exit_code == 1  # invalid input
    assert run(records, "check", str(proposal), "--similar", "-1").exit_code == 2  # usage
    assert run(records, "suggest", str(proposal), "--sizes", "huge").exit_code == 2


def test_a_rejected_combination_is_a_warning_in_check(small):
    records, _ = small
    result = run(records, "check", str(records / "builds" / "ZZ-0101.yaml"))
    assert result.output.startswith("Ready to order.\n")
    text = (records / "builds" / "ZZ-0101.yaml").read_text().replace("MC-110", "MC-120")
    proposal = records.parent / "again.yaml"
    proposal.write_text(text.replace("id: ZZ-0101", "id: PR-0002"), encoding="utf-8")
    result = run(records, "check", str(proposal))
    assert result.exit_code == 0, result.output
    assert result.output.startswith("Ready to order, with warnings: rejected-combination.\n")
    assert "  ZZ-0102 (rejected): dragged when hot" in result.output
    data = json.loads(run(records, "check", str(proposal), "--json").output)
    assert data["verdict"] == "warnings" and data["suggestions"] == []
    assert data["rejected_before"] == [{"id": "ZZ-0102", "outcome": "dragged when hot", "flags": []}]


def test_a_rejected_build_is_not_its_own_warning(small):
    # "rejected before" means another build: ZZ-0102 is the only rejected MC-120 with SC-210,
    # so checking ZZ-0102 itself finds no other and no flag fires.
    records, _ = small
    result = run(records, "check", "ZZ-0102")
    assert result.exit_code == 0, result.output
    assert result.output.startswith("Ready to order.\n")
    assert json.loads(run(records, "check", "ZZ-0102", "--json").output)["rejected_before"] == []


def test_a_file_named_like_a_recorded_build_is_sized_from_its_own_text(small, tmp_path):
    # A copy of ZZ-0101 outside the records, changed to MC-120: the file is what is checked,
    # so the rejected ZZ-0102 (MC-120 with SC-210) shows, unlike for the recorded ZZ-0101.
    records, _ = small
    copy = tmp_path / "ZZ-0101.yaml"
    copy.write_text((records / "builds" / "ZZ-0101.yaml").read_text().replace("MC-110", "MC-120"),
                    encoding="utf-8")
    result = run(records, "check", str(copy))
    assert result.exit_code == 0, result.output
    assert result.output.startswith("Ready to order, with warnings: rejected-combination.\n")
    assert "  ZZ-0102 (rejected): dragged when hot" in result.output


def test_check_finds_a_recorded_build_by_its_id():
    by_id = run(DEMO, "check", "HW-0142", "--json")
    by_path = run(DEMO, "check", str(next(DEMO.rglob("HW-0142.yaml"))), "--json")
    assert by_id.exit_code == by_path.exit_code == 0
    assert json.loads(by_id.output) == json.loads(by_path.output)
    missing = run(DEMO, "check", "HW-0999")
    assert missing.exit_code == 1
    assert "HW-0999:0:0: id: no build HW-0999 in the records and no such file" in missing.output


def test_help_documents_the_exit_status():
    text = run(DEMO, "check", "--help").output
    assert "3 not ready" in text and "1 invalid input" in text and "2 usage" in text
    assert "--sizes [catalogue|standard]" in run(DEMO, "suggest", "--help").output


# --- the demo shop --------------------------------------------------------------------------

DEMO_PROPOSAL = DEMO_PROPOSALS["lever"]


def test_a_failing_demo_proposal_gets_an_order_ready_alternative(tmp_path):
    proposal = tmp_path / "proposal.yaml"
    proposal.write_text(DEMO_PROPOSAL, encoding="utf-8")
    checked = run(DEMO, "check", str(proposal), "--json")
    assert checked.exit_code == 3
    data = json.loads(checked.output)
    assert {"travel-short", "master-volume-short"} <= {f["code"] for f in data["flags"]}
    best = data["suggestions"][0]
    assert best["recommended"] and best["qualifies"] and best["in_catalogue"]
    assert best["effort"]["interval_N"] is not None  # the JH-5R history gives an interval
    # the recommendation, written out as a proposal, is ready to order
    fixed = DEMO_PROPOSAL
    for change in best["changes"]:
        if change["what"] == "master":
            fixed = fixed.replace("  bore: 5/8 in\n  stroke: 1.0 in\n  rated_pressure: 1200 psi\n",
                                  f"  part: {change['part']}\n")
        elif change["what"] == "slave":
            fixed = fixed.replace("  bore: 1 in\n  stroke: 1.0 in\n  rated_pressure: 1000 psi\n",
                                  f"  part: {change['part']}\n")
        else:
            fixed = fixed.replace("pivot_to_clevis: 2.0 in", f"pivot_to_clevis: {change['value']} mm")
    proposal.write_text(fixed, encoding="utf-8")
    again = run(DEMO, "check", str(proposal), "--json")
    assert again.exit_code == 0, again.output
    assert json.loads(again.output)["verdict"] in ("ready", "warnings")


def test_record_text_in_suggest_output_is_terminal_safe(small):
    records, proposal = small
    rejected = records / "builds" / "ZZ-0102.yaml"
    rejected.write_text(rejected.read_text().replace(
        "outcome: dragged when hot", 'outcome: "dragged \\e[31mRED\\a"'), encoding="utf-8")
    result = run(records, "suggest", str(proposal))
    assert result.exit_code == 0, result.output
    assert "\x1b" not in result.output and "\x07" not in result.output
    assert "dragged \\x1b[31mRED\\x07" in result.output
    as_json = run(records, "suggest", str(proposal), "--json").output
    assert all(ch == "\n" or " " <= ch < "\x7f" for ch in as_json)  # ASCII with escapes
    assert json.loads(as_json)["suggestions"][1]["rejected_before"][0]["outcome"] == (
        "dragged \x1b[31mRED\x07")


def test_main_help_gives_the_exit_status():
    text = run(DEMO, "--help").output
    assert "3 when `check` finds" in text and "suggest" in text


def test_check_when_nothing_in_the_catalogue_qualifies(small):
    records, proposal = small
    proposal.write_text(PROPOSAL.replace("release_load: 400 lbf", "release_load: 1500 lbf"),
                        encoding="utf-8")
    result = run(records, "check", str(proposal))
    assert result.exit_code == 3, result.output
    assert "Nothing in the catalogue meets the shop's rules (`fitment suggest --sizes " \
           "standard` also tries sizes not in the catalogue); the 3 nearest misses:" in result.output
    data = json.loads(run(records, "check", str(proposal), "--json").output)
    assert len(data["suggestions"]) == 3
    assert all(not row["qualifies"] and row["misses"] and not row["recommended"]
               for row in data["suggestions"])


def test_similar_builds_of_the_demo_put_the_same_gearbox_and_direction_first(tmp_path):
    from builder.records import load_shop

    proposal = tmp_path / "proposal.yaml"
    proposal.write_text(DEMO_PROPOSAL.replace("  kind: external\n  bore: 1 in",
                                              "  kind: external\n  bore: 1.1 in"), encoding="utf-8")
    data = json.loads(run(DEMO, "check", str(proposal), "--json", "--similar", "20").output)
    builds = {b.id: b for b in load_shop(DEMO).builds}
    same = [(builds[item["id"]].gearbox.family, builds[item["id"]].gearbox.fork_tip_moves)
            == ("JH-5R", "rearward") for item in data["similar"]]
    assert same[0] and True in same and False in same
    assert same == sorted(same, reverse=True)  # no other family or direction above a JH-5R one
