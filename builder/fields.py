"""Every record field, declared once: where it lives, what it holds, its dimension and
plausible range, and the words people read for it.

The JSON Schemas in schema/ are written from this table (``python -m builder.fields
--write`` writes them; tests/test_fields.py checks the committed files equal what it
makes). The records loader, the site's field labels and the demo generator read the same
table. Plausible ranges are sanity limits for passenger-car and light-truck clutch
hydraulics (common practice, no source): they catch typing slips such as `75 in` for a
bore, `0 in`, or a value in the wrong unit, not bad designs.

Imports builder.model (choices) and builder.units (parsing the range texts) only.
"""
from __future__ import annotations

import dataclasses
import functools
import json
import sys
from dataclasses import dataclass
from pathlib import Path

from builder import model
from builder.units import parse_quantity

# Kinds of field
QUANTITY, TEXT, NAME, CHOICE, CURVE, LAYOUT, POINT, DATE, BUILD_ID, PART_ID, GROUP = (
    "quantity", "text", "name", "choice", "curve", "layout", "point", "date", "build_id", "part_id",
    "group")  # NAME: text that must not be empty
QUANTITIES, POINTS = "quantities", "points"  # a short list of quantities, or of points
MEASURED_KINDS = (QUANTITY, POINT, QUANTITIES, POINTS)  # kinds holding quantities of a dimension
MAX_ALTERNATIVES = 8  # most items in a QUANTITIES or POINTS list (each is sized by `suggest`)
NAMES, CHOICES = "names", "choices"  # a list of codes; a list of some of the field's choices

PART_ID_PATTERN = "^[A-Z0-9]+(-[A-Z0-9]+)*$"
_QUANTITY_PATTERN = r"^\s*[0-9.][0-9./ eE+-]*[^\s0-9./+-]"
_SIGNED_PATTERN = r"^\s*[+-]?\s*[0-9.][0-9./ eE+-]*[^\s0-9./+-]"
_FRACTION_PATTERN = r"^\s*[0-9.][0-9.eE+-]*\s*%?\s*$"
QUANTITY_DEFS = {  # schema $defs name -> (pattern, description)
    "length": (_QUANTITY_PATTERN, "A length with its unit, e.g. 7/8 in, 1-1/8 in, 22.2 mm."),
    "signed_length": (_SIGNED_PATTERN, "A length (may be negative) with its unit, e.g. -60 mm, 2.5 in."),
    "signed_force": (_SIGNED_PATTERN, "A force (may be negative) with its unit, e.g. -3 lbf, 12 N."),
    "signed_angle": (_SIGNED_PATTERN, "An angle (may be negative) with its unit, e.g. -8 deg, 172 deg."),
    "area": (_QUANTITY_PATTERN, "An area with its unit, e.g. 1.9 in^2, 1226 mm^2."),
    "force": (_QUANTITY_PATTERN, "A force with its unit, e.g. 410 lbf, 1.9 kN."),
    "pressure": (_QUANTITY_PATTERN, "A pressure with its unit, e.g. 1200 psi, 8.3 MPa."),
    "angle": (_QUANTITY_PATTERN, "An angle with its unit, e.g. 30 deg."),
    "hose_expansion": (_QUANTITY_PATTERN, "A hose expansion (volume per hose length per "
                                          "pressure) with its unit, e.g. 0.31 mL/m/MPa."),
    "volume_per_length": (_QUANTITY_PATTERN, "A volume per length of hose with its unit, e.g. "
                                             "0.66 cc/ft, 2.2 mL/m."),
    "fraction": (_FRACTION_PATTERN, "A percentage such as 10 % or a fraction such as 0.10."),
}


