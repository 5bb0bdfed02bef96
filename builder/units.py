"""Quantities with units: parse record strings to SI floats, and show SI floats to people.

The only module that touches pint. The magnitude (`7/8`, `1-1/8`, `1 1/8`, `0.875`, `1e-3`)
is parsed here; pint resolves each unit string once. Common units are pre-seeded with exact
factors (1 in = 25.4 mm, 1 lbf = 4.4482216152605 N; NIST SP 811, Appendix B), so the usual
record never builds a pint registry at all.
"""
from __future__ import annotations

import datetime as _dt
import math
import re

# Our dimensions -> a reference SI unit (pint spelling) and the example shown in messages.
DIMENSIONS: dict[str, tuple[str, str]] = {
    "length": ("meter", "7/8 in or 22.2 mm"),
    "area": ("meter ** 2", "1.9 in^2 or 1226 mm^2"),
    "force": ("newton", "410 lbf or 1.9 kN"),
    "pressure": ("pascal", "1500 psi or 10 MPa"),
    "angle": ("radian", "30 deg"),
    "volume": ("meter ** 3", "0.5 in^3 or 8 mL"),
    "hose_expansion": ("meter ** 2 / pascal", "0.31 mL/m/MPa"),
    "fraction": ("", "10 % or 0.10"),
}

INCH = 0.0254  # m, exact (NIST SP 811, B.8)
POUND_FORCE = 4.4482216152605  # N, exact (NIST SP 811, B.8)
_PSI = POUND_FORCE / INCH**2  # Pa, 6894.757293168... (NIST SP 811 lists 6.894 757 E+03)

# Unit string -> (SI factor, dimension). Exact by definition; tests compare each with pint.
SEEDED_UNITS: dict[str, tuple[float, str]] = {
    "m": (1.0, "length"),
    "cm": (1e-2, "length"),
    "mm": (1e-3, "length"),
    "in": (INCH, "length"),
    "ft": (12 * INCH, "length"),
    "m^2": (1.0, "area"),
    "cm^2": (1e-4, "area"),
    "mm^2": (1e-6, "area"),
    "in^2": (INCH**2, "area"),
    "N": (1.0, "force"),
    "kN": (1e3, "force"),
    "lbf": (POUND_FORCE, "force"),
    "Pa": (1.0, "pressure"),
    "kPa": (1e3, "pressure"),
    "MPa": (1e6, "pressure"),
    "GPa": (1e9, "pressure"),
    "bar": (1e5, "pressure"),
    "psi": (_PSI, "pressure"),
    "deg": (math.pi / 180, "angle"),
    "rad": (1.0, "angle"),
    "mL": (1e-6, "volume"),
    "cm^3": (1e-6, "volume"),
    "L": (1e-3, "volume"),
    "in^3": (INCH**3, "volume"),
    "mL/m/MPa": (1e-12, "hose_expansion"),
    "%": (1e-2, "fraction"),
}

_NUMBER = r"(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"
_QUANTITY_RE = re.compile(
    r"\s*(?P<sign>[+-])?\s*(?:"
    r"(?P<whole>\d+)(?:\s+|-)(?P<num>\d+)/(?P<den>\d+)"  # 1-1/8, 1 1/8
    r"|(?P<fnum>\d+)/(?P<fden>\d+)"  # 7/8
    rf"|(?P<dec>{_NUMBER})"  # 0.875, 22, 1e-3
    r")\s*(?P<unit>(?:.*\S)?)\s*"  # greedy up to the last non-space: linear time
)
_MAX_UNIT_CHARS = 40
_MAX_TEXT_CHARS = 60  # `0.31 mL/m/MPa` is 13; a cap keeps parsing short
_UNIT_RE = re.compile(r"[%°]|[^\W\d_][^\s]*(?: [^\s]+)*")  # starts with a letter, %, or °
_BARE_NUMBER_RE = re.compile(r"(?<![\^*\d.-])\d")  # digits only as exponents: in^2, m**3

