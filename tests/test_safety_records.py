"""Issue 10, reading the records folder: nothing in it is skipped or read twice in silence.

Every command reads the folder through one loader, so each case is checked on `validate` and
on the commands that analyse the shop. Unreadable folders and files are tried for real as an
unprivileged user (root reads everything) when `setpriv` can drop to `nobody`, and simulated
(os.scandir or open failing with EACCES, as POSIX readdir/open report it) everywhere.
"""
from __future__ import annotations

import errno
import os
import pathlib
import shutil
import subprocess
import sys
import tempfile
from pathlib import Path

import pytest

from builder.records import load_shop, validate_paths
from clitools import assert_refused, copy_demo_shop, invoke

ROOT = Path(__file__).resolve().parents[1]
DEMO_BUILDS = len(list((ROOT / "records" / "builds").rglob("*.yaml")))
ANALYSING = [["report"], ["calibration"], ["check", "records/builds/2025/HW-0134.yaml"],
             ["site", "build", "--out", "published"]]


@pytest.fixture
def shop(tmp_path: Path, monkeypatch) -> Path:
    """A private copy of the demo shop: records/ with schema/ beside it, as in a clone; the
    working directory is its folder, so relative paths land there."""
    copy_demo_shop(tmp_path)
    monkeypatch.chdir(tmp_path)
    return tmp_path / "records"


def every_command_refuses(records: Path, *expected: str) -> None:
    assert_refused(invoke(records, "validate"), *expected)
    for args in ANALYSING:
        assert_refused(invoke(records, *args), *expected)


# --- unreadable ---------------------------------------------------------------------------------

def test_a_folder_that_cannot_be_listed_is_an_error_with_its_path(shop, monkeypatch):
    hidden_from_us = shop / "builds" / "2024"
    real_scandir = os.scandir

    def scandir(path="."):
        if Path(path) == hidden_from_us:
            raise PermissionError(errno.EACCES, "Permission denied", str(path))
        return real_scandir(path)

    monkeypatch.setattr(os, "scandir", scandir)
    every_command_refuses(shop, f"{hidden_from_us}:0:0: folder: cannot read this folder (Permission denied)")


def test_a_file_that_cannot_be_read_is_an_error_with_its_path(shop, monkeypatch):
    locked = shop / "builds" / "2024" / "HW-0121.yaml"
    real_open = pathlib.Path.open

    def open_(self, *args, **kwargs):
        if self == locked:
            raise PermissionError(errno.EACCES, "Permission denied", str(self))
        return real_open(self, *args, **kwargs)

    monkeypatch.setattr(pathlib.Path, "open", open_)
    every_command_refuses(shop, f"{locked}:0:0: file: cannot read: Permission denied")


def _as_nobody(*args: str) -> subprocess.CompletedProcess | None:
    """`fitment` run as the user nobody, or None where that cannot be done here."""
    if os.getuid() != 0 or shutil.which("setpriv") is None:
        return None
    command = ["setpriv", "--reuid=nobody", "--regid=nogroup", "--clear-groups",
               sys.executable, "-m", "builder.cli", *args]
    probe = subprocess.run(command[:-len(args)] + ["--help"], capture_output=True, cwd=ROOT)
    if probe.returncode != 0:
        return None
    return subprocess.run(command, capture_output=True, text=True, cwd=ROOT, timeout=300)


@pytest.mark.parametrize("what", ["folder", "file"])
def test_unreadable_for_real_as_an_unprivileged_user(what):
    # The case: `chmod 000 records/builds/2024` gave "All records valid" to a non-root user.
    base = Path(tempfile.mkdtemp(prefix="fitment-nobody-"))
    try:
        base.chmod(0o755)
        shutil.copytree(ROOT / "records", base / "records")
        for path in [base / "records", *(base / "records").rglob("*")]:
            path.chmod(0o755 if path.is_dir() else 0o644)
        locked = base / "records" / "builds" / "2024"
        if what == "file":
            locked = locked / "HW-0121.yaml"
        locked.chmod(0)
        result = _as_nobody("--records", str(base / "records"), "validate")
        if result is None:
            pytest.skip("needs root and setpriv to run as nobody; simulated in the tests above")
        assert result.returncode == 1, result.stdout + result.stderr
        assert f"{locked}:0:0: {what}:" in result.stderr
        assert "Permission denied" in result.stderr and "Traceback" not in result.stderr
    finally:
        shutil.rmtree(base, ignore_errors=True)


# --- wrongly named ------------------------------------------------------------------------------

@pytest.mark.parametrize("name", ["HW-0102.YAML", ".HW-0102.yaml", "HW-0102.yaml ", "HW-0102.Yml",
                                  "HW-0102.yaml\u00a0", "HW-0102.yaml\u200b", "HW-0102.yaml."])
