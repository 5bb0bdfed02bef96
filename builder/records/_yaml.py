"""Reading YAML records safely: a fast libyaml load, and a careful load that locates problems.

The fast load is tried first; anything unusual (a parse error, an anchor or alias, a duplicate
key) sends the file to the careful load, which composes nodes (line and column of every
value), checks aliases and duplicates, and returns located problems instead of raising.
"""
from __future__ import annotations

import errno
import functools
import re
import stat
from dataclasses import dataclass, field
from pathlib import Path

import yaml

from builder.presentation import encoding_message

MAX_BYTES = 256 * 1024  # a record is a few kilobytes
MAX_DEPTH = 64  # collections inside collections; libyaml's composer recurses in C and crashes on deep input
MAX_ALIASES = 64
MAX_NODES = 10_000  # nodes after expanding aliases

Where = tuple  # a location in a document: keys and list indices, e.g. ("pedal", "layout", "pad", 0)

# A sound upper bound on nesting, cheap enough for every file: flow openers plus two levels
# per column where a block collection can start (see _depth_bound). Only a file whose bound
# passes MAX_DEPTH has its parser events walked.
_LINE_PREFIX = re.compile(r"\n[ \t]*(?:(?:---|[-?:]|[&!][^ \t\n]*)[ \t]+)*")  # on "\n" + text
_PREFIX_TOKEN = re.compile(r"(?:---|[-?:]|[&!][^ \t\n]*)[ \t]+")
_MISSING = (errno.ENOENT, errno.ENOTDIR)  # what Path.exists() calls absent (a loop is said apart)
_TIMESTAMP = "tag:yaml.org,2002:timestamp"
_MERGE = "tag:yaml.org,2002:merge"


class Loader(yaml.CSafeLoader):
    """libyaml safe loader; dates stay strings (the records code parses and locates them).

    Plain scalars repeat across records (`7/8 in`, `DOT 4`), so their resolved tags are cached.
    """

    _tags: dict[str, str] = {}

    def resolve(self, kind, value, implicit):
        if kind is yaml.ScalarNode and implicit[0]:
            tag = self._tags.get(value)
            if tag is None:
                if len(self._tags) >= 10_000:
                    self._tags.clear()
                tag = self._tags[value] = super().resolve(kind, value, implicit)
            return tag
        return super().resolve(kind, value, implicit)


Loader.yaml_implicit_resolvers = {
    first: [(tag, regexp) for tag, regexp in resolvers if tag != _TIMESTAMP]
    for first, resolvers in yaml.CSafeLoader.yaml_implicit_resolvers.items()
}
_SCALARS = yaml.constructor.SafeConstructor()
_STR = "tag:yaml.org,2002:str"
_INT = "tag:yaml.org,2002:int"


class TypedInt(int):
    """An integer read from a plain YAML scalar, keeping the text as typed in `typed`.

    YAML 1.1 reads `0712` as octal 458, `1:30` as 90 (base 60), `0x1F` as 31 and `1_000`
    as 1000; a text field (a family code, a technician's initials) wants `0712`, so
    builder.records.convert.text() takes `typed`. Numbers stay numbers everywhere else.
    """

    typed: str


def _typed_int(node) -> TypedInt:
    number = TypedInt(_SCALARS.construct_yaml_int(node))
    number.typed = node.value
    return number


Loader.add_constructor(_INT, lambda loader, node: _typed_int(node))
_BUILD_SCALAR = {
    "tag:yaml.org,2002:null": lambda node: None,
    "tag:yaml.org,2002:bool": _SCALARS.construct_yaml_bool,
    _INT: _typed_int,
    "tag:yaml.org,2002:float": _SCALARS.construct_yaml_float,
}