@dataclass(frozen=True)
class Field:
    """One field: `key` is its place, dotted ("master.bore", "pedal.layout.pad",
    "shop.effort_band.low"); `label` the words people read; `description` one sentence."""

    key: str
    kind: str
    label: str
    description: str
    dimension: str | None = None
    low: str | None = None  # plausible range as quantity text; a negative low allows negatives
    high: str | None = None
    choices: tuple[str, ...] = ()
    required: bool = False  # within its group, or when a section is written out in full
    children: tuple[Field, ...] = ()  # a group's or a layout's fields; a curve's two columns
    default: str | None = None  # shop rules: the value used when the key is left out
    # a quantity that may instead be written in this other form (points, or one per kind)
    alternative: Field | None = None
    example: str = "[0.12 in, 380 lbf]"  # a curve: one pair as written
    least_items: int = 2  # a curve: fewest points
    named: str | None = None  # the key's last part when it holds a dot itself ("DOT 5.1")

    @property
    def name(self) -> str:
        return self.named or self.key.rsplit(".", 1)[-1]


    @property
    def signed(self) -> bool:
        return self.low is not None and self.low.lstrip().startswith("-")

    @property
    def bounds(self) -> tuple[float, float]:
        """(lowest, highest) in SI."""
        return _bounds(self.key)


@dataclass(frozen=True)
class Section:
    """A build section (gearbox, clutch, ...): its fields and what a full one needs.

    `catalogue`: the parts file kind a section may name with {part: ID}.
    `one_of`: keys of which exactly one is given (slave bore or piston area).
    `either`: alternatives where one whole set is needed (pedal: a layout, or both lengths).
    """

    name: str
    title: str
    description: str
    fields: tuple[Field, ...]
    catalogue: str | None = None
    one_of: tuple[str, ...] = ()
    either: tuple[tuple[str, ...], ...] = ()
    optional: bool = False

    @property
    def required(self) -> tuple[str, ...]:
        return tuple(f.name for f in self.fields if f.required)


def _q(key, label, description, dimension, low, high, required=False, default=None,
       alternative=None) -> Field:
    return Field(key, QUANTITY, label, description, dimension, low, high, required=required,
                 default=default, alternative=alternative)


def _expansion(hose: str) -> Field:
    """A hose kind's expansion: one figure, or points of volume per length against pressure."""
    key = f"shop.hose_expansion.{hose}"
    return _q(key, hose.replace("_", " "), f"Expansion of {hose} hose, e.g. 0.31 mL/m/MPa, or "
              "[pressure, volume per length] points, e.g. [1000 psi, 0.66 cc/ft].",
              "hose_expansion", "0 mL/m/MPa", "10 mL/m/MPa", required=True,
              alternative=Field(f"{key}.points", CURVE, f"{hose.replace('_', ' ')} expansion "
                                "points (pressure, volume per length)", "[pressure, volume per "
                                "length of hose] points, pressure increasing; linear through "
                                "zero below the first.", children=(
                                    _q(f"{key}.points.pressure", "pressure", "Line pressure.",
                                       "pressure", "0.1 MPa", "50 MPa"),
                                    _q(f"{key}.points.volume", "volume per length", "Volume "
                                       "growth per length of hose at that pressure.",
                                       "volume_per_length", "0 mL/m", "100 mL/m")),
                                example="[1000 psi, 0.66 cc/ft]", least_items=1))


def _or(choices: tuple[str, ...]) -> str:
    """("a", "b", "c") -> "a, b or c": a field's choices in its description."""
    return f"{', '.join(choices[:-1])} or {choices[-1]}"


def _text(key, label, description) -> Field:
    return Field(key, TEXT, label, description)


def _point(key, label, description) -> Field:
    return Field(key, POINT, label, description + " As [x, y], e.g. [-60 mm, -285 mm].",
                 "length", "-2 m", "2 m", required=True)


CLEVIS_POSITIONS = Field(
    "pedal.clevis_positions", QUANTITIES, "other clevis positions",
    f"Optional: up to {MAX_ALTERNATIVES} other pivot-to-clevis holes the pedal has, e.g. "
    "[1.9 in, 2.3 in]; `fitment suggest` tries each. With a layout, each is a hole on the line from the pivot through "
    "the clevis, at that distance from the pivot.", "length", "5 mm", "300 mm")
