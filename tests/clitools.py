"""Helpers for tests that drive the command line (makers only, no tests)."""
from __future__ import annotations

import hashlib
import shutil
from pathlib import Path

from click.testing import CliRunner, Result

from builder.cli import main

ROOT = Path(__file__).resolve().parents[1]


def copy_demo_shop(folder: Path) -> Path:
    """A private copy of the demo shop under `folder`: records/ with schema/ beside it, as in
    a clone; the copied records folder."""
    shutil.copytree(ROOT / "records", folder / "records")
    shutil.copytree(ROOT / "schema", folder / "schema")
    return folder / "records"


def invoke(records: Path, *args: str) -> Result:
    """`fitment --records RECORDS ARGS...` in this process; exceptions kept on the result."""
    return CliRunner().invoke(main, ["--records", str(records), *args])


def assert_refused(result: Result, *expected: str) -> None:
    """Exit 1, no traceback, every expected text in the output."""
    assert result.exit_code == 1, result.output
    assert isinstance(result.exception, SystemExit), repr(result.exception)
    assert "Traceback" not in result.output
    for text in expected:
        assert text in result.output, result.output


def tree_digest(folder: Path) -> str:
    """SHA-256 over every path below folder and every file's bytes: equal digests, an
    untouched tree."""
    digest = hashlib.sha256()
    for path in sorted(folder.rglob("*")):
        digest.update(str(path.relative_to(folder)).encode())
        if path.is_file():
            digest.update(path.read_bytes())
    return digest.hexdigest()
