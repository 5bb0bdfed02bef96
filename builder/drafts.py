"""`fitment new`: start a draft record, copied from a past build or from a template.

A new file is created exclusively (never overwriting) and then validated.
"""
from __future__ import annotations

import datetime as dt
import errno
import os
import re
from pathlib import Path

from builder.fields import FIELDS
from builder.model import BUILD_ID_PATTERN
from builder.problems import PLACEHOLDER, InputError, Problem
from builder.records.writer import schema_modeline

_TOP_KEY = re.compile(r"^([A-Za-z_][A-Za-z0-9_]*)\s*:")
_DROPPED = {"measured", "outcome", "notes"}

TEMPLATE = """\
# Draft {id}: every xx below is a placeholder. Replace each one with what the parts and
# the car actually have (keep or change the unit) before trusting `fitment check`.
id: {id}
date: {date}
status: draft
technician: XX
vehicle: describe the car generically
gearbox:
  family: FAMILY
  fork_tip_moves: xx              # {fork_tip_moves} (concentric slave)
clutch:
  release_load: xx lbf            # peak load at the release bearing
  release_travel: xx in           # bearing travel for full release
  clearance: xx in                # bearing travel before it meets the fingers
fork:                             # delete for a concentric slave
  pivot_to_slave: xx in
  pivot_to_bearing: xx in
master:                           # or `part: <catalogue id>` instead of bore and stroke
  bore: xx in
  stroke: xx in
slave:
  kind: xx                        # {slave_kind}
  bore: xx in
  stroke: xx in
line:
  length: xx in
  hose: xx                        # {hose}
  fluid: xx                       # {fluid}
pedal:
  pivot_to_pad: xx in
  pivot_to_clevis: xx in
  pad_travel: xx in
"""


# the choices each template comment lists, from the field table
_TEMPLATE_CHOICES = {name: " | ".join(FIELDS[key].choices) for name, key in (
    ("fork_tip_moves", "gearbox.fork_tip_moves"), ("slave_kind", "slave.kind"), ("hose", "line.hose"),
    ("fluid", "line.fluid"))}


class LeftToFill(InputError):
    """The draft was written and reads as a record, but placeholders are left in it: its
    located problems, each saying what to fill in. `path` is the file written."""

    def __init__(self, path: Path, problems: list[Problem]):
        super().__init__(problems)
        self.path = path


def copy_inputs(text: str, new_id: str, like_id: str, today: dt.date) -> str:
    """A past record's text with a new id, today's date, status draft, no results.

    Comments and layout of the inputs are kept; the top-level blocks `measured`,
    `outcome` and `notes` are dropped and a note says where the inputs came from.
    """
    out: list[str] = []
    dropping = False
    for line in text.splitlines():
        if line.startswith("# yaml-language-server:"):
            continue
        match = _TOP_KEY.match(line)
        if match:
            key = match.group(1)
            dropping = key in _DROPPED
            if key == "id":
                line = f"id: {new_id}"
            elif key == "date":
                line = f"date: {today.isoformat()}"
            elif key == "status":
                line = "status: draft"
        elif line and not line[0].isspace() and not line.startswith("#"):
            dropping = False
        if not dropping:
            out.append(line)
    out.append("notes: |")
    out.append(f"  Proposal; inputs copied from {like_id} on {today.isoformat()}.")
    return "\n".join(out) + "\n"


