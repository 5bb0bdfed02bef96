"""Hostile and broken input, end to end through the `fitment` command line.

Every bad input must end in exit 1 with located `path:line:col: field: message` lines and no
traceback; commands that read must never write; record text must reach a terminal inert.

Outside references: the YAML 1.1 spec (anchors and aliases, section 3.2.2.2; tabs are not
indentation, section 4.2.2; application tags such as !!python/object are refused by
PyYAML's safe loader, PyYAML documentation "Loading YAML"), RFC 3629 (0xFF and a lone 0xE9
never appear in UTF-8), CWE-776 (the "billion laughs" expansion), ECMA-48 (ESC 0x1B and the
C1 control CSI 0x9B start terminal control sequences), IEEE 754 (NaN and infinity).
"""
from __future__ import annotations

import json
import os
import re
import shutil
import subprocess
import sys
from pathlib import Path

import pytest
from payloads import laughs
from click.testing import CliRunner

from builder.cli import main
from clitools import copy_demo_shop

ROOT = Path(__file__).resolve().parents[1]
MAX_BYTES = 256 * 1024  # builder.records._yaml.MAX_BYTES, stated here as the contract


def _find_sample() -> str:
    """A measured demo build with a fork, a load curve, a master written out with its bore
    and rating, a pushrod line but no layout, and its gearbox family and slave bracket
    written out: "<year>/<id>". Chosen from the demo as it is, so a
    regenerated demo keeps the checks below meaningful."""
    for path in sorted((ROOT / "records" / "builds").glob("*/*.yaml")):
        text = path.read_text()
        if ("status: measured" in text and "\nfork:" in text and "  load_curve:" in text
                and "  layout:" not in text and "\n  family: " in text and "\n  bracket: " in text
                and re.search(r"(?m)^master:\n  bore: .*\n(  .*\n)*?  rated_pressure: ", text)
                and re.search(r"(?m)^  pushrod: ", text)):
            return f"{path.parent.name}/{path.stem}"
    raise LookupError("no demo build fits the hostile-input checks")


SAMPLE = _find_sample()  # e.g. "2025/HW-0134"
SAMPLE_ID = SAMPLE.split("/")[1]
_SAMPLE_TEXT = (ROOT / "records" / "builds" / f"{SAMPLE}.yaml").read_text()
MASTER_BORE = re.search(r"(?m)^master:\n  (bore: .*)$", _SAMPLE_TEXT)[1]  # e.g. "bore: 0.811 in"
MASTER_RATING = re.search(r"(?m)^master:\n(?:  .*\n)*?  (rated_pressure: .*)$", _SAMPLE_TEXT)[1]
CURVE_POINT = re.search(r"(?m)^  load_curve:.*\n    - .*\n(    - \[(.*), (.*)\])$", _SAMPLE_TEXT)
PUSHROD_LINE = re.search(r"(?m)^(  pushrod: .*\n)", _SAMPLE_TEXT)[1]


@pytest.fixture
def shop(tmp_path: Path) -> Path:
    """A private copy of the demo shop: records/ with schema/ beside it, as in a clone."""
    copy_demo_shop(tmp_path)
    return tmp_path / "records"


def invoke(records: Path, *args: str):
    # color=True: click would otherwise strip escape sequences and hide a leak
    return CliRunner().invoke(main, ["--records", str(records), *args], color=True)


def sample(records: Path) -> Path:
    return records / "builds" / f"{SAMPLE}.yaml"


def restore(shop: Path, path: Path) -> None:
    """Put the demo shop's own copy of a records file back."""
    path.write_bytes((ROOT / "records" / path.relative_to(shop)).read_bytes())


def as_proposal(build: Path, proposal: Path) -> Path:
    """Write the sample build's text to `proposal` under an id of its own (PR-0001)."""
    proposal.write_text(build.read_text().replace(f"id: {SAMPLE_ID}", "id: PR-0001"))
    return proposal


def assert_problem(result, path: Path | str, field: str, text: str,
                   position: tuple[int, int] | None = None) -> tuple[int, int]:
    """Exit 1, no traceback, and a `path:line:col: field: ...text...` line; returns (line, col)."""
    output = result.output
    assert result.exit_code == 1, output
    assert isinstance(result.exception, SystemExit), repr(result.exception)
    assert "Traceback" not in output
    line = re.search(rf"^{re.escape(str(path))}:(\d+):(\d+): {re.escape(field)}: .*{re.escape(text)}",
                     output, re.M)
    assert line, output
    found = int(line[1]), int(line[2])
    if position is not None:
        assert found == position, output
    return found


