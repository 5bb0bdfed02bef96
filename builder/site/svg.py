"""Small hand-written SVG pictures: x-y charts, dot-row charts and the pedal linkage.

Plain string building, no plotting library: a build page's pictures cost well under a
millisecond each. Every text that may come from a record goes through `escape.xml`.
Values arrive already in display units (charts) or in metres (linkage).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import ClassVar, Sequence

from builder.presentation import percent
from builder.site.escape import xml

Point = tuple[float, float]

FONT = 'font-family="system-ui, -apple-system, Segoe UI, Helvetica, Arial, sans-serif"'
INK = "#263238"
GRID = "#e3e7ea"
MUTED = "#78909c"


@dataclass(frozen=True)
class Series:
    """One legend entry: dots, or a line through the points in order."""

    name: str
    points: Sequence[Point]
    color: str
    kind: str = "dots"  # "dots" | "line"


@dataclass(frozen=True)
class Band:
    """A shaded horizontal band (low..high on the y axis), labelled in the legend."""

    low: float
    high: float
    name: str
    color: str = "#c8e6c9"


@dataclass(frozen=True)
class Marker:
    """A vertical (x) or horizontal (y) reference line with a label at its end."""

    axis: str  # "x" | "y"
    value: float
    name: str
    color: str = MUTED


@dataclass
class XYChart:
    """An x-y chart with axes, ticks, labels, a legend and optional reference marks."""

    x_label: str
    y_label: str
    series: list[Series] = field(default_factory=list)
    bands: list[Band] = field(default_factory=list)
    markers: list[Marker] = field(default_factory=list)
    identity_band: float | None = None  # draw y = x and a +-fraction band around it
    width: ClassVar[int] = 640
    height: ClassVar[int] = 400

    def render(self) -> str:
        xs, ys = self._extent()
        left, right, top = 64, 16, 14
        legend_rows = self._legend_entries()
        legend_lines = math.ceil(len(legend_rows) / 3)
        bottom = 62 + 18 * legend_lines
        plot = _Plot(xs, ys, left, top, self.width - left - right, self.height - top - bottom)
        out = [_open(self.width, self.height, self.y_label),
               plot.grid_and_axes(self.x_label, self.y_label)]
        out.append(f'<g clip-path="url(#{plot.clip_id})">')
        for band in self.bands:
            out.append(plot.hband(band.low, band.high, band.color))
        if self.identity_band is not None:
            out.append(plot.identity(self.identity_band))
        for marker in self.markers:
            out.append(plot.marker(marker))
        for series in self.series:
            out.append(plot.series(series))
        out.append("</g>")
        out.append(_legend(legend_rows, left, self.height - 18 * legend_lines + 8,
                           self.width - left - right))
        out.append("</svg>")
        return "".join(out)

    def _legend_entries(self) -> list[tuple[str, str, str]]:
        rows = [(s.name, s.color, "line" if s.kind == "line" else "dot") for s in self.series]
        rows += [(b.name, b.color, "band") for b in self.bands]
        if self.identity_band is not None:
            rows.append((f"computed = measured (band \u00b1{percent(self.identity_band)})", INK, "line"))
        rows += [(m.name, m.color, "dash") for m in self.markers]
        return rows

    def _extent(self) -> tuple[tuple[float, float], tuple[float, float]]:
        xs = [p[0] for s in self.series for p in s.points]
        ys = [p[1] for s in self.series for p in s.points]
        ys += [v for b in self.bands for v in (b.low, b.high)]
        xs += [m.value for m in self.markers if m.axis == "x"]
        ys += [m.value for m in self.markers if m.axis == "y"]
        if self.identity_band is not None:  # same range on both axes, zoomed to the data
            both = xs + ys
            lo, hi = (min(both), max(both)) if both else (0.0, 1.0)
            lo, hi = max(0.0, lo - 0.15 * (hi - lo) - 0.05 * hi), hi + 0.1 * (hi - lo) + 0.05 * hi
            return (lo, hi), (lo, hi)
        xr = (min(xs), max(xs)) if xs else (0.0, 1.0)
        yr = (min(min(ys), 0.0), max(ys)) if ys else (0.0, 1.0)
        return (min(xr[0], 0.0), xr[1]), yr


@dataclass(frozen=True)
class DotRow:
    """One row of a dot chart: a value with an optional spread, and a note at the right."""

    label: str
    value: float
    low: float | None = None
    high: float | None = None
    note: str = ""


def dot_rows_chart(rows: Sequence[DotRow], x_label: str,
                   reference: tuple[float, str] | None) -> str:
    """Horizontal dot chart: one labelled row per group, whiskers for the spread."""
    row_h, width = 28, 640
    left, right, top = 150, 120, 14
    height = top + row_h * max(len(rows), 1) + 74
    values = [v for r in rows for v in (r.value, r.low, r.high) if v is not None]
    if reference is not None:
        values.append(reference[0])
    lo, hi = (min(values), max(values)) if values else (0.0, 1.0)
    plot = _Plot((lo, hi), (0.0, float(max(len(rows), 1))), left, top, width - left - right,
                 row_h * max(len(rows), 1), y_grid=False)
    out = [_open(width, height, x_label), plot.grid_and_axes(x_label, "", y_ticks=False)]
    if reference is not None:
        out.append(plot.marker(Marker("x", reference[0], reference[1], MUTED)))
    for i, row in enumerate(rows):
        cy = top + row_h * (i + 0.5)
        label = row.label if len(row.label) <= 20 else row.label[:19] + "\u2026"
        out.append(_text(left - 8, cy + 4, label, anchor="end"))
        if row.low is not None and row.high is not None:
            x0, x1 = plot.x(row.low), plot.x(row.high)
            out.append(f'<path d="M{x0:.1f} {cy:.1f}H{x1:.1f}M{x0:.1f} {cy - 5:.1f}v10M{x1:.1f} '
                       f'{cy - 5:.1f}v10" stroke="#1565c0" stroke-width="1.5" fill="none"/>')
        out.append(f'<circle cx="{plot.x(row.value):.1f}" cy="{cy:.1f}" r="5" fill="#1565c0"/>')
        out.append(_text(width - right + 8, cy + 4, row.note, size=12, color=MUTED))
    legend = [("median, with \u00b1 MAD", "#1565c0", "dot")]
    if reference is not None:
        legend.append((reference[1], MUTED, "dash"))
    out.append(_legend(legend, left, height - 22, width - left))
    out.append("</svg>")
    return "".join(out)


def linkage_drawing(rest: Sequence[Point], stop: Sequence[Point], bore: float, stroke: float,
                    scale_unit: tuple[str, float], caption: str) -> str:
    """To-scale pedal linkage at rest (solid) and at the stop (dashed).

    rest and stop: (pivot, pad, clevis, pushrod_seat) in metres, y up. The master body is
    drawn along the bore axis (clevis at rest -> seat at rest) from the seat, one stroke long.
    scale_unit: (name, metres per unit) for the scale bar, e.g. ("in", 0.0254).
    """
    pivot, pad, clevis, seat = rest
    ax, ay = seat[0] - clevis[0], seat[1] - clevis[1]
    norm = math.hypot(ax, ay) or 1.0
    ux, uy = ax / norm, ay / norm
    half = bore * 0.9
    body_len = stroke * 1.25
    nx, ny = -uy, ux
    body = [(seat[0] - ux * stroke * 0.05 + nx * s * half + ux * t * body_len,
             seat[1] - uy * stroke * 0.05 + ny * s * half + uy * t * body_len)
            for s, t in ((1, 0), (1, 1), (-1, 1), (-1, 0))]
    every = list(rest) + list(stop) + body
    x_min, y_max = min(p[0] for p in every), max(p[1] for p in every)
    x_span, y_span = max(p[0] for p in every) - x_min, y_max - min(p[1] for p in every)
    span = max(x_span, y_span, 1e-3)
    width, height, margin = 640, 420, 40
    scale = min((width - 2 * margin - 60) / max(x_span, 1e-3),
                (height - 2 * margin - 40) / max(y_span, 1e-3))
    ox = margin + 30 + ((width - 2 * margin - 60) - x_span * scale) / 2
    oy = margin + ((height - 2 * margin - 40) - y_span * scale) / 2

    def p(pt: Point) -> str:
        return f"{ox + (pt[0] - x_min) * scale:.1f} {oy + (y_max - pt[1]) * scale:.1f}"

    def dot(pt: Point, radius: float, paint: str) -> str:
        x, y = p(pt).split()
        return f'<circle cx="{x}" cy="{y}" r="{radius:g}" {paint}/>'

    def arm(pose: Sequence[Point], color: str, dash: str) -> str:
        pv, pd, cl, st = pose
        return (f'<path d="M{p(pd)}L{p(pv)}L{p(cl)}Z" fill="none" stroke="{color}" stroke-width="5" '
                f'stroke-linejoin="round"{dash}/>'
                f'<path d="M{p(cl)}L{p(st)}" stroke="{color}" stroke-width="3"{dash}/>'
                + dot(pd, 7, f'fill="{color}"') + dot(st, 3.5, f'fill="{color}"'))

    def label(pt: Point, text: str, dx: float = 10, dy: float = -8) -> str:
        x, y = (float(v) for v in p(pt).split())
        return _text(x + dx, y + dy, text, size=12)

    out = [_open(width, height, caption),
           f'<path d="M{p(body[0])}L{p(body[1])}L{p(body[2])}L{p(body[3])}Z" fill="#eceff1" '
           f'stroke="{MUTED}" stroke-width="1.5"/>',
           arm(stop, "#90a4ae", ' stroke-dasharray="6 4"'),
           arm(rest, "#1565c0", ""),
           dot(pivot, 6, f'fill="#fff" stroke="{INK}" stroke-width="2"'),
           label(pivot, "pivot"), label(pad, "pad at rest"), label(stop[1], "pad at the stop"),
           label(clevis, "clevis", -46, -8),
           label(((clevis[0] + seat[0]) / 2, (clevis[1] + seat[1]) / 2), "pushrod", -20, 18),
           label(((body[1][0] + body[2][0]) / 2, (body[1][1] + body[2][1]) / 2), "master",
                 -44 if ux < 0 else 8, 4)]
    out.append(_scale_bar(span, scale, scale_unit, margin, height - 30))
    out.append(_legend([("at rest", "#1565c0", "line"), ("at the floor stop", "#90a4ae", "dash")],
                       width - 300, height - 30, 290))
    out.append(_text(margin, 22, caption, size=13, color=MUTED))
    out.append("</svg>")
    return "".join(out)


# --- internals -------------------------------------------------------------------------

def nice_ticks(lo: float, hi: float, count: int = 5) -> list[float]:
    """Round tick values (1, 2, 2.5 or 5 times a power of ten) covering lo..hi."""
    if hi <= lo:
        hi = lo + (abs(lo) or 1.0)
    raw = (hi - lo) / count
    power = 10 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1, 2, 2.5, 5, 10) if m * power >= raw)
    first = math.floor(lo / step + 1e-9) * step
    ticks = []
    value = first
    while value <= hi + step * 0.999:
        ticks.append(round(value, 12))
        value += step
    return ticks


def _fmt(value: float, step: float) -> str:
    decimals = max(0, -math.floor(math.log10(step) + 1e-9)) if step < 1 else 0
    scaled = step * 10**decimals
    if abs(scaled - round(scaled)) > 1e-9:
        decimals += 1
    return f"{value:.{decimals}f}"


class _Plot:
    def __init__(self, xs: tuple[float, float], ys: tuple[float, float], left: float, top: float,
                 width: float, height: float, y_grid: bool = True):
        self.clip_id = "plot-area"  # each picture is its own file, so one id is enough
        self.xt = nice_ticks(*xs)
        self.yt = nice_ticks(*ys) if y_grid else [ys[0], ys[1]]
        self.x0, self.x1 = self.xt[0], self.xt[-1]
        self.y0, self.y1 = self.yt[0], self.yt[-1]
        self.left, self.top, self.w, self.h = left, top, width, height

    def x(self, v: float) -> float:
        return self.left + (v - self.x0) / ((self.x1 - self.x0) or 1.0) * self.w

    def y(self, v: float) -> float:
        return self.top + self.h - (v - self.y0) / ((self.y1 - self.y0) or 1.0) * self.h

    def grid_and_axes(self, x_label: str, y_label: str, y_ticks: bool = True) -> str:
        out = [f'<defs><clipPath id="{self.clip_id}"><rect x="{self.left}" y="{self.top}" '
               f'width="{self.w}" height="{self.h}"/></clipPath></defs>']
        xstep = self.xt[1] - self.xt[0] if len(self.xt) > 1 else 1.0
        grid = "".join(f"M{self.x(t):.1f} {self.top}v{self.h}" for t in self.xt)
        if y_ticks:
            grid += "".join(f"M{self.left} {self.y(t):.1f}h{self.w}" for t in self.yt)
        out.append(f'<path d="{grid}" stroke="{GRID}" stroke-width="1"/>')
        out.append(f'<path d="M{self.left} {self.top}v{self.h}h{self.w}" stroke="{INK}" '
                   f'stroke-width="1.2" fill="none"/>')
        for t in self.xt:
            out.append(_text(self.x(t), self.top + self.h + 16, _fmt(t, xstep), anchor="middle", size=12))
        if y_ticks:
            ystep = self.yt[1] - self.yt[0] if len(self.yt) > 1 else 1.0
            for t in self.yt:
                out.append(_text(self.left - 6, self.y(t) + 4, _fmt(t, ystep), anchor="end", size=12))
        out.append(_text(self.left + self.w / 2, self.top + self.h + 36, x_label, anchor="middle"))
        if y_label:
            cy = self.top + self.h / 2
            out.append(f'<text x="16" y="{cy:.1f}" transform="rotate(-90 16 {cy:.1f})" '
                       f'text-anchor="middle" font-size="13" fill="{INK}" {FONT}>{xml(y_label)}</text>')
        return "".join(out)

    def hband(self, low: float, high: float, color: str) -> str:
        y_hi, y_lo = self.y(high), self.y(low)
        return (f'<rect x="{self.left}" y="{y_hi:.1f}" width="{self.w}" height="{y_lo - y_hi:.1f}" '
                f'fill="{color}" fill-opacity="0.55"/>')

    def identity(self, band: float) -> str:
        a, b = self.x0, self.x1
        pts = [(a, a * (1 + band)), (b, b * (1 + band)), (b, b * (1 - band)), (a, a * (1 - band))]
        poly = " ".join(f"{self.x(x):.1f},{self.y(y):.1f}" for x, y in pts)
        return (f'<polygon points="{poly}" fill="#cfd8dc" fill-opacity="0.5"/>'
                f'<path d="M{self.x(a):.1f} {self.y(a):.1f}L{self.x(b):.1f} {self.y(b):.1f}" '
                f'stroke="{INK}" stroke-width="1.2"/>')

    def marker(self, m: Marker) -> str:
        if m.axis == "x":
            d = f"M{self.x(m.value):.1f} {self.top}v{self.h}"
        else:
            d = f"M{self.left} {self.y(m.value):.1f}h{self.w}"
        return f'<path d="{d}" stroke="{m.color}" stroke-width="1.5" stroke-dasharray="5 4"/>'

    def series(self, s: Series) -> str:
        if s.kind == "line":
            d = "M" + "L".join(f"{self.x(x):.1f} {self.y(y):.1f}" for x, y in s.points)
            return f'<path d="{d}" fill="none" stroke="{s.color}" stroke-width="2.2"/>'
        dots = "".join(f'<circle cx="{self.x(x):.1f}" cy="{self.y(y):.1f}" r="4"/>' for x, y in s.points)
        return f'<g fill="{s.color}" fill-opacity="0.8">{dots}</g>'


def _open(width: int, height: int, title: str) -> str:
    return (f'<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 {width} {height}" '
            f'width="{width}" height="{height}" role="img"><title>{xml(title)}</title>'
            f'<rect width="{width}" height="{height}" fill="#fff"/>')


def _text(x: float, y: float, text: str, anchor: str = "start", size: int = 13,
          color: str = INK) -> str:
    return (f'<text x="{x:.1f}" y="{y:.1f}" text-anchor="{anchor}" font-size="{size}" '
            f'font-weight="400" fill="{color}" {FONT}>{xml(text)}</text>')


def _legend(rows: Sequence[tuple[str, str, str]], left: float, top: float, width: float) -> str:
    out = []
    col_w = width / 3
    for i, (name, color, kind) in enumerate(rows):
        x, y = left + (i % 3) * col_w, top + (i // 3) * 18
        if kind == "dot":
            out.append(f'<circle cx="{x + 8:.1f}" cy="{y - 4:.1f}" r="4" fill="{color}"/>')
        elif kind == "band":
            out.append(f'<rect x="{x:.1f}" y="{y - 10:.1f}" width="16" height="10" fill="{color}"/>')
        else:
            dash = ' stroke-dasharray="5 3"' if kind == "dash" else ""
            out.append(f'<path d="M{x:.1f} {y - 4:.1f}h16" stroke="{color}" stroke-width="2"{dash}/>')
        out.append(_text(x + 22, y, name, size=12))
    return "".join(out)


def _scale_bar(span: float, scale: float, unit: tuple[str, float], x: float, y: float) -> str:
    name, metres = unit
    units = nice_ticks(0, span / metres / 4, 1)[-1] or 1.0
    length = units * metres * scale
    label = f"{units:g} {name}"
    return (f'<path d="M{x:.1f} {y:.1f}h{length:.1f}M{x:.1f} {y - 5:.1f}v10M{x + length:.1f} '
            f'{y - 5:.1f}v10" stroke="{INK}" stroke-width="2"/>'
            + _text(x + length + 8, y + 4, label, size=12))
