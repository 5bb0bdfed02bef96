"""Generate the invented demo shop: ``python -m builder.demo records/ [--force]``.

Everything written is invented: the shop, its technicians (initials only), the vehicles
(described generically), the gearbox family codes and every part code. No real make, model,
gearbox designation, vendor, person or part number appears.

Ranges used to invent the inputs (from memory, typical of hand-built conversions; no source):
master and slave bores 5/8 to 1 in; peak release loads about 1.3 to 4.5 kN; bearing travel
for full release, clearance included, 7 to 10 mm; pedal ratios 4.5 to 7; pad efforts 15 to
45 lbf; pad travel 5.5 to 7 in; lines 24 to 60 in; hoses rubber, braided PTFE or steel;
fluids DOT 3, DOT 4, DOT 5.1.

Measured values are made, not measured. Each build is put together in SI as
``builder.model`` objects (from the same quantity strings the files show), sized with
``builder.engine.size_build(build, rules, efficiency=1.0)`` and then spoiled by its gearbox
family's "true" losses (table below) plus seeded noise:

    pedal_effort          = ideal effort / FAMILY_EFFICIENCY * (1 + N(0, 0.02))
    slave_travel          = computed slave travel * FAMILY_TRAVEL_FACTOR * (1 + N(0, 0.01))
    pad_travel_to_release = computed pad travel to release / FAMILY_TRAVEL_FACTOR
                            * (1 + N(0, 0.01)); left out when the clutch never released
    floor_gap             = computed floor gap * (1 + N(0, 0.02)) when the engine predicts
                            one, else 0

A calibration over this history should recover each family's constants within 3 %.

    family  fork tip   efficiency  travel factor  invented story
    QX-5    rearward      0.86         0.94       light alloy case, ball-stud fork pivot
    VK-4    forward       0.80         0.90       old cast-iron box, cross-shaft fork, bushes
    JH-5R   rearward      0.90         0.96       stiff fork, needle-bearing pivot
    BQ-4F   forward       0.78         0.88       pressed-steel fork that flexes
    ZW-6    forward       0.84         0.93       long bell housing, long pushrod
    YC-6    none          0.92         0.97       concentric slave, no fork

How parts are chosen: for each build the generator tries the catalogue's master/slave pairs
in a seeded order and keeps the first one that behaved as its record says (the "true"
losses above decide: a measured or verified build really released with effort in range; a
rejected build failed the way its notes say; good builds and drafts also carry no "fail"
flag at the shop's default efficiency). Output is byte-for-byte deterministic and does not
depend on today's date; it does depend on the engine, so regenerate with --force after a
change to the engine's formulas (tests/test_demo.py compares byte for byte).
"""
from __future__ import annotations

import argparse
import datetime as dt
import functools
import math
import random
import re
import sys
import textwrap
from dataclasses import dataclass, field
from pathlib import Path

import yaml

from builder import model as m
from builder.engine import Sizing, size_build
from builder.records.fields import merge
from builder.units import INCH, POUND_FORCE, SEEDED_UNITS, parse_quantity

SEED = 7340
FAMILY_EFFICIENCY = {
    "QX-5": 0.86, "VK-4": 0.80, "JH-5R": 0.90, "BQ-4F": 0.78, "ZW-6": 0.84, "YC-6": 0.92,
}
FAMILY_TRAVEL_FACTOR = {
    "QX-5": 0.94, "VK-4": 0.90, "JH-5R": 0.96, "BQ-4F": 0.88, "ZW-6": 0.93, "YC-6": 0.97,
}
EFFORT_NOISE = 0.02  # standard deviation, fraction
TRAVEL_NOISE = 0.01  # standard deviation, fraction
GAP_NOISE = 0.02  # standard deviation, fraction


# What a good build must have shown on the car (the "true" losses applied), and what the
# rejected ones showed. Common practice, no source.
GOOD_REAL_MARGIN = 0.08  # bearing travel over needed, at least
GOOD_EFFORT_N = (15 * POUND_FORCE, 42 * POUND_FORCE)  # at the pad
HEAVY_EFFORT_N = (50 * POUND_FORCE, 65 * POUND_FORCE)  # the rejected "too heavy" pedal


# ----------------------------------------------------------------------------- quantities

@dataclass(frozen=True, slots=True)
class Q:
    """A quantity as written in a record and its SI value, which the text decides."""

    text: str
    si: float


def q(text: str) -> Q:
    """'7/8 in', '1-1/8 in', '19.05 mm', '-60 mm', '410 lbf', '85 %' -> Q.

    The SI value comes from builder.units.parse_quantity, as the records loader reads it.
    """
    dimension = SEEDED_UNITS[text.rsplit(" ", 1)[1]][1]
    return Q(text, parse_quantity(text, dimension, signed=True))


def _number(value: float, places: int) -> str:
    text = f"{value:.{places}f}"
    return "0" if re.fullmatch(r"-?0\.?0*", text) else text


def length(value: float, system: str, in_places: int = 2, mm_places: int = 1) -> Q:
    """A length (m) written the way a technician using `system` would."""
    if system == "imperial":
        return q(f"{_number(value / INCH, in_places)} in")
    return q(f"{_number(value * 1e3, mm_places)} mm")


def force(value: float, system: str) -> Q:
    if system == "imperial":
        return q(f"{_number(value / POUND_FORCE, 1)} lbf")
    return q(f"{_number(value, 0)} N")


