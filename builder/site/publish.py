"""Publishing stages: sources -> docs dir (Markdown + SVG) -> mkdocs (strict) -> swap into place.

Publishing never loses a file and never leaves `out_dir` without a complete site:

- `out_dir` may not be, contain or lie inside the records folder (paths compared resolved,
  links followed), and an existing `out_dir` is replaced only when it is empty or when every
  file in it is one this tool wrote: each published site carries a manifest (MARKER) of its
  files with their sizes and SHA-256, checked before the build, again just before the swap,
  and once more on the old site before it is deleted.
- mkdocs writes into a staging folder beside `out_dir` (same file system); the finished site
  is then exchanged with the old one in one atomic renameat2(RENAME_EXCHANGE) call (Linux
  3.15+, glibc 2.28+; ext4, xfs, btrfs, tmpfs among others), so at every instant `out_dir`
  is a real folder holding a complete site, old or new, as any static host serves it. Where
  the call is unsupported, two renames are used instead; a build killed between them leaves
  the new site whole in its staging folder and the next build puts it in place.
- Every work folder (staging beside `out_dir`, docs in the temp folder) holds an owner file
  naming the folder's own device and inode, locked (flock) while its build runs. The next
  build removes such folders when their lock is free (their build is dead) and the owner
  file matches the folder: what a killed build left, and nothing else.
"""
from __future__ import annotations

import ctypes
import errno
import fcntl
import hashlib
import json
import logging
import os
import shutil
import stat
import tempfile
from collections.abc import Callable, Iterator, Sequence
from contextlib import contextmanager
from pathlib import Path
from typing import TYPE_CHECKING

from builder.problems import InputError, Problem
from builder.resources import data_dir
from builder.site.escape import plain
from builder.site.pages import generated_pages, method_appendix, published_statuses

if TYPE_CHECKING:
    from builder.history import Analysis
    from builder.model import Build

PACKAGED_SITE_SRC = data_dir("site_src")
MARKER = ".fitment-site"  # the manifest of every file a published site holds
MANIFEST_FORMAT = "fitment site manifest 1"
OWNER = ".fitment-owner"  # in every work folder: its identity, locked while its build runs
DOCS_PREFIX = "fitment-docs-"  # work folders in the temp folder: a build's docs
SERVE_PREFIX = "fitment-serve-"  # and `site serve`'s site
STAGE_INFIX = ".fitment-stage-"  # staging folders beside out_dir: .<name>.fitment-stage-XXXX
CONFIG = "mkdocs.yml"
THEME_DIR = "overrides"

Progress = Callable[[int, int], None]  # (done, total): one step per build, then mkdocs, publish


class PublishError(InputError):
    """The site could not be built; the published folder was left untouched.

    An InputError, so the command line prints `path:0:0: site: message` lines and exits 1.
    """

    def __init__(self, path: str | os.PathLike, message: str, details: Sequence[str] = ()):
        super().__init__([Problem(str(path), 0, 0, "site", message)]
                         + [Problem(str(path), 0, 0, "mkdocs", d) for d in details])


def publish_site(analysis: Analysis, out_dir: str | os.PathLike, site_src: str | os.PathLike | None = None,
               progress: Progress | None = None, include_drafts: bool = False) -> None:
    """Build the published site for `analysis` into `out_dir`: the builds whose status the
    shop's `publish` rule lists, and drafts too with `include_drafts` (an internal copy).

    site_src: a folder whose files override the packaged defaults file by file; None uses
    the `site_src/` beside the shop's records folder when there is one. progress, when
    given, is called as progress(done, total): one step per build page, then one for the
    mkdocs build and one for publishing. Raises PublishError (out_dir untouched).
    """
    out = Path(os.path.realpath(out_dir))
    check_outside_records(out, Path(analysis.shop.root))
    check_replaceable(out)
    layers = source_layers(analysis, site_src)
    steps = len(published_builds(analysis, include_drafts)) + 2
    _make_folder(out.parent)
    remove_leftovers(out)
    try:
        with work_folder(Path(tempfile.gettempdir()), DOCS_PREFIX) as work:
            docs = write_sources(layers, work)
            per_page = None if progress is None else (lambda done, _total: progress(done, steps))
            write_generated(analysis, docs, per_page, include_drafts)
            with work_folder(out.parent, f".{out.name}{STAGE_INFIX}") as stage:
                new = stage / "site"
                run_mkdocs(work / CONFIG, docs, new, analysis.shop.rules.site_title, layers[-1])
                _tick(progress, steps - 1, steps)
                write_manifest(new)
                publish(new, out)
                _tick(progress, steps, steps)
    except OSError as error:  # a folder we may not write in, a full disk: said plainly
        where = error.filename or out
        raise PublishError(where, f"could not write the site: {error.strerror or error}; "
                                    "the last site stays") from None


