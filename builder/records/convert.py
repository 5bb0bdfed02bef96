"""Converting record values to builder.model sections, every problem collected and located.

Which fields exist, their dimensions and plausible ranges come from the field table,
builder.fields; the words of a problem come from builder.presentation.
"""
from __future__ import annotations

import dataclasses
import datetime as _dt
import functools
import math
import re

from builder import model
from builder.fields import (CHOICE, CURVE, FIELDS, LAYOUT, MEASURED_KINDS, PART_KINDS, POINT,
                            POINTS, QUANTITIES, QUANTITY, SECTION, SECTIONS, TEXT)
from builder.presentation import (accepted_range, placeholder_message, quantity_message,
                                  swapped_lengths_message)
from builder.presentation import percent as percent_words
from builder.presentation import quantity as quantity_words
from builder.problems import PLACEHOLDER, Problem
from builder.records._schema import dotted, quantity_patterns
from builder.records._yaml import Located, NeedsCare
from builder.units import QuantityError, check_range, describe, parse_quantity

# field key -> (dimension, lowest, highest) in SI, for every quantity the records hold
PLAUSIBLE: dict[str, tuple[str, float, float]] = {
    key: (field.dimension, *field.bounds)
    for key, field in FIELDS.items() if field.kind in MEASURED_KINDS
}
# PLAUSIBLE key -> search of the schema pattern a string for that field must match
_FORMS = {
    key: re.compile(quantity_patterns("build")["fraction" if dimension == "fraction" else
                                        f"signed_{dimension}" if low < 0 else dimension]).search
    for key, (dimension, low, high) in PLAUSIBLE.items()
}
_accepted: dict[tuple[str, str], float] = {}  # (text, PLAUSIBLE key) -> SI: the one bounded memo of values
_MAX_ACCEPTED = 16_384


class ProblemCollector:
    """Collects located problems for one file; on the fast path (no positions) it raises NeedsCare.

    `bad` holds the paths the schema already reported; conversion skips them, and a later
    problem for a field that already has one is dropped, so each mistake is said once.
    """

    def __init__(self, path: str, doc: Located | None = None):
        self.path = path
        self.doc = doc
        self.problems: list[Problem] = []
        self.bad: list[tuple] = []

    def __call__(self, where: tuple, message: str, *, at_key: bool = False, field: str | None = None,
                 code: str | None = None) -> None:
        if self.doc is None:
            raise NeedsCare
        field = field or dotted(where)
        if any(problem.field == field for problem in self.problems):
            return
        line, col = self.doc.where(where, at_key)
        self.problems.append(Problem(self.path, line, col, field, message, code))

    def blocked(self, where: tuple) -> bool:
        """A schema problem sits at `where` or above it."""
        return bool(self.bad) and any(where[: len(bad)] == bad for bad in self.bad)

    def clean(self, where: tuple) -> bool:
        """No schema problem at, above or below `where`."""
        return not self.bad or not any(where[: len(bad)] == bad or bad[: len(where)] == where for bad in self.bad)


# section -> {key: kind}: what convert_fields reads
SECTION_FIELDS: dict[str, dict[str, str]] = {
    section.name: {field.name: field.kind for field in section.fields} for section in SECTIONS
}
SECTION_CLASS = {
    "gearbox": model.Gearbox, "clutch": model.Clutch, "fork": model.Fork, "master": model.Master,
    "slave": model.Slave, "line": model.Line, "pedal": model.Pedal, "measured": model.Measured,
}
_CLASS_FIELDS = {cls: tuple(f.name for f in dataclasses.fields(cls)) for cls in SECTION_CLASS.values()}
CATALOGUE_KIND = {section: kind for kind, section in PART_KINDS.items()}
SECTION_OF_KIND = dict(PART_KINDS)
_REQUIRED = {section.name: section.required for section in SECTIONS}
# a key of a one-of pair -> the keys it replaces when a build overrides a part (bore, area)
_ONE_OF = {key: tuple(k for k in s.one_of if k != key) for s in SECTIONS for key in s.one_of}
_LAYOUT = FIELDS["pedal.layout"]
_LAYOUT_POINTS = tuple(field.name for field in _LAYOUT.children if field.kind == POINT)
_LAYOUT_POINT_LISTS = tuple(field.name for field in _LAYOUT.children if field.kind == POINTS)
_DISTINCT_POINTS = (("pivot", "pad"), ("pivot", "clevis"), ("clevis", "pushrod_seat"))
_LEAST_DISTANCE = 1e-3  # m


