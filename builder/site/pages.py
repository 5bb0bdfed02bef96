"""Markdown and SVG for every generated page, from an Analysis. No mkdocs here.

`generated_pages(analysis)` yields (relative path, text) pairs for the docs dir. Record text
goes through `escape.md` (Markdown) or `escape.xml` (SVG) and nowhere else; links are built
only from `slug()` of ids, never from record text. Physics is read from the Analysis,
never recomputed.
"""
from __future__ import annotations

import dataclasses
import datetime as _dt
import re
from collections import defaultdict
from collections.abc import Callable, Iterator, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from builder import fields
from builder import presentation as say
from builder.model import Build, Part, ShopRules
from builder.site import svg
from builder.site.escape import front_matter_title, md, md_paragraphs

if TYPE_CHECKING:
    from builder.engine import Sizing
    from builder.history import Analysis, Deltas, Prediction
    from builder.history.reference import Combination

STATUS_COLORS = {"verified": "#2e7d32", "measured": "#1565c0", "rejected": "#c62828",
                 "draft": "#757575"}
STATUS_WORDS = {"verified": "verified", "measured": "measured, not yet verified",
                "rejected": "rejected (failed)", "draft": "draft (not built)"}
FORK_WORDS = {"forward": "fork tip moves forward", "rearward": "fork tip moves rearward",
              "none": "concentric slave (no fork)"}
# part kind -> (Build attribute, singular title)
PART_KINDS = {"gearboxes": ("gearbox", "Gearbox"), "clutches": ("clutch", "Clutch"),
              "masters": ("master", "Master cylinder"), "slaves": ("slave", "Slave cylinder"),
              "pedals": ("pedal", "Pedal assembly")}
LATEST = 10
NONE = say.NONE
_SLUG_BAD = re.compile(r"[^A-Za-z0-9._-]+")


def slug(identifier: str) -> str:
    """A file-name-safe form of an id; ids that had to change get a short checksum."""
    clean = _SLUG_BAD.sub("-", identifier).strip(".-") or "id"
    if clean == identifier:
        return clean
    return f"{clean}-{sum(identifier.encode()) % 9973:04d}"


# Where a page lives ("" top level, "builds", "parts" index, "part" page) -> path to the root.
ROOT = {"": "", "builds": "../", "parts": "../", "part": "../../"}


def build_link(build_id: str, where: str) -> str:
    return f"[{md(build_id)}]({ROOT[where]}builds/{slug(build_id)}.md)"


def part_link(kind: str, part_id: str, where: str) -> str:
    return f"[{md(part_id)}]({ROOT[where]}parts/{kind}/{slug(part_id)}.md)"


# --- display helpers --------------------------------------------------------------------

class Display:
    """Quantities in both unit systems, the shop's primary first; Markdown-escaped."""

    def __init__(self, rules: ShopRules):
        self.primary = rules.display_units  # "imperial" | "metric" (the shop schema's enum)

    def q(self, value: float | None, dimension: str) -> str:
        return md(say.quantity(value, dimension, self.primary))

    def chart_value(self, value_si: float, dimension: str) -> float:
        return value_si / say.chart_unit(dimension, self.primary)[1]

    def chart_label(self, words: str, dimension: str) -> str:
        return f"{words} ({say.chart_unit(dimension, self.primary)[0]})"

    def length_unit(self) -> tuple[str, float]:
        return say.chart_unit("length", self.primary)


def pct(fraction: float | None, signed: bool = False) -> str:
    return md(say.percent(fraction, signed))


def ratio(value: float | None) -> str:
    return md(say.ratio(value))


def heading(title: str) -> str:
    """Front matter and H1 of a generated page; title is record text."""
    return f"{front_matter_title(title)}# {md(title)}"


def table(header: Sequence[str], rows: Sequence[Sequence[str]]) -> str:
    """A Markdown table; cells must already be escaped."""
    lines = ["| " + " | ".join(header) + " |", "|" + "---|" * len(header)]
    lines += ["| " + " | ".join(cell or NONE for cell in row) + " |" for row in rows]
    return "\n".join(lines)


