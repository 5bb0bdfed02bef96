"""Invented catalogues and shops for the suggestion tests (makers only, no tests).

Every build is the factories' invented roadster (gearbox family ZZ-9, fork tip rearward):
pedal 11 in / 2 in (ratio 5.5) with 7 in of pad travel, fork 5.6 in / 2.8 in (ratio 2),
400 lbf release load, 0.30 in release travel plus 0.05 in clearance. Parts are invented
and written with inch bores so the hand derivations in the tests stay in inches.
"""
from __future__ import annotations

import dataclasses

from builder.model import Build, Master, Measured, Part, Shop, Slave
from factories import INCH, POUND_FORCE, make_build, make_rules


def master_part(part_id: str, bore_in: float, stroke_in: float = 1.40,
                rating: float | None = None) -> Part:
    section = Master(bore=bore_in * INCH, stroke=stroke_in * INCH, rated_pressure=rating)
    return Part("masters", part_id, f"invented {bore_in} in master", section)


def slave_part(part_id: str, bore_in: float | None, stroke_in: float = 1.25,
               kind: str = "external", area: float | None = None,
               rating: float | None = None, acts: str | None = None) -> Part:
    section = Slave(kind=kind, bore=None if bore_in is None else bore_in * INCH,
                    piston_area=area, stroke=stroke_in * INCH, rated_pressure=rating, acts=acts)
    return Part("slaves", part_id, f"invented {kind} slave", section)


def catalogue(masters: list[Part], slaves: list[Part]) -> dict[str, dict[str, Part]]:
    return {"masters": {p.id: p for p in masters}, "slaves": {p.id: p for p in slaves}}


def proposal(master_in: float = 0.625, slave_in: float = 0.875, **changes) -> Build:
    """The roadster as a draft proposal with an inline master and slave of these bores."""
    return dataclasses.replace(make_build(master_bore=master_in * INCH, slave_bore=slave_in * INCH,
                                          **changes), id="PR-0001")


def with_parts(build: Build, master: Part, slave: Part, build_id: str, status: str,
               effort_lbf: float = 30.0, outcome: str | None = None) -> Build:
    """`build` finished with these catalogue parts: a measured section and a status."""
    return dataclasses.replace(
        build, id=build_id, status=status, outcome=outcome,
        master=dataclasses.replace(master.section, part=master.id),
        slave=dataclasses.replace(slave.section, part=slave.id),
        measured=Measured(pedal_effort=effort_lbf * POUND_FORCE))


def shop(parts: dict, builds: tuple[Build, ...] = (), **rules) -> Shop:
    """A shop with lossless lines (no hose expansion, incompressible fluid), so the tests'
    hand derivations need only the lever and Pascal relations."""
    return Shop(root="", rules=make_rules(lossless=True, **rules), parts=parts, builds=builds)
