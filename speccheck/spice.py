"""SPICE decks of the reviewed sub-circuits, for ngspice in batch mode (`ngspice -b DECK`).

One deck per sub-circuit the rules computed: the input network between the source and the
device's input (AC around the working frequency), the quadrature tank with its damping and
coil loss (AC around the IF), each audio RC stage and the amplifier's output side (AC over the
audio band), and the supply switch-on (transient). A deck is built from the model (parts,
nets) and the design sheet (the values the rules derived); it adds no trade arithmetic of its
own, only what laying out a netlist needs (sweep limits, a threshold voltage). Its `.measure`
lines name the sheet values they reproduce; `Deck.checks` pairs each measure with its sheet
entry, so the tests can compare the simulator with the sheet.

Text from the build file never reaches a deck raw: names become safe SPICE names
(`Names.net`, `Names.element`: letters, digits and `_` only, distinct without regard to case,
as SPICE folds case), and every comment passes `comment()` (printable ASCII on one line, no
backslash), so no name or note can start a line of its own: no element, no dot line, no
control block, no shell command.

Where format 2 selects parts by switch position, a deck states the signal and position it
stands for (`Deck.stands_for`); a plan with no selecting switch has one deck per sub-circuit
standing for every signal.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field
from pathlib import Path

HALF_POWER_DB = -10 * math.log10(2)  # -3.0103 dB: the -3 dB point of a first-order network
EIGHTH_TURN = math.pi / 4  # 45 degrees in radians (ngspice's vp unit): a tank's half-power phase

# ---- text that came from the build file ---------------------------------------------------

_UNSAFE = re.compile(r"[^a-z0-9_]+")
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
            name = f"{base[:_LONGEST_NAME - 4]}_{n}"
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


# ---- decks ----------------------------------------------------------------------------------

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
                "* written by speccheck from the plan and its design sheet; run it with: ngspice -b THIS_FILE"]
        head += [f"* {comment(n)}" for n in self.notes]
        if self.checks:
            head.append("* design sheet values this deck measures:")
            from speccheck import units

            head += [f"*   {c.measure}: {comment(f'{c.section} / {c.owner} / {c.name} = {units.fmt(c.value, c.unit)}')}"
                     for c in self.checks]
        return "\n".join([*head, *self.lines, ".end", ""])


class _Sheet:
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


def _file_word(text: str) -> str:
    """Text as part of a file name: lowercase letters, digits and '-' (at most 80)."""
    return (_UNSAFE.sub("-", text.lower()).strip("-") or "x")[:80]


def _label(kind: str, owner: str) -> str:
    """A deck's file label: its kind, and the owner when that says more (a named or repeated stage)."""
    tail = _file_word(owner)
    return kind if tail == kind else f"{kind}-{tail}"


def _owner(build, stage) -> str:
    """The sheet owner of a stage: its label, numbered when the label repeats in the chain (as
    the rules publish it)."""
    same = [s for s in build.chain if s.label == stage.label]
    return stage.label if len(same) < 2 else f"{stage.label} {same.index(stage) + 1}"


def _grounds(build) -> set:
    """Nets that are AC ground in a small-signal deck: every rail (an ideal supply is a short at
    signal frequencies)."""
    return set(build.rails)


def _value(build, ref):
    part = build.part(ref)
    return part.value.si if part is not None and part.value is not None else None


def _stands_for(build, paths: list | None = None) -> str:
    """Which signals (and, in format 2, which switch positions) a deck stands for."""
    names = [s.name for s in build.signals if paths is None or s.path in paths]
    who = ", ".join(names) if names else "no declared signal"
    return f"signals: {who}; switch positions: none (no selecting switch in this plan)"


def members(build, part) -> list:
    """The real parts behind a part: the several a format-2 list stands in for (damping
    resistors in parallel, filter capacitors side by side), or the part itself."""
    refs = getattr(part, "combined_from", None) or ()
    found = [build.parts.get(r) for r in refs]
    return [p for p in found if p is not None and p.value is not None] or [part]


