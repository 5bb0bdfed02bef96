"""Pedal linkage: a plain lever (two lengths) or a slider-crank drawn from a side view.

Both pedal kinds answer the same questions in SI floats (m, rad): how far the master
moves when the pad reaches its stop, where the pad is for a given master stroke, and the
instantaneous pedal ratio (pad travel per master stroke) there.
"""
from __future__ import annotations

import bisect
import math

from builder.engine.result import LinkagePose
from builder.model import PedalLayout

SWEEP_SAMPLES = 96  # layout mode: poses computed through the swing
_MOST_OFF_AXIS = 0.999  # sin of the largest pushrod angle to the bore axis at rest (~87 deg)


# The instantaneous ratio a layout may reach anywhere in its swing: the extremes a two-length
# pedal can have within the plausible lengths (50 mm / 300 mm to 1000 mm / 5 mm). Beyond them
# the linkage is at or beside a dead centre and its figures mean nothing.
RATIO_RANGE = (50.0 / 300.0, 1000.0 / 5.0)


class GeometryError(ValueError):
    """A pedal the engine cannot work. `reason` is a code of ours, worded by
    builder.presentation: "points-coincide", "pushrod-along-crank", "axis-across-pushrod",
    "no-lengths", "dead-centre" or "ratio-out-of-range". `angle` (rad) is where in the swing
    it fails, `swing` (rad) the swing to the stop, `ratio` the instantaneous ratio there and
    `bounds` the ratios allowed, when known.
    """

    def __init__(self, reason: str, angle: float | None = None, swing: float | None = None,
                 ratio: float | None = None, bounds: tuple[float, float] | None = None):
        super().__init__(reason)
        self.reason, self.angle, self.swing, self.ratio = reason, angle, swing, ratio
        self.bounds = bounds


def lever_ratio(arm_out: float, arm_in: float) -> float:
    """Mechanical advantage of a lever, R = a / b (force out / force in, inverted travel).

    arm_out a: pivot to where the force is applied (pad), m; arm_in b: pivot to where
    the force is delivered (clevis), m (both > 0). Valid for small swings with the
    pushrod square to the arm (layout mode covers the rest). Source: Shigley's Mechanical
    Engineering Design, static equilibrium of a lever (moments about the pivot).

    >>> lever_ratio(0.28575, 0.0508)
    5.625
    """
    return arm_out / arm_in


def arc_length(radius: float, angle: float) -> float:
    """Arc swept by a point at a radius, s = r * theta.

    radius r in m, angle theta in rad; returns m. Source: OpenStax College Physics,
    "Rotation Angle and Angular Velocity" (arc length).

    >>> round(arc_length(0.3, 0.5235987756), 6)  # 30 deg on 300 mm
    0.15708
    """
    return radius * angle


SCHEMATIC_ROD = 0.45  # pushrod drawn this fraction of pivot-to-pad long in simple mode


class LeverPedal:
    """Simple mode: constant ratio R_p = pivot-to-pad / pivot-to-clevis (Shigley, levers);
    pad travel x_pad = R_p * s for a pushrod travel s (m). Valid for small swings with the
    pushrod square to the arm; layout mode covers the rest.

    >>> pedal = LeverPedal(0.28, 0.05, 0.15)
    >>> [round(v, 6) for v in pedal.at_stroke(0.02)], round(pedal.stroke_at_stop, 6)
    ([0.112, 5.6], 0.026786)
    """

    mode = "simple"
    __slots__ = ("ratio", "pad_travel_at_stop", "stroke_at_stop", "to_pad", "to_clevis")

    def __init__(self, pivot_to_pad: float, pivot_to_clevis: float, pad_travel: float):
        self.ratio = lever_ratio(pivot_to_pad, pivot_to_clevis)
        self.pad_travel_at_stop = pad_travel
        self.stroke_at_stop = pad_travel / self.ratio
        self.to_pad, self.to_clevis = pivot_to_pad, pivot_to_clevis

    def at_stroke(self, stroke: float) -> tuple[float, float]:
        """(pad travel x_pad = R_p * s in m, ratio R_p) at master stroke s (m);
        Shigley's Mechanical Engineering Design, lever travel ratio."""
        return stroke * self.ratio, self.ratio

    def pushrod_angle_max(self, stroke_used: float) -> float | None:
        """Not modelled for a lever (None)."""
        return None

    def sweep(self) -> tuple[tuple[float, float, float, float], ...]:
        """Rest and stop only: the ratio is constant; the pushrod angle is not modelled (0)."""
        return (
            (0.0, 0.0, self.ratio, 0.0),
            (self.pad_travel_at_stop, self.stroke_at_stop, self.ratio, 0.0),
        )

    def poses(self) -> tuple[LinkagePose, LinkagePose]:
        """Schematic rest and stop poses for a drawing, master bottoming ignored as in
        layout mode: the pad hangs straight below the pivot at rest and swings forward (+x)
        through theta = pad travel / pivot-to-pad (arc length, OpenStax "Rotation Angle and
        Angular Velocity"); the pushrod runs level from the clevis at a drawing length of
        0.45 * pivot-to-pad (not a record value) and its seat moves by the stroke at the stop.
        """
        rod = SCHEMATIC_ROD * self.to_pad

        def pose(angle: float, stroke: float) -> LinkagePose:
            sin_a, cos_a = math.sin(angle), math.cos(angle)
            return LinkagePose(pivot=(0.0, 0.0), pad=(self.to_pad * sin_a, -self.to_pad * cos_a),
                               clevis=(self.to_clevis * sin_a, -self.to_clevis * cos_a),
                               pushrod_seat=(rod + stroke, -self.to_clevis))

        swing = self.pad_travel_at_stop / self.to_pad
        return pose(0.0, 0.0), pose(swing, self.stroke_at_stop)


