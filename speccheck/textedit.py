"""Edits of a YAML build file made in its text, so that every untouched byte stays as it was.

A YAML library that loads and dumps a file rewrites it: comments move, quoting and flow style
change, blank lines go. Here the file is never dumped. Each edit is a replacement of one span of
characters, located through the positions speccheck/yamlnodes.py records for every key and
value (yamlnodes stays the only module that parses YAML); the new text is rendered in the style
the old text used (plain, single- or double-quoted; block or flow collection; the file's own
line ending and indentation). `apply` splices the edits in; the caller writes the result with
speccheck/files.write_atomic.

    doc = yamlnodes.parse(text)
    edits = [replace_value(text, doc, ("parts", "C6", "value"), "39 pF"),
             insert_entry(text, doc, ("parts", "C20"), "positive", "U2.out", after="ends")]
    new_text = apply(text, edits)

Values are Python str, int, float or bool. A str is written so that it reads back as that same
string (quoted when plain text would read as a number, a boolean or null, or would break the
YAML); int, float and bool are written plain. Offsets are character offsets into the str that
was parsed. See /work/coord/textedit-api.md for the contract.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from typing import Any

from speccheck import yamlnodes

Scalar = str | int | float | bool
Value = Scalar | dict | list  # a dict or list is written as a flow collection: {a: 1, b: [x, y]}


class EditTrouble(Exception):
    """An edit that cannot be made in place (unknown path, a block scalar, a null mapping ...)."""


@dataclass(frozen=True, slots=True)
class Edit:
    """Replace text[start:end] with `text`. start == end is an insertion."""

    start: int
    end: int
    text: str


# -- rendering scalars -------------------------------------------------------------------------

_BREAKS = "\r\n\x85\u2028\u2029"
_NON_STR_PLAIN = re.compile(
    r"~|null|Null|NULL|true|True|TRUE|false|False|FALSE"
    r"|[-+]?[0-9]+|0o[0-7]+|0x[0-9a-fA-F]+"
    r"|[-+]?(\.[0-9]+|[0-9]+(\.[0-9]*)?)([eE][-+]?[0-9]+)?"
    r"|[-+]?\.(inf|Inf|INF)|\.(nan|NaN|NAN)"
)  # YAML 1.2.2 section 10.3.2, as yamlnodes resolves


def _printable(ch: str) -> bool:
    """YAML 1.2.2 section 5.1 printable characters, less the breaks and the byte-order mark."""
    code = ord(ch)
    return (
        0x20 <= code <= 0x7E
        or 0xA0 <= code <= 0xD7FF
        or 0xE000 <= code <= 0xFFFD
        or 0x10000 <= code <= 0x10FFFF
    ) and ch not in "\u2028\u2029\ufeff"


_ESCAPES = {"\\": "\\\\", '"': '\\"', "\t": "\\t", "\n": "\\n", "\r": "\\r", "\x00": "\\0"}


def double_quoted(value: str) -> str:
    """A YAML double-quoted scalar that reads back as exactly `value` (escapes per section 5.7)."""
    out = []
    for ch in value:
        if ch in _ESCAPES:
            out.append(_ESCAPES[ch])
        elif _printable(ch):
            out.append(ch)
        elif ord(ch) <= 0xFF:
            out.append(f"\\x{ord(ch):02X}")
        elif ord(ch) <= 0xFFFF:
            out.append(f"\\u{ord(ch):04X}")
        else:
            out.append(f"\\U{ord(ch):08X}")
    return '"' + "".join(out) + '"'


_PLAIN_EXTRA = set(" _.-+/()%°·")


def plain_ok(value: str, *, flow: bool = False) -> bool:
    """Whether `value` can be written unquoted and read back as the same string.

    Deliberately narrow (letters, digits, spaces and _ . - + / ( ) % ° ·, starting with a letter,
    a digit, a sign or a point): values such as '4.7 kohm', '-100 dBm', 'U1.quad' or 'time-lag'
    stay plain, and anything YAML could read otherwise is quoted. `flow` is kept for callers;
    none of these characters means anything inside a flow collection."""
    if not value or value != value.strip(" ") or "  " in value or _NON_STR_PLAIN.fullmatch(value):
        return False
    if not value[0].isalnum() and not (value[0] in "-+." and value[1:2].isalnum()):
        return False
    return all(ch.isalnum() or ch in _PLAIN_EXTRA for ch in value) and value.isprintable()


def render(value: Value, style: str = "plain", *, flow: bool = False) -> str:
    """Text for a value, in `style` ('plain', "'", '"') where that style can hold it; a dict or a
    list becomes a flow collection."""
    if isinstance(value, dict):
        return (
            "{"
            + ", ".join(f"{render_key(str(k), flow=True)}: {render(v, flow=True)}" for k, v in value.items())
            + "}"
        )
    if isinstance(value, list | tuple):
        return "[" + ", ".join(render(v, flow=True) for v in value) + "]"
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
        return text if _NON_STR_PLAIN.fullmatch(text) else f"{value:.17g}"
    if not isinstance(value, str):
        raise EditTrouble(f"cannot write a {type(value).__name__} as a YAML scalar")
    if style == "'" and all(_printable(ch) for ch in value):
        return "'" + value.replace("'", "''") + "'"
    if style == "plain" and plain_ok(value, flow=flow):
        return value
    return double_quoted(value)


def render_key(key: str, *, flow: bool) -> str:
    return key if plain_ok(key, flow=flow) else double_quoted(key)


# -- finding places in the text ----------------------------------------------------------------


def _value_span(doc: yamlnodes.Document, path: tuple) -> yamlnodes.Span:
    span = doc.value_span(path)
    if span is None:
        raise EditTrouble(f"no value at {_dotted(path)}")
    return span


def _dotted(path: tuple) -> str:
    return ".".join(f"[{p}]" if isinstance(p, int) else str(p) for p in path) or "(top)"


def _data_at(doc: yamlnodes.Document, path: tuple):
    data: Any = doc.data
    for part in path:
        try:
            data = data[part]
        except (KeyError, IndexError, TypeError):
            raise EditTrouble(f"no value at {_dotted(path)}") from None
    return data


def _in_flow(doc: yamlnodes.Document, path: tuple) -> bool:
    """Whether the node at path sits inside a flow collection (where ,[]{} end a plain scalar)."""
    for depth in range(len(path) - 1, -1, -1):
        span = doc.value_span(path[:depth])
        if span is not None and span.style == "flow":
            return True
    return False


def _last_offset(text: str, doc: yamlnodes.Document, path: tuple) -> int:
    """Offset just past the last character that belongs to the value at path.

    A block collection's end lies where the next token starts (past trailing comments and blank
    lines), so walk down to its last scalar or flow collection instead."""
    span = _value_span(doc, path)
    while span.kind != "scalar" and span.style == "block":
        data = _data_at(doc, path)
        if not data:
            break
        path = path + ((list(data)[-1],) if isinstance(data, dict) else (len(data) - 1,))
        span = _value_span(doc, path)
    end = span.end
    if span.style in ("|", ">"):  # a block scalar runs to the start of the next line: step back
        while end > span.start and text[end - 1] in " \t" + _BREAKS:
            end -= 1
    return end


def _line_end(text: str, offset: int) -> int:
    """Offset of the line break that ends the line holding `offset` (len(text) at the end)."""
    while offset < len(text) and text[offset] not in _BREAKS:
        offset += 1
    return offset


def _line_start(text: str, offset: int) -> int:
    while offset > 0 and text[offset - 1] not in _BREAKS:
        offset -= 1
    return offset


def newline_of(text: str) -> str:
    """The file's own line ending (the first one it uses; '\\n' when it has none)."""
    match = re.search(r"\r\n|\r|\n", text)
    return match.group(0) if match else "\n"


