"""Generate the invented demo shop: ``python -m builder.demo records/ [--force]``.

Everything written is invented: the shop, its technicians (initials only), the vehicles
(described generically), the gearbox family codes and every part code. No real make, model,
gearbox designation, vendor, person or part number appears.

Ranges used to invent the inputs (from memory, typical of hand-built conversions; no source):
master and slave bores 5/8 to 1 in; peak release loads about 1.25 to 4.5 kN; bearing travel
for full release, clearance included, 7 to 10 mm; pedal ratios 4.5 to 7; pad efforts 15 to
45 lbf; pad travel 5.5 to 7 in; lines 24 to 60 in; hoses rubber, braided PTFE or steel;
fluids DOT 3, DOT 4, DOT 5.1; hose lengths 10 to 20 in where a record gives one.

Modules: ``catalogue`` (the invented shop rules, parts and gearbox families), ``builds`` (a
plan per build, parts chosen, measured section and notes), ``files`` (the records as YAML
text, written with builder.records.writer, and read back by the records loader).

Measured values are made, not measured, from a "car" richer than the engine. Each build is
written as the YAML record it will be and read back by the records loader
(``builder.records.parse_build``). The car is drawn once per build id (catalogue CAR_*):
its real pushrod free play (0.3 to 2.2 mm, or near the record's own reading when the
technician wrote one down), its master's dead stroke (the record's or the shop's, give or
take 0.4 mm), its hoses' real swell (the shop's figure times e^N(0, 0.35)), a concentric
slave's real preload (0.8 to 1.2 times the recorded one) and an unrecorded pedal-box spring
(N(0, 3.5 N) plus N(0, 15 N/m) along the pad travel, added to any bare pedal force the
record gives). ``builds.real_sizing`` sizes the build as the car has it
(``size_build(..., efficiency=1.0)``); that is then spoiled by the gearbox family's "true"
losses (table below) and seeded gauge noise:

    pedal_effort          = car's peak effort / FAMILY_EFFICIENCY * (1 + N(0, 0.015))
    slave_travel          = car's slave travel * FAMILY_TRAVEL_FACTOR * (1 + N(0, 0.01))
    pad_travel_to_release = car's pad travel to release / FAMILY_TRAVEL_FACTOR
                            * (1 + N(0, 0.01)); left out when the clutch never released
    floor_gap             = car's floor gap * (1 + N(0, 0.02)) when it has one, else 0

The engine sizes the record with the shop's defaults, so calibration meets real model
mismatch: its leave-one-out effort error is a few percent, not the gauge's 1.5 %, and it
recovers each family's constants within 4 % (the car's free play averages 1.25 mm against
the shop's 1 mm and its hoses swell 6 % more than the shop's figure on average).

    family  fork tip   efficiency  travel factor  invented story
    QX-5    rearward      0.86         0.94       light alloy case, ball-stud fork pivot
    VK-4    forward       0.80         0.90       old cast-iron box, cross-shaft fork, bushes
    JH-5R   rearward      0.90         0.96       stiff fork, needle-bearing pivot
    BQ-4F   forward       0.78         0.88       pressed-steel fork that flexes
    ZW-6    forward       0.84         0.93       long bell housing, long pushrod
    YC-6    none          0.92         0.97       concentric slave, no fork

How parts are chosen: for each build the generator tries the catalogue's master/slave pairs
in a seeded order and keeps the first one that behaved as its record says (the "true"
losses and the car above decide: a measured or verified build really released with effort
in range and without over-stroking the fingers; a rejected build failed the way its notes
say; good builds and drafts also carry no "fail" flag at the shop's default efficiency). Output is byte-for-byte deterministic and does not
depend on today's date; it does depend on the engine, so regenerate with --force after a
change to the engine's formulas (tests/test_demo.py compares byte for byte).
"""
from __future__ import annotations

import argparse
import sys
from pathlib import Path

from builder.demo.builds import invent, make_demo
from builder.demo.catalogue import CATALOGUE, FAMILIES, PARTS, REJECTED
from builder.demo.files import Record, build_path, build_text, load, rules, rules_files, write_files

__all__ = ["CATALOGUE", "FAMILIES", "PARTS", "REJECTED", "Record", "demo_files", "invent", "load",
           "main", "make_demo", "rules", "write_demo"]


def demo_files() -> dict[str, str]:
    """Relative path -> text for every file of the demo shop."""
    records, _ = make_demo()
    return rules_files() | {build_path(r): build_text(r) for r in records}


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

