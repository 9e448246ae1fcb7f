"""The crystal deck: the load the oscillator's capacitors give the crystal, as wired, and how far
that load pulls it from the frequency it was marked at (AC around the crystal's frequency)."""

from __future__ import annotations

import math

from speccheck.spice.deck import Deck, Sheet, described, stands_for
from speccheck.spice.text import Names, comment, number

MOTIONAL_OHMS = 1.0  # not in the plan; a small motional resistance does not move the resonances
TWO_PI = 2 * math.pi


def _crystal(names: Names, tag: str, a: str, b: str, x, motional_l: float) -> list:
    """The crystal's four-element model (motional L, C, R in series, shunt C0 across) from a to b."""
    m1, m2 = names.net(f"{tag} motional 1"), names.net(f"{tag} motional 2")
    return [f"{names.element('L', f'{x.name} {tag}')} {a} {m1} {number(motional_l)}",
            f"{names.element('C', f'{x.name} {tag}')} {m1} {m2} {number(x.motional_capacitance.si)}",
            f"{names.element('R', f'{x.name} {tag}')} {m2} {b} {number(MOTIONAL_OHMS)}",
            f"{names.element('C', f'{x.name} {tag} shunt')} {a} {b} {number(x.shunt_capacitance.si)}"]


def _load(names: Names, tag: str, caps: list, stray: float, a_net: str, b_net: str) -> tuple[list, str, str]:
    """The oscillator's load capacitors on their own nets (a copy tagged `tag`), the stray across
    the crystal's ends; -> (lines, node of a, node of b)."""

    def node(net):
        return "0" if net in names.grounds else names.net(f"{tag} {net}")

    lines = []
    for cap in caps:
        lines += [f"* {comment(described(cap))}",
                  (f"{names.element('C', f'{cap.name} {tag}')} {node(cap.ends[0])} {node(cap.ends[1])} "
                  f"{number(cap.value.si)}")]
    if stray:
        lines.append(f"{names.element('C', f'stray {tag}')} {node(a_net)} {node(b_net)} {number(stray)}")
    return lines, node(a_net), node(b_net)


def crystal(build, sheet: Sheet, stage) -> Deck | None:
    osc = stage.oscillator
    x = build.part(osc.crystal) if osc is not None else None
    if x is None or x.kind != "crystal" or len(osc.load_caps) != 2 or x.frequency is None:
        return None
    caps = [build.part(r) for r in osc.load_caps]
    if any(c is None or c.value is None or len(c.ends) != 2 for c in caps) or len(x.ends) != 2:
        return None
    if x.motional_capacitance is None or x.shunt_capacitance is None or x.load_capacitance is None:
        return None
    load = sheet.get("crystal", x.name, "load capacitance from the oscillator")
    if load is None:
        return None
    names = Names(set(build.rails))
    fx = x.frequency.si
    # the crystal's marked frequency as the motional resonance: the pulling is a ratio of two
    # load resonances, which does not depend on where the motional resonance sits
    motional_l = 1 / ((TWO_PI * fx) ** 2 * x.motional_capacitance.si)
    a_net, b_net = x.ends
    stray = osc.stray.si if osc.stray is not None else 0.0
    deck = Deck("crystal", f"crystal-{x.name.lower()}", f"crystal {x.name} and its oscillator load",
                stands_for(build))
    deck.notes += ["the crystal as its four-element model: motional L, C and a 1 ohm R, shunt C0 across",
                   ("load resonance: where the crystal and its load, in a loop driven by a 1 A test current, "
                   "have no reactance")]
    lines = deck.lines
    # the load the crystal's ends see, as wired: a 1 A test current across its two ends
    cap_lines, la, lb = _load(names, "load", caps, stray, a_net, b_net)
    seen = names.net("load seen")
    lines += ["* the load capacitance: the oscillator's capacitors as wired, seen from the crystal's ends",
              *cap_lines,
              f"{names.element('I', 'load test')} {lb} {la} DC 0 AC 1",
              f"{names.element('E', 'load seen')} {seen} 0 {la} {lb} 1",
              f".save v({seen})",
              f".measure ac load_ohms find vm({seen}) at={number(fx)}",
              f".measure ac load_capacitance param='1/({number(TWO_PI * fx)}*load_ohms)'"]
    sheet.check(deck, "load_capacitance", "crystal", x.name, "load capacitance from the oscillator")
    loops = []
    for tag, what in (("alone", "the crystal alone: its series resonance"),
                      ("specified", f"the crystal on its specified load, {x.load_capacitance.text}"),
                      ("wired", "the crystal on the oscillator's capacitors, as wired")):
        drive, top = names.net(f"{tag} drive"), names.net(f"{tag} loop")
        lines.append(f"* {comment(what)}")
        if tag == "alone":
            lines += _crystal(names, tag, drive, "0", x, motional_l)
            lines += [f"{names.element('I', f'test {tag}')} 0 {drive} DC 0 AC 1",
                      f"{names.element('E', f'loop {tag}')} {top} 0 {drive} 0 1"]
        else:
            if tag == "specified":
                a, b = names.net("specified a"), "0"
                lines.append(f"{names.element('C', 'specified load')} {a} {b} "
                             f"{number(x.load_capacitance.si)}")
            else:
                more, a, b = _load(names, tag, caps, stray, a_net, b_net)
                lines += more
            lines += _crystal(names, tag, drive, b, x, motional_l)
            lines += [f"{names.element('I', f'test {tag}')} {a} {drive} DC 0 AC 1",
                      f"{names.element('E', f'loop {tag}')} {top} 0 {drive} {a} 1"]
        lines += [f".save v({top})", f".measure ac f_{tag} when vp({top})=0 cross=1"]
        loops.append(top)
    lines += [".measure ac pulling_specified param='(f_specified/f_alone-1)*1e6'",
              ".measure ac pulling_wired param='(f_wired/f_alone-1)*1e6'",
              ".measure ac shift_ppm param='(f_wired/f_specified-1)*1e6'",
              f".measure ac shift_hz param='(f_wired/f_specified-1)*{number(fx)}'",
              # from just below the marked frequency to above the load resonances, in steps of 0.05 ppm
              f".ac lin 42001 {number(fx * (1 - 100e-6))} {number(fx * (1 + 2000e-6))}"]
    sheet.check(deck, "pulling_specified", "crystal", x.name, "pulling at the specified load")
    sheet.check(deck, "pulling_wired", "crystal", x.name, "pulling at the actual load")
    sheet.check(deck, "shift_ppm", "crystal", x.name, "shift from the specified frequency")
    sheet.check(deck, "shift_hz", "crystal", x.name, "shift in frequency")
    return deck
