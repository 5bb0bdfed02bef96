"""The invented demo shop: regenerated exactly, big and varied enough, valid, loadable.

Counts and ranges below are the team brief's requirements for the demo, not outside facts;
the ranges themselves are "from memory" (see builder/demo/). Outside references used:
JSON Schema draft 2020-12 (the jsonschema library's Draft202012Validator), numpy's median.
"""
from __future__ import annotations

import dataclasses
import json
import math
from collections import Counter
from pathlib import Path

import numpy as np
import pytest
import yaml

from builder import demo
from builder.demo import catalogue
from builder.engine import size_build

ROOT = Path(__file__).resolve().parents[1]
RECORDS = ROOT / "records"
SCHEMA = ROOT / "schema"
INCH = 0.0254  # m, exact by definition (NIST SP 811, appendix B)
LBF = 4.4482216152605  # N, exact by definition (NIST SP 811, appendix B)
GOOD = ("measured", "verified")


@pytest.fixture(scope="module")
def demo_shop():
    records, sizings = demo.make_demo()
    return records, sizings, [demo.load(r) for r in records]


def _yaml_files(folder: Path = RECORDS) -> dict[str, bytes]:
    """Relative path -> bytes of every YAML file under folder (the committed demo by default)."""
    return {p.relative_to(folder).as_posix(): p.read_bytes() for p in sorted(folder.rglob("*.yaml"))}


def _schema_path(rel: str, data: bytes) -> Path | None:
    """The schema a records file's first-line modeline points at; None without a modeline."""
    first = data.decode().splitlines()[0]
    target = first.removeprefix("# yaml-language-server: $schema=")
    return None if target == first else (RECORDS / rel).parent / target


def test_generator_reproduces_committed_demo_byte_for_byte(tmp_path):
    demo.write_demo(tmp_path)
    fresh = _yaml_files(tmp_path)
    committed = _yaml_files()
    assert sorted(fresh) == sorted(committed)
    changed = [rel for rel in fresh if fresh[rel] != committed[rel]]
    assert not changed, f"regenerate with `python -m builder.demo records/ --force`: {changed[:5]}"


def test_generator_refuses_to_overwrite_without_force(tmp_path):
    demo.write_demo(tmp_path)
    with pytest.raises(FileExistsError):
        demo.write_demo(tmp_path)
    assert demo.main([str(tmp_path)]) == 1
    assert demo.main([str(tmp_path), "--force"]) == 0


def test_every_file_starts_with_a_schema_modeline():
    for rel, data in _yaml_files().items():
        schema_path = _schema_path(rel, data)
        assert schema_path is not None, rel
        assert schema_path.resolve().parent == SCHEMA.resolve(), rel


def test_demo_counts(demo_shop):
    records, _, builds = demo_shop
    statuses = Counter(b.status for b in builds)
    assert len(builds) >= 48
    assert len({b.date.year for b in builds}) >= 3
    assert all(2023 <= b.date.year <= 2026 for b in builds)
    assert len({b.id for b in builds}) == len(builds)
    families = {b.gearbox.family for b in builds}
    assert len(families) >= 5
    assert {b.gearbox.fork_tip_moves for b in builds} == {"forward", "rearward", "none"}
    concentric = [b for b in builds if b.gearbox.fork_tip_moves == "none"]
    assert concentric and all(b.fork is None and b.slave.kind == "concentric"
                              and b.slave.piston_area is not None for b in concentric)
    per_family = Counter(b.gearbox.family for b in builds if b.status in GOOD)
    assert sum(n >= 10 for n in per_family.values()) >= 2
    assert sum(1 for b in builds if b.pedal.layout is not None) >= 5
    assert sum(1 for b in builds if b.clutch.load_curve) >= 5
    rejected = [b for b in builds if b.status == "rejected"]
    assert len(rejected) >= 3 and all(b.notes and "Rejected." in b.notes for b in rejected)
    drafts = [b for b in builds if b.status == "draft"]
    assert len(drafts) >= 3 and all(b.measured is None for b in drafts)
    assert all(b.measured is not None for b in builds if b.status in GOOD)
    assert statuses["measured"] + statuses["verified"] + len(rejected) + len(drafts) == len(builds)


def test_catalogue_counts_and_references(demo_shop):
    records, _, _ = demo_shop
    sizes = {kind: len(entries) for kind, entries in demo.CATALOGUE.items()}
    assert sizes["masters"] >= 4 and sizes["slaves"] >= 4 and sizes["pedals"] >= 3
    assert sizes["gearboxes"] >= 5 and sizes["clutches"] >= 3
    sections = [s for r in records for s in r.sections.values() if s is not None]
    by_ref = [s for s in sections if s.part]
    assert all(s.part in demo.PARTS for s in by_ref)
    assert any(not s.fields for s in by_ref), "plain {part: ID}"
    assert any(s.fields for s in by_ref), "{part: ID} with overrides"
    fully_inline = [r for r in records if not any(s.part for s in r.sections.values() if s)]
    assert len(fully_inline) >= 2


