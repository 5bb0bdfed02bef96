"""Words and figures for people: the one place where results become text.

Every output (terminal, JSON messages, site, error messages) calls this module, so a figure
reads the same everywhere. Engine and history return SI numbers and codes; records return
reason codes with their bounds; this module turns them into words.

Rules:
- A quantity shows four significant figures, never more decimals than its unit allows
  (in 3, mm 1, lbf 1, N 1, psi 0, kPa 0, mL 2, in^3 3, deg 1), without trailing zeros, in
  both unit systems with the shop's display system first: ``0.875 in (22.2 mm)``.
- A percentage shows one decimal, ``8.2 %``; a margin or a difference carries its sign,
  ``+8.2 %``.
- A ratio shows two decimals, ``5.60 : 1``.

Imports: builder.units (conversion factors) and builder.model (plain constants) only, so
any stage may ask it for words; engine and history never do.
"""
from __future__ import annotations

import math
from decimal import ROUND_HALF_UP, Decimal
from collections.abc import Iterable
from typing import TYPE_CHECKING

from builder.units import DIMENSIONS, SEEDED_UNITS

if TYPE_CHECKING:
    from builder.engine.result import Flag
    from builder.history.calibration import Basis, GroupCalibration, Prediction
    from builder.history.similar import Difference
    from builder.units import QuantityError

SYSTEMS = ("imperial", "metric")
NONE = "\u2014"

# dimension -> {system: (unit label, a SEEDED_UNITS key; most decimals shown)}
DISPLAY: dict[str, dict[str, tuple[str, int]]] = {
    "length": {"imperial": ("in", 3), "metric": ("mm", 1)},
    "area": {"imperial": ("in^2", 3), "metric": ("mm^2", 1)},
    "force": {"imperial": ("lbf", 1), "metric": ("N", 1)},
    "pressure": {"imperial": ("psi", 0), "metric": ("kPa", 0)},
    "volume": {"imperial": ("in^3", 3), "metric": ("mL", 2)},
    "angle": {"imperial": ("deg", 1), "metric": ("deg", 1)},
    "hose_expansion": {"imperial": ("mL/m/MPa", 3), "metric": ("mL/m/MPa", 3)},
    "volume_per_length": {"imperial": ("cc/ft", 3), "metric": ("mL/m", 3)},
    "fraction": {"imperial": ("%", 1), "metric": ("%", 1)},
}
# Chart axes: one unit per dimension and system (plain numbers along an axis).
CHART_UNITS = {"imperial": {"force": "lbf", "length": "in"}, "metric": {"force": "N", "length": "mm"}}


# --- numbers --------------------------------------------------------------------------------

def number(value: float, most_decimals: int) -> str:
    """Four significant figures, at most `most_decimals` decimals, no trailing zeros.

    >>> number(0.8125, 3), number(41.62, 1), number(1234.5, 0), number(0.0, 2)
    ('0.813', '41.6', '1235', '0')
    >>> number(0.75 * 25.4, 1)  # 19.05 exactly, stored as 19.049999999999997
    '19.1'
    """
    if not math.isfinite(value):
        return str(value)
    if value == 0:
        return "0"
    # Twelve significant figures first take off binary noise (19.05 mm is stored as
    # 19.04999...), then halves round up, as a hand calculation would.
    exact = Decimal(f"{value:.12g}")
    decimals = max(0, min(most_decimals, 3 - exact.adjusted()))
    text = f"{exact.quantize(Decimal(1).scaleb(-decimals), ROUND_HALF_UP):f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def other_system(system: str) -> str:
    return SYSTEMS[system == "imperial"]


def quantity_in(value_si: float, dimension: str, system: str) -> str:
    """One system only: quantity_in(0.022225, "length", "imperial") -> "0.875 in"."""
    label, most_decimals = DISPLAY[dimension][system]
    return f"{number(value_si / SEEDED_UNITS[label][0], most_decimals)} {label}"


