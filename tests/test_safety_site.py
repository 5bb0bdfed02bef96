"""Issue 10, publishing: `site build` never deletes what it did not write, never writes into
records/, and leaves a complete site at --out at every instant, even when killed.

Kills are real: the command runs in its own process with a pause injected at a step (after
mkdocs, after the swap, between the two renames of the fallback), receives SIGKILL there,
and --out is then checked by its content: every build page present, every file listed in
the site's manifest present with its size and SHA-256 (hashlib, FIPS 180-4).
"""
from __future__ import annotations

import fcntl
import hashlib
import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from builder.site import PublishError, publish_site
from builder.site import publish as site_publish
from site_shops import analysis
from clitools import assert_refused, copy_demo_shop, invoke

ROOT = Path(__file__).resolve().parents[1]
KEEP = 6  # builds kept in the copied shop: enough for every page kind, quick to build


# --- shop and checks ----------------------------------------------------------------------------

@pytest.fixture
def shop(tmp_path: Path, monkeypatch) -> Path:
    """A small copy of the demo shop (records/ and schema/), its folder the working directory,
    and a private temp folder (where killed builds leave their docs folders)."""
    copy_demo_shop(tmp_path)
    builds = sorted((tmp_path / "records" / "builds").rglob("*.yaml"))
    for extra in builds[KEEP:]:
        extra.unlink()
    temp = tmp_path / "temp"
    temp.mkdir()
    monkeypatch.setattr("tempfile.tempdir", str(temp))
    monkeypatch.chdir(tmp_path)
    return tmp_path / "records"


def build_ids(records: Path) -> list[str]:
    return sorted(p.stem for p in (records / "builds").rglob("*.yaml"))


def tree(folder: Path) -> dict[str, str]:
    """Every file under folder (links not followed) -> SHA-256."""
    return {str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
            for p in sorted(folder.rglob("*")) if p.is_file() and not p.is_symlink()}


def assert_complete_site(out: Path, records: Path) -> None:
    """A real folder with the home page, search index and a page per build, and every file of
    its manifest present and unchanged."""
    assert out.is_dir() and not out.is_symlink(), out
    assert (out / "index.html").is_file() and (out / "search" / "search_index.json").is_file()
    for build_id in build_ids(records):
        assert (out / "builds" / build_id / "index.html").is_file(), build_id
    manifest = json.loads((out / ".fitment-site").read_text())
    assert manifest["files"]
    for relative, (size, digest) in manifest["files"].items():
        data = (out / relative).read_bytes()
        assert (len(data), hashlib.sha256(data).hexdigest()) == (size, digest), relative


# --- never into records/, never over what it did not write -------------------------------------

def test_out_dot_beside_records_with_a_marker_is_refused(shop):
    # The case: a `.fitment-site` file in the folder that holds records/ and
    # `--out .` deleted records/.
    (shop.parent / ".fitment-site").write_text("Built by fitment\n")
    before = tree(shop)
    assert_refused(invoke(shop, "site", "build", "--out", "."), "holds the records folder")
    assert tree(shop) == before


@pytest.mark.parametrize("out", ["records", "records/site", "records/builds/site", "records/builds"])
def test_out_in_or_at_records_is_refused_and_nothing_is_written_there(shop, out):
    (shop / ".fitment-site").write_text("Built by fitment\n")  # a marker is not trusted
    before = tree(shop)
    result = invoke(shop, "site", "build", "--out", out)
    assert_refused(result, "records folder")
    assert tree(shop) == before
    assert sorted(p.name for p in shop.parent.iterdir()) == ["records", "schema", "temp"]


def test_out_reaching_records_through_links_is_refused(shop):
    (shop.parent / "to-records").symlink_to(shop, target_is_directory=True)
    (shop.parent / "publish").symlink_to(shop / "builds", target_is_directory=True)
    before = tree(shop)
    assert_refused(invoke(shop, "site", "build", "--out", "to-records"), "is the records folder")
    assert_refused(invoke(shop, "site", "build", "--out", "publish/site"), "inside the records folder")
    assert_refused(invoke(shop, "site", "build", "--out", "to-records/.."), "holds the records folder")
    assert tree(shop) == before


