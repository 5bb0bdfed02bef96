"""A synthetic shop of N invented builds for benchmarks:
``python tests/perf/synthetic_shop.py OUT_DIR N [--seed S]``.

OUT_DIR becomes a records folder: shop.yaml and parts/ as in the demo shop, and
builds/<year>/SY-<n>.yaml. Each build is invented with the demo generator's pieces
(builder.demo.builds): gearbox families with their fork directions, concentric slaves, catalogue
parts with overrides, inline sections, pedal layouts, load curves, measured sections made
from the engine plus each family's invented losses, rejected builds and drafts. On top of
that the mix leans further towards the heavier records (more layouts and inline clutches
with load curves) and every record carries a short work log in its notes.

Build n depends only on (seed, n), so the first 1,000 builds of a 10,000-build shop are the
1,000-build shop. Output is byte-for-byte deterministic by seed. Everything is invented:
no real make, model, vendor, person or part number.
"""
from __future__ import annotations

import argparse
import datetime as dt
import random
import sys
from pathlib import Path

from builder.demo import builds, catalogue, files

DEFAULT_SEED = 20250
ID_PREFIX = "SY"
START = dt.date(2015, 1, 5)
DAYS = 11 * 365
REJECTED_SHARE = 0.05
DRAFT_SHARE = 0.05
EXTRA_LAYOUT_SHARE = 0.15  # pedals given a side-view layout, on top of the demo's own share
EXTRA_INLINE_CLUTCH_SHARE = 0.25  # bench-measured clutches with a load curve
EXTRA_INLINE_CYLINDER_SHARE = 0.2  # master or slave written out by hand
FAMILY_WEIGHTS = [(f.code, f.builds) for f in catalogue.FAMILIES]
RULES = files.rules()
LOG_STEPS = (
    "Customer brought the car in; pedal box and bell housing inspected.",
    "Measured the fork lengths off the car with the bell housing off.",
    "Bench-bled the master before fitting; no air at the outlet.",
    "Ran the line along the bulkhead, clear of the exhaust and steering shaft.",
    "Set the pushrod free play at the pad, then locked the clevis.",
    "Pressure-bled from the slave end until the fluid ran clear.",
    "Checked the bearing clearance with the pedal at rest.",
    "Road test: selected every gear from cold and hot, no crunch.",
    "Re-torqued the slave bracket after the first heat cycle.",
    "Customer asked for the pedal stop moved; stop bolt reset and locked.",
    "Fluid level topped up after the road test; no weeps at the fittings.",
    "Photographed the pedal box and bracket for the job folder.",
    "Swapped the hose for a longer one to clear the header.",
    "Fork pivot greased and the ball stud checked for wear.",
    "Checked the master mounting for flex with the pedal held down.",
    "Handed over with the fluid type written on the reservoir cap.",
)


def build_id(n: int) -> str:
    """The id of build n (1-based): SY-000001 ... (matches builder.model.BUILD_ID_PATTERN)."""
    return f"{ID_PREFIX}-{n:06d}"


def _slot(rng: random.Random) -> tuple[dt.date, str, str, str]:
    """(date, status, family, trouble) of build n."""
    date = START + dt.timedelta(days=rng.randrange(DAYS))
    roll = rng.random()
    if roll < REJECTED_SHARE:
        family, trouble = catalogue.REJECTED[rng.randrange(len(catalogue.REJECTED))]
        return date, "rejected", family, trouble
    family = builds._weighted(rng, FAMILY_WEIGHTS)
    if roll < REJECTED_SHARE + DRAFT_SHARE:
        return date, "draft", family, "steep pushrod" if rng.random() < 0.2 else ""
    return date, "verified" if rng.random() < 0.5 else "measured", family, ""


def _richer(plan: builds.Plan, rng: random.Random) -> None:
    """More layouts, bench-measured clutches and hand-written cylinders than the demo has."""
    if rng.random() < EXTRA_INLINE_CYLINDER_SHARE:
        plan.master_style = "inline"
    if rng.random() < EXTRA_INLINE_CYLINDER_SHARE:
        plan.slave_style = "inline"
    pedal = plan.sections["pedal"]
    if plan.trouble != "bottoms" and "layout" not in pedal.fields and rng.random() < EXTRA_LAYOUT_SHARE:
        builds._add_layout(rng, pedal, plan.system, 0.0)
    if not plan.trouble and plan.sections["clutch"].part and rng.random() < EXTRA_INLINE_CLUTCH_SHARE:
        clutch = builds._inline_clutch(rng, plan.system, heavy=False)
        while "load_curve" not in clutch.fields:
            clutch = builds._inline_clutch(rng, plan.system, heavy=False)
        plan.sections["clutch"] = clutch


def _work_log(rng: random.Random, date: dt.date) -> str:
    steps = rng.sample(LOG_STEPS, rng.randint(6, 12))
    day = date - dt.timedelta(days=len(steps) * 3)
    lines = []
    for step in steps:
        day += dt.timedelta(days=rng.randint(1, 4))
        lines.append(f"{day.isoformat()}: {step}")
    return "\n".join(lines)


def make_record(seed: int, n: int) -> files.Record:
    """Build n of the synthetic shop with this seed."""
    rng = random.Random(f"{seed}-{n}")
    date, status, family, trouble = _slot(rng)
    rec, _ = builds.invent(rng, RULES, build_id(n), date, status, family, trouble, enrich=_richer)
    rec.notes += _work_log(rng, date) + "\n"
    return rec


def record_text(seed: int, n: int) -> tuple[str, str]:
    """(path relative to the records folder, file text) of build n."""
    rec = make_record(seed, n)
    return files.build_path(rec), files.build_text(rec)


def write_shop(out_dir: Path, count: int, seed: int = DEFAULT_SEED,
               texts: list[tuple[str, str]] | None = None) -> Path:
    """Write shop.yaml, parts/ and builds 1..count under out_dir (created, must be empty).

    `texts`, when given, holds record_text(seed, n) for n = 1.. (at least count of them),
    so one generation can serve several shop sizes.
    """
    out_dir = Path(out_dir)
    if out_dir.exists() and any(out_dir.iterdir()):
        raise FileExistsError(f"{out_dir} is not empty")
    if texts is None:
        texts = [record_text(seed, n) for n in range(1, count + 1)]
    files.write_files(out_dir, files.rules_files() | dict(texts[:count]))
    return out_dir


def proposal_text(seed: int = DEFAULT_SEED) -> str:
    """A draft proposal (no measured section) for `fitment check`, outside any shop."""
    rng = random.Random(f"{seed}-proposal")
    rec, _ = builds.invent(rng, RULES, "PR-0001", dt.date(2026, 2, 2), "draft", "QX-5", "")
    return files.build_text(rec)


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description="Write a synthetic shop of N invented builds.")
    parser.add_argument("out_dir", type=Path, help="records folder to create (must be empty)")
    parser.add_argument("count", type=int, help="number of builds")
    parser.add_argument("--seed", type=int, default=DEFAULT_SEED)
    args = parser.parse_args(argv)
    try:
        write_shop(args.out_dir, args.count, args.seed)
    except FileExistsError as error:
        print(error, file=sys.stderr)
        return 1
    print(f"wrote {args.count} builds under {args.out_dir}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
