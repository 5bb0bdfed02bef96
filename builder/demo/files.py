"""The demo shop as record files: sections and records as written, their YAML text, and
the round trip through the records loader (the generator sizes what the loader reads)."""
from __future__ import annotations

import dataclasses
import datetime as dt
import functools
from dataclasses import dataclass, field
from pathlib import Path

from builder import model as m
from builder.demo.catalogue import CATALOGUE, PARTS, SHOP, SHOP_COMMENTS, Q
from builder.records import parse_build, parse_catalogue, parse_rules
from builder.records import writer
from builder.records.convert import merge


@dataclass
class Section:
    """A build section as written: optional catalogue id, then fields (overrides or inline)."""

    part: str | None = None
    fields: dict = field(default_factory=dict)  # key -> Q | str | tuple | dict
    comments: dict = field(default_factory=dict)  # key -> trailing comment

    def resolved(self) -> dict:
        """The catalogue part's fields, if any, with this section's on top, merged as loaded."""
        return merge(PARTS[self.part].fields if self.part else {}, self.fields)


@dataclass
class Record:
    id: str
    date: dt.date
    status: str
    technician: str
    vehicle: str
    sections: dict  # gearbox, clutch, fork (None for concentric), master, slave, line, pedal
    measured: dict | None = None
    outcome: str | None = None
    notes: str | None = None

    @property
    def family(self) -> str:
        return self.sections["gearbox"].resolved()["family"]

def _written(value):
    """A value as the writer takes it: quantities as their text, pairs and mappings inside."""
    if isinstance(value, Q):
        return value.text
    if isinstance(value, dict):
        return {key: _written(item) for key, item in value.items()}
    if isinstance(value, (tuple, list)):
        return [_written(item) for item in value]
    return value


def _document(schema: str, depth: int, values: dict, comments: dict | None = None,
              header: str | None = None) -> str:
    """A record file: the editor's schema line, an optional header comment, the values."""
    modeline = f"yaml-language-server: $schema={'../' * depth}schema/{schema}.schema.json"
    text = writer.dump(_written(values), modeline=modeline, comments=comments)
    if header is None:
        return text
    first, rest = text.split("\n", 1)
    return f"{first}\n# {header}\n{rest}"


def shop_text() -> str:
    comments = {(key,): comment for key, comment in SHOP_COMMENTS.items()}
    return _document("shop", 1, SHOP, comments,
                     "Invented demo shop: every name and number here is made up.")


def parts_text(kind: str) -> str:
    parts = [{"id": entry.id, "label": entry.label} | entry.fields for entry in CATALOGUE[kind]]
    return _document("parts", 2, {"kind": kind, "parts": parts},
                     header=f"Invented demo catalogue: {kind}.")


def build_text(rec: Record) -> str:
    values: dict = {"id": rec.id, "date": rec.date, "status": rec.status,
                    "technician": rec.technician, "vehicle": rec.vehicle}
    comments: dict = {}
    for key, section in rec.sections.items():
        if section is not None:
            values[key] = ({"part": section.part} if section.part else {}) | section.fields
            comments |= {(key, name): comment for name, comment in section.comments.items()}
    if rec.measured:
        values["measured"] = rec.measured
    if rec.outcome:
        values["outcome"] = rec.outcome
    if rec.notes:
        values["notes"] = rec.notes
    return _document("build", 3, values, comments)


def build_path(rec: Record) -> str:
    """Where a build's file goes, relative to the records folder."""
    return f"builds/{rec.date.year}/{rec.id}.yaml"


def rules_files() -> dict[str, str]:
    """Relative path -> text of shop.yaml and the parts catalogue."""
    return {"shop.yaml": shop_text()} | {
        f"parts/{kind}.yaml": parts_text(kind) for kind in m.PART_KINDS}


@functools.cache
def rules() -> m.ShopRules:
    """The demo's shop rules as the records loader reads shop.yaml."""
    return parse_rules(shop_text())


@functools.cache
def catalogue() -> dict[str, dict[str, m.Part]]:
    """The demo catalogue as the records loader reads the parts files."""
    return parse_catalogue({kind: parts_text(kind) for kind in m.PART_KINDS})


def load(rec: Record) -> m.Build:
    """The record as the engine sees it: its text, read back by the records loader. Before
    its measured section exists a record is read as a draft (the engine never reads status)."""
    if rec.measured is None:
        rec = dataclasses.replace(rec, status="draft")
    return parse_build(build_text(rec), catalogue(), build_path(rec), stem=rec.id)


def write_files(out_dir: Path, files: dict[str, str]) -> list[Path]:
    """Write each relative path's text under out_dir, making folders as needed."""
    written, folders = [], set()
    for rel, text in files.items():
        path = out_dir / rel
        if path.parent not in folders:
            path.parent.mkdir(parents=True, exist_ok=True)
            folders.add(path.parent)
        path.write_text(text, encoding="utf-8", newline="\n")
        written.append(path)
    return written