def restate(value: Q, system: str, in_places: int = 2, mm_places: int = 1) -> Q:
    """A length copied off a drawing into the technician's own units."""
    if value.text.endswith(" in" if system == "imperial" else " mm"):
        return value
    return length(value.si, system, in_places, mm_places)


# ----------------------------------------------------------------------------- shop rules

SHOP = {
    "site_title": "Demo hydraulic works (invented shop): clutch fitment reference",
    "display_units": "imperial",
    "effort_band": {"low": q("15 lbf"), "high": q("40 lbf")},
    "min_travel_margin": q("10 %"),
    "latest_release_point": q("85 %"),
    "default_efficiency": q("85 %"),
    "hose_expansion": {
        "rubber": q("0.08 mL/m/MPa"),
        "braided_ptfe": q("0.02 mL/m/MPa"),
        "steel": q("0.004 mL/m/MPa"),
    },
    "fluid_bulk_modulus": q("1.7 GPa"),
    "line_bore": q("3/16 in"),
    "max_pushrod_angle": q("5 deg"),
}
SHOP_COMMENTS = {
    "display_units": "imperial | metric; both are always shown",
    "effort_band": "target pedal effort at the pad",
    "min_travel_margin": "bearing travel over what full release needs",
    "latest_release_point": "of pad travel",
    "default_efficiency": "until the shop's history calibrates it",
    "hose_expansion": "volume growth per metre of hose per MPa (from memory)",
    "fluid_bulk_modulus": "glycol brake fluid, from memory",
    "line_bore": "inner diameter of the hard line",
}


def shop_rules() -> m.ShopRules:
    s = SHOP
    return m.ShopRules(
        site_title=s["site_title"],
        display_units=s["display_units"],
        effort_band=(s["effort_band"]["low"].si, s["effort_band"]["high"].si),
        min_travel_margin=s["min_travel_margin"].si,
        latest_release_point=s["latest_release_point"].si,
        default_efficiency=s["default_efficiency"].si,
        hose_expansion={k: v.si for k, v in s["hose_expansion"].items()},
        fluid_bulk_modulus=s["fluid_bulk_modulus"].si,
        line_bore=s["line_bore"].si,
        max_pushrod_angle=s["max_pushrod_angle"].si,
    )


# ----------------------------------------------------------------------------- catalogue

@dataclass(frozen=True)
class CatalogueEntry:
    kind: str  # one of m.PART_KINDS
    id: str
    label: str
    fields: dict  # key -> Q | str | tuple, in record order


def _curve(*pairs: str) -> tuple[tuple[Q, Q], ...]:
    return tuple((q(x), q(y)) for x, y in (p.split(", ") for p in pairs))


def _entries(kind: str, rows) -> list[CatalogueEntry]:
    return [CatalogueEntry(kind, pid, label, fields) for pid, label, fields in rows]