_units: dict[str, tuple[float, str] | str] = dict(SEEDED_UNITS)  # str value: why unusable
_registry = None


class QuantityError(ValueError):
    """A value that is not a usable quantity of the expected dimension."""


def parse_quantity(text: object, dimension: str, *, signed: bool = False) -> float:
    """Parse `text` such as ``"1-1/8 in"`` as a finite `dimension` quantity; return SI.

    `dimension` is a key of DIMENSIONS. Negative values are refused unless `signed`.
    Raises QuantityError naming the expected dimension and what was found.
    """
    if type(text) is str:
        if len(text) > _MAX_TEXT_CHARS:
            raise QuantityError(f"expected {_expected(dimension)}; found {len(text)} characters "
                                f"starting {text[:20]!r}, too long for a quantity")
        value = _parse_text(text, dimension)
        if value < 0 and not signed:
            raise QuantityError(f"expected {_noun(dimension)} of zero or more; found {text!r}")
        return value
    if dimension == "fraction" and isinstance(text, (int, float)) and not isinstance(text, bool):
        return _finite(float(text), repr(text), dimension, signed)
    raise QuantityError(f"expected {_expected(dimension)}; found {_describe(text)}")


def check_range(value: float, low: float, high: float, dimension: str, text: object) -> None:
    """Raise QuantityError unless low <= value <= high (SI), showing the range in both systems."""
    if not low <= value <= high:
        raise QuantityError(
            f"{text} is outside the plausible range {show(low, dimension)} to "
            f"{show(high, dimension)} for this field"
        )


def _parse_text(text: str, dimension: str) -> float:
    match = _QUANTITY_RE.fullmatch(text)
    if match is None:
        raise QuantityError(f"expected {_expected(dimension)}; {text!r} does not start with a number")
    magnitude = _magnitude(match, text, dimension)
    unit = match["unit"]
    if not unit:
        if dimension == "fraction":
            return _finite(magnitude, text, dimension, True)
        raise QuantityError(f"expected {_expected(dimension)}; found {text!r} with no unit")
    factor, found = _resolve_unit(unit, text, dimension)
    if found != dimension:
        raise QuantityError(f"expected {_expected(dimension)}; found {text!r}, which is {_noun(found)}")
    return _finite(magnitude * factor, text, dimension, True)


def _magnitude(match: re.Match, text: str, dimension: str) -> float:
    sign = -1.0 if match["sign"] == "-" else 1.0
    if match["dec"] is not None:
        return sign * float(match["dec"])
    whole = float(match["whole"] or 0)
    num, den = (match["num"], match["den"]) if match["den"] else (match["fnum"], match["fden"])
    if int(den) == 0:
        raise QuantityError(f"expected {_expected(dimension)}; {text!r} divides by zero")
    if match["whole"] is not None and int(num) >= int(den):
        raise QuantityError(f"expected {_expected(dimension)}; {text!r} is not a proper mixed fraction")
    return sign * (whole + int(num) / int(den))


def _finite(value: float, text: str, dimension: str, signed: bool) -> float:
    if not math.isfinite(value):
        raise QuantityError(f"expected {_expected(dimension)}; {text} is not a finite number")
    if value < 0 and not signed:
        raise QuantityError(f"expected {_noun(dimension)} of zero or more; found {text}")
    return value


def _resolve_unit(unit: str, text: str, dimension: str) -> tuple[float, str]:
    known = _units.get(unit)
    if known is None:
        if _UNIT_RE.fullmatch(unit) is None or _BARE_NUMBER_RE.search(unit):
            known = f"{unit!r} is not a unit"
        else:
            known = _ask_pint(unit)
        _units[unit] = known
    if isinstance(known, str):
        raise QuantityError(f"expected {_expected(dimension)}; {known} in {text!r}")
    return known


