"""Writing records: plain values (text, lists, mappings) as YAML in the record's own layout.

A scalar is written plain when the records loader reads it back as the same text, else
double-quoted; a list of pairs (a load curve) as one flow pair per line; any other list as a
flow list; text holding line breaks as a literal block. Comments may follow any key. Every
file starts with the `# yaml-language-server: $schema=...` line that gives editors the
schema. What this writes, the loader reads back unchanged (tests/test_records_writer.py).
"""
from __future__ import annotations

import datetime as dt
import functools
import json
from collections.abc import Mapping, Sequence

import yaml

from builder.records._yaml import Loader

COMMENT_COLUMN = 29


def modeline(schema_path: str) -> str:
    """The editor's schema line, e.g. modeline("../../../schema/build.schema.json")."""
    return f"# yaml-language-server: $schema={schema_path}"


def scalar(value: object) -> str:
    """A YAML scalar: plain when it reads back as the same text, else double-quoted."""
    if isinstance(value, dt.date):
        return value.isoformat()
    text = str(value)
    if _reads_back(text):
        return text
    # A JSON string is a YAML double-quoted scalar; escape everything when any character is
    # not printable (line breaks, U+2028, controls), so nothing is folded or lost.
    return json.dumps(text, ensure_ascii=not text.isprintable())


@functools.lru_cache(maxsize=4096)
def _reads_back(text: str) -> bool:
    """Whether `k: text` loads back as the string text with the records loader (memoised)."""
    try:
        return text == text.strip() and yaml.load(f"k: {text}", Loader=Loader) == {"k": text}
    except yaml.YAMLError:
        return False


def _literal_block(text: str) -> bool:
    """Text a literal block keeps exactly: line breaks in it, one at most at the end, no
    leading blank or space, and only printable characters."""
    return ("\n" in text and not text.endswith("\n\n") and text[:1] not in (" ", "\n")
            and all(ch == "\n" or (ch.isprintable() and ch != "\t") for ch in text))


def flow(values: Sequence) -> str:
    return "[" + ", ".join(scalar(v) for v in values) + "]"


def _with_comment(text: str, comment: str | None) -> str:
    return f"{text:<{COMMENT_COLUMN}} # {comment}" if comment else text


def mapping_lines(values: Mapping, comments: Mapping | None = None, indent: int = 0) -> list[str]:
    """Block-mapping lines for `values` (key order kept); `comments`: key -> trailing comment."""
    pad, comments = " " * indent, comments or {}
    lines = []
    for key, value in values.items():
        comment = comments.get(key)
        if isinstance(value, Mapping):
            lines.append(_with_comment(f"{pad}{key}:", comment))
            lines += mapping_lines(value, {}, indent + 2)
        elif isinstance(value, (list, tuple)) and value and isinstance(value[0], (list, tuple)):
            lines.append(_with_comment(f"{pad}{key}:", comment))
            lines += [f"{pad}  - {flow(pair)}" for pair in value]
        elif isinstance(value, (list, tuple)):
            lines.append(_with_comment(f"{pad}{key}: {flow(value)}", comment))
        elif isinstance(value, str) and _literal_block(value):
            chomp = "" if value.endswith("\n") else "-"
            lines.append(_with_comment(f"{pad}{key}: |{chomp}", comment))
            lines += [f"{pad}  {row}" if row else "" for row in value.removesuffix("\n").split("\n")]
        else:
            lines.append(_with_comment(f"{pad}{key}: {scalar(value)}", comment))
    return lines


def document(schema_path: str, values: Mapping, comments: Mapping | None = None,
             header: Sequence[str] = ()) -> str:
    """A whole record file: the schema line, header comment lines, then the mapping."""
    lines = [modeline(schema_path), *(f"# {line}" for line in header)]
    return "\n".join(lines + mapping_lines(values, comments)) + "\n"