CATALOGUE = {
    "gearboxes": _entries("gearboxes", [
        ("GB-QX5-E", "QX-5 five-speed, early alloy case",
         {"family": "QX-5", "variant": "early case", "fork_tip_moves": "rearward"}),
        ("GB-QX5-L", "QX-5 five-speed, late alloy case with a cast slave boss",
         {"family": "QX-5", "variant": "late case", "fork_tip_moves": "rearward"}),
        ("GB-VK4", "VK-4 four-speed, cast-iron case, cross-shaft fork",
         {"family": "VK-4", "variant": "long input shaft", "fork_tip_moves": "forward"}),
        ("GB-JH5R", "JH-5R five-speed, needle-bearing fork pivot",
         {"family": "JH-5R", "variant": "standard bell housing", "fork_tip_moves": "rearward"}),
        ("GB-BQ4F", "BQ-4F four-speed, pressed-steel fork",
         {"family": "BQ-4F", "variant": "short tail", "fork_tip_moves": "forward"}),
        ("GB-ZW6", "ZW-6 six-speed, long bell housing",
         {"family": "ZW-6", "variant": "deep bell", "fork_tip_moves": "forward"}),
        ("GB-YC6", "YC-6 six-speed, concentric slave on the input bearing retainer",
         {"family": "YC-6", "variant": "concentric retainer", "fork_tip_moves": "none"}),
    ]),
    "clutches": _entries("clutches", [
        ("CL-410", "9.5 in diaphragm, street",
         {"release_load": q("340 lbf"), "release_travel": q("0.28 in"),
          "clearance": q("0.05 in"),
          "load_curve": _curve("0 in, 0 lbf", "0.12 in, 300 lbf", "0.22 in, 340 lbf",
                               "0.33 in, 285 lbf")}),
        ("CL-420", "10.5 in diaphragm, street",
         {"release_load": q("395 lbf"), "release_travel": q("0.29 in"),
          "clearance": q("0.06 in"),
          "load_curve": _curve("0 in, 0 lbf", "0.13 in, 350 lbf", "0.24 in, 395 lbf",
                               "0.35 in, 330 lbf")}),
        ("CL-430", "230 mm diaphragm, organic disc",
         {"release_load": q("1.45 kN"), "release_travel": q("7.0 mm"),
          "clearance": q("1.2 mm")}),
        ("CL-440", "11 in diaphragm, heavy duty",
         {"release_load": q("450 lbf"), "release_travel": q("0.28 in"),
          "clearance": q("0.05 in")}),
        ("CL-450", "240 mm diaphragm, performance",
         {"release_load": q("1.95 kN"), "release_travel": q("7.5 mm"),
          "clearance": q("1.0 mm")}),
        ("CL-460", "10 in diaphragm, light pressure plate",
         {"release_load": q("300 lbf"), "release_travel": q("0.27 in"),
          "clearance": q("0.05 in")}),
    ]),
    "masters": _entries("masters", [
        ("MC-625", "5/8 in bore, remote reservoir, flange mount",
         {"bore": q("5/8 in"), "stroke": q("1.40 in"), "rated_pressure": q("1200 psi")}),
        ("MC-700", "0.70 in bore, integral reservoir",
         {"bore": q("0.70 in"), "stroke": q("1.30 in"), "rated_pressure": q("1500 psi")}),
        ("MC-750", "3/4 in bore, integral reservoir",
         {"bore": q("3/4 in"), "stroke": q("1.40 in"), "rated_pressure": q("1200 psi")}),
        ("MC-191", "19.05 mm bore, short body, push-in hose",
         {"bore": q("19.05 mm"), "stroke": q("32 mm"), "rated_pressure": q("8 MPa")}),
        ("MC-206", "20.6 mm bore, side-port reservoir",
         {"bore": q("20.6 mm"), "stroke": q("30 mm"), "rated_pressure": q("8 MPa")}),
        ("MC-875", "7/8 in bore, remote reservoir",
         {"bore": q("7/8 in"), "stroke": q("1.25 in"), "rated_pressure": q("1000 psi")}),
        ("MC-1000", "1 in bore, heavy duty",
         {"bore": q("1 in"), "stroke": q("1.10 in"), "rated_pressure": q("1000 psi")}),
    ]),
    "slaves": _entries("slaves", [
        ("SC-750", "3/4 in bore, pull-type rod end",
         {"kind": "external", "bore": q("3/4 in"), "stroke": q("1.10 in"),
          "rated_pressure": q("1000 psi")}),
        ("SC-810", "13/16 in bore, adjustable rod",
         {"kind": "external", "bore": q("13/16 in"), "stroke": q("1.20 in"),
          "rated_pressure": q("1200 psi")}),
        ("SC-875", "7/8 in bore, adjustable rod",
         {"kind": "external", "bore": q("7/8 in"), "stroke": q("1.20 in"),
          "rated_pressure": q("1200 psi")}),
        ("SC-222", "22.2 mm bore, two-bolt flange",
         {"kind": "external", "bore": q("22.2 mm"), "stroke": q("30 mm"),
          "rated_pressure": q("8 MPa")}),
        ("SC-1000", "1 in bore, short body",
         {"kind": "external", "bore": q("1 in"), "stroke": q("1.00 in"),
          "rated_pressure": q("900 psi")}),
        ("CS-690", "concentric slave, 690 mm^2 annular piston",
         {"kind": "concentric", "piston_area": q("690 mm^2"), "stroke": q("16 mm"),
          "rated_pressure": q("6 MPa")}),
        ("CS-105", "concentric slave, 1.05 in^2 annular piston, bleed extension",
         {"kind": "concentric", "piston_area": q("1.05 in^2"), "stroke": q("0.75 in"),
          "rated_pressure": q("900 psi")}),
    ]),
    "pedals": _entries("pedals", [
        ("PD-301", "hanging pedal box, bolt-in, over-centre spring removed",
         {"pivot_to_pad": q("11.25 in"), "pivot_to_clevis": q("1.90 in"),
          "pad_travel": q("6.0 in"), "pushrod": "spherical end, lock nut"}),
        ("PD-302", "hanging pedal, fabricated arm",
         {"pivot_to_pad": q("280 mm"), "pivot_to_clevis": q("50 mm"),
          "pad_travel": q("150 mm"), "pushrod": "clevis pin, adjustable rod"}),
        ("PD-303", "hanging pedal, short arm, light-duty bracket",
         {"pivot_to_pad": q("10.5 in"), "pivot_to_clevis": q("2.25 in"),
          "pad_travel": q("5.75 in"), "pushrod": "clevis pin, adjustable rod"}),
        ("PD-304", "tall hanging pedal, long travel",
         {"pivot_to_pad": q("12.0 in"), "pivot_to_clevis": q("1.85 in"),
          "pad_travel": q("6.75 in"), "pushrod": "spherical end, lock nut"}),
    ]),
}
PARTS = {e.id: e for entries in CATALOGUE.values() for e in entries}


# ----------------------------------------------------------------------------- families

@dataclass(frozen=True)
class Family:
    code: str
    gearboxes: tuple[str, ...]
    forks: tuple[tuple[str, str], ...]  # (pivot_to_slave, pivot_to_bearing); () concentric
    clutches: tuple[str, ...]
    vehicles: tuple[str, ...]
    builds: int  # measured or verified builds to make


