"""Issue 10, reading YAML: nesting measured on the parser's events, text kept as typed.

Outside references: the YAML 1.1 spec (flow collections, section 7.4; block collections and
compact nesting, 7.2-7.3; int, section "Integer Language-Independent Type for YAML 1.1":
`0712` is octal, `0x1F` hexadecimal, `1:30` base 60, `_` a digit separator), and PyYAML's
own reading of those forms (yaml.safe_load) as the independent check of what a loader that
converts would have printed instead.
"""
from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
from samples import HW_0134
import yaml
from click.testing import CliRunner

from builder.cli import main
from builder.records import load_shop, validate_paths
from builder.records._yaml import careful_load
from clitools import copy_demo_shop

ROOT = Path(__file__).resolve().parents[1]
SAMPLE = "builds/2025/HW-0134.yaml"  # a measured build with a fork and a load curve


@pytest.fixture
def shop(tmp_path: Path) -> Path:
    """A private copy of the demo shop: records/ with schema/ beside it, as in a clone."""
    copy_demo_shop(tmp_path)
    (tmp_path / "records" / SAMPLE).write_text(HW_0134)
    return tmp_path / "records"


def fitment(records: Path, *args: str) -> subprocess.CompletedProcess:
    """The command in its own process: a crash in C (a segfault) must not take pytest with it."""
    return subprocess.run([sys.executable, "-m", "builder.cli", "--records", str(records), *args],
                          capture_output=True, text=True, timeout=300, cwd=ROOT)


# --- nesting -----------------------------------------------------------------------------------

def hidden_brackets(count: int) -> str:
    """The issue's file: a comment of `]` that cancels a real run of `[` in a character count."""
    return "# " + "]" * count + "\nid: " + "[" * count + "]" * count + "\n"


def test_brackets_hidden_behind_a_comment_are_a_located_problem_not_a_segfault(shop):
    # 30,000 levels made libyaml's recursive composer crash the process (exit 139, nothing said).
    target = shop / "builds" / "2025" / "QA-0001.yaml"
    target.write_text(hidden_brackets(30_000))
    assert target.stat().st_size < 256 * 1024  # under the file limit, so the parser sees it
    result = fitment(shop, "validate", str(target))
    assert result.returncode == 1, (result.returncode, result.stderr[-2000:])
    # With the root mapping as level 1, the 64th `[` of line 2 (after "id: ", 4 characters)
    # opens level 65: column 4 + 64.
    assert f"{target}:2:68: file: nesting is deeper than 64 levels" in result.stderr
    assert "Traceback" not in result.stderr


def test_two_thousand_hidden_brackets_are_a_located_problem_not_a_recursion_error(shop):
    target = shop / "builds" / "2025" / "QA-0001.yaml"
    target.write_text(hidden_brackets(2_000))
    (problem,) = validate_paths(shop, [target])
    assert (problem.line, problem.col, problem.message) == (2, 68, "nesting is deeper than 64 levels")


@pytest.mark.parametrize("where", ["quoted", "comment", "block"])
def test_many_brackets_in_text_are_fine(shop, where):
    # 65 `[` that open nothing: in a quoted note, in a comment, in a block scalar.
    target = shop / SAMPLE
    brackets = "[" * 65
    head, _ = target.read_text().split("notes:")
    target.write_text(head + {"quoted": f"notes: '{brackets}'\n",
                              "comment": f"# {brackets}\nnotes: plain\n",
                              "block": f"notes: |\n  {brackets}\n"}[where])
    assert validate_paths(shop, [target]) == []
    build = next(b for b in load_shop(shop).builds if b.id == "HW-0134")
    assert (brackets in build.notes) == (where != "comment")


def test_sixty_four_levels_are_read_and_sixty_five_refused():
    # Depth counted on events: the root mapping is level 1, each `[` one more.
    ok = "a: " + "[" * 63 + "]" * 63 + "\n"
    too_deep = "a: " + "[" * 64 + "]" * 64 + "\n"
    assert careful_load(ok).problems == []
    ((_, line, col, message),) = careful_load(too_deep).problems
    assert (line, col, message) == (1, 67, "nesting is deeper than 64 levels")


@pytest.mark.parametrize("line_break", ["\r", "\r\n", "\x85", "\u2028", "\u2029"])
def test_block_nesting_is_counted_whatever_breaks_the_lines(shop, line_break):
    # YAML 1.1 (5.4) breaks lines at CR, NEL, LS and PS as at LF: 700 levels of indented keys
    # written with them fit in the file limit and must be refused like any other nesting.
    text = line_break.join(" " * level + f"k{level}:" for level in range(700)) + " x" + line_break
    target = shop / "builds" / "2025" / "QA-0003.yaml"
    target.write_bytes(text.encode("utf-8"))
    result = fitment(shop, "validate", str(target))
    assert result.returncode == 1, result.stderr[-2000:]
    assert "nesting is deeper than 64 levels" in result.stderr and "Traceback" not in result.stderr


