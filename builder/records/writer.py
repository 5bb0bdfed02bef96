"""Writing record YAML: plain data (str, int, float, bool, None, dates, lists, dicts) -> text.

Keys are written in the mapping's own order (`ordered` puts a record's keys in its schema's
order first). A string is written plain when a YAML reader gives back the very same string,
and quoted otherwise; multi-line text becomes a literal block (`|`). Every scalar form chosen
is read back before it is used, so what this module writes always loads as the data given.

"Reads back" is judged with PyYAML's safe loader (YAML 1.1, which also reads dates, `yes` and
`on`), so a plain value means the same to the records loader, to a YAML 1.1 reader and to a
YAML 1.2 one such as an editor's (the few 1.2-only number forms are quoted as well).
"""
from __future__ import annotations

import datetime as _dt
import functools
import math
import os
import re
from collections.abc import Mapping, Sequence
from pathlib import Path

import yaml

Comments = Mapping[tuple, str]  # path of keys -> comment written after the value
_YAML12_ONLY = re.compile(r"[-+]?(?:0o[0-7]+|0x[0-9a-fA-F]+|\.(?:inf|Inf|INF|nan|NaN|NAN))")
_COMMENT_COLUMN = 29


class UnwritableValue(TypeError):
    """A value this writer has no YAML form for (a set, an object...); carries the path."""

    def __init__(self, where: tuple, value: object):
        super().__init__(f"no YAML form for {type(value).__name__} at {where!r}")
        self.where = where
        self.value = value


def schema_modeline(new_file: str | os.PathLike, records_dir: str | os.PathLike, schema: str = "build") -> str:
    """The editor's schema line (without "# ") for a record file about to be written at
    `new_file`: the path from its folder to <records_dir>/../schema/<schema>.schema.json.
    Links are resolved with os.path.realpath, which does not fail on a loop of links."""
    schema_file = Path(os.path.realpath(records_dir)).parent / "schema" / f"{schema}.schema.json"
    relative = os.path.relpath(schema_file, os.path.realpath(Path(new_file).parent))
    return f"yaml-language-server: $schema={Path(relative).as_posix()}"


def dump(data: Mapping, modeline: str | None = None, comments: Comments | None = None) -> str:
    """The YAML text of a mapping, `modeline` (e.g. a schema line, without "# ") first.

    `comments` maps a path of keys such as ("clutch", "release_load") to a comment put after
    that key's line.
    """
    lines = [f"# {modeline}"] if modeline else []
    lines += _mapping(data, (), 0, comments or {})
    return "\n".join(lines) + "\n"


def ordered(data: Mapping, schema: Mapping) -> dict:
    """`data` with its keys in the order of the JSON Schema's `properties`, recursively for
    nested objects; keys the schema does not name keep their order after those it does."""
    properties = schema.get("properties", {})
    known = [key for key in properties if key in data]
    result = {}
    for key in known + [key for key in data if key not in properties]:
        value = data[key]
        inner = properties.get(key, {})
        result[key] = ordered(value, inner) if isinstance(value, Mapping) and "properties" in inner else value
    return result


def _mapping(data: Mapping, where: tuple, indent: int, comments: Comments) -> list[str]:
    pad = " " * indent
    lines = []
    for key, value in data.items():
        at = where + (key,)
        head = f"{pad}{_key(key, at)}:"
        comment = comments.get(at)
        if isinstance(value, Mapping) and value:
            lines.append(_commented(head, comment))
            lines += _mapping(value, at, indent + 2, comments)
        elif _is_list(value) and value and not all(_is_scalar(item) for item in value):
            lines.append(_commented(head, comment))
            lines += _block_list(value, at, indent + 2, comments)
        elif isinstance(value, str) and "\n" in value:
            block = _literal_block(value, indent + 2)
            if block is None:
                lines.append(_commented(f"{head} {_quoted(value)}", comment))
            else:
                lines.append(_commented(f"{head} {block[0]}", comment))
                lines += block[1:]
        else:
            lines.append(_commented(f"{head} {_inline(value, at)}", comment))
    return lines


