"""Text from the build file made safe for a SPICE deck: node and element names, comments, numbers.

Names become letters, digits and single underscores, distinct without regard to case (SPICE
folds case); comments become printable ASCII on one line with no backslash, so no name or note
can start a line of its own (an element, a dot line such as .control or .include, a '+'
continuation); numbers never carry a scale suffix (SPICE reads 'M' as milli).
"""

from __future__ import annotations

import math
import re

_UNSAFE = re.compile(r"[^a-z0-9]+")
_LONGEST_NAME = 40
_LONGEST_COMMENT = 160
_ASCII_FOR = {"µ": "u", "Ω": "ohm", "°": "deg", "±": "+/-", "·": "*", "²": "^2", "−": "-", "–": "-",
              "—": "-", "×": "x"}


def safe_name(text: object) -> str:
    """A SPICE-safe name for any text: lowercase letters, digits and single underscores,
    starting with a letter, at most 40 characters (never empty)."""
    name = _UNSAFE.sub("_", str(text).lower()).strip("_")
    if not name or not name[0].isalpha():
        name = "n_" + name
    return name[:_LONGEST_NAME].rstrip("_")


def comment(text: object) -> str:
    """Text for the inside of a `*` comment line: printable ASCII only, on one line, bounded.

    Line breaks of every kind (CR, LF, VT, FF, NEL, the Unicode separators) and all other
    control characters become spaces, so the text cannot start a new line (an element, a dot
    line such as .control or .include, a '+' continuation); a backslash becomes '/', so no
    reader can take it for a line continuation."""
    out = []
    for ch in str(text):
        if " " <= ch <= "~":
            out.append("/" if ch == "\\" else ch)
        elif ch in _ASCII_FOR:
            out.append(_ASCII_FOR[ch])
        else:
            out.append(" " if ch.isspace() or not ch.isprintable() else "?")
    line = " ".join("".join(out).split())
    return line if len(line) <= _LONGEST_COMMENT else line[:_LONGEST_COMMENT - 3] + "..."


def number(value: float) -> str:
    """A plain SPICE number: never a scale suffix (SPICE reads 'M' as milli)."""
    if not math.isfinite(value):
        raise ValueError(f"not a finite number: {value}")
    return f"{value:.12g}"


class Names:
    """Node and element names for one deck: safe, and distinct when SPICE folds case.

    Ground nets become node 0. Each build net keeps one node name; two nets whose safe names
    would collide get a numbered suffix."""

    def __init__(self, grounds=()) -> None:
        self.grounds = set(grounds)
        self.nodes: dict[str, str] = {}
        self.elements: dict[str, str] = {}
        self.taken: set[str] = {"0", "gnd"}

    def _unique(self, base: str) -> str:
        name, n = base, 1
        while name in self.taken:
            n += 1
            name = f"{base[:_LONGEST_NAME - 4].rstrip('_')}_{n}"
        self.taken.add(name)
        return name

    def net(self, net: str) -> str:
        """The node of a build net (or of one of the deck's own nodes)."""
        if net in self.grounds:
            return "0"
        if net not in self.nodes:
            self.nodes[net] = self._unique(safe_name(net))
        return self.nodes[net]

    def element(self, letter: str, ref: str) -> str:
        """An element name: the SPICE type letter, '_' and the safe designator."""
        key = f"{letter}|{ref}"
        if key not in self.elements:
            self.elements[key] = self._unique(f"{letter.lower()}_{safe_name(ref)}").upper()
        return self.elements[key]


def file_word(text: str) -> str:
    """Text as part of a file name: lowercase letters, digits and '-' (at most 80)."""
    return (_UNSAFE.sub("-", text.lower()).strip("-") or "x")[:80]