LAYOUT_CLEVIS_POSITIONS = Field(
    "pedal.layout.clevis_positions", POINTS, "other clevis points",
    f"Optional: up to {MAX_ALTERNATIVES} other clevis holes at rest, in the layout's frame, "
    "e.g. [[-8 mm, -60 mm], "
    "[-8 mm, -45 mm]]; `fitment suggest` tries each with the pushrod set to reach the same "
    "seat.", "length", "-2 m", "2 m")


TOP_FIELDS = (
    Field("id", BUILD_ID, "build id", "2-6 capitals, hyphen, 3-6 digits (e.g. HW-0142); equals "
          "the file name.", required=True),
    Field("date", DATE, "date", "Build date, YYYY-MM-DD."),
    Field("status", CHOICE, "status", "draft (not built or not measured), measured, verified "
          "(measured and checked), rejected.", choices=model.STATUSES, required=True),
    _text("technician", "technician", "Who did the build (initials)."),
    _text("vehicle", "vehicle", "Generic vehicle description."),
)
END_FIELDS = (
    _text("outcome", "outcome", "How the finished build behaved, in a line."),
    _text("notes", "notes", "Free text, any length."),
)

SECTIONS = (
    Section("gearbox", "Gearbox", "The gearbox the clutch is released in.", (
        Field("gearbox.family", TEXT, "gearbox family", "The shop's gearbox family code, e.g. "
              "QX-5.", required=True),
        _text("gearbox.variant", "variant", "Case, bell housing or other variant (optional)."),
        Field("gearbox.fork_tip_moves", CHOICE, "fork tip moves", "Which way the fork tip moves "
              "to release: forward, rearward, or none for a concentric slave.",
              choices=model.FORK_TIP_MOVES, required=True),
    ), catalogue="gearboxes"),
    Section("clutch", "Clutch", "The clutch as the release bearing sees it.", (
        _q("clutch.release_load", "release load", "Peak load at the release bearing; may be "
           "left out when a load curve is given (its peak), else within 5 % of the curve's peak.",
           "force", "100 N", "20 kN"),
        _q("clutch.release_travel", "release travel", "Bearing travel for full release.",
           "length", "1 mm", "30 mm", required=True),
        _q("clutch.clearance", "clearance", "Bearing travel before it meets the fingers.",
           "length", "0 mm", "20 mm", required=True),
        Field("clutch.load_curve", CURVE, "load curve (bearing travel from contact, load)",
              "Optional [bearing travel from first contact with the fingers, load] pairs, travel "
              "increasing, e.g. [0.12 in, 380 lbf].",
              children=(_q("clutch.load_curve.travel", "bearing travel", "Bearing travel from "
                           "first contact.", "length", "0 mm", "60 mm"),
                        _q("clutch.load_curve.load", "load", "Load at the bearing.",
                           "force", "0 N", "20 kN"))),
        _q("clutch.max_release_travel", "largest release travel", "Optional maker's limit of "
           "bearing travel past first contact; past it the fingers over-stroke.",
           "length", "1 mm", "40 mm"),
    ), catalogue="clutches", either=(("load_curve",), ("release_load",))),
    Section("fork", "Fork", "The release fork; leave out for a concentric slave.", (
        _q("fork.pivot_to_slave", "pivot to slave", "Fork pivot to the slave pushrod.",
           "length", "10 mm", "600 mm", required=True),
        _q("fork.pivot_to_bearing", "pivot to bearing", "Fork pivot to the release bearing.",
           "length", "10 mm", "600 mm", required=True),
    ), optional=True),
    Section("master", "Master cylinder", "The clutch master cylinder.", (
        _q("master.bore", "bore", "Master bore diameter.", "length", "3 mm", "60 mm",
           required=True),
        _q("master.stroke", "stroke", "Usable master piston stroke.", "length", "3 mm", "100 mm",
           required=True),
        _q("master.rated_pressure", "rated pressure", "Maker's pressure rating (optional).",
           "pressure", "0.5 MPa", "50 MPa"),
        _q("master.dead_stroke", "dead stroke", "Optional piston travel before the compensating "
           "port closes and the master starts to push fluid (shop default when left out).",
           "length", "0 mm", "10 mm"),
    ), catalogue="masters"),
    Section("slave", "Slave cylinder", "The clutch slave cylinder.", (
        Field("slave.kind", CHOICE, "slave kind", "external (works a fork) or concentric (on "
              "the input shaft).", choices=model.SLAVE_KINDS, required=True),
        _q("slave.bore", "bore", "Slave bore diameter; give this or piston_area.",
           "length", "3 mm", "100 mm"),
        _q("slave.piston_area", "piston area", "Effective piston area, e.g. an annular "
           "concentric slave; give this or bore.", "area", "10 mm^2", "10000 mm^2"),
        _q("slave.stroke", "stroke", "Usable slave piston stroke.", "length", "3 mm", "100 mm",
           required=True),
        _q("slave.rated_pressure", "rated pressure", "Maker's pressure rating (optional).",
           "pressure", "0.5 MPa", "50 MPa"),
        _text("slave.bracket", "bracket", "How the slave is mounted."),
        Field("slave.acts", CHOICE, "acts", "push (fluid behind the piston, the usual) or pull "
              "(fluid on the rod side: give rod_diameter); push when left out.",
              choices=model.SLAVE_ACTS),
        _q("slave.rod_diameter", "rod diameter", "Pull slave: diameter of the rod through the "
           "fluid side; the area is then pi/4 (bore^2 - rod^2).", "length", "2 mm", "60 mm"),
        _q("slave.preload", "preload", "Optional, concentric slave: its internal spring's force "
           "on the fingers; the bearing then rests on them (clearance taken as zero).",
           "force", "0 N", "2 kN"),
    ), catalogue="slaves", one_of=("bore", "piston_area")),
    Section("line", "Line", "The hydraulic line from master to slave.", (
        _q("line.length", "length", "Line length, master to slave.", "length", "50 mm", "10 m",
           required=True),
        Field("line.hose", CHOICE, "hose", f"Hose kind: {_or(model.HOSE_KINDS)}.",
              choices=model.HOSE_KINDS, required=True),
        Field("line.fluid", CHOICE, "fluid", f"Brake fluid: {_or(model.FLUIDS)}.",
              choices=model.FLUIDS, required=True),
        _q("line.hose_length", "hose length", "Optional: the flexible part of the line length; "
           "the rest is hard line (the shop's steel figure). All of it when left out.",
           "length", "0 mm", "10 m"),
    )),
    Section("pedal", "Pedal", "The clutch pedal: two lengths, or a side-view layout.", (
        _q("pedal.pivot_to_pad", "pivot to pad", "Pedal pivot to pad centre.",
           "length", "50 mm", "1000 mm"),
        _q("pedal.pivot_to_clevis", "pivot to clevis", "Pedal pivot to the clevis pin.",
           "length", "5 mm", "300 mm"),
        _q("pedal.pad_travel", "pad travel", "Pad travel from rest to the floor stop.",
           "length", "10 mm", "400 mm", required=True),
        _text("pedal.pushrod", "pushrod", "Pushrod ends and adjustment."),
        Field("pedal.layout", LAYOUT, "layout", "Side view at rest in any consistent frame; when "
              "given it wins over the two lengths.", children=(
                  _point("pedal.layout.pivot", "pivot", "Pedal pivot at rest."),
                  _point("pedal.layout.pad", "pad", "Pad centre at rest."),
                  _point("pedal.layout.clevis", "clevis", "Clevis pin at rest."),
                  _point("pedal.layout.pushrod_seat", "pushrod seat",
                         "Pushrod seat in the master piston at rest."),
                  _q("pedal.layout.rotation_to_stop", "rotation to stop", "Pedal swing to the "
                     "floor stop, the way that pushes the master in.", "angle", "1 deg",
                     "90 deg", required=True),
                  _q("pedal.layout.bore_axis", "bore axis", "Optional direction of the master's "
                     "bore axis in the layout frame, counter-clockwise from +x (default: from "
                     "the clevis through the seat at rest).", "angle", "-360 deg", "360 deg"),
                  LAYOUT_CLEVIS_POSITIONS,
              )),
        CLEVIS_POSITIONS,
        _q("pedal.free_play", "free play", "Optional pushrod clearance at the master before it "
           "touches the piston (shop default when left out).", "length", "0 mm", "10 mm"),
        Field("pedal.bare_effort", CURVE, "bare pedal effort (pad travel, force)",
              "Optional [pad travel, force] pairs measured at the pad with the pushrod off, "
              "travel increasing; negative where an over-centre spring helps.",
              children=(_q("pedal.bare_effort.travel", "pad travel", "Pad travel from rest.",
                           "length", "0 mm", "400 mm"),
                        _q("pedal.bare_effort.force", "force", "Force at the pad (negative: "
                           "the pedal is pulled down).", "force", "-300 N", "300 N")),
              example="[6 in, -3 lbf]"),
    ), catalogue="pedals", either=(("layout",), ("pivot_to_pad", "pivot_to_clevis"))),
    Section("measured", "Measured on the car", "What the finished car showed; at least one "
            "value.", (
        _q("measured.pedal_effort", "pedal effort", "Peak pedal effort at the pad.",
           "force", "5 N", "2 kN"),
        _q("measured.slave_travel", "slave travel", "Slave pushrod travel, rest to floor.",
           "length", "0 mm", "100 mm"),
        _q("measured.pad_travel_to_release", "pad travel to release", "Pad travel from rest to "
           "where the clutch fully releases.", "length", "0 mm", "400 mm"),
        _q("measured.floor_gap", "floor gap", "Pad to floor when the master bottoms.",
           "length", "0 mm", "400 mm"),
        _text("measured.method", "method", "How it was measured."),
    ), optional=True),
)
SECTION = {section.name: section for section in SECTIONS}
PART_KINDS = {section.catalogue: section.name for section in SECTIONS if section.catalogue}

