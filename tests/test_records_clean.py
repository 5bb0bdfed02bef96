"""Records that stay clean: gearbox families the shop knows, no template placeholders left,
common typing slips refused with what was probably meant, pedal lengths not swapped, and the
shop rules `families` and `publish`.

Outside references: ISO 80000-1:2009, 7.3.2 (the decimal sign is a comma or a point on the
line; digits may be grouped in threes with a small space, never a comma or a point) for the
two readings of "1,125"; NIST SP 811 (2008) 8.1 and Appendix B.8 (the pound, lb, is a unit of
mass; the pound-force, lbf, the unit of force; 1 in = 0.0254 m exactly) with the pint library
as the reference registry; the Unicode Standard's byte order mark U+FEFF (bytes FF FE at the
start of UTF-16LE text) with Python's own UTF-16 codec writing the file; the lever rule (a
lever's mechanical advantage is effort arm over load arm, any statics text, e.g. Meriam and
Kraige, Engineering Mechanics: Statics) for the pedal ratio. The demo shop's family codes and
ids are invented.
"""
from __future__ import annotations

import json
import re
from pathlib import Path

import pint
import pytest
from click.testing import CliRunner

from builder.cli import main
from samples import HW_0134
from builder.problems import PLACEHOLDER, InputError
from builder.records import load_rules, load_shop, validate_paths
from clitools import copy_demo_shop

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = "2025/HW-0134"  # a measured build: family BQ-4F, two pedal lengths, no layout
UREG = pint.UnitRegistry()
IN = 0.0254  # m, NIST SP 811 B.8


@pytest.fixture
def shop(tmp_path: Path) -> Path:
    """A private copy of the demo shop (records/ and schema/ beside it, as in a clone)."""
    copy_demo_shop(tmp_path)
    (tmp_path / "records" / "builds" / f"{SAMPLE}.yaml").write_text(HW_0134)
    return tmp_path / "records"


def sample(shop: Path) -> Path:
    return shop / "builds" / f"{SAMPLE}.yaml"


def edit(path: Path, old: str, new: str) -> str:
    text = path.read_text()
    assert old in text, old
    text = text.replace(old, new, 1)
    path.write_text(text)
    return text


def problems_in(shop: Path, path: Path) -> dict:
    return {problem.field: problem for problem in validate_paths(shop, [path])}


def line_of(text: str, marker: str) -> int:
    return next(n for n, line in enumerate(text.splitlines(), 1) if marker in line)


# --- gearbox families -----------------------------------------------------------------------

@pytest.mark.parametrize("written, nearest", [("BQ4F", "BQ-4F"), ("bq-4f", "BQ-4F"),
                                              ("BQ 4F", "BQ-4F")])
def test_a_family_the_shop_does_not_know_is_located_with_the_nearest_codes(shop, written, nearest):
    text = edit(sample(shop), "family: BQ-4F", f"family: {written}")
    problem = problems_in(shop, sample(shop))["gearbox.family"]
    assert (problem.line, problem.col) == (line_of(text, "family:"), 11)
    assert f"unknown gearbox family {written!r}; nearest: {nearest}" in problem.message
    assert "families" in problem.message  # says where a new family is declared


def test_a_family_declared_in_the_shop_rules_is_known(shop):
    edit(sample(shop), "family: BQ-4F", "family: NEW-9")
    assert "gearbox.family" in problems_in(shop, sample(shop))
    with (shop / "shop.yaml").open("a") as rules:
        rules.write("families: [NEW-9, 2002]\n")
    assert problems_in(shop, sample(shop)) == {}
    assert load_rules(shop).families == ("NEW-9", "2002")  # YAML's int 2002 read as text
    assert "NEW-9" in {b.gearbox.family for b in load_shop(shop).builds}


def test_catalogue_gearbox_families_need_no_declaration(shop):
    families = set(re.findall(r"family: (\S+)", (shop / "parts" / "gearboxes.yaml").read_text()))
    assert "BQ-4F" in families and load_rules(shop).families == ()
    assert validate_paths(shop) == []


# --- placeholders ---------------------------------------------------------------------------

