"""Inventing the demo's builds: a plan per build, the first catalogue master and slave that
behave as the record says, then the measured section and the notes."""
from __future__ import annotations

import dataclasses
import datetime as dt
import math
import random
import textwrap
from dataclasses import dataclass

from builder import model as m
from builder.demo.catalogue import (ANGLED_MASTER_SHARE, BRACKETS, CAR_DEAD_STROKE_SD,
                                    CAR_FREE_PLAY, CAR_FREE_PLAY_READ, CAR_HOSE_SD, CAR_PRELOAD,
                                    CAR_SPRING_SD, CAR_SPRING_SLOPE_SD, CATALOGUE, DRAFTS,
                                    EFFORT_NOISE, FAMILIES, FAMILY, FAMILY_EFFICIENCY,
                                    FAMILY_TRAVEL_FACTOR, FLUID_WEIGHTS, GAP_NOISE, GOOD_EFFORT_N,
                                    GOOD_OUTCOMES, GOOD_REAL_MARGIN, HEAVY_EFFORT_N,
                                    HOSE_LENGTH_SHARE, HOSE_WEIGHTS, PARTS, RECORDED_FREE_PLAY,
                                    REJECTED, SEED, TECHNICIANS, TRAVEL_NOISE, CatalogueEntry,
                                    Family, Q, force, length, q, restate, _number)
from builder.demo.files import Record, Section, load
from builder.demo.files import rules as demo_rules
from builder.engine import Sizing, size_build
from builder.units import INCH, POUND_FORCE

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
    angled = misalign_deg == 0.0 and rng.random() < ANGLED_MASTER_SHARE
    bore_axis = round(math.degrees(axis) * 2.0) / 2.0  # the master's axis, as measured
    tilt = math.radians(rng.choice((-1.0, 1.0)) * rng.uniform(1.5, 4.0)) if angled else 0.0
    seat = (clevis[0] + rod * math.cos(axis + tilt), clevis[1] + rod * math.sin(axis + tilt))

    def point(p):
        return tuple(length(v, system, in_places=2, mm_places=1) for v in p)

    drawn = {"pivot": point((0.0, 0.0)), "pad": point(pad), "clevis": point(clevis),
             "pushrod_seat": point(seat), "rotation_to_stop": q(f"{swing_deg:g} deg")}
    if angled:  # the pushrod meets the master at a small angle at rest
        drawn["bore_axis"] = q(f"{bore_axis:g} deg")
    return drawn


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
    comments = {"release_load": "bench-measured on the press"}
    if heavy or rng.random() < 0.5:
        peak, r = fields["release_load"], fields["release_travel"].si
        shape = ((0.0, 0.0), (0.3 * r, 0.87), (0.6 * r, 1.0), (r, 0.8))  # from first contact
        fields["load_curve"] = tuple(
            (length(x, system), q(peak.text) if k == 1.0 else _scaled(peak, k))
            for x, k in shape)
        if rng.random() < 0.5:  # the curve's peak is the release load
            del fields["release_load"]
            comments = {"load_curve": "bench-measured on the press, from first contact"}
    return Section(None, fields, comments)


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
    if rng.random() < RECORDED_FREE_PLAY:  # measured at the pad with the pedal box on the car
        play = length(rng.uniform(*CAR_FREE_PLAY), system, in_places=3, mm_places=1)
        pedal.fields["free_play"] = play
    length_in = rng.randrange(24, 61, 2)
    line = Section(None, {
        "length": q(f"{length_in} in") if system == "imperial"
        else q(f"{round(length_in * 25.4, -1):.0f} mm"),
        "hose": _weighted(rng, HOSE_WEIGHTS), "fluid": _weighted(rng, FLUID_WEIGHTS)})
    if line.fields["hose"] != "steel" and rng.random() < HOSE_LENGTH_SHARE:
        hose_in = rng.randrange(10, 21, 2)
        line.fields["hose_length"] = (q(f"{hose_in} in") if system == "imperial"
                                      else q(f"{round(hose_in * 25.4, -1):.0f} mm"))
        line.comments["hose_length"] = "flexible part; the rest is hard line"
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