def check_outside_records(out: Path, records: Path) -> None:
    """Refuse an `out` that is, contains or lies inside the records folder (both resolved)."""
    real_records = Path(os.path.realpath(records))
    if out == real_records or real_records.is_relative_to(out) or out.is_relative_to(real_records):
        how = ("is the records folder" if out == real_records else
               "holds the records folder" if real_records.is_relative_to(out) else
               "lies inside the records folder")
        raise PublishError(out, f"{how} {real_records}; the site is never written there "
                                  "(choose an --out outside it)")


def check_replaceable(out: Path) -> None:
    """Refuse to replace anything but an empty folder or a site whose every file this tool
    wrote, as its manifest says (sizes and SHA-256)."""
    try:
        info = os.lstat(out)
    except (FileNotFoundError, NotADirectoryError):  # a file above it: _make_folder says so
        return
    except OSError as error:
        raise PublishError(out, f"cannot be used: {error.strerror or error}") from None
    if not stat.S_ISDIR(info.st_mode):
        raise PublishError(out, "exists and is not a folder; not replacing it")
    foreign = foreign_files(out)
    if foreign is not None:
        raise PublishError(out, foreign)


def foreign_files(folder: Path) -> str | None:
    """None when `folder` is empty or every file in it is listed, unchanged, in its manifest;
    otherwise why it may not be deleted."""
    try:
        names = os.listdir(folder)
    except OSError as error:
        return f"cannot be listed ({error.strerror or error}); not replacing it"
    if not names:
        return None
    if MARKER not in names:
        return "folder is not empty and was not built by fitment; not replacing it (choose another --out)"
    listed = read_manifest(folder)
    if listed is None:
        return (f"has a {MARKER} file but no list of the files fitment wrote there (an older "
                "fitment built it, or it was edited); not replacing it: check the folder and "
                "delete it by hand, or choose another --out")
    strangers = []
    for relative, kind in _entries(folder):
        if kind == "dir":
            continue
        if kind != "file" or relative not in listed or _fingerprint(folder / relative) != listed[relative]:
            strangers.append(relative)
            if len(strangers) == 3:
                break
    if strangers:
        return (f"folder was built by fitment but now holds files it did not write or that were "
                f"changed ({', '.join(strangers)}); not replacing it (move them, or choose another --out)")
    return None


def _entries(folder: Path) -> Iterator[tuple[str, str]]:
    """(posix path relative to folder, "dir" | "file" | "other") for everything under folder
    except the manifest, links not followed."""
    for directory, subfolders, names in os.walk(folder):
        base = Path(directory)
        for name in subfolders + names:
            path = base / name
            relative = path.relative_to(folder).as_posix()
            if relative == MARKER:
                continue
            mode = os.lstat(path).st_mode
            yield relative, ("dir" if stat.S_ISDIR(mode) else "file" if stat.S_ISREG(mode) else "other")


def _fingerprint(path: Path) -> list:
    """[size, SHA-256 hex] of a regular file."""
    digest = hashlib.sha256()
    size = 0
    with open(path, "rb") as handle:
        while chunk := handle.read(1 << 20):
            digest.update(chunk)
            size += len(chunk)
    return [size, digest.hexdigest()]