FAMILIES = (
    Family("QX-5", ("GB-QX5-E", "GB-QX5-L"),
           (("5.6 in", "2.8 in"), ("5.25 in", "2.9 in"), ("6.0 in", "3.1 in")),
           ("CL-410", "CL-420", "CL-460"),
           ("1980s compact roadster, inline four", "1970s light pickup, inline six",
            "1960s two-door coupe, small-block V8", "1990s sport compact, turbo inline four"),
           14),
    Family("VK-4", ("GB-VK4",), (("4.9 in", "2.6 in"), ("5.5 in", "2.75 in")),
           ("CL-420", "CL-440", "CL-460"),
           ("1950s panel van, flathead six", "1960s full-size sedan, big-block V8",
            "1970s off-road wagon, V8", "1960s light pickup, inline six"),
           11),
    Family("JH-5R", ("GB-JH5R",), (("140 mm", "78 mm"), ("150 mm", "80 mm")),
           ("CL-430", "CL-450"),
           ("1990s mid-size sedan, turbo inline four", "1980s hatchback, inline four",
            "kit-built roadster, inline four"),
           8),
    Family("BQ-4F", ("GB-BQ4F",), (("5.0 in", "2.4 in"), ("4.6 in", "2.5 in")),
           ("CL-460", "CL-410"),
           ("1960s small sedan, inline four", "1970s light utility, inline four"),
           5),
    Family("ZW-6", ("GB-ZW6",), (("165 mm", "85 mm"), ("155 mm", "84 mm")),
           ("CL-430", "CL-450", "CL-420"),
           ("2000s two-door coupe, V8 swap", "1980s light pickup, diesel inline four",
            "kit-built roadster, V8"),
           6),
    Family("YC-6", ("GB-YC6",), (),
           ("CL-430", "CL-450"),
           ("2000s hatchback, turbo inline four", "1990s two-door coupe, V6 swap",
            "kit-built track car, inline four"),
           6),
)
FAMILY = {f.code: f for f in FAMILIES}

# Rejected builds: (family, what went wrong). Drafts: families of open proposals.
REJECTED = (("QX-5", "travel"), ("VK-4", "effort"), ("BQ-4F", "bottoms"), ("YC-6", "travel"))
DRAFTS = (("QX-5", ""), ("JH-5R", ""), ("ZW-6", "steep pushrod"), ("YC-6", ""))

TECHNICIANS = {  # initials -> (units they write, how they measure)
    "RL": ("imperial", "spring gauge at pad centre, engine off; dial indicator on the slave rod"),
    "JM": ("imperial", "digital force gauge at pad centre, engine off; tape at the pad"),
    "AS": ("imperial", "spring gauge at pad centre, engine idling; dial indicator on the slave"),
    "TK": ("metric", "force gauge at pad centre, engine off; calipers on the slave rod"),
    "DP": ("metric", "load cell on the pad, engine off; dial gauge on the slave rod"),
}
BRACKETS = (
    "side flange, slotted holes", "two-bolt plate on the bell housing ears",
    "welded tab, shimmed square to the fork", "cast boss, spacer plate",
)
GOOD_OUTCOMES = (
    "full release, no drag at idle or high rpm",
    "releases cleanly; engagement in the middle of the pedal",
    "full release; smooth take-up",
    "full release, gears select quietly from cold",
)
HOSE_WEIGHTS = (("rubber", 2), ("braided_ptfe", 5), ("steel", 2))
FLUID_WEIGHTS = (("DOT 3", 2), ("DOT 4", 5), ("DOT 5.1", 2))


# ----------------------------------------------------------------------------- records

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


def to_build(rec: Record) -> m.Build:
    """The record as the engine sees it, in SI, from the very strings it will show."""
    s = {k: (v.resolved() if v is not None else None) for k, v in rec.sections.items()}
    parts = {k: (v.part if v is not None else None) for k, v in rec.sections.items()}
    g, c, fk, ms, sl, ln, pd = (s[k] for k in
                                ("gearbox", "clutch", "fork", "master", "slave", "line", "pedal"))

    def si(d: dict, key: str) -> float | None:
        return d[key].si if key in d else None

    layout = pd.get("layout")
    measured = None
    if rec.measured is not None:
        measured = m.Measured(**{k: (v.si if isinstance(v, Q) else v)
                                 for k, v in rec.measured.items()})
    return m.Build(
        id=rec.id, date=rec.date, status=rec.status, technician=rec.technician,
        vehicle=rec.vehicle,
        gearbox=m.Gearbox(g["family"], g.get("variant"), g["fork_tip_moves"], parts["gearbox"]),
        clutch=m.Clutch(
            c["release_load"].si, c["release_travel"].si, c["clearance"].si,
            tuple((a.si, b.si) for a, b in c["load_curve"]) if "load_curve" in c else None,
            parts["clutch"]),
        fork=m.Fork(fk["pivot_to_slave"].si, fk["pivot_to_bearing"].si) if fk else None,
        master=m.Master(ms["bore"].si, ms["stroke"].si, si(ms, "rated_pressure"),
                        parts["master"]),
        slave=m.Slave(sl["kind"], si(sl, "bore"), si(sl, "piston_area"), sl["stroke"].si,
                      si(sl, "rated_pressure"), sl.get("bracket"), parts["slave"]),
        line=m.Line(ln["length"].si, ln["hose"], ln["fluid"]),
        pedal=m.Pedal(
            si(pd, "pivot_to_pad"), si(pd, "pivot_to_clevis"), pd["pad_travel"].si,
            pd.get("pushrod"),
            m.PedalLayout(*(tuple(v.si for v in layout[k]) for k in
                            ("pivot", "pad", "clevis", "pushrod_seat")),
                          layout["rotation_to_stop"].si) if layout else None,
            parts["pedal"]),
        measured=measured, outcome=rec.outcome, notes=rec.notes,
    )


# ----------------------------------------------------------------------------- inventing

def _weighted(rng: random.Random, table) -> str:
    return rng.choices([k for k, _ in table], [w for _, w in table])[0]