PART_FIELDS = (
    Field("id", PART_ID, "part id", "Catalogue part id, e.g. MC-A3 (capitals, digits, "
          "hyphens).", required=True),
    _text("label", "label", "Short description shown with the id."),
)

SHOP_FIELDS = (
    Field("shop.site_title", NAME, "site title", "Title of the published reference.",
          required=True),
    Field("shop.display_units", CHOICE, "display units", "Shown first; both systems are always "
          "shown.", choices=("imperial", "metric"), required=True),
    Field("shop.effort_band", GROUP, "pedal effort band", "Target peak pedal effort at the pad.",
          required=True, children=(
              _q("shop.effort_band.low", "low", "Below this the pedal feels too light.",
                 "force", "10 N", "1 kN", required=True),
              _q("shop.effort_band.high", "high", "Above this the pedal is too heavy.",
                 "force", "10 N", "1 kN", required=True),
          )),
    _q("shop.target_effort", "target effort", "The pedal effort `fitment suggest` aims for; "
       "inside the band. Left out: the middle of the band.", "force", "10 N", "1 kN"),
    _q("shop.min_travel_margin", "minimum travel margin", "Bearing travel over needed travel, "
       "e.g. 10 %.", "fraction", "0 %", "100 %", required=True),
    _q("shop.latest_release_point", "latest release point", "Release must happen within this "
       "share of pad travel, e.g. 80 %.", "fraction", "10 %", "100 %", required=True),
    _q("shop.default_efficiency", "default efficiency", "Mechanical efficiency used until "
       "history calibrates it, e.g. 85 % or 0.85.", "fraction", "10 %", "100 %", required=True),
    Field("shop.hose_expansion", GROUP, "hose expansion", "Volume growth of each hose kind: "
          "one figure per hose length per pressure, or points of volume per hose length against "
          "pressure.", required=True, children=tuple(
              _expansion(hose) for hose in model.HOSE_KINDS)),
    _q("shop.fluid_bulk_modulus", "fluid bulk modulus", "Bulk modulus of the brake fluid, "
       "e.g. 1.7 GPa, or one per fluid kind.", "pressure", "0.1 GPa", "10 GPa", required=True,
       alternative=Field("shop.fluid_bulk_modulus.by_fluid", GROUP, "bulk modulus by fluid",
                         "One bulk modulus per fluid kind.", children=tuple(
                             dataclasses.replace(
                                 _q(f"shop.fluid_bulk_modulus.{fluid}", fluid,
                                    f"Bulk modulus of {fluid} fluid.", "pressure", "0.1 GPa",
                                    "10 GPa", required=True), named=fluid)
                             for fluid in model.FLUIDS))),
    _q("shop.line_bore", "line bore", "Inner diameter of the line.", "length", "1 mm", "20 mm",
       default="3.2 mm"),
    _q("shop.max_pushrod_angle", "largest pushrod angle", "Flag the pushrod past this angle to "
       "the bore axis.", "angle", "0.5 deg", "45 deg", default="5 deg"),
    Field("shop.families", NAMES, "gearbox families", "Gearbox family codes the shop knows "
          "besides those its catalogue's gearboxes use, e.g. [QX-5, VK-4]; a build's family must "
          "be one of these or a catalogue gearbox's."),
    Field("shop.publish", CHOICES, "published statuses", "Statuses of the builds the published "
          "site shows. Default: measured, verified, rejected. Drafts are shown only by "
          "`fitment site build --include-drafts` (an internal copy).",
          choices=model.PUBLISHABLE, default=", ".join(model.PUBLISHABLE)),
    _q("shop.master_dead_stroke", "master dead stroke", "Piston travel before the compensating "
       "port closes, for a master that gives none (typical 1.5 mm, from memory).",
       "length", "0 mm", "10 mm", default="1.5 mm"),
    _q("shop.pushrod_free_play", "pushrod free play", "Pushrod clearance at the master, for a "
       "pedal that gives none (typical 1 mm, from memory).", "length", "0 mm", "10 mm",
       default="1 mm"),
    _q("shop.max_travel_margin", "largest travel margin", "Optional: warn when the bearing "
       "travel exceeds what is needed by more than this, e.g. 80 %.", "fraction", "0 %",
       "1000 %"),
)