def test_a_site_with_a_file_added_or_changed_is_not_replaced(tmp_path):
    result = analysis(2, root=str(tmp_path / "records"))
    out = tmp_path / "site"
    publish_site(result, out)
    (out / "keep.txt").write_text("precious")
    with pytest.raises(PublishError, match="did not write or that were changed"):
        publish_site(result, out)
    assert (out / "keep.txt").read_text() == "precious"
    (out / "keep.txt").unlink()
    page = out / "index.html"
    page.write_text(page.read_text() + "<!-- my edit -->")
    with pytest.raises(PublishError, match="index.html"):
        publish_site(result, out)
    assert "my edit" in page.read_text()


def test_a_marker_alone_is_not_trusted(tmp_path):
    out = tmp_path / "site"
    out.mkdir()
    (out / ".fitment-site").write_text("Built by fitment; `fitment site build` replaces this folder.\n")
    (out / "report.pdf").write_bytes(b"%PDF precious")
    with pytest.raises(PublishError, match="no list of the files fitment wrote"):
        publish_site(analysis(2, root=str(tmp_path / "records")), out)
    assert (out / "report.pdf").read_bytes() == b"%PDF precious"


def test_a_forged_manifest_does_not_cover_a_file_it_does_not_list(tmp_path):
    out = tmp_path / "site"
    out.mkdir()
    (out / ".fitment-site").write_text(json.dumps({"format": site_publish.MANIFEST_FORMAT, "files": {}}))
    (out / "keep.txt").write_text("precious")
    with pytest.raises(PublishError, match="keep.txt"):
        publish_site(analysis(2, root=str(tmp_path / "records")), out)
    assert (out / "keep.txt").read_text() == "precious"


def test_an_unchanged_site_is_replaced_and_stays_a_real_folder(tmp_path):
    result = analysis(2, root=str(tmp_path / "records"))
    out = tmp_path / "site"
    publish_site(result, out)
    first = out.stat().st_ino
    publish_site(result, out)
    assert out.is_dir() and not out.is_symlink() and out.stat().st_ino != first
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]  # the old one is gone


def test_out_under_a_file_is_a_plain_error(shop):
    Path("afile").write_text("not a folder\n")
    result = invoke(shop, "site", "build", "--out", "afile/site")
    assert_refused(result, "afile:0:0: site: is not a folder")
    assert Path("afile").read_text() == "not a folder\n"


# --- killed builds ------------------------------------------------------------------------------

RUNNER = r"""
import os, sys, time, pathlib
import builder.site.publish as site_publish
records, out, ready, point = sys.argv[1:5]
out = os.path.abspath(out)

def pause():
    pathlib.Path(ready).write_text(point)
    time.sleep(600)

if point == "after-mkdocs":
    run_mkdocs = site_publish.run_mkdocs
    def paused_mkdocs(*args, **kwargs):
        run_mkdocs(*args, **kwargs)
        pause()
    site_publish.run_mkdocs = paused_mkdocs
else:  # stop right after any step that moves --out: a rename or an exchange
    if point == "no-exchange" and hasattr(site_publish, "exchange"):
        site_publish.exchange = lambda one, other: False
    rename = os.rename
    def paused_rename(src, dst, *args, **kwargs):
        rename(src, dst, *args, **kwargs)
        if out in (os.path.abspath(src), os.path.abspath(dst)):
            pause()
    os.rename = paused_rename
    if hasattr(site_publish, "exchange") and point != "no-exchange":
        exchange = site_publish.exchange
        def paused_exchange(one, other):
            done = exchange(one, other)
            pause()
            return done
        site_publish.exchange = paused_exchange

from builder.cli import main
sys.argv = ["fitment", "--records", records, "site", "build", "--out", out]
main()
"""


