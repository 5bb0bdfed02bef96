"""Markdown and SVG for every generated page, from an Analysis. No mkdocs here.

`generated_pages(analysis)` yields (relative path, text) pairs for the docs dir. Record text
goes through `escape.md` (Markdown) or `escape.xml` (SVG) and nowhere else; links are built
only from `slug()` of ids, never from record text. Physics is read from the Analysis,
never recomputed.
"""
from __future__ import annotations

import dataclasses
import datetime as _dt
import functools
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
# part kind -> (Build attribute, singular title)
PART_KINDS = {kind: (fields.PART_KINDS[kind], say.part_kind(kind))
              for kind in ("gearboxes", "clutches", "masters", "slaves", "pedals")}
LATEST = 10
# Search: how much more a page weighs than an ordinary one (mkdocs-material's per-page
# `search: boost:`). The reference's family sections first, then build pages (a build id or
# a family code finds them before part pages, whose where-used tables are not indexed).
REFERENCE_BOOST = 8
BUILD_BOOST = 2
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

NO_BREAK_SPACE = "\u00a0"
_AFTER_NUMBER = re.compile(r"(?<=\d) ")

class Display:
    """Quantities in both unit systems, the shop's primary first; Markdown-escaped."""

    def __init__(self, rules: ShopRules):
        self.primary = rules.display_units  # "imperial" | "metric" (the shop schema's enum)

    def q(self, value: float | None, dimension: str) -> str:
        return kept_together(md(say.quantity(value, dimension, self.primary)))

    def chart_value(self, value_si: float, dimension: str) -> float:
        return value_si / say.chart_unit(dimension, self.primary)[1]

    def chart_label(self, words: str, dimension: str) -> str:
        return f"{words} ({say.chart_unit(dimension, self.primary)[0]})"

    def length_unit(self) -> tuple[str, float]:
        return say.chart_unit("length", self.primary)


def free(value: object) -> str:
    """Record text for a table cell (escaped), allowed to break inside a long word so a
    narrow column never pushes the table past the window's edge."""
    text = md(value)
    return f'<span class="fitment-free">{text}</span>' if text else ""


def kept_together(figure: str) -> str:
    """An escaped figure whose number and unit cannot be split over two lines in a narrow
    table cell (a no-break space after each number): `0.75 in (19.1 mm)` may break before
    the bracket, never between 19.1 and mm. After md(), which folds every space."""
    return _AFTER_NUMBER.sub(NO_BREAK_SPACE, figure)


def pct(fraction: float | None, signed: bool = False) -> str:
    return kept_together(md(say.percent(fraction, signed)))


def ratio(value: float | None) -> str:
    return md(say.ratio(value)).replace(" ", NO_BREAK_SPACE)  # `5.60 : 1` is one figure


def heading(title: str, boost: float | None = None, hide: Sequence[str] = ()) -> str:
    """Front matter and H1 of a generated page; title is record text. `boost` weighs the
    page in the site search; `hide` lists theme parts left off the page ("toc")."""
    meta: dict = {}
    if boost is not None:
        meta["search"] = {"boost": boost}
    if hide:
        meta["hide"] = list(hide)
    return f"{front_matter_title(title, meta)}# {md(title)}"


def unindexed(block: str, css_class: str | None = None, indexed: bool = False) -> str:
    """Markdown kept out of the site's search index (mkdocs-material's data-search-exclude),
    unless `indexed`; `css_class` marks it for the stylesheet (e.g. fitment-no-print). A
    heading inside an unindexed block needs unindexed_heading too, or search lists it
    under the page's title with no text."""
    attributes = ("" if indexed else " data-search-exclude") + (f' class="{css_class}"' if css_class else "")
    return f"<div{attributes} markdown>\n\n{block}\n\n</div>"


