"""Issue 10: bidirectional controls in record text are shown escaped on a terminal, not obeyed.

Outside reference: the Unicode Character Database through Python's unicodedata (bidi classes
LRE, RLE, LRO, RLO, PDF, LRI, RLI, FSI, PDI: the explicit formatting characters of UAX #9,
section 2) and the three marks of UAX #9, section 2.6 (LEFT-TO-RIGHT MARK, RIGHT-TO-LEFT MARK,
ARABIC LETTER MARK), looked up by name.
"""
from __future__ import annotations

import sys
import unicodedata
from pathlib import Path

import pytest
from click.testing import CliRunner

from builder.cli import main
from builder.problems import terminal_safe
from clitools import copy_demo_shop

EXPLICIT = {"LRE", "RLE", "LRO", "RLO", "PDF", "LRI", "RLI", "FSI", "PDI"}
MARKS = ["LEFT-TO-RIGHT MARK", "RIGHT-TO-LEFT MARK", "ARABIC LETTER MARK"]
BIDI = sorted({chr(c) for c in range(sys.maxunicode + 1) if unicodedata.bidirectional(chr(c)) in EXPLICIT}
              | {unicodedata.lookup(name) for name in MARKS})


def test_every_bidi_control_is_escaped():
    assert len(BIDI) == 12  # U+202A-202E, U+2066-2069, U+200E, U+200F, U+061C
    for ch in BIDI:
        shown = terminal_safe(f"a{ch}b")
        assert ch not in shown and shown == f"a\\u{ord(ch):04x}b"


def test_other_text_is_left_as_it_is():
    text = "caf\u00e9 \u05e9\u05dc\u05d5\u05dd \u0645\u0631\u062d\u0628\u0627 7/8 in\n\tdone"
    assert terminal_safe(text) == text


@pytest.fixture
def shop(tmp_path: Path) -> Path:
    copy_demo_shop(tmp_path)
    return tmp_path / "records"


def test_check_and_validate_print_bidi_controls_escaped(shop, tmp_path):
    sample = (shop / "builds" / "2025" / "HW-0134.yaml").read_text()
    override = "\u202e"  # RIGHT-TO-LEFT OVERRIDE: would show "fl 03" for "30 lf"
    proposal = tmp_path / "proposal.yaml"
    proposal.write_text(sample.replace("id: HW-0134", "id: PR-0001").replace(
        "vehicle: ", f"vehicle: {override}evil ", 1))
    checked = CliRunner().invoke(main, ["--records", str(shop), "check", str(proposal)], color=True)
    assert checked.exit_code in (0, 3), checked.output
    assert override not in checked.output and "\\u202e" in checked.output
    broken = tmp_path / "broken.yaml"
    broken.write_text(sample.replace("status: measured", f"status: draft{override}\u2066"))
    result = CliRunner().invoke(main, ["--records", str(shop), "validate", str(broken)], color=True)
    assert result.exit_code == 1
    assert not any(ch in result.output for ch in BIDI) and "\\u202e" in result.output
