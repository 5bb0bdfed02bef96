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
    from builder.engine.linkage import GeometryError
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
    figure = number_in(fraction, "fraction", "metric", signed)
    return figure if figure == NONE else f"{figure} %"


def ratio(value: float | None) -> str:
    """A plain ratio with two decimals: 5.6 -> "5.60 : 1"."""
    figure = number_in(value, "ratio", "metric")
    return figure if figure == NONE else f"{figure} : 1"


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


def unit_label(dimension: str, system: str) -> str:
    """The unit a figure of `dimension` is shown in: unit_label("length", "metric") -> "mm";
    "%" for a fraction and "" for a plain ratio."""
    if dimension == "ratio":
        return ""
    return DISPLAY[dimension][system][0]


def number_in(value_si: float | None, dimension: str, system: str, signed: bool = False) -> str:
    """A figure as a bare number in unit_label(dimension, system), for a column whose heading
    names the unit: number_in(0.022225, "length", "imperial") -> "0.875"; a ratio with two
    decimals, a fraction as a percentage with one; None is a dash.

    >>> number_in(0.022225, "length", "metric"), number_in(5.6, "ratio", "metric")
    ('22.2', '5.60')
    >>> number_in(0.082, "fraction", "imperial", signed=True), number_in(None, "force", "metric")
    ('+8.2', '—')
    """
    if value_si is None or not math.isfinite(value_si):
        return NONE
    if dimension == "ratio":
        return f"{value_si:.2f}"
    if dimension == "fraction":
        return f"{value_si * 100:+.1f}" if signed else f"{value_si * 100:.1f}"
    label, most_decimals = DISPLAY[dimension][system]
    return number(value_si / SEEDED_UNITS[label][0], most_decimals)


def spread(median: float | None, mad: float | None, as_percent: bool = True) -> str:
    """A median with its median absolute deviation: "85.0 % ± 1.8 %" or "0.94 ± 0.01"."""
    if median is None:
        return NONE
    if as_percent:
        return f"{percent(median)} ± {percent(mad or 0.0)}"
    return f"{factor(median)} ± {factor(mad or 0.0)}"


def chart_unit(dimension: str, system: str) -> tuple[str, float]:
    """(unit label, SI value of one unit) for a chart axis of `dimension`."""
    label = CHART_UNITS[system][dimension]
    return label, SEEDED_UNITS[label][0]


# --- words for fields -----------------------------------------------------------------------

# part kind (a catalogue file) -> (one, several)
PART_KIND_WORDS = {
    "gearboxes": ("Gearbox", "Gearboxes"), "clutches": ("Clutch", "Clutches"),
    "masters": ("Master cylinder", "Master cylinders"), "slaves": ("Slave cylinder", "Slave cylinders"),
    "pedals": ("Pedal assembly", "Pedal assemblies"),
}
# record choices as people read them (the record keeps its own spelling)
CHOICE_WORDS = {
    "line.hose": {"rubber": "rubber", "braided_ptfe": "braided PTFE", "steel": "steel"},
    "gearbox.fork_tip_moves": {"forward": "forward", "rearward": "rearward",
                               "none": "none (concentric slave)"},
}
FORK_WORDS = {"forward": "fork tip moves forward", "rearward": "fork tip moves rearward",
              "none": "concentric slave (no fork)"}


def part_kind(kind: str, several: bool = False) -> str:
    """"Master cylinder" / "Master cylinders" for the catalogue file `kind`."""
    one, many = PART_KIND_WORDS.get(kind, (kind, kind))
    return many if several else one


def choice(key: str, value: str) -> str:
    """A record choice as words: choice("line.hose", "braided_ptfe") -> "braided PTFE"."""
    return CHOICE_WORDS.get(key, {}).get(value, value)


def fork_words(direction: str) -> str:
    return FORK_WORDS.get(direction, direction)


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
        "comma": lambda: f"expected {want}; found {found!r} with a comma in the number, "
                         f"probably meant {_either(e.meant)} (a decimal point, no thousands "
                         "separator)",
        "inch-mark": lambda: f"expected {want}; found {found!r} with the inch mark {e.unit}, "
                             f"probably meant {_either(e.meant)}",
        "foot-mark": lambda: f"expected {want}; found {found!r} with the foot mark {e.unit}, "
                             f"probably meant {_either(e.meant)}",
        "mass-for-force": lambda: f"expected {want}; found {found!r}, a mass ({e.unit}) where a "
                                  f"force belongs, probably meant {_either(e.meant)}",
    }
    text = sentences[e.reason]()
    if e.hint:
        text += f"; {e.hint}"
    return text