def quantity(value: object, key: str, report: ProblemCollector, where: tuple) -> float | None:
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
    try:
        if is_text and not _FORMS[key](value):
            parse_quantity(value, dimension, signed=low < 0)  # its own reason when it has one
            raise QuantityError("form", dimension, value)
        result = parse_quantity(value, dimension, signed=low < 0)
        check_range(result, low, high, dimension, value)
    except QuantityError as error:
        if len(error.meant) > 1:
            error = _plausible_readings(error, key)
        message = quantity_message(error)
        report(where, message if error.reason == "out-of-range" else message + accepted(key))
        return None
    if is_text:
        if len(_accepted) >= _MAX_ACCEPTED:
            _accepted.clear()
        _accepted[value, key] = result
    return result


def _plausible_readings(error: QuantityError, key: str) -> QuantityError:
    """The error with only the readings of a slip (1,125 in: 1.125 in or 1125 in) that fall in
    the field's plausible range; all of them when none does."""
    dimension, low, high = PLAUSIBLE[key]
    plausible = []
    for reading in error.meant:
        try:
            value = parse_quantity(reading, dimension, signed=low < 0)
        except QuantityError:
            continue
        if low <= value <= high:
            plausible.append(reading)
    error.meant = tuple(plausible) or error.meant
    return error


def accepted(key: str | None) -> str:
    """"; this field accepts 0.118 in (3 mm) to 2.362 in (60 mm)" for a PLAUSIBLE key, else ""."""
    if key not in PLAUSIBLE:
        return ""
    return accepted_range(*PLAUSIBLE[key])


def range_key(schema: str, where: tuple, data: object) -> str | None:
    """The PLAUSIBLE key of the value at `where` in a document of `schema`, or None."""
    if schema == "shop":
        steps = [step for step in where if isinstance(step, str)]
        key = ".".join(["shop", *steps])
        return key if key in PLAUSIBLE else None
    if schema == "parts":
        kind = data.get("kind") if isinstance(data, dict) else None
        section = SECTION_OF_KIND.get(kind) if isinstance(kind, str) else None
        where = (section, *where[2:]) if section and where[:1] == ("parts",) else ()
    if len(where) < 2:
        return None
    section, name, *rest = where
    key = f"{section}.{name}"
    field = FIELDS.get(key)
    if field is not None and field.kind == CURVE and len(rest) == 2 and rest[1] in (0, 1):
        return field.children[rest[1]].key
    if field is not None and field.kind == LAYOUT and rest and isinstance(rest[0], str):
        key = f"{key}.{rest[0]}"
    return key if key in PLAUSIBLE else None


def text(value: object) -> str | None:
    """Free text; an unquoted YAML number is kept as typed: `0712` stays "0712" (not the
    octal 458), `1:30` stays "1:30" (not 90)."""
    return None if value is None else getattr(value, "typed", None) or str(value)


# What a template leaves for a person to replace: XX, TODO, TBD, ?, ..., "describe the car
# generically", "fill in ...", or the field's own name in capitals (family: FAMILY).
_PLACEHOLDER = re.compile(r"x{2,}|todo|tbd|tba|fixme|\?+|\.{3}|\u2026|(?:describe|fill in)\b.{0,80}",
                          re.IGNORECASE)