def unindexed_heading(level: int, words: str) -> str:
    """A heading whose whole section stays out of the search index."""
    return f"{'#' * level} {words} {{ data-search-exclude }}"


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
        elif field.kind == fields.QUANTITIES:
            rows.append([label, ", ".join(show.q(v, field.dimension) for v in value)])
        elif field.kind == fields.CURVE:
            travel, load = field.children
            pairs = "; ".join(f"{show.q(t, travel.dimension)} at {show.q(f_, load.dimension)}"
                              for t, f_ in value)
            rows.append([label, pairs])
        elif field.kind == fields.CHOICE:
            rows.append([label, md(say.choice(key, value))])
        else:
            rows.append([label, md(value)])
    layout = getattr(section, "layout", None)
    if layout is not None:
        for point in fields.FIELDS["pedal.layout"].children:
            value = getattr(layout, point.name)
            if value is None:
                continue
            if point.kind == fields.POINTS:
                rows.append([md(f"layout {point.label} (x, y)"), "; ".join(
                    f"{show.q(x, point.dimension)}, {show.q(y, point.dimension)}" for x, y in value)])
            elif point.kind == fields.POINT:
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
    builds: list[Build]  # the published builds, by id
    used_by: dict[tuple[str, str], list[Build]]
    drafts: bool = False  # an internal copy that shows drafts

    @classmethod
    def of(cls, analysis: Analysis, include_drafts: bool = False) -> SiteData:
        shown = published_statuses(analysis.shop.rules, include_drafts)
        builds = sorted((b for b in analysis.shop.builds if b.status in shown), key=lambda b: b.id)
        used_by: dict[tuple[str, str], list[Build]] = defaultdict(list)
        for build in builds:
            for key in parts_of(build):
                used_by[key].append(build)
        return cls(analysis, Display(analysis.shop.rules), builds, used_by,
                   include_drafts and any(b.status == "draft" for b in builds))

    @functools.cached_property
    def published(self) -> frozenset[str]:
        return frozenset(b.id for b in self.builds)

    def similar(self, build_id: str) -> list:
        """The build's similar builds that are published (a page links only to pages)."""
        return [s for s in self.analysis.similar[build_id] if s.id in self.published]

    @functools.cached_property
    def reference(self) -> dict[tuple[str, str], list[Combination]]:
        """The fitment reference of the published builds."""
        from builder.history.reference import combinations

        sizings = self.analysis.sizings
        return combinations([(b, sizings[b.id]) for b in self.builds])

    @property
    def rules(self) -> ShopRules:
        return self.analysis.shop.rules

    def sizing(self, build_id: str) -> Sizing:
        return self.analysis.sizings[build_id]

    def deltas(self, build_id: str) -> Deltas:
        return self.analysis.deltas[build_id]

    def prediction(self, build_id: str) -> Prediction:
        return self.analysis.predictions[build_id]


def published_statuses(rules: ShopRules, include_drafts: bool = False) -> frozenset[str]:
    """Statuses the site shows: the shop's `publish` rule, drafts only on request."""
    return frozenset(rules.publish) | ({"draft"} if include_drafts else set())


def generated_pages(analysis: Analysis, progress: Callable[[int, int], None] | None = None,
                    include_drafts: bool = False) -> Iterator[tuple[str, str]]:
    """Every generated file for the docs dir as (relative posix path, text): the builds
    whose status the shop publishes; drafts too with `include_drafts` (an internal copy)."""
    data = SiteData.of(analysis, include_drafts)
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
             free(b.gearbox.family), data.show.q(measured_effort(b), "force"), free(b.outcome)]
            for b in latest]
    out = [heading(data.rules.site_title)]
    if data.drafts:
        drafts = sum(b.status == "draft" for b in builds)
        out.append(f'!!! danger "Internal copy: includes {drafts} draft build'
                   f'{"s" if drafts != 1 else ""}"\n    Drafts are proposals with customers\' cars in '
                   "them. Do not publish this copy; build the public site without "
                   "`--include-drafts`.")
    out += [
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
        unindexed_heading(2, "Latest builds"),
        unindexed(table(["Build", "Date", "Status", "Family", "Measured effort", "Outcome"], rows)),
        "All builds are listed on the [builds](builds/index.md) page; verified combinations by "
        "gearbox family are in the [fitment reference](reference.md).",
    ]
    return "\n\n".join(out) + "\n"


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


def family_anchor(family: str, direction: str) -> str:
    """The id of a family section on the reference page: from slug() (letters, digits, dot,
    hyphen, underscore), never raw record text."""
    return f"family-{slug(family)}-{direction}".lower().replace(".", "-")


