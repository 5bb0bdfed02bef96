"""Travel through the chain: pushrod to piston, master volume to slave, bearing, margin,
release point and floor gap (m, m^3)."""
from __future__ import annotations


def piston_travel(pushrod: float, free_play: float, stroke: float) -> float:
    """Master piston travel from the pushrod's, x_p = min(max(x_r - c, 0), s).

    pushrod x_r: how far the pushrod end has moved from rest, m; free_play c: the gap
    between pushrod and piston at rest, m (>= 0); stroke s: the master's full stroke, m.
    Returns m, from 0 to s: the piston does not move until the gap is taken up and stops
    where it bottoms. Geometry of a pushrod with clearance, no source needed beyond
    kinematics (Norton, Design of Machinery: a gap in a joint is lost motion).

    >>> round(piston_travel(0.030, 0.001, 0.035), 9), piston_travel(0.0005, 0.001, 0.035)
    (0.029, 0.0)
    >>> piston_travel(0.040, 0.001, 0.035)
    0.035
    """
    return min(max(pushrod - free_play, 0.0), stroke)


def displaced_volume(area: float, piston: float, dead_stroke: float) -> float:
    """Volume the master pushes into the line, V = A_m * max(0, x_p - d).

    area A_m in m^2, piston travel x_p in m, dead_stroke d in m: the piston travel before
    its seal passes the compensating port (until then fluid flows back to the reservoir).
    Returns m^3. Valid for a compensating-port master; a centre-valve master has its own
    dead stroke, given the same way. Source: conservation of volume of an incompressible
    fluid past the closed port (OpenStax College Physics, "Pascal's Principle": volume
    moved = A d); the compensating port, any hydraulic brake text (e.g. Limpert, Brake
    Design and Safety, master cylinder).

    >>> round(displaced_volume(2.85e-4, 0.0255, 0.0015) * 1e6, 3)  # mL
    6.84
    >>> displaced_volume(2.85e-4, 0.001, 0.0015)
    0.0
    """
    return area * max(0.0, piston - dead_stroke)


def pushrod_for_volume(volume: float, area: float, dead_stroke: float,
                       free_play: float) -> float:
    """Pushrod travel that pushes a volume into the line, x_r = V / A_m + d + c.

    volume V in m^3 (>= 0), area A_m in m^2, dead_stroke d and free_play c in m; returns
    m. The inverse of displaced_volume and piston_travel before the master bottoms.

    >>> round(pushrod_for_volume(6.84e-6, 2.85e-4, 0.0015, 0.001), 6)
    0.0265
    """
    return volume / area + dead_stroke + free_play


def slave_travel(volume: float, losses: float, slave_area: float) -> float:
    """Slave piston travel from the volume the master pushes, x_s = (V - dV) / A_s.

    volume V and losses dV in m^3, slave_area A_s in m^2; returns m, never below 0.
    Source: conservation of volume of an incompressible fluid with the losses taken
    out (OpenStax College Physics, "Pascal's Principle": A1 d1 = A2 d2).

    >>> round(slave_travel(6.84e-6, 0.2e-6, 3.88e-4) * 1e3, 3)  # mm
    17.113
    >>> slave_travel(0.1e-6, 0.2e-6, 3.88e-4)
    0.0
    """
    return max(0.0, volume - losses) / slave_area


def bearing_travel(slave: float, fork_ratio: float) -> float:
    """Release bearing travel, x_b = x_s / R_f.

    slave x_s in m, fork_ratio R_f plain (> 0); returns m. Source: Shigley's Mechanical
    Engineering Design, lever travel is inverse to its force ratio.

    >>> bearing_travel(0.020, 2.0)
    0.01
    """
    return slave / fork_ratio


def travel_margin(bearing: float, needed: float) -> float:
    """Spare travel as a fraction, margin = x_b / (clearance + release travel) - 1.

    Both in m (needed > 0); returns a fraction (0.1 = 10 % more than needed). Definition
    of our own.

    >>> round(travel_margin(0.0099, 0.009), 6)
    0.1
    """
    return bearing / needed - 1.0


def volume_for_release(needed_bearing: float, fork_ratio: float, slave_area: float,
                       losses: float) -> float:
    """Volume the master must push for a bearing travel, V = A_s * x_b * R_f + dV.

    needed_bearing x_b in m, fork_ratio plain, slave_area A_s in m^2, losses dV in m^3;
    returns m^3. The inverse of slave_travel and bearing_travel (OpenStax College
    Physics, "Pascal's Principle"; Shigley, levers).

    >>> round(volume_for_release(0.009, 2.0, 3.88e-4, 0.2e-6) * 1e6, 4)  # mL
    7.184
    """
    return slave_area * needed_bearing * fork_ratio + losses


def usable_pad_travel(pad_at_stop: float, pad_at_bottom: float) -> float:
    """Pad travel the pedal really has, x_u = min(x_stop, x_bottom).

    pad_at_stop: pad travel from rest to the floor stop (or to where the linkage goes over
    centre), m; pad_at_bottom: pad travel where the master bottoms, m. Returns m: the pad
    stops at whichever comes first. Geometry, no source beyond levers (Shigley).

    >>> usable_pad_travel(0.1524, 0.1397), usable_pad_travel(0.1524, 0.19)
    (0.1397, 0.1524)
    """
    return min(pad_at_stop, pad_at_bottom)


def release_point(pad_needed: float, usable: float) -> float:
    """Where full release comes in the pedal's travel, r = x_pad,needed / x_usable.

    pad_needed: pad travel from rest to full release, m; usable: usable_pad_travel, m
    (> 0). Returns a fraction (0.8 = at 80 % of the travel the pedal has). Definition of
    our own (site_src/method.md).

    >>> round(release_point(0.118, 0.1397), 4)
    0.8447
    """
    return pad_needed / usable


def floor_gap(pad_travel_at_stop: float, pad_travel_at_bottom: float) -> float:
    """Pad to floor stop when the master bottoms first, gap = x_pad,stop - x_pad,bottom.

    Both in m (in simple mode x_pad,bottom = (master stroke + free play) * R_p); returns m,
    0 when the master does not bottom before the stop. Geometry, no source needed beyond
    levers (Shigley's Mechanical Engineering Design).

    >>> round(floor_gap(0.1778, 0.1397), 4), floor_gap(0.15, 0.16)
    (0.0381, 0.0)
    """
    return max(0.0, pad_travel_at_stop - pad_travel_at_bottom)


def finger_travel(bearing: float, clearance: float) -> float:
    """Bearing travel past first contact with the fingers, x_f = max(0, x_b - clearance).

    Both in m; returns m, the travel a maker's largest release travel limits. Geometry.

    >>> round(finger_travel(0.0105, 0.0012), 4), finger_travel(0.001, 0.0012)
    (0.0093, 0.0)
    """
    return max(0.0, bearing - clearance)
