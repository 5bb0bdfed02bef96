"""Issue 10, `fitment new`: it writes inside records/ or nowhere, and says why in plain words.

A planted link is followed by neither the year folder nor the file: the write goes through
openat(2) with O_NOFOLLOW and O_EXCL (POSIX: O_EXCL with O_CREAT fails on any existing name,
a symbolic link included; Linux open(2): O_NOFOLLOW fails with ELOOP on a link).
"""
from __future__ import annotations

import datetime as dt
from pathlib import Path

import pytest
from click.testing import CliRunner

from builder.cli import main
from clitools import copy_demo_shop

YEAR = str(dt.date.today().year)  # `fitment new` files a draft under this year's folder


@pytest.fixture
def shop(tmp_path: Path) -> Path:
    copy_demo_shop(tmp_path)
    return tmp_path / "records"


def new(records: Path, *args: str):
    return CliRunner().invoke(main, ["--records", str(records), "new", *args])


def files_under(folder: Path) -> set[Path]:
    return {path for path in folder.rglob("*")}


def assert_refused(result, path: Path, text: str) -> None:
    assert result.exit_code == 1, result.output
    assert isinstance(result.exception, SystemExit), repr(result.exception)
    assert "Traceback" not in result.output
    assert f"{path}:0:0: folder: " in result.output and text in result.output, result.output


def _year_folder(shop: Path) -> Path:
    year = shop / "builds" / YEAR
    if year.exists():  # keep its records: they move under another name
        year.rename(shop / "builds" / "moved")
    return year


def test_a_year_folder_linked_out_of_records_is_not_followed(shop, tmp_path):
    outside = tmp_path / "outside"
    outside.mkdir()
    year = _year_folder(shop)
    year.symlink_to(outside, target_is_directory=True)
    result = new(shop, "HW-0199")
    assert result.exit_code == 1 and "Traceback" not in result.output, result.output
    assert str(year) in result.output and "link" in result.output
    assert list(outside.iterdir()) == []


@pytest.mark.parametrize("kind", ["dangling link", "loop", "file"])
def test_a_year_folder_that_is_not_a_folder_is_a_located_error(shop, tmp_path, kind):
    year = _year_folder(shop)
    if kind == "dangling link":
        year.symlink_to(tmp_path / "gone", target_is_directory=True)
    elif kind == "loop":
        year.symlink_to(year.name)
    else:
        year.write_text("not a folder\n")
    before = files_under(tmp_path)
    result = new(shop, "HW-0199")
    expected = "is a file, not a folder" if kind == "file" else "link"
    assert_refused(result, year, expected)
    assert files_under(tmp_path) == before


def test_a_builds_folder_linked_out_of_records_is_refused(shop, tmp_path):
    outside = tmp_path / "outside"
    (shop / "builds").rename(outside)
    (shop / "builds").symlink_to(outside, target_is_directory=True)
    before = files_under(outside)
    result = new(shop, "HW-0199")
    assert result.exit_code == 1 and "Traceback" not in result.output, result.output
    assert "outside the records folder" in result.output
    assert files_under(outside) == before


def test_a_link_planted_at_the_new_file_is_not_written_through(shop, tmp_path):
    victim = tmp_path / "victim.txt"
    victim.write_text("precious\n")
    year = shop / "builds" / YEAR
    year.mkdir(exist_ok=True)
    (year / "HW-0199.yaml").symlink_to(victim)
    result = new(shop, "HW-0199")
    assert result.exit_code == 1 and "Traceback" not in result.output, result.output
    assert victim.read_text() == "precious\n"


def test_new_still_writes_a_draft_in_a_fresh_year_folder(shop):
    _year_folder(shop)
    result = new(shop, "HW-0199")
    assert result.exit_code == 0, result.output
    written = shop / "builds" / YEAR / "HW-0199.yaml"
    assert written.is_file() and not written.is_symlink()
    assert "status: draft" in written.read_text()
    # its first line leads an editor from the file's folder to the schema beside records/
    first = written.read_text().splitlines()[0]
    relative = first.removeprefix("# yaml-language-server: $schema=")
    assert relative != first
    assert (written.parent / relative).resolve() == (shop.parent / "schema" / "build.schema.json").resolve()
    assert (written.parent / relative).is_file()
