"""A published draft (internal copy) carries the same verdict and order as `fitment check`.

The rows are compared with the command line's own output on the same proposal; the physics
behind them is tested in test_suggest*.py against hand derivations.
"""
from __future__ import annotations

import html
import re
from pathlib import Path

from click.testing import CliRunner

from builder.cli import main
from clitools import copy_demo_shop



def page_text(path: Path) -> str:
    return html.unescape(re.sub(r"\s+", " ", re.sub(r"<[^>]+>", " ", path.read_text())))


def test_a_failing_draft_shows_what_to_order_as_check_does(tmp_path):
    copy_demo_shop(tmp_path)
    records = tmp_path / "records"
    draft = next(path for path in sorted((records / "builds").rglob("HW-*.yaml"))
                 if "status: draft" in path.read_text() and "\nmaster:\n  part:" in path.read_text()
                 and "\nslave:\n  part: SC-" in path.read_text())
    text = re.sub(r"\nmaster:\n  part: \S+", "\nmaster:\n  bore: 5/8 in\n  stroke: 1.0 in",
                  draft.read_text())
    text = re.sub(r"\nslave:\n  part: \S+",
                  "\nslave:\n  kind: external\n  bore: 1.25 in\n  stroke: 1.2 in", text)
    draft.write_text(text)
    check = CliRunner().invoke(main, ["--records", str(records), "check", str(draft)])
    assert check.exit_code == 3, check.output  # not ready: the master cannot release the clutch
    verdict = check.output.splitlines()[0]
    recommended = next(line for line in check.output.splitlines() if "<- recommended" in line)
    built = CliRunner().invoke(main, ["--records", str(records), "site", "build",
                                      "--include-drafts", "--out", str(tmp_path / "internal")])
    assert built.exit_code == 0, built.output
    page = page_text(tmp_path / "internal" / "builds" / draft.stem / "index.html")
    assert "Verdict and what to order" in page and verdict in page
    assert " ".join(recommended.split()) in page
    public = CliRunner().invoke(main, ["--records", str(records), "site", "build",
                                       "--out", str(tmp_path / "public")])
    assert public.exit_code == 0 and not (tmp_path / "public" / "builds" / draft.stem).exists()