class SliderCrankPedal:
    """Layout mode: pedal = crank about the pivot, pushrod = coupler, master piston = slider.

    The bore axis runs through the pushrod seat, along layout.bore_axis when the record
    gives it, else from the clevis at rest through the seat; the pushrod length is
    |seat - clevis| at rest. Rotating the crank by theta (the sense that pushes the master
    in) moves the seat along the axis by s(theta) (the pushrod end's travel: free play
    and dead stroke are the caller's). Position analysis of the offset slider-crank:
    Norton, Design of Machinery, x = r cos t + sqrt(l^2 - (r sin t - e)^2), written here
    in the record's own frame.

    The swing from rest to the stop must push the master in all the way: a dead centre
    (toggle) inside it, a pushrod that cannot stay on the axis, or an instantaneous ratio
    outside RATIO_RANGE raises GeometryError.

    A 280 mm pedal, clevis 50 mm below the pivot, a 140 mm pushrod square to it: 10 deg
    moves the seat 50 sin(10 deg) - (140 - sqrt(140^2 - (50 (1 - cos 10 deg))^2)) =
    8.68 mm (Norton's closed form, by hand).

    >>> pedal = SliderCrankPedal(PedalLayout((0, 0), (0, -0.28), (0, -0.05), (0.14, -0.05), 0.5236))
    >>> round(pedal.state(math.radians(10))[0] * 1e3, 2), round(pedal.at_stroke(0.005)[1], 3)
    (8.68, 5.629)
    """

    mode = "layout"

    def __init__(self, layout: PedalLayout):
        self.layout = layout
        px, py = layout.pivot
        cx, cy = layout.clevis
        sx, sy = layout.pushrod_seat
        self.rod = math.hypot(sx - cx, sy - cy)
        crank = (cx - px, cy - py)
        self.pad_radius = math.hypot(layout.pad[0] - px, layout.pad[1] - py)
        crank_radius = math.hypot(*crank)
        if self.rod <= 0.0 or crank_radius <= 0.0 or self.pad_radius <= 0.0:
            raise GeometryError("points-coincide")
        rod_dir = ((sx - cx) / self.rod, (sy - cy) / self.rod)
        if layout.bore_axis is None:
            self.axis = rod_dir
        else:  # the given direction, turned to point from the clevis side into the master
            ux, uy = math.cos(layout.bore_axis), math.sin(layout.bore_axis)
            flip = -1.0 if ux * rod_dir[0] + uy * rod_dir[1] < 0.0 else 1.0
            self.axis = (flip * ux, flip * uy)
        # h0 = u x (clevis - seat): the clevis's offset from the bore axis at rest
        self._offset0 = self.axis[0] * (cy - sy) - self.axis[1] * (cx - sx)
        if abs(self._offset0) >= self.rod * _MOST_OFF_AXIS:
            raise GeometryError("axis-across-pushrod")
        self._rest_along = math.sqrt(self.rod * self.rod - self._offset0 * self._offset0)
        self._crank0, self._crank2 = crank, crank[0] ** 2 + crank[1] ** 2
        # which side of the line pivot -> seat the clevis sits on at rest (+1 left, -1 right)
        self._side = 1.0 if (sx - px) * crank[1] - (sy - py) * crank[0] > 0.0 else -1.0
        self._along0 = crank[0] * self.axis[0] + crank[1] * self.axis[1]  # k0 . u
        self._across0 = self.axis[0] * crank[1] - self.axis[1] * crank[0]  # u x k0
        rate_ccw = -self._across0 - self._offset0 * self._along0 / self._rest_along
        if abs(rate_ccw) < 1e-6 * crank_radius:
            raise GeometryError("pushrod-along-crank")
        self.sense = 1.0 if rate_ccw > 0.0 else -1.0
        self.stop_angle = layout.rotation_to_stop
        self.pad_travel_at_stop = arc_length(self.pad_radius, self.stop_angle)
        self._build_table()
        self.stroke_at_stop = self._strokes[-1]

    def state(self, theta: float) -> tuple[float, float, float] | None:
        """(stroke s m, ds/dtheta m/rad, pushrod offset h m) at crank angle theta, or None
        where the pushrod cannot reach the axis (see `states`)."""
        return self.states((theta,))[0]

    def states(self, thetas) -> list[tuple[float, float, float] | None]:
        """state() at each crank angle theta (rad), in one loop.

        Seat on the axis at x (from its rest place) with |x u - w| = l, w = clevis - seat
        at rest + d, d = clevis displacement: x = a + sqrt(l^2 - h^2) - sqrt(l^2 - h0^2),
        a = d.u, h = h0 + u x d, h0 = u x (clevis - seat) at rest (0 when the axis runs
        through the clevis); s = x; ds/dtheta = a' - h h' / sqrt(l^2 - h^2). Norton,
        Design of Machinery, slider-crank position and velocity analysis. The crank k0
        turned by t = sense * theta gives, with a0 = k0.u and b0 = u x k0 (rotation of a
        vector): a = a0 (cos t - 1) - b0 sin t, h = h0 + b0 (cos t - 1) + a0 sin t,
        a' = -sense (a0 sin t + b0 cos t), h' = sense (a0 cos t - b0 sin t).
        """
        sense, rod, a0, b0 = self.sense, self.rod, self._along0, self._across0
        h0, rest = self._offset0, self._rest_along
        cos, sin, sqrt = math.cos, math.sin, math.sqrt
        found = []
        for theta in thetas:
            cos_t, sin_t = cos(theta), sense * sin(theta)
            offset = h0 + b0 * (cos_t - 1.0) + a0 * sin_t
            room = rod * rod - offset * offset
            if room <= 0.0:
                found.append(None)
                continue
            root = sqrt(room)
            along = a0 * (cos_t - 1.0) - b0 * sin_t
            rate = -sense * (a0 * sin_t + b0 * cos_t) - offset * sense * (a0 * cos_t - b0 * sin_t) / root
            found.append((along + root - rest, rate, offset))
        return found

    def _pushes(self, theta: float) -> bool:
        """True while turning further still pushes the master in."""
        return _pushing(self.state(theta))

    def _build_table(self) -> None:
        """Sample the swing from rest to the stop; refuse a swing the engine cannot work."""
        thetas = _spaced(self.stop_angle)
        states = self.states(thetas)
        bad = next((i for i, st in enumerate(states) if not _pushing(st)), None)
        if bad is not None:  # bad > 0: at rest the pushrod is on its axis and pushes
            toggle = _last_true(self._pushes, thetas[bad - 1], thetas[bad])
            raise GeometryError("dead-centre", angle=toggle, swing=self.stop_angle)
        pad, rod, asin = self.pad_radius, self.rod, math.asin
        low, high = RATIO_RANGE
        sweep = []  # arc_length and pushrod_angle written out: this runs for every sample
        for theta, (stroke, rate, offset) in zip(thetas, states):
            ratio = pad / rate
            if not low <= ratio <= high:
                raise GeometryError("ratio-out-of-range", angle=theta, swing=self.stop_angle,
                                    ratio=ratio, bounds=RATIO_RANGE)
            sweep.append((pad * theta, stroke, ratio, asin(abs(offset) / rod)))
        self._thetas = thetas
        self._strokes = [st[0] for st in states]
        self._states = states
        self._sweep = tuple(sweep)

    def solve(self, stroke: float) -> tuple[float, tuple[float, float, float]]:
        """(crank angle rad, state) where the pushrod has moved `stroke` (m) along the axis,
        clamped to the swing: the clevis is where the crank circle (radius r about the
        pivot) meets the circle of the pushrod's length l about the seat's new place,
        S = seat + s u. Circle-circle intersection (any analytic geometry text; Norton,
        Design of Machinery, solves the slider-crank's position the same way): with
        d = |S - P|, a = (r^2 - l^2 + d^2) / 2d, h = sqrt(r^2 - a^2), the clevis is at
        P + a (S - P) / d +- h n, on the side of P-S where it was at rest (a swing that
        crosses it is refused when the pedal is made)."""
        if stroke <= 0.0:
            return 0.0, self._states[0]
        if stroke >= self._strokes[-1]:
            return self._thetas[-1], self._states[-1]
        (px, py), (sx, sy) = self.layout.pivot, self.layout.pushrod_seat
        dx, dy = sx + stroke * self.axis[0] - px, sy + stroke * self.axis[1] - py
        d = math.hypot(dx, dy)
        a = (self._crank2 - self.rod * self.rod + d * d) / (2.0 * d)
        h = self._side * math.sqrt(self._crank2 - a * a)
        kx, ky = (a * dx - h * dy) / d, (a * dy + h * dx) / d  # crank, pivot to clevis
        k0x, k0y = self._crank0
        theta = self.sense * math.atan2(k0x * ky - k0y * kx, k0x * kx + k0y * ky)
        return theta, self.state(theta)

    def at_stroke(self, stroke: float) -> tuple[float, float]:
        """(pad travel along its arc r_pad * theta in m, instantaneous ratio
        d(pad arc)/ds = r_pad / (ds/dtheta)) at master stroke s (m)."""
        theta, state = self.solve(stroke)
        return arc_length(self.pad_radius, theta), self.pad_radius / state[1]

    def pushrod_angle(self, offset: float) -> float:
        """Pushrod angle to the bore axis, phi = asin(|h| / l) (rad): h the clevis's offset
        from the axis (m), l the pushrod length (m). Norton, Design of Machinery,
        slider-crank coupler angle.

        >>> pedal = SliderCrankPedal(PedalLayout((0, 0), (0, -0.28), (0, -0.05), (0.14, -0.05), 0.5))
        >>> round(math.degrees(pedal.pushrod_angle(0.01)), 3)  # asin(10 / 140)
        4.096
        """
        return math.asin(abs(offset) / self.rod)  # |h| < l wherever the pushrod reaches

    def pushrod_angle_max(self, stroke_used: float) -> float:
        """Largest pushrod angle to the bore axis over the used swing (rad): the sampled
        angles up to the used crank angle, and the angle there."""
        theta_used, state_used = self.solve(stroke_used)
        sampled = self._sweep[:bisect.bisect_right(self._thetas, theta_used)]
        return max([row[3] for row in sampled] + [self.pushrod_angle(state_used[2])])

    def sweep(self) -> tuple[tuple[float, float, float, float], ...]:
        """(pad travel m, master stroke m, instantaneous ratio, pushrod angle rad) from
        rest to the stop, at the sampled crank angles."""
        return self._sweep

    def pose(self, theta: float) -> LinkagePose:
        """Linkage points (m, record frame) with the pedal turned by theta."""
        lay = self.layout
        turn = self.sense * theta
        stroke = self.state(theta)[0]
        return LinkagePose(
            pivot=lay.pivot,
            pad=_rotate(lay.pad, lay.pivot, turn),
            clevis=_rotate(lay.clevis, lay.pivot, turn),
            pushrod_seat=(
                lay.pushrod_seat[0] + stroke * self.axis[0],
                lay.pushrod_seat[1] + stroke * self.axis[1],
            ),
        )

    def poses(self) -> tuple[LinkagePose, LinkagePose]:
        """Rest pose and the pose at the stop, master bottoming ignored."""
        return self.pose(0.0), self.pose(self.stop_angle)