def killed_build(records: Path, out: Path, point: str) -> None:
    """Run `site build` in a process paused at `point`, then SIGKILL it there."""
    ready = records.parent / f"ready-{point}"
    env = dict(os.environ, TMPDIR=str(records.parent / "temp"), PYTHONPATH=str(ROOT))
    process = subprocess.Popen([sys.executable, "-c", RUNNER, str(records), str(out), str(ready), point],
                               cwd=records.parent, env=env, stdout=subprocess.PIPE, stderr=subprocess.STDOUT)
    try:
        deadline = time.monotonic() + 240
        while not ready.exists():  # a bound on waiting, not a timing assertion
            assert process.poll() is None, process.stdout.read().decode()
            assert time.monotonic() < deadline, "the build never reached the pause"
            time.sleep(0.1)
    finally:
        process.send_signal(signal.SIGKILL)
        process.wait(timeout=60)
    ready.unlink()


def leftovers(records: Path, out: Path) -> list[str]:
    beside = [p.name for p in out.parent.iterdir() if p.name.startswith(f".{out.name}.")]
    temp = [p.name for p in (records.parent / "temp").iterdir()]
    return beside + temp


@pytest.mark.parametrize("point", ["after-mkdocs", "after-swap"])
def test_a_build_killed_at_any_step_leaves_a_complete_site_and_the_next_removes_its_leftovers(shop, point):
    out = shop.parent / "published"
    assert invoke(shop, "site", "build", "--out", str(out)).exit_code == 0
    old = tree(out)
    record = shop / "builds" / "2023" / "HW-0102.yaml"  # a change, so the new site differs
    record.write_text(record.read_text().replace("\noutcome: ", "\noutcome: second edition, ", 1))
    killed_build(shop, out, point)
    assert_complete_site(out, shop)
    assert tree(out) == old if point == "after-mkdocs" else tree(out) != old
    assert leftovers(shop, out)  # what the kill left: a staging folder, a docs folder
    assert invoke(shop, "site", "build", "--out", str(out)).exit_code == 0
    assert_complete_site(out, shop)
    assert leftovers(shop, out) == []


def test_without_the_atomic_exchange_the_next_build_repairs_a_kill_between_renames(shop):
    # The fallback's one window: --out is missing between its two renames. The new site is
    # then whole in its staging folder, and the next build puts it in place first.
    out = shop.parent / "published"
    assert invoke(shop, "site", "build", "--out", str(out)).exit_code == 0
    killed_build(shop, out, "no-exchange")
    assert not out.exists()
    removed = site_publish.remove_leftovers(out)
    assert_complete_site(out, shop)
    assert removed and leftovers(shop, out) == []


def test_the_exchange_is_used_where_the_kernel_has_it(tmp_path):
    one, other = tmp_path / "one", tmp_path / "other"
    one.mkdir()
    other.mkdir()
    (one / "a").write_text("a")
    if not site_publish.exchange(one, other):
        pytest.skip("renameat2(RENAME_EXCHANGE) unsupported here; the fallback is tested above")
    assert (other / "a").read_text() == "a" and not (one / "a").exists()


# --- only what it can prove is its own -----------------------------------------------------------

def test_leftover_cleaning_removes_only_provably_abandoned_work_folders(shop, tmp_path):
    out = shop.parent / "published"
    temp = shop.parent / "temp"
    # not ours: no owner file; an owner file copied from elsewhere (other inode); a live build
    plain = out.parent / f".published{site_publish.STAGE_INFIX}plain"
    plain.mkdir()
    (plain / "precious.txt").write_text("precious")
    copied = temp / f"{site_publish.DOCS_PREFIX}copied"
    copied.mkdir()
    (copied / site_publish.OWNER).write_text(json.dumps({"tool": "fitment", "pid": 1, "device": 0, "inode": 0}))
    (copied / "precious.txt").write_text("precious")
    with site_publish.work_folder(temp, site_publish.DOCS_PREFIX) as live:
        (live / "working.txt").write_text("busy")
        # ours and abandoned: an owner file naming its own folder, lock free
        dead = temp / f"{site_publish.DOCS_PREFIX}dead"
        dead.mkdir()
        info = dead.stat()
        (dead / site_publish.OWNER).write_text(json.dumps(
            {"tool": "fitment", "pid": 1, "device": info.st_dev, "inode": info.st_ino}))
        assert invoke(shop, "site", "build", "--out", str(out)).exit_code == 0
        assert not dead.exists()
        assert (live / "working.txt").read_text() == "busy"
    assert (plain / "precious.txt").read_text() == "precious"
    assert (copied / "precious.txt").read_text() == "precious"