def reference_page(data: SiteData) -> str:
    groups = data.reference
    out = [heading("Fitment reference", boost=REFERENCE_BOOST, hide=["toc"]),
           "Master, slave and pedal combinations this shop has finished, by gearbox family and "
           "the way the fork tip moves. Only verified builds (checked on the car) and rejected "
           "builds (tried and failed) are listed; a combination that failed is marked "
           "**\u2718 failed** with what went wrong, and should not be repeated without finding "
           "out why. Click a column heading to sort.",
           "Each row gives the master and slave bores and the pedal ratio (pad arm over clevis "
           "arm), with the catalogue part when one was used; pedal effort is the median measured "
           "at the pad by the builds behind the row; travel margin is the smallest computed "
           "margin among them (release bearing travel over what the clutch needs). "
           "**\u26a0** marks a verified build that a check of this tool flags.",
           '!!! note "A record is not a guarantee"\n    Each row describes what fitted one '
           "shop's cars. Check every part against its maker's specification before ordering."]
    if not groups:
        out.append("No verified or rejected builds yet.")
    else:
        out.append("Gearbox families: " + " \u00b7 ".join(
            f"[{md(family)}, {md(say.fork_words(direction))}](#{family_anchor(family, direction)})"
            for family, direction in groups))
    for (family, direction), combos in groups.items():
        # the section's id sits on a wrapper, never in the heading beside record text
        out.append(f'<div id="{family_anchor(family, direction)}" markdown>\n\n'
                   f"## {md(family)} \u2014 {md(say.fork_words(direction))}\n\n"
                   + table(["Result", "Master", "Slave", "Pedal ratio", "Pedal effort",
                            "Margin", "Builds"], [_reference_row(data, combo) for combo in combos])
                   + "\n\n</div>")
    return "\n\n".join(out) + "\n"


def _flagged(data: SiteData, build: Build) -> tuple:
    return data.sizing(build.id).flags


def _reference_row(data: SiteData, combo: Combination) -> list[str]:
    show = data.show
    rejected = [b for b in combo.builds if b.status == "rejected"]
    flagged = [b for b in combo.builds if b.status == "verified" and _flagged(data, b)]
    if combo.rejected and combo.verified:
        result = f"**\u2718 mixed**: {combo.verified} verified, {combo.rejected} failed"
    elif combo.rejected:
        result = f"**\u2718 failed** ({combo.rejected})"
    else:
        result = f"\u2714 verified ({combo.verified})"
    if flagged:
        result += f", {len(flagged)} flagged \u26a0"
    for build in rejected:  # why it failed: the tool's flags, then what the car did
        why = [say.flag_words(f.code) for f in _flagged(data, build)]
        said = "; ".join(why + ([build.outcome] if build.outcome else [])) or "no reason recorded"
        result += "<br>" + free(f"{build.id}: {said}")
    if combo.slave_bore is not None:
        slave = show.q(combo.slave_bore, "length")
    else:
        slave = f"{show.q(combo.slave_area, 'area')} piston"
    return [result,
            _with_part("masters", combo.master_part, show.q(combo.master_bore, "length")),
            _with_part("slaves", combo.slave_part, slave),
            _with_part("pedals", combo.pedal_part, ratio(combo.pedal_ratio)),
            show.q(combo.median_measured_effort, "force"),
            pct(combo.least_margin, signed=True),
            "<br>".join(_build_mark(data, b) for b in combo.builds)]


def _with_part(kind: str, part_id: str | None, figure: str) -> str:
    """A figure, with the catalogue part it came from (a link) on a line of its own."""
    return f"{figure} <br>{part_link(kind, part_id, '')}" if part_id else figure


def _build_mark(data: SiteData, build: Build) -> str:
    """A build's link, marked when it is verified yet the tool flags it (with the flags)."""
    link = build_link(build.id, "")
    flags = _flagged(data, build)
    if build.status == "verified" and flags:
        return f"{link} \u26a0 {md(', '.join(say.flag_words(f.code) for f in flags))}"
    return link


def builds_index(data: SiteData) -> str:
    rows = []
    for b in by_date(data.builds):
        slave = (data.show.q(b.slave.bore, "length") if b.slave.bore is not None
                 else f"{data.show.q(b.slave.area, 'area')} piston")
        rows.append([build_link(b.id, "builds"), md(b.date.isoformat() if b.date else NONE),
                     md(b.status), free(b.gearbox.family),
                     md(say.choice("gearbox.fork_tip_moves", b.gearbox.fork_tip_moves)),
                     f"{data.show.q(b.master.bore, 'length')}<br>{slave}",
                     ratio(data.sizing(b.id).ratio_pedal),
                     data.show.q(measured_effort(b), "force"), free(b.outcome)])
    return "\n\n".join([
        heading("Builds", hide=["toc"]),
        f"All {len(data.builds)} published build records, newest first. Click a column heading "
        "to sort; use the search box to find a build by id, gearbox family, part id, bore or "
        "words in its notes.",
        unindexed(table(["Build", "Date", "Status", "Family", "Fork tip", "Master / slave bore",
                         "Pedal ratio", "Measured effort", "Outcome"], rows))]) + "\n"


