"""Hydraulic relations between master and slave: ratio, pressure, volumes, losses.

All arguments and results are SI floats (m, m^2, m^3, N, Pa). Piston areas come from
builder.model (circle_area, annulus_area, Master.area, Slave.area).
"""
from __future__ import annotations

import bisect
from collections.abc import Mapping

from builder.model import circle_area

# A hose kind's expansion as the shop gives it: one figure e (m^3 per m of hose per Pa),
# or points ((p Pa, v m^3 per m of hose), ...) with p increasing.
Expansion = float | tuple[tuple[float, float], ...]


def hydraulic_ratio(slave_area: float, master_area: float) -> float:
    """Force gain of a closed hydraulic system, R_h = A_s / A_m.

    slave_area A_s and master_area A_m in m^2 (both > 0); returns a plain ratio. Travel
    divides by the same ratio. Valid for a closed, full line at rest (no flow losses).
    Source: Pascal's principle, F2 / F1 = A2 / A1 (OpenStax College Physics, "Pascal's
    Principle").

    >>> round(hydraulic_ratio(circle_area(0.025), circle_area(0.005)), 6)
    25.0
    """
    return slave_area / master_area


def hydraulic_load(load: float, preload: float) -> float:
    """Share of the bearing load the fluid carries, F_h = max(0, F_b - F_pre).

    load F_b at the bearing and preload F_pre of a concentric slave's internal spring,
    both in N (>= 0); returns N. The spring pushes the bearing onto the fingers with
    F_pre, so the fluid supplies the rest, and nothing while the spring alone holds the
    load. Valid while the spring force stays near its recorded value over the release
    travel. Source: static equilibrium of the bearing, sum of forces = 0 (Shigley's
    Mechanical Engineering Design, free-body diagrams).

    >>> hydraulic_load(1900.0, 110.0), hydraulic_load(50.0, 110.0)
    (1790.0, 0.0)
    """
    return max(0.0, load - preload)


def line_pressure(release_load: float, fork_ratio: float, slave_area: float) -> float:
    """Line pressure to hold a bearing load, p = F_b / R_f / A_s.

    release_load F_b in N (the fluid's share, see hydraulic_load), fork_ratio R_f plain
    (> 0), slave_area A_s in m^2 (> 0); returns Pa. The fork multiplies slave force by
    R_f, so the slave pushes F_b / R_f. Static pressure: friction is not in it (see
    worst_pressure). Source: p = F / A, OpenStax College Physics, "Pascal's Principle";
    lever balance, Shigley's Mechanical Engineering Design (static equilibrium of a lever).

    >>> round(line_pressure(2000.0, 2.0, 1e-4))  # 1000 N on 1 cm^2
    10000000
    """
    return release_load / fork_ratio / slave_area


def worst_pressure(pressure: float, efficiency: float) -> float:
    """Line pressure when every friction loss sits after the slave, p_w = p / eta.

    pressure p in Pa (static, line_pressure), efficiency eta as a fraction (0 < eta <= 1);
    returns Pa. Friction at the fork pivot and the bearing sleeve must also be overcome
    by the slave, so the fluid carries F_b / eta at worst; with the losses before the
    master (pedal pivot, seals) the real pressure is lower. Source: efficiency of a
    machine, eta = output work / input work (OpenStax College Physics, "Simple Machines").

    >>> round(worst_pressure(2.8e6, 0.8))
    3500000
    """
    return pressure / efficiency


def swept_volume(area: float, stroke: float) -> float:
    """Volume swept by a piston, V = A * s.

    area A in m^2, stroke s in m (>= 0); returns m^3. Source: OpenStax College Physics,
    "Pascal's Principle" (volume moved by a hydraulic piston).

    >>> round(swept_volume(circle_area(0.0254 * 0.75), 0.0254) * 1e6, 4)  # mL
    7.2396
    """
    return area * stroke