def _either(texts: Iterable[str]) -> str:
    return " or ".join(texts)


def encoding_message(encoding: str) -> str:
    """A record file saved in a wide encoding (UTF-16 or UTF-32) instead of UTF-8."""
    return (f"the file is {encoding} text, not UTF-8; save it again as UTF-8 (in most editors: "
            "save with encoding, UTF-8)")


def accepted_range(dimension: str, low: float, high: float) -> str:
    """"; this field accepts 0.118 in (3 mm) to 2.362 in (60 mm)"."""
    return f"; this field accepts {quantity(low, dimension)} to {quantity(high, dimension)}"


# --- records ------------------------------------------------------------------------------

def placeholder_message(label: str, found: str) -> str:
    """A template value left in a record: "fill in the vehicle: 'XX' is a placeholder"."""
    return f"fill in the {label}: {found!r} is a placeholder left for you to replace"


def swapped_lengths_message(pad: float, clevis: float, layout: bool = False) -> str:
    """Pivot-to-pad shorter than pivot-to-clevis (m): a pedal ratio below 1."""
    where = "in this layout the pad is" if layout else "pivot to pad is"
    return (f"{where} {quantity(pad, 'length')} from the pivot, shorter than the clevis at "
            f"{quantity(clevis, 'length')}: a pedal ratio of {ratio(pad / clevis)} (a pedal "
            "multiplies the driver's force, so the pad sits further out); the two lengths "
            "look swapped")


def unknown_family_message(code: str, nearest: Iterable[str], known: int) -> str:
    """A gearbox family neither a catalogue gearbox nor the shop's `families` rule names."""
    close = list(nearest)
    hint = f"nearest: {', '.join(close)}" if close else f"the shop knows {known} families"
    return (f"unknown gearbox family {code!r}; {hint}. A family is one a catalogue gearbox "
            "uses (parts/gearboxes.yaml) or one listed under `families` in shop.yaml")


# --- pedal geometry -------------------------------------------------------------------------

GEOMETRY_SENTENCES = {
    "points-coincide": "pivot, clevis, pad and pushrod seat must be distinct points",
    "pushrod-along-crank": "the pushrod lies along the line from pivot to clevis at rest, so "
                           "turning the pedal cannot push the master",
    "no-lengths": "the pedal needs pivot_to_pad and pivot_to_clevis, or a layout",
    "dead-centre": "the linkage reaches dead centre {angle} into the {swing} swing to the stop "
                   "(pushrod in line with the pedal arm); past it the pedal pulls the master "
                   "back. Move the clevis, the master or the stop so the pushrod stays clear "
                   "of that line",
    "ratio-out-of-range": "the pedal ratio reaches {ratio} {angle} into the {swing} swing, "
                          "outside {low} to {high}: the linkage is beside a dead centre there. "
                          "Move the clevis, the master or the stop",
    "axis-across-pushrod": "the bore axis runs nearly square to the pushrod at rest, so the "
                           "pushrod cannot push along it; check bore_axis",
}


def geometry_message(error: GeometryError) -> str:
    """Why a pedal cannot push its master, for a located problem at `pedal.layout`."""
    def angle(value: float | None) -> str:
        return NONE if value is None else quantity(value, "angle")

    low, high = error.bounds or (None, None)
    return GEOMETRY_SENTENCES[error.reason].format(
        angle=angle(error.angle), swing=angle(error.swing), ratio=ratio(error.ratio),
        low=ratio(low), high=ratio(high))


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
    if code == "pad-travel-mismatch":
        return (f"The layout's {v['swing']} swing moves the pad {v['swing_travel']} but the "
                f"record gives {v['recorded']} of pad travel; the layout is used.")
    raise KeyError(code)


def _signed(flag: Flag, name: str) -> str:
    return percent(flag.value(name), signed=True)