def _plain(node) -> object:
    """Plain data from a node tree: str, int, float, bool, None, dict, list; NeedsCare otherwise."""
    kind = node.__class__
    if kind is yaml.ScalarNode:
        if node.tag == _STR:
            return node.value
        build = _BUILD_SCALAR.get(node.tag)
        if build is None:
            raise NeedsCare
        return build(node)
    if kind is yaml.MappingNode:
        mapping = {_plain(key): _plain(value) for key, value in node.value}
        if len(mapping) != len(node.value) or node.tag != "tag:yaml.org,2002:map":
            raise NeedsCare  # duplicate or merge keys, or an explicit tag
        return mapping
    if node.tag != "tag:yaml.org,2002:seq":
        raise NeedsCare
    return [_plain(item) for item in node.value]


class NeedsCare(Exception):
    """The fast path met something it does not report on; use the careful path."""


@dataclass
class Located:
    """A carefully loaded document: data, value and key positions (1-based), problems."""

    data: object = None
    values: dict[Where, tuple[int, int]] = field(default_factory=dict)
    keys: dict[Where, tuple[int, int]] = field(default_factory=dict)
    problems: list[tuple[Where, int, int, str]] = field(default_factory=list)  # (where, line, col, message)

    def where(self, path: Where, at_key: bool = False) -> tuple[int, int]:
        """Position of `path` (its key when `at_key`), else of its nearest located parent."""
        if at_key and path in self.keys:
            return self.keys[path]
        while path not in self.values and path:
            path = path[:-1]
        return self.values.get(path, (1, 1))


def read_text(path: Path) -> tuple[str | None, tuple[int, int, str] | None]:
    """The file's text, or (None, (line, col, message)) for a file we will not parse."""
    try:
        info = path.stat()  # once per file: kind and size
        if not stat.S_ISREG(info.st_mode):
            return None, (0, 0, "not a regular file")
        if info.st_size > MAX_BYTES:
            return None, (0, 0, f"file is {info.st_size} bytes; records are limited to {MAX_BYTES} bytes")
        with path.open("rb") as handle:
            raw = handle.read(MAX_BYTES + 1)  # the file may have grown since stat
    except OSError as error:
        if error.errno in _MISSING:
            return None, (0, 0, "no such file")
        if error.errno == errno.ELOOP:
            return None, (0, 0, "a loop of symbolic links (a link that leads back to itself); "
                                "point it at a file")
        return None, (0, 0, f"cannot read: {error.strerror or error}")
    if len(raw) > MAX_BYTES:
        return None, (0, 0, f"file is over {MAX_BYTES} bytes; records are limited to {MAX_BYTES} bytes")
    wide = _wide_encoding(raw)
    if wide:
        return None, (1, 1, encoding_message(wide))
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as error:
        line = raw.count(b"\n", 0, error.start) + 1
        col = error.start - (raw.rfind(b"\n", 0, error.start) + 1) + 1
        return None, (line, col, f"not UTF-8 text (byte 0x{raw[error.start]:02x}); save the file as UTF-8")
    if text.startswith("\ufeff"):
        text = text[1:]
    if not text.strip():
        return None, (1, 1, "empty file")
    return text, None


_WIDE_MARKS = ((b"\xff\xfe\x00\x00", "UTF-32"), (b"\x00\x00\xfe\xff", "UTF-32"),
               (b"\xff\xfe", "UTF-16"), (b"\xfe\xff", "UTF-16"))


def _wide_encoding(raw: bytes) -> str | None:
    """"UTF-16" or "UTF-32" for a file saved in a wide encoding (by its byte order mark, or
    by the zero bytes that ASCII text has between its letters in UTF-16), else None."""
    for mark, name in _WIDE_MARKS:
        if raw.startswith(mark):
            return name
    if b"\x00" in raw[:64]:
        head = raw[:64]
        if head[1::2].count(0) * 2 >= len(head) // 2 or head[0::2].count(0) * 2 >= len(head) // 2:
            return "UTF-16"
    return None


