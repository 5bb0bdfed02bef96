"""Generate the demo's old spreadsheet and its import map:
``python -m builder.demo.spreadsheet records/import/ [--force]``.

The story (invented end to end): before the demo shop kept YAML records, two technicians
logged their conversions from 2019 to 2022 in a shared spreadsheet, the "old build book".
DK typed inches and pounds, MS millimetres and newtons, both the way people type into a
spreadsheet: `7/8`, `.75`, `22.2mm`, `1 1/8"`, `35#`, `5½"`, lower-case part codes, blank
cells where the shop's usual value applied, a note running on into the next column, a title
row above the headings, a blank row between years, a labour-hours column nobody imports.
Three rows hold slips the import must refuse: a unit typed `mn`, a 31st of September and a
part code with a letter for a digit. Job numbers become ids OLD-0017 and so on, clear of the
demo shop's HW-0101..HW-0170.

Parts come from the shop's catalogue (records/parts/*.yaml, read at generation time, so a
renamed id is picked up by regenerating). Measured values are made, not measured: each row
is sized by the engine and spoiled by invented losses (no source; a story for the demo):
pad effort = ideal effort / 0.84, slave travel = computed * 0.93, each with 3 % seeded noise.
A row marked "no good" is one whose pedal came out too heavy (over 46 lbf with those losses).

Output is byte-for-byte deterministic: a CSV in UTF-8 with a byte-order mark and CRLF line
ends (what a spreadsheet program's "CSV UTF-8" export writes) and the map in YAML.
"""
from __future__ import annotations

import argparse
import csv
import datetime as dt
import io
import random
import sys
from pathlib import Path

from builder import model
from builder.engine import size_build
from builder.records import load_catalogue, load_rules, parse_build
from builder.records._schema import schema
from builder.records.writer import dump, ordered
from builder.units import INCH, POUND_FORCE

SEED = 2218
PREFIX = "OLD-"
SHEET_NAME = "old-builds.csv"
MAP_NAME = "old-builds.map.yml"  # .yml: records/**/*.yaml are the shop's own records
TITLE = "Old build book - hydraulic clutch conversions, kept 2019-2022 (DK, MS)"
EFFICIENCY = 0.84  # invented losses of the old builds (no source; see the module docstring)
TRAVEL_FACTOR = 0.93
NOISE = 0.03
HEAVY_LBF = 46.0  # a pedal this heavy was sent back (common practice, no source)
GOOD_LBF = (16.0, 40.0)
HEADERS = (
    "Job #", "Date", "Tech", "Car", "Box", "Fork moves", "Clutch", "Release load", "Release travel",
    "Clearance", "Fork pivot-slave", "Fork pivot-brg", "MC", "MC bore ", "MC stroke", "SC", "SC bore",
    "SC stroke", "Line", "Hose", "Fluid", "Pedal", "Pad arm", "Clevis arm", "Pad travel", "Effort",
    "Slave moved", "Floor gap", "Result", "Hours", "Notes", "Notes (cont.)",
)
TECHNICIANS = {"DK": "imperial", "MS": "metric"}
VEHICLES = (
    "1970s light pickup, inline six", "1980s two-seat roadster, inline four",
    "1960s four-door saloon, small V8", "1990s hatchback, turbo four", "1950s panel van, inline six",
    "track car, four-cylinder", "1970s coupe, V6", "kit-built sports car, inline four",
)
NOTES = (
    ("Customer supplied the pedal box.", ""),
    ("Bled from the bottom up, took two goes;", "fine after the second bleed."),
    ("Line routed along the inner wing", "away from the exhaust manifold."),
    ("Slave bracket made in house from 6 mm plate.", ""),
    ("Pushrod shortened by 12 mm;", "pedal now sits level with the brake."),
    ("Engagement high in the travel, customer happy with it.", ""),
    ("Master on a 12° spacer to clear the steering shaft.", ""),
    ("", ""), ("", ""), ("", ""),
)
HEAVY_NOTE = ("Pedal far too heavy for the customer; sent back,", "lighter plate to be fitted.")

# (record text, cell texts a technician of that system types for it)
MASTER_BORES = {"imperial": [("5/8 in", ["5/8"]), ("3/4 in", ["3/4", '3/4"']), ("0.75 in", [".75"]),
                             ("0.70 in", ["0.70"]), ("7/8 in", ["7/8"]), ("1 in", ['1"'])],
                "metric": [("15.9 mm", ["15.9mm"]), ("19.05 mm", ["19.05mm", "19.05 mm"]),
                           ("20.6 mm", ["20.6 mm"]), ("22.2 mm", ["22.2mm"])]}