def python_tag(marker: Path) -> bytes:
    """A tag that would create `marker` if a loader built Python objects from it."""
    return f"site_title: !!python/object/apply:builtins.open ['{marker}', 'w']\n".encode()


# (name, content or a function of the marker path, field, message part, position)
HOSTILE = [
    ("empty", b"", "file", "empty file", (1, 1)),
    ("not utf-8", b"notes: caf\xe9 au lait\n", "file", "not UTF-8", (1, 11)),
    ("list", b"- id: HW-0134\n- status: draft\n", "file", "expected a mapping; found a list", (1, 1)),
    ("tab indent", b"notes:\n\tsecond line\n", "file", "tab", (2, 1)),
    ("broken yaml", b"notes: [unclosed\nstatus: draft\n", "file", "YAML", None),
    ("python tag", python_tag, "file", "could not determine a constructor", (1, 13)),
    ("alias bomb", laughs(), "file", "expands to more than 10000 values through anchors", None),
    ("too big", b"# " + b"x" * MAX_BYTES + b"\n", "file", f"limited to {MAX_BYTES} bytes", (0, 0)),
]


# where the hostile file goes (under the folder holding records/) -> the commands that must report it
PLACES = {
    "build": (f"records/builds/{SAMPLE}.yaml", (["validate"], ["check", "{target}"])),
    "proposal": ("proposal.yaml", (["check", "{target}", "--json"], ["validate", "{target}"])),
    "shop-rules": ("records/shop.yaml", (["validate"], ["report"])),
    "parts": ("records/parts/masters.yaml", (["validate", "{target}"], ["check", "{sample}"])),
}


@pytest.mark.parametrize("place", PLACES)
@pytest.mark.parametrize("name, content, field, text, position", HOSTILE, ids=[c[0] for c in HOSTILE])
def test_hostile_file(shop, tmp_path, place, name, content, field, text, position):
    marker = tmp_path / "created-by-a-tag"
    where, commands = PLACES[place]
    target = shop.parent / where
    target.write_bytes(content(marker) if callable(content) else content)
    for args in commands:
        result = invoke(shop, *[a.format(target=target, sample=sample(shop)) for a in args])
        assert_problem(result, target, field, text, position)
    assert not marker.exists()


def test_fifo_is_refused_not_waited_on(shop, tmp_path):
    fifo = tmp_path / "proposal.yaml"
    os.mkfifo(fifo)
    assert_problem(invoke(shop, "check", str(fifo)), fifo, "file", "no such file", (0, 0))
    assert_problem(invoke(shop, "validate", str(fifo)), fifo, "file", "not a regular file", (0, 0))


# --- ids -------------------------------------------------------------------------------------

def _with(path: Path, old: str, new: str) -> Path:
    text = path.read_text()
    assert old in text, old
    path.write_text(text.replace(old, new, 1))
    return path


@pytest.mark.parametrize("bad_id", ["../../etc/passwd", f"{SAMPLE_ID}/../x", f"/tmp/{SAMPLE_ID}",
                                    SAMPLE_ID.lower(), f"{SAMPLE_ID}\\n", "CON"])
def test_path_like_build_id(shop, bad_id):
    target = _with(sample(shop), f"id: {SAMPLE_ID}", f"id: {json.dumps(bad_id)}")
    assert_problem(invoke(shop, "validate"), target, "id", "is not in the expected form", (2, 5))
    assert_problem(invoke(shop, "check", str(target)), target, "id", "is not in the expected form")


def test_id_differs_from_file_name(shop, tmp_path):
    target = _with(sample(shop), f"id: {SAMPLE_ID}", "id: HW-0999")
    assert_problem(invoke(shop, "validate"), target, "id", f"must equal the file name '{SAMPLE_ID}'",
                   (2, 5))
    assert_problem(invoke(shop, "check", str(target)), target, "id", "must equal the file name")


def test_proposal_outside_records_may_have_any_file_name(shop, tmp_path):
    proposal = as_proposal(sample(shop), tmp_path / "my proposal.yaml")
    assert invoke(shop, "check", str(proposal)).exit_code == 0