FLAG_WORDS = {
    "travel-short": "travel short", "master-volume-short": "master volume short",
    "slave-overtravel": "slave over-travel", "master-bottoms-early": "master bottoms early",
    "release-late": "release late", "effort-high": "pedal heavy", "effort-low": "pedal light",
    "pressure-over-rating": "pressure over rating", "pushrod-off-axis": "pushrod off axis",
    "pad-travel-mismatch": "pad travel mismatch",
}


def flag_words(code: str) -> str:
    """A flag in two or three words, for a table cell: "travel short"."""
    return FLAG_WORDS.get(code, code.replace("-", " "))


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


# --- calibration ----------------------------------------------------------------------------

CALIBRATION_HEADINGS = ("Group", "Builds", "Efficiency used", "Own median \u00b1 MAD", "Weight",
                        "Typical error", "90 % of errors below", "Interval held",
                        "Builds with travel", "Travel factor used", "Own median \u00b1 MAD")
EFFORT_COLUMNS = 8  # the effort half of CALIBRATION_HEADINGS; the travel half follows


def calibration_cells(group: GroupCalibration) -> list[str]:
    """One calibration group as the site and the terminal show it: efficiencies and errors
    as percentages, the family weight and travel factors as factors."""
    return [group.name, str(group.n), percent(group.efficiency),
            spread(group.efficiency_median, group.efficiency_mad), factor(group.weight),
            percent(group.loo_median_abs_err), percent(group.loo_p90_abs_err),
            f"{group.loo_covered} of {group.loo_intervals}",
            str(group.n_travel), factor(group.travel_factor),
            spread(group.travel_factor_median, group.travel_factor_mad, as_percent=False)]


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


# --- verdict --------------------------------------------------------------------------------

VERDICT_WORDS = {"ready": "Ready to order", "warnings": "Ready to order, with warnings",
                 "not_ready": "Not ready to order"}
REJECTED_CODE = "rejected-combination"  # a rejected build used this master and slave


def verdict_line(verdict: str, codes: Iterable[str]) -> str:
    """The first line of `fitment check`: "Not ready to order: travel-short, release-late."

    `codes`: the fail flags' codes when not ready, the warnings' when ready with warnings.
    """
    listed = ", ".join(dict.fromkeys(codes))
    return f"{VERDICT_WORDS[verdict]}: {listed}." if listed else f"{VERDICT_WORDS[verdict]}."


def rejected_line(use) -> str:
    """"HW-0132 (rejected; its flags release-late, travel-short): slipped when hot"."""
    flags = f"; its flags {', '.join(use.flags)}" if use.flags else ""
    return f"{use.id} (rejected{flags}): {use.outcome or 'no outcome noted'}"


# --- suggestions ----------------------------------------------------------------------------

SIXTEENTH = 0.0254 / 16  # m


def nominal_bore(value: float, primary: str = "imperial") -> str:
    """A standard size by its name: "13/16 in (20.6 mm)" or "21 mm (0.827 in)".

    >>> nominal_bore(0.0254 * 13 / 16), nominal_bore(0.021), nominal_bore(0.0254)
    ('13/16 in (20.6 mm)', '21 mm (0.827 in)', '1 in (25.4 mm)')
    """
    sixteenths = round(value / SIXTEENTH)
    if abs(value - sixteenths * SIXTEENTH) < 1e-7 and sixteenths > 0:
        whole, part = divmod(sixteenths, 16)
        if part:
            common = math.gcd(part, 16)
            numerator, denominator = part // common, 16 // common
            name = f"{whole}-{numerator}/{denominator} in" if whole else f"{numerator}/{denominator} in"
        else:
            name = f"{whole} in"
        return f"{name} ({quantity_in(value, 'length', 'metric')})"
    millimetres = round(value * 1000)
    if abs(value - millimetres / 1000) < 1e-7:
        return f"{millimetres} mm ({quantity_in(value, 'length', 'imperial')})"
    return quantity(value, "length", primary)


def quantity_range(low: float, high: float, dimension: str, primary: str = "imperial") -> str:
    """"27.3 to 28.6 lbf (121.4 to 127.3 N)"."""
    def one(system: str) -> str:
        return f"{number_in(low, dimension, system)} to {quantity_in(high, dimension, system)}"
    return f"{one(primary)} ({one(other_system(primary))})"