def _entry_path(doc: yamlnodes.Document, path: tuple, after: str | None) -> tuple:
    mapping = _data_at(doc, path)
    if not isinstance(mapping, dict):
        raise EditTrouble(f"{_dotted(path)} is not a mapping with keys")
    if after is None:
        return path + (list(mapping)[-1],) if mapping else path
    if after not in mapping:
        raise EditTrouble(f"{_dotted(path)} has no key '{after}'")
    return path + (after,)


# -- the edits ---------------------------------------------------------------------------------


def replace_value(text: str, doc: yamlnodes.Document, path: tuple, value: Scalar) -> Edit:
    """Replace the scalar at path, keeping its quoting style where the new value allows it."""
    path = tuple(path)
    span = _value_span(doc, path)
    if span.kind != "scalar":
        raise EditTrouble(f"{_dotted(path)} is a {span.kind}, not a single value")
    if span.style in ("|", ">"):
        raise EditTrouble(f"{_dotted(path)} is a block scalar ('{span.style}'); edit it by hand")
    if span.start == span.end:  # an empty (null) value: 'key:' with nothing after it
        return Edit(span.start, span.end, " " + render(value, flow=_in_flow(doc, path)))
    return Edit(span.start, span.end, render(value, span.style, flow=_in_flow(doc, path)))


def rename_key(text: str, doc: yamlnodes.Document, path: tuple, new_key: str) -> Edit:
    """Rename the mapping key of path; its value, comments and position stay."""
    path = tuple(path)
    span = doc.key_span(path)
    if span is None:
        raise EditTrouble(f"no key at {_dotted(path)}")
    if new_key in (_data_at(doc, path[:-1]) or {}) and new_key != path[-1]:
        raise EditTrouble(f"{_dotted(path[:-1])} already has a key '{new_key}'")
    return Edit(span.start, span.end, render_key(new_key, flow=_in_flow(doc, path)))