def _walk(fields: tuple[Field, ...]):
    for field in fields:
        yield field
        yield from _walk(field.children + ((field.alternative,) if field.alternative else ()))


def every_field() -> dict[str, Field]:
    """Dotted key -> Field, for builds (sections and top level), parts and shop rules."""
    found: dict[str, Field] = {}
    for field in _walk(TOP_FIELDS + END_FIELDS + SHOP_FIELDS + tuple(
            f for section in SECTIONS for f in section.fields)):
        found[field.key] = field
    return found


FIELDS = every_field()


@functools.cache
def _bounds(key: str) -> tuple[float, float]:
    field = FIELDS[key]
    return (parse_quantity(field.low, field.dimension, signed=True),
            parse_quantity(field.high, field.dimension))


def label(key: str) -> str:
    """Words for a field, e.g. label("pedal.pivot_to_pad") -> "pivot to pad"."""
    return FIELDS[key].label


def dimension(key: str) -> str | None:
    return FIELDS[key].dimension


# --- JSON Schemas ---------------------------------------------------------------------------

_SCHEMA_URI = "https://json-schema.org/draft/2020-12/schema"
_TEXT_TYPE = ["string", "integer"]


def _quantity_ref(field: Field) -> dict:
    name = f"signed_{field.dimension}" if field.signed else field.dimension
    return {"$ref": f"#/$defs/{name}"}