def quantity(value_si: float | None, dimension: str, primary: str = "imperial") -> str:
    """Both systems, `primary` first: quantity(0.022225, "length") -> "0.875 in (22.2 mm)".

    A ratio or a fraction has one form only; None is a dash.
    """
    if value_si is None:
        return NONE
    if dimension == "ratio":
        return ratio(value_si)
    if dimension == "fraction":
        return percent(value_si)
    first = quantity_in(value_si, dimension, primary)
    other = quantity_in(value_si, dimension, other_system(primary))
    return first if other == first else f"{first} ({other})"


def percent(fraction: float | None, signed: bool = False) -> str:
    """A fraction as a percentage with one decimal: 0.082 -> "8.2 %", signed "+8.2 %"."""
    if fraction is None or not math.isfinite(fraction):
        return NONE
    return f"{fraction * 100:+.1f} %" if signed else f"{fraction * 100:.1f} %"


def ratio(value: float | None) -> str:
    """A plain ratio with two decimals: 5.6 -> "5.60 : 1"."""
    return NONE if value is None or not math.isfinite(value) else f"{value:.2f} : 1"


def factor(value: float | None) -> str:
    """A multiplying factor (travel factor, family weight) with two decimals: "0.94"."""
    return NONE if value is None else f"{value:.2f}"


def in_unit(value: float | None, unit: str, digits: int) -> float | None:
    """An SI value as a plain number in `unit` (a SEEDED_UNITS key, or "1" for a ratio, "%"
    for a fraction), rounded to `digits`; None stays None. For JSON and CSV columns."""
    if value is None:
        return None
    scale = 1.0 if unit == "1" else SEEDED_UNITS[unit][0]
    return round(value / scale, digits)


def chart_unit(dimension: str, system: str) -> tuple[str, float]:
    """(unit label, SI value of one unit) for a chart axis of `dimension`."""
    label = CHART_UNITS[system][dimension]
    return label, SEEDED_UNITS[label][0]


# --- words for fields -----------------------------------------------------------------------

def noun(dimension: str) -> str:
    """'length' -> 'a length', 'angle' -> 'an angle', 'hose_expansion' -> 'a hose expansion'."""
    words = dimension.replace("_", " ")
    return f"an {words}" if words[0] in "aeiou" else f"a {words}"


def example(dimension: str) -> str:
    return DIMENSIONS[dimension][1]


def expected(dimension: str) -> str:
    return f"{noun(dimension)} with its unit, e.g. {example(dimension)}"


# --- quantity errors ------------------------------------------------------------------------

def quantity_message(error: QuantityError) -> str:
    """The sentence for a QuantityError, from its reason code and fields."""
    e, want = error, expected(error.dimension)
    found = e.found
    sentences = {
        "too-long": lambda: f"expected {want}; found {len(found)} characters starting "
                            f"{found[:20]!r}, too long for a quantity",
        "no-number": lambda: f"expected {want}; {found!r} does not start with a number",
        "no-unit": lambda: f"expected {want}; found {found!r} with no unit",
        "divides-by-zero": lambda: f"expected {want}; {found!r} divides by zero",
        "improper-fraction": lambda: f"expected {want}; {found!r} is not a proper mixed fraction",
        "not-finite": lambda: f"expected {want}; {found} is not a finite number",
        "negative": lambda: f"expected {noun(e.dimension)} of zero or more; found {found}",
        "wrong-dimension": lambda: f"expected {want}; found {found!r}, which is "
                                   f"{noun(e.found_dimension) if e.found_dimension in DIMENSIONS else 'a quantity of ' + str(e.found_dimension)}",
        "not-a-unit": lambda: f"expected {want}; {e.unit!r} is not a unit in {found!r}",
        "unknown-unit": lambda: f"expected {want}; unknown unit {e.unit!r} in {found!r}",
        "unit-too-long": lambda: f"expected {want}; unit {e.unit[:40]!r}... is too long in {found!r}",
        "not-text": lambda: f"expected {want}; found {found}",
        "form": lambda: f"expected {e.dimension.replace('_', ' ')} with its unit after the "
                        f"number, e.g. {example(e.dimension)}; found {found!r}",
        "out-of-range": lambda: f"{found} is outside the plausible range "
                                f"{quantity(e.low, e.dimension)} to {quantity(e.high, e.dimension)} "
                                "for this field",
    }
    text = sentences[e.reason]()
    if e.hint:
        text += f"; {e.hint}"
    return text