def parts_of(build: Build) -> list[tuple[str, str]]:
    """(kind, part id) for each catalogue part a build uses."""
    used = []
    for kind, (attr, _title) in PART_KINDS.items():
        part_id = getattr(getattr(build, attr), "part", None)
        if part_id:
            used.append((kind, part_id))
    return used


def measured_effort(build: Build) -> float | None:
    return build.measured.pedal_effort if build.measured else None


def by_date(builds: Sequence[Build]) -> list[Build]:
    """Newest first; undated builds last; ties by id."""
    return sorted(builds, key=lambda b: (-(b.date or _dt.date.min).toordinal(), b.id))


# --- section tables ---------------------------------------------------------------------

def section_rows(section: object, show: Display, name: str) -> list[list[str]]:
    """One row per known field of a record section `name` (gearbox, clutch, master, ...),
    labelled and shown as the field table declares."""
    rows = []
    for f in dataclasses.fields(section):
        value = getattr(section, f.name)
        key = f"{name}.{f.name}"
        if value is None or f.name in ("part", "layout") or key not in fields.FIELDS:
            continue
        field = fields.FIELDS[key]
        label = md(field.label)
        if field.kind == fields.QUANTITY:
            rows.append([label, show.q(value, field.dimension)])
        elif field.kind == fields.CURVE:
            travel, load = field.children
            pairs = "; ".join(f"{show.q(t, travel.dimension)} at {show.q(f_, load.dimension)}"
                              for t, f_ in value)
            rows.append([label, pairs])
        else:
            rows.append([label, md(value)])
    layout = getattr(section, "layout", None)
    if layout is not None:
        for point in fields.FIELDS["pedal.layout"].children:
            value = getattr(layout, point.name)
            if value is None:
                continue
            if point.kind == fields.POINT:
                x, y = value
                rows.append([md(f"layout {point.label} (x, y)"),
                             f"{show.q(x, point.dimension)}, {show.q(y, point.dimension)}"])
            else:
                rows.append([md(f"layout {point.label}"), show.q(value, point.dimension)])
    return rows


# --- pages --------------------------------------------------------------------------------

@dataclass
class SiteData:
    """The Analysis with the look-ups every page needs, computed once. Every build has a
    sizing, deltas and a prediction: analyse() refuses a shop with a build it cannot size."""

    analysis: Analysis
    show: Display
    builds: list[Build]
    used_by: dict[tuple[str, str], list[Build]]

    @classmethod
    def of(cls, analysis: Analysis) -> SiteData:
        builds = sorted(analysis.shop.builds, key=lambda b: b.id)
        used_by: dict[tuple[str, str], list[Build]] = defaultdict(list)
        for build in builds:
            for key in parts_of(build):
                used_by[key].append(build)
        return cls(analysis, Display(analysis.shop.rules), builds, used_by)

    @property
    def rules(self) -> ShopRules:
        return self.analysis.shop.rules

    def sizing(self, build_id: str) -> Sizing:
        return self.analysis.sizings[build_id]

    def deltas(self, build_id: str) -> Deltas:
        return self.analysis.deltas[build_id]

    def prediction(self, build_id: str) -> Prediction:
        return self.analysis.predictions[build_id]


def generated_pages(analysis: Analysis, progress: Callable[[int, int], None] | None = None
                    ) -> Iterator[tuple[str, str]]:
    """Every generated file for the docs dir as (relative posix path, text)."""
    data = SiteData.of(analysis)
    yield "index.md", home_page(data)
    yield "charts/effort-computed-vs-measured.svg", effort_scatter(data)
    yield "reference.md", reference_page(data)
    yield "builds/index.md", builds_index(data)
    yield "parts/index.md", parts_index(data)
    yield "calibration.md", calibration_page(data)
    yield from calibration_charts(data)
    for kind, parts in sorted(analysis.shop.parts.items()):
        for part_id, part in sorted(parts.items()):
            yield f"parts/{kind}/{slug(part_id)}.md", part_page(data, part)
    total = len(data.builds)
    for i, build in enumerate(data.builds, 1):
        yield from build_files(data, build)
        if progress is not None:
            progress(i, total)


