"""Pedal effort: overall ratio, ideal and predicted effort, effort through the stroke.

The headline effort is the peak, over the stroke, of the pad force a work balance gives
at each point (virtual work: F_pad dx_pad = F_h dx_b / (R_h R_f) ... written out in
`pad_force`), with the bare pedal's own force added; the plotted curve is the same
function, so the two agree.
"""
from __future__ import annotations

import bisect
import math
from collections.abc import Callable
from dataclasses import dataclass

from builder.engine.hydraulics import hydraulic_load, hydraulic_ratio, line_pressure
from builder.engine.linkage import LeverPedal, SliderCrankPedal
from builder.engine.travel import pushrod_for_volume, volume_for_release

CURVE_SAMPLES = 48  # extra bearing-travel samples where the pad force is not piecewise linear
PEAK_SAMPLES = 12  # as many when only the peak is wanted (it is refined between samples)
REFINE_STEPS = 12  # golden-section steps: 0.618^12 = 3e-3 of a two-sample bracket; the force
# is flat at its peak, so it is then within about 1e-5 of the true peak
_GOLDEN = (math.sqrt(5.0) - 1.0) / 2.0

Curve = tuple[tuple[float, float], ...]


def overall_ratio(pedal: float, hydraulic: float, fork: float) -> float:
    """Overall force ratio pad to bearing, R = R_p * R_h * R_f (plain ratios, > 0).

    Source: ratios of machines in series multiply (Shigley's Mechanical Engineering
    Design, levers; OpenStax College Physics, "Pascal's Principle" for R_h).

    >>> overall_ratio(5.5, 1.36, 2.0)
    14.96
    """
    return pedal * hydraulic * fork


def ideal_effort(release_load: float, ratio: float) -> float:
    """Pad force with no friction, F_pad = F_bearing / R.

    release_load F_bearing in N, ratio R plain (> 0); returns N. Source: work balance of
    an ideal machine, F_in * d_in = F_out * d_out (OpenStax College Physics, "Simple
    Machines").

    >>> ideal_effort(1800.0, 15.0)
    120.0
    """
    return release_load / ratio


def predicted_effort(ideal: float, efficiency: float) -> float:
    """Pad force with losses, F = F_ideal / eta.

    ideal in N, efficiency eta as a fraction (0 < eta <= 1); returns N. The efficiency
    is the whole pedal's, bare pedal force included. Source: efficiency of a machine,
    eta = output work / input work (OpenStax College Physics, "Simple Machines").

    >>> ideal_effort(1800.0, 15.0) / 0.8 == predicted_effort(120.0, 0.8)
    True
    """
    return ideal / efficiency


def interpolate(points: Curve, x: float) -> float:
    """Piecewise-linear interpolation of ((x_i, y_i), ...) with x_i increasing, held flat
    before the first point and after the last. No physical law: how a table of measured
    points is read between them.

    >>> interpolate(((0.0, 0.0), (0.003, 1300.0), (0.006, 1500.0)), 0.0045)
    1400.0
    >>> interpolate(((0.0, 18.0), (0.15, -13.0)), 0.2)
    -13.0
    """
    i = bisect.bisect_right([px for px, _ in points], x)
    if i == 0:
        return points[0][1]
    if i == len(points):
        return points[-1][1]
    (x0, y0), (x1, y1) = points[i - 1], points[i]
    return y0 + (y1 - y0) * (x - x0) / (x1 - x0)


def load_at(curve: Curve, clearance: float, bearing: float) -> float:
    """Bearing load (N) at bearing travel x_b from rest (m): 0 before the bearing has
    taken up its clearance, then the record's curve read at x_b - clearance (the curve is
    given from first contact; interpolate), so it starts at its own first point.

    >>> curve = ((0.0, 0.0), (0.003, 1300.0), (0.006, 1500.0))
    >>> load_at(curve, 0.0012, 0.001), round(load_at(curve, 0.0012, 0.0027), 6)
    (0.0, 650.0)
    """
    if bearing < clearance:
        return 0.0
    return interpolate(curve, bearing - clearance)


