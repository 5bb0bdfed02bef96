"""Hand-made shops for the site tests (no test functions here).

Invented data only: family codes, part ids and vehicles are made up. Quantities in SI.
"""
from __future__ import annotations

import datetime as dt
import math

from builder.model import (Build, Clutch, Fork, Gearbox, Line, Master, Measured, Part, Pedal,
                           PedalLayout, Shop, Slave)
from factories import INCH as IN, POUND_FORCE as LBF, PSI, make_rules

# Placed in every free-text field of the hostile build; none may become live markup.
HOSTILE = [
    "<script>window.__pwned=1</script>",
    '<img src=x onerror="window.__pwned=1;alert(1)">',
    "[click me](javascript:window.__pwned=1)",
    "{{ config.site_name }} {% raw %} {# c #}",
    "<!-- hidden comment -->",
    "a | b `code` *em* _u_ [x] <b>bold</b> & done",
    "<svg onload=window.__pwned=1>",
]
HOSTILE_TEXT = " ".join(HOSTILE)
HOSTILE_ID = "ZZ-666"


def catalogue() -> dict[str, dict[str, Part]]:
    master = Master(bore=0.75 * IN, stroke=1.4 * IN, rated_pressure=1200 * PSI, part="MC-750")
    slave = Slave(kind="external", bore=0.875 * IN, piston_area=None, stroke=1.1 * IN,
                  rated_pressure=1200 * PSI, bracket="side flange", part="SL-875")
    gearbox = Gearbox(family="QX-5", variant="early case", fork_tip_moves="rearward", part="GB-QX5")
    return {
        "masters": {"MC-750": Part("masters", "MC-750", "three-quarter inch master", master)},
        "slaves": {"SL-875": Part("slaves", "SL-875", "seven-eighths slave", slave)},
        "gearboxes": {"GB-QX5": Part("gearboxes", "GB-QX5", "five-speed, rear fork", gearbox)},
    }


def build(i: int, *, family: str = "QX-5", status: str = "verified", layout: bool = False,
          effort_lbf: float | None = 27.0, text: str | None = None, build_id: str | None = None,
          curve: bool = True) -> Build:
    """A plausible build; `i` varies the numbers a little, `text` fills every free-text field."""
    scale = 1.0 + 0.02 * (i % 5)
    words = text
    pedal_layout = None
    if layout:
        pedal_layout = PedalLayout(pivot=(0.0, 0.0), pad=(-0.060, -0.285), clevis=(-0.008, -0.053),
                                   pushrod_seat=(-0.140, -0.048), rotation_to_stop=math.radians(30))
    measured = None
    if status != "draft":
        measured = Measured(pedal_effort=None if effort_lbf is None else effort_lbf * LBF * scale,
                            slave_travel=0.93 * IN, pad_travel_to_release=4.4 * IN,
                            floor_gap=1.0 * IN, method=words or "spring gauge at pad centre")
    return Build(
        id=build_id or f"TS-{100 + i:03d}",
        date=dt.date(2024, 1, 1) + dt.timedelta(days=7 * i),
        status=status,
        technician=words or "AB",
        vehicle=words or "two-door coupe, inline six",
        gearbox=Gearbox(family=words or family, variant=words or "late case",
                        fork_tip_moves="rearward", part=None if words else "GB-QX5"),
        clutch=Clutch(release_load=410 * LBF * scale, release_travel=0.32 * IN, clearance=0.06 * IN,
                      load_curve=((0.0, 0.0), (0.12 * IN, 380 * LBF), (0.25 * IN, 410 * LBF),
                                  (0.38 * IN, 340 * LBF)) if curve else None),
        fork=Fork(pivot_to_slave=5.6 * IN, pivot_to_bearing=2.8 * IN),
        master=Master(bore=0.75 * IN, stroke=1.4 * IN, rated_pressure=1200 * PSI, part="MC-750"),
        slave=Slave(kind="external", bore=(1.0 if status == "rejected" else 0.875) * IN,
                    piston_area=None, stroke=1.1 * IN, rated_pressure=1200 * PSI,
                    bracket=words or "side flange", part=None if status == "rejected" else "SL-875"),
        line=Line(length=38 * IN, hose="braided_ptfe", fluid="DOT 4"),
        pedal=Pedal(pivot_to_pad=11.25 * IN * scale, pivot_to_clevis=2.1 * IN, pad_travel=6.0 * IN,
                    pushrod=words or "spherical end, lock nut", layout=pedal_layout),
        measured=measured,
        outcome=words or ("full release, no drag" if status != "rejected" else "dragged when hot"),
        notes=(words + "\n\nsecond paragraph " + words) if words else f"Note for build {i}: "
              "bled with a pressure bleeder, swapped the bracket shims.",
        path=f"records/builds/TS-{100 + i:03d}.yaml",
    )


def shop(n: int = 6, hostile: bool = False, root: str = "records") -> Shop:
    builds = [build(i, status=("verified", "measured", "rejected", "draft")[i % 4] if i else "verified",
                    layout=i % 2 == 1, family=("QX-5", "RB-6")[i % 2]) for i in range(n)]
    if hostile:
        builds.append(build(n, text=HOSTILE_TEXT, build_id=HOSTILE_ID, status="measured"))
    return Shop(root=root, rules=make_rules(), parts=catalogue(), builds=tuple(builds))


def analysis(n: int = 6, hostile: bool = False, root: str = "records"):
    from builder.history import analyse

    return analyse(shop(n, hostile, root))