def write_manifest(site: Path) -> None:
    """List every file of a freshly built site with its size and SHA-256 in site/MARKER."""
    files = {relative: _fingerprint(site / relative) for relative, kind in _entries(site) if kind == "file"}
    document = {"format": MANIFEST_FORMAT,
                "note": "Written by fitment: `fitment site build` replaces this folder only "
                        "while every file in it is listed here unchanged.",
                "files": files}
    (site / MARKER).write_text(json.dumps(document, indent=0, sort_keys=True) + "\n", encoding="utf-8")


def read_manifest(folder: Path) -> dict[str, list] | None:
    """relative path -> [size, sha256] from folder/MARKER; None when it is not a manifest."""
    try:
        with open(folder / MARKER, "rb") as handle:
            raw = handle.read(64 << 20)
        document = json.loads(raw.decode("utf-8"))
    except (OSError, ValueError):
        return None
    if not isinstance(document, dict) or document.get("format") != MANIFEST_FORMAT:
        return None
    files = document.get("files")
    return files if isinstance(files, dict) else None


def _make_folder(folder: Path) -> None:
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as error:
        blocker = next((p for p in [folder, *folder.parents] if p.exists() and not p.is_dir()), folder)
        why = "is not a folder" if blocker != folder or folder.exists() else (error.strerror or str(error))
        raise PublishError(blocker, f"{why}; cannot put the site under it") from None


# --- work folders: owned, locked, removed by the next build when their build died ----------

@contextmanager
def work_folder(parent: Path, prefix: str) -> Iterator[Path]:
    """A new folder in `parent` holding a locked owner file; removed on the way out."""
    folder = Path(tempfile.mkdtemp(prefix=prefix, dir=parent))
    owner = None
    try:
        info = os.lstat(folder)
        owner = os.open(folder / OWNER, os.O_RDWR | os.O_CREAT | os.O_EXCL | os.O_NOFOLLOW, 0o600)
        fcntl.flock(owner, fcntl.LOCK_EX | fcntl.LOCK_NB)
        os.write(owner, json.dumps({"tool": "fitment", "pid": os.getpid(), "device": info.st_dev,
                                    "inode": info.st_ino}).encode())
        yield folder
    finally:
        shutil.rmtree(folder, ignore_errors=True)
        if owner is not None:
            os.close(owner)


def _abandoned(folder: Path) -> int | None:
    """An open, locked descriptor of folder's owner file when the folder is provably a work
    folder of this tool whose build is no longer running; else None."""
    try:
        info = os.lstat(folder)
        if not stat.S_ISDIR(info.st_mode) or info.st_uid != os.getuid():
            return None
        fd = os.open(folder / OWNER, os.O_RDONLY | os.O_NOFOLLOW)
    except OSError:
        return None
    try:
        claim = json.loads(os.read(fd, 4096).decode("utf-8"))
        ours = (isinstance(claim, dict) and claim.get("tool") == "fitment"
                and claim.get("device") == info.st_dev and claim.get("inode") == info.st_ino)
        if ours:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)  # held by a live build: OSError
            return fd
    except (OSError, ValueError):
        pass
    os.close(fd)
    return None


def remove_leftovers(out: Path) -> list[Path]:
    """Remove the work folders killed builds left beside `out` and in the temp folder,
    after putting a finished site in place when a kill left `out` without one. Returns what
    was removed."""
    removed = []
    temp = Path(tempfile.gettempdir())
    places = [(out.parent, (f".{out.name}{STAGE_INFIX}",)), (temp, (DOCS_PREFIX, SERVE_PREFIX))]
    for parent, prefixes in places:
        try:
            names = sorted(name for name in os.listdir(parent) if name.startswith(prefixes))
        except OSError:
            continue
        for name in names:
            folder = parent / name
            fd = _abandoned(folder)
            if fd is None:
                continue
            try:
                if parent == out.parent:
                    finished = folder / "site"
                    if not os.path.lexists(out) and read_manifest(finished) is not None \
                            and foreign_files(finished) is None:
                        os.rename(finished, out)  # the kill fell between the two fallback renames
                    for name in ("site", "old"):  # an old site the kill left (it has a manifest;
                        if read_manifest(folder / name) is not None:  # a half-built one has none)
                            keep_if_changed(folder / name, out)
                shutil.rmtree(folder, ignore_errors=True)
                removed.append(folder)
            finally:
                os.close(fd)
    return removed