def _pretty(part) -> str:
    bits = [part.name, part.kind]
    if part.value is not None:
        bits.append(part.value.text)
    if part.note:
        bits.append(f"({part.note})")
    return " ".join(bits)


# ---- input network --------------------------------------------------------------------------

def _input_match(build, sheet: _Sheet, stage) -> Deck | None:
    who = _owner(build, stage)
    f = sheet.get("input-match", who, "working frequency")
    rs = sheet.get("input-match", who, "source resistance")
    rl = sheet.get("input-match", who, "load resistance")
    topo = stage.topology
    if f is None or rs is None or rl is None or topo not in ("series-l-shunt-c", "shunt-c-series-l", "termination",
                                                              "direct"):
        return None
    parts = [build.part(r) for r in stage.parts]
    coil = next((p for p in parts if p is not None and p.kind == "inductor" and p.value), None)
    cap = next((p for p in parts if p is not None and p.kind == "capacitor" and p.value), None)
    res = next((p for p in parts if p is not None and p.kind == "resistor" and p.value), None)
    names = Names(_grounds(build))
    src, ref, gamma = names.net("source emf"), names.net("incident"), names.net("reflection")
    deck = Deck("input-match", _label("input-match", who), f"input network of stage '{who}' ({topo})",
                _stands_for(build))
    lines = deck.lines
    lines.append(f"* the source: {number(rs)} ohm behind an EMF of 2 V, so that 1 V reaches a matched load")
    if topo in ("series-l-shunt-c", "shunt-c-series-l"):
        if coil is None or cap is None:
            return None
        shared = [n for n in coil.ends if n in cap.ends]
        mid = shared[0] if shared else "network middle"
        far = coil.other_end(mid) if shared else "network input"
        port, load = (far, mid) if topo == "series-l-shunt-c" else (mid, far)
        port_node, load_node = names.net(port or "port"), names.net(load or "load")
        shunt_node = load_node if topo == "series-l-shunt-c" else port_node
        lines += [f"V_SOURCE {src} 0 DC 0 AC 2",
                  f"{names.element('R', 'source')} {src} {port_node} {number(rs)}",
                  f"* {comment(_pretty(coil))}",
                  f"{names.element('L', coil.name)} {port_node} {load_node} {number(coil.value.si)}",
                  f"* {comment(_pretty(cap))}",
                  f"{names.element('C', cap.name)} {shunt_node} 0 {number(cap.value.si)}"]
        deck.notes.append(f"parts: {coil.name} series, {cap.name} shunt; the device input as a resistor")
    elif topo == "termination":
        if res is None:
            return None
        port = next((n for n in res.ends if n not in names.grounds), "port")
        port_node = load_node = names.net(port)
        lines += [f"V_SOURCE {src} 0 DC 0 AC 2",
                  f"{names.element('R', 'source')} {src} {port_node} {number(rs)}",
                  f"* {comment(_pretty(res))}",
                  f"{names.element('R', res.name)} {port_node} 0 {number(res.value.si)}"]
    else:
        port_node = load_node = names.net(stage.device or "port")
        lines += [f"V_SOURCE {src} 0 DC 0 AC 2",
                  f"{names.element('R', 'source')} {src} {port_node} {number(rs)}"]
    dev = build.device(stage.device)
    lines += [(f"* the device input ({comment(dev.name + ', ' + dev.profile.name) if dev and dev.profile else 'load'}):"
              f" {number(rl)} ohm"),
              f"{names.element('R', 'load')} {load_node} 0 {number(rl)}",
              "* reflection coefficient: the port voltage less the 1 V incident wave",
              f"V_INCIDENT {ref} 0 DC 0 AC 1",
              f"E_REFLECTION {gamma} 0 {port_node} {ref} 1",
              # 401 points from 0.8 f to 1.2 f: the working frequency is a point of the sweep
              f".ac lin 401 {number(0.8 * f)} {number(1.2 * f)}",
              f".save v({port_node}) v({load_node}) v({gamma})"]
    at = number(f)
    two = "(2-port_re)"
    den = f"({two}*{two}+port_im*port_im)"
    lines += [f".measure ac port_re find vr({port_node}) at={at}",
              f".measure ac port_im find vi({port_node}) at={at}",
              f".measure ac zin_re param='{number(rs)}*(port_re*{two}-port_im*port_im)/{den}'",
              f".measure ac zin_im param='{number(rs)}*2*port_im/{den}'",
              f".measure ac gamma_db find vdb({gamma}) at={at}",
              ".measure ac return_loss param='-gamma_db'",
              f".measure ac gamma_mag find vm({gamma}) at={at}",
              ".measure ac vswr param='(1+gamma_mag)/(1-gamma_mag)'"]
    sheet.check(deck, "zin_re", "input-match", who, "impedance seen by the source (real)")
    sheet.check(deck, "zin_im", "input-match", who, "impedance seen by the source (imaginary)")
    sheet.check(deck, "return_loss", "input-match", who, "return loss")
    sheet.check(deck, "vswr", "input-match", who, "VSWR")
    if topo == "termination":
        lines += [f".measure ac load_db find vdb({load_node}) at={at}",
                  f".measure ac termination_loss param='-load_db-10*log10({number(rs)}/{number(rl)})'"]
        sheet.check(deck, "termination_loss", "input-match", who, "signal lost in the termination")
    return deck