def home_page(data: SiteData) -> str:
    builds = data.builds
    verified = sum(b.status == "verified" for b in builds)
    rejected = sum(b.status == "rejected" for b in builds)
    families = {b.gearbox.family for b in builds}
    parts = sum(len(p) for p in data.analysis.shop.parts.values())
    latest = by_date(builds)[:LATEST]
    rows = [[build_link(b.id, ""), md(b.date.isoformat() if b.date else NONE), md(b.status),
             md(b.gearbox.family), data.show.q(measured_effort(b), "force"), md(b.outcome)]
            for b in latest]
    return "\n\n".join([
        heading(data.rules.site_title),
        "Hydraulic clutch conversions recorded by this shop: what was fitted, what the "
        "calculation promised and what the finished car measured.",
        '!!! warning "Before you work on a hydraulic clutch"\n    Line pressure runs to several '
        "hundred psi and brake fluid is toxic. Read the [cautions](cautions.md) and follow the "
        "component makers' specifications.",
        table(["Builds", "Verified", "Rejected", "Gearbox families", "Catalogue parts"],
              [[str(len(builds)), str(verified), str(rejected), str(len(families)), str(parts)]]),
        "## Computed against measured pedal effort",
        "Each dot is a measured build: across, the effort the calculation gave with the shop's "
        "default efficiency; up, the effort measured at the pad. Dots inside the grey band are "
        "within 10 % of the calculation. The [calibration](calibration.md) page shows what the "
        "shop has learned from the differences.",
        "![Computed against measured pedal effort](charts/effort-computed-vs-measured.svg)",
        "## Latest builds",
        table(["Build", "Date", "Status", "Family", "Measured effort", "Outcome"], rows),
        "All builds are listed on the [builds](builds/index.md) page; verified combinations by "
        "gearbox family are in the [fitment reference](reference.md).",
    ]) + "\n"


def effort_scatter(data: SiteData) -> str:
    by_status: dict[str, list[tuple[float, float]]] = defaultdict(list)
    for b in data.builds:
        effort = measured_effort(b)
        if effort is None:
            continue
        predicted = data.sizing(b.id).effort_predicted
        by_status[b.status].append((data.show.chart_value(predicted, "force"),
                                    data.show.chart_value(effort, "force")))
    series = [svg.Series(f"{status} ({len(points)})", points, STATUS_COLORS.get(status, "#555"))
              for status, points in sorted(by_status.items())]
    chart = svg.XYChart(data.show.chart_label("computed pedal effort", "force"),
                        data.show.chart_label("measured pedal effort", "force"),
                        series=series, identity_band=0.10)
    return chart.render()


def _part_or(kind: str, part_id: str | None, text: str) -> str:
    return part_link(kind, part_id, "") if part_id else md(text)


def reference_page(data: SiteData) -> str:
    groups = data.analysis.reference
    out = [heading("Fitment reference"),
           "Master, slave and pedal combinations this shop has finished, by gearbox family and "
           "the way the fork tip moves. Only verified builds (checked on the car) and rejected "
           "builds (tried and failed) are listed; a combination that failed is marked "
           "**\u2718 failed** and should not be repeated without finding out why. Click a column "
           "heading to sort.",
           "Measured effort is the median of the builds behind the row; travel margin is the "
           "smallest computed margin among them (release bearing travel over what the clutch "
           "needs).",
           '!!! note "A record is not a guarantee"\n    Each row describes what fitted one '
           "shop's cars. Check every part against its maker's specification before ordering."]
    if not groups:
        out.append("No verified or rejected builds yet.")
    for (family, direction), combos in groups.items():
        out.append(f"## {md(family)} \u2014 {md(FORK_WORDS.get(direction, direction))}")
        out.append(table(["Result", "Master", "Slave", "Pedal", "Measured effort (median)",
                          "Travel margin (least)", "Builds"],
                         [_reference_row(data, combo) for combo in combos]))
    return "\n\n".join(out) + "\n"