MASTER_STROKES = {"imperial": [("1.4 in", ["1.4"]), ("1.25 in", ["1.25"]), ("1 3/8 in", ['1 3/8"'])],
                  "metric": [("32 mm", ["32mm"]), ("35 mm", ["35 mm"])]}
SLAVE_BORES = {"imperial": [("3/4 in", ["3/4"]), ("13/16 in", ["13/16"]), ("7/8 in", ["7/8", '7/8"']),
                            ("1 in", ['1"']), ("1 1/8 in", ['1 1/8"']), ("1-1/16 in", ["1-1/16"])],
               "metric": [("22.2 mm", ["22.2mm"]), ("25.4 mm", ["25.4mm"]), ("19.05 mm", ["19.05 mm"])]}
SLAVE_STROKES = {"imperial": [("1.1 in", ["1.1"]), ("1.2 in", ["1.2"]), ("1 1/4 in", ["1 1/4"])],
                 "metric": [("30 mm", ["30mm"]), ("32 mm", ["32 mm"])]}
TO_SLAVE = {"imperial": [("5.6 in", ["5.6"]), ("5 1/2 in", ["5 1/2"]), ("6.0 in", ["6.0"]), ("4.75 in", ["4.75"])],
            "metric": [("142 mm", ["142mm"]), ("150 mm", ["150 mm"]), ("128 mm", ["128mm"])]}
TO_BEARING = {"imperial": [("2.8 in", ["2.8"]), ("2 3/4 in", ["2 3/4"]), ("3.0 in", ["3.0"])],
              "metric": [("70 mm", ["70mm"]), ("76 mm", ["76 mm"]), ("64 mm", ["64mm"])]}
RELEASE_LOAD = {"imperial": [("410 lbf", ["410"]), ("385 lbf", ["385#"]), ("450 lbf", ["450 lbs"]),
                             ("360 lbf", ["360"])],
                "metric": [("1.9 kN", ["1.9kN"]), ("1850 N", ["1850 N"]), ("1650 N", ["1,650 N"])]}
RELEASE_TRAVEL = {"imperial": [("0.30 in", ["0.30"]), ("0.28 in", [".28"])],
                  "metric": [("7.5 mm", ["7.5mm"]), ("8 mm", ["8 mm"])]}
CLEARANCE = {"imperial": [(None, [""]), ("0.05 in", ["0.05"])], "metric": [(None, [""]), ("1.5 mm", ["1.5mm"])]}
PAD_ARM = {"imperial": [("11.25 in", ["11.25"]), ("11 1/4 in", ['11 1/4"']), ("12 in", ["12"])],
           "metric": [("285 mm", ["285mm"]), ("300 mm", ["300 mm"])]}
CLEVIS_ARM = {"imperial": [("2.1 in", ["2.1"]), ("1.9 in", ["1.9"]), ("2 1/8 in", ["2 1/8"])],
              "metric": [("52 mm", ["52mm"]), ("48 mm", ["48 mm"])]}
PAD_TRAVEL = {"imperial": [("6 in", ['6"']), ("5 1/2 in", ['5½"']), ("6.5 in", ["6.5"])],
              "metric": [("150 mm", ["150mm"]), ("160 mm", ["160 mm"])]}
LINE = {"imperial": [("38 in", ["38"]), ("42 in", ["42"]), ("48 in", ['48"'])],
        "metric": [("965 mm", ["965mm"]), ("1.2 m", ["1.2m"]), ("1100 mm", ["1100 mm"])]}
HOSES = [("braided_ptfe", ["braided", "braided PTFE", ""]), ("rubber", ["rubber"]),
         ("steel", ["hard line"])]
FLUIDS = [("DOT 4", ["DOT4", "dot 4", ""]), ("DOT 3", ["DOT 3"]), ("DOT 5.1", ["DOT 5.1"])]

