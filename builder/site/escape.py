"""Escaping of record text for the published site.

Every piece of text that comes from a record (ids, family, notes, outcome, vehicle, ...)
passes through `md` before it goes into a Markdown page, and through `xml` before it goes
into an SVG picture. Nothing from a record can become markup, a link, a template tag, an
HTML comment or Markdown emphasis, and nothing can break a table row.
"""
from __future__ import annotations

import html
import json
import re

# Python-Markdown treats a backslash before these as the literal character. Inline, only
# these can start markup ("(", ".", "-", "!" need a "[" or the start of a line to matter).
_BACKSLASHED = "\\`*_{}[]|"
_LINE_START = "#+-.!"  # list, heading, rule and admonition markers at a line start
_ENTITIES = {"&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;"}

_INLINE = {ord(c): "\\" + c for c in _BACKSLASHED}
_INLINE.update({ord(c): e for c, e in _ENTITIES.items()})
_INLINE.update({code: None for code in range(32)})  # control characters go
_INLINE.update({ord("\t"): " ", ord("\n"): " ", ord("\r"): " ", 0x7F: None})
_INLINE.update({0x2028: " ", 0x2029: " "})
_ORDERED_ITEM = re.compile(r"^(\d+)\.")


def md(value: object) -> str:
    """Record text as inert inline Markdown: one line, no markup, safe inside a table cell,
    a heading or at the start of a line."""
    if value is None:
        return ""
    text = " ".join(str(value).translate(_INLINE).split())
    if text.endswith("#"):
        text = text[:-1] + "\\#"  # a heading would drop its closing hashes
    first = text[:1]
    if first and first in _LINE_START:
        text = "\\" + text
    elif first == "=":
        text = "&#61;" + text[1:]  # a setext heading underline
    elif first.isdigit():
        text = _ORDERED_ITEM.sub(r"\1\\.", text)
    return text


def md_paragraphs(value: object) -> str:
    """Multi-line record text (notes) as inert Markdown paragraphs, line breaks kept."""
    if value is None:
        return ""
    text = str(value).replace("\r\n", "\n").replace("\r", "\n")
    paragraphs = []
    for block in text.split("\n\n"):
        lines = [md(line) for line in block.split("\n")]
        lines = [line for line in lines if line]
        if lines:
            paragraphs.append("<br>\n".join(lines))
    return "\n\n".join(paragraphs)


def xml(value: object) -> str:
    """Record text for SVG text nodes and attributes."""
    if value is None:
        return ""
    text = "".join(ch for ch in str(value) if ch >= " " or ch in "\t\n")
    return html.escape(text, quote=True)


def front_matter_title(value: object, meta: dict | None = None) -> str:
    """A page's YAML front matter giving its title as escaped HTML text, and `meta` (our own
    keys and values, never record text: e.g. {"search": {"boost": 3}, "hide": ["toc"]}).

    The theme prints page titles unescaped (and strips tags, which unescapes entities) in
    <title>; a title from front matter is printed as given, so it stays escaped.
    """
    extra = "".join(f"{key}: {json.dumps(item)}\n" for key, item in (meta or {}).items())
    return f"---\ntitle: {json.dumps(xml(' '.join(str(value).split())))}\n{extra}---\n\n"


def plain(value: object) -> str:
    """Short config text (the site title) with markup characters removed, not escaped:
    the theme prints it both escaped and unescaped."""
    return " ".join("".join(ch for ch in str(value) if ch >= " " and ch not in "<>&\"'{}`").split())
