"""The invented demo shop's rules, catalogue and gearbox families: every name and number is
made up (see builder.demo for the story). Quantities are written as a technician would
write them (Q: the text and its SI value, read by the records' own unit parser)."""
from __future__ import annotations

import re
from dataclasses import dataclass

from builder.units import INCH, POUND_FORCE, SEEDED_UNITS, parse_quantity

SEED = 7340
FAMILY_EFFICIENCY = {
    "QX-5": 0.86, "VK-4": 0.80, "JH-5R": 0.90, "BQ-4F": 0.78, "ZW-6": 0.84, "YC-6": 0.92,
}
FAMILY_TRAVEL_FACTOR = {
    "QX-5": 0.94, "VK-4": 0.90, "JH-5R": 0.96, "BQ-4F": 0.88, "ZW-6": 0.93, "YC-6": 0.97,
}
EFFORT_NOISE = 0.015  # force gauge, standard deviation, fraction
TRAVEL_NOISE = 0.01  # dial gauge or tape, standard deviation, fraction
GAP_NOISE = 0.02  # standard deviation, fraction

# The "car": what a finished build really has, which its record does not say (or says only
# roughly). Drawn per build around the shop's defaults (from memory, typical of hand-built
# conversions; no source). The engine sizes the record; the measured section comes from the
# car, so calibration meets real model mismatch.
CAR_FREE_PLAY = (0.3e-3, 2.2e-3)  # m, uniform: the pushrod's real clearance (shop says 1 mm)
CAR_FREE_PLAY_READ = 0.15e-3  # m, sd of a technician's own free play reading
CAR_DEAD_STROKE_SD = 0.4e-3  # m, sd around the master's (or the shop's) dead stroke
CAR_HOSE_SD = 0.35  # sd of the log of the real hose expansion over the shop's figure
CAR_SPRING_SD = 3.5  # N, sd of an unrecorded pedal-box spring force at the pad (mean 0)
CAR_SPRING_SLOPE_SD = 15.0  # N/m, sd of how that spring force changes along the pad travel
CAR_PRELOAD = (0.8, 1.2)  # uniform factor on a concentric slave's recorded preload
RECORDED_FREE_PLAY = 0.25  # share of builds whose technician recorded the free play
HOSE_LENGTH_SHARE = 0.45  # share of lines whose record gives the flexible length
ANGLED_MASTER_SHARE = 0.4  # share of pedal layouts whose record gives the bore axis


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
    "max_travel_margin": q("90 %"),
    "hose_expansion": {
        "rubber": ((q("1000 psi"), q("0.66 cc/ft")), (q("1500 psi"), q("0.79 cc/ft"))),
        "braided_ptfe": q("0.03 mL/m/MPa"),
        "steel": q("0.004 mL/m/MPa"),
    },
    "fluid_bulk_modulus": {"DOT 3": q("1.7 GPa"), "DOT 4": q("1.7 GPa"), "DOT 5": q("1.0 GPa"),
                           "DOT 5.1": q("1.7 GPa")},
    "line_bore": q("3/16 in"),
    "max_pushrod_angle": q("5 deg"),
    "publish": ["measured", "verified", "rejected"],
    "master_dead_stroke": q("1.5 mm"),
    "pushrod_free_play": q("1 mm"),
}
SHOP_COMMENTS = {
    "display_units": "imperial | metric; both are always shown",
    "effort_band": "target pedal effort at the pad",
    "min_travel_margin": "bearing travel over what full release needs",
    "max_travel_margin": "more than this and the fingers are pushed further than needed",
    "latest_release_point": "of the pad travel the pedal has",
    "default_efficiency": "until the shop's history calibrates it",
    "hose_expansion": "rubber: FMVSS 106 ceiling for 1/8 in hose (from memory)",
    "fluid_bulk_modulus": "silicone DOT 5 is softer than glycol (from memory)",
    "line_bore": "inner diameter of the hard line",
    "publish": "on the published site; drafts only with --include-drafts",
    "master_dead_stroke": "before the port closes, when a master gives none (from memory)",
    "pushrod_free_play": "at the master, when a pedal gives none (from memory)",
}


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