def parts_index(data: SiteData) -> str:
    out = [heading("Parts"), "The shop's catalogue. Each part's page lists the builds that used it and "
           "how they came out."]
    for kind, parts in sorted(data.analysis.shop.parts.items()):
        out.append(f"## {md(say.part_kind(kind, several=True))}")
        rows = []
        for part_id, part in sorted(parts.items()):
            users = data.used_by.get((kind, part_id), [])
            rows.append([part_link(kind, part_id, "parts"), md(part.label),
                         "; ".join(" ".join(r) for r in section_rows(part.section, data.show,
                                                                     fields.PART_KINDS[kind])[:3]),
                         str(len(users)), str(sum(u.status == "verified" for u in users)),
                         str(sum(u.status == "rejected" for u in users))])
        out.append(unindexed(table(["Part", "Label", "Key values", "Builds", "Verified",
                                    "Rejected"], rows)))
    return "\n\n".join(out) + "\n"


def part_page(data: SiteData, part: Part) -> str:
    title = say.part_kind(part.kind)
    users = data.used_by.get((part.kind, part.id), [])
    rows = []
    for b in by_date(users):
        rows.append([build_link(b.id, "part"), md(b.status), free(b.gearbox.family),
                     other_parts(data, b, part.kind),
                     data.show.q(measured_effort(b), "force"),
                     pct(data.sizing(b.id).margin, signed=True), free(b.outcome)])
    out = [heading(f"{title} {part.id}", hide=["toc"])]
    if part.label:
        out.append(md(part.label))
    out.append(table(["Field", "Value"], section_rows(part.section, data.show,
                                                      fields.PART_KINDS[part.kind])))
    out.append(unindexed_heading(2, "Where used"))
    if rows:
        out.append(unindexed(table(["Build", "Status", "Family", "With", "Measured effort",
                                    "Travel margin", "Outcome"], rows)))
    else:
        out.append("No published build uses this part yet.")
    return "\n\n".join(out) + "\n"


def other_parts(data: SiteData, build: Build, kind: str) -> str:
    """What a build fitted besides the part of `kind`: each catalogue part as a link, each
    part written out in the record by its defining figure (bore, ratio, release load)."""
    show, sizing = data.show, data.sizing(build.id)
    figures = {
        "gearboxes": md(build.gearbox.family),
        "clutches": f"{show.q(build.clutch.release_load, 'force')} release load",
        "masters": f"{show.q(build.master.bore, 'length')} bore",
        "slaves": (f"{show.q(build.slave.bore, 'length')} bore" if build.slave.bore is not None
                   else f"{show.q(build.slave.area, 'area')} piston"),
        "pedals": f"{ratio(sizing.ratio_pedal)} ratio",
    }
    cells = []
    for other, (attr, _title) in PART_KINDS.items():
        if other == kind:
            continue
        part_id = getattr(getattr(build, attr), "part", None)
        shown = part_link(other, part_id, "part") if part_id else figures[other]
        cells.append(f"{attr.capitalize()}: {shown}")
    return "<br>".join(cells)