def test_a_wrongly_named_build_file_is_reported(shop, name):
    original = shop / "builds" / "2023" / "HW-0102.yaml"
    renamed = original.with_name(name)
    original.rename(renamed)
    every_command_refuses(shop, f"{renamed}:0:0: file: not read: {name!r} is not named like a record")


def test_other_files_in_builds_are_left_alone(shop):
    for name in ("README.md", "HW-0102.yaml~", ".HW-0102.yaml.swp", "notes.txt"):
        (shop / "builds" / "2023" / name).write_text("not a record\n")
    assert validate_paths(shop, []) == []


def test_a_hidden_folder_holding_records_is_reported(shop):
    hidden = shop / "builds" / ".old"
    hidden.mkdir()
    (shop / "builds" / "2023" / "HW-0102.yaml").rename(hidden / "HW-0102.yaml")
    every_command_refuses(shop, f"{hidden}:0:0: folder: a hidden folder holding record files")


def test_a_folder_link_in_builds_is_reported(shop, tmp_path):
    elsewhere = tmp_path / "more-builds"
    (shop / "builds" / "2026").rename(elsewhere)
    (shop / "builds" / "2026").symlink_to(elsewhere, target_is_directory=True)
    every_command_refuses(shop, f"{shop / 'builds' / '2026'}:0:0: folder: a link to the folder")


# --- reached twice, links out ---------------------------------------------------------------------

def test_a_build_reached_twice_through_a_link_is_one_duplicate_for_every_command(shop):
    # The case: validate passed with 59 builds, then report, check, calibration and
    # site build died with a ValueError in calibration.
    original = shop / "builds" / "2023" / "HW-0102.yaml"
    twin = shop / "builds" / "2026" / "HW-0102.yaml"
    twin.symlink_to(original)
    problems = validate_paths(shop, [])
    assert [(p.path, p.field) for p in problems] == [(str(twin), "id")]
    assert "a link to" in problems[0].message and problems[0].line == 2
    every_command_refuses(shop, f"{twin}:2:5: id: this file is a link to {original}")


def test_a_link_listed_before_its_target_is_named_as_the_link(shop):
    original = shop / "builds" / "2023" / "HW-0102.yaml"
    early = shop / "builds" / "2022"
    early.mkdir()
    (early / "HW-0102.yaml").symlink_to(original)
    (problem,) = validate_paths(shop, [])
    assert problem.path == str(original)
    assert problem.message.startswith(f"{early / 'HW-0102.yaml'} is a link to this file")


def test_a_link_to_a_record_elsewhere_in_records_is_read_once(shop):
    kept = shop / "kept"
    kept.mkdir()
    (shop / "builds" / "2023" / "HW-0102.yaml").rename(kept / "HW-0102.yaml")
    (shop / "builds" / "2023" / "HW-0102.yaml").symlink_to(kept / "HW-0102.yaml")
    assert validate_paths(shop, []) == []
    assert len(load_shop(shop).builds) == DEMO_BUILDS


@pytest.mark.parametrize("which", ["build", "shop", "parts"])
def test_a_link_out_of_records_is_refused_before_its_target_is_read(shop, tmp_path, which):
    secret = tmp_path / "elsewhere.yaml"
    secret.write_text("id: [private words from elsewhere\n")  # a parse error would quote it
    link = {"build": shop / "builds" / "2026" / "QA-0100.yaml", "shop": shop / "shop.yaml",
            "parts": shop / "parts" / "pedals.yaml"}[which]
    link.unlink(missing_ok=True)
    link.symlink_to(secret)
    every_command_refuses(shop, f"{link}:0:0: file: a link to {secret}, outside the records folder")
    for args in (["validate"], *ANALYSING):
        assert "private words" not in invoke(shop, *args).output
    assert_refused(invoke(shop, "validate", str(link)), "outside the records folder")


def test_check_reads_a_proposal_outside_records(shop, tmp_path):
    proposal = tmp_path / "proposal.yaml"
    proposal.write_text((shop / "builds" / "2025" / "HW-0134.yaml").read_text()
                        .replace("id: HW-0134", "id: PR-0001"))
    result = invoke(shop, "check", str(proposal))
    assert result.exit_code in (0, 3), result.output


def test_one_set_of_builds_for_every_command(shop):
    # The same loader behind every command: the counts agree with a plain listing of the folder.
    result = invoke(shop, "validate")
    assert result.exit_code == 0 and f"({DEMO_BUILDS} builds)" in result.output
    report = invoke(shop, "report", "--format", "csv")
    assert report.exit_code == 0 and len(report.output.strip().splitlines()) == DEMO_BUILDS + 1