def _pedal_layout(rng: random.Random, pedal: dict, system: str, misalign_deg: float) -> dict:
    """A side view at rest that agrees with the pedal's lengths and pad travel.

    Frame: x forward (towards the bulkhead), y up, pivot at the origin; the pedal swings
    counter-clockwise to push the master forward. The bore axis follows the clevis's
    chord through the swing, give or take a couple of degrees (plus misalign_deg).
    """
    r_pad, r_clevis = pedal["pivot_to_pad"].si, pedal["pivot_to_clevis"].si
    swing_deg = round(math.degrees(pedal["pad_travel"].si / r_pad) * 2.0) / 2.0
    swing = math.radians(swing_deg)
    lean_pad = math.radians(rng.uniform(8.0, 18.0))
    lean_clevis = swing / 2.0 + math.radians(rng.uniform(-3.0, 3.0))
    pad = (-r_pad * math.sin(lean_pad), -r_pad * math.cos(lean_pad))
    clevis = (-r_clevis * math.sin(lean_clevis), -r_clevis * math.cos(lean_clevis))
    chord = lean_clevis - swing / 2.0  # angle of the clevis chord below the horizontal
    axis = -chord + math.radians(rng.uniform(-2.0, 2.0) + misalign_deg)
    rod = rng.uniform(4.5, 6.0) * INCH
    seat = (clevis[0] + rod * math.cos(axis), clevis[1] + rod * math.sin(axis))

    def point(p):
        return tuple(length(v, system, in_places=2, mm_places=1) for v in p)

    return {"pivot": point((0.0, 0.0)), "pad": point(pad), "clevis": point(clevis),
            "pushrod_seat": point(seat), "rotation_to_stop": q(f"{swing_deg:g} deg")}


def _add_layout(rng: random.Random, pedal: Section, system: str, misalign_deg: float) -> None:
    """Give a pedal section a side-view layout (see _pedal_layout)."""
    pedal.fields["layout"] = _pedal_layout(rng, pedal.resolved(), system, misalign_deg)
    pedal.comments["layout"] = "side view at rest, x forward, y up"


def _inline_clutch(rng: random.Random, system: str, heavy: bool) -> Section:
    """A clutch the customer supplied, bench-measured, with a load curve half the time."""
    load = rng.uniform(2.9, 3.4) * 1e3 if heavy else rng.uniform(1.35, 2.0) * 1e3
    release = rng.uniform(6.0, 8.0) * 1e-3
    clearance = rng.uniform(1.0, 1.5) * 1e-3
    fields = {"release_load": q(f"{5 * round(load / POUND_FORCE / 5)} lbf" if system == "imperial"
                                else f"{load / 1e3:.2f} kN"),
              "release_travel": length(release, system),
              "clearance": length(clearance, system)}
    if heavy or rng.random() < 0.5:
        peak, c, r = fields["release_load"], fields["clearance"].si, fields["release_travel"].si
        shape = ((0.0, 0.0), (c + 0.3 * r, 0.87), (c + 0.6 * r, 1.0), (c + r, 0.8))
        fields["load_curve"] = tuple(
            (length(x, system), q(peak.text) if k == 1.0 else _scaled(peak, k))
            for x, k in shape)
    return Section(None, fields, {"release_load": "bench-measured on the press"})


def _scaled(load: Q, k: float) -> Q:
    magnitude, unit = load.text.split(" ")
    places = 2 if unit == "kN" else 0
    return q(f"{_number(float(magnitude) * k, places)} {unit}")


def _inline_pedal(rng: random.Random, system: str) -> Section:
    pad_len = rng.uniform(10.5, 12.5) * INCH
    ratio = rng.uniform(5.0, 6.6)
    travel = rng.uniform(5.6, 6.9) * INCH
    fields = {"pivot_to_pad": length(pad_len, system, 2, 0),
              "pivot_to_clevis": length(pad_len / ratio, system, 2, 1),
              "pad_travel": length(travel, system, 1, 0),
              "pushrod": "clevis pin, adjustable rod"}
    return Section(None, fields)


def _copy_inline(entry: CatalogueEntry, system: str) -> Section:
    """A catalogue part's values written out by hand in the technician's units, no id."""
    fields = dict(entry.fields)
    fields["stroke"] = restate(fields["stroke"], system)
    if "bore" in fields:
        fields["bore"] = restate(fields["bore"], system, in_places=3, mm_places=2)
    return Section(None, fields)


@dataclass
class Plan:
    """Everything decided about a build before its master and slave are chosen."""

    id: str
    date: dt.date
    status: str
    family: Family
    trouble: str  # "" for a good build or a plain draft; else what goes wrong
    technician: str
    system: str
    vehicle: str
    sections: dict
    master_style: str  # part | limiter | inline
    slave_style: str  # part | bracket | inline