def _block_list(items: Sequence, where: tuple, indent: int, comments: Comments) -> list[str]:
    pad = " " * indent
    lines = []
    for index, item in enumerate(items):
        at = where + (index,)
        if isinstance(item, Mapping) and item:
            body = _mapping(item, at, indent + 2, comments)
            lines += [f"{pad}- {body[0].lstrip()}"] + body[1:]
        elif _is_list(item) and item and not all(_is_scalar(inner) for inner in item):
            body = _block_list(item, at, indent + 2, comments)
            lines += [f"{pad}- {body[0].lstrip()}"] + body[1:]
        elif isinstance(item, str) and "\n" in item and (block := _literal_block(item, indent + 2)):
            lines += [f"{pad}- {block[0]}"] + block[1:]
        else:
            lines.append(_commented(f"{pad}- {_inline(item, at)}", comments.get(at)))
    return lines


def _commented(line: str, comment: str | None) -> str:
    if not comment:
        return line
    if "\n" in comment:
        raise UnwritableValue(("comment",), comment)
    return f"{line:<{_COMMENT_COLUMN}} # {comment}"


def _is_list(value: object) -> bool:
    return isinstance(value, (list, tuple))


def _is_scalar(value: object) -> bool:
    return not isinstance(value, (Mapping, list, tuple)) and not (isinstance(value, str) and "\n" in value)


def _inline(value: object, where: tuple) -> str:
    """A value on one line: a scalar, or a flow list of scalars, or {} / []."""
    if isinstance(value, Mapping):
        if value:
            raise UnwritableValue(where, value)
        return "{}"
    if _is_list(value):
        return "[" + ", ".join(_scalar(item, where + (index,), flow=True) for index, item in enumerate(value)) + "]"
    return _scalar(value, where)


def _key(key: object, where: tuple) -> str:
    if not isinstance(key, str):
        raise UnwritableValue(where, key)
    return key if _plain_key_ok(key) else _quoted(key)


def _scalar(value: object, where: tuple, flow: bool = False) -> str:
    if value is None:
        return "null"
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return ".nan"
        if math.isinf(value):
            return ".inf" if value > 0 else "-.inf"
        text = repr(value)
        if "e" in text and "." not in text:  # YAML 1.1 reads 1e-05 as text, 1.0e-05 as a number
            text = text.replace("e", ".0e", 1)
        return text
    if isinstance(value, _dt.datetime):
        raise UnwritableValue(where, value)  # a time of day has no place in a record
    if isinstance(value, _dt.date):
        return value.isoformat()
    if not isinstance(value, str):
        raise UnwritableValue(where, value)
    if "\n" in value:
        return _quoted(value)
    return value if _plain_ok(value, flow) else _quoted(value)


@functools.lru_cache(maxsize=8192)
def _plain_ok(text: str, flow: bool) -> bool:
    """Whether `text` written plain reads back as the same string (in a flow list when `flow`)."""
    if not text or text != text.strip() or _YAML12_ONLY.fullmatch(text) or "\t" in text:
        return False
    try:
        if flow:
            return yaml.safe_load(f"k: [{text}]") == {"k": [text]}
        return yaml.safe_load(f"k: {text}") == {"k": text}
    except yaml.YAMLError:
        return False


@functools.lru_cache(maxsize=1024)
def _plain_key_ok(key: str) -> bool:
    if not key or key != key.strip() or _YAML12_ONLY.fullmatch(key):
        return False
    try:
        return yaml.safe_load(f"{key}: x") == {key: "x"}
    except yaml.YAMLError:
        return False


def _quoted(text: str) -> str:
    """A double-quoted scalar with every character YAML cannot hold escaped (PyYAML's emitter)."""
    out = yaml.safe_dump(text, default_style='"', width=math.inf, allow_unicode=True)
    return out.removesuffix("\n").removesuffix("\n...")


def _literal_block(text: str, indent: int) -> list[str] | None:
    """`|` and the lines (indented `indent`, two deeper than the key or dash before them) of a
    literal block reading back as `text`; None when no literal block holds it (characters YAML
    will not take raw, trailing spaces on a last line...)."""
    body = text.rstrip("\n")
    trailing = len(text) - len(body)
    chomp = "-" if trailing == 0 else "" if trailing == 1 else "+"
    head = "|" + ("2" if body[:1] == " " else "") + chomp  # leading spaces need the indent given
    rows = body.split("\n") + [""] * (trailing - 1 if chomp == "+" else 0)
    pad = " " * indent
    lines = [head] + [pad + row if row else "" for row in rows]
    at_top = "k: " + head + "\n" + "\n".join("  " + row if row else "" for row in rows) + "\n"
    try:
        reread = yaml.safe_load(at_top)  # same relative indentation as where it will stand
    except yaml.YAMLError:
        return None
    return lines if reread == {"k": text} else None