def accepted_range(dimension: str, low: float, high: float) -> str:
    """"; this field accepts 0.118 in (3 mm) to 2.362 in (60 mm)"."""
    return f"; this field accepts {quantity(low, dimension)} to {quantity(high, dimension)}"


# --- pedal geometry -------------------------------------------------------------------------

GEOMETRY_SENTENCES = {
    "points-coincide": "pivot, clevis, pad and pushrod seat must be distinct points",
    "pushrod-along-crank": "the pushrod lies along the line from pivot to clevis at rest, so "
                           "turning the pedal cannot push the master",
    "no-lengths": "the pedal needs pivot_to_pad and pivot_to_clevis, or a layout",
    "axis-across-pushrod": "the bore axis runs nearly square to the pushrod at rest, so the "
                           "pushrod cannot push along it; check bore_axis",
}


def geometry_message(reason: str) -> str:
    """Why a pedal cannot push its master, for a located problem at `pedal.layout`."""
    return GEOMETRY_SENTENCES[reason]


# --- flags ----------------------------------------------------------------------------------

_BASIS_WHICH = {
    "computed": "Bearing travel",
    "after_losses": "After the shop's measured travel losses, bearing travel",
}
_EFFORT_WHICH = {"computed": "Predicted", "calibrated": "Calibrated"}
_EFFICIENCY_WHICH = {"computed": "the shop's default", "calibrated": "the calibrated"}


def flag_sentence(flag: Flag, primary: str = "imperial") -> str:
    """One plain sentence for a flag, its figures in both unit systems."""
    v = {figure.name: quantity(figure.value, figure.dimension, primary) for figure in flag.values}
    code = flag.code
    if code == "travel-short":
        which = _BASIS_WHICH[flag.basis]
        if flag.severity == "fail":
            return (f"{which} {v['bearing']} is short of the {v['needed']} needed (clearance "
                    f"plus release travel, margin {_signed(flag, 'margin')}): the clutch will "
                    "not fully release.")
        return (f"{which} {v['bearing']} is only {_signed(flag, 'margin')} over the "
                f"{v['needed']} needed; the shop asks for {v['minimum']}.")
    if code == "master-volume-short":
        return (f"The master's full stroke pushes {v['swept']} once its {v['dead_stroke']} "
                f"dead stroke has closed the port, but full release needs {v['needed']}, of "
                f"which {v['losses']} goes to hose and fluid losses.")
    if code == "travel-margin-high":
        return (f"Bearing travel is {_signed(flag, 'margin')} over what release needs, past "
                f"the shop's {v['limit']}; the pedal releases early and pushes the fingers "
                "further than they need.")
    if code == "over-stroke":
        return (f"At the pedal stop the bearing moves {v['travel']} past first contact, beyond "
                f"the clutch maker's {v['limit']}: the fingers over-stroke. Limit the pedal "
                "stroke (stop or smaller master) and follow the maker's figure.")
    if code == "slave-overtravel":
        return (f"The master pushes the slave to the end of its {v['slave_stroke']} stroke; "
                "limit the pedal or master stroke so the slave cannot bottom.")
    if code == "master-bottoms-early":
        return (f"The master bottoms {v['floor_gap']} of pad travel before the pedal stop; set "
                "the stop there so the master is not the stop.")
    if code == "release-late":
        return (f"Full release comes at {v['release_point']} of the usable pad travel "
                f"({v['pad_travel']} of {v['usable']}), later than the shop's {v['latest']}.")
    if code in ("effort-high", "effort-low"):
        side = "above" if code == "effort-high" else "below"
        return (f"{_EFFORT_WHICH[flag.basis]} pedal effort {v['effort']} is {side} the shop's "
                f"band of {v['low']} to {v['high']}.")
    if code == "pressure-over-rating":
        return (f"Worst-case line pressure {v['pressure']} (static pressure at "
                f"{_EFFICIENCY_WHICH[flag.basis]} efficiency {v['efficiency']}) is above the "
                f"{flag.subject}'s rating of {v['rating']}; follow the maker's rating.")
    if code == "pushrod-off-axis":
        return (f"The pushrod swings {v['angle']} off the master's bore axis, past the shop's "
                f"{v['limit']}; the side load wears the master bore.")
    if code == "linkage-over-centre":
        return (f"The linkage goes over centre after {v['angle']} of the {v['swing']} swing to "
                "the stop; past that the pedal pulls the master back.")
    if code == "pad-travel-mismatch":
        return (f"The layout's {v['swing']} swing moves the pad {v['swing_travel']} but the "
                f"record gives {v['recorded']} of pad travel; the layout is used.")
    raise KeyError(code)


