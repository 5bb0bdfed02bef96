"""The figures a build page, a part page and the home page show are the right ones, each
derived here by hand from the invented shop's inputs (tests/site_shops.py), not read back
from the engine. The generated Markdown is read directly (no mkdocs).

Outside references: the lever rule (mechanical advantage = effort arm / load arm; any statics
text, e.g. Meriam and Kraige, Engineering Mechanics: Statics) for the pedal and fork ratios;
Pascal's principle (force scales with piston area, so with the bore squared; any fluid
mechanics text, e.g. White, Fluid Mechanics, ch. 2) for the hydraulic ratio; efficiency as
ideal effort over real effort (definition; same texts); NIST SP 811 Appendix B.8
(1 in = 25.4 mm) for the metric figures.
"""
from __future__ import annotations

import re

import pytest

from builder.site.pages import generated_pages
from site_shops import analysis

NUMBER = r"([0-9]+(?:\.[0-9]+)?)"


def pages(n: int) -> tuple[object, dict[str, str]]:
    result = analysis(n)
    return result, {path: "\n".join(" ".join(line.replace("\\", "").split())
                                   for line in text.splitlines())
                    for path, text in generated_pages(result)}


@pytest.fixture(scope="module")
def small():
    return pages(8)


def row(page: str, label: str) -> str:
    """The rest of the Markdown table row that starts with the cell `label`."""
    found = re.search("^" + re.escape(f"| {label} |") + r"(.*) \|$", page, re.MULTILINE)
    assert found, label
    return found.group(1)


def figure(text: str, unit: str) -> float:
    found = re.search(NUMBER + " " + re.escape(unit), text)
    assert found, (text, unit)
    return float(found.group(1))


# TS-100 (site_shops.build(0)): pad arm 11.25 in, clevis arm 2.10 in, bores 0.75 in master and
# 0.875 in slave, fork 5.6 in to the slave and 2.8 in to the bearing, release load 410 lbf,
# release travel 0.32 in plus 0.06 in clearance; the shop's default efficiency is 0.85.
PEDAL = 11.25 / 2.10  # lever rule
HYDRAULIC = (0.875 / 0.75) ** 2  # Pascal: slave area over master area
FORK = 5.6 / 2.8  # lever rule
IDEAL_LBF = 410 / (PEDAL * HYDRAULIC * FORK)


def test_build_page_ratios_are_the_levers_and_the_bores(small):
    _, page = small
    build = page["builds/TS-100.md"]
    assert f"{PEDAL:.2f} : 1" in row(build, "Pedal ratio (at rest / at release / at stop / average)")
    assert row(build, "Hydraulic ratio (slave area / master area)").strip() == f"{HYDRAULIC:.2f} : 1"
    assert row(build, "Fork ratio").strip() == f"{FORK:.2f} : 1"
    assert row(build, "Overall ratio").strip() == f"{PEDAL * HYDRAULIC * FORK:.2f} : 1"


def test_build_page_effort_without_losses_and_at_the_default_efficiency(small):
    _, page = small
    build = page["builds/TS-100.md"]
    ideal = figure(row(build, "Pedal effort, no losses"), "lbf")
    assert ideal == pytest.approx(IDEAL_LBF, abs=0.05)
    computed = figure(row(build, "Pedal effort at 85.0 % efficiency"), "lbf")
    assert computed == pytest.approx(IDEAL_LBF / 0.85, abs=0.05)  # efficiency = ideal / real


def test_part_page_shows_each_builds_own_margin_and_other_parts(small):
    _, page = small
    build = page["builds/TS-100.md"]
    available, needed = (figure(cell, "in") for cell in
                         row(build, "Release bearing travel (available / needed)").split(" / "))
    assert needed == pytest.approx(0.32 + 0.06)
    used = page["parts/masters/MC-750.md"]
    ts100 = row(used, "[TS-100](../../builds/TS-100.md)")
    margin = float(re.search(r"\| ([+-][0-9.]+) % \|", ts100).group(1)) / 100
    assert margin == pytest.approx(available / needed - 1, abs=0.002)  # 4 figures shown
    # TS-102 is rejected with its own 1 in slave written out: 25.4 mm (NIST SP 811)
    assert "Slave: 1 in (25.4 mm) bore" in row(used, "[TS-102](../../builds/TS-102.md)")


def test_home_page_counts_the_published_builds_by_status(small):
    result, page = small
    shown = [b for b in result.shop.builds if b.status in result.shop.rules.publish]
    counts = [len(shown), sum(b.status == "verified" for b in shown),
              sum(b.status == "rejected" for b in shown)]
    assert counts == [6, 2, 2]  # site_shops.shop(8): statuses cycle verified, measured, rejected, draft
    header = "| Builds | Verified | Rejected | Gearbox families | Catalogue parts |\n|---|---|---|---|---|"
    assert f"{header}\n| {counts[0]} | {counts[1]} | {counts[2]} | 2 | 3 |" in page["index.md"]


def test_prediction_interval_is_low_then_high_around_the_prediction():
    result, page = pages(24)  # enough measured builds for leave-one-out intervals
    checked = 0
    for build_id, prediction in result.predictions.items():
        path = f"builds/{build_id}.md"
        if prediction.interval is None or path not in page:
            continue
        found = re.search(r"Calibrated prediction:\*\* " + NUMBER + r" lbf .*?likely between "
                          + NUMBER + r" lbf .*? and " + NUMBER + " lbf", page[path])
        assert found, build_id
        effort, low, high = map(float, found.groups())
        assert low < effort < high, build_id
        checked += 1
    assert checked


def test_calibration_chart_whiskers_are_the_median_plus_and_minus_its_mad():
    # The chart's legend: "median, with ± MAD": each whisker reaches as far left of its dot
    # as right of it (SVG 1.1 path syntax: M x y H x).
    _, page = pages(24)
    spread = 0.0
    for name in ("efficiency", "travel"):
        chart = page[f"charts/calibration-{name}.svg"]
        whiskers = re.findall(r'<path d="M' + NUMBER + " " + NUMBER + "H" + NUMBER + "M", chart)
        dots = re.findall(r'<circle cx="' + NUMBER + '" cy="' + NUMBER + '" r="5"', chart)
        assert whiskers and len(whiskers) == len(dots), name
        for (x0, y0, x1), (cx, cy) in zip(whiskers, dots):
            assert y0 == cy
            assert float(x0) <= float(cx) <= float(x1), name
            assert float(cx) - float(x0) == pytest.approx(float(x1) - float(cx), abs=0.15), name
            spread = max(spread, float(x1) - float(x0))
    assert spread > 10  # some family's efforts spread (site_shops varies them by build)