# ---- quadrature tank ------------------------------------------------------------------------

def _extremes(part) -> tuple[float, float] | None:
    """The lowest and highest value of a part: its adjust range, else its tolerance."""
    if part.adjust is not None and part.adjust.min is not None and part.adjust.max is not None:
        a, b = part.adjust.min.si, part.adjust.max.si
        return min(a, b), max(a, b)
    if part.tolerance is not None and part.value is not None:
        v, t = part.value.si, abs(part.tolerance.si)
        return v * (1 - t), v * (1 + t)
    return None


def _tank(build, sheet: _Sheet, stage) -> Deck | None:
    tank = stage.tank
    coil, cap = build.part(tank.inductor), build.part(tank.capacitor)
    if coil is None or cap is None or coil.value is None or cap.value is None:
        return None
    who = _owner(build, stage)
    f0 = sheet.get("discriminator", who, "tank resonance f0")
    if f0 is None:
        return None
    names = Names(_grounds(build))
    hot = next((e for e in coil.ends if "." in e and e not in names.grounds), coil.ends[0])
    ret = coil.other_end(hot) or "tank return"
    hot_node, ret_node = names.net(hot), names.net(ret)
    deck = Deck("tank", _label("tank", who) if who != "discriminator" else "tank", f"quadrature tank of stage '{who}'", _stands_for(build))
    lines = deck.lines
    damping = build.part(tank.damping)
    extra = tank.extra_capacitance.si if tank.extra_capacitance is not None else 0.0
    L, C = coil.value.si, cap.value.si
    lines += ["* driven by a 1 A test current at the device pin: the node voltage is the tank's impedance",
              f"I_DRIVE 0 {hot_node} DC 0 AC 1",
              f"* {comment(_pretty(coil))}",
              f"{names.element('L', coil.name)} {hot_node} {ret_node} {number(L)}",
              f"* {comment(_pretty(cap))}",
              f"{names.element('C', cap.name)} {hot_node} {ret_node} {number(C)}"]
    if extra:
        lines.append(f"{names.element('C', 'extra')} {hot_node} {ret_node} {number(extra)}")
    if damping is not None and damping.value is not None:
        for resistor in members(build, damping):
            lines += [f"* {comment(_pretty(resistor))}",
                      f"{names.element('R', resistor.name)} {hot_node} {ret_node} {number(resistor.value.si)}"]
    if coil.q:
        # the coil's loss as its parallel equivalent at the tank's f0: Q * 2 pi f0 L
        lines += [f"* {comment(coil.name)} loss: unloaded Q {number(coil.q)} as a parallel resistance at f0",
                  (f"{names.element('R', coil.name + '_loss')} {hot_node} {ret_node} "
                  f"{number(coil.q * 2 * math.pi * f0 * L)}")]
    if ret_node != "0":
        lines.append(f"* the return net {comment(ret)} and what joins it to a rail or ground")
        for part in build.nets.parts_on(ret):
            other = part.other_end(ret)
            if part in (coil, cap, damping) or other is None or other not in names.grounds or part.value is None:
                continue
            letter = {"resistor": "R", "capacitor": "C", "inductor": "L"}.get(part.kind)
            if letter:
                lines += [f"* {comment(_pretty(part))}",
                          f"{names.element(letter, part.name)} {ret_node} 0 {number(part.value.si)}"]
    lines.append(f".save v({hot_node})")
    lines += [f".measure ac f0 when vp({hot_node})=0",
              f".measure ac f_lo when vp({hot_node})={number(EIGHTH_TURN)}",
              f".measure ac f_hi when vp({hot_node})={number(-EIGHTH_TURN)}",
              ".measure ac linear_range param='f_hi-f_lo'",
              ".measure ac loaded_q param='f0/(f_hi-f_lo)'"]
    sheet.check(deck, "f0", "discriminator", who, "tank resonance f0")
    if sheet.check(deck, "loaded_q", "discriminator", who, "loaded Q"):
        deck.notes.append("half-power points: where the tank's phase is +/-45 degrees (|Z| 3 dB down)")
    sheet.check(deck, "linear_range", "discriminator", who, "linear range (f0/Q)")
    lowest, highest = f0, f0
    coil_range, cap_range = _extremes(coil), _extremes(cap)
    if coil_range or cap_range:
        (l_lo, l_hi), (c_lo, c_hi) = coil_range or (L, L), cap_range or (C, C)
        deck.notes.append("two more copies of the tank at the ends of its adjustment (or tolerance), returned to "
                          "ground, give the tuning range")
        for end, (l_val, c_val) in (("low", (l_hi, c_hi)), ("high", (l_lo, c_lo))):
            node = names.net(f"tuned {end}")
            lines += [f"* the tank tuned to its {end} end",
                      f"{names.element('I', 'drive ' + end)} 0 {node} DC 0 AC 1",
                      f"{names.element('L', coil.name + ' ' + end)} {node} 0 {number(l_val)}",
                      f"{names.element('C', cap.name + ' ' + end)} {node} 0 {number(c_val + extra)}",
                      f"{names.element('R', 'tuning ' + end)} {node} 0 {number(1e6)}",
                      f".save v({node})",
                      f".measure ac f_tune_{end} when vp({node})=0"]
            sheet.check(deck, f"f_tune_{end}", "discriminator", who, f"tuning range {end}")
            f_end = sheet.get("discriminator", who, f"tuning range {end}")
            if f_end:
                lowest, highest = min(lowest, f_end), max(highest, f_end)
    # a log sweep a decade either side: 10000 points a decade keep the measures well inside 0.1 %
    lines.insert(0, f".ac dec 10000 {number(lowest / 10)} {number(highest * 10)}")
    return deck


