"""The only module that talks to the YAML engine.

It turns YAML text into plain Python data (dict, list, str, int, float, bool, None) and a
table of positions keyed by the path of each value, so that every later stage can point at
file:line:col without knowing which YAML engine read the file. Duplicate keys, aliases and
merge keys are reported here, because the plain data can no longer show them.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

MAX_BYTES = 1_000_000  # a hand-written build plan is a few kB; refuse anything absurd
MAX_DEPTH = 32
MAX_INT_DIGITS = 30
MAX_BRACKETS = 15000  # the C composer recurses per level: fine at 20 000 deep, overflows near 50 000
_COMPACT_DASHES = re.compile(r"(?:^|:[ \t])[ \t]*(?:[-?:][ \t]+){" + str(MAX_DEPTH + 1) + ",}", re.MULTILINE)

Path = tuple  # of str | int


@dataclass(frozen=True, slots=True)
class Mark:
    line: int  # 1-based
    col: int  # 1-based
    end_line: int
    end_col: int


@dataclass(slots=True)
class Problem:
    kind: str  # "syntax", "duplicate-key", "alias", "tag", "limit", "encoding"
    message: str
    mark: Mark
    path: Path = ()


class Document:
    """Plain data, the YAML nodes behind each value and key (for positions), problems, comments.

    Positions are taken from the nodes only when asked for: most values are never pointed at,
    and turning every node's marks into a Mark was a tenth of the time of a check.
    """

    __slots__ = ("_keys", "_values", "comments", "data", "key_nodes", "problems", "value_nodes")

    def __init__(self):
        self.data = None
        self.value_nodes: dict = {}  # path -> node of the value
        self.key_nodes: dict = {}  # path -> node of the mapping key
        self.problems: list = []
        self.comments: dict = {}  # line -> comment text (without '#')
        self._values = self._keys = None

    @property
    def values(self) -> dict:
        """path -> Mark of every value (built on first use)."""
        if self._values is None:
            self._values = {p: _mark(n) for p, n in self.value_nodes.items()}
        return self._values

    @property
    def keys(self) -> dict:
        """path -> Mark of every mapping key (built on first use)."""
        if self._keys is None:
            self._keys = {p: _mark(n) for p, n in self.key_nodes.items()}
        return self._keys

    def mark(self, path: Path) -> Mark:
        """Position of the value at path, or of the nearest enclosing value."""
        path = tuple(path)
        nodes = self.value_nodes
        while path not in nodes and path:
            path = path[:-1]
        node = nodes.get(path)
        return _mark(node) if node is not None else Mark(1, 1, 1, 1)

    def key_mark(self, path: Path) -> Mark:
        node = self.key_nodes.get(tuple(path))
        return _mark(node) if node is not None else self.mark(path)

    def value_span(self, path: Path) -> Span | None:
        """Where the value at path sits in the text (character offsets) and how it is written."""
        node = self.value_nodes.get(tuple(path))
        return _span(node) if node is not None else None

    def key_span(self, path: Path) -> Span | None:
        """Where the mapping key of path sits in the text and how it is written."""
        node = self.key_nodes.get(tuple(path))
        return _span(node) if node is not None else None


@dataclass(frozen=True, slots=True)
class Span:
    """A node's place in the text: [start, end) as character offsets into the parsed string.

    style: 'plain', "'", '"', '|', '>' for scalars; 'block' or 'flow' for mappings and
    sequences. kind: 'scalar', 'mapping' or 'sequence'. The end of a block collection lies
    where the next token starts (it may include trailing blank lines and comments).
    """

    start: int
    end: int
    style: str
    kind: str
    line: int  # 1-based line of the start
    col: int  # 1-based column of the start


def _span(node) -> Span:
    s, e = node.start_mark, node.end_mark
    if node.id == "scalar":
        style = node.style or "plain"
    else:
        style = "flow" if node.flow_style else "block"
    return Span(s.index, e.index, style, node.id, s.line + 1, s.column + 1)


def _mark(node) -> Mark:
    s, e = node.start_mark, node.end_mark
    return Mark(s.line + 1, s.column + 1, e.line + 1, e.column + 1)


def _yaml():
    from ruamel.yaml import YAML
    from ruamel.yaml.nodes import ScalarNode, SequenceNode
    from ruamel.yaml.resolver import BaseResolver
    from ruamel.yaml.tag import Tag

    global _IMPLICIT
    _IMPLICIT = Tag(suffix=STR)  # the one tag object the resolver gives every untagged scalar
    tags = {ScalarNode: _IMPLICIT, SequenceNode: Tag(suffix="tag:yaml.org,2002:seq")}
    mapping_tag = Tag(suffix="tag:yaml.org,2002:map")

    class PlainResolver(BaseResolver):
        """Leaves every scalar a string: _scalar resolves plain ones by the YAML 1.2 core schema.

        ruamel.yaml's own resolver is written for every YAML version at once and cost more
        than half the time of reading a build file.
        """

        def __init__(self, *args, **kwargs):
            pass

        def resolve(self, kind, value, implicit):
            return tags.get(kind, mapping_tag)

        def descend_resolver(self, *args):
            pass

        def ascend_resolver(self, *args):
            pass

    try:
        engine = YAML(typ="safe", pure=False)
    except Exception:  # no C extension on this interpreter: same output, slower
        engine = YAML(typ="safe", pure=True)
    engine.Resolver = PlainResolver
    return engine


_ENGINE = None
_IMPLICIT: object = None  # set by _yaml(): an explicit `!!str` carries another tag object


def _engine():
    global _ENGINE
    if _ENGINE is None:
        _ENGINE = _yaml()
    return _ENGINE


# YAML 1.2.2, section 10.3.2 (core schema): how a plain (unquoted) scalar is resolved.
STR = "tag:yaml.org,2002:str"
_NULL = {"", "~", "null", "Null", "NULL"}
_BOOL = {"true": True, "True": True, "TRUE": True, "false": False, "False": False, "FALSE": False}
_INT = re.compile(r"[-+]?[0-9]+|0o[0-7]+|0x[0-9a-fA-F]+")
_FLOAT = re.compile(r"[-+]?(\.[0-9]+|[0-9]+(\.[0-9]*)?)([eE][-+]?[0-9]+)?")
_SPECIAL_FLOAT = {".inf": math.inf, ".Inf": math.inf, ".INF": math.inf, "+.inf": math.inf, "+.Inf": math.inf,
                  "+.INF": math.inf, "-.inf": -math.inf, "-.Inf": -math.inf, "-.INF": -math.inf,
                  ".nan": math.nan, ".NaN": math.nan, ".NAN": math.nan}
_QUOTED = ("'", '"', "|", ">")


def _scalar(node, doc: Document, path: Path):
    ctag = node.ctag
    text, tag = node.value, ctag.suffix  # ctag.suffix: plain attribute, node.tag is slow
    if tag != STR or node.style in _QUOTED or ctag is not _IMPLICIT:  # quoted or `!!str 3`: text
        return _tagged(node, doc, path) if tag != STR else text
    if text in _NULL:
        return None
    if text in _BOOL:
        return _BOOL[text]
    if _INT.fullmatch(text):
        if len(text) > MAX_INT_DIGITS:
            doc.problems.append(Problem("limit", f"number '{text[:40]}' has too many digits", _mark(node),
                                        path))
            return text
        return int(text, 0) if text[:2] in ("0o", "0x") else int(text)
    if text in _SPECIAL_FLOAT:
        return _SPECIAL_FLOAT[text]
    if _FLOAT.fullmatch(text):
        return float(text)
    return text


def _tagged(node, doc: Document, path: Path):
    """A scalar with an explicit tag (!!int 3, !!str 12): honour the core ones, keep others as text."""
    text, tag = node.value, str(node.tag)
    try:
        if tag.endswith(":int") and len(text) <= MAX_INT_DIGITS:
            return int(text, 0)
        if tag.endswith(":float"):
            return _SPECIAL_FLOAT.get(text) if text in _SPECIAL_FLOAT else float(text)
        if tag.endswith(":bool"):
            return _BOOL.get(text, text)
        if tag.endswith(":null"):
            return None
    except ValueError:
        pass
    return text


# YAML 1.2.2, section 10.3 (core schema): the only tags a build file may carry. Any other tag
# ('!!python/object/apply:...', '!!binary', a local '!thing') is refused where it stands.
CORE_TAGS = frozenset("tag:yaml.org,2002:" + t for t in ("str", "int", "float", "bool", "null", "seq", "map"))


def _foreign_tag(node, doc: Document, path: Path) -> bool:
    tag = node.ctag.suffix
    if tag in CORE_TAGS:
        return False
    shown = tag.replace("tag:yaml.org,2002:", "!!")
    doc.problems.append(
        Problem(
            "tag",
            f"the YAML tag '{shown[:60]}' is not accepted in a build file; only plain "
            "values, lists and mappings are",
            _mark(node),
            path,
        )
    )
    return True


def _convert(node, doc: Document, path: Path, depth: int, seen: set):
    if node.ctag.suffix not in CORE_TAGS and _foreign_tag(node, doc, path):
        doc.value_nodes[path] = node
        return None
    if depth > MAX_DEPTH:
        doc.problems.append(Problem("limit", f"nesting deeper than {MAX_DEPTH} levels", _mark(node), path))
        return None
    if id(node) in seen:
        doc.problems.append(
            Problem(
                "alias",
                "YAML anchors and aliases are not accepted in a build file; write the value out",
                doc.key_mark(path) if path in doc.key_nodes else _mark(node),
                path,
            )
        )
        return None
    seen.add(id(node))
    doc.value_nodes[path] = node
    kind = node.id
    if kind == "scalar":
        return _scalar(node, doc, path)
    if kind == "sequence":
        return [_convert(item, doc, path + (i,), depth + 1, seen) for i, item in enumerate(node.value)]
    out: dict = {}
    for key_node, value_node in node.value:
        if key_node.id != "scalar":
            doc.problems.append(
                Problem("syntax", "a mapping key must be a plain word", _mark(key_node), path)
            )
            continue
        key = key_node.value
        if key == "<<" and key_node.tag.endswith(":merge"):
            doc.problems.append(
                Problem(
                    "alias", "YAML merge keys ('<<') are not accepted in a build file", _mark(key_node), path
                )
            )
            continue
        if key in out:
            first = _mark(doc.key_nodes[path + (key,)])
            doc.problems.append(
                Problem(
                    "duplicate-key",
                    f"key '{key}' appears twice; the first is at line {first.line}, col {first.col}; "
                    "only one may stay",
                    _mark(key_node),
                    path + (key,),
                )
            )
            continue
        doc.key_nodes[path + (key,)] = key_node
        out[key] = _convert(value_node, doc, path + (key,), depth + 1, seen)
    return out


def _comments(text: str) -> dict:
    """Line number -> text after '#', for lines whose '#' is outside quotes (for waivers)."""
    found = {}
    for no, line in enumerate(text.splitlines(), 1):
        if "#" not in line:
            continue
        quote = None
        for i, ch in enumerate(line):
            if quote:
                if ch == quote:
                    quote = None
            elif ch in "'\"":
                quote = ch
            elif ch == "#" and (i == 0 or line[i - 1] in " \t"):
                found[no] = line[i + 1 :].strip()
                break
    return found


def _nesting_trouble(text: str) -> str | None:
    """Refuse, before composing, text that could nest deep enough to crash the C composer.

    Block nesting needs indentation, so within the size limit it stays shallow; flow brackets
    and compact '- - -' or '? ? ?' indicators do not, so they are bounded here.
    """
    brackets = text.count("[") + text.count("{")
    if brackets > MAX_BRACKETS:
        return f"{brackets} brackets: more than a build plan ever needs ({MAX_BRACKETS})"
    match = _COMPACT_DASHES.search(text)
    if match:
        line = text.count("\n", 0, match.start()) + 1
        return f"line {line}: sequences nested deeper than {MAX_DEPTH} levels"
    return None


def parse(text: str) -> Document:
    """YAML text -> Document. Never raises for bad input: problems are recorded instead."""
    doc = Document()
    if len(text) > MAX_BYTES:
        doc.problems.append(Problem("limit", f"file is larger than {MAX_BYTES // 1000} kB", Mark(1, 1, 1, 1)))
        return doc
    trouble = _nesting_trouble(text)
    if trouble:
        doc.problems.append(Problem("limit", trouble, Mark(1, 1, 1, 1)))
        return doc
    from ruamel.yaml.error import MarkedYAMLError, YAMLError

    try:
        root = _engine().compose(text)
    except MarkedYAMLError as exc:
        m = exc.problem_mark or exc.context_mark
        line, col = (m.line + 1, m.column + 1) if m is not None else (1, 1)
        what = exc.problem or exc.context or "not valid YAML"
        doc.problems.append(Problem("syntax", f"YAML syntax: {what}", Mark(line, col, line, col)))
        return doc
    except (YAMLError, ValueError, RecursionError) as exc:
        doc.problems.append(Problem("syntax", f"YAML syntax: {exc}".splitlines()[0][:200], Mark(1, 1, 1, 1)))
        return doc
    if root is not None:
        doc.data = _convert(root, doc, (), 0, set())
    doc.comments = _comments(text)
    return doc