def _depth_bound(text: str) -> int:
    """An upper bound on how deeply collections nest in `text`, from characters alone.

    Flow collections open with `[` or `{` (every one counted, even in strings and comments).
    A block collection nested in another starts at a greater column, except a sequence
    written level with its mapping's keys (YAML 1.1, 7.2 and 7.3), so block nesting is at most
    two levels per column where a block collection can start: a line's indentation, or the
    column after each compact indicator (`- `, `? `, `: `), anchor or tag that opens the line.
    Lines break at \\n, \\r, NEL, LS and PS alike (YAML 1.1, 5.4).
    tests/test_fuzz.py checks the bound against the parser's own events.
    """
    flow = text.count("[") + text.count("{")
    if any(mark in text for mark in _OTHER_BREAKS):
        for mark in _OTHER_BREAKS:
            text = text.replace(mark, "\n")
    spare = (MAX_DEPTH - flow) // 2
    if spare > 0 and "&" not in text and "!" not in text and not _long_prefix(spare).search("\n" + text):
        # Every line's prefix (indentation and indicators) is shorter than `spare`, so block
        # collections start in at most `spare` columns: one substring search, no set of prefixes.
        return flow + 2 * spare
    columns = set()
    for found in set(_LINE_PREFIX.findall("\n" + text)):  # a literal "\n" first: faster than ^ and re.M
        prefix = found[1:]
        indent = len(prefix) - len(prefix.lstrip(" \t"))
        columns.add(indent)
        columns.update(token.end() for token in _PREFIX_TOKEN.finditer(prefix, indent))
    return flow + 2 * len(columns)


_OTHER_BREAKS = ("\r", "\x85", "\u2028", "\u2029")


@functools.lru_cache(maxsize=None)
def _long_prefix(length: int) -> re.Pattern:
    """A line whose first `length` characters could all belong to an indentation-and-indicator
    prefix (anchors and tags excluded: the caller has none)."""
    return re.compile(r"\n[ \t?:-]{%d}" % length)


_OPEN = (yaml.SequenceStartEvent, yaml.MappingStartEvent)
_CLOSE = (yaml.SequenceEndEvent, yaml.MappingEndEvent)


def _nesting_problem(text: str) -> tuple[int, int, str] | None:
    """Where collections first nest deeper than MAX_DEPTH, measured on libyaml's own parser
    events (its event parser is iterative; the composer that builds nodes recurses)."""
    if _depth_bound(text) <= MAX_DEPTH:
        return None
    loader = Loader(text)
    depth = 0
    try:
        while True:
            event = loader.get_event()
            if event is None:
                return None
            if isinstance(event, _OPEN):
                depth += 1
                if depth > MAX_DEPTH:
                    mark = event.start_mark
                    return mark.line + 1, mark.column + 1, f"nesting is deeper than {MAX_DEPTH} levels"
            elif isinstance(event, _CLOSE):
                depth -= 1
    except yaml.YAMLError:
        return None  # the composer stops at the same error, no deeper than here
    finally:
        loader.dispose()


def _char_at(text: str, line: int, column: int) -> str:
    """The character at a 0-based line and column ("" past the end)."""
    lines = text.split("\n")
    return lines[line][column:column + 1] if line < len(lines) else ""


def _line_col(text: str, offset: int) -> tuple[int, int]:
    return text.count("\n", 0, offset) + 1, offset - (text.rfind("\n", 0, offset) + 1) + 1


def fast_load(text: str) -> object:
    """Plain data from libyaml; NeedsCare for anything the careful path must look at."""
    if "&" in text or "*" in text or _nesting_problem(text) is not None:
        raise NeedsCare
    loader = Loader(text)
    try:
        return _plain(loader.get_single_node())
    except NeedsCare:
        raise
    except Exception as error:  # any parse or construction failure: report it carefully
        raise NeedsCare from error
    finally:
        loader.dispose()