def _point_words(point, primary: str) -> str:
    def one(system: str) -> str:
        x, y = (quantity_in(v, "length", system) for v in point)
        return f"{x}, {y}"
    return f"{one(primary)} ({one(other_system(primary))})"


def _cylinder_value(value, dimension: str, catalogued: bool, primary: str) -> str:
    if dimension == "area":
        return f"{quantity(value, 'area', primary)} piston area"
    return f"{quantity(value, 'length', primary) if catalogued else nominal_bore(value, primary)} bore"


def change_words(change, primary: str = "imperial") -> str:
    """What one change orders, and what it replaces.

    "master MC-A6: 0.875 in (22.2 mm) bore instead of 0.625 in (15.9 mm)";
    "slave 13/16 in (20.6 mm) bore, not in catalogue, instead of SC-B1";
    "master MC-A1: same 0.625 in (15.9 mm) bore, 1.4 in (35.6 mm) stroke instead of 1 in
    (25.4 mm)"; "clevis hole 2.3 in (58.4 mm) from the pivot instead of 2 in (50.8 mm)".
    """
    if change.what == "clevis":
        if change.dimension == "point":
            return (f"clevis point {_point_words(change.value, primary)} instead of "
                    f"{_point_words(change.was, primary)}")
        return (f"clevis hole {quantity(change.value, 'length', primary)} from the pivot "
                f"instead of {quantity(change.was, 'length', primary)}")
    value = _cylinder_value(change.value, change.dimension, change.catalogued, primary)
    if change.same_size:
        detail = f"same {value}"
        if change.stroke is not None and change.was_stroke is not None and not math.isclose(
                change.stroke, change.was_stroke, rel_tol=1e-3):
            detail += (f", {quantity(change.stroke, 'length', primary)} stroke instead of "
                       f"{quantity(change.was_stroke, 'length', primary)}")
        else:
            detail += " and stroke"
    else:
        was = change.was_part or quantity(change.was, change.dimension, primary)
        detail = f"{value}{'' if change.catalogued else ', not in catalogue,'} instead of {was}"
    return f"{change.what} {change.part}: {detail}" if change.part else f"{change.what} {detail}"


def changes_text(changes, primary: str = "imperial") -> str:
    return "; ".join(change_words(c, primary) for c in changes) or "as proposed"


def miss_words(miss, primary: str = "imperial") -> str:
    """Which shop rule a candidate misses and by how much, in a phrase."""
    rule = miss.rule
    q = (lambda v: quantity(v, miss.dimension, primary)) if miss.dimension else str
    if rule in ("effort-high", "effort-low"):
        side = "above" if rule == "effort-high" else "below"
        return f"{rule}: effort {q(miss.value)} is {side} {q(miss.limit)}"
    if rule == "travel-short":
        return (f"{rule}: margin {percent(miss.value, signed=True)} is under the shop's "
                f"{percent(miss.limit)}")
    if rule == "travel-over":
        return (f"{rule}: margin {percent(miss.value, signed=True)} is over the shop's "
                f"{percent(miss.limit)}")
    if rule == "release-late":
        if miss.value is None:
            return f"{rule}: the clutch never fully releases"
        return (f"{rule}: release at {percent(miss.value)} of pad travel, later than "
                f"{percent(miss.limit)}")
    if rule == "pressure-over-rating":
        return (f"{rule}: worst-case pressure {q(miss.value)} is over the {miss.subject}'s "
                f"{q(miss.limit)}")
    if rule == "master-bottoms-early":
        return f"{rule}: the master bottoms {q(miss.value)} before the pedal stop"
    return f"{rule}: a fail-severity flag"


def _evidence_text(ids) -> str:
    return ", ".join(ids) if ids else "none yet"