def _pushing(state: tuple[float, float, float] | None) -> bool:
    return state is not None and state[1] > 0.0


def _spaced(end: float) -> list[float]:
    """SWEEP_SAMPLES angles evenly spaced from 0 to end."""
    step = end / (SWEEP_SAMPLES - 1)
    return [i * step for i in range(SWEEP_SAMPLES)]


def _rotate(point: tuple[float, float], centre: tuple[float, float],
            angle: float) -> tuple[float, float]:
    """Rotate a point about a centre by angle (rad, counter-clockwise): the rotation
    matrix [[cos, -sin], [sin, cos]] (any linear algebra text).

    >>> [round(v, 12) for v in _rotate((1.0, 0.0), (0.0, 0.0), math.pi / 2)]
    [0.0, 1.0]
    """
    dx, dy = point[0] - centre[0], point[1] - centre[1]
    cos_a, sin_a = math.cos(angle), math.sin(angle)
    return (centre[0] + dx * cos_a - dy * sin_a, centre[1] + dx * sin_a + dy * cos_a)


def _last_true(pred, good: float, bad: float) -> float:
    """Bisection: the last value between good (pred true) and bad (pred false)."""
    for _ in range(60):
        mid = 0.5 * (good + bad)
        if pred(mid):
            good = mid
        else:
            bad = mid
    return good