@pytest.mark.parametrize("old, new, field", [
    ("technician: RL", "technician: XX", "technician"),
    ("vehicle: 1960s small sedan, inline four", "vehicle: describe the car generically", "vehicle"),
    ("family: BQ-4F", "family: FAMILY", "gearbox.family"),
    ("bracket: cast boss, spacer plate", "bracket: TBD", "slave.bracket"),
    ("outcome: releases cleanly; engagement in the middle of the pedal", "outcome: TODO", "outcome"),
    # numbers and choices left as the template writes them (`fitment new`)
    ("release_load: 305 lbf", "release_load: xx lbf", "clutch.release_load"),
    ("fork_tip_moves: forward", "fork_tip_moves: xx", "gearbox.fork_tip_moves"),
    ("hose: braided_ptfe", "hose: TBD", "line.hose"),
    ("pad_travel: 6.8 in", "pad_travel: ?? in", "pedal.pad_travel"),
])
def test_every_placeholder_left_in_a_record_is_located(shop, old, new, field):
    text = edit(sample(shop), old, new)
    problem = problems_in(shop, sample(shop))[field]
    assert problem.message.startswith("fill in the ")
    assert problem.code == PLACEHOLDER
    assert problem.line == line_of(text, new.split(": ")[1])


def test_a_placeholder_label_in_the_catalogue_is_located(shop):
    masters = shop / "parts" / "masters.yaml"
    text = masters.read_text()
    label = re.search(r"label: (.*)", text)[1]
    edit(masters, f"label: {label}", "label: XXX")
    found = validate_paths(shop, [masters])
    assert [p.code for p in found] == [PLACEHOLDER] and "fill in the label" in found[0].message


# --- typing slips, each with what was probably meant -----------------------------------------

# (the line as the demo has it, the slip, the field, the reading the message must offer)
SLIPS = [
    ("  pivot_to_slave: 5.0 in", "  pivot_to_slave: 5,0 in", "fork.pivot_to_slave", "5.0 in"),
    ("  bore: 0.811 in", "  bore: 20,6 mm", "master.bore", "20.6 mm"),
    ("  rated_pressure: 8 MPa\nslave:", "  rated_pressure: 1,200 psi\nslave:",
     "master.rated_pressure", "1200 psi"),
    ("  bore: 0.874 in", "  bore: 1,125 in", "slave.bore", "1.125 in"),
    ("  bore: 0.811 in", '  bore: 7/8"', "master.bore", "7/8 in"),
    ("  pad_travel: 6.8 in", "  pad_travel: 6-3/4''", "pedal.pad_travel", "6-3/4 in"),
    ("  release_load: 305 lbf", "  release_load: 305 lb", "clutch.release_load", "305 lbf"),
    ("  pedal_effort: 26.6 lbf", "  pedal_effort: 26.6 lbs", "measured.pedal_effort", "26.6 lbf"),
]


@pytest.mark.parametrize("old, slip, field, meant", SLIPS, ids=[s[1].strip() for s in SLIPS])
def test_each_slip_is_refused_with_what_was_probably_meant(shop, old, slip, field, meant):
    text = edit(sample(shop), old, slip)
    problem = problems_in(shop, sample(shop))[field]
    assert problem.line == line_of(text, slip.strip().split("\n")[0])
    offered = re.search(r"probably meant (.*?)(?: \(a decimal point|;|$)", problem.message)[1]
    assert offered == meant, problem.message
    # the reading offered is what the slip stands for, by the outside references
    value, unit = meant.rsplit(" ", 1)
    number = slip.split(": ")[1].split("\n")[0]
    if "," in number:  # ISO 80000-1: a comma is a decimal sign, or (wrongly) groups thousands
        readings = {float(number.split()[0].replace(",", ".")), float(number.split()[0].replace(",", ""))}
        assert float(value) in readings
    if unit == "lbf":  # NIST SP 811 8.1: lb is a mass (pint agrees); the force is lbf
        assert UREG.Quantity(1, number.split()[1]).dimensionality == UREG.kilogram.dimensionality
        assert UREG.Quantity(1, "lbf").to("N").magnitude == pytest.approx(4.4482216152605)


def test_of_two_comma_readings_only_the_plausible_one_is_offered(shop):
    # 1,125 in as a bore: 1.125 in (28.6 mm) is a bore, 1125 in (28.6 m) is not
    edit(sample(shop), "  bore: 0.874 in", "  bore: 1,125 in")
    message = problems_in(shop, sample(shop))["slave.bore"].message
    assert "probably meant 1.125 in (" in message and "1125 in" not in message
    # 1,200 psi as a rating: both readings are numbers, only 1200 psi (8.27 MPa) is plausible
    assert UREG.Quantity(1200, "psi").to("MPa").magnitude == pytest.approx(8.27, abs=0.01)