def careful_load(text: str) -> Located:
    """Compose nodes, check aliases and duplicate keys, construct data; problems located."""
    doc = Located()
    nesting = _nesting_problem(text)
    if nesting:
        doc.problems.append(((), *nesting))
        return doc
    loader = Loader(text)
    try:
        root = loader.get_single_node()
        if root is None:
            doc.problems.append(((), 1, 1, "the file holds no YAML document"))
            return doc
        doc.problems.extend(_graph_problems(root))
        if not doc.problems:
            _index(root, doc)
            doc.data = loader.construct_document(root)
    except yaml.MarkedYAMLError as error:
        mark = error.problem_mark or error.context_mark
        message = " ".join(filter(None, [error.context, error.problem]))
        line_col = (mark.line + 1, mark.column + 1) if mark else (1, 1)
        if mark and "tab" not in message and _char_at(text, mark.line, mark.column) == "\t":
            message += " (a tab: YAML indents with spaces only)"
        doc.problems.append(((), *line_col, f"YAML: {message}"))
    except yaml.YAMLError as error:
        position = getattr(error, "position", None)
        line_col = _line_col(text, position) if isinstance(position, int) else (1, 1)
        doc.problems.append(((), *line_col, f"YAML: {error}"))
    except (ValueError, TypeError, OverflowError) as error:  # a scalar libyaml accepted but Python cannot build
        doc.problems.append(((), 1, 1, f"YAML: {error}"))
    finally:
        loader.dispose()
    return doc


def _children(node) -> list:
    if isinstance(node, yaml.MappingNode):
        return [item for pair in node.value for item in pair]
    if isinstance(node, yaml.SequenceNode):
        return list(node.value)
    return []


def _mark(node) -> tuple[int, int]:
    return node.start_mark.line + 1, node.start_mark.column + 1


def _graph_problems(root) -> list[tuple[Where, int, int, str]]:
    """Aliases beyond MAX_ALIASES, expansion beyond MAX_NODES, nesting through aliases deeper
    than MAX_DEPTH (each alias can add a nested value's depth), or a node containing itself."""
    sizes: dict[int, int] = {}
    depths: dict[int, int] = {}
    open_nodes: set[int] = set()
    aliases = 0
    stack = [(root, False)]
    while stack:
        node, finished = stack.pop()
        key = id(node)
        if finished:
            open_nodes.discard(key)
            children = _children(node)
            sizes[key] = 1 + sum(sizes[id(child)] for child in children)
            depths[key] = (1 + max(depths[id(child)] for child in children)) if children else 0
            if depths[key] > MAX_DEPTH:
                return [((), *_mark(node), f"nesting is deeper than {MAX_DEPTH} levels through aliases")]
            if sizes[key] > MAX_NODES:
                how = " through anchors and aliases" if aliases else ""
                return [((), *_mark(node), f"expands to more than {MAX_NODES} values{how}; a record holds far fewer")]
            continue
        if key in sizes:
            aliases += 1
            if aliases > MAX_ALIASES:
                return [((), *_mark(node), f"more than {MAX_ALIASES} aliases; write the values out")]
            continue
        if key in open_nodes:
            return [((), *_mark(node), "an alias refers to a value that contains it")]
        open_nodes.add(key)
        stack.append((node, True))
        stack.extend((child, False) for child in _children(node))
    return []


def _index(root, doc: Located) -> None:
    """Record value and key positions by path; report duplicate keys."""
    stack = [((), root)]
    while stack:
        path, node = stack.pop()
        doc.values.setdefault(path, _mark(node))
        if isinstance(node, yaml.SequenceNode):
            stack.extend((path + (index,), child) for index, child in enumerate(node.value))
        elif isinstance(node, yaml.MappingNode):
            first_seen: dict[str, int] = {}
            kept: dict[str, tuple] = {}  # the data keeps a repeated key's last value: so do we
            for key_node, value_node in node.value:
                if key_node.tag == _MERGE or not isinstance(key_node, yaml.ScalarNode):
                    continue
                name = key_node.value
                line, col = _mark(key_node)
                if name in first_seen:
                    doc.problems.append((path + (name,), line, col, f"duplicate key {name!r} (first at line {first_seen[name]})"))
                else:
                    first_seen[name] = line
                kept[name] = ((line, col), value_node)
            for name, (key_at, value_node) in kept.items():
                doc.keys[path + (name,)] = key_at
                if not isinstance(value_node, yaml.ScalarNode):  # a section is shown at its key
                    doc.values[path + (name,)] = key_at
                stack.append((path + (name,), value_node))