def is_placeholder(value: object, key: str) -> bool:
    """Whether text in field `key` (dotted) is a stand-in left for a person to replace.

    >>> is_placeholder("FAMILY", "gearbox.family"), is_placeholder("XX", "technician")
    (True, True)
    >>> is_placeholder("QX-5", "gearbox.family"), is_placeholder("RL", "technician")
    (False, False)
    """
    if type(value) is not str:
        return False
    stripped = value.strip()
    return (stripped == key.rsplit(".", 1)[-1].upper()
            or _PLACEHOLDER.fullmatch(stripped) is not None)


def left_to_fill(value: object, key: str) -> bool:
    """Whether a value the schema refused is a template stand-in: placeholder text (see
    is_placeholder), or a quantity whose number is one (`xx lbf`, `?? in`).

    >>> left_to_fill("xx lbf", "clutch.release_load"), left_to_fill("xx", "line.hose")
    (True, True)
    >>> left_to_fill("FORK_TIP_MOVES", "gearbox.fork_tip_moves"), left_to_fill("4OO lbf", "clutch.release_load")
    (True, False)
    """
    if type(value) is not str:
        return False
    number, _, _ = value.strip().rpartition(" ")
    return is_placeholder(value, key) or (bool(number) and _PLACEHOLDER.fullmatch(number) is not None)


def checked_text(value: object, key: str, report: ProblemCollector, where: tuple) -> str | None:
    """Free text of field `key` (dotted); a placeholder left in it is reported ("fill in")."""
    if type(value) is str and is_placeholder(value, key):
        report(where, placeholder_message(FIELDS[key].label if key in FIELDS else key, value),
               code=PLACEHOLDER)
    return text(value)


def date(value: object, report: ProblemCollector, where: tuple) -> _dt.date | None:
    """A YYYY-MM-DD string (or a date object from another YAML loader) as a date."""
    if value is None or (isinstance(value, _dt.date) and not isinstance(value, _dt.datetime)):
        return value
    try:
        return _dt.date.fromisoformat(str(value))
    except ValueError:
        report(where, f"{value!r} is not a calendar date; write YYYY-MM-DD, e.g. 2025-03-14")
        return None


def convert_fields(section: str, raw: dict, report: ProblemCollector, where: tuple) -> dict:
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
            fields[key] = checked_text(value, f"{section}.{key}", report, at)
        elif kind == CHOICE:
            fields[key] = value
        elif kind == CURVE:
            fields[key] = _load_curve(value, report, at, f"{section}.{key}")
        elif kind == QUANTITIES:
            fields[key] = _quantities(value, f"{section}.{key}", report, at)
        else:
            fields[key] = _layout(value, report, at)
    return fields


def merge(part_fields: dict, overrides: dict) -> dict:
    """Part fields, then the build's: a slave bore replaces a part's piston_area and vice versa."""
    merged = dict(part_fields)
    for key in overrides:
        if key in _ONE_OF:
            for other in _ONE_OF[key]:
                merged.pop(other, None)
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


def make_section(name: str, fields: dict, report: ProblemCollector, where: tuple, part: str | None = None):
    """The model section from converted fields, or None after reporting what is missing."""
    section = SECTION[name]
    missing = {key: "" for key in _REQUIRED[name] if key not in fields}
    if section.one_of:
        given = [key for key in section.one_of if key in fields]
        if len(given) > 1:
            report(where, f"give either {' or '.join(section.one_of)}, not both")
            return None
        if not given:
            first, *others = section.one_of
            missing[first] = f" (or {' or '.join(others)})"
    if section.either and not any(all(key in fields for key in keys) for keys in section.either):
        *others, main = section.either
        alternative = " or ".join(" and ".join(keys) for keys in others)
        missing |= {key: f" (or give a {alternative})" for key in main if key not in fields}
    place = " here or in the catalogue part" if part else ""
    for key, alternative in missing.items():
        report(where, f"missing key {key!r}{alternative}{place}", field=dotted(where + (key,)))
    if missing or (None in fields.values()
                   and any(value is None for key, value in fields.items() if SECTION_FIELDS[name][key] != TEXT)):
        return None
    if name == "pedal" and not _pedal_lengths_in_order(fields, report, where):
        return None
    if not _consistent(name, fields, report, where):
        return None
    cls = SECTION_CLASS[name]
    values = {key: fields.get(key) for key in _CLASS_FIELDS[cls]}
    if "part" in values:
        values["part"] = part
    return cls(**values)


