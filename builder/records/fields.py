"""Record fields: their dimensions, plausible ranges, and conversion to builder.model sections.

PLAUSIBLE is the table of accepted ranges, keyed by field path. The ranges are sanity limits
for passenger-car and light-truck clutch hydraulics (common practice, no source): they catch
typing slips such as `75 in` for a bore, `0 in` or a value in the wrong unit, not bad designs.
"""
from __future__ import annotations

import dataclasses
import datetime as _dt
import functools
import math
import re

from builder import model
from builder.problems import Problem
from builder.records._schema import dotted, quantity_message, quantity_patterns, schema
from builder.records._yaml import Located, NeedsCare
from builder.units import QuantityError, check_range, parse_quantity, show

# field path -> (dimension, lowest, highest); a negative lowest allows negative values
_RANGES: dict[str, tuple[str, str, str]] = {
    "clutch.release_load": ("force", "100 N", "20 kN"),
    "clutch.release_travel": ("length", "1 mm", "30 mm"),
    "clutch.clearance": ("length", "0 mm", "20 mm"),
    "clutch.load_curve.travel": ("length", "0 mm", "60 mm"),
    "clutch.load_curve.load": ("force", "0 N", "20 kN"),
    "fork.pivot_to_slave": ("length", "10 mm", "600 mm"),
    "fork.pivot_to_bearing": ("length", "10 mm", "600 mm"),
    "master.bore": ("length", "3 mm", "60 mm"),
    "master.stroke": ("length", "3 mm", "100 mm"),
    "master.rated_pressure": ("pressure", "0.5 MPa", "50 MPa"),
    "slave.bore": ("length", "3 mm", "100 mm"),
    "slave.piston_area": ("area", "10 mm^2", "10000 mm^2"),
    "slave.stroke": ("length", "3 mm", "100 mm"),
    "slave.rated_pressure": ("pressure", "0.5 MPa", "50 MPa"),
    "line.length": ("length", "50 mm", "10 m"),
    "pedal.pivot_to_pad": ("length", "50 mm", "1000 mm"),
    "pedal.pivot_to_clevis": ("length", "5 mm", "300 mm"),
    "pedal.pad_travel": ("length", "10 mm", "400 mm"),
    "pedal.layout.point": ("length", "-2 m", "2 m"),
    "pedal.layout.rotation_to_stop": ("angle", "1 deg", "90 deg"),
    "measured.pedal_effort": ("force", "5 N", "2 kN"),
    "measured.slave_travel": ("length", "0 mm", "100 mm"),
    "measured.pad_travel_to_release": ("length", "0 mm", "400 mm"),
    "measured.floor_gap": ("length", "0 mm", "400 mm"),
    "shop.effort_band": ("force", "10 N", "1 kN"),
    "shop.min_travel_margin": ("fraction", "0 %", "100 %"),
    "shop.latest_release_point": ("fraction", "10 %", "100 %"),
    "shop.default_efficiency": ("fraction", "10 %", "100 %"),
    "shop.hose_expansion": ("hose_expansion", "0 mL/m/MPa", "10 mL/m/MPa"),
    "shop.fluid_bulk_modulus": ("pressure", "0.1 GPa", "10 GPa"),
    "shop.line_bore": ("length", "1 mm", "20 mm"),
    "shop.max_pushrod_angle": ("angle", "0.5 deg", "45 deg"),
}
PLAUSIBLE: dict[str, tuple[str, float, float]] = {
    key: (dimension, parse_quantity(low, dimension, signed=True), parse_quantity(high, dimension))
    for key, (dimension, low, high) in _RANGES.items()
}
# PLAUSIBLE key -> search of the schema pattern a string for that field must match
_FORMS = {
    key: re.compile(quantity_patterns("build")["fraction" if dimension == "fraction" else
                                        f"signed_{dimension}" if low < 0 else dimension]).search
    for key, (dimension, low, high) in PLAUSIBLE.items()
}
_accepted: dict[tuple[str, str], float] = {}  # (text, PLAUSIBLE key) -> SI: the one bounded memo of values
_MAX_ACCEPTED = 16_384


class Reporter:
    """Collects located problems for one file; on the fast path (no positions) it raises NeedsCare.

    `bad` holds the paths the schema already reported; conversion skips them, and a later
    problem for a field that already has one is dropped, so each mistake is said once.
    """

    def __init__(self, path: str, doc: Located | None = None):
        self.path = path
        self.doc = doc
        self.problems: list[Problem] = []
        self.bad: list[tuple] = []

    def __call__(self, where: tuple, message: str, *, at_key: bool = False, field: str | None = None) -> None:
        if self.doc is None:
            raise NeedsCare
        field = field or dotted(where)
        if any(problem.field == field for problem in self.problems):
            return
        line, col = self.doc.where(where, at_key)
        self.problems.append(Problem(self.path, line, col, field, message))

    def blocked(self, where: tuple) -> bool:
        """A schema problem sits at `where` or above it."""
        return bool(self.bad) and any(where[: len(bad)] == bad for bad in self.bad)

    def clean(self, where: tuple) -> bool:
        """No schema problem at, above or below `where`."""
        return not self.bad or not any(where[: len(bad)] == bad or bad[: len(where)] == where for bad in self.bad)