def suggestion_lines(row, rank: int | None, primary: str = "imperial",
                     recommended: bool = False) -> list[str]:
    """A candidate as a block of lines: what changes, then its figures, then evidence,
    misses and rejected builds. `rank` None: the proposal as it stands."""
    head = "As proposed" if rank is None else f"{rank:>2}. {changes_text(row.changes, primary)}"
    if recommended:
        head += "  <- recommended"
    basis = row.prediction.basis
    if row.prediction.effort is None:
        interval = f" at the shop default efficiency: {prediction_note(row.prediction)}"
    elif row.interval is None:
        interval = " (no interval yet)"
    else:
        interval = (f", {basis.interval_percent} % interval "
                    f"{quantity_range(*row.interval, 'force', primary)}")
    release = ("never fully releases" if row.release_point is None
               else f"release at {percent(row.release_point)} of pad travel")
    headroom = ("no rating given" if row.headroom is None
                else f"headroom {percent(row.headroom, signed=True)} to the lowest rating")
    pad = "    "
    lines = [head,
             f"{pad}effort {quantity(row.effort, 'force', primary)}{interval}",
             f"{pad}margin {percent(row.margin, signed=True)}; {release}",
             f"{pad}worst-case pressure {quantity(row.pressure_worst, 'pressure', primary)}, "
             f"{headroom}",
             f"{pad}evidence: {_evidence_text(row.evidence)}"]
    if row.misses:
        lines.append(f"{pad}misses: " + "; ".join(miss_words(m, primary) for m in row.misses))
    for use in row.rejected:
        lines.append(f"{pad}warning, rejected before: {rejected_line(use)}")
    return lines


def sensitivity_line(sensitivities, primary: str = "imperial") -> str:
    """"One 1/16 in (1.6 mm) step up in bore: master effort +3 lbf (+13.4 N), margin +11.2
    points; slave effort ..."."""
    if not sensitivities:
        return ""
    step = sensitivities[0].step
    parts = [f"{s.what} effort {_signed_quantity(s.effort_change, 'force', primary)}, margin "
             f"{number_in(s.margin_change, 'fraction', primary, signed=True)} points"
             for s in sensitivities]
    return f"One {nominal_bore(step, primary)} step up in bore, as proposed: {'; '.join(parts)}."


def _signed_quantity(value: float, dimension: str, primary: str) -> str:
    text = quantity(abs(value), dimension, primary)
    sign = "-" if value < 0 else "+"
    return sign + text.replace(" (", f" ({sign}")


def no_recommendation_line(result, shown: int, what: str = "tried", hint: str = "") -> str:
    """Why no row is recommended: nothing qualifies, or only what a rejected build used.
    `hint`, when given, follows in brackets."""
    hint = f" ({hint})" if hint else ""
    if result.qualifying:
        return (f"Only combinations that a rejected build used meet the shop's rules{hint}; "
                f"the first {shown}:")
    return (f"Nothing {what} meets the shop's rules{hint}; the {shown} nearest "
            f"{'miss' if shown == 1 else 'misses'}:")


def suggestions_text(result, build, primary: str = "imperial", top: int = 5) -> str:
    """The whole `fitment suggest` view: the proposal, what was tried, the ranked rows, the
    sensitivities of the proposal."""
    tried = result.tried
    lines = [f"Suggestions for {build.id}: gearbox {build.gearbox.family}, fork tip "
             f"{build.gearbox.fork_tip_moves}, {build.slave.kind} slave; "
             f"{'catalogue parts' if result.sizes == 'catalogue' else 'catalogue parts and standard sizes'}",
             ""]
    lines += suggestion_lines(result.proposal, None, primary)
    holes = tried["clevis"]
    count = result.combinations
    lines += ["",
              f"Tried {tried['masters']} masters x {tried['slaves']} slaves x {holes} clevis "
              f"{'hole' if holes == 1 else 'holes'}: {count} combinations"
              + (f" ({result.unsizable} could not be sized)" if result.unsizable else "")
              + f", {result.qualifying} meet the shop's rules; target effort "
              f"{quantity(result.target, 'force', primary)}.", ""]
    shown = result.shown(top)
    if result.recommendation is None:
        lines.append(no_recommendation_line(result, len(shown)))
        lines.append("")
    for rank, row in enumerate(shown, start=1):
        lines += suggestion_lines(row, rank, primary, recommended=rank == 1
                                  and result.recommendation is not None)
    sensitivity = sensitivity_line(result.sensitivities, primary)
    if sensitivity:
        lines += ["", sensitivity]
    return "\n".join(lines)