@dataclass(frozen=True)
class Car:
    """What the finished build really has, beyond its record (see catalogue CAR_*): drawn
    once per build id, whatever parts are tried."""

    free_play: float  # m, the pushrod's real clearance (near the record's when it gives one)
    dead_stroke_shift: float  # m, added to the master's (or the shop's) dead stroke
    hose_factor: float  # real hose expansion over the shop's figure
    spring: float  # N, an unrecorded pedal-box spring force at the pad, at rest
    spring_slope: float  # N/m, its change along the pad travel
    preload_factor: float  # real concentric preload over the recorded one


def _car(plan: Plan, spongy: bool = False) -> Car:
    """The build's car; `spongy`: a car that loses more travel than most (long free play,
    a hose that swells half as much again), tried for a build rejected for short travel
    when no ordinary car made its parts fail that way."""
    rng = random.Random(f"{SEED}-car-{plan.id}")
    recorded = plan.sections["pedal"].fields.get("free_play")
    play = (max(0.0, rng.gauss(recorded.si, CAR_FREE_PLAY_READ)) if recorded is not None
            else rng.uniform(*CAR_FREE_PLAY))
    car = Car(play, rng.gauss(0.0, CAR_DEAD_STROKE_SD), math.exp(rng.gauss(0.0, CAR_HOSE_SD)),
              rng.gauss(0.0, CAR_SPRING_SD), rng.gauss(0.0, CAR_SPRING_SLOPE_SD),
              rng.uniform(*CAR_PRELOAD))
    if spongy:
        car = dataclasses.replace(car, free_play=max(car.free_play, CAR_FREE_PLAY[1]),
                                  hose_factor=1.5 * max(car.hose_factor, 1.0))
    return car


def _scaled_expansion(expansion, factor: float):
    if isinstance(expansion, tuple):
        return tuple((p, v * factor) for p, v in expansion)
    return expansion * factor


def real_sizing(build: m.Build, rules: m.ShopRules, car: Car) -> Sizing:
    """The build as the car has it, sized with no friction: its real free play, dead stroke,
    hose expansion, concentric preload and pedal-box springs (added to any the record gives
    as a bare pedal force)."""
    dead = rules.master_dead_stroke if build.master.dead_stroke is None else build.master.dead_stroke
    travel = build.pedal.pad_travel
    bare = build.pedal.bare_effort or ((0.0, 0.0), (travel, 0.0))
    ends = sorted({0.0, travel, *(x for x, _ in bare)})
    springs = tuple((x, _read(bare, x) + car.spring + car.spring_slope * x) for x in ends)
    slave = build.slave
    if slave.preload is not None:
        slave = dataclasses.replace(slave, preload=slave.preload * car.preload_factor)
    real = dataclasses.replace(
        build, slave=slave,
        master=dataclasses.replace(build.master, dead_stroke=max(0.0, dead + car.dead_stroke_shift)),
        pedal=dataclasses.replace(build.pedal, free_play=car.free_play, bare_effort=springs))
    hoses = {kind: _scaled_expansion(value, car.hose_factor)
             for kind, value in rules.hose_expansion.items()}
    return size_build(real, dataclasses.replace(rules, hose_expansion=hoses), efficiency=1.0,
                      with_curve=False)


def _read(points, x: float) -> float:
    """A table of points read with straight lines between, flat past the ends."""
    if x <= points[0][0]:
        return points[0][1]
    for (x0, y0), (x1, y1) in zip(points, points[1:]):
        if x <= x1:
            return y0 + (y1 - y0) * (x - x0) / (x1 - x0)
    return points[-1][1]