TEXT, CHOICE, QUANTITY, CURVE, LAYOUT = "text", "choice", "quantity", "curve", "layout"
SECTION_FIELDS: dict[str, dict[str, str]] = {
    "gearbox": {"family": TEXT, "variant": TEXT, "fork_tip_moves": CHOICE},
    "clutch": {"release_load": QUANTITY, "release_travel": QUANTITY, "clearance": QUANTITY, "load_curve": CURVE},
    "fork": {"pivot_to_slave": QUANTITY, "pivot_to_bearing": QUANTITY},
    "master": {"bore": QUANTITY, "stroke": QUANTITY, "rated_pressure": QUANTITY},
    "slave": {"kind": CHOICE, "bore": QUANTITY, "piston_area": QUANTITY, "stroke": QUANTITY,
              "rated_pressure": QUANTITY, "bracket": TEXT},
    "line": {"length": QUANTITY, "hose": CHOICE, "fluid": CHOICE},
    "pedal": {"pivot_to_pad": QUANTITY, "pivot_to_clevis": QUANTITY, "pad_travel": QUANTITY,
              "pushrod": TEXT, "layout": LAYOUT},
    "measured": {"pedal_effort": QUANTITY, "slave_travel": QUANTITY, "pad_travel_to_release": QUANTITY,
                 "floor_gap": QUANTITY, "method": TEXT},
}
SECTION_CLASS = {
    "gearbox": model.Gearbox, "clutch": model.Clutch, "fork": model.Fork, "master": model.Master,
    "slave": model.Slave, "line": model.Line, "pedal": model.Pedal, "measured": model.Measured,
}
_CLASS_FIELDS = {cls: tuple(f.name for f in dataclasses.fields(cls)) for cls in SECTION_CLASS.values()}
CATALOGUE_KIND = {"gearbox": "gearboxes", "clutch": "clutches", "master": "masters", "slave": "slaves",
                  "pedal": "pedals"}
SECTION_OF_KIND = {kind: section for section, kind in CATALOGUE_KIND.items()}


def _required(section: str) -> tuple[str, ...]:
    """Keys a section written out in full needs, as the build schema says: its `required`, or
    those of its anyOf branch other than {part} (the either-or keys are make_section's)."""
    node = schema("build")["properties"][section]
    inline = [branch for branch in node.get("anyOf", ()) if branch["required"] != ["part"]]
    return tuple((inline[0] if inline else node).get("required", ()))


_REQUIRED = {section: _required(section) for section in SECTION_FIELDS}
_ALTERNATIVES = {"bore": "piston_area", "piston_area": "bore"}  # a slave gives one of the two
_LAYOUT_POINTS = ("pivot", "pad", "clevis", "pushrod_seat")
_DISTINCT_POINTS = (("pivot", "pad"), ("pivot", "clevis"), ("clevis", "pushrod_seat"))
_LEAST_DISTANCE = 1e-3  # m


def quantity(value: object, key: str, report: Reporter, where: tuple) -> float | None:
    """Convert one quantity for field path `key` (a PLAUSIBLE key); report and return None if bad.

    A string must also match the schema's pattern for the field: the fast path's schema leaves
    that check here (on the careful path the schema has reported such a value already).
    """
    is_text = type(value) is str
    if is_text:
        known = _accepted.get((value, key))
        if known is not None:
            return known
    dimension, low, high = PLAUSIBLE[key]
    if is_text and not _FORMS[key](value):
        report(where, quantity_message(value, dimension, low < 0) + accepted(key))
        return None
    try:
        result = parse_quantity(value, dimension, signed=low < 0)
        check_range(result, low, high, dimension, value)
    except QuantityError as error:
        message = str(error)
        report(where, message if "plausible range" in message else message + accepted(key))
        return None
    if is_text:
        if len(_accepted) >= _MAX_ACCEPTED:
            _accepted.clear()
        _accepted[value, key] = result
    return result


def accepted(key: str | None) -> str:
    """"; this field accepts 0.118 in (3 mm) to 2.362 in (60 mm)" for a PLAUSIBLE key, else ""."""
    if key not in PLAUSIBLE:
        return ""
    dimension, low, high = PLAUSIBLE[key]
    return f"; this field accepts {show(low, dimension)} to {show(high, dimension)}"


def range_key(schema: str, where: tuple, data: object) -> str | None:
    """The PLAUSIBLE key of the value at `where` in a document of `schema`, or None."""
    if schema == "shop":
        return f"shop.{where[0]}" if where and isinstance(where[0], str) else None
    if schema == "parts":
        kind = data.get("kind") if isinstance(data, dict) else None
        section = SECTION_OF_KIND.get(kind) if isinstance(kind, str) else None
        where = (section, *where[2:]) if section and where[:1] == ("parts",) else ()
    if len(where) < 2:
        return None
    section, name, *rest = where
    if name == "load_curve" and len(rest) == 2 and rest[1] in (0, 1):
        return f"clutch.load_curve.{('travel', 'load')[rest[1]]}"
    if name == "layout" and rest:
        return "pedal.layout.rotation_to_stop" if rest[0] == "rotation_to_stop" else "pedal.layout.point"
    return f"{section}.{name}"