MAP_TEXT = """\
# yaml-language-server: $schema=../../schema/import-map.schema.json
# Import map for old-builds.csv, the demo shop's old build book (invented, like the shop).
# fitment import records/import/old-builds.csv --map records/import/old-builds.map.yml
header_row: 2                         # row 1 is the sheet's title
id: {column: "Job #", prefix: "OLD-", digits: 4}
date: {column: "Date", format: "%d/%m/%Y"}
status: {column: "Result", values: {OK: verified, "no good": rejected, "": measured}}
fields:
  technician: "Tech"
  vehicle: "Car"
  gearbox.family: "Box"
  gearbox.fork_tip_moves: {column: "Fork moves", values: {fwd: forward, rwd: rearward, CSC: none}}
  clutch.part: "Clutch"
  clutch.release_load: {column: "Release load", unit: lbf}
  clutch.release_travel: {column: "Release travel", unit: in}
  clutch.clearance: {column: "Clearance", unit: in}
  fork.pivot_to_slave: {column: "Fork pivot-slave", unit: in}
  fork.pivot_to_bearing: {column: "Fork pivot-brg", unit: in}
  master.part: "MC"
  master.bore: {column: "MC bore", unit: in}
  master.stroke: {column: "MC stroke", unit: in}
  slave.part: "SC"
  slave.bore: {column: "SC bore", unit: in}
  slave.stroke: {column: "SC stroke", unit: in}
  line.length: {column: "Line", unit: in}
  line.hose: {column: "Hose", values: {braided: braided_ptfe, "hard line": steel}}
  line.fluid: "Fluid"
  pedal.part: "Pedal"
  pedal.pivot_to_pad: {column: "Pad arm", unit: in}
  pedal.pivot_to_clevis: {column: "Clevis arm", unit: in}
  pedal.pad_travel: {column: "Pad travel", unit: in}
  measured.pedal_effort: {column: "Effort", unit: lbf}
  measured.slave_travel: {column: "Slave moved", unit: in}
  measured.floor_gap: {column: "Floor gap", unit: in}
  notes: ["Notes", "Notes (cont.)"]
defaults:
  clutch.clearance: 0.06 in           # the shop's usual figure when the cell was left blank
  slave.kind: external                # a concentric slave always came from the catalogue
  line.hose: braided_ptfe
  line.fluid: DOT 4
  measured.method: spring gauge at the pad, engine off
"""


def _pick(rng: random.Random, options: list) -> tuple[str | None, str]:
    record, typed = rng.choice(options)
    return record, rng.choice(typed)


def _lbf(value_n: float) -> float:
    return value_n / POUND_FORCE


class _Row:
    """One job: the record it stands for (clean texts) and the cells typed for it."""

    def __init__(self, job: int, date: dt.date, tech: str, status: str):
        self.job, self.date, self.tech, self.status = job, date, tech, status
        self.system = TECHNICIANS[tech]
        self.cells: dict[str, str] = {header: "" for header in HEADERS}
        self.record: dict = {}

    def put(self, section: str, key: str, header: str, choice: tuple[str | None, str]) -> None:
        record, typed = choice
        self.cells[header] = typed
        if record is not None:
            self.record.setdefault(section, {})[key] = record