def _reference_row(data: SiteData, combo: Combination) -> list[str]:
    if combo.rejected and combo.verified:
        result = f"**\u2718 mixed**: {combo.verified} verified, {combo.rejected} failed"
    elif combo.rejected:
        result = f"**\u2718 failed** ({combo.rejected})"
    else:
        result = f"\u2714 verified ({combo.verified})"
    slave = (f"{say.quantity(combo.slave_bore, 'length', data.show.primary)} bore"
             if combo.slave_bore is not None
             else f"{say.quantity(combo.slave_area, 'area', data.show.primary)} piston")
    return [result,
            _part_or("masters", combo.master_part,
                     f"{say.quantity(combo.master_bore, 'length', data.show.primary)} bore"),
            _part_or("slaves", combo.slave_part, slave),
            _part_or("pedals", combo.pedal_part, f"{say.ratio(combo.pedal_ratio)} pedal"),
            data.show.q(combo.median_measured_effort, "force"),
            pct(combo.least_margin, signed=True),
            ", ".join(build_link(b.id, "") for b in combo.builds)]


def builds_index(data: SiteData) -> str:
    rows = []
    for b in data.builds:
        rows.append([build_link(b.id, "builds"), md(b.date.isoformat() if b.date else NONE),
                     md(b.status), md(b.gearbox.family), md(b.vehicle),
                     data.show.q(b.master.bore, "length"),
                     data.show.q(b.slave.bore, "length") if b.slave.bore else data.show.q(b.slave.area, "area"),
                     data.show.q(data.sizing(b.id).effort_predicted, "force"),
                     data.show.q(measured_effort(b), "force"), md(b.outcome)])
    return "\n\n".join([
        heading("Builds"),
        f"All {len(data.builds)} build records, newest id last. Click a column heading to sort; "
        "use the search box to find a build by id, gearbox family, part id, bore or words in "
        "its notes.",
        table(["Build", "Date", "Status", "Family", "Vehicle", "Master bore", "Slave bore",
               "Computed effort", "Measured effort", "Outcome"], rows)]) + "\n"


def parts_index(data: SiteData) -> str:
    out = [heading("Parts"), "The shop's catalogue. Each part's page lists the builds that used it and "
           "how they came out."]
    for kind, parts in sorted(data.analysis.shop.parts.items()):
        out.append(f"## {md(PART_KINDS.get(kind, (kind, kind))[1])}s")
        rows = []
        for part_id, part in sorted(parts.items()):
            users = data.used_by.get((kind, part_id), [])
            rows.append([part_link(kind, part_id, "parts"), md(part.label),
                         "; ".join(" ".join(r) for r in section_rows(part.section, data.show,
                                                                     fields.PART_KINDS[kind])[:3]),
                         str(len(users)), str(sum(u.status == "verified" for u in users)),
                         str(sum(u.status == "rejected" for u in users))])
        out.append(table(["Part", "Label", "Key values", "Builds", "Verified", "Rejected"], rows))
    return "\n\n".join(out) + "\n"


def part_page(data: SiteData, part: Part) -> str:
    title = PART_KINDS.get(part.kind, (part.kind, part.kind))[1]
    users = data.used_by.get((part.kind, part.id), [])
    rows = []
    for b in users:
        rows.append([build_link(b.id, "part"), md(b.status), md(b.gearbox.family),
                     data.show.q(measured_effort(b), "force"),
                     pct(data.deltas(b.id).effort, signed=True),
                     pct(data.sizing(b.id).margin, signed=True), md(b.outcome)])
    out = [heading(f"{title} {part.id}")]
    if part.label:
        out.append(md(part.label))
    out.append(table(["Field", "Value"], section_rows(part.section, data.show,
                                                      fields.PART_KINDS[part.kind])))
    out.append("## Where used")
    if rows:
        out.append(table(["Build", "Status", "Family", "Measured effort", "Effort delta",
                          "Travel margin", "Outcome"], rows))
    else:
        out.append("No build uses this part yet.")
    return "\n\n".join(out) + "\n"