# ---- audio ----------------------------------------------------------------------------------

def _rc_lowpass(build, sheet: _Sheet, stage) -> Deck | None:
    res, cap = build.part(stage.resistor), build.part(stage.capacitor)
    if res is None or cap is None or res.value is None or cap.value is None:
        return None  # a stage given as a time constant or a corner has no parts to simulate
    who = _owner(build, stage)
    corner_name = "de-emphasis corner" if stage.kind == "de-emphasis" else "low-pass corner"
    corner = sheet.get("audio", who, corner_name)
    if corner is None:
        return None
    names = Names(_grounds(build))
    caps = members(build, cap)
    shared = [n for n in res.ends if any(n in c.ends for c in caps)]
    out = shared[0] if shared else "filter output"
    inp = res.other_end(out) if shared else "filter input"
    in_node, out_node = names.net(inp or "filter input"), names.net(out)
    deck = Deck("audio-rc", _label(stage.kind, who), f"{stage.kind} RC of stage '{who}'",
                _stands_for(build))
    deck.lines += ["* the detector's audio output as an ideal source of 1 V",
                   f"V_DRIVE {in_node} 0 DC 0 AC 1",
                   f"* {comment(_pretty(res))}",
                   f"{names.element('R', res.name)} {in_node} {out_node} {number(res.value.si)}",
                   *(line for c in caps for line in (
                       f"* {comment(_pretty(c))}",
                       f"{names.element('C', c.name)} {out_node} 0 {number(c.value.si)}")),
                   f".ac dec 1000 {number(corner / 100)} {number(corner * 100)}",
                   f".save v({out_node})",
                   f".measure ac corner when vdb({out_node})={number(HALF_POWER_DB)} cross=1"]
    deck.notes.append("the RC as the design sheet takes it: driven from an ideal source, into no load")
    sheet.check(deck, "corner", "audio", who, corner_name)
    if stage.kind == "de-emphasis":
        deck.lines.append(".measure ac time_constant param='1/(6.28318530718*corner)'")
        sheet.check(deck, "time_constant", "audio", who, "de-emphasis time constant")
    if shared and len(caps) == 1:
        _as_wired(build, deck, names, res, cap, inp or "filter input", out, corner)
    return deck


