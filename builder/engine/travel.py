"""Travel through the chain: master volume to slave, bearing, margin, floor gap (m, m^3)."""
from __future__ import annotations


def slave_travel(volume: float, losses: float, slave_area: float) -> float:
    """Slave piston travel from the volume the master pushes, x_s = (V - dV) / A_s.

    volume V and losses dV in m^3, slave_area A_s in m^2; returns m, never below 0.
    Source: conservation of volume of an incompressible fluid with the losses taken
    out (OpenStax College Physics, "Pascal's Principle": A1 d1 = A2 d2).
    """
    return max(0.0, volume - losses) / slave_area


def bearing_travel(slave: float, fork_ratio: float) -> float:
    """Release bearing travel, x_b = x_s / R_f.

    slave x_s in m, fork_ratio R_f plain; returns m. Source: Shigley's Mechanical
    Engineering Design, lever travel is inverse to its force ratio.
    """
    return slave / fork_ratio


def travel_margin(bearing: float, needed: float) -> float:
    """Spare travel as a fraction, margin = x_b / (clearance + release travel) - 1.

    Both in m; returns a fraction (0.1 = 10 % more than needed). Definition of our own.
    """
    return bearing / needed - 1.0


def volume_for_release(needed_bearing: float, fork_ratio: float, slave_area: float,
                       losses: float) -> float:
    """Volume the master must push for full release, V = A_s * x_b * R_f + dV.

    needed_bearing x_b in m, fork_ratio plain, slave_area A_s in m^2, losses dV in m^3;
    returns m^3. The inverse of slave_travel and bearing_travel (OpenStax College
    Physics, "Pascal's Principle"; Shigley, levers).
    """
    return slave_area * needed_bearing * fork_ratio + losses


def floor_gap(pad_travel_at_stop: float, pad_travel_at_bottom: float) -> float:
    """Pad to floor stop when the master bottoms first, gap = x_pad,stop - x_pad,bottom.

    Both in m (in simple mode x_pad,bottom = master stroke * R_p); returns m, 0 when the
    master does not bottom before the stop. Geometry, no source needed beyond levers
    (Shigley's Mechanical Engineering Design).
    """
    return max(0.0, pad_travel_at_stop - pad_travel_at_bottom)