def calibration_page(data: SiteData) -> str:
    cal = data.analysis.calibration
    groups = [cal.shop] + [cal.families[name] for name in sorted(cal.families)]
    effort_rows = [[md(g.name), str(g.n), pct(g.efficiency),
                    _spread(g.efficiency_median, g.efficiency_mad), md(say.factor(g.weight)),
                    pct(g.loo_median_abs_err), pct(g.loo_p90_abs_err),
                    f"{g.loo_covered} of {g.loo_intervals}"] for g in groups]
    travel_rows = [[md(g.name), str(g.n_travel),
                    md(say.factor(g.travel_factor)),
                    _spread(g.travel_factor_median, g.travel_factor_mad, percent=False)]
                   for g in groups]
    return "\n\n".join([
        heading("Calibration"),
        "What the shop's own measurements say about its losses. A family with few builds leans "
        "on the shop-wide value; its weight shows how much it stands on its own (1 = entirely).",
        "## Pedal effort",
        "Apparent efficiency is the ideal pedal effort (release load over overall ratio) "
        "divided by the measured effort. The errors show how far a calibrated prediction has "
        "been off, each build predicted from all the others (leave-one-out).",
        table(["Group", "Builds", "Efficiency used", "Own median \u00b1 MAD", "Weight",
               "Typical error", "90 % of errors below", "Interval held"], effort_rows),
        md(say.coverage_sentence(cal.shop)),
        "![Apparent efficiency by gearbox family](charts/calibration-efficiency.svg)",
        "## Slave travel",
        "The travel factor is the measured slave travel over the computed slave travel; below 1 "
        "the line and fluid take up more than the calculation allows.",
        table(["Group", "Builds with travel", "Travel factor used", "Own median \u00b1 MAD"],
              travel_rows),
        "![Travel factor by gearbox family](charts/calibration-travel.svg)",
        "How these numbers are worked out is on the [method](method.md) page.",
    ]) + "\n"


def _spread(median: float | None, mad: float | None, percent: bool = True) -> str:
    if median is None:
        return NONE
    if percent:
        return f"{pct(median)} \u00b1 {pct(mad or 0.0)}"
    return f"{md(say.factor(median))} \u00b1 {md(say.factor(mad or 0.0))}"


def calibration_charts(data: SiteData) -> Iterator[tuple[str, str]]:
    cal = data.analysis.calibration
    families = [cal.families[name] for name in sorted(cal.families)]
    for name, value, count_of, words, scale in (
            ("efficiency", "efficiency", "n", "apparent efficiency (%)", 100.0),
            ("travel", "travel_factor", "n_travel", "travel factor (measured / computed)", 1.0)):
        rows = []
        for g in families:
            own = getattr(g, f"{value}_median")
            v = own if own is not None else getattr(g, value)
            if v is None:
                continue
            spread = getattr(g, f"{value}_mad") or 0.0
            count = getattr(g, count_of)
            rows.append(svg.DotRow(g.name, v * scale, (v - spread) * scale, (v + spread) * scale,
                                   f"{count} build{'s' if count != 1 else ''}"))
        shop = getattr(cal.shop, value)
        reference = (shop * scale, "shop-wide") if shop is not None else None
        yield f"charts/calibration-{name}.svg", svg.dot_rows_chart(rows, words, reference)


# --- one build ----------------------------------------------------------------------------

def build_files(data: SiteData, build: Build) -> Iterator[tuple[str, str]]:
    sizing = data.sizing(build.id)
    name = slug(build.id)
    yield f"builds/{name}-linkage.svg", linkage_svg(data, build, sizing)
    curve = data.analysis.effort_curve(build.id)
    if curve:
        yield f"builds/{name}-effort.svg", effort_curve_svg(data, build, sizing, curve)
    yield f"builds/{name}.md", build_page(data, build, sizing, with_curve=bool(curve))


def build_page(data: SiteData, build: Build, sizing: Sizing, with_curve: bool) -> str:
    show = data.show
    name = slug(build.id)
    out = [heading(build.id),
           table(["Status", "Date", "Gearbox family", "Technician", "Vehicle"],
                 [[md(STATUS_WORDS.get(build.status, build.status)),
                   md(build.date.isoformat() if build.date else NONE), md(build.gearbox.family),
                   md(build.technician), md(build.vehicle)]])]
    if build.outcome:
        out.append(f"**Outcome:** {md(build.outcome)}")
    out += flag_blocks(sizing, show.primary)
    out.append("## Computed against measured")
    out.append(result_table(data, build, sizing))
    out.append(prediction_text(data, build))
    out.append("## Pedal linkage")
    out.append(f"![Pedal linkage of {md(build.id)}, to scale]({name}-linkage.svg)")
    if with_curve:
        out.append("## Pedal effort through the stroke")
        out.append(f"![Pedal effort against pad travel for {md(build.id)}]({name}-effort.svg)")
    out.append("## Ratios, travel, pressure and volume")
    out.append(engineering_table(data, build, sizing))
    out.append("## Inputs")
    for declared in fields.SECTIONS:
        section = getattr(build, declared.name)
        if section is not None:
            out.append(f"### {declared.title}")
            out.append(table(["Field", "Value"], section_rows(section, show, declared.name)))
    used = parts_of(build)
    if used:
        out.append("## Catalogue parts used")
        out.append("\n".join(f"- {PART_KINDS[kind][1]}: {part_link(kind, pid, 'builds')}"
                             for kind, pid in used))
    out.append("## Similar builds")
    out.append(similar_table(data, build))
    if build.notes:
        out.append("## Notes")
        out.append(md_paragraphs(build.notes))
    return "\n\n".join(out) + "\n"


