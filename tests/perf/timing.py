"""What bench.py and bench_suggest.py share: the synthetic shops they write (kept between
runs with --keep) and timing `fitment` as a subprocess. Not a test: pytest does not collect it."""
from __future__ import annotations

import os
import shutil
import subprocess
import sys
import time
from concurrent.futures import ProcessPoolExecutor
from pathlib import Path

import synthetic_shop  # beside this file

FITMENT = str(Path(sys.executable).with_name("fitment"))


def _texts(seed: int, numbers: range) -> list[tuple[str, str]]:
    return [synthetic_shop.record_text(seed, n) for n in numbers]


def generate(work: Path, sizes: set[int], seed: int) -> dict[int, Path]:
    """Write one shop per size under work (reused when already there); path per size."""
    shops = {n: work / f"shop-{n}" / "records" for n in sorted(sizes)}
    missing = [n for n, path in shops.items() if not (path / ".complete").exists()]
    if missing:
        largest = max(missing)
        chunks = [range(start, min(start + 500, largest + 1)) for start in range(1, largest + 1, 500)]
        t0 = time.perf_counter()
        with ProcessPoolExecutor(max_workers=2) as pool:
            texts = [t for part in pool.map(_texts, [seed] * len(chunks), chunks) for t in part]
        for n in missing:
            shutil.rmtree(shops[n], ignore_errors=True)
            synthetic_shop.write_shop(shops[n], n, seed, texts)
            (shops[n] / ".complete").write_text(f"seed {seed}\n")
        print(f"generated shops of {', '.join(map(str, missing))} builds in {time.perf_counter() - t0:.0f} s")
    return shops


def fitment_runs(args: list[str], runs: int) -> tuple[list[float], list[float], int]:
    """(wall s per run, cpu s per run, last exit status) of `runs` runs of `fitment ARGS`,
    process start included; exit 3 (sized, not ready to order) is a finished run."""
    walls, cpus, status = [], [], 0
    for _ in range(runs):
        before = os.times()
        t0 = time.perf_counter()
        done = subprocess.run([FITMENT, *args], capture_output=True, text=True)
        walls.append(time.perf_counter() - t0)
        after = os.times()
        cpus.append(after.children_user - before.children_user
                    + after.children_system - before.children_system)
        status = done.returncode
        if status not in (0, 3):
            raise SystemExit(f"fitment {' '.join(args)} failed:\n{done.stderr}")
    return walls, cpus, status