def _plan(rng: random.Random, ident: str, date: dt.date, status: str, family: Family,
          trouble: str) -> Plan:
    tech = rng.choice(sorted(TECHNICIANS))
    system = TECHNICIANS[tech][0]
    by_hand = rng.random() < 0.1  # nothing from the catalogue: every section inline
    gearbox_id = rng.choice(family.gearboxes)
    gearbox = (Section(gearbox_id) if rng.random() < 0.85 and not by_hand
               else Section(None, dict(PARTS[gearbox_id].fields)))
    if trouble == "effort":
        clutch = _inline_clutch(rng, system, heavy=True)
    elif by_hand or rng.random() < 0.2:
        clutch = _inline_clutch(rng, system, heavy=False)
    else:
        clutch = Section(rng.choice(family.clutches))
        catalogue = PARTS[clutch.part].fields
        if "load_curve" not in catalogue and rng.random() < 0.2:
            clutch.fields["release_load"] = _scaled(catalogue["release_load"],
                                                    rng.uniform(0.94, 1.06))
            clutch.comments["release_load"] = "this plate, bench-measured on the press"
    fork = None
    if family.forks:
        to_slave, to_bearing = rng.choice(family.forks)
        fork = Section(None, {"pivot_to_slave": restate(q(to_slave), system),
                              "pivot_to_bearing": restate(q(to_bearing), system)})
    if trouble == "bottoms":
        pedal = Section(None, {"pivot_to_pad": length(11.5 * INCH, system, 2, 0),
                               "pivot_to_clevis": length(11.5 * INCH / 4.5, system, 2, 1),
                               "pad_travel": length(6.9 * INCH, system, 1, 0),
                               "pushrod": "solid rod, welded clevis"})
    else:
        roll = rng.random()
        pedal = (_inline_pedal(rng, system) if by_hand or roll < 0.2
                 else Section(rng.choice(sorted(e.id for e in CATALOGUE["pedals"]))))
        if trouble == "steep pushrod" or rng.random() < 0.3:
            _add_layout(rng, pedal, system, 35.0 if trouble == "steep pushrod" else 0.0)
    length_in = rng.randrange(24, 61, 2)
    line = Section(None, {
        "length": q(f"{length_in} in") if system == "imperial"
        else q(f"{round(length_in * 25.4, -1):.0f} mm"),
        "hose": _weighted(rng, HOSE_WEIGHTS), "fluid": _weighted(rng, FLUID_WEIGHTS)})
    master_style = rng.choices(("part", "limiter", "inline"), (65, 10, 25))[0]
    slave_style = rng.choices(("part", "bracket", "inline"), (30, 45, 25))[0]
    if by_hand:
        master_style = slave_style = "inline"
    return Plan(ident, date, status, family, trouble, tech, system,
                rng.choice(family.vehicles),
                {"gearbox": gearbox, "clutch": clutch, "fork": fork, "pedal": pedal, "line": line},
                master_style, slave_style)


def _master_section(plan: Plan, entry: CatalogueEntry) -> Section:
    if plan.master_style == "inline":
        return _copy_inline(entry, plan.system)
    if plan.master_style == "limiter" and entry.fields["stroke"].si > 1.3 * INCH:
        return Section(entry.id, {"stroke": restate(q("1.25 in"), plan.system)},
                       {"stroke": "stroke limiter fitted"})
    return Section(entry.id)


def _slave_section(plan: Plan, entry: CatalogueEntry, rng: random.Random) -> Section:
    bracket = rng.choice(BRACKETS) if entry.fields["kind"] == "external" else None
    if plan.slave_style == "inline":
        section = _copy_inline(entry, plan.system)
        if bracket:
            section.fields["bracket"] = bracket
        return section
    if plan.slave_style == "bracket" and bracket:
        return Section(entry.id, {"bracket": bracket})
    return Section(entry.id)


def _record(plan: Plan, master: Section, slave: Section) -> Record:
    sections = dict(plan.sections)
    sections["master"], sections["slave"] = master, slave
    order = ("gearbox", "clutch", "fork", "master", "slave", "line", "pedal")
    return Record(plan.id, plan.date, plan.status, plan.technician, plan.vehicle,
                  {k: sections[k] for k in order})


def _real(sizing: Sizing, family: str) -> tuple[float, float]:
    """(real margin, real effort N) under the family's true losses."""
    factor = FAMILY_TRAVEL_FACTOR[family]
    return factor * (1.0 + sizing.margin) - 1.0, sizing.effort_ideal / FAMILY_EFFICIENCY[family]


def _fits(plan: Plan, sizing: Sizing) -> bool:
    """Whether a sizing behaves the way the plan's record says it did (or will)."""
    fails = any(f.severity == "fail" for f in sizing.flags)
    warns = {f.code for f in sizing.flags}
    margin, effort = _real(sizing, plan.family.code)
    trouble = plan.trouble
    if trouble == "travel":
        return 0.01 <= sizing.margin <= 0.10 and margin < -0.005 and not sizing.floor_gap
    if trouble == "effort":
        return (HEAVY_EFFORT_N[0] <= effort <= HEAVY_EFFORT_N[1] and not fails
                and GOOD_REAL_MARGIN <= margin and sizing.margin <= 0.9)
    if trouble == "bottoms":
        return sizing.floor_gap >= 0.6 * INCH and margin < 0.0 and sizing.margin > -0.08
    if trouble == "steep pushrod":
        return "pushrod-off-axis" in warns and not fails
    return (not fails and margin >= GOOD_REAL_MARGIN and sizing.margin <= 0.9
            and GOOD_EFFORT_N[0] <= effort <= GOOD_EFFORT_N[1]
            and "release-late" not in warns)


def _choose(plan: Plan, rng: random.Random, rules: m.ShopRules) -> tuple[Record, Sizing] | None:
    """Try catalogue master/slave pairs in a seeded order; keep the first that fits."""
    kind = "external" if plan.family.forks else "concentric"
    pairs = [(mc, sc) for mc in CATALOGUE["masters"] for sc in CATALOGUE["slaves"]
             if sc.fields["kind"] == kind]
    rng.shuffle(pairs)
    for mc, sc in pairs:
        rec = _record(plan, _master_section(plan, mc), _slave_section(plan, sc, rng))
        sizing = size_build(to_build(rec), rules)
        if _fits(plan, sizing):
            return rec, sizing
    return None