def _signed(flag: Flag, name: str) -> str:
    return percent(flag.value(name), signed=True)


def flag_line(flag: Flag, primary: str = "imperial") -> str:
    """"FAIL  travel-short: <sentence>" for a terminal."""
    return f"{flag.severity.upper():<5} {flag.code}: {flag_sentence(flag, primary)}"


# --- calibration basis ----------------------------------------------------------------------

def basis_sentence(basis: Basis | None) -> str:
    """Which history a calibrated prediction and its interval come from, in plain words."""
    if basis is None:
        return ""
    if basis.source == "family":
        estimate = f"family {basis.family}: median of {basis.n_family} builds"
    elif basis.source == "shop-wide":
        estimate = (f"shop-wide median of {basis.n_shop} builds "
                    f"(no other {basis.family} builds)")
    else:
        estimate = (f"family {basis.family} ({basis.n_family} builds) shrunk toward the "
                    f"shop-wide median of {basis.n_shop} builds, family weight "
                    f"{factor(basis.weight)}")
    if basis.interval_source is None:
        return f"{estimate}; no interval"
    return (f"{estimate}; {basis.interval_percent} % interval from {basis.interval_count} "
            f"{basis.interval_source} leave-one-out residuals")


def coverage_sentence(group: GroupCalibration) -> str:
    """How often the leave-one-out effort intervals held the measured effort, in words."""
    if not group.loo_intervals:
        return (f"Leave-one-out coverage: no build had an effort interval yet (a "
                f"{group.interval_percent} % interval needs {group.interval_least} other builds "
                "with a measured effort).")
    return (f"Leave-one-out coverage: the {group.interval_percent} % effort interval made without each "
            f"build held its measured effort for {group.loo_covered} of {group.loo_intervals} "
            f"builds ({percent(group.loo_coverage)}).")


def prediction_note(prediction: Prediction) -> str | None:
    """Why a prediction has no figure or no interval, in plain words (None when it has both)."""
    if prediction.effort is None:
        count = prediction.n_builds
        return f"not enough history ({count} build{'' if count == 1 else 's'})"
    if prediction.interval is None:
        return "no interval yet: too few leave-one-out residuals"
    return None


# --- similar builds -------------------------------------------------------------------------

FIELD_WORDS_FOR_DIFFERENCES = {
    "gearbox.family": "family", "gearbox.fork_tip_moves": "fork tip", "slave.kind": "slave kind",
    "master.bore": "master bore", "slave.bore": "slave bore",
    "slave.piston_area": "slave piston area", "ratio.pedal": "pedal ratio",
    "ratio.overall": "overall ratio", "clutch.release_load": "release load",
}


def difference_words(difference: Difference, primary: str = "imperial") -> str:
    """"master bore 0.875 in vs 0.75 in (+17 %)": the similar build's value first."""
    name = FIELD_WORDS_FOR_DIFFERENCES.get(difference.field, difference.field)
    theirs, ours = difference.theirs, difference.ours
    if difference.dimension is None:
        return f"{name} {theirs} vs {ours}"
    shown = (f"{quantity(theirs, difference.dimension, primary)} vs "
             f"{quantity(ours, difference.dimension, primary)}")
    return f"{name} {shown} ({percent(theirs / ours - 1.0, signed=True)})"


def differences_text(differences: Iterable[Difference], primary: str = "imperial") -> str:
    words = [difference_words(d, primary) for d in differences]
    return "; ".join(words)
