"""Site build stages: sources -> docs dir (Markdown + SVG) -> mkdocs (strict) -> swap into place.

The published directory changes only when the whole build succeeded: mkdocs writes into a
temporary sibling of `out_dir`, which then replaces it by rename. A failed build removes its
temporary files and leaves the last good site exactly as it was.
"""
from __future__ import annotations

import logging
import os
import shutil
import tempfile
import uuid
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

from builder.problems import InputError, Problem
from builder.resources import data_dir
from builder.site.escape import plain
from builder.site.pages import generated_pages, method_appendix, published_statuses

PACKAGED_SITE_SRC = data_dir("site_src")
MARKER = ".fitment-site"  # written into every site we build; only such a folder is replaced
CONFIG = "mkdocs.yml"
THEME_DIR = "overrides"

Progress = Callable[[int, int], None]  # (done, total): one step per build, then mkdocs, publish


class SiteBuildError(InputError):
    """The site could not be built; the published folder was left untouched.

    An InputError, so the command line prints `path:0:0: site: message` lines and exits 1.
    """

    def __init__(self, path: str | os.PathLike, message: str, details: Sequence[str] = ()):
        super().__init__([Problem(str(path), 0, 0, "site", message)]
                         + [Problem(str(path), 0, 0, "mkdocs", d) for d in details])


def build_site(analysis: Any, out_dir: str | os.PathLike, site_src: str | os.PathLike | None = None,
               progress: Progress | None = None, include_drafts: bool = False) -> None:
    """Build the published site for `analysis` into `out_dir`: the builds whose status the
    shop's `publish` rule lists, and drafts too with `include_drafts` (an internal copy).

    site_src: a folder whose files override the packaged defaults file by file; None uses
    the `site_src/` beside the shop's records folder when there is one. progress, when
    given, is called as progress(done, total): one step per build page, then one for the
    mkdocs build and one for publishing. Raises SiteBuildError (out_dir untouched).
    """
    out = Path(out_dir).resolve()
    check_replaceable(out)
    layers = source_layers(analysis, site_src)
    steps = len(published_builds(analysis, include_drafts)) + 2
    out.parent.mkdir(parents=True, exist_ok=True)
    with tempfile.TemporaryDirectory(prefix="fitment-docs-") as work_name:
        work = Path(work_name)
        docs = write_sources(layers, work)
        per_page = None if progress is None else (lambda done, _total: progress(done, steps))
        write_generated(analysis, docs, per_page, include_drafts)
        new = Path(tempfile.mkdtemp(prefix=f".{out.name}.new-", dir=out.parent))
        try:
            run_mkdocs(work / CONFIG, docs, new, analysis.shop.rules.site_title, layers[-1])
            _tick(progress, steps - 1, steps)
            (new / MARKER).write_text("Built by fitment; `fitment site build` replaces this folder.\n")
            swap_into_place(new, out)
            _tick(progress, steps, steps)
        finally:
            shutil.rmtree(new, ignore_errors=True)


def check_replaceable(out: Path) -> None:
    """Refuse to replace anything but an empty folder or a site this tool built."""
    if not out.exists():
        return
    if not out.is_dir():
        raise SiteBuildError(out, "exists and is not a folder; not replacing it")
    if any(out.iterdir()) and not (out / MARKER).exists():
        raise SiteBuildError(out, "folder is not empty and was not built by fitment; "
                                  "not replacing it (choose another --out)")


def shop_site_src(analysis: Any, site_src: str | os.PathLike | None) -> Path:
    """The shop's own site sources: `site_src` when given, else `site_src/` beside the
    records folder (which may not exist)."""
    if site_src is not None:
        return Path(site_src)
    return Path(analysis.shop.root).resolve().parent / "site_src"


def source_layers(analysis: Any, site_src: str | os.PathLike | None) -> list[Path]:
    """Folders of site sources, later ones overriding earlier ones file by file."""
    layers = [PACKAGED_SITE_SRC]
    extra = shop_site_src(analysis, site_src)
    if extra.is_dir():
        if extra.resolve() != PACKAGED_SITE_SRC.resolve():
            layers.append(extra)
    elif site_src is not None:
        raise SiteBuildError(extra, "site sources folder not found")
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
        raise SiteBuildError(layers[-1], f"no {CONFIG} in the site sources")
    docs = work / "docs"
    docs.mkdir()
    for relative, path in sorted(chosen.items()):
        target = work / relative if relative.parts[0] in (CONFIG, THEME_DIR) else docs / relative
        target.parent.mkdir(parents=True, exist_ok=True)
        shutil.copyfile(path, target)
    return docs


def published_builds(analysis: Any, include_drafts: bool = False) -> list:
    """The builds the site shows (see pages.published_statuses)."""
    shown = published_statuses(analysis.shop.rules, include_drafts)
    return [build for build in analysis.shop.builds if build.status in shown]


def write_generated(analysis: Any, docs: Path, progress: Progress | None,
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
    """mkdocs build in strict mode; any warning or error becomes a SiteBuildError naming
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
        raise SiteBuildError(sources, f"the site build failed: {error}", collect.messages) from None
    finally:
        logger.removeHandler(collect)
        logger.propagate = propagate


def swap_into_place(new: Path, out: Path) -> None:
    """Rename the old site away, the new one into place, then delete the old one."""
    mask = os.umask(0)
    os.umask(mask)
    new.chmod(0o777 & ~mask)  # mkdtemp made it private; a published site is readable
    old = out.parent / f".{out.name}.old-{uuid.uuid4().hex[:8]}"
    had_old = out.exists()
    if had_old:
        os.rename(out, old)
    try:
        os.rename(new, out)
    except OSError:
        if had_old:
            os.rename(old, out)
        raise
    if had_old:
        shutil.rmtree(old, ignore_errors=True)


def _tick(progress: Progress | None, done: int, total: int) -> None:
    if progress is not None:
        progress(done, total)
