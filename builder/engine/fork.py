"""Release fork: a lever between slave pushrod and release bearing."""
from __future__ import annotations

from builder.engine.linkage import lever_ratio
from builder.model import Fork


def fork_ratio(fork: Fork | None) -> float:
    """Fork ratio R_f = pivot-to-slave / pivot-to-bearing; 1 for a concentric slave.

    Lengths in m (> 0); returns a plain ratio (bearing force / slave force). Valid for
    small fork swings (the lengths measured square to the pushrod and the bearing's
    travel). Source: Shigley's Mechanical Engineering Design, static equilibrium of a lever.

    >>> fork_ratio(Fork(0.140, 0.070)), fork_ratio(None)
    (2.0, 1.0)
    """
    if fork is None:
        return 1.0
    return lever_ratio(fork.pivot_to_slave, fork.pivot_to_bearing)