def flag_blocks(sizing: Sizing, primary: str) -> list[str]:
    blocks = []
    for flag in sizing.flags:
        kind, title = ("failure", "Fails a check") if flag.severity == "fail" else ("warning", "Warning")
        blocks.append(f'!!! {kind} "{title}"\n    {md(say.flag_sentence(flag, primary))} '
                      f'({md(flag.code)})')
    if not sizing.flags:
        blocks.append("No check flagged this build.")
    return blocks


def result_table(data: SiteData, build: Build, sizing: Sizing) -> str:
    show, deltas = data.show, data.deltas(build.id)
    measured = build.measured
    effort_row = [f"Pedal effort at {pct(sizing.efficiency)} efficiency",
                  show.q(sizing.effort_predicted, "force"),
                  show.q(measured.pedal_effort if measured else None, "force"),
                  pct(deltas.effort, signed=True)]
    return table(["", "Computed", "Measured", "Difference"], [
        ["Pedal effort, no losses", show.q(sizing.effort_ideal, "force"), "", ""],
        effort_row,
        ["Slave travel", show.q(sizing.slave_travel, "length"),
         show.q(measured.slave_travel if measured else None, "length"),
         pct(deltas.slave_travel, signed=True)],
        ["Pad travel to release", show.q(sizing.pad_travel_to_release, "length"),
         show.q(measured.pad_travel_to_release if measured else None, "length"), ""],
        ["Floor gap (master bottoms early)", show.q(sizing.floor_gap, "length"),
         show.q(measured.floor_gap if measured else None, "length"),
         pct(deltas.floor_gap, signed=True)],
    ]) + (f"\n\nMeasured with: {md(measured.method)}" if measured and measured.method else "")


def prediction_text(data: SiteData, build: Build) -> str:
    prediction = data.prediction(build.id)
    note = say.prediction_note(prediction)
    if prediction.effort is None:
        return f"**Calibrated prediction:** {md(note)}"
    text = f"**Calibrated prediction:** {data.show.q(prediction.effort, 'force')}"
    if prediction.interval is not None:
        lo, hi = prediction.interval
        text += f", likely between {data.show.q(lo, 'force')} and {data.show.q(hi, 'force')}"
    text += f" \u2014 from {md(say.basis_sentence(prediction.basis))}"
    if note:
        text += f"; {md(note)}"
    text += "."
    if prediction.slave_travel is not None:
        text += (f" After the shop's measured travel losses the slave moves "
                 f"{data.show.q(prediction.slave_travel, 'length')}, a bearing travel margin of "
                 f"{pct(prediction.travel_margin, signed=True)}.")
    return text