def test_a_held_lock_marks_a_live_build(tmp_path):
    with site_publish.work_folder(tmp_path, site_publish.DOCS_PREFIX) as folder:
        assert site_publish._abandoned(folder) is None
        with open(folder / site_publish.OWNER) as handle:
            with pytest.raises(OSError):
                fcntl.flock(handle, fcntl.LOCK_EX | fcntl.LOCK_NB)
    assert not folder.exists()


def test_a_parent_folder_that_cannot_be_written_is_a_plain_error(shop, monkeypatch):
    # As root every folder is writable: the refusal is simulated where the work folder is made.
    real_mkdtemp = site_publish.tempfile.mkdtemp

    def mkdtemp(prefix=None, dir=None, **kwargs):
        if prefix and prefix.startswith(".published"):
            raise PermissionError(13, "Permission denied", str(dir))
        return real_mkdtemp(prefix=prefix, dir=dir, **kwargs)

    monkeypatch.setattr(site_publish.tempfile, "mkdtemp", mkdtemp)
    result = invoke(shop, "site", "build", "--out", "published")
    assert_refused(result, "site: could not write the site: Permission denied")
    assert not Path("published").exists()


def test_a_file_written_into_the_old_site_during_the_swap_is_kept_not_deleted(tmp_path, monkeypatch):
    # A file that reaches the old site after its last check (here: just as it is swapped out)
    # is found by the check before deletion; the old site is set aside whole, and said so.
    result = analysis(2, root=str(tmp_path / "records"))
    out = tmp_path / "site"
    publish_site(result, out)
    real_exchange = site_publish.exchange

    def exchange_then_write(one, other):
        done = real_exchange(one, other)
        if not done:
            pytest.skip("renameat2(RENAME_EXCHANGE) unsupported here")
        (one / "late.txt").write_text("precious")  # `one` now holds the old site
        return done

    monkeypatch.setattr(site_publish, "exchange", exchange_then_write)
    with pytest.raises(PublishError, match="kept here instead of deleted") as caught:
        publish_site(result, out)
    kept = Path(caught.value.problems[0].path)
    assert (kept / "late.txt").read_text() == "precious"
    assert (out / "index.html").is_file() and not (out / "late.txt").exists()


def test_an_old_site_changed_then_left_by_a_killed_build_is_kept_not_deleted(shop):
    # A build killed right after the swap leaves the old site in its staging folder, where
    # the next build finds it. A file that reached it is kept, as after a live swap.
    out = shop.parent / "published"
    assert invoke(shop, "site", "build", "--out", str(out)).exit_code == 0
    killed_build(shop, out, "after-swap")
    [stage] = [p for p in out.parent.iterdir() if p.name.startswith(f".{out.name}.")]
    (stage / "site" / "late.txt").write_text("precious")
    assert invoke(shop, "site", "build", "--out", str(out)).exit_code == 0
    assert_complete_site(out, shop)
    kept = [p / "late.txt" for p in out.parent.iterdir() if p.name.startswith(f"{out.name}.kept-")]
    assert [p.read_text() for p in kept] == ["precious"]
    assert leftovers(shop, out) == []


def test_a_file_written_into_the_site_during_the_build_stops_the_swap(tmp_path, monkeypatch):
    # The site is checked again, under the lock, just before the swap: a file that reached
    # it while mkdocs ran leaves the old site in place, untouched, and nothing is set aside.
    result = analysis(2, root=str(tmp_path / "records"))
    out = tmp_path / "site"
    publish_site(result, out)
    before = tree(out)
    real_mkdocs = site_publish.run_mkdocs

    def mkdocs_then_write(*args, **kwargs):
        real_mkdocs(*args, **kwargs)
        (out / "notes.txt").write_text("precious")

    monkeypatch.setattr(site_publish, "run_mkdocs", mkdocs_then_write)
    with pytest.raises(PublishError, match=r"did not write or that were changed \(notes.txt\)"):
        publish_site(result, out)
    assert tree(out) == before | {"notes.txt": hashlib.sha256(b"precious").hexdigest()}
    assert sorted(p.name for p in tmp_path.iterdir()) == ["site"]