def _ask_pint(unit: str) -> tuple[float, str] | str:
    """Resolve one unit string with pint: (SI factor, our dimension) or why it is unusable."""
    global _registry
    if len(unit) > _MAX_UNIT_CHARS:
        return f"unit {unit[:_MAX_UNIT_CHARS]!r}... is too long"
    import pint  # slow (~0.3 s): only for unit strings not seeded above

    if _registry is None:
        _registry = pint.UnitRegistry()
    try:
        base = _registry.Quantity(1.0, unit).to_base_units()
        factor = float(base.magnitude)
        for name, (reference, _) in DIMENSIONS.items():
            if name == "fraction":
                continue
            if base.dimensionality == _registry.Quantity(1.0, reference).dimensionality:
                if name == "angle" and not _is_angle(_registry, unit):
                    continue
                return factor, name
    except Exception:  # pint raises many kinds for a bad unit string
        return f"unknown unit {unit!r}"
    if base.dimensionless and not _is_angle(_registry, unit):
        return factor, "fraction"
    return factor, f"quantity of {base.dimensionality}"


def _is_angle(registry, unit: str) -> bool:
    return str(registry.get_root_units(unit)[1]) == "radian"


def _noun(dimension: str) -> str:
    """'length' -> 'a length', 'angle' -> 'an angle', 'hose_expansion' -> 'a hose expansion'."""
    noun = dimension.replace("_", " ")
    return f"an {noun}" if noun[0] in "aeiou" else f"a {noun}"


def _expected(dimension: str) -> str:
    return f"{_noun(dimension)} with its unit, e.g. {DIMENSIONS[dimension][1]}"


def _describe(value: object) -> str:
    if value is None:
        return "nothing"
    if isinstance(value, bool):
        return f"{str(value).lower()} (quote text or give a number with its unit)"
    if isinstance(value, (int, float)):
        return f"the bare number {value!r} with no unit"
    if isinstance(value, _dt.date):
        return f"a date ({value.isoformat()})"
    if isinstance(value, (list, tuple)):
        return "a list"
    if isinstance(value, dict):
        return "a mapping"
    return f"{type(value).__name__} {value!r}"


# Display: dimension -> {system: (unit label, a SEEDED_UNITS key; most decimals shown)}
_DISPLAY: dict[str, dict[str, tuple[str, int]]] = {
    "length": {"imperial": ("in", 3), "metric": ("mm", 1)},
    "area": {"imperial": ("in^2", 3), "metric": ("mm^2", 1)},
    "force": {"imperial": ("lbf", 1), "metric": ("N", 1)},
    "pressure": {"imperial": ("psi", 0), "metric": ("kPa", 0)},
    "volume": {"imperial": ("in^3", 3), "metric": ("mL", 2)},
    "angle": {"imperial": ("deg", 1), "metric": ("deg", 1)},
    "hose_expansion": {"imperial": ("mL/m/MPa", 3), "metric": ("mL/m/MPa", 3)},
    "fraction": {"imperial": ("%", 1), "metric": ("%", 1)},
}
SYSTEMS = ("imperial", "metric")


def show_one(value_si: float, dimension: str, system: str) -> str:
    """One system only: show_one(0.022225, "length", "imperial") -> "0.875 in"."""
    label, most_decimals = _DISPLAY[dimension][system]
    return f"{_number(value_si / SEEDED_UNITS[label][0], most_decimals)} {label}"


def show(value_si: float, dimension: str, primary: str = "imperial") -> str:
    """Both systems, `primary` first: show(0.022225, "length") -> "0.875 in (22.2 mm)"."""
    first = show_one(value_si, dimension, primary)
    other = show_one(value_si, dimension, SYSTEMS[primary == "imperial"])
    return first if other == first else f"{first} ({other})"


def _number(value: float, most_decimals: int) -> str:
    """Four significant figures, at most `most_decimals` decimals, no trailing zeros."""
    if not math.isfinite(value):
        return str(value)
    if value == 0:
        return "0"
    decimals = max(0, min(most_decimals, 3 - math.floor(math.log10(abs(value)))))
    text = f"{value:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text