def engineering_table(data: SiteData, build: Build, sizing: Sizing) -> str:
    show, link, rules = data.show, sizing.linkage, data.rules
    ratings = [r for r in (build.master.rated_pressure, build.slave.rated_pressure) if r]
    rows = [
        ["Pedal ratio (at rest / at release / at stop / average)",
         " / ".join(ratio(v) for v in (link.ratio_at_rest, link.ratio_at_release,
                                        link.ratio_at_stop, link.ratio_average))],
        ["Hydraulic ratio (slave area / master area)", ratio(sizing.ratio_hydraulic)],
        ["Fork ratio", ratio(sizing.ratio_fork)],
        ["Overall ratio", ratio(sizing.ratio_overall)],
        ["Master stroke used", show.q(sizing.master_stroke_used, "length")],
        ["Release bearing travel (available / needed)",
         f"{show.q(sizing.bearing_travel, 'length')} / {show.q(sizing.needed_bearing_travel, 'length')}"],
        [f"Travel margin (shop minimum {pct(rules.min_travel_margin)})", pct(sizing.margin, signed=True)],
        [f"Release point (shop latest {pct(rules.latest_release_point)} of pad travel)",
         pct(sizing.release_point)],
        ["Pad travel before the master pushes fluid (free play and dead stroke)",
         show.q(sizing.lost_pad_travel, "length")],
        ["Line pressure at full release (static / worst case)",
         f"{show.q(sizing.pressure, 'pressure')} / {show.q(sizing.pressure_worst, 'pressure')}"
         + (f" (lowest rating {show.q(min(ratings), 'pressure')})" if ratings else "")],
        ["Master swept volume", show.q(sizing.master_swept_volume, "volume")],
        ["Volume needed for full release (losses included)", show.q(sizing.needed_volume, "volume")],
        ["Losses (hose expansion and fluid compression)", show.q(sizing.losses_volume, "volume")],
    ]
    if link.pushrod_angle_max is not None:
        rows.append(["Largest pushrod angle to the bore axis", show.q(link.pushrod_angle_max, "angle")])
    return table(["Quantity", "Value"], rows)


def similar_table(data: SiteData, build: Build) -> str:
    similar = data.analysis.similar[build.id]
    if not similar:
        return "No similar measured builds yet."
    rows = [[build_link(s.id, "builds"), md(say.factor(s.distance)),
             md(say.differences_text(s.differs, data.show.primary)) or "nothing notable",
             md(s.status),
             data.show.q(s.measured_effort, "force"), md(s.outcome)] for s in similar]
    return ("Distance 0 is an identical build; each 1.0 is about one different category or a "
            "10 % difference in one size ([method](../method.md)).\n\n"
            + table(["Build", "Distance", "What differs", "Status", "Measured effort", "Outcome"], rows))


# --- per-build pictures -------------------------------------------------------------------

def linkage_svg(data: SiteData, build: Build, sizing: Sizing) -> str:
    link = sizing.linkage
    rest = (link.rest.pivot, link.rest.pad, link.rest.clevis, link.rest.pushrod_seat)
    stop = (link.stop.pivot, link.stop.pad, link.stop.clevis, link.stop.pushrod_seat)
    source = ("pedal linkage from the recorded layout" if link.mode == "layout"
              else "schematic from the two pedal lengths")
    return svg.linkage_drawing(rest, stop, build.master.bore, build.master.stroke,
                               data.show.length_unit(), f"{build.id}: {source}, to scale")


def effort_curve_svg(data: SiteData, build: Build, sizing: Sizing,
                     curve: tuple[tuple[float, float], ...]) -> str:
    show = data.show
    points = [(show.chart_value(t, "length"), show.chart_value(f, "force"))
              for t, f in curve]
    low, high = data.rules.effort_band
    markers = []
    if sizing.pad_travel_to_release is not None:
        markers.append(svg.Marker("x", show.chart_value(sizing.pad_travel_to_release, "length"),
                                  "computed release point", "#6a1b9a"))
    effort = measured_effort(build)
    if effort is not None:
        markers.append(svg.Marker("y", show.chart_value(effort, "force"),
                                  "measured peak effort", STATUS_COLORS["rejected"]))
    chart = svg.XYChart(show.chart_label("pad travel from rest", "length"),
                        show.chart_label("pedal effort at the pad", "force"),
                        series=[svg.Series("computed effort", points, "#1565c0", kind="line")],
                        bands=[svg.Band(show.chart_value(low, "force"), show.chart_value(high, "force"),
                                        "shop effort band")],
                        markers=markers)
    return chart.render()


def method_appendix() -> str:
    """The calibration, similarity and reference sections appended to the hand-written method
    page: the history modules' own docstrings (project text), so page and code cannot drift."""
    import inspect

    from builder.history import calibration, reference, similar

    return "".join(f"\n\n## {title}\n\n{inspect.getdoc(module).strip()}\n" for title, module in (
        ("Calibration", calibration), ("How similar builds are found", similar),
        ("How the fitment reference groups builds", reference)))