def pad_force(load: float, pedal_ratio: float, hydraulic: float, fork: float,
              bare: float) -> float:
    """Pad force at one point of the stroke, F_pad = F_h / (R_p(x) R_h R_f) + F_bare(x).

    load F_h: the force the fluid carries at the bearing (hydraulic_load), N;
    pedal_ratio R_p(x) = dx_pad / dx_rod there (instantaneous), hydraulic R_h, fork R_f
    plain; bare F_bare: the pedal's own force at that pad travel with the pushrod off, N
    (negative where a spring helps). Returns N, no friction. Virtual work: moving the pad
    by dx_pad moves the bearing by dx_b = dx_pad / (R_p R_h R_f), so F_pad dx_pad = F_h dx_b
    + F_bare dx_pad (Norton, Design of Machinery, virtual work / power balance of a
    linkage). Valid with the line full and at rest (no flow losses).

    >>> round(pad_force(1700.0, 5.5, 1.36, 2.0, 4.0), 4)
    117.6364
    """
    return ideal_effort(load, overall_ratio(pedal_ratio, hydraulic, fork)) + bare


@dataclass(frozen=True, slots=True)
class Chain:
    """What a pad force needs from the rest of the build (SI): the pedal linkage, the
    load curve (from first contact) or None, the fixed figures of the hydraulics, and
    the line's losses as a function of pressure.

    At a bearing travel x_b: V = A_s R_f x_b + dV(p) (volume balance, OpenStax "Pascal's
    Principle"), pushrod x_r = V / A_m + d + c, then pad_force there. A 5.6 lever, 2:1
    fork, 1800 N, areas 283.5 / 380.1 mm^2, lossless, 8.7 mm of bearing travel: pushrod
    6613.7 / 283.5 + 2.5 = 25.83 mm, pad 144.6 mm, 1800 / (5.6 * 1.3407 * 2) = 119.87 N.

    >>> chain = Chain(LeverPedal(0.28, 0.05, 0.15), ((0.0, 1800.0),), 0.0012, 0.0, 2.835e-4,
    ...               3.801e-4, 2.0, 0.0015, 0.001, None, lambda pressure: 0.0)
    >>> [round(v, 4) for v in chain.at_bearing(0.0087)]
    [0.1446, 5.6, 119.8698]
    """

    pedal: LeverPedal | SliderCrankPedal
    curve: Curve
    clearance: float  # m, 0 with a concentric slave's preload
    preload: float  # N
    master_area: float  # m^2
    slave_area: float  # m^2
    fork: float
    dead_stroke: float  # m
    free_play: float  # m
    bare: Curve | None  # (pad travel m, force N)
    losses: Callable[[float], float]  # pressure Pa -> m^3

    @property
    def smooth(self) -> bool:
        """Whether the pad force bends between the curve's points (a layout's varying
        ratio, a bare pedal force): then samples in between and a refined peak."""
        return self.pedal.mode == "layout" or bool(self.bare)

    @property
    def hydraulic(self) -> float:
        """R_h = A_s / A_m (hydraulics.hydraulic_ratio)."""
        return hydraulic_ratio(self.slave_area, self.master_area)

    def bare_at(self, pad: float) -> float:
        """The bare pedal force at a pad travel (N; 0 without one), read between points."""
        return 0.0 if not self.bare else interpolate(self.bare, pad)

    def load(self, bearing: float) -> float:
        """The fluid's share of the bearing load at bearing travel x_b from rest (N):
        load_at less a concentric preload (hydraulic_load)."""
        return hydraulic_load(load_at(self.curve, self.clearance, bearing), self.preload)

    def at_bearing(self, bearing: float, load: float | None = None) -> tuple[float, float, float]:
        """(pad travel m, instantaneous pedal ratio, ideal pad force N) at bearing travel x_b:
        volume A_s R_f x_b + dV(p) pushed after the dead stroke and free play, pad travel
        and ratio from the linkage, pad_force there."""
        load = self.load(bearing) if load is None else load
        losses = self.losses(line_pressure(load, self.fork, self.slave_area))
        volume = volume_for_release(bearing, self.fork, self.slave_area, losses)
        rod = pushrod_for_volume(volume, self.master_area, self.dead_stroke, self.free_play)
        pad, ratio = self.pedal.at_stroke(rod)
        return pad, ratio, pad_force(load, ratio, self.hydraulic, self.fork, self.bare_at(pad))