def calibration_page(data: SiteData) -> str:
    cal = data.analysis.calibration
    groups = [cal.shop] + [cal.families[name] for name in sorted(cal.families)]
    cells = [[md(cell) for cell in say.calibration_cells(g)] for g in groups]
    effort_rows = [row[:say.EFFORT_COLUMNS] for row in cells]
    travel_rows = [row[:1] + row[say.EFFORT_COLUMNS:] for row in cells]
    return "\n\n".join([
        heading("Calibration"),
        "What the shop's own measurements say about its losses. A family with few builds leans "
        "on the shop-wide value; its weight shows how much it stands on its own (1 = entirely).",
        "## Pedal effort",
        "Apparent efficiency is the ideal pedal effort (release load over overall ratio) "
        "divided by the measured effort. The errors show how far a calibrated prediction has "
        "been off, each build predicted from all the others (leave-one-out).",
        table(list(say.CALIBRATION_HEADINGS[:say.EFFORT_COLUMNS]), effort_rows),
        md(say.coverage_sentence(cal.shop)),
        "![Apparent efficiency by gearbox family](charts/calibration-efficiency.svg)",
        "## Slave travel",
        "The travel factor is the measured slave travel over the computed slave travel; below 1 "
        "the line and fluid take up more than the calculation allows.",
        table(list(say.CALIBRATION_HEADINGS[:1] + say.CALIBRATION_HEADINGS[say.EFFORT_COLUMNS:]), travel_rows),
        "![Travel factor by gearbox family](charts/calibration-travel.svg)",
        "How these numbers are worked out is on the [method](method.md) page.",
    ]) + "\n"


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
    """One build. Printed (site_src/css/fitment.css, @media print) it is a bench sheet: the
    build, its flags, computed against measured, the inputs and the cautions; pictures of
    the effort curve and the similar builds are left off paper."""
    show = data.show
    name = slug(build.id)
    out = [heading(f"{build.id} \u2014 {build.gearbox.family}", boost=BUILD_BOOST),
           table(["Status", "Date", "Gearbox family", "Fork tip", "Technician", "Vehicle"],
                 [[md(STATUS_WORDS.get(build.status, build.status)),
                   md(build.date.isoformat() if build.date else NONE), md(build.gearbox.family),
                   md(say.choice("gearbox.fork_tip_moves", build.gearbox.fork_tip_moves)),
                   md(build.technician), md(build.vehicle)]])]
    if build.status == "draft":
        out.append('!!! note "Draft"\n    A proposal, not a finished build: nothing here was '
                   "measured on a car.")
        out += order_blocks(data, build)
    if build.outcome:
        out.append(f"**Outcome:** {md(build.outcome)}")
    out += flag_blocks(sizing, show.primary)
    out.append("## Computed against measured")
    out.append(result_table(data, build, sizing))
    out.append(prediction_text(data, build))
    out.append("## Pedal linkage")
    out.append(f"![Pedal linkage of {md(build.id)}, to scale]({name}-linkage.svg)"
               "{ .fitment-linkage }")
    if with_curve:
        out.append(unindexed("## Pedal effort through the stroke\n\n"
                             f"![Pedal effort against pad travel for {md(build.id)}]"
                             f"({name}-effort.svg)", "fitment-no-print", indexed=True))
    out.append("## Ratios, travel, pressure and volume")
    out.append(engineering_table(data, build, sizing))
    out.append("## Inputs")
    inputs = []
    for declared in fields.SECTIONS:
        section = getattr(build, declared.name)
        if section is not None:
            inputs.append(unindexed(f"### {declared.title}\n\n" + table(
                ["Field", "Value"], section_rows(section, show, declared.name)),
                "fitment-input", indexed=True))
    out.append(unindexed("\n\n".join(inputs), "fitment-inputs", indexed=True))
    used = parts_of(build)
    if used:
        out.append("## Catalogue parts used")
        out.append("\n".join(f"- {PART_KINDS[kind][1]}: {part_link(kind, pid, 'builds')}"
                             for kind, pid in used))
    if build.notes:
        out.append("## Notes")
        out.append(md_paragraphs(build.notes))
    out.append(unindexed(f"{unindexed_heading(2, 'Similar builds')}\n\n{similar_table(data, build)}",
                         "fitment-no-print"))
    out.append(unindexed(BENCH_CAUTION, "fitment-print-only"))
    return "\n\n".join(out) + "\n"


BENCH_CAUTION = (
    "**Cautions.** Clutch hydraulics run at several hundred psi: use hoses, fittings and "
    "cylinders rated for the pressure above. Brake fluid is toxic, strips paint and takes up "
    "water; wear gloves and eye protection and never mix silicone (DOT 5) with glycol fluids. "
    "Confirm full release on the car before it is driven: a clutch that does not release can "
    "let a car creep. The component makers' specifications, local vehicle codes and licensed "
    "practice come first.")


def order_blocks(data: SiteData, build: Build) -> list[str]:
    """A proposal's verdict and, when it is not ready, what to order instead: the same
    rows `fitment check` and `fitment suggest` give (catalogue parts)."""
    from builder.check import CHECK_SUGGESTIONS, check_build, verdict

    result = check_build(data.analysis, build, k=0)
    out = ["## Verdict and what to order",
           f"**{md(say.verdict_line(*verdict(result.sizing, result.rejected)))}**"]
    suggestions = result.suggestions
    if suggestions is None:
        return out
    shown = suggestions.shown(CHECK_SUGGESTIONS)
    if suggestions.recommendation is None:
        out.append(md(say.no_recommendation_line(suggestions, len(shown))))
    else:
        out.append(f"The best {len(shown)} of {suggestions.combinations} catalogue combinations, "
                   "as `fitment suggest` ranks them:")
    for rank, row in enumerate(shown, 1):
        lines = say.suggestion_lines(row, rank, data.show.primary,
                                     recommended=row is suggestions.recommendation)
        out.append(md_paragraphs("\n".join(line.strip() for line in lines)))
    return out


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
    similar = data.similar(build.id)
    if not similar:
        return "No similar measured builds yet."
    rows = [[build_link(s.id, "builds"), md(say.factor(s.distance)),
             md(say.differences_text(s.differs, data.show.primary)) or "nothing notable",
             md(s.status),
             data.show.q(s.measured_effort, "force"), free(s.outcome)] for s in similar]
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