PASSIVE = {"resistor": "R", "potentiometer": "R", "speaker": "R", "capacitor": "C", "inductor": "L"}


def load_on(build, net: str, skip: set) -> list:
    """The passive parts that load `net`: every resistor, pot (its whole track), speaker,
    capacitor or inductor reachable from it through nets that are neither a rail (AC ground)
    nor a device pin (open: its input impedance is not known), less the parts that carry no
    current (one end on a net nothing else reaches)."""
    nets = build.nets
    found: dict = {}
    todo, seen = [net], {net}
    while todo:
        here = todo.pop()
        for part in nets.parts_on(here):
            other = part.other_end(here)
            if part.name in skip or part.kind not in PASSIVE or part.value is None or other is None:
                continue
            found[part.name] = part
            if other not in seen and other not in build.rails and "." not in other:
                seen.add(other)
                todo.append(other)
    while True:  # drop parts that end on a net nothing else touches: no current flows in them
        count: dict = {}
        for part in found.values():
            for end in part.ends:
                count[end] = count.get(end, 0) + 1
        dangling = [p for p in found.values()
                    if any(count[e] == 1 and e != net and e not in build.rails for e in p.ends)]
        if not dangling:
            return list(found.values())
        for p in dangling:
            del found[p.name]


def _as_wired(build, deck: Deck, names: Names, res, cap, inp: str, out: str, corner: float):
    """A second copy of an RC stage with the parts that load its output, as the nets show them.
    Its corner is where the output's phase has turned 45 degrees; the coupling capacitors of
    the load add a little phase lead, so it is close to, not exactly, the -3 dB point."""
    load = load_on(build, out, {res.name, cap.name})
    if not load:
        return

    def node(net):
        return "0" if net in names.grounds else names.net(f"wired {net}")
    drive = names.element("V", "drive wired")
    deck.lines += [(f"* as wired: the same RC with what loads {comment(out)} on the plan's nets "
                   "(rails as AC ground, device pins open)"),
                   f"{drive} {node(inp)} 0 DC 0 AC 1",
                   f"{names.element('R', res.name + ' wired')} {node(inp)} {node(out)} {number(res.value.si)}",
                   (f"{names.element('C', cap.name + ' wired')} {node(out)} {node(cap.other_end(out))} "
                   f"{number(cap.value.si)}")]
    for part in load:
        deck.lines += [f"* {comment(_pretty(part))}",
                       (f"{names.element(PASSIVE[part.kind], part.name + ' wired')} {node(part.ends[0])} "
                       f"{node(part.ends[1])} {number(part.value.si)}")]
    deck.lines += [f".save v({node(out)})",
                   f".measure ac corner_as_wired when vp({node(out)})={number(-EIGHTH_TURN)} cross=1",
                   f".measure ac passband_as_wired_db find vdb({node(out)}) at={number(corner / 10)}"]
    deck.notes.append(f"as wired, {', '.join(p.name for p in load)} load the output: corner_as_wired shows "
                      "where that moves the corner (not a design-sheet value)")