def test_nesting_through_aliases_counts_each_aliased_value():
    # Three anchored values of 30 levels nested through aliases: 1 + 30 + 31 + 31 levels.
    text = ("a: &a0 " + "[" * 30 + "x" + "]" * 30 + "\n"
            "b: &a1 " + "[" * 30 + "*a0" + "]" * 30 + "\n"
            "c: " + "[" * 30 + "*a1" + "]" * 30 + "\n")
    ((_, _, _, message),) = careful_load(text).problems
    assert message == "nesting is deeper than 64 levels through aliases"


# --- YAML 1.1 numbers in text fields ------------------------------------------------------------

TEXT_LINES = ["vehicle:", "technician:", "outcome:", "  family:", "  variant:", "  bracket:",
              "  pushrod:", "  method:"]  # every text field of the sample, as its line starts
TYPED = ["0712", "0755", "1:30", "0x1F", "0017", "1_000", "+12"]


def _set_line(text: str, start: str, value: str) -> str:
    lines = text.splitlines()
    index = next(i for i, line in enumerate(lines) if line.startswith(start + " "))
    lines[index] = f"{start} {value}"
    return "\n".join(lines) + "\n"


@pytest.mark.parametrize("typed", TYPED)
def test_numbers_in_text_fields_keep_what_was_typed(shop, typed):
    assert str(yaml.safe_load(f"x: {typed}")["x"]) != typed  # what a converting loader printed
    target = shop / SAMPLE
    text = target.read_text().split("notes:")[0] + f"notes: {typed}\n"
    for start in TEXT_LINES:
        text = _set_line(text, start, typed)
    target.write_text(text)
    rules = shop / "shop.yaml"  # the typed family is one the shop declares, as typed
    rules.write_text(rules.read_text() + f"families: [{typed}]\n")
    assert validate_paths(shop, [target]) == []
    build = next(b for b in load_shop(shop).builds if b.id == "HW-0134")
    assert [build.vehicle, build.technician, build.outcome, build.notes, build.gearbox.family,
            build.gearbox.variant, build.slave.bracket, build.pedal.pushrod,
            build.measured.method] == [typed] * 9


def test_family_code_and_part_label_keep_what_was_typed(shop):
    gearboxes = shop / "parts" / "gearboxes.yaml"
    text = gearboxes.read_text()
    first_family = next(line for line in text.splitlines() if line.strip().startswith("family:"))
    first_label = next(line for line in text.splitlines() if line.strip().startswith("label:"))
    indent = first_family[: len(first_family) - len(first_family.lstrip())]
    text = text.replace(first_family, f"{indent}family: 0712", 1)
    text = text.replace(first_label, f"{indent}label: 0x1F", 1)
    gearboxes.write_text(text)
    shop_ = load_shop(shop)
    families = {part.section.family for part in shop_.parts["gearboxes"].values()}
    labels = {part.label for part in shop_.parts["gearboxes"].values()}
    assert "0712" in families and "458" not in families
    assert "0x1F" in labels


@pytest.mark.parametrize("typed", ["1.50", "yes", "no"])
def test_other_number_forms_in_text_fields_are_refused_with_quote_it(shop, typed):
    # A float or YAML 1.1 boolean would print as 1.5 or True: refused, with the way out.
    target = shop / SAMPLE
    target.write_text(_set_line(target.read_text(), "vehicle:", typed))
    (problem,) = validate_paths(shop, [target])
    assert problem.field == "vehicle" and "quote it" in problem.message and problem.line > 0


def test_numbers_and_quantities_in_shop_rules_still_work(shop):
    rules = shop / "shop.yaml"
    text = rules.read_text()
    text = _set_line(text, "default_efficiency:", "0.85")
    text = _set_line(text, "min_travel_margin:", "0")
    rules.write_text(text)
    loaded = load_shop(shop).rules
    assert loaded.default_efficiency == pytest.approx(0.85)
    assert loaded.min_travel_margin == 0
    assert loaded.effort_band[1] == pytest.approx(40 * 4.4482216152605)  # NIST SP 811: 1 lbf


# --- links -------------------------------------------------------------------------------------

def test_a_symlink_loop_is_named_as_a_loop(shop):
    loop = shop / "builds" / "2025" / "QA-0002.yaml"
    loop.symlink_to(loop.name)
    problems = validate_paths(shop, [])
    (problem,) = [p for p in problems if p.path == str(loop)]
    assert "loop" in problem.message and "no such file" not in problem.message
    result = CliRunner().invoke(main, ["--records", str(shop), "validate", str(loop)])
    assert result.exit_code == 1 and "loop" in result.output and "no such file" not in result.output