def _pedal_lengths_in_order(fields: dict, report: ProblemCollector, where: tuple) -> bool:
    """False after reporting a pivot-to-pad shorter than pivot-to-clevis (a pedal ratio below
    1: the two lengths swapped, most likely). A layout, when given, is checked on its own."""
    pad, clevis = fields.get("pivot_to_pad"), fields.get("pivot_to_clevis")
    if fields.get("layout") is not None or pad is None or clevis is None or pad >= clevis:
        return True
    report(where + ("pivot_to_pad",), swapped_lengths_message(pad, clevis))
    return False


LOAD_AGREEMENT = 0.05  # release_load within 5 % of the load curve's peak (our own rule)


def _consistent(name: str, fields: dict, report: ProblemCollector, where: tuple) -> bool:
    """Fields of one section that must agree with each other; False after reporting."""
    problems = []
    if name == "clutch" and fields.get("release_load") is not None and fields.get("load_curve"):
        given, peak = fields["release_load"], max(load for _, load in fields["load_curve"])
        if abs(given - peak) > LOAD_AGREEMENT * peak:
            problems.append(("release_load", "release load {} and the load curve's peak {} "
                             "differ by {}; they must agree within 5 %, or leave release_load "
                             "out", (quantity_words(given, "force"), quantity_words(peak, "force"),
                                     percent_words(given / peak - 1.0, signed=True)), "load_curve"))
    if name == "slave":
        pulls = fields.get("acts") == "pull"
        rod, bore = fields.get("rod_diameter"), fields.get("bore")
        if pulls and rod is None:
            problems.append(("rod_diameter", "a pull slave needs rod_diameter (the fluid pushes "
                             "on the annulus around the rod)", (), "acts"))
        elif pulls and bore is None:
            problems.append(("piston_area", "a pull slave gives its bore and rod_diameter, not "
                             "piston_area", (), "acts"))
        elif pulls and rod >= bore:
            problems.append(("rod_diameter", "rod diameter {} must be smaller than the bore {}",
                             (quantity_words(rod, "length"), quantity_words(bore, "length")),
                             "bore"))
        elif rod is not None and not pulls:
            problems.append(("rod_diameter", "rod_diameter is for a pull slave: add acts: pull, "
                             "or remove it", (), "acts"))
        if fields.get("preload") is not None and fields.get("kind") != "concentric":
            problems.append(("preload", "preload is for a concentric slave (its internal "
                             "spring)", (), "kind"))
    if name == "line" and fields.get("hose_length") is not None:
        if fields["hose_length"] > fields["length"]:
            problems.append(("hose_length", "hose length {} is longer than the line length {}",
                             (quantity_words(fields["hose_length"], "length"),
                              quantity_words(fields["length"], "length")), "length"))
    for key, words, figures, other in problems:
        report(_written(report, where, key, other), words.format(*figures),
               field=dotted(where + (key,)))
    return not problems


def _written(report: ProblemCollector, where: tuple, key: str, other: str) -> tuple:
    """Where to point for a problem with `key`: the key itself when the record writes it,
    else the related key `other` when it does (the value may come from a catalogue part),
    else the section."""
    written = report.doc.values if report.doc is not None else {}
    return next((where + (k,) for k in (key, other) if where + (k,) in written), where)


def _load_curve(raw: list, report: ProblemCollector, where: tuple,
                key: str = "clutch.load_curve") -> tuple | None:
    """The pairs of curve field `key` in SI, the first column increasing; None after a problem."""
    points = []
    first, second = FIELDS[key].children
    for index, pair in enumerate(raw):
        at = where + (index,)
        point = tuple(quantity(value, column.key, report, at + (i,))
                      for i, (value, column) in enumerate(zip(pair, (first, second))))
        if None in point:
            return None
        if points and point[0] <= points[-1][0]:
            report(at, f"{first.label} must increase from one point to the next")
            return None
        points.append(point)
    return tuple(points)