def _audio_output(build, sheet: _Sheet, stage) -> Deck | None:
    cap, load = build.part(stage.coupling), build.part(stage.load)
    net = stage.output_network
    res_n = build.part(net.resistor) if net is not None else None
    cap_n = build.part(net.capacitor) if net is not None else None
    label = stage.label  # the audio rules publish under the stage label
    names = Names(_grounds(build))
    deck = Deck("audio-output", "audio-output" if label == "audio-amp" else _label("audio-output", label), f"amplifier output side of stage '{label}'",
                _stands_for(build))
    lowest, highest = math.inf, 0.0
    drive = None
    coupling_ok = (cap is not None and load is not None and cap.kind == "capacitor" and cap.value is not None
                   and load.value is not None and load.kind in ("speaker", "resistor"))
    if coupling_ok:
        corner = sheet.get("audio", label, f"coupling {cap.name} into {load.name} corner")
        shared = [n for n in cap.ends if n in load.ends]
        if corner is not None and shared:
            spk = shared[0]
            drive = cap.other_end(spk)
            drive_node, spk_node = names.net(drive or "amplifier output"), names.net(spk)
            deck.lines += ["* the amplifier output as an ideal source of 1 V",
                           f"V_AMP {drive_node} 0 DC 0 AC 1",
                           f"* {comment(_pretty(cap))}",
                           f"{names.element('C', cap.name)} {drive_node} {spk_node} {number(cap.value.si)}",
                           f"* {comment(_pretty(load))}: its nominal impedance as a resistor",
                           (f"{names.element('R', load.name)} {spk_node} "
                           f"{names.net(load.other_end(spk) or '0')} {number(load.value.si)}"),
                           f".save v({spk_node})",
                           f".measure ac coupling_corner when vdb({spk_node})={number(HALF_POWER_DB)} cross=1"]
            sheet.check(deck, "coupling_corner", "audio", label, f"coupling {cap.name} into {load.name} corner")
            lowest, highest = min(lowest, corner), max(highest, corner)
    if res_n is not None and cap_n is not None and res_n.value is not None and cap_n.value is not None:
        turnover = sheet.get("audio", label, f"output network {res_n.name} + {cap_n.name} turnover")
        mid = [n for n in res_n.ends if n in cap_n.ends]
        if turnover is not None and mid:
            first = res_n if drive is not None and drive in res_n.ends else cap_n if drive in cap_n.ends else res_n
            second = cap_n if first is res_n else res_n
            start = first.other_end(mid[0]) if drive is None or drive not in first.ends else drive
            start_node = names.net(start or "amplifier output")
            if drive is None or start != drive:
                deck.lines += ["* the amplifier output as an ideal source of 1 V",
                               f"{names.element('V', 'network drive')} {start_node} 0 DC 0 AC 1"]
            mid_node = names.net(mid[0])
            letter = {"resistor": "R", "capacitor": "C"}
            deck.lines += [f"* output network: {comment(_pretty(first))}",
                           (f"{names.element(letter[first.kind], first.name)} {start_node} {mid_node} "
                           f"{number(first.value.si)}"),
                           f"* {comment(_pretty(second))}",
                           f"{names.element(letter[second.kind], second.name)} {mid_node} 0 {number(second.value.si)}",
                           f".save v({mid_node})",
                           "* the turnover: where the voltage across the capacitor is 3 dB down from the whole",
                           f".measure ac network_turnover when vdb({mid_node})={number(HALF_POWER_DB)} cross=1"]
            sheet.check(deck, "network_turnover", "audio", label,
                        f"output network {res_n.name} + {cap_n.name} turnover")
            lowest, highest = min(lowest, turnover), max(highest, turnover)
    if not deck.checks:
        return None
    deck.lines.insert(0, f".ac dec 1000 {number(lowest / 100)} {number(highest * 100)}")
    deck.notes.append("the speaker as its nominal impedance, the amplifier as an ideal voltage source")
    return deck