# --- the swap ------------------------------------------------------------------------------

_AT_FDCWD = -100
_RENAME_EXCHANGE = 2  # linux/fs.h
try:
    _renameat2 = ctypes.CDLL(None, use_errno=True).renameat2
    _renameat2.argtypes = [ctypes.c_int, ctypes.c_char_p, ctypes.c_int, ctypes.c_char_p, ctypes.c_uint]
except (OSError, AttributeError):  # not Linux, or a C library older than glibc 2.28
    _renameat2 = None
_UNSUPPORTED = {errno.ENOSYS, errno.EINVAL, errno.ENOTSUP, errno.EOPNOTSUPP}


def exchange(one: Path, other: Path) -> bool:
    """Swap two paths atomically (renameat2 RENAME_EXCHANGE); False where unsupported."""
    if _renameat2 is None:
        return False
    if _renameat2(_AT_FDCWD, os.fsencode(one), _AT_FDCWD, os.fsencode(other), _RENAME_EXCHANGE) == 0:
        return True
    code = ctypes.get_errno()
    if code in _UNSUPPORTED:
        return False
    raise OSError(code, os.strerror(code), str(one), None, str(other))


def publish(new: Path, out: Path) -> None:
    """Put the finished site `new` (inside its staging folder) at `out`, the old site (if any)
    going back into the staging folder, checked against its manifest again before it is
    deleted with that folder. One build at a time per parent folder (flock)."""
    mask = os.umask(0)
    os.umask(mask)
    new.chmod(0o777 & ~mask)  # a published site is readable
    with _locked(out.parent):
        check_replaceable(out)  # again: the build took a while
        try:
            if not os.path.lexists(out):
                os.rename(new, out)
            elif not exchange(new, out):
                _swap_by_renames(new, out)
        except OSError as error:
            raise PublishError(out, f"could not put the new site in place: {error.strerror or error}; "
                                      "the last site stays") from None
    kept = keep_if_changed(new, out)  # `new` is now the old site, if there was one
    if kept is not None:
        raise PublishError(kept, f"the new site is at {out}; the old one gained or changed files "
                                   "during the build, so it was kept here instead of deleted")


def keep_if_changed(old: Path, out: Path) -> Path | None:
    """Before a staging folder is deleted: the old site in it, when it gained or changed
    files since it was checked, is moved beside `out` instead, as `<out>.kept-<staging
    folder's suffix>`. Returns where it went, or None (nothing there, or nothing changed)."""
    if not os.path.isdir(old) or foreign_files(old) is None:
        return None
    kept = out.parent / f"{out.name}.kept-{old.parent.name.rsplit('-', 1)[-1]}"
    os.rename(old, kept)
    return kept


def _swap_by_renames(new: Path, out: Path) -> None:
    """Without RENAME_EXCHANGE: the old site into the staging folder, the new one into place.
    Between the two renames `out` is missing; a build killed there is repaired by the next
    (remove_leftovers puts the finished site in place)."""
    old = new.parent / "old"
    os.rename(out, old)
    try:
        os.rename(new, out)
    except OSError:
        os.rename(old, out)
        raise
    os.rename(old, new)  # the staging folder's "site" is now the old site, as after an exchange


@contextmanager
def _locked(folder: Path) -> Iterator[None]:
    fd = os.open(folder, os.O_RDONLY | os.O_DIRECTORY)
    try:
        fcntl.flock(fd, fcntl.LOCK_EX)
        yield
    finally:
        os.close(fd)


def shop_site_src(analysis: Analysis, site_src: str | os.PathLike | None) -> Path:
    """The shop's own site sources: `site_src` when given, else `site_src/` beside the
    records folder (which may not exist)."""
    if site_src is not None:
        return Path(site_src)
    return Path(analysis.shop.root).resolve().parent / "site_src"