def _attempt(rng: random.Random, base: _Row, catalogue: dict) -> _Row:
    row = _Row(base.job, base.date, base.tech, base.status)
    system = row.system
    gearbox = catalogue["gearboxes"][rng.choice(sorted(catalogue["gearboxes"]))].section
    external = gearbox.fork_tip_moves != "none"
    row.cells["Box"] = gearbox.family
    row.cells["Fork moves"] = {"forward": "fwd", "rearward": "rwd", "none": "CSC"}[gearbox.fork_tip_moves]
    row.record["gearbox"] = {"family": gearbox.family, "fork_tip_moves": gearbox.fork_tip_moves}

    def part_cell(kind: str, header: str, section: str, ids: list[str]) -> None:
        part_id = rng.choice(ids)
        row.cells[header] = part_id.lower() if rng.random() < 0.2 else part_id
        row.record[section] = {"part": part_id}

    if rng.random() < 0.4:
        part_cell("clutches", "Clutch", "clutch", sorted(catalogue["clutches"]))
    else:
        row.put("clutch", "release_load", "Release load", _pick(rng, RELEASE_LOAD[system]))
        row.put("clutch", "release_travel", "Release travel", _pick(rng, RELEASE_TRAVEL[system]))
        record, typed = _pick(rng, CLEARANCE[system])
        row.put("clutch", "clearance", "Clearance", (record or "0.06 in", typed))
    if external:
        row.put("fork", "pivot_to_slave", "Fork pivot-slave", _pick(rng, TO_SLAVE[system]))
        row.put("fork", "pivot_to_bearing", "Fork pivot-brg", _pick(rng, TO_BEARING[system]))
    if rng.random() < 0.5:
        part_cell("masters", "MC", "master", sorted(catalogue["masters"]))
    else:
        row.put("master", "bore", "MC bore ", _pick(rng, MASTER_BORES[system]))
        row.put("master", "stroke", "MC stroke", _pick(rng, MASTER_STROKES[system]))
    slaves = sorted(i for i, p in catalogue["slaves"].items() if (p.section.kind == "external") == external)
    if not external or rng.random() < 0.5:
        part_cell("slaves", "SC", "slave", slaves)
    else:
        row.record["slave"] = {"kind": "external"}
        row.put("slave", "bore", "SC bore", _pick(rng, SLAVE_BORES[system]))
        row.put("slave", "stroke", "SC stroke", _pick(rng, SLAVE_STROKES[system]))
    row.put("line", "length", "Line", _pick(rng, LINE[system]))
    row.put("line", "hose", "Hose", _pick(rng, HOSES))
    row.put("line", "fluid", "Fluid", _pick(rng, FLUIDS))
    if rng.random() < 0.5:
        part_cell("pedals", "Pedal", "pedal", sorted(catalogue["pedals"]))
    else:
        row.put("pedal", "pivot_to_pad", "Pad arm", _pick(rng, PAD_ARM[system]))
        row.put("pedal", "pivot_to_clevis", "Clevis arm", _pick(rng, CLEVIS_ARM[system]))
        row.put("pedal", "pad_travel", "Pad travel", _pick(rng, PAD_TRAVEL[system]))
    return row


def _size(row: _Row, shop: model.Shop):
    """The row's record as written by records.writer and read back by the loader, sized."""
    data = {"id": f"{PREFIX}{row.job:04d}", "date": row.date, "status": "draft", **row.record}
    text = dump(ordered(data, schema("build")))
    build = parse_build(text, shop.parts, f"{data['id']}.yaml", rules=shop.rules)
    return size_build(build, shop.rules)


def _fits(row: _Row, sizing) -> bool:
    if any(flag.severity == "fail" for flag in sizing.flags):
        return False
    effort = _lbf(sizing.effort_ideal / EFFICIENCY)
    real_margin = TRAVEL_FACTOR * (1 + sizing.margin) - 1
    if row.status == "rejected":
        return effort > HEAVY_LBF and real_margin > 0.05
    codes = {flag.code for flag in sizing.flags}
    return GOOD_LBF[0] <= effort <= GOOD_LBF[1] and real_margin >= 0.06 and "release-late" not in codes


def _measure(row: _Row, sizing, rng: random.Random) -> None:
    effort = sizing.effort_ideal / EFFICIENCY * (1 + rng.gauss(0, NOISE))
    slave = sizing.slave_travel * TRAVEL_FACTOR * (1 + rng.gauss(0, NOISE))
    if row.system == "imperial":
        pounds = round(_lbf(effort))
        row.cells["Effort"] = rng.choice([f"{pounds}#", f"{pounds} lbs", f"{pounds}"])
        row.cells["Slave moved"] = rng.choice([f"{slave / INCH:.2f}", f'{slave / INCH:.2f}"'])
        row.cells["Floor gap"] = rng.choice(["0", ""])
    else:
        row.cells["Effort"] = rng.choice([f"{effort:.0f}N", f"{effort:.0f} N"])
        row.cells["Slave moved"] = f"{slave * 1e3:.1f}mm"
        row.cells["Floor gap"] = rng.choice(["0", ""])


def _schedule(rng: random.Random) -> list[_Row]:
    jobs, job = [], 17
    start, end = dt.date(2019, 2, 4), dt.date(2022, 11, 25)
    days = sorted(rng.sample(range((end - start).days), 30))
    for n, day in enumerate(days):
        job += rng.choice((1, 1, 1, 2, 3))  # quotes that were never built used a number too
        status = "rejected" if n in (9, 21) else rng.choice(("verified", "verified", "measured"))
        jobs.append(_Row(job, start + dt.timedelta(days=day), rng.choice(sorted(TECHNICIANS)), status))
    return jobs


LOOK_ALIKE = {"0": "O", "1": "l", "2": "Z", "5": "S", "6": "G", "8": "B"}  # a digit typed as a letter


