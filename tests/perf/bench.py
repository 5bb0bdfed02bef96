"""Speed at shop scale: ``.venv/bin/python tests/perf/bench.py [--quick] [--keep DIR]``.

Writes synthetic shops (tests/perf/synthetic_shop.py) into a scratch folder, then measures,
each in a fresh child process so one figure does not warm the next:

- load + validate + size every build (builder.records.load_shop, then
  builder.engine.batch.size_all over every build, as analyse() does) against a bare libyaml parse
  (yaml.load(..., Loader=yaml.CSafeLoader)) of the same files in the same process, file
  reads included in both; the two alternate, best of ROUNDS each;
- the similar-builds query (SimilarityIndex.query) over the loaded history;
- `fitment validate` as a whole process (imports included) against a process that only
  parses the same files with libyaml, alternating, best of ROUNDS each;
- `fitment check PROPOSAL` end to end as a subprocess, process start included, against a
  synthetic shop and the demo shop in records/;
- peak memory (ru_maxrss) of a child that loads, sizes and analyses the largest shop;
- `builder.site.publish_site` at two shop sizes: time ratio, our stages (sources and
  generated Markdown/SVG) against mkdocs, and bytes per build page.

Each line prints the figure, its target and MET / NOT MET. Wall-clock figures on a shared
machine vary; CPU seconds are printed beside them. Not a test: pytest does not collect it.
"""
from __future__ import annotations

import argparse
import json
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

import synthetic_shop  # noqa: E402  (beside this file)
from timing import fitment_runs, generate  # noqa: E402  (beside this file)

PYTHON = sys.executable
FITMENT = str(Path(PYTHON).with_name("fitment"))
DEMO_RECORDS = REPO / "records"
ROUNDS = 3
CHECK_RUNS = 5
QUERIES = 200

TARGET_LOAD_RATIO = 1.5
TARGET_QUERY_MS = 50.0
TARGET_CHECK_S = 1.0
TARGET_PEAK_MB = 300.0
TARGET_SITE_RATIO = 4.5
TARGET_OURS_SHARE = 0.25

FULL = {"load": (1_000, 10_000), "query": 10_000, "check": 1_000, "memory": 10_000, "site": (250, 1_000),
        "process": 5_000}
QUICK = {"load": (200, 1_000), "query": 1_000, "check": 200, "memory": 1_000, "site": (50, 200),
         "process": 1_000}
BARE_PARSE = """\
import os, sys, yaml
for d, _, names in os.walk(sys.argv[1]):
    for n in names:
        if n.endswith((".yaml", ".yml")):
            with open(os.path.join(d, n), "rb") as handle:
                yaml.load(handle.read(), Loader=yaml.CSafeLoader)
"""


# ----------------------------------------------------------------------------- children

