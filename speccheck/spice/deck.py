"""A deck: its netlist lines, the comments that head it, and the design-sheet values it measures."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from speccheck.loads import members  # noqa: F401  (re-exported: the deck builders read it from here)
from speccheck.spice.text import comment, file_word

HALF_POWER_DB = -10 * math.log10(2)  # -3.0103 dB: the -3 dB point of a first-order network
EIGHTH_TURN = math.pi / 4  # 45 degrees in radians (ngspice's vp unit): a tank's half-power phase

@dataclass
class Check:
    """A `.measure` that reproduces a design-sheet value."""

    measure: str  # the measure's name in the deck (lowercase)
    section: str
    owner: str
    name: str
    value: float  # the sheet's value, SI
    unit: str = ""


@dataclass
class Deck:
    kind: str  # input-match, tank, audio-rc, audio-output, switch-on
    label: str  # names the deck file: '<build stem>.<label>.cir'
    title: str
    stands_for: str
    lines: list = field(default_factory=list)  # the netlist body: elements and analysis lines
    notes: list = field(default_factory=list)  # comments: parts, what the deck leaves out
    checks: list = field(default_factory=list)

    def text(self, build_name: str, source_file: str) -> str:
        head = [f"* {comment(self.title)}",
                f"* build: {comment(build_name)}",
                f"* plan: {comment(source_file)}",
                f"* stands for: {comment(self.stands_for)}",
                "* written by speccheck from the plan and its design sheet; run it with: ngspice -b "
                "THIS_FILE"]
        head += [f"* {comment(n)}" for n in self.notes]
        if self.checks:
            head.append("* design sheet values this deck measures:")
            from speccheck import units

            head += [f"*   {c.measure}: "
                     f"{comment(f'{c.section} / {c.owner} / {c.name} = {units.fmt(c.value, c.unit)}')}"
                     for c in self.checks]
        return "\n".join([*head, *self.lines, *dc_returns(self.lines), ".end", ""])


DC_RETURN = 1e12  # ohm: a DC path for the operating point that the AC result does not feel
_CONDUCTS = {"R", "L", "V", "E", "B"}  # element letters whose first two nodes are joined at DC


def dc_returns(lines: list) -> list:
    """A very large resistor to ground (named with a double underscore, which no safe name has)
    from every node with no DC path there (a node joined to
    the rest only by capacitors or a current source): the operating point ngspice finds before
    an AC sweep needs one, and without it prints a long round of gmin-stepping warnings."""
    joined: dict = {}

    def root(node):
        while joined.get(node, node) != node:
            node = joined[node]
        return node

    nodes = []
    for line in lines:
        words = line.split()
        if len(words) < 3 or line.startswith(("*", ".")):
            continue
        a, b = words[1], words[2]
        nodes += [a, b]
        if line[0] in _CONDUCTS:
            joined[root(a)] = root(b)
    floating = sorted({n for n in nodes if root(n) != root("0")})
    if not floating:
        return []
    out = [f"* {DC_RETURN:g} ohm DC returns for the operating point; they do not touch the AC result"]
    groups: dict = {}
    for n in floating:
        groups.setdefault(root(n), n)
    out += [f"R__DC_RETURN_{i} {n} 0 {DC_RETURN:g}" for i, n in enumerate(groups.values(), 1)]
    return out


class Sheet:
    """The design sheet of one build, looked up by (section, owner, name)."""

    def __init__(self, entries, signal: str = "", position: str = "") -> None:
        """Only the entries that hold for this signal and switch position (format 2), or for all."""
        self.values: dict = {}
        for e in entries:
            tagged = (getattr(e, "signal", ""), getattr(e, "position", ""))
            if tagged in (("", ""), (signal, position)):
                self.values[(e.section, e.owner, e.value.name)] = e.value

    def get(self, section: str, owner: str, name: str) -> float | None:
        v = self.values.get((section, owner, name))
        return float(v.value) if v is not None and isinstance(v.value, (int, float)) \
            and math.isfinite(v.value) else None

    def check(self, deck: Deck, measure: str, section: str, owner: str, name: str) -> bool:
        """Pair a measure with its sheet value; False when the sheet has no such number."""
        v = self.values.get((section, owner, name))
        if v is None or not isinstance(v.value, (int, float)) or not math.isfinite(v.value):
            return False
        deck.checks.append(Check(measure, section, owner, name, float(v.value), v.unit))
        return True


def file_label(kind: str, owner: str) -> str:
    """A deck's file label: its kind, and the owner when that says more (a named or repeated stage)."""
    tail = file_word(owner)
    return kind if tail == kind else f"{kind}-{tail}"


def stage_owner(build, stage) -> str:
    """The sheet owner of a stage: its label, numbered when the label repeats in the chain (as
    the rules publish it)."""
    same = [s for s in build.chain if s.label == stage.label]
    return stage.label if len(same) < 2 else f"{stage.label} {same.index(stage) + 1}"


def ac_grounds(build) -> set:
    """Nets that are AC ground in a small-signal deck: every rail (an ideal supply is a short at
    signal frequencies)."""
    return set(build.rails)


def _value(build, ref):
    part = build.part(ref)
    return part.value.si if part is not None and part.value is not None else None


def stands_for(build, paths: list | None = None) -> str:
    """Which signals (and, in format 2, which switch positions) a deck stands for."""
    names = [s.name for s in build.signals if paths is None or s.path in paths]
    who = ", ".join(names) if names else "no declared signal"
    return f"signals: {who}; switch positions: none (no selecting switch in this plan)"


def described(part) -> str:
    bits = [part.name, part.kind]
    if part.value is not None:
        bits.append(part.value.text)
    if part.note:
        bits.append(f"({part.note})")
    return " ".join(bits)