# ---- supply switch-on -----------------------------------------------------------------------

def _switch_on(build, sheet: _Sheet) -> Deck | None:
    supply = build.supply
    fuse = build.part(supply.fuse) if supply is not None else None
    if supply is None or fuse is None or fuse.kind != "fuse" or supply.voltage is None:
        return None
    peak = sheet.get("fuse", fuse.name, "inrush peak")
    ohms = sheet.get("fuse", fuse.name, "inrush loop resistance")
    tau = sheet.get("fuse", fuse.name, "inrush time constant RC")
    farads = sheet.get("fuse", fuse.name, "bulk capacitance behind it")
    if peak is None or ohms is None or tau is None or farads is None:
        return None
    volts = abs(supply.voltage.si)
    rail = supply.rail if supply.rail else next((e for e in fuse.ends if e in build.rails), None)
    if rail is None:
        return None
    ground = {n for n, r in build.rails.items() if r.is_ground}
    names = Names(ground)
    series = build.part(supply.series_resistor)
    r_series = series.value.si if series is not None and series.kind == "resistor" and series.value else 0.0
    limit = None
    if supply.kind in ("battery", "bench") and supply.max_current is not None and supply.max_current.si < volts / ohms:
        limit = supply.max_current.si
    src = names.net("supply emf")
    fuse_in = names.net(fuse.other_end(rail) or "fuse input")
    rail_node = names.net(rail)
    deck = Deck("switch-on", "switch-on", f"supply switch-on through {fuse.name} into the bulk capacitance",
                "every signal and switch position: the supply is switched on before any signal")
    rise = tau / 1e5
    lines = deck.lines
    lines += [f"* the supply ({comment(supply.kind)}) switched on at t = 0 (rise {number(rise)} s)",
              f"V_SUPPLY {src} 0 PWL(0 0 {number(rise)} {number(volts)})",
              (f"* the loop resistance not in a named part: {number(ohms - r_series)} ohm "
              "(supply, leads, fuse, capacitor ESR: the design sheet's figure less the series resistor)")]
    r_loop = ohms - r_series
    after_source = names.net("after source") if r_series else fuse_in
    if limit is None:
        lines.append(f"{names.element('R', 'source')} {src} {after_source} {number(r_loop)}")
    else:
        lines += [f"* a current-limited {comment(supply.kind)}: at most {number(limit)} A",
                  (f"{names.element('B', 'source')} {src} {after_source} "
                  f"I=min({number(limit)}, max(0, v({src},{after_source})/{number(r_loop)}))")]
    if r_series:
        lines += [f"* {comment(_pretty(series))}",
                  f"{names.element('R', series.name)} {after_source} {fuse_in} {number(r_series)}"]
    fuse_el = names.element("V", fuse.name)
    lines += [f"* {comment(_pretty(fuse))}: an ammeter (0 V source); its resistance is in the loop figure",
              f"{fuse_el} {fuse_in} {rail_node} DC 0"]
    for part in build.nets.parts_on(rail):
        if part.kind == "capacitor" and part.value and part.other_end(rail) in ground:
            lines += [f"* {comment(_pretty(part))}",
                      f"{names.element('C', part.name)} {rail_node} 0 {number(part.value.si)}"]
    square = names.net("current squared")
    stop = 12 * tau + (farads * volts / limit if limit else 0.0)
    lines += ["* the fuse current squared, whose integral is the I2t the fuse sees",
              f"{names.element('B', 'i2')} {square} 0 V=i({fuse_el})*i({fuse_el})",
              f".tran {number(tau / 500)} {number(stop)} 0 {number(tau / 500)}",
              f".save v({rail_node}) v({square}) i({fuse_el})",
              f".measure tran inrush_peak max i({fuse_el})",
              f".measure tran i2t integ v({square}) from=0 to={number(stop)}"]
    sheet.check(deck, "inrush_peak", "fuse", fuse.name, "inrush peak")
    sheet.check(deck, "i2t", "fuse", fuse.name, "inrush I²t")
    if limit is None:
        # the capacitor reaches 1 - 1/e of the supply voltage after one time constant
        lines.append(f".measure tran time_constant when v({rail_node})={number(volts * (1 - math.exp(-1)))} rise=1")
        sheet.check(deck, "time_constant", "fuse", fuse.name, "inrush time constant RC")
    else:
        deck.notes.append("no time-constant measure: a current-limited supply charges the capacitor at a steady "
                          "current first")
    deck.notes.append("the supply as a DC step of its voltage behind the loop resistance, as the fuse rule "
                      "takes it")
    if supply.mains is not None or supply.kind == "mains-transformer":
        deck.notes.append("a transformer and rectifier really charge the reservoir over several mains half-cycles; "
                          "the step is the worst case the rule checks")
    return deck