def child_load(records: str) -> dict:
    """Bare parse vs load + size, alternating, in this process; then analyse and queries."""
    import yaml

    from builder.engine.batch import size_all
    from builder.history import analyse
    from builder.records import load_shop, validate_paths

    files = sorted(str(Path(d, n)) for d, _, names in os.walk(records) for n in names
                   if n.endswith((".yaml", ".yml")))
    for name in files:  # page cache warm for both sides
        Path(name).read_bytes()

    def bare() -> None:
        for name in files:
            with open(name, "rb") as handle:
                yaml.load(handle.read(), Loader=yaml.CSafeLoader)

    def ours():
        shop = load_shop(records)
        size_all(shop.builds, shop.rules)  # as analyse() and the site do
        return shop

    bare_s, ours_s, ours_cpu, bare_cpu = [], [], [], []
    for _ in range(ROUNDS):
        for runner, wall, cpu in ((bare, bare_s, bare_cpu), (ours, ours_s, ours_cpu)):
            c0, t0 = time.process_time(), time.perf_counter()
            runner()
            wall.append(time.perf_counter() - t0)
            cpu.append(time.process_time() - c0)
    t0 = time.perf_counter()
    shop = load_shop(records)
    load_only = time.perf_counter() - t0
    t0 = time.perf_counter()
    validate_paths(records)
    validate = time.perf_counter() - t0
    t0 = time.perf_counter()
    analysis = analyse(shop)
    analyse_s = time.perf_counter() - t0
    step = max(1, len(shop.builds) // QUERIES)
    query_ms = []
    for build in shop.builds[::step][:QUERIES]:
        sizing = analysis.sizings[build.id]
        t0 = time.perf_counter()
        analysis.index.query(build, sizing, k=5, exclude_id=build.id)
        query_ms.append((time.perf_counter() - t0) * 1e3)
    return {"files": len(files), "bytes": sum(os.path.getsize(n) for n in files),
            "bare": bare_s, "ours": ours_s, "bare_cpu": bare_cpu, "ours_cpu": ours_cpu,
            "load_only": load_only, "validate": validate, "analyse": analyse_s,
            "candidates": len(analysis.index), "query_ms": query_ms}


def child_memory(records: str) -> dict:
    """Peak resident memory of loading, sizing and analysing a shop (similar lists included)."""
    import resource

    from builder.history import analyse
    from builder.records import load_shop

    analysis = analyse(load_shop(records))
    for build_id in list(analysis.similar)[:1000]:
        analysis.similar[build_id]
    return {"builds": len(analysis.sizings),
            "maxrss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}


def child_site(records: str, out: str) -> dict:
    """publish_site with our two stages (sources, generated pages) and mkdocs timed apart."""
    from builder.history import analyse
    from builder.records import load_shop
    from builder.site import publish as site_publish

    analysis = analyse(load_shop(records))
    spent = {"ours": 0.0, "mkdocs": 0.0}

    def timed(function, bucket):
        def run(*args, **kwargs):
            t0 = time.perf_counter()
            try:
                return function(*args, **kwargs)
            finally:
                spent[bucket] += time.perf_counter() - t0
        return run

    site_publish.write_sources = timed(site_publish.write_sources, "ours")
    site_publish.write_generated = timed(site_publish.write_generated, "ours")
    site_publish.run_mkdocs = timed(site_publish.run_mkdocs, "mkdocs")
    c0, t0 = time.process_time(), time.perf_counter()
    site_publish.publish_site(analysis, out)
    total, cpu = time.perf_counter() - t0, time.process_time() - c0
    ids = {synthetic_shop.build_id(n) for n in range(1, len(analysis.shop.builds) + 1)}
    pages = [p for p in Path(out, "builds").glob("*/index.html") if p.parent.name.upper() in ids]
    page_bytes = [p.stat().st_size for p in pages]
    svg_bytes = sum(p.stat().st_size for p in Path(out, "builds").glob("*.svg"))
    site_bytes = sum(p.stat().st_size for p in Path(out).rglob("*") if p.is_file())
    return {"builds": len(analysis.shop.builds), "total": total, "cpu": cpu, **spent,
            "pages": len(pages), "page_mean": statistics.mean(page_bytes) if page_bytes else 0,
            "svg_per_build": svg_bytes / max(1, len(analysis.shop.builds)),
            "site_bytes": site_bytes}


CHILDREN = {"load": child_load, "memory": child_memory, "site": child_site}


def in_child(kind: str, *args: str) -> dict:
    done = subprocess.run([PYTHON, __file__, "--child", kind, *args], capture_output=True,
                          text=True, cwd=REPO)
    if done.returncode != 0:
        raise SystemExit(f"child {kind} failed:\n{done.stderr}")
    return json.loads(done.stdout.strip().splitlines()[-1])


# ----------------------------------------------------------------------------- shops

def shop_mix(records: Path) -> str:
    """Shares of the record features in a synthetic shop, for the reader of the figures."""
    paths = list((records / "builds").rglob("*.yaml"))
    texts = [p.read_text(encoding="utf-8") for p in paths]

    def share(*words: str) -> str:
        return f"{100 * sum(any(w in t for w in words) for t in texts) / len(texts):.0f} %"

    lines = sum(t.count("\n") for t in texts) / len(texts)
    size = sum(len(t.encode()) for t in texts) / len(texts)
    return (f"{len(texts)} builds, {lines:.0f} lines / {size / 1024:.1f} KiB each; layouts "
            f"{share('  layout:')}, load curves {share('load_curve:')}, concentric "
            f"{share('part: CS-', 'kind: concentric')}, measured {share('measured:')}, "
            f"catalogue refs {share('  part:')}")


# ----------------------------------------------------------------------------- report

def verdict(ok: bool) -> str:
    return "MET" if ok else "NOT MET"


def line(what: str, figure: str, target: str, ok: bool, extra: str = "") -> None:
    print(f"{what:<46} {figure:>12}  target {target:<9} {verdict(ok):<8}{('  ' + extra) if extra else ''}",
          flush=True)


def bench_load(shops: dict[int, Path], sizes) -> dict:
    results = {}
    for n in sizes:
        r = in_child("load", str(shops[n]))
        results[n] = r
        ratio = min(r["ours"]) / min(r["bare"])
        line(f"load+validate+size {n} builds vs bare libyaml", f"{ratio:.2f}x",
             f"<= {TARGET_LOAD_RATIO}x", ratio <= TARGET_LOAD_RATIO,
             f"ours {min(r['ours']):.2f} s (cpu {min(r['ours_cpu']):.2f}), bare "
             f"{min(r['bare']):.2f} s (cpu {min(r['bare_cpu']):.2f}); load only "
             f"{r['load_only']:.2f} s, validate {r['validate']:.2f} s, analyse {r['analyse']:.2f} s")
    return results


def bench_query(load_results: dict, n: int) -> None:
    r = load_results[n]
    ms = sorted(r["query_ms"])
    p95 = ms[int(0.95 * (len(ms) - 1))]
    line(f"similar-builds query at {n} builds (p95)", f"{p95:.1f} ms", f"<= {TARGET_QUERY_MS:g} ms",
         p95 <= TARGET_QUERY_MS,
         f"median {statistics.median(ms):.1f} ms, max {ms[-1]:.1f} ms over {len(ms)} queries, "
         f"{r['candidates']} candidates")


def bench_validate_process(records: Path, n: int) -> None:
    """`fitment validate` as a process against a process that only parses the files."""
    commands = {"ours": [FITMENT, "--records", str(records), "validate"],
                "bare": [PYTHON, "-c", BARE_PARSE, str(records)]}
    best = {name: float("inf") for name in commands}
    for _ in range(ROUNDS):
        for name, command in commands.items():
            t0 = time.perf_counter()
            done = subprocess.run(command, capture_output=True, text=True)
            best[name] = min(best[name], time.perf_counter() - t0)
            if done.returncode != 0:
                raise SystemExit(f"{name} failed:\n{done.stderr}")
    ratio = best["ours"] / best["bare"]
    line(f"fitment validate {n} builds vs bare parse (processes)", f"{ratio:.2f}x",
         f"<= {TARGET_LOAD_RATIO}x", ratio <= TARGET_LOAD_RATIO,
         f"ours {best['ours']:.2f} s, bare {best['bare']:.2f} s, process start and imports included")


def bench_check(records: Path, label: str, proposal: Path) -> None:
    walls, cpus, _ = fitment_runs(["--records", str(records), "check", str(proposal)], CHECK_RUNS)
    wall = statistics.median(walls)
    line(f"fitment check, {label} (median)", f"{wall:.2f} s", f"<= {TARGET_CHECK_S:g} s",
         wall <= TARGET_CHECK_S, f"best {min(walls):.2f} s, cpu {statistics.median(cpus):.2f} s, "
         f"{CHECK_RUNS} runs")


def bench_memory(records: Path, n: int) -> None:
    r = in_child("memory", str(records))
    line(f"peak memory, load+size+analyse {n} builds", f"{r['maxrss_mb']:.0f} MB",
         f"<= {TARGET_PEAK_MB:g} MB", r["maxrss_mb"] <= TARGET_PEAK_MB, "ru_maxrss of the child")


def bench_site(shops: dict[int, Path], sizes, work: Path) -> None:
    small, large = sizes
    results = {}
    for n in sizes:
        out = work / f"site-{n}"
        shutil.rmtree(out, ignore_errors=True)
        results[n] = r = in_child("site", str(shops[n]), str(out))
        share = r["ours"] / r["total"]
        line(f"site build {n} builds: our stages' share", f"{100 * share:.0f} %",
             f"<= {100 * TARGET_OURS_SHARE:.0f} %", share <= TARGET_OURS_SHARE,
             f"total {r['total']:.1f} s (cpu {r['cpu']:.1f}): ours {r['ours']:.1f} s, mkdocs "
             f"{r['mkdocs']:.1f} s; build page {r['page_mean'] / 1024:.1f} KiB + SVG "
             f"{r['svg_per_build'] / 1024:.1f} KiB per build, site {r['site_bytes'] / 2**20:.0f} MiB")
        shutil.rmtree(out, ignore_errors=True)
    ratio = results[large]["total"] / results[small]["total"]
    line(f"site build time {large} / {small} builds", f"{ratio:.2f}x", f"<= {TARGET_SITE_RATIO}x",
         ratio <= TARGET_SITE_RATIO, f"{large / small:g}x the builds")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="smaller shops, for a quick look")
    parser.add_argument("--keep", type=Path, help="scratch folder kept (and reused) between runs")
    parser.add_argument("--seed", type=int, default=synthetic_shop.DEFAULT_SEED)
    parser.add_argument("--no-site", action="store_true", help="skip the site builds")
    parser.add_argument("--child", nargs="+", help=argparse.SUPPRESS)
    args = parser.parse_args(argv)
    if args.child:
        kind, *rest = args.child
        print(json.dumps(CHILDREN[kind](*rest)))
        return 0
    plan = QUICK if args.quick else FULL
    work = args.keep or Path(tempfile.mkdtemp(prefix="fitment-bench-"))
    work.mkdir(parents=True, exist_ok=True)
    started = time.perf_counter()
    try:
        sizes = {*plan["load"], plan["query"], plan["check"], plan["memory"], plan["process"]}
        if not args.no_site:
            sizes |= set(plan["site"])
        shops = generate(work, sizes, args.seed)
        proposal = work / "proposal.yaml"
        proposal.write_text(synthetic_shop.proposal_text(args.seed), encoding="utf-8")
        print(f"python {sys.version.split()[0]}, {os.cpu_count()} cpus, load average "
              f"{os.getloadavg()[0]:.1f}; synthetic shop: {shop_mix(shops[max(shops)])}")
        loads = bench_load(shops, plan["load"])
        bench_validate_process(shops[plan["process"]], plan["process"])
        bench_query(loads, plan["query"])
        bench_check(shops[plan["check"]], f"{plan['check']}-build shop", proposal)
        bench_check(DEMO_RECORDS, f"demo shop ({len(list((DEMO_RECORDS / 'builds').rglob('*.yaml')))} builds)",
                    proposal)
        bench_memory(shops[plan["memory"]], plan["memory"])
        if not args.no_site:
            bench_site(shops, plan["site"], work)
    finally:
        if args.keep is None:
            shutil.rmtree(work, ignore_errors=True)
    print(f"benchmark took {time.perf_counter() - started:.0f} s")
    return 0


if __name__ == "__main__":
    sys.exit(main())
