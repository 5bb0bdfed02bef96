"""The JSON Schemas in <repo>/schema: a compiled check for the fast path, plain messages for people.

fastjsonschema compiles a lighter copy of each schema once per process for the happy path (see
fast_schema); jsonschema's Draft202012Validator on the full schema stays the reference verdict
and gives the detailed errors.
"""
from __future__ import annotations

import functools
import json

from builder.fields import QUANTITY_DEFS
from builder.problems import nearest
from builder.resources import data_dir
from builder.units import DIMENSIONS, QuantityError, parse_quantity

SCHEMA_DIR = data_dir("schema")
_QUANTITY_DEFS = tuple(QUANTITY_DEFS)  # the schemas' quantity $defs, as builder.fields writes them
_SKIPPED = ("anyOf", "not")  # section completeness and bore-or-area: the records code words these
_ANNOTATIONS = ("title", "description", "$schema")  # words for editors: nothing to check


@functools.cache
def schema(name: str) -> dict:
    """The parsed schema `name` ("build", "parts" or "shop")."""
    return json.loads((SCHEMA_DIR / f"{name}.schema.json").read_text(encoding="utf-8"))


def quantity_patterns(name: str) -> dict[str, str]:
    """Quantity definition name (`length`, `signed_length`, `fraction`...) -> its pattern."""
    defs = schema(name)["$defs"]
    return {dimension: defs[dimension]["pattern"] for dimension in _QUANTITY_DEFS}


@functools.cache
def fast_schema(name: str) -> dict:
    """`name` for the compiled fast check: $refs written out (each costs a call there), and
    without what the records code checks on every path: anyOf / not (section completeness,
    bore or area) and the quantity patterns (convert.quantity), and without annotations
    (titles and descriptions), which only make the compiled code longer. Anything the lighter check lets
    through is still caught on the fast path; see tests/test_records_schema.py."""
    full = schema(name)
    patterns = set(quantity_patterns(name).values())

    def lighter(node, names: bool = False):
        if isinstance(node, list):
            return [lighter(item) for item in node]
        if not isinstance(node, dict):
            return node
        if names:  # a `properties` mapping: its keys are record keys, not keywords
            return {key: lighter(value) for key, value in node.items()}
        if "$ref" in node:
            node = {**full["$defs"][node["$ref"].removeprefix("#/$defs/")],
                    **{key: value for key, value in node.items() if key != "$ref"}}
        return {key: lighter(value, key == "properties") for key, value in node.items()
                if key not in (*_SKIPPED, *_ANNOTATIONS, "$defs")
                and not (key == "pattern" and value in patterns)}

    return lighter(full)


@functools.cache
def fast_validator(name: str):
    """The compiled fast_schema(name): raises fastjsonschema.JsonSchemaException when invalid."""
    import fastjsonschema

    return fastjsonschema.compile(fast_schema(name))


def is_valid_fast(name: str, data: object) -> bool:
    """True when the compiled validator accepts `data`."""
    import fastjsonschema

    try:
        fast_validator(name)(data)
    except fastjsonschema.JsonSchemaException:
        return False
    return True


@functools.cache
def reference_validator(name: str):
    """jsonschema's Draft 2020-12 validator for `name`: the reference verdict."""
    from jsonschema import Draft202012Validator

    return Draft202012Validator(schema(name))


def schema_problems(name: str, data: object) -> list[tuple[tuple, bool, str, str]]:
    """Every schema error as (where, is_unknown_key, field, message), in document order.

    An unknown key is located at the key itself and does not stop the known keys being checked.
    """
    found = []
    for error in reference_validator(name).iter_errors(data):
        if error.validator in _SKIPPED:
            continue
        where = tuple(error.absolute_path)
        found.extend(_explain(name, error, where))
    return sorted(found, key=lambda problem: _sort_key(problem[0]))


def _sort_key(where: tuple) -> tuple:
    return tuple((isinstance(step, int), str(step)) for step in where)


def dotted(where: tuple) -> str:
    """("pedal", "layout", "pad", 0) -> "pedal.layout.pad[0]"; () -> "file"."""
    text = ""
    for step in where:
        text += f"[{step}]" if isinstance(step, int) else f".{step}" if text else str(step)
    return text or "file"


def _explain(name: str, error, where: tuple) -> list[tuple[tuple, bool, str, str]]:
    kind, instance, sub = error.validator, error.instance, error.schema
    if kind == "required":
        missing = [key for key in error.validator_value if isinstance(instance, dict) and key not in instance]
        return [(where + (key,), False, dotted(where + (key,)), f"missing key {key!r}") for key in missing]
    if kind == "additionalProperties":
        allowed = list(sub.get("properties", {}))
        return [
            (where + (key,), True, dotted(where + (key,)), f"unknown key {key!r}{_nearest(str(key), allowed)}")
            for key in instance
            if key not in allowed
        ]
    dimension = _quantity_dimension(name, sub)
    if dimension is not None and kind in ("type", "pattern"):
        return [(where, False, dotted(where), quantity_message(instance, *dimension))]
    return [(where, False, dotted(where), _message(kind, instance, sub, error))]


def _quantity_dimension(name: str, sub: dict) -> tuple[str, bool] | None:
    """(dimension, signed) when `sub` is one of the schema's quantity definitions."""
    defs = schema(name).get("$defs", {})
    for dimension in _QUANTITY_DEFS:
        if defs.get(dimension) == sub:
            return dimension.removeprefix("signed_"), dimension.startswith("signed_")
    return None


def quantity_message(value: object, dimension: str, signed: bool) -> str:
    """Why `value` is no `dimension` quantity: parse_quantity's reason, or for a form it reads
    but the schema's pattern refuses (e.g. "+3 mm") the expected form."""
    try:
        parse_quantity(value, dimension, signed=signed)
    except QuantityError as error:
        return str(error)
    example = DIMENSIONS[dimension][1]
    return f"expected {dimension.replace('_', ' ')} with its unit after the number, e.g. {example}; found {value!r}"


def _message(kind: str, value: object, sub: dict, error) -> str:
    if kind == "enum":
        return f"expected one of {', '.join(map(str, sub['enum']))}; found {value!r}"
    if kind == "type":
        wanted = sub["type"] if isinstance(sub["type"], list) else [sub["type"]]
        words = {"object": "a mapping", "array": "a list", "string": "text", "integer": "a whole number",
                 "number": "a number"}
        hint = " (quote it if it is text)" if isinstance(value, (bool, float)) and "string" in wanted else ""
        return f"expected {' or '.join(words.get(w, w) for w in wanted)}; found {_kind_of(value)}{hint}"
    if kind == "pattern":
        return f"{value!r} is not in the expected form: {sub.get('description', sub['pattern'])}"
    if kind in ("minItems", "maxItems"):
        return f"{sub.get('description', 'wrong number of items')} (found {len(value)} items)"
    if kind == "minProperties":
        return "give at least one value here, or remove the section"
    if kind == "minLength":
        return "must not be empty"
    if kind == "const":
        return f"expected {sub['const']!r}; found {value!r}"
    return error.message


def _kind_of(value: object) -> str:
    if value is None:
        return "nothing"
    if isinstance(value, bool):
        return str(value).lower()
    if isinstance(value, dict):
        return "a mapping"
    if isinstance(value, list):
        return "a list"
    return repr(value)


def _nearest(word: str, choices: list[str]) -> str:
    close = nearest(word, choices)
    return f"; did you mean {' or '.join(close)}?" if close else f"; allowed: {', '.join(choices)}"