# ---- the whole build ------------------------------------------------------------------------

def _decks_of(build, sheet: _Sheet) -> list[Deck]:
    out: list[Deck | None] = []
    for stage in build.chain:
        if stage.kind == "input-match":
            out.append(_input_match(build, sheet, stage))
        elif stage.kind == "discriminator" and stage.tank is not None:
            out.append(_tank(build, sheet, stage))
        elif stage.kind in ("audio-filter", "de-emphasis"):
            out.append(_rc_lowpass(build, sheet, stage))
        elif stage.kind == "audio-amp":
            out.append(_audio_output(build, sheet, stage))
    out.append(_switch_on(build, sheet))
    found = [d for d in out if d is not None]
    seen: dict[str, int] = {}
    for d in found:  # two stages of one kind and label still get two files
        n = seen.get(d.label, 0)
        seen[d.label] = n + 1
        if n:
            d.label = f"{d.label}-{n + 1}"
    return found


def _configurations(build) -> list:
    """(configuration, the build as it is there) for each signal and switch position of a
    format-2 plan with selecting switches; one (None, build) for any other plan."""
    if not getattr(build, "switched", False):
        return [(None, build)]
    from speccheck import configs

    return [(cfg, configs.view(build, cfg)) for cfg in build.configurations()]


def decks(build, sheet_entries) -> list[Deck]:
    """Every deck this build's reviewed sub-circuits and design sheet allow.

    In a plan with selecting switches each configuration (signal, switch positions, upstream
    setting) gets its own decks; a deck that comes out the same in every configuration is
    written once, standing for all of them."""
    entries = list(sheet_entries)
    per_cfg = []
    for cfg, view in _configurations(build):
        if cfg is None:
            return _decks_of(view, _Sheet(entries))
        per_cfg.append((cfg, _decks_of(view, _Sheet(entries, cfg.signal_name, cfg.position_label))))
    same: dict = {}
    for cfg, found in per_cfg:
        for deck in found:
            same.setdefault((deck.label, tuple(deck.lines)), []).append((cfg, deck))
    out = []
    for hits in same.values():
        cfg, deck = hits[0]
        if len(hits) == len(per_cfg):
            deck.stands_for = "every signal and switch position of this plan"
        else:
            deck.stands_for = " | ".join(c.label for c, _ in hits)
            deck.label = f"{deck.label}.{_file_word(cfg.label)}"
        out.append(deck)
    return out


def file_stem(path: str | Path) -> str:
    """The safe start of every deck file name: the plan's file name without its suffix."""
    return _file_word(Path(path).stem)


def deck_path(folder: str | Path, plan: str | Path, deck: Deck) -> Path:
    return Path(folder) / f"{file_stem(plan)}.{deck.label}.cir"
