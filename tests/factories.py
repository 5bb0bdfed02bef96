"""Invented builds and shop rules for the engine and command tests (makers, no tests),
and the one pint registry the tests share.

All values are invented; SI units as builder.model requires.
"""
from __future__ import annotations

import dataclasses
import math

import pint

from builder.model import (
    Build, Clutch, Fork, Gearbox, Line, Master, Pedal, PedalLayout, ShopRules, Slave,
)

INCH = 0.0254  # m, exact by definition (NIST SP 811, appendix B)
POUND_FORCE = 4.4482216152605  # N, exact by definition (NIST SP 811, appendix B)
PSI = POUND_FORCE / INCH**2  # Pa
UREG = pint.UnitRegistry()  # reference library for units; one registry, built once


def si(text: str) -> float:
    """A quantity in base SI units, converted by pint."""
    return UREG.Quantity(text).to_base_units().magnitude


def make_rules(**changes) -> ShopRules:
    """Shop rules; `lossless=True` turns hose expansion and fluid compression off."""
    lossless = changes.pop("lossless", False)
    rules = ShopRules(
        site_title="Invented test shop",
        display_units="imperial",
        effort_band=(15 * POUND_FORCE, 45 * POUND_FORCE),
        min_travel_margin=0.10,
        latest_release_point=0.85,
        default_efficiency=0.85,
        hose_expansion={"rubber": 3.0e-13, "braided_ptfe": 5.0e-14, "steel": 1.0e-15},
        fluid_bulk_modulus=1.5e9,
        line_bore=3.2e-3,
        max_pushrod_angle=math.radians(5.0),
    )
    if lossless:
        rules = dataclasses.replace(
            rules, hose_expansion={k: 0.0 for k in rules.hose_expansion},
            fluid_bulk_modulus=math.inf)
    return dataclasses.replace(rules, **changes)


def make_build(
    master_bore: float = 0.75 * INCH,
    master_stroke: float = 1.40 * INCH,
    slave_bore: float | None = 0.875 * INCH,
    slave_stroke: float = 1.25 * INCH,
    piston_area: float | None = None,
    fork: tuple[float, float] | None = (5.6 * INCH, 2.8 * INCH),
    pedal: tuple[float, float] = (11.0 * INCH, 2.0 * INCH),
    pad_travel: float = 7.0 * INCH,
    layout: PedalLayout | None = None,
    release_load: float = 400 * POUND_FORCE,
    release_travel: float = 0.30 * INCH,
    clearance: float = 0.05 * INCH,
    load_curve: tuple[tuple[float, float], ...] | None = None,
    hose: str = "braided_ptfe",
    line_length: float = 36 * INCH,
    master_rating: float | None = None,
    slave_rating: float | None = None,
    hose_length: float | None = None,
    fluid: str = "DOT 4",
    slave_acts: str | None = None,
    rod_diameter: float | None = None,
    preload: float | None = None,
    dead_stroke: float | None = None,
    free_play: float | None = None,
    bare_effort: tuple[tuple[float, float], ...] | None = None,
    max_release_travel: float | None = None,
) -> Build:
    """A build record built directly as model objects (invented values). Dead stroke and
    free play left None take the shop rules' (0 in make_rules unless given)."""
    return Build(
        id="TS-001",
        date=None,
        status="draft",
        technician=None,
        vehicle="invented test roadster",
        gearbox=Gearbox("ZZ-9", None, "none" if fork is None else "rearward"),
        clutch=Clutch(release_load, release_travel, clearance, load_curve,
                      max_release_travel=max_release_travel),
        fork=None if fork is None else Fork(*fork),
        master=Master(master_bore, master_stroke, master_rating, dead_stroke=dead_stroke),
        slave=Slave("concentric" if fork is None else "external", slave_bore, piston_area,
                    slave_stroke, slave_rating, acts=slave_acts, rod_diameter=rod_diameter,
                    preload=preload),
        line=Line(line_length, hose, fluid, hose_length=hose_length),
        pedal=Pedal(pedal[0], pedal[1], pad_travel, layout=layout, free_play=free_play,
                    bare_effort=bare_effort),
    )


def norton_slider(r: float, l: float, e: float, t: float) -> float:
    """Offset slider-crank slider position, x = r cos t + sqrt(l^2 - (r sin t - e)^2)
    (Norton, Design of Machinery, offset slider-crank position analysis): the outside
    reference the engine's linkage is checked against, not a maker."""
    return r * math.cos(t) + math.sqrt(l * l - (r * math.sin(t) - e) ** 2)


def norton_layout(r: float, l: float, t0: float, swing: float, frame=(0.0, 0.0, 0.0),
                  pad_radius: float | None = None) -> PedalLayout:
    """Norton's crank (radius r) at angle t0 with the slider line y = e = r sin t0, so the
    pushrod (length l) lies on the bore axis at rest; the pad on the crank's line at
    pad_radius (default 3 r); the whole picture rotated by frame[2] and moved by frame[:2]
    (any consistent frame)."""
    dx, dy, turn = frame

    def place(x, y):
        c, s = math.cos(turn), math.sin(turn)
        return (dx + x * c - y * s, dy + x * s + y * c)

    clevis = (r * math.cos(t0), r * math.sin(t0))
    pad = 3.0 * r if pad_radius is None else pad_radius
    return PedalLayout(
        pivot=place(0.0, 0.0),
        pad=place(pad * math.cos(t0), pad * math.sin(t0)),
        clevis=place(*clevis),
        pushrod_seat=place(clevis[0] + l, clevis[1]),
        rotation_to_stop=swing,
    )


def square_layout(pad_radius: float, clevis_radius: float, rod: float,
                  swing: float) -> PedalLayout:
    """Pedal hanging down from the pivot, pushrod square to the arm at rest (forward)."""
    return PedalLayout(
        pivot=(0.0, 0.0),
        pad=(0.0, -pad_radius),
        clevis=(0.0, -clevis_radius),
        pushrod_seat=(rod, -clevis_radius),
        rotation_to_stop=swing,
    )