def _slip(row: _Row, kind: str, catalogue: dict) -> None:
    """Put one of the sheet's three typing slips into a row (the import refuses each)."""
    if kind == "unit":
        row.cells["MC bore "] = "19.05 mn"
    elif kind == "date":
        row.cells["Date"] = f"31/09/{row.date.year}"
    else:
        part_id = row.record.get("master", {}).get("part") or sorted(catalogue["masters"])[0]
        digit = next((c for c in reversed(part_id) if c in LOOK_ALIKE), None)
        slipped = (part_id[::-1].replace(digit, LOOK_ALIKE[digit], 1)[::-1] if digit
                   else part_id + "X")
        row.cells["MC"] = slipped


def make_rows(records_dir: Path) -> list[_Row]:
    """Every job of the old build book, sized, measured and typed; in job order."""
    rules = load_rules(records_dir)
    catalogue = load_catalogue(records_dir)
    shop = model.Shop(root=str(records_dir), rules=rules, parts=catalogue)
    rng = random.Random(SEED)
    planned = _schedule(rng)
    rows = []
    for base in planned:
        row_rng = random.Random(f"{SEED}-{base.job}")
        for _ in range(400):
            row = _attempt(row_rng, base, catalogue)
            sizing = _size(row, shop)
            if _fits(row, sizing):
                break
        else:
            raise RuntimeError(f"no combination fits job {base.job}; widen the options")
        _measure(row, sizing, row_rng)
        row.cells["Job #"] = str(row.job)
        row.cells["Date"] = row.date.strftime("%d/%m/%Y")
        row.cells["Tech"] = row.tech
        row.cells["Car"] = row_rng.choice(VEHICLES)
        row.cells["Result"] = {"verified": row_rng.choice(["OK", "OK", "ok", " OK"]),
                               "measured": "", "rejected": "no good"}[row.status]
        row.cells["Hours"] = f"{row_rng.choice((3, 4, 5, 6, 7, 8)) + row_rng.choice((0, 0.5)):g}"
        note = HEAVY_NOTE if row.status == "rejected" else row_rng.choice(NOTES)
        row.cells["Notes"], row.cells["Notes (cont.)"] = note
        rows.append(row)
    for index, kind in ((6, "unit"), (14, "date"), (24, "part")):
        _slip(rows[index], kind, catalogue)
    return rows


def sheet_text(rows: list[_Row]) -> str:
    """The CSV as a spreadsheet program exports it (the BOM and CRLF added on writing)."""
    out = io.StringIO(newline="")
    writer = csv.writer(out, lineterminator="\r\n")
    writer.writerow([TITLE] + [""] * (len(HEADERS) - 1))
    writer.writerow(HEADERS)
    year = rows[0].date.year
    for row in rows:
        if row.date.year != year:
            writer.writerow([""] * len(HEADERS))  # the blank row between years
            year = row.date.year
        writer.writerow([row.cells[header] for header in HEADERS])
    return out.getvalue()


def demo_files(records_dir: Path) -> dict[str, bytes]:
    """File name -> bytes of the demo spreadsheet and its map."""
    return {SHEET_NAME: b"\xef\xbb\xbf" + sheet_text(make_rows(records_dir)).encode("utf-8"),
            MAP_NAME: MAP_TEXT.encode("utf-8")}


def write_files(out_dir: Path, records_dir: Path, force: bool = False) -> list[Path]:
    """Write the spreadsheet and map into out_dir; FileExistsError unless `force`."""
    files = demo_files(records_dir)
    out_dir.mkdir(parents=True, exist_ok=True)
    written = []
    for name, data in files.items():
        target = out_dir / name
        if target.exists() and not force:
            raise FileExistsError(f"{target} exists; use --force to regenerate")
        target.write_bytes(data)
        written.append(target)
    return written


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m builder.demo.spreadsheet", description=__doc__.splitlines()[0])
    parser.add_argument("out", type=Path, help="folder for the sheet and the map, e.g. records/import/")
    parser.add_argument("--records", type=Path, default=Path("records"),
                        help="the shop whose rules and catalogue the sheet uses (default: records)")
    parser.add_argument("--force", action="store_true", help="replace files already there")
    args = parser.parse_args(argv)
    try:
        for path in write_files(args.out, args.records, args.force):
            print(f"wrote {path}")
    except FileExistsError as error:
        print(error, file=sys.stderr)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
