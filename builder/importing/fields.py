"""Which record fields a spreadsheet column can fill: record_fields() is the only place the
importer learns what fields exist, their kind, dimension, plausible range and choices.

It reads the records package's field declaration and the build schema; when that
declaration moves, only record_fields() changes.
"""
from __future__ import annotations

import functools
from dataclasses import dataclass

TEXT, CHOICE, QUANTITY, PART, LIST = "text", "choice", "quantity", "part", "list"
SPECIAL = ("id", "date", "status")  # the map's own top-level keys, not `fields` entries


@dataclass(frozen=True, slots=True)
class FieldSpec:
    """One record field as the importer sees it."""

    path: str  # "master.bore", "notes", "master.part"
    kind: str  # TEXT | CHOICE | QUANTITY | PART | LIST (a list or a point: not from one cell)
    section: str | None = None  # "master"; None for a top-level field
    dimension: str | None = None  # QUANTITY: a builder.units dimension
    low: float | None = None  # QUANTITY: plausible range, SI
    high: float | None = None
    signed: bool = False
    choices: tuple[str, ...] = ()  # CHOICE (and the build statuses)
    catalogue: str | None = None  # PART: the catalogue kind, e.g. "masters"
    optional_section: bool = False  # the section may be left out of a record (fork, measured)


@functools.cache
def record_fields() -> dict[str, FieldSpec]:
    """Every build field a cell may fill, keyed by its dotted path, in record order (`status`
    included; `id` and `date` have rules of their own in the map).

    Read from builder.records.fields (sections, kinds, plausible ranges) and the build
    schema (top-level text fields, choices, which sections are required).
    """
    from builder.records import fields as declared
    from builder.records._schema import schema

    build = schema("build")
    required = set(build.get("required", ()))
    specs: dict[str, FieldSpec] = {}
    for name, node in build["properties"].items():
        if name == "status":
            specs[name] = FieldSpec(name, CHOICE, choices=tuple(node["enum"]))
            continue
        if name in SPECIAL:
            continue
        if name not in declared.SECTION_FIELDS:
            specs[name] = FieldSpec(name, TEXT)  # technician, vehicle, outcome, notes
            continue
        optional = name not in required
        properties = node.get("properties", {})
        if "part" in properties and name in declared.CATALOGUE_KIND:
            specs[f"{name}.part"] = FieldSpec(f"{name}.part", PART, name, catalogue=declared.CATALOGUE_KIND[name],
                                              optional_section=optional)
        for key, kind in declared.SECTION_FIELDS[name].items():
            path = f"{name}.{key}"
            if kind == declared.QUANTITY:
                dimension, low, high = declared.PLAUSIBLE[path]
                spec = FieldSpec(path, QUANTITY, name, dimension, low, high, low < 0, optional_section=optional)
            elif kind == declared.CHOICE:
                spec = FieldSpec(path, CHOICE, name, choices=tuple(properties[key]["enum"]), optional_section=optional)
            elif kind == declared.TEXT:
                spec = FieldSpec(path, TEXT, name, optional_section=optional)
            else:
                spec = FieldSpec(path, LIST, name, optional_section=optional)
            specs[path] = spec
    return specs