def _schedule(rng: random.Random) -> list[tuple[str, dt.date, str, str, str]]:
    """(id, date, status, family, trouble) for every build, in id order."""
    slots = [(f.code, "") for f in FAMILIES for _ in range(f.builds)] + list(REJECTED)
    rng.shuffle(slots)
    start, end = dt.date(2023, 1, 9), dt.date(2025, 12, 19)
    days = sorted(rng.sample(range((end - start).days), len(slots)))
    rows = []
    for (family, trouble), day in zip(slots, days):
        date = start + dt.timedelta(days=day)
        if trouble:
            status = "rejected"
        elif date < dt.date(2025, 7, 1) and rng.random() < 0.6:
            status = "verified"
        else:
            status = "measured"
        rows.append((date, status, family, trouble))
    for n, (family, trouble) in enumerate(DRAFTS):
        rows.append((dt.date(2026, 1, 12) + dt.timedelta(days=17 * n), "draft", family, trouble))
    return [(f"HW-{101 + n:04d}", *row) for n, row in enumerate(rows)]


def _measure(rec: Record, rules: m.ShopRules) -> dict:
    """The measured section: the engine's ideal numbers spoiled by the family's true losses."""
    rng = random.Random(f"{SEED}-{rec.id}")
    build = to_build(rec)
    ideal = size_build(build, rules, efficiency=1.0)
    family = rec.family
    eff, factor = FAMILY_EFFICIENCY[family], FAMILY_TRAVEL_FACTOR[family]
    system, method = TECHNICIANS[rec.technician]
    effort = ideal.effort_ideal / eff * (1.0 + rng.gauss(0.0, EFFORT_NOISE))
    slave = ideal.slave_travel * factor * (1.0 + rng.gauss(0.0, TRAVEL_NOISE))
    release_noise = 1.0 + rng.gauss(0.0, TRAVEL_NOISE)
    gap = ideal.floor_gap * (1.0 + rng.gauss(0.0, GAP_NOISE)) if ideal.floor_gap else 0.0
    measured = {"pedal_effort": force(effort, system),
                "slave_travel": length(slave, system, 3, 1)}
    if ideal.pad_travel_to_release is not None:
        release = ideal.pad_travel_to_release / factor * release_noise
        if release < build.pedal.pad_travel - ideal.floor_gap:
            measured["pad_travel_to_release"] = length(release, system, 1, 0)
    measured["floor_gap"] = length(gap, system, 2, 0)  # "0 in" / "0 mm" when none
    measured["method"] = method
    return measured


def _notes(rec: Record, sizing: Sizing, trouble: str,
           rng: random.Random) -> tuple[str | None, str]:
    """(outcome, notes) in plain words, from what the record shows."""
    measured = rec.measured or {}
    effort = measured.get("pedal_effort")
    if rec.status == "draft":
        text = (f"Proposal for a {rec.vehicle}. Parts not ordered yet; check against past "
                f"{rec.family} builds first.")
        if trouble == "steep pushrod":
            text += (" The master has to sit steeply on the bulkhead here, so the pushrod"
                     " angle wants a look before anything is drilled.")
        return None, text
    if trouble == "travel":
        return ("clutch dragged, would not select first at idle; build rejected",
                f"Rejected. Travel short: the slave moved {measured['slave_travel'].text} and "
                f"the clutch never fully released; the calculation left only "
                f"{sizing.margin * 100:.0f} % margin and the real losses ate it. "
                "Needs a larger master bore or a smaller slave for more travel.")
    if trouble == "effort":
        return ("pedal too heavy for the customer; build rejected",
                f"Rejected. Effort too high: {effort.text} at the pad with the customer's "
                "heavy clutch; could not be held in traffic. Pressure plate to be swapped "
                "for a lighter one before trying again.")
    if trouble == "bottoms":
        return ("master bottomed early and the clutch dragged; build rejected",
                f"Rejected. Master bottomed early: the master ran out of stroke "
                f"{measured['floor_gap'].text} before the pedal stop and the clutch never "
                "fully released. Needs a master that sweeps more fluid (longer stroke or "
                "larger bore), with the pedal stop set where it bottoms.")
    parts = [rng.choice((
        "Bled from the slave end with a pressure bleeder.",
        "Line clipped along the frame rail away from the exhaust.",
        "Pushrod free play set at the pad before the final bleed.",
        "Reservoir mounted above the master, hose run without dips.",
    ))]
    if sizing.floor_gap:
        parts.append("Master bottoms before the pedal stop; stop bolt set to suit.")
    if effort is not None and effort.si > 38 * POUND_FORCE:
        parts.append("Pedal on the heavy side; customer chose it over a lighter plate.")
    return rng.choice(GOOD_OUTCOMES), " ".join(parts)


def invent(rng: random.Random, rules: m.ShopRules, ident: str, date: dt.date, status: str,
           family: str, trouble: str, enrich=None) -> tuple[Record, Sizing]:
    """One build that went as its record says: parts that fit, measured section, notes.

    enrich(plan, rng), when given, may change each plan before its master and slave are chosen.
    """
    for _ in range(60):
        plan = _plan(rng, ident, date, status, FAMILY[family], trouble)
        if enrich is not None:
            enrich(plan, rng)
        chosen = _choose(plan, rng, rules)
        if chosen:
            break
    else:
        raise RuntimeError(f"{ident}: no catalogue pair fits a {family} '{trouble}' build")
    rec, sizing = chosen
    if status != "draft":
        rec.measured = _measure(rec, rules)
    rec.outcome, notes = _notes(rec, sizing, trouble, rng)
    rec.notes = "\n".join(textwrap.wrap(notes, 88)) + "\n"  # as the block scalar reads
    return rec, sizing