def insert_entry(
    text: str, doc: yamlnodes.Document, path: tuple, key: str, value: Value, *, after: str | None = None
) -> Edit:
    """Add `key: value` to the mapping at path, after the entry `after` (default: the last one).

    In a block mapping the entry goes on a new line at the mapping's indentation, after the
    whole of the previous entry (and after any comment on that entry's last line); in a flow
    mapping it goes in after the previous entry, separated by ', '."""
    path = tuple(path)
    span = _value_span(doc, path)
    mapping = _data_at(doc, path)
    if span.kind != "mapping" or not isinstance(mapping, dict):
        raise EditTrouble(f"{_dotted(path)} is not a mapping; cannot add '{key}' to it")
    if key in mapping:
        raise EditTrouble(f"{_dotted(path)} already has a key '{key}'")
    flow = span.style == "flow"
    entry = f"{render_key(key, flow=flow)}: {render(value, flow=flow)}"
    prev = _entry_path(doc, path, after)
    if flow:
        if not mapping:  # '{}' -> '{key: value}'
            return Edit(span.start + 1, span.start + 1, entry)
        return Edit(_last_offset(text, doc, prev), _last_offset(text, doc, prev), ", " + entry)
    first = doc.key_span(path + (next(iter(mapping)),))
    assert first is not None
    indent = first.col - 1
    at = _line_end(text, _last_offset(text, doc, prev))
    return Edit(at, at, newline_of(text) + " " * indent + entry)


def append_item(text: str, doc: yamlnodes.Document, path: tuple, value: Value) -> Edit:
    """Add an item at the end of the sequence at path, in its style (block '- ' or flow ', ')."""
    path = tuple(path)
    span = _value_span(doc, path)
    items = _data_at(doc, path)
    if span.kind != "sequence" or not isinstance(items, list):
        raise EditTrouble(f"{_dotted(path)} is not a list")
    if span.style == "flow":
        rendered = render(value, flow=True)
        if not items:
            return Edit(span.start + 1, span.start + 1, rendered)
        end = _last_offset(text, doc, path + (len(items) - 1,))
        return Edit(end, end, ", " + rendered)
    first = _value_span(doc, path + (0,))
    dash = text.rfind("-", _line_start(text, first.start), first.start)
    if dash < 0:
        raise EditTrouble(f"cannot find the '-' of the first item of {_dotted(path)}")
    indent = dash - _line_start(text, dash)
    at = _line_end(text, _last_offset(text, doc, path + (len(items) - 1,)))
    return Edit(at, at, newline_of(text) + " " * indent + "- " + render(value))


def remove_entry(text: str, doc: yamlnodes.Document, path: tuple) -> Edit:
    """Remove `key: value` at path: whole lines in a block mapping, the entry and one comma in
    a flow mapping (the comma before it, or after it for the first entry: so remove the first
    and second entries of one flow mapping in two passes). A block entry must start its line
    (not share it with a '- ')."""
    path = tuple(path)
    key = doc.key_span(path)
    if key is None:
        raise EditTrouble(f"no key at {_dotted(path)}")
    parent = _value_span(doc, path[:-1])
    end = _last_offset(text, doc, path)
    if parent.style == "flow":  # take the comma before the entry; the first entry takes the one after
        before = re.compile(r",\s*\Z").search(text[parent.start : key.start])
        if before:
            return Edit(parent.start + before.start(), end, "")
        after = re.compile(r"\s*,[ \t]*").match(text, end)
        return Edit(key.start, after.end() if after else end, "")
    start = _line_start(text, key.start)
    if text[start : key.start].strip(" \t"):
        raise EditTrouble(f"{_dotted(path)} shares its line with a list dash; edit it by hand")
    stop = _line_end(text, end)
    stop += 2 if text.startswith("\r\n", stop) else (1 if stop < len(text) else 0)
    return Edit(start, stop, "")


def apply(text: str, edits: list[Edit]) -> str:
    """Splice the edits into text. They must not overlap; insertions at one place keep their order."""
    ordered = sorted(enumerate(edits), key=lambda item: (item[1].start, item[1].end, item[0]))
    out, pos = [], 0
    for _, edit in ordered:
        if edit.start < pos:
            raise EditTrouble("two edits overlap")
        out.append(text[pos : edit.start])
        out.append(edit.text)
        pos = edit.end
    out.append(text[pos:])
    return "".join(out)


def changed_lines(old: str, new: str) -> list[int]:
    """1-based numbers of the lines of `old` that differ in `new` (for diff tests and reports)."""
    import difflib

    a, b = old.splitlines(keepends=True), new.splitlines(keepends=True)
    lines: list[int] = []
    for tag, i1, i2, _, _ in difflib.SequenceMatcher(None, a, b, autojunk=False).get_opcodes():
        if tag != "equal":
            lines.extend(range(i1 + 1, max(i2, i1 + 1) + 1))
    return lines