def _point_node(field: Field) -> dict:
    return {"type": "array", "minItems": 2, "maxItems": 2, "items": _quantity_ref(field)}


def _describe(field: Field) -> str:
    if field.kind in MEASURED_KINDS and field.low is not None:
        extra = f" Plausible: {field.low} to {field.high}."
        if field.default:
            extra += f" Default {field.default}."
        return field.description + extra
    return field.description


def field_schema(field: Field) -> dict:
    """The schema node for one field, with its title and description."""
    kind = field.kind
    if kind == QUANTITY and field.alternative is not None:
        node = {"anyOf": [_quantity_ref(field), field_schema(field.alternative)]}
    elif kind == QUANTITY:
        node = _quantity_ref(field)
    elif kind == TEXT:
        node = {"type": list(_TEXT_TYPE)}
    elif kind == NAME:
        node = {"type": "string", "minLength": 1}
    elif kind == CHOICE:
        node = {"enum": list(field.choices)}
    elif kind == NAMES:
        node = {"type": "array", "uniqueItems": True,
                "items": {"type": list(_TEXT_TYPE), "minLength": 1}}
    elif kind == CHOICES:
        node = {"type": "array", "uniqueItems": True, "items": {"enum": list(field.choices)}}
    elif kind == DATE:
        node = {"type": "string", "pattern": "^[0-9]{4}-[0-9]{2}-[0-9]{2}$"}
    elif kind == BUILD_ID:
        node = {"type": "string", "pattern": model.BUILD_ID_PATTERN}
    elif kind == PART_ID:
        node = {"type": "string", "pattern": PART_ID_PATTERN, "minLength": 2, "maxLength": 24}
    elif kind == POINT:
        node = _point_node(field)
    elif kind == QUANTITIES:
        node = {"type": "array", "minItems": 1, "maxItems": MAX_ALTERNATIVES,
                "items": _quantity_ref(field)}
    elif kind == POINTS:
        node = {"type": "array", "minItems": 1, "maxItems": MAX_ALTERNATIVES,
                "items": _point_node(field)}
    elif kind == CURVE:
        first, second = field.children
        node = {"type": "array", "minItems": field.least_items, "items": {
            "type": "array", "minItems": 2, "maxItems": 2,
            "description": f"A [{first.label}, {second.label}] pair, e.g. {field.example}.",
            "prefixItems": [_quantity_ref(c) | {"description": _describe(c)} for c in field.children],
        }}
    else:  # LAYOUT, GROUP
        node = _object(field.children)
    return node | {"title": field.label[:1].upper() + field.label[1:], "description": _describe(field)}