# Part ids are the shop's own catalogue numbers: a kind prefix and a running number, never
# a figure of the part (a bore, an area) the way some makers' numbers are built.
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
          "clearance": q("0.05 in"), "max_release_travel": q("0.42 in"),
          "load_curve": _curve("0 in, 0 lbf", "0.10 in, 300 lbf", "0.17 in, 340 lbf",
                               "0.28 in, 285 lbf")}),
        ("CL-420", "10.5 in diaphragm, street; release load is the curve's peak",
         {"release_travel": q("0.29 in"), "clearance": q("0.06 in"),
          "load_curve": _curve("0 in, 0 lbf", "0.10 in, 350 lbf", "0.18 in, 395 lbf",
                               "0.29 in, 330 lbf")}),
        ("CL-430", "230 mm diaphragm, organic disc",
         {"release_load": q("1.45 kN"), "release_travel": q("7.0 mm"),
          "clearance": q("1.2 mm")}),
        ("CL-440", "11 in diaphragm, heavy duty",
         {"release_load": q("450 lbf"), "release_travel": q("0.28 in"),
          "clearance": q("0.05 in")}),
        ("CL-450", "240 mm diaphragm, performance",
         {"release_load": q("1.95 kN"), "release_travel": q("7.5 mm"),
          "clearance": q("1.0 mm"), "max_release_travel": q("11 mm")}),
        ("CL-460", "10 in diaphragm, light pressure plate",
         {"release_load": q("300 lbf"), "release_travel": q("0.27 in"),
          "clearance": q("0.05 in")}),
    ]),
    "masters": _entries("masters", [
        ("MC-A1", "5/8 in bore, remote reservoir, flange mount",
         {"bore": q("5/8 in"), "stroke": q("1.40 in"), "rated_pressure": q("1200 psi")}),
        ("MC-A2", "0.70 in bore, integral reservoir",
         {"bore": q("0.70 in"), "stroke": q("1.30 in"), "rated_pressure": q("1500 psi")}),
        ("MC-A3", "3/4 in bore, integral reservoir",
         {"bore": q("3/4 in"), "stroke": q("1.40 in"), "rated_pressure": q("1200 psi")}),
        ("MC-A4", "19.05 mm bore, short body, push-in hose",
         {"bore": q("19.05 mm"), "stroke": q("32 mm"), "rated_pressure": q("8 MPa"),
          "dead_stroke": q("1.0 mm")}),
        ("MC-A5", "20.6 mm bore, side-port reservoir",
         {"bore": q("20.6 mm"), "stroke": q("30 mm"), "rated_pressure": q("8 MPa")}),
        ("MC-A6", "7/8 in bore, remote reservoir",
         {"bore": q("7/8 in"), "stroke": q("1.25 in"), "rated_pressure": q("1000 psi")}),
        ("MC-A7", "1 in bore, heavy duty, centre valve",
         {"bore": q("1 in"), "stroke": q("1.10 in"), "rated_pressure": q("1000 psi"),
          "dead_stroke": q("0.08 in")}),
    ]),
    "slaves": _entries("slaves", [
        ("SC-B1", "3/4 in bore, rod-end eye",
         {"kind": "external", "bore": q("3/4 in"), "stroke": q("1.10 in"),
          "rated_pressure": q("1000 psi")}),
        ("SC-B2", "13/16 in bore, adjustable rod",
         {"kind": "external", "bore": q("13/16 in"), "stroke": q("1.20 in"),
          "rated_pressure": q("1200 psi")}),
        ("SC-B3", "7/8 in bore, adjustable rod",
         {"kind": "external", "bore": q("7/8 in"), "stroke": q("1.20 in"),
          "rated_pressure": q("1200 psi")}),
        ("SC-B4", "22.2 mm bore, two-bolt flange",
         {"kind": "external", "bore": q("22.2 mm"), "stroke": q("30 mm"),
          "rated_pressure": q("8 MPa")}),
        ("SC-B5", "1 in bore, short body",
         {"kind": "external", "bore": q("1 in"), "stroke": q("1.00 in"),
          "rated_pressure": q("900 psi")}),
        ("SC-B6", "1 in bore pull slave, 3/8 in rod through the fluid side",
         {"kind": "external", "acts": "pull", "bore": q("1 in"), "rod_diameter": q("3/8 in"),
          "stroke": q("1.20 in"), "rated_pressure": q("1000 psi")}),
        ("CS-C1", "concentric slave, 690 mm^2 annular piston",
         {"kind": "concentric", "piston_area": q("690 mm^2"), "stroke": q("16 mm"),
          "rated_pressure": q("6 MPa"), "preload": q("90 N")}),
        ("CS-C2", "concentric slave, 1.05 in^2 annular piston, bleed extension",
         {"kind": "concentric", "piston_area": q("1.05 in^2"), "stroke": q("0.75 in"),
          "rated_pressure": q("900 psi"), "preload": q("25 lbf")}),
    ]),
    "pedals": _entries("pedals", [
        ("PD-301", "hanging pedal box, bolt-in, over-centre spring removed",
         {"pivot_to_pad": q("11.25 in"), "pivot_to_clevis": q("1.90 in"),
          "pad_travel": q("6.0 in"), "pushrod": "spherical end, lock nut",
          "bare_effort": _curve("0 in, 3 lbf", "6 in, 5 lbf")}),
        ("PD-302", "hanging pedal, fabricated arm",
         {"pivot_to_pad": q("280 mm"), "pivot_to_clevis": q("50 mm"),
          "pad_travel": q("150 mm"), "pushrod": "clevis pin, adjustable rod"}),
        ("PD-303", "hanging pedal, short arm, light-duty bracket",
         {"pivot_to_pad": q("10.5 in"), "pivot_to_clevis": q("2.25 in"),
          "pad_travel": q("5.75 in"), "pushrod": "clevis pin, adjustable rod"}),
        ("PD-304", "tall hanging pedal, long travel, over-centre assist spring",
         {"pivot_to_pad": q("12.0 in"), "pivot_to_clevis": q("1.85 in"),
          "pad_travel": q("6.75 in"), "pushrod": "spherical end, lock nut",
          "bare_effort": _curve("0 in, 6 lbf", "3 in, 1 lbf", "6.75 in, -7 lbf")}),
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