def test_demo_stays_in_realistic_ranges(demo_shop):
    """Ranges from memory (typical hand-built conversions); see builder/demo/."""
    _, sizings, builds = demo_shop
    for b, s in zip(builds, sizings):
        assert 5 / 8 * INCH - 1e-9 <= b.master.bore <= 1 * INCH + 1e-9, b.id
        if b.slave.bore is not None:
            assert 5 / 8 * INCH - 1e-9 <= b.slave.bore <= 1 * INCH + 1e-9, b.id
        assert 1.25e3 <= b.clutch.peak_load <= 4.5e3, b.id
        assert 7e-3 <= b.clutch.release_travel + b.clutch.clearance <= 10e-3, b.id
        assert 24 * INCH <= b.line.length <= 60 * INCH + 1e-3, b.id
        assert 5.5 * INCH <= b.pedal.pad_travel <= 7.0 * INCH + 1e-9, b.id
        assert b.line.fluid in ("DOT 3", "DOT 4", "DOT 5.1")
        if b.status in GOOD:
            assert 4.5 <= s.ratio_pedal <= 7.0, b.id
            assert 15 * LBF <= b.measured.pedal_effort <= 45 * LBF, b.id


def test_layouts_agree_with_pad_travel(demo_shop):
    """Pad arc = r * theta (arc length of a circle) within 2 % of the recorded pad travel."""
    _, _, builds = demo_shop
    for b in builds:
        lay = b.pedal.layout
        if lay is None:
            continue
        radius = math.dist(lay.pivot, lay.pad)
        assert radius * lay.rotation_to_stop == pytest.approx(b.pedal.pad_travel, rel=0.02)


def test_the_car_is_richer_than_the_engine(demo_shop):
    """The measured sections come from a car with its own free play, dead stroke, hose
    swell and pedal springs, not from the engine times a constant: within a family the
    measured/computed slave travel spreads by more than the 1 % travel gauge alone would
    give, and some builds record what the shop otherwise assumes. The spread is the scaled
    median absolute deviation (scipy.stats.median_abs_deviation, scale="normal")."""
    import scipy.stats

    _, _, builds = demo_shop
    rules = demo.rules()
    ratios = {}
    for b in builds:
        if b.status not in GOOD:
            continue
        s = size_build(b, rules, efficiency=1.0)
        ratios.setdefault(b.gearbox.family, []).append(b.measured.slave_travel / s.slave_travel)
    spreads = [scipy.stats.median_abs_deviation(v, scale="normal") for v in ratios.values()
               if len(v) >= 6]
    assert np.median(spreads) > 1.5 * catalogue.TRAVEL_NOISE
    assert sum(b.pedal.free_play is not None for b in builds) >= 5
    assert sum(b.line.hose_length is not None for b in builds) >= 5
    assert any(b.pedal.layout is not None and b.pedal.layout.bore_axis is not None
               for b in builds)
    assert any(b.slave.pulls for b in builds) and any(b.slave.preload for b in builds)
    assert any(b.pedal.bare_effort for b in builds)
    assert any(b.clutch.release_load is None and b.clutch.load_curve for b in builds)


def test_no_real_names_leak_into_free_text(demo_shop):
    """Vehicles are generic descriptions: a decade or kit, a body style, an engine layout."""
    _, _, builds = demo_shop
    for b in builds:
        assert b.vehicle.split()[0].endswith("s") or b.vehicle.startswith("kit-built"), b.vehicle
        assert len(b.technician) == 2 and b.technician.isupper()


class _StringDates(yaml.SafeLoader):
    """YAML as JSON Schema sees it: dates stay strings."""


_StringDates.yaml_implicit_resolvers = {
    first: [(tag, rx) for tag, rx in resolvers if tag != "tag:yaml.org,2002:timestamp"]
    for first, resolvers in yaml.SafeLoader.yaml_implicit_resolvers.items()
}


def test_every_demo_file_validates_against_its_schema():
    """JSON Schema draft 2020-12 (jsonschema.Draft202012Validator), straight from schema/."""
    jsonschema = pytest.importorskip("jsonschema")
    validators = {}
    for rel, data in _yaml_files().items():
        schema_path = _schema_path(rel, data)
        if schema_path not in validators:
            if not schema_path.exists():
                pytest.skip(f"{schema_path.name} not written yet")
            validators[schema_path] = jsonschema.Draft202012Validator(
                json.loads(schema_path.read_text()))
        doc = yaml.load(data, Loader=_StringDates)
        errors = [f"{list(e.absolute_path)}: {e.message}"
                  for e in validators[schema_path].iter_errors(doc)]
        assert not errors, (rel, errors)


def test_loader_reads_the_demo_shop_as_generated(demo_shop):
    """builder.records.load_shop gives back exactly the builds and rules the generator sized."""
    from builder.records import load_shop

    shop = load_shop(str(RECORDS))
    _, _, builds = demo_shop
    assert shop.rules == demo.rules()
    assert {kind: sorted(parts) for kind, parts in shop.parts.items()} == {
        kind: sorted(e.id for e in entries) for kind, entries in demo.CATALOGUE.items()}
    loaded = {b.id: dataclasses.replace(b, path="") for b in shop.builds}
    assert loaded == {b.id: dataclasses.replace(b, path="") for b in builds}