def source_layers(analysis: Analysis, site_src: str | os.PathLike | None) -> list[Path]:
    """Folders of site sources, later ones overriding earlier ones file by file."""
    layers = [PACKAGED_SITE_SRC]
    extra = shop_site_src(analysis, site_src)
    if extra.is_dir():
        if extra.resolve() != PACKAGED_SITE_SRC.resolve():
            layers.append(extra)
    elif site_src is not None:
        raise PublishError(extra, "site sources folder not found")
    return layers


def write_sources(layers: list[Path], work: Path) -> Path:
    """Copy the layered sources, each file once from the last layer that has it:
    mkdocs.yml and overrides/ into work, the rest into work/docs."""
    chosen: dict[Path, Path] = {}
    for layer in layers:
        for path in layer.rglob("*"):
            relative = path.relative_to(layer)
            if path.is_file() and not any(p.startswith(".") or p == "__pycache__"
                                          for p in relative.parts):
                chosen[relative] = path
    if Path(CONFIG) not in chosen:
        raise PublishError(layers[-1], f"no {CONFIG} in the site sources")
    docs = work / "docs"
    docs.mkdir()
    for relative, path in sorted(chosen.items()):
        target = work / relative if relative.parts[0] in (CONFIG, THEME_DIR) else docs / relative
        target.parent.mkdir(parents=True, exist_ok=True)
        shutil.copyfile(path, target)
    return docs


def published_builds(analysis: Analysis, include_drafts: bool = False) -> list[Build]:
    """The builds the site shows (see pages.published_statuses)."""
    shown = published_statuses(analysis.shop.rules, include_drafts)
    return [build for build in analysis.shop.builds if build.status in shown]


def write_generated(analysis: Analysis, docs: Path, progress: Progress | None,
                    include_drafts: bool = False) -> None:
    """Generated pages and pictures go over the sources; the method page gets the
    calibration and similarity sections from the history module."""
    made: set[Path] = set()
    for relative, text in generated_pages(analysis, progress, include_drafts):
        target = docs / relative
        if target.parent not in made:
            target.parent.mkdir(parents=True, exist_ok=True)
            made.add(target.parent)
        target.write_text(text, encoding="utf-8")
    method = docs / "method.md"
    if method.exists():
        with method.open("a", encoding="utf-8") as handle:
            handle.write(method_appendix())


class _Collect(logging.Handler):
    def __init__(self) -> None:
        super().__init__(logging.WARNING)
        self.messages: list[str] = []

    def emit(self, record: logging.LogRecord) -> None:
        self.messages.append(f"{record.levelname.lower()}: {record.getMessage()}")


def run_mkdocs(config_file: Path, docs: Path, site_dir: Path, site_name: str | None,
               sources: Path) -> None:
    """mkdocs build in strict mode; any warning or error becomes a PublishError naming
    the site sources folder."""
    from mkdocs.commands.build import build
    from mkdocs.config import load_config
    from mkdocs.exceptions import Abort, MkDocsException

    logger = logging.getLogger("mkdocs")
    collect, propagate = _Collect(), logger.propagate
    logger.addHandler(collect)
    logger.propagate = False  # keep mkdocs' own chatter off the terminal; errors come back to us
    try:
        title = plain(site_name or "")
        overrides = {"site_name": title} if title else {}
        config = load_config(config_file=str(config_file), docs_dir=str(docs),
                             site_dir=str(site_dir), strict=True, **overrides)
        config.plugins.on_startup(command="build", dirty=False)
        try:
            build(config)
        finally:
            config.plugins.on_shutdown()
    except (Abort, MkDocsException) as error:
        raise PublishError(sources, f"the site build failed: {error}", collect.messages) from None
    finally:
        logger.removeHandler(collect)
        logger.propagate = propagate


def _tick(progress: Progress | None, done: int, total: int) -> None:
    if progress is not None:
        progress(done, total)