def test_id_repeated_in_another_subfolder(shop):
    copy = shop / "builds" / "2099" / f"{SAMPLE_ID}.yaml"
    copy.parent.mkdir()
    shutil.copyfile(sample(shop), copy)
    result = invoke(shop, "validate")
    assert_problem(result, copy, "id", f"build id {SAMPLE_ID} is already used by", (2, 5))
    assert_problem(invoke(shop, "report"), copy, "id", "already used by")


def test_path_like_and_repeated_part_ids(shop):
    masters = _with(shop / "parts" / "masters.yaml", "id: MC-A2", "id: ../MC-A2")
    assert_problem(invoke(shop, "validate", str(masters)), masters, "parts[1].id", "not in the expected form")
    masters.write_text((ROOT / "records" / "parts" / "masters.yaml").read_text())
    slaves = shop / "parts" / "slaves.yaml"
    slave_id = re.search(r"id: (\S+)", slaves.read_text())[1]
    _with(masters, "id: MC-A2", f"id: {slave_id}")
    result = invoke(shop, "validate")
    assert re.search(rf"parts\[\d+\]\.id: part id '{slave_id}' is already used by", result.output)
    assert result.exit_code == 1 and "Traceback" not in result.output


# --- plausible ranges ------------------------------------------------------------------------

BORE_RANGE = "0.118 in (3 mm) to 2.362 in (60 mm)"  # fields.PLAUSIBLE master.bore, 3..60 mm
PRESSURE_RANGE = "73 psi (500 kPa) to 7252 psi (50000 kPa)"  # 0.5..50 MPa; 1 psi = 6894.757 Pa (NIST SP 811)

QUANTITIES = [
    (MASTER_BORE, "bore: 0 in", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: -7/8 in", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: 1e308 in", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: 1e999 in", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: NaN in", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: 75 in", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: 22", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: 1/0 in", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: '1/99999999999999999999999999999999999999999 in'", "master.bore", BORE_RANGE),
    (MASTER_BORE, "bore: '1 in" + " " * 5000 + "x'", "master.bore", BORE_RANGE),
    (MASTER_RATING, "rated_pressure: inf psi", "master.rated_pressure", PRESSURE_RANGE),
    (MASTER_RATING, "rated_pressure: 410 lbf", "master.rated_pressure", PRESSURE_RANGE),
    (CURVE_POINT[1], f"    - [{CURVE_POINT[2]}, -{CURVE_POINT[3]}]", "clutch.load_curve[1][1]",
     "0 lbf (0 N) to 4496 lbf (20000 N)"),
]


@pytest.mark.parametrize("old, new, field, accepted", QUANTITIES, ids=[q[1][:30] for q in QUANTITIES])
def test_implausible_quantity_names_the_accepted_range(shop, tmp_path, old, new, field, accepted):
    target = _with(sample(shop), old, new)
    assert_problem(invoke(shop, "validate", str(target)), target, field, accepted)
    proposal = as_proposal(target, tmp_path / "proposal.yaml")
    restore(shop, target)
    assert_problem(invoke(shop, "check", str(proposal)), proposal, field, accepted)


@pytest.mark.parametrize("old, new, field, accepted", [
    ("default_efficiency: 85 %", "default_efficiency: 0 %", "default_efficiency", "10.0 % to 100.0 %"),
    ("default_efficiency: 85 %", "default_efficiency: NaN", "default_efficiency", "10.0 % to 100.0 %"),
    ("  DOT 4: 1.7 GPa", "  DOT 4: inf GPa", "fluid_bulk_modulus.DOT 4", "to 1450377 psi"),
    ("low: 15 lbf", "low: -15 lbf", "effort_band.low", "2.2 lbf (10 N) to 224.8 lbf (1000 N)"),
])
def test_implausible_shop_rule(shop, old, new, field, accepted):
    target = _with(shop / "shop.yaml", old, new)
    assert_problem(invoke(shop, "validate"), target, field, accepted)
    assert_problem(invoke(shop, "calibration"), target, field, accepted)


def test_implausible_part_bore(shop):
    target = _with(shop / "parts" / "masters.yaml", "bore: 5/8 in", "bore: 75 in")
    assert_problem(invoke(shop, "validate"), target, "parts[0].bore", BORE_RANGE)


# --- a pedal layout the engine cannot work -----------------------------------------------------

COLLINEAR = """  layout:
    pivot: [0 mm, 0 mm]
    pad: [-60 mm, -285 mm]
    clevis: [0 mm, -53 mm]
    pushrod_seat: [0 mm, -200 mm]
    rotation_to_stop: 30 deg
"""  # the pushrod lies on the line pivot-clevis: turning the pedal moves the seat sideways only