def text(value: object) -> str | None:
    """Free text; an unquoted YAML number is kept as typed: `0712` stays "0712" (not the
    octal 458), `1:30` stays "1:30" (not 90)."""
    return None if value is None else getattr(value, "typed", None) or str(value)


def date(value: object, report: Reporter, where: tuple) -> _dt.date | None:
    """A YYYY-MM-DD string (or a date object from another YAML loader) as a date."""
    if value is None or (isinstance(value, _dt.date) and not isinstance(value, _dt.datetime)):
        return value
    try:
        return _dt.date.fromisoformat(str(value))
    except ValueError:
        report(where, f"{value!r} is not a calendar date; write YYYY-MM-DD, e.g. 2025-03-14")
        return None


def convert_fields(section: str, raw: dict, report: Reporter, where: tuple) -> dict:
    """The section's given fields in SI (missing ones absent); `part` and unknown keys skipped."""
    fields = {}
    kinds = SECTION_FIELDS[section]
    for key, value in raw.items():
        kind = kinds.get(key)
        at = where + (key,)
        if kind is None or not report.clean(at):
            continue
        if kind == QUANTITY:
            fields[key] = quantity(value, f"{section}.{key}", report, at)
        elif kind == TEXT:
            fields[key] = text(value)
        elif kind == CHOICE:
            fields[key] = value
        elif kind == CURVE:
            fields[key] = _load_curve(value, report, at)
        else:
            fields[key] = _layout(value, report, at)
    return fields


def merge(part_fields: dict, overrides: dict) -> dict:
    """Part fields, then the build's: a slave bore replaces a part's piston_area and vice versa."""
    merged = dict(part_fields)
    for key in overrides:
        merged.pop(_ALTERNATIVES.get(key, ""), None)
    merged.update(overrides)
    return merged


def section_fields(section: object) -> dict:
    """The given (not None) fields of a resolved section, without `part`: used for merging."""
    return {
        name: value
        for name in _CLASS_FIELDS[type(section)]
        if name != "part" and (value := getattr(section, name)) is not None
    }


@functools.lru_cache(maxsize=1024)
def referenced(part: model.Part):
    """The section a build gets from `{part: ID}` with no overrides: the part's own, named.

    The same as make_section on the part's fields; made once per part, shared (it is frozen).
    """
    return dataclasses.replace(part.section, part=part.id)


def make_section(name: str, fields: dict, report: Reporter, where: tuple, part: str | None = None):
    """The model section from converted fields, or None after reporting what is missing."""
    missing = {key: "" for key in _REQUIRED[name] if key not in fields}
    if name == "slave" and "bore" not in fields and "piston_area" not in fields:
        missing["bore"] = " (or piston_area)"
    if name == "slave" and "bore" in fields and "piston_area" in fields:
        report(where, "give either bore or piston_area, not both")
        return None
    if name == "pedal" and "layout" not in fields:
        missing |= {key: " (or give a layout)" for key in ("pivot_to_pad", "pivot_to_clevis") if key not in fields}
    place = " here or in the catalogue part" if part else ""
    for key, alternative in missing.items():
        report(where, f"missing key {key!r}{alternative}{place}", field=dotted(where + (key,)))
    if missing or (None in fields.values()
                   and any(value is None for key, value in fields.items() if SECTION_FIELDS[name][key] != TEXT)):
        return None
    cls = SECTION_CLASS[name]
    values = {key: fields.get(key) for key in _CLASS_FIELDS[cls]}
    if "part" in values:
        values["part"] = part
    return cls(**values)


def _load_curve(raw: list, report: Reporter, where: tuple) -> tuple | None:
    points = []
    for index, (travel, load) in enumerate(raw):
        at = where + (index,)
        point = (
            quantity(travel, "clutch.load_curve.travel", report, at + (0,)),
            quantity(load, "clutch.load_curve.load", report, at + (1,)),
        )
        if None in point:
            return None
        if points and point[0] <= points[-1][0]:
            report(at, "bearing travel must increase from one point to the next")
            return None
        points.append(point)
    return tuple(points)


def _layout(raw: dict, report: Reporter, where: tuple) -> model.PedalLayout | None:
    values = {}
    for name in _LAYOUT_POINTS:
        x, y = raw[name]
        at = where + (name,)
        values[name] = (
            quantity(x, "pedal.layout.point", report, at + (0,)),
            quantity(y, "pedal.layout.point", report, at + (1,)),
        )
    rotation = quantity(raw["rotation_to_stop"], "pedal.layout.rotation_to_stop", report,
                        where + ("rotation_to_stop",))
    if rotation is None or any(None in point for point in values.values()):
        return None
    for one, other in _DISTINCT_POINTS:
        if math.dist(values[one], values[other]) < _LEAST_DISTANCE:
            report(where + (other,), f"{other} is within 1 mm of {one}; a lever needs distinct points")
            return None
    return model.PedalLayout(rotation_to_stop=rotation, **values)