def _real(real: Sizing, family: str) -> tuple[float, float]:
    """(real margin, real effort N): the car's sizing under the family's true losses."""
    factor = FAMILY_TRAVEL_FACTOR[family]
    return factor * (1.0 + real.margin) - 1.0, real.effort_ideal / FAMILY_EFFICIENCY[family]


def _fits(plan: Plan, sizing: Sizing, real: Sizing) -> bool:
    """Whether a sizing behaves the way the plan's record says it did (or will): `sizing` is
    what the engine makes of the record, `real` what the car does."""
    fails = any(f.severity == "fail" for f in sizing.flags)
    warns = {f.code for f in sizing.flags}
    margin, effort = _real(real, plan.family.code)
    trouble = plan.trouble
    if trouble == "travel":
        return 0.01 <= sizing.margin <= 0.10 and margin < -0.005 and not sizing.floor_gap
    if trouble == "effort":
        return (HEAVY_EFFORT_N[0] <= effort <= HEAVY_EFFORT_N[1] and not fails
                and GOOD_REAL_MARGIN <= margin and sizing.margin <= 0.9)
    if trouble == "bottoms":
        return sizing.floor_gap >= 0.6 * INCH and margin < 0.0 and sizing.margin > -0.08
    if any(f.severity == "fail" for f in real.flags if f.code == "over-stroke"):
        return False  # the fingers would have over-stroked on the car
    if trouble == "steep pushrod":
        return "pushrod-off-axis" in warns and not fails
    return (not fails and margin >= GOOD_REAL_MARGIN and sizing.margin <= 0.9
            and GOOD_EFFORT_N[0] <= effort <= GOOD_EFFORT_N[1]
            and "release-late" not in warns)


def _choose(plan: Plan, rng: random.Random, rules: m.ShopRules,
            car: Car) -> tuple[Record, Sizing, Sizing] | None:
    """Try catalogue master/slave pairs in a seeded order; keep the first that fits, with
    its sizing and the car's (real_sizing)."""
    kind = "external" if plan.family.forks else "concentric"
    pairs = [(mc, sc) for mc in CATALOGUE["masters"] for sc in CATALOGUE["slaves"]
             if sc.fields["kind"] == kind]
    rng.shuffle(pairs)
    for mc, sc in pairs:
        rec = _record(plan, _master_section(plan, mc), _slave_section(plan, sc, rng))
        build = load(rec)
        sizing = size_build(build, rules)
        real = real_sizing(build, rules, car)
        if _fits(plan, sizing, real):
            return rec, sizing, real
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


def _measure(rec: Record, ideal: Sizing) -> dict:
    """The measured section: what the car does (`ideal`, the record's real_sizing), under
    the family's true losses, read with the gauges' noise."""
    rng = random.Random(f"{SEED}-{rec.id}")
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
        if release < ideal.usable_pad_travel:
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
    for attempt in range(120 if trouble == "travel" else 60):
        plan = _plan(rng, ident, date, status, FAMILY[family], trouble)
        if enrich is not None:
            enrich(plan, rng)
        car = _car(plan, spongy=attempt >= 60)
        chosen = _choose(plan, rng, rules, car)
        if chosen:
            break
    else:
        raise RuntimeError(f"{ident}: no catalogue pair fits a {family} '{trouble}' build")
    rec, sizing, real = chosen
    if status != "draft":
        rec.measured = _measure(rec, real)
    rec.outcome, notes = _notes(rec, sizing, trouble, rng)
    rec.notes = "\n".join(textwrap.wrap(notes, 88)) + "\n"  # as the block scalar reads
    return rec, sizing


def make_demo() -> tuple[list[Record], list[Sizing]]:
    """Every demo record (id order) and its sizing at the shop's default efficiency."""
    rules = demo_rules()
    rng = random.Random(SEED)
    made = [invent(rng, rules, *row) for row in _schedule(rng)]
    return [rec for rec, _ in made], [sizing for _, sizing in made]


# ----------------------------------------------------------------------------- writing