def _write_new(records: Path, target: Path, text: str) -> None:
    """Create `target` (records/builds/<year>/<id>.yaml) exclusively, inside the records folder.

    The builds folder must resolve inside the records folder; the year folder is made when
    missing and must be a real folder (a link, even a dangling one, or a file there is an
    error); no link is followed at the year folder or the file (O_NOFOLLOW, O_EXCL: an
    existing name, a planted link included, is never written through).
    """
    builds_dir, year = target.parent.parent, target.parent.name
    real_records = os.path.realpath(records)
    real_builds = os.path.realpath(builds_dir)
    if not Path(real_builds).is_relative_to(real_records) or Path(real_builds) == Path(real_records):
        raise InputError([Problem(str(builds_dir), 0, 0, "folder",
                                  f"leads to {real_builds}, outside the records folder "
                                  f"{real_records}; nothing was written")])
    folder_flags = os.O_RDONLY | os.O_DIRECTORY | os.O_NOFOLLOW
    try:
        os.makedirs(real_builds, exist_ok=True)
        builds_fd = os.open(real_builds, os.O_RDONLY | os.O_DIRECTORY)
    except OSError as error:
        raise InputError([_not_a_folder(builds_dir, error)]) from None
    try:
        try:
            os.mkdir(year, dir_fd=builds_fd)
        except FileExistsError:
            pass
        except OSError as error:
            raise InputError([_not_a_folder(target.parent, error)]) from None
        try:
            year_fd = os.open(year, folder_flags, dir_fd=builds_fd)
        except OSError as error:
            raise InputError([_not_a_folder(target.parent, error)]) from None
        try:
            file_fd = os.open(target.name, os.O_WRONLY | os.O_CREAT | os.O_EXCL | os.O_NOFOLLOW,
                              0o666, dir_fd=year_fd)
        except FileExistsError:
            raise InputError([Problem(str(target), 0, 0, "id",
                                      "file already exists; nothing was written")]) from None
        except OSError as error:
            raise InputError([Problem(str(target), 0, 0, "file", f"cannot create it: "
                                      f"{error.strerror or error}; nothing was written")]) from None
        finally:
            os.close(year_fd)
    finally:
        os.close(builds_fd)
    with os.fdopen(file_fd, "w", encoding="utf-8") as handle:
        handle.write(text)


def _not_a_folder(path: Path, error: OSError) -> Problem:
    if error.errno in (errno.ELOOP, errno.EMLINK) or os.path.islink(path):
        why = (f"is a link (to {os.readlink(path)}); new records go only into real folders "
               "inside the records folder") if os.path.islink(path) else "is a loop of links"
    elif error.errno == errno.ENOTDIR:
        why = "is a file, not a folder"
    else:
        why = f"cannot be used: {error.strerror or error}"
    return Problem(str(path), 0, 0, "folder", f"{why}; nothing was written")


def create(records: Path, build_id: str, like_id: str | None,
           today: dt.date | None = None) -> Path:
    """Write records/builds/<year>/<build_id>.yaml exclusively and validate it.

    LeftToFill when the only problems are the template's placeholders (the file is written)."""
    from builder.records import load_build_file, load_shop

    today = today or dt.date.today()
    where = "new"
    if not re.fullmatch(BUILD_ID_PATTERN, build_id):  # re.match would let "AB-0123\n" through
        raise InputError([Problem(where, 0, 0, "id",
                                  f"expected an id like AB-0123 ({BUILD_ID_PATTERN}), "
                                  f"found {build_id!r}")])
    shop = load_shop(records)
    builds_dir = records / "builds"
    existing = {build.id: Path(build.path) for build in shop.builds}  # loaded, so readable
    if build_id in existing:
        raise InputError([Problem(str(existing[build_id]), 0, 0, "id",
                                  f"{build_id} already exists; nothing was written")])
    if like_id is None:
        body = TEMPLATE.format(id=build_id, date=today.isoformat(), **_TEMPLATE_CHOICES)
    elif like_id in existing:
        body = copy_inputs(existing[like_id].read_text(encoding="utf-8"), build_id, like_id, today)
    else:
        raise InputError([Problem(where, 0, 0, "like",
                                  f"no build {like_id!r} in {builds_dir}")])
    target = builds_dir / str(today.year) / f"{build_id}.yaml"
    text = f"# {schema_modeline(target, records)}\n" + body
    _write_new(records, target, text)
    try:
        load_build_file(target, shop)
    except InputError as error:
        if all(problem.code == PLACEHOLDER for problem in error.problems):
            raise LeftToFill(target, error.problems) from None
        raise
    return target
