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

    Read from builder.fields, the one declaration of every record field.
    """
    from builder import fields as declared

    kinds = {declared.QUANTITY: QUANTITY, declared.TEXT: TEXT, declared.NAME: TEXT, declared.CHOICE: CHOICE}
    specs: dict[str, FieldSpec] = {}

    def add(field, section=None, optional=False):
        kind = kinds.get(field.kind, LIST)
        if kind == QUANTITY:
            low, high = field.bounds
            specs[field.key] = FieldSpec(field.key, QUANTITY, section, field.dimension, low, high, field.signed,
                                         optional_section=optional)
        else:
            specs[field.key] = FieldSpec(field.key, kind, section, choices=tuple(field.choices),
                                         optional_section=optional)

    for field in declared.TOP_FIELDS:
        if field.key not in SPECIAL or field.key == "status":
            add(field)
    for section in declared.SECTIONS:
        if section.catalogue:
            key = f"{section.name}.part"
            specs[key] = FieldSpec(key, PART, section.name, catalogue=section.catalogue,
                                   optional_section=section.optional)
        for field in section.fields:
            add(field, section.name, section.optional)
    for field in declared.END_FIELDS:
        add(field)
    return specs
