"""Speed of `fitment suggest`: ``.venv/bin/python tests/perf/bench_suggest.py [--keep DIR]``.

Runs `fitment suggest PROPOSAL` end to end as a subprocess (process start, loading and
analysing the shop included), median of RUNS, on the demo shop in records/ and on a
synthetic 1,000-build shop (tests/perf/synthetic_shop.py), for two invented proposals:

- lever: a two-lengths pedal with two other clevis holes (3 pedal positions);
- layout: a side-view pedal with two other clevis points and two other holes on the arm
  (5 pedal positions), the heaviest to size;

each with `--sizes catalogue` (the default) and `--sizes standard`. Beside each figure, in
the same run, `fitment check` of the same proposal: the ratio says what suggesting adds to
what a check already costs. Targets: under 1 s on the demo shop, under 2 s on the
1,000-build shop. Wall-clock figures on a shared machine vary; CPU seconds are printed too.
Not a test: pytest does not collect it.
"""
from __future__ import annotations

import argparse
import os
import shutil
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
REPO = HERE.parents[1]
sys.path.insert(0, str(HERE))
sys.path.insert(0, str(HERE.parent))

import synthetic_shop  # noqa: E402  (beside this file)
from demo_proposals import DEMO_PROPOSALS as PROPOSALS  # noqa: E402  (shared with the tests)
from timing import FITMENT, fitment_runs, generate  # noqa: E402  (beside this file)

DEMO_RECORDS = REPO / "records"
RUNS = 5
SHOP_SIZE = 1_000
TARGETS = {"demo": 1.0, "synthetic": 2.0}


def timed(args: list[str]) -> tuple[float, float, int]:
    """(median wall s, median cpu s, exit status) of RUNS runs of `fitment ARGS`."""
    walls, cpus, status = fitment_runs(args, RUNS)
    return statistics.median(walls), statistics.median(cpus), status


def candidates(records: Path, proposal: Path, sizes: str) -> int:
    import json

    done = subprocess.run([FITMENT, "--records", str(records), "suggest", str(proposal),
                           "--json", "--sizes", sizes], capture_output=True, text=True)
    return json.loads(done.stdout)["combinations"]


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--keep", type=Path, help="scratch folder kept (and reused) between runs")
    parser.add_argument("--seed", type=int, default=synthetic_shop.DEFAULT_SEED)
    args = parser.parse_args(argv)
    work = args.keep or Path(tempfile.mkdtemp(prefix="fitment-bench-suggest-"))
    work.mkdir(parents=True, exist_ok=True)
    started = time.perf_counter()
    try:
        synthetic = generate(work, {SHOP_SIZE}, args.seed)[SHOP_SIZE]
        shops = {"demo": DEMO_RECORDS, "synthetic": synthetic}
        paths = {}
        for name, text in PROPOSALS.items():
            paths[name] = work / f"{name}.yaml"
            paths[name].write_text(text, encoding="utf-8")
        print(f"python {sys.version.split()[0]}, {os.cpu_count()} cpus, load average "
              f"{os.getloadavg()[0]:.1f}; median of {RUNS} runs each, process start included")
        print(f"{'shop':<24} {'proposal':<8} {'sizes':<10} {'tried':>5}  {'suggest wall (cpu)':<18} "
              f"{'check wall (cpu)':<17} {'ratio':>5}  target  verdict")
        for shop, records in shops.items():
            count = len(list((records / "builds").rglob("*.yaml")))
            label = f"{shop} ({count} builds)"
            for name, proposal in paths.items():
                check_wall, check_cpu, status = timed(["--records", str(records), "check",
                                                       str(proposal)])
                for sizes in ("catalogue", "standard"):
                    wall, cpu, _ = timed(["--records", str(records), "suggest", str(proposal),
                                          "--sizes", sizes])
                    target = TARGETS[shop]
                    print(f"{label:<24} {name:<8} {sizes:<10} "
                          f"{candidates(records, proposal, sizes):>5}  {wall:>5.2f} s ({cpu:.2f} s)"
                          f"{'':<4} {check_wall:>5.2f} s ({check_cpu:.2f} s) {wall / check_wall:>5.2f}x"
                          f"  < {target:g} s   {'MET' if wall < target else 'NOT MET'}"
                          f"  (check exit {status})", flush=True)
    finally:
        if args.keep is None:
            shutil.rmtree(work, ignore_errors=True)
    print(f"benchmark took {time.perf_counter() - started:.0f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
