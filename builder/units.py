"""Quantities with units: parse record strings to SI floats.

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
    "volume_per_length": ("meter ** 2", "0.66 cc/ft or 2.2 mL/m"),
    "fraction": ("", "10 % or 0.10"),
}
# A dimension that shares another's SI units: volume per length of hose is an area in SI,
# so a unit pint resolves as an area is accepted for it.
SAME_UNITS_AS = {"volume_per_length": "area"}

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
    "mL/m": (1e-6, "volume_per_length"),
    "cc/ft": (1e-6 / (12 * INCH), "volume_per_length"),
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
    """A value that is not a usable quantity of the expected dimension.

    Carries why (a reason code), the dimension expected and what was found, so callers and
    builder.presentation never read message text. Reasons: too-long, no-number, no-unit,
    divides-by-zero, improper-fraction, not-finite, negative, wrong-dimension, not-a-unit,
    unknown-unit, unit-too-long, not-text, form, out-of-range; and slips whose `meant` gives
    the text probably meant, most likely first: comma (22,2 mm or 1,200 psi), inch-mark
    (7/8"), foot-mark (2'), mass-for-force (410 lb).
    """

    def __init__(self, reason: str, dimension: str, found: str, *, unit: str | None = None,
                 found_dimension: str | None = None, low: float | None = None,
                 high: float | None = None, hint: str | None = None, meant: tuple[str, ...] = ()):
        self.reason, self.dimension, self.found = reason, dimension, found
        self.unit, self.found_dimension, self.low, self.high = unit, found_dimension, low, high
        self.hint, self.meant = hint, meant
        super().__init__(reason, dimension, found)

    def __str__(self) -> str:
        from builder.presentation import quantity_message

        return quantity_message(self)


def parse_quantity(text: object, dimension: str, *, signed: bool = False) -> float:
    """Parse `text` such as ``"1-1/8 in"`` as a finite `dimension` quantity; return SI.

    `dimension` is a key of DIMENSIONS. Negative values are refused unless `signed`.
    Raises QuantityError naming the expected dimension and what was found.

    >>> parse_quantity("1-1/8 in", "length")
    0.028575
    """
    if type(text) is str:
        if len(text) > _MAX_TEXT_CHARS:
            raise QuantityError("too-long", dimension, text)
        value = _parse_text(text, dimension)
        if value < 0 and not signed:
            raise QuantityError("negative", dimension, repr(text))
        return value
    if dimension == "fraction" and isinstance(text, (int, float)) and not isinstance(text, bool):
        return _finite(float(text), repr(text), dimension, signed)
    raise QuantityError("not-text", dimension, describe(text))


def unit_dimension(unit: str) -> str | None:
    """The dimension (a key of DIMENSIONS) of a unit string as a record spells it, or None when
    it is no unit, or a unit of a dimension the records do not use (kg, s).

    >>> unit_dimension("in"), unit_dimension("mL/m"), unit_dimension("kg")
    ('length', 'volume_per_length', None)
    """
    try:
        found = _resolve_unit(unit, unit, "")[1]
    except QuantityError:
        return None
    return found if found in DIMENSIONS else None


def check_range(value: float, low: float, high: float, dimension: str, text: object) -> None:
    """Raise QuantityError (out-of-range, with the bounds) unless low <= value <= high (SI)."""
    if not low <= value <= high:
        raise QuantityError("out-of-range", dimension, str(text), low=low, high=high)


def _parse_text(text: str, dimension: str) -> float:
    match = _QUANTITY_RE.fullmatch(text)
    if match is None:
        raise QuantityError("no-number", dimension, text)
    magnitude = _magnitude(match, text, dimension)
    unit = match["unit"]
    if not unit:
        if dimension == "fraction":
            return _finite(magnitude, text, dimension, True)
        raise QuantityError("no-unit", dimension, text)
    try:
        factor, found = _resolve_unit(unit, text, dimension)
    except QuantityError as error:
        raise _slip(match, dimension) or error from None
    if found != dimension and SAME_UNITS_AS.get(dimension) != found:
        raise _slip(match, dimension) or QuantityError("wrong-dimension", dimension, text,
                                                       found_dimension=found)
    return _finite(magnitude * factor, text, dimension, True)


_COMMA_RE = re.compile(r",(\d+(?:,\d{3})*)\s*(\S.*)")  # what follows "22" in "22,2 mm"
_MARKS = {'"': ("inch-mark", "in"), "''": ("inch-mark", "in"), "\u2033": ("inch-mark", "in"),
          "'": ("foot-mark", "ft"), "\u2032": ("foot-mark", "ft")}
_MASS_FOR_FORCE = {"lb": "lbf", "lbs": "lbf", "pound": "lbf", "pounds": "lbf", "#": "lbf",
                   "kg": "kgf", "kgs": "kgf"}


def _slip(match: re.Match, dimension: str) -> QuantityError | None:
    """A common typing slip in a refused quantity, with the text probably meant: a decimal or
    thousands comma, an inch or foot mark, or a mass unit where a force belongs."""
    text, unit = match.string, match["unit"]
    number = text[:match.start("unit")].strip()
    comma = _COMMA_RE.fullmatch(unit) if match["dec"] is not None else None
    if comma and match["dec"].isdigit():
        whole, digits, rest = match["dec"], comma[1], comma[2]
        readings = []
        if "," in digits or (len(digits) == 3 and not whole.startswith("0")):
            readings.append(f"{whole}{digits.replace(',', '')} {rest}")  # thousands
        if "," not in digits:
            readings.append(f"{whole}.{digits} {rest}")  # a decimal comma
        return QuantityError("comma", dimension, text, unit=rest, meant=tuple(readings))
    if unit in _MARKS:
        reason, written = _MARKS[unit]
        return QuantityError(reason, dimension, text, unit=unit, meant=(f"{number} {written}",))
    if dimension == "force" and unit in _MASS_FOR_FORCE:
        return QuantityError("mass-for-force", dimension, text, unit=unit,
                             meant=(f"{number} {_MASS_FOR_FORCE[unit]}",))
    return None


def _magnitude(match: re.Match, text: str, dimension: str) -> float:
    sign = -1.0 if match["sign"] == "-" else 1.0
    if match["dec"] is not None:
        return sign * float(match["dec"])
    whole = float(match["whole"] or 0)
    num, den = (match["num"], match["den"]) if match["den"] else (match["fnum"], match["fden"])
    if int(den) == 0:
        raise QuantityError("divides-by-zero", dimension, text)
    if match["whole"] is not None and int(num) >= int(den):
        raise QuantityError("improper-fraction", dimension, text)
    return sign * (whole + int(num) / int(den))


def _finite(value: float, text: str, dimension: str, signed: bool) -> float:
    if not math.isfinite(value):
        raise QuantityError("not-finite", dimension, text)
    if value < 0 and not signed:
        raise QuantityError("negative", dimension, text)
    return value


def _resolve_unit(unit: str, text: str, dimension: str) -> tuple[float, str]:
    known = _units.get(unit)
    if known is None:
        if _UNIT_RE.fullmatch(unit) is None or _BARE_NUMBER_RE.search(unit):
            known = "not-a-unit"
        else:
            known = _ask_pint(unit)
        _units[unit] = known
    if isinstance(known, str):
        raise QuantityError(known, dimension, text, unit=unit)
    return known


def _ask_pint(unit: str) -> tuple[float, str] | str:
    """Resolve one unit string with pint: (SI factor, our dimension), or the reason code why
    it is unusable. A dimension we do not use comes back as pint's own, e.g. "[mass]"."""
    global _registry
    if len(unit) > _MAX_UNIT_CHARS:
        return "unit-too-long"
    import pint  # slow (~0.3 s): only for unit strings not seeded above

    if _registry is None:
        _registry = pint.UnitRegistry()
    try:
        base = _registry.Quantity(1.0, unit).to_base_units()
        factor = float(base.magnitude)
        for name, (reference, _) in DIMENSIONS.items():
            if name == "fraction" or name in SAME_UNITS_AS:
                continue
            if base.dimensionality == _registry.Quantity(1.0, reference).dimensionality:
                if name == "angle" and not _is_angle(_registry, unit):
                    continue
                return factor, name
    except Exception:  # pint raises many kinds for a bad unit string
        return "unknown-unit"
    if base.dimensionless and not _is_angle(_registry, unit):
        return factor, "fraction"
    return factor, str(base.dimensionality)


def _is_angle(registry, unit: str) -> bool:
    return str(registry.get_root_units(unit)[1]) == "radian"


def describe(value: object) -> str:
    """What a non-text value in a quantity field is, in plain words."""
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
