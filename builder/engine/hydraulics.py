"""Hydraulic relations between master and slave: ratio, pressure, volumes, losses.

All arguments and results are SI floats (m, m^2, m^3, N, Pa). Piston areas come from
builder.model (circle_area, Master.area, Slave.area).
"""
from __future__ import annotations

from builder.model import circle_area


def hydraulic_ratio(slave_area: float, master_area: float) -> float:
    """Force gain of a closed hydraulic system, R_h = A_slave / A_master.

    Areas in m^2; returns a plain ratio. Travel divides by the same ratio.
    Source: Pascal's principle, F2 / F1 = A2 / A1 (OpenStax College Physics,
    "Pascal's Principle").
    """
    return slave_area / master_area


def line_pressure(release_load: float, fork_ratio: float, slave_area: float) -> float:
    """Line pressure to hold the release load, p = F_bearing / R_f / A_slave.

    release_load F_bearing in N, fork_ratio R_f plain, slave_area in m^2; returns Pa.
    The fork multiplies slave force by R_f, so the slave pushes F_bearing / R_f.
    Source: p = F / A, OpenStax College Physics, "Pascal's Principle"; lever balance,
    Shigley's Mechanical Engineering Design (static equilibrium of a lever).
    """
    return release_load / fork_ratio / slave_area


def swept_volume(area: float, stroke: float) -> float:
    """Volume swept by a piston, V = A * s.

    area A in m^2, stroke s in m; returns m^3. Source: OpenStax College Physics,
    "Pascal's Principle" (volume moved by a hydraulic piston).
    """
    return area * stroke


def line_volume(line_bore: float, length: float) -> float:
    """Fluid held by the line, V = pi * d^2 / 4 * L.

    line_bore d in m, length L in m; returns m^3. Source: volume of a cylinder
    (OpenStax College Physics, "Pascal's Principle" areas times length).
    """
    return circle_area(line_bore) * length


def line_compliance(
    expansion: float, line_length: float, fluid_volume: float, bulk_modulus: float
) -> float:
    """Volume lost per unit pressure between master and slave, C = e * L + V / K.

    expansion e: hose swelling in m^3 per m of hose per Pa (m^2/Pa); line_length L in m;
    fluid_volume V in m^3 (line bore area * L + master and slave swept volumes);
    bulk_modulus K in Pa; returns m^3/Pa. Sources: hose expansion per length at a test
    pressure as FMVSS 106 / SAE J1401 state their limits (linear in pressure); fluid
    compression dV = V p / K from the definition of bulk modulus (Merritt, Hydraulic
    Control Systems; OpenStax College Physics, "Stress, Strain and Elastic Modulus").
    """
    return expansion * line_length + fluid_volume / bulk_modulus


def losses_volume(compliance: float, pressure: float) -> float:
    """Master volume that never reaches the slave, dV = C * p = e L p + V p / K.

    compliance C in m^3/Pa (line_compliance), pressure p in Pa; returns m^3.
    Sources as line_compliance.
    """
    return compliance * pressure