def _object(fields: tuple[Field, ...]) -> dict:
    node: dict = {"type": "object", "additionalProperties": False}
    required = [f.name for f in fields if f.required]
    if required:
        node["required"] = required
    node["properties"] = {f.name: field_schema(f) for f in fields}
    return node


def _completeness(section: Section) -> dict:
    """What a section written out in full needs: its required keys and its alternatives."""
    need: dict = {"required": list(section.required)}
    alternatives = [list(keys) for keys in section.either] or [[key] for key in section.one_of]
    if alternatives:
        need["anyOf"] = [{"required": keys} for keys in alternatives]
    return need


def _section_schema(section: Section) -> dict:
    node: dict = {"type": "object", "title": section.title, "description": section.description,
                  "additionalProperties": False, "properties": {}}
    if section.catalogue:
        node["description"] += " Either {part: ID} (plus overrides) or all fields inline."
        node["properties"]["part"] = field_schema(Field(
            f"{section.name}.part", PART_ID, "catalogue part",
            f"Id from records/parts/{section.catalogue}.yaml; fields given here override it."))
    node["properties"] |= {f.name: field_schema(f) for f in section.fields}
    if section.one_of:
        node["not"] = {"required": list(section.one_of)}
    if section.catalogue:
        node["anyOf"] = [{"required": ["part"]}, _completeness(section)]
    elif section.name == "measured":
        node["minProperties"] = 1
    else:
        node["required"] = list(section.required)
    return node