def line_volume(line_bore: float, length: float) -> float:
    """Fluid held by the line, V = pi * d^2 / 4 * L.

    line_bore d in m, length L in m; returns m^3. Source: volume of a cylinder
    (OpenStax College Physics, "Pascal's Principle" areas times length).

    >>> round(line_volume(0.0032, 1.0) * 1e6, 4)  # mL in a metre of 3.2 mm bore
    8.0425
    """
    return circle_area(line_bore) * length


def expansion_per_length(expansion: Expansion, pressure: float) -> float:
    """Volume a hose takes up per metre of its length at a pressure, v(p) in m^3/m (= m^2).

    expansion: one figure e in m^2/Pa, giving v = e * p; or points ((p_i Pa, v_i m^2), ...)
    with p_i increasing and p_1 > 0: v = v_1 * p / p_1 below the first point (a line
    through zero), linear interpolation between points, and the last segment (or, with
    one point, the line through zero) carried on past the last point. pressure p in Pa;
    p <= 0 gives 0. Valid within the pressures the points span; past them an
    extrapolation. Source: hose expansion stated as volume per length at test pressures,
    as FMVSS 106 (49 CFR 571.106) and SAE J1401 state their limits for brake hose.

    >>> expansion_per_length(3.0e-13, 1.0e6)
    3e-07
    >>> points = ((6.894757e6, 0.66e-6 / 0.3048), (1.0342136e7, 0.79e-6 / 0.3048))
    >>> round(expansion_per_length(points, 8.618446e6) * 0.3048 * 1e6, 3)  # cc/ft, 1250 psi
    0.725
    >>> round(expansion_per_length(points, 3.4473785e6) * 0.3048 * 1e6, 3)  # 500 psi
    0.33
    """
    if pressure <= 0.0:
        return 0.0
    if not isinstance(expansion, tuple):
        return expansion * pressure
    last = len(expansion) - 1
    i = bisect.bisect_right([p for p, _ in expansion], pressure)
    if i == 0 or last == 0:
        p1, v1 = expansion[0]
        return v1 * pressure / p1
    (p0, v0), (p1, v1) = expansion[min(i, last) - 1], expansion[min(i, last)]
    return v0 + (v1 - v0) * (pressure - p0) / (p1 - p0)


def hose_expansion_volume(expansion: Expansion, length: float, pressure: float) -> float:
    """Volume the hose takes up at a pressure, dV = L * v(p).

    expansion as expansion_per_length, length L of that hose in m, pressure p in Pa;
    returns m^3. Source: as expansion_per_length (FMVSS 106 states its limit per foot of
    hose).

    >>> round(hose_expansion_volume(0.66e-6 / 0.3048 / 6.894757e6, 0.3048, 6.894757e6) * 1e6, 6)
    0.66
    """
    return length * expansion_per_length(expansion, pressure)


def compression_volume(fluid_volume: float, bulk_modulus: float, pressure: float) -> float:
    """Volume lost to fluid compression, dV = V * p / K.

    fluid_volume V in m^3, bulk_modulus K in Pa (> 0; inf for an incompressible fluid),
    pressure p in Pa; returns m^3. Valid while dV << V (p << K), always so in a clutch
    line. Source: definition of the bulk modulus, K = -V dp / dV (Merritt, Hydraulic
    Control Systems; OpenStax College Physics, "Stress, Strain and Elastic Modulus").

    >>> round(compression_volume(1e-3, 2.2e9, 1e6) * 1e6, 5)  # 1 L of water at 1 MPa, mL
    0.45455
    """
    return fluid_volume * pressure / bulk_modulus


def bulk_modulus(modulus: float | Mapping[str, float], fluid: str) -> float:
    """The shop's bulk modulus K (Pa) for a fluid kind: one figure for every fluid, or the
    figure given for `fluid` (e.g. "DOT 5"). A look-up, no formula.

    >>> bulk_modulus({"DOT 4": 1.7e9, "DOT 5": 1.0e9}, "DOT 5"), bulk_modulus(1.5e9, "DOT 3")
    (1000000000.0, 1500000000.0)
    """
    return modulus[fluid] if isinstance(modulus, Mapping) else modulus