def effort_samples(chain: Chain, reached: float, lost: float, between: int = CURVE_SAMPLES
                   ) -> list[tuple[float, float, float, float]]:
    """(pad travel m, ideal pad force N, bearing travel m, pedal ratio) through the stroke,
    pad travel increasing: the bare pedal alone up to the lost travel (the pushrod taking
    up its free play, the piston its dead stroke), then each bearing travel up to
    `reached`: 0, the clearance (twice where the load steps up at contact), every curve
    point, and evenly spaced samples where the force is not piecewise linear in bearing
    travel (a layout's varying ratio, a bare pedal force): `between` steps of the travel.
    `lost`: pad travel before the master pushes fluid, m. Sources as pad_force.

    >>> chain = Chain(LeverPedal(0.28, 0.05, 0.15), ((0.0, 0.0), (0.003, 1700.0),
    ...               (0.005, 1850.0)), 0.0012, 0.0, 2.835e-4, 3.801e-4, 2.0, 0.0,
    ...               0.0, None, lambda pressure: 0.0)
    >>> [(round(pad * 1e3, 1), round(force, 1)) for pad, force, _, _ in
    ...  effort_samples(chain, 0.0087, 0.0)][2:]
    [(18.0, 0.0), (18.0, 0.0), (63.1, 113.2), (93.1, 123.2), (130.6, 123.2)]
    """
    pedal = chain.pedal
    samples = []
    bare_pads = [pad for pad, _ in chain.bare or () if 0.0 < pad < lost]
    for pad in [0.0, *bare_pads]:
        _, ratio = pedal.at_stroke(0.0)
        samples.append((pad, chain.bare_at(pad), 0.0, ratio))
    travels = {0.0, reached}
    travels.update(chain.clearance + x for x, _ in chain.curve if chain.clearance + x < reached)
    if chain.clearance < reached:
        travels.add(chain.clearance)
    if chain.smooth:
        step = reached / between
        travels.update(i * step for i in range(1, between))
    for bearing in sorted(travels):
        if bearing == chain.clearance:  # just before contact: the step up to the curve
            pad, ratio, force = chain.at_bearing(bearing, 0.0)
            samples.append((pad, force, bearing, ratio))
        pad, ratio, force = chain.at_bearing(bearing)
        samples.append((pad, force, bearing, ratio))
    return samples


def peak_effort(chain: Chain, samples: list[tuple[float, float, float, float]]
                ) -> tuple[float, float, float]:
    """(ideal pad force N, pad travel m, pedal ratio) at the peak of the pad force over
    the stroke: the highest sample, refined by golden-section search between its
    neighbours where the force is smooth between samples (a layout's ratio or a bare
    pedal force; Kiefer's golden-section search for the maximum of a unimodal function,
    as in Press et al., Numerical Recipes, section 10.2). Where the force is piecewise
    linear in bearing travel the peak is at a sample (a curve point).

    >>> chain = Chain(LeverPedal(0.28, 0.05, 0.15), ((0.0, 0.0), (0.003, 1700.0),
    ...               (0.005, 1850.0)), 0.0012, 0.0, 2.835e-4, 3.801e-4, 2.0, 0.0,
    ...               0.0, None, lambda pressure: 0.0)
    >>> [round(v, 4) for v in peak_effort(chain, effort_samples(chain, 0.0087, 0.0))]
    [123.1995, 0.0931, 5.6]
    """
    best = max(range(len(samples)), key=lambda i: samples[i][1])
    force, pad, bearing, ratio = samples[best][1], samples[best][0], samples[best][2], samples[best][3]
    if not chain.smooth or bearing <= 0.0:
        return force, pad, ratio
    travels = sorted({s[2] for s in samples})
    i = travels.index(bearing)
    low, high = travels[max(i - 1, 0)], travels[min(i + 1, len(travels) - 1)]

    def f(x: float) -> float:  # the ideal pad force at bearing travel x
        return chain.at_bearing(x)[2]

    a, b = low + (1.0 - _GOLDEN) * (high - low), low + _GOLDEN * (high - low)
    fa, fb = f(a), f(b)
    for _ in range(REFINE_STEPS):
        if fa >= fb:
            high, b, fb = b, a, fa
            a = low + (1.0 - _GOLDEN) * (high - low)
            fa = f(a)
        else:
            low, a, fa = a, b, fb
            b = low + _GOLDEN * (high - low)
            fb = f(b)
    x = a if fa >= fb else b
    pad_x, ratio_x, force_x = chain.at_bearing(x)
    if force_x > force:
        return force_x, pad_x, ratio_x
    return force, pad, ratio


def effort_curve(samples: list[tuple[float, float, float, float]], efficiency: float
                 ) -> tuple[tuple[float, float], ...]:
    """Predicted pad effort against pad travel, ((x_pad m, F_pad / eta N), ...), for a plot.

    The samples of effort_samples, each divided by the efficiency eta (predicted_effort),
    so the curve's peak is the headline predicted effort. Sources as pad_force.

    >>> effort_curve([(0.0, 0.0, 0.0, 5.6), (0.1, 100.0, 0.006, 5.6)], 0.8)
    ((0.0, 0.0), (0.1, 125.0))
    """
    return tuple((pad, predicted_effort(force, efficiency)) for pad, force, _, _ in samples)