def make_demo() -> tuple[list[Record], list[Sizing]]:
    """Every demo record (id order) and its sizing at the shop's default efficiency."""
    rules = shop_rules()
    rng = random.Random(SEED)
    made = [invent(rng, rules, *row) for row in _schedule(rng)]
    return [rec for rec, _ in made], [sizing for _, sizing in made]


# ----------------------------------------------------------------------------- writing

def _scalar(value) -> str:
    """A YAML scalar: plain when it reads back as the same string, else double-quoted."""
    if isinstance(value, Q):
        return value.text
    if isinstance(value, dt.date):
        return value.isoformat()
    text = str(value)
    if _reads_back(text):
        return text
    return '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'


@functools.lru_cache(maxsize=4096)
def _reads_back(text: str) -> bool:
    """Whether `k: text` parses back to the string text (a YAML parse: memoised)."""
    try:
        return text == text.strip() and yaml.safe_load(f"k: {text}") == {"k": text}
    except yaml.YAMLError:
        return False


def _flow(values) -> str:
    return "[" + ", ".join(_scalar(v) for v in values) + "]"


def _line(text: str, comment: str | None) -> str:
    return f"{text:<29} # {comment}" if comment else text


def _mapping(fields: dict, comments: dict, indent: int) -> list[str]:
    pad = " " * indent
    lines = []
    for key, value in fields.items():
        comment = comments.get(key)
        if isinstance(value, dict):
            lines.append(_line(f"{pad}{key}:", comment))
            lines += _mapping(value, {}, indent + 2)
        elif isinstance(value, tuple) and value and isinstance(value[0], tuple):
            lines.append(_line(f"{pad}{key}:", comment))
            lines += [f"{pad}  - {_flow(pair)}" for pair in value]
        elif isinstance(value, tuple):
            lines.append(_line(f"{pad}{key}: {_flow(value)}", comment))
        else:
            lines.append(_line(f"{pad}{key}: {_scalar(value)}", comment))
    return lines


def _modeline(schema: str, depth: int) -> str:
    return f"# yaml-language-server: $schema={'../' * depth}schema/{schema}.schema.json"


def shop_text() -> str:
    lines = [_modeline("shop", 1), "# Invented demo shop: every name and number here is made up."]
    lines += _mapping(SHOP, SHOP_COMMENTS, 0)
    return "\n".join(lines) + "\n"


def parts_text(kind: str) -> str:
    lines = [_modeline("parts", 2), f"# Invented demo catalogue: {kind}.", f"kind: {kind}",
             "parts:"]
    for entry in CATALOGUE[kind]:
        body = _mapping({"id": entry.id, "label": entry.label} | entry.fields, {}, 4)
        lines += ["  - " + body[0].lstrip()] + body[1:]
    return "\n".join(lines) + "\n"


def build_text(rec: Record) -> str:
    head = {"id": rec.id, "date": rec.date, "status": rec.status,
            "technician": rec.technician, "vehicle": rec.vehicle}
    lines = [_modeline("build", 3)] + _mapping(head, {}, 0)
    for key, section in rec.sections.items():
        if section is None:
            continue
        fields = ({"part": section.part} if section.part else {}) | section.fields
        lines.append(f"{key}:")
        lines += _mapping(fields, section.comments, 2)
    if rec.measured:
        lines.append("measured:")
        lines += _mapping(rec.measured, {}, 2)
    if rec.outcome:
        lines += _mapping({"outcome": rec.outcome}, {}, 0)
    if rec.notes:
        lines.append("notes: |")
        lines += ["  " + row for row in rec.notes.splitlines()]
    return "\n".join(lines) + "\n"


def build_path(rec: Record) -> str:
    """Where a build's file goes, relative to the records folder."""
    return f"builds/{rec.date.year}/{rec.id}.yaml"


def rules_files() -> dict[str, str]:
    """Relative path -> text of shop.yaml and the parts catalogue."""
    return {"shop.yaml": shop_text()} | {
        f"parts/{kind}.yaml": parts_text(kind) for kind in m.PART_KINDS}


def demo_files() -> dict[str, str]:
    """Relative path -> text for every file of the demo shop."""
    records, _ = make_demo()
    return rules_files() | {build_path(r): build_text(r) for r in records}


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


def write_demo(out_dir: Path, force: bool = False) -> list[Path]:
    """Write the demo shop under out_dir; refuse to overwrite anything unless force."""
    files = demo_files()
    targets = [out_dir / rel for rel in files]
    if force:
        for path in sorted(set((out_dir / "builds").glob("*/HW-*.yaml")) - set(targets)):
            path.unlink()
    elif existing := [p for p in targets if p.exists()]:
        raise FileExistsError(f"{existing[0]} exists (and {len(existing) - 1} more);"
                              " use --force to regenerate")
    return write_files(out_dir, files)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m builder.demo",
                                     description="Write the invented demo shop.")
    parser.add_argument("out_dir", type=Path, help="records folder to write, e.g. records/")
    parser.add_argument("--force", action="store_true", help="overwrite existing demo files")
    args = parser.parse_args(argv)
    try:
        written = write_demo(args.out_dir, args.force)
    except FileExistsError as err:
        print(f"{err}", file=sys.stderr)
        return 1
    print(f"wrote {len(written)} files under {args.out_dir}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