def _defs(names) -> dict:
    return {name: {"type": ["string", "number"] if name == "fraction" else "string",
                   "pattern": QUANTITY_DEFS[name][0], "description": QUANTITY_DEFS[name][1]}
            for name in QUANTITY_DEFS if name in names}


def build_schema() -> dict:
    required = [f.name for f in TOP_FIELDS if f.required] + [
        s.name for s in SECTIONS if not s.optional]
    properties = {f.name: field_schema(f) for f in TOP_FIELDS}
    properties |= {s.name: _section_schema(s) for s in SECTIONS}
    properties |= {f.name: field_schema(f) for f in END_FIELDS}
    return {"$schema": _SCHEMA_URI, "title": "Hydraulic clutch build record",
            "description": "One build in records/builds/**/<id>.yaml. Quantities are strings "
                           "with units (7/8 in, 22.2 mm, 410 lbf, 1500 psi, 30 deg).",
            "type": "object", "additionalProperties": False, "required": required,
            "properties": properties, "$defs": _defs(QUANTITY_DEFS)}


def _part_schema(section: Section) -> dict:
    node: dict = {"type": "object", "title": f"{section.title} part",
                  "description": section.description, "additionalProperties": False,
                  "properties": {f.name: field_schema(f) for f in PART_FIELDS + section.fields}}
    if section.one_of:
        node["not"] = {"required": list(section.one_of)}
    need = _completeness(section)
    node["required"] = ["id"] + need["required"]
    if "anyOf" in need:
        node["anyOf"] = need["anyOf"]
    return node


def parts_schema() -> dict:
    kinds = list(PART_KINDS)
    return {
        "$schema": _SCHEMA_URI, "title": "Parts catalogue file",
        "description": "records/parts/<kind>.yaml: {kind, parts: [...]}; each part is a "
                       "complete section of that kind with an id unique across the catalogue.",
        "type": "object", "additionalProperties": False, "required": ["kind", "parts"],
        "properties": {
            "kind": {"enum": kinds, "title": "Kind",
                     "description": "What this file lists; equals the file name."},
            "parts": {"type": "array", "title": "Parts", "description": "The parts of this kind.",
                      "items": {"type": "object", "required": ["id"],
                                "properties": {"id": {k: v for k, v in field_schema(PART_FIELDS[0]).items()
                                                      if k != "title"}}}},
        },
        "allOf": [{"if": {"required": ["kind"], "properties": {"kind": {"const": kind}}},
                   "then": {"properties": {"parts": {"items": {"$ref": f"#/$defs/{PART_KINDS[kind]}_part"}}}}}
                  for kind in kinds],
        "$defs": _defs(QUANTITY_DEFS) | {f"{SECTION[PART_KINDS[k]].name}_part": _part_schema(SECTION[PART_KINDS[k]])
                                         for k in kinds},
    }


def shop_schema() -> dict:
    node = _object(SHOP_FIELDS)
    return {"$schema": _SCHEMA_URI, "title": "Shop rules",
            "description": "records/shop.yaml: display units, targets and physical constants "
                           "used when sizing builds.",
            **node, "$defs": _defs(QUANTITY_DEFS)}


SCHEMAS = {"build": build_schema, "parts": parts_schema, "shop": shop_schema}


def schema_text(name: str) -> str:
    """The committed form of schema `name`: two-space JSON, a newline at the end."""
    return json.dumps(SCHEMAS[name](), indent=2, ensure_ascii=False) + "\n"


def main(argv: list[str] | None = None) -> int:
    import argparse

    parser = argparse.ArgumentParser(prog="python -m builder.fields",
                                     description="Write the JSON Schemas from the field table.")
    parser.add_argument("--write", type=Path, metavar="SCHEMA_DIR",
                        help="write build, parts and shop schemas into this folder")
    args = parser.parse_args(argv)
    if args.write is None:
        parser.print_help()
        return 2
    for name in SCHEMAS:
        (args.write / f"{name}.schema.json").write_text(schema_text(name), encoding="utf-8")
    print(f"wrote {len(SCHEMAS)} schemas into {args.write}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