def _collinear(path: Path) -> Path:
    return _with(path, PUSHROD_LINE, PUSHROD_LINE + COLLINEAR)


def test_layout_that_cannot_push_the_master(shop, tmp_path):
    target = _collinear(sample(shop))
    line = target.read_text().splitlines().index("  layout:") + 1
    for args in (["validate"], ["validate", str(target)], ["check", str(target)], ["report"],
                 ["site", "build", "--out", str(tmp_path / "site")]):
        assert_problem(invoke(shop, *args), target, "pedal.layout", "cannot push the master", (line, 3))
    proposal = as_proposal(target, tmp_path / "proposal.yaml")
    restore(shop, sample(shop))
    assert_problem(invoke(shop, "check", str(proposal)), proposal, "pedal.layout", "cannot push", (line, 3))
    assert_problem(invoke(shop, "validate", str(proposal)), proposal, "pedal.layout", "cannot push", (line, 3))
    assert not (tmp_path / "site").exists()


# --- reading never writes; new creates exclusively ---------------------------------------------

def tree(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*")) if p.is_file()}


def test_failing_commands_leave_records_byte_identical(shop, tmp_path):
    proposal = tmp_path / "proposal.yaml"
    proposal.write_bytes(b"id: !!python/object/apply:os.getcwd []\n")
    before = tree(shop)
    site = tmp_path / "site"
    assert invoke(shop, "site", "build", "--out", str(site)).exit_code == 0
    published = tree(site)
    _with(sample(shop), MASTER_BORE, "bore: 75 in")  # now every command fails
    broken = tree(shop)
    for args in (["validate"], ["validate", str(proposal)], ["check", str(proposal)],
                 ["check", str(sample(shop)), "--json"], ["report", "--format", "csv"],
                 ["calibration"], ["site", "build", "--out", str(site)]):
        result = invoke(shop, *args)
        assert result.exit_code == 1 and "Traceback" not in result.output, args
    assert tree(shop) == broken
    assert tree(site) == published  # the last good site stays, byte for byte
    assert set(before) == set(broken)


def test_site_build_refuses_a_folder_it_did_not_make(shop, tmp_path):
    foreign = tmp_path / "documents"
    foreign.mkdir()
    (foreign / "thesis.txt").write_text("mine")
    result = invoke(shop, "site", "build", "--out", str(foreign))
    assert_problem(result, foreign, "site", "not replacing it")
    assert tree(foreign) == {"thesis.txt": b"mine"}


@pytest.mark.parametrize("bad_id", ["HW-0999\n", "../HW-0999", "HW-0999/../../x", "HW-0999.yaml", ""])
def test_new_refuses_path_like_ids(shop, bad_id):
    before = tree(shop)
    result = invoke(shop, "new", bad_id)
    assert_problem(result, "new", "id", "expected an id like")
    assert tree(shop) == before


def test_new_never_follows_a_planted_link(shop, tmp_path):
    outside = tmp_path / "outside.yaml"
    year = shop / "builds" / "2030"
    year.mkdir()
    (year / "HW-0999.yaml").symlink_to(outside)  # dangling: it points at a file not yet made
    result = invoke(shop, "new", "HW-0999")
    assert result.exit_code == 1 and "Traceback" not in result.output
    assert not outside.exists()


# --- record text reaches a terminal inert -------------------------------------------------------

ESCAPES = "\x1b[31mRED\x1b]0;title\x07\x9b2J\r\x08"  # colour, window title, C1 CSI, CR, BS


def _run_on_escapes(shop: Path, args: list[str]):
    """Plant ESCAPES in the sample build's free text, run `args` ({target}: the build); exit 0."""
    target = sample(shop)
    text = target.read_text()
    for key in ("technician", "vehicle", "outcome"):
        text = re.sub(rf"^{key}: .*$", lambda _, key=key: f"{key}: {json.dumps(key + ESCAPES)}", text, flags=re.M)
    text = re.sub(r"(?m)^  family: .*$", lambda _: f"  family: {json.dumps('FX' + ESCAPES)}", text)
    with (shop / "shop.yaml").open("a") as rules:  # a family the shop declares, escapes and all
        rules.write(f"families: [{json.dumps('FX' + ESCAPES)}]\n")
    text = re.sub(r"(?m)^  bracket: .*$", lambda _: f"  bracket: {json.dumps(ESCAPES)}", text)
    target.write_text(text)
    result = invoke(shop, *[a.format(target=target) for a in args])
    assert result.exit_code == 0, result.output
    return result


@pytest.mark.parametrize("args", [["check", "{target}"], ["check", "{target}", "--similar", "50"],
                                  ["report"], ["report", "--format", "csv"], ["calibration"]],
                         ids=["check", "check-similar", "report", "report-csv", "calibration"])
def test_terminal_output_shows_escape_sequences_as_text(shop, args):
    result = _run_on_escapes(shop, args)
    assert "FX" in result.output
    for control in "\x1b\x07\x9b\x08":
        assert control not in result.output
    assert "\\x1b[31mRED" in result.output
    body = result.output.replace("\r\n", "\n") if "csv" in args else result.output
    assert "\r" not in body


@pytest.mark.parametrize("args", [["check", "{target}", "--json"], ["report", "--format", "json"]])
def test_json_output_escapes_control_characters_and_round_trips(shop, args):
    result = _run_on_escapes(shop, args)
    assert all(ch == "\n" or " " <= ch < "\x7f" for ch in result.output)  # ensure_ascii
    assert "\\u001b[31mRED" in result.output
    assert any("FX" + ESCAPES in text for text in strings(json.loads(result.output)))  # round trip


def strings(value):
    """Every string inside parsed JSON."""
    if isinstance(value, str):
        yield value
    elif isinstance(value, (list, dict)):
        for item in value.values() if isinstance(value, dict) else value:
            yield from strings(item)


# --- a few through a real process: stderr, exit status, no traceback ----------------------------

@pytest.mark.parametrize("content, text", [(b"", "empty file"), (laughs(), "expands to more than"),
                                           (b"id: !!python/name:os.system\n", "constructor")],
                         ids=["empty", "alias-bomb", "python-name"])
def test_as_a_process(shop, tmp_path, content, text):
    proposal = tmp_path / "proposal.yaml"
    proposal.write_bytes(content)
    done = subprocess.run([sys.executable, "-m", "builder.cli", "--records", str(shop), "check",
                           str(proposal)], capture_output=True, text=True, timeout=120)
    assert done.returncode == 1
    assert done.stdout == ""
    assert "Traceback" not in done.stderr
    assert re.search(rf"^{re.escape(str(proposal))}:\d+:\d+: file: .*{re.escape(text)}", done.stderr, re.M)


def _quantity_lines(text: str) -> list[tuple[int, str, str]]:
    """(line number, key, unit) of every `key: <number> <unit>` line of a record."""
    found = []
    for number, line in enumerate(text.splitlines(), 1):
        match = re.match(r"^\s*(\w+): [\d./ -]+?\s*([A-Za-z%][\w^/%]*)\s*(#.*)?$", line)
        if match and match[1] not in ("id", "date", "technician", "family"):
            found.append((number, match[1], match[2]))
    return found


@pytest.mark.parametrize("name", [f"builds/{SAMPLE}.yaml", "shop.yaml", "parts/masters.yaml"])
def test_every_quantity_field_has_a_plausible_range(shop, name):
    """Each quantity of a demo file, made 1e308 times its unit, is refused with a range."""
    target = shop / name
    original = target.read_text()
    lines = _quantity_lines(original)
    assert len(lines) >= 8
    for number, key, unit in lines:
        text = original.splitlines()
        text[number - 1] = re.sub(r": .*$", f": 1e308 {unit}", text[number - 1])
        target.write_text("\n".join(text) + "\n")
        result = invoke(shop, "validate", str(target))
        assert result.exit_code == 1 and "Traceback" not in result.output, (key, result.output)
        line = next(out for out in result.output.splitlines() if out.startswith(f"{target}:{number}:"))
        assert f"{key}: " in line and ("plausible range" in line or "this field accepts" in line), line
    target.write_text(original)


def test_problem_lines_show_escape_sequences_as_text(shop):
    """A file name and an unknown key carrying terminal escapes are reported inert."""
    planted = shop / "builds" / "2025" / "HW-0777\x1b[2J.yaml"
    planted.write_text(f"id: HW-0777\n{json.dumps(chr(0x1b) + '[31mkey')}: 1\n")
    result = invoke(shop, "validate")
    assert result.exit_code == 1 and "Traceback" not in result.output
    assert "\x1b" not in result.output
    assert "HW-0777\\x1b[2J.yaml:1:5: id:" in result.output