def test_a_utf16_file_is_refused_with_what_to_do(shop):
    path = sample(shop)
    path.write_text(path.read_text(), encoding="utf-16")  # Python's codec writes the BOM
    assert path.read_bytes()[:2] in (b"\xff\xfe", b"\xfe\xff")  # U+FEFF, the byte order mark
    (problem,) = validate_paths(shop, [path])
    assert (problem.line, problem.field) == (1, "file")
    assert "UTF-16" in problem.message and "save it again as UTF-8" in problem.message
    path.write_bytes(path.read_text(encoding="utf-16").encode("utf-16-le"))  # no BOM
    (problem,) = validate_paths(shop, [path])
    assert "UTF-16" in problem.message


def test_a_slip_in_a_proposal_ends_located_not_in_a_traceback(shop, tmp_path):
    proposal = tmp_path / "proposal.yaml"
    proposal.write_text(sample(shop).read_text().replace("id: HW-0134", "id: PR-0001")
                        .replace("  bore: 0.811 in", "  bore: 22,2 mm"))
    result = CliRunner().invoke(main, ["--records", str(shop), "check", str(proposal)])
    assert result.exit_code == 1
    assert re.search(rf"^{re.escape(str(proposal))}:\d+:9: master.bore: .*probably meant 22.2 mm",
                     result.output, re.M)
    assert "Traceback" not in result.output


# --- pedal lengths --------------------------------------------------------------------------

def test_swapped_pedal_lengths_are_a_problem_not_a_heavy_pedal(shop):
    # both lengths inside their plausible ranges, written the wrong way round
    text = sample(shop).read_text()
    swapped = (text.replace("pivot_to_pad: 11.46 in", "pivot_to_pad: 2.10 in")
               .replace("pivot_to_clevis: 1.88 in", "pivot_to_clevis: 11.25 in"))
    sample(shop).write_text(swapped)
    problem = problems_in(shop, sample(shop))["pedal.pivot_to_pad"]
    assert problem.line == line_of(swapped, "pivot_to_pad:")
    # lever rule: ratio = effort arm / load arm = 2.10 / 11.25
    assert f"{2.10 / 11.25:.2f} : 1" in problem.message and "swapped" in problem.message


def test_a_layout_with_the_pad_nearer_the_pivot_than_the_clevis_is_a_problem(shop):
    layout = ("  layout:\n    pivot: [0 mm, 0 mm]\n    pad: [-8 mm, -53 mm]\n"
              "    clevis: [-60 mm, -285 mm]\n    pushrod_seat: [-140 mm, -280 mm]\n"
              "    rotation_to_stop: 30 deg\n")
    text = edit(sample(shop), "  pushrod: clevis pin, adjustable rod\n",
                "  pushrod: clevis pin, adjustable rod\n" + layout)
    problem = problems_in(shop, sample(shop))["pedal.layout.pad"]
    assert problem.line == line_of(text, "pad: [-8 mm")
    pad, clevis = (8**2 + 53**2) ** 0.5, (60**2 + 285**2) ** 0.5  # mm, from the points
    assert f"{pad / clevis:.2f} : 1" in problem.message


def test_equal_or_longer_pad_arm_is_fine(shop):
    edit(sample(shop), "pivot_to_clevis: 1.88 in", "pivot_to_clevis: 11.46 in")  # ratio 1
    assert "pedal.pivot_to_pad" not in problems_in(shop, sample(shop))


# --- shop rules: publish ---------------------------------------------------------------------

def test_publish_rule_defaults_and_choices(shop):
    rules_file = shop / "shop.yaml"
    without = "".join(line for line in rules_file.read_text().splitlines(keepends=True)
                      if not line.startswith("publish:"))
    rules_file.write_text(without)
    assert load_rules(shop).publish == ("measured", "verified", "rejected")  # the default
    rules_file.write_text(without + "publish: [verified]\n")
    assert load_rules(shop).publish == ("verified",)
    rules_file.write_text(without + "publish: [verified, draft]\n")
    with pytest.raises(InputError) as error:
        load_rules(shop)
    (problem,) = error.value.problems
    assert problem.field == "publish[1]" and "expected one of measured, verified, rejected" in problem.message
    assert json.loads((ROOT / "schema" / "shop.schema.json").read_text())["properties"]["publish"]