def _quantities(raw: list, key: str, report: ProblemCollector, where: tuple) -> tuple | None:
    """A list of quantities of field `key`, or None when one of them is bad (each reported)."""
    values = tuple(quantity(value, key, report, where + (i,)) for i, value in enumerate(raw))
    return None if None in values else values


def _point(raw: list, key: str, report: ProblemCollector, where: tuple) -> tuple:
    x, y = raw
    return quantity(x, key, report, where + (0,)), quantity(y, key, report, where + (1,))


def points_or_quantity(value: object, key: str, report: ProblemCollector, where: tuple):
    """A shop figure that may be one quantity or, as its field's alternative, points (a
    curve) or one quantity per kind (a group): SI float, tuple of pairs or dict; None after
    reporting. The schema leaves both forms to this check (anyOf)."""
    alternative = FIELDS[key].alternative
    if isinstance(value, list) and alternative.kind == CURVE:
        if not value or not all(isinstance(pair, list) and len(pair) == 2 for pair in value):
            report(where, f"expected {FIELDS[key].description[:-1].lower()}; found "
                          f"{describe(value)}")
            return None
        return _load_curve(value, report, where, alternative.key)
    if isinstance(value, dict) and alternative.kind != CURVE:
        names = [child.name for child in alternative.children]
        unknown = [name for name in value if name not in names]
        missing = [name for name in names if name not in value]
        if unknown or missing:
            words = (f"unknown key {unknown[0]!r}; allowed: {', '.join(names)}" if unknown
                     else f"missing key {missing[0]!r} (give one for every kind)")
            report(where + ((unknown or missing)[0],), words)
            return None
        found = {name: quantity(value[name], child.key, report, where + (name,))
                 for name, child in zip(names, alternative.children)}
        return None if None in found.values() else found
    return quantity(value, key, report, where)


def _layout(raw: dict, report: ProblemCollector, where: tuple) -> model.PedalLayout | None:
    values = {}
    for name in _LAYOUT_POINTS:
        values[name] = _point(raw[name], f"pedal.layout.{name}", report, where + (name,))
    lists = {}
    for name in _LAYOUT_POINT_LISTS:
        if raw.get(name) is not None:
            at = where + (name,)
            lists[name] = tuple(_point(item, f"pedal.layout.{name}", report, at + (i,))
                                for i, item in enumerate(raw[name]))
    rotation = quantity(raw["rotation_to_stop"], "pedal.layout.rotation_to_stop", report,
                        where + ("rotation_to_stop",))
    axis = None
    if raw.get("bore_axis") is not None:
        axis = quantity(raw["bore_axis"], "pedal.layout.bore_axis", report, where + ("bore_axis",))
        if axis is None:
            return None
    if rotation is None or any(None in point for point in values.values()) or any(
            None in point for points in lists.values() for point in points):
        return None
    for one, other in _DISTINCT_POINTS:
        if math.dist(values[one], values[other]) < _LEAST_DISTANCE:
            report(where + (other,), f"{other} is within 1 mm of {one}; a lever needs distinct points")
            return None
    for name, points in lists.items():
        for i, point in enumerate(points):
            for other in ("pivot", "pushrod_seat"):
                if math.dist(point, values[other]) < _LEAST_DISTANCE:
                    report(where + (name, i), f"this clevis point is within 1 mm of {other}; a "
                           "lever needs distinct points")
                    return None
    pad = math.dist(values["pivot"], values["pad"])
    clevis = math.dist(values["pivot"], values["clevis"])
    if pad < clevis:
        report(where + ("pad",), swapped_lengths_message(pad, clevis, layout=True))
        return None
    return model.PedalLayout(rotation_to_stop=rotation, bore_axis=axis, **values, **lists)
