"""Remedies for coil and crystal returns: follow the return path from the part to the rail, so the
plan ends as the rule describes (the supply rail through about 10 ohm, bypassed to ground)."""

from __future__ import annotations

from speccheck import units
from speccheck.findings import Finding
from speccheck.solver.base import Change, Option, Proposal, Situation, remedy, value_change

DECOUPLING_MAX_OHMS = 100.0  # a series feed above this starves the pin's bias (common practice)
DECOUPLING = (10.0, 100e-9)  # the rule's "about 10 ohm with a 100 nF bypass" (common practice)


def _end_change(part, old: str, new: str) -> Change | None:
    if old not in part.ends or new in part.ends:
        return None
    return Change(part.places["ends"] + (part.ends.index(old),), new)


def _grounded(s: Situation, node: str, kind: str, besides) -> list:
    """Parts of this kind from `node` to ground (not `besides`)."""
    nets = s.build.nets
    return [
        p
        for p in nets.parts_on(node)
        if p is not besides and p.kind == kind and nets.is_ground(p.other_end(node) or "")
    ]


def _fed_from(s: Situation, node: str, rail: str) -> bool:
    """The node is fed from `rail` through a resistor and bypassed to ground: the rule's return."""
    nets = s.build.nets
    fed = any(p.kind == "resistor" and p.other_end(node) == rail for p in nets.parts_on(node))
    return fed and bool(_grounded(s, node, "capacitor", None))


def _return_through_feed(s: Situation, coil, node: str, rail: str) -> Option | None:
    """Coil (or crystal) -> node -> resistor to ground (and a bypass): lift the resistor's ground end
    to the rail, so the node is fed from the supply and stays bypassed, as the rule describes."""
    resistors = [p for p in _grounded(s, node, "resistor", coil) if len(p.ends) == 2]
    if not resistors:
        return None
    feed, ground_end = resistors[0], resistors[0].other_end(node)
    pin = coil.other_end(node)
    moved = _end_change(feed, ground_end, rail) if ground_end else None
    if moved is None:
        return None
    changes, words = [moved], [f"{feed.name} ends: {ground_end} -> {rail}"]
    ohms = feed.value.si if feed.value is not None else None
    if ohms is None or ohms > DECOUPLING_MAX_OHMS:
        changes.append(value_change(feed, DECOUPLING[0], "Ω"))
        words.append(f"{feed.name} {units.fmt(DECOUPLING[0], 'Ω')}")
        ohms = DECOUPLING[0]
    bypass = _grounded(s, node, "capacitor", coil)
    if bypass:
        kept = f"{bypass[0].name} keeps {node} bypassed to {ground_end}"
    else:
        name = s.new_name("C")
        changes.append(_new_bypass(name, node, ground_end))
        words.append(f"add {name} {units.fmt(DECOUPLING[1], 'F')} from {node} to {ground_end}")
        kept = f"{name} bypasses {node} to {ground_end}"
    return Option(
        changes,
        "; ".join(words),
        f"{coil.name} returns {pin} to {rail} through {feed.name} ({units.fmt(ohms, 'Ω')}); {kept}",
    )


def _new_bypass(name: str, node: str, ground: str) -> Change:
    value = {"kind": "capacitor", "value": units.plan_text(DECOUPLING[1], "F"), "dielectric": "ceramic"}
    return Change(("parts",), {**value, "ends": [node, ground]}, key=name)


def _tank_node(s: Situation, coil, pin: str) -> str | None:
    """The node the rest of the tank (its capacitor, its damping) returns to, when that node is fed."""
    nets = s.build.nets
    others = [p for p in nets.parts_on(pin) if p is not coil and p.kind in ("capacitor", "resistor")]
    for part in others:
        node = part.other_end(pin)
        if node and not nets.is_rail(node) and "." not in node:
            return node
    return None


@remedy("wiring.tank-return")
def tank_return(s: Situation, f: Finding) -> Proposal | None:
    coil = s.part_for(f)
    far = next((v.value for v in f.values if v.name == "coil far end"), None)
    pin = next((v.value for v in f.values if v.name == "pin"), None)
    dev = s.build.device(str(pin).split(".")[0]) if pin else None
    if coil is None or not isinstance(far, str) or not isinstance(pin, str) or dev is None or not dev.rail:
        return None
    rail, nets, options = dev.rail, s.build.nets, []
    if not nets.is_ground(far) and not nets.is_rail(far):
        feed = _return_through_feed(s, coil, far, rail)
        if feed is not None:
            options.append(feed)
    node = _tank_node(s, coil, pin)
    if node and node != far and _fed_from(s, node, rail):
        moved = _end_change(coil, far, node)
        if moved is not None:
            options.append(
                Option(
                    [moved],
                    f"{coil.name} ends: {far} -> {node}",
                    f"{coil.name} returns with the rest of the tank to {node}, fed from {rail} and "
                    "bypassed to ground",
                )
            )
    if nets.is_ground(far) and not options:
        decoupled = _decoupled_return(s, coil, far, rail)
        options += [decoupled] if decoupled is not None else []
    direct = _end_change(coil, far, rail)
    if direct is not None:
        options.append(
            Option(
                [direct],
                f"{coil.name} ends: {far} -> {rail}",
                f"the coil returns {pin} to its supply {rail} directly (keep {rail} bypassed close by)",
            )
        )
    return Proposal(
        f,
        f"{coil.name} return",
        options,
        source="common practice (the rule's fix: the supply rail through about 10 ohm with a 100 nF "
        "bypass to ground)",
    )


def _decoupled_return(s: Situation, coil, ground: str, rail: str) -> Option | None:
    """Coil straight to ground: a new node fed from the rail through 10 ohm, bypassed by 100 nF."""
    moved_from = ground
    node = s.new_net("TANK_FEED")
    moved = _end_change(coil, moved_from, node)
    if moved is None:
        return None
    r_name, c_name = s.new_name("R"), s.new_name("C")
    feed = {"kind": "resistor", "value": units.plan_text(DECOUPLING[0], "Ω"), "ends": [node, rail]}
    changes = [moved, Change(("parts",), feed, key=r_name), _new_bypass(c_name, node, ground)]
    return Option(
        changes,
        f"{coil.name} ends: {ground} -> {node}; add {r_name} {units.fmt(DECOUPLING[0], 'Ω')} from {node} to "
        f"{rail} and {c_name} {units.fmt(DECOUPLING[1], 'F')} from {node} to {ground}",
        f"{coil.name} returns {coil.other_end(ground)} to {rail} through {r_name}; {c_name} keeps the "
        "supply's noise out",
    )


BLOCKING = 1e-9  # the rule's "a series capacitor (about 1 nF)" (common practice)


@remedy("wiring.crystal-dc")
def crystal_dc(s: Situation, f: Finding) -> Proposal | None:
    """The far end to the pin's own potential (its bypassed supply rail) where the pin sits there;
    else a 1 nF blocking capacitor in series, the rule's other fix (new parts only where needed,
    so that the names proposed further on stay without gaps)."""
    part = s.part_for(f)
    if part is None or len(part.ends) != 2:
        return None
    nets = s.build.nets
    pots = [nets.dc(end) for end in part.ends]
    if any(p is None for p in pots):
        return None
    pin_index = 0 if "." in part.ends[0] else 1
    pin, other = part.ends[pin_index], part.ends[1 - pin_index]
    dev = s.build.device(pin.split(".")[0])
    options = []
    rail = dev.rail if dev is not None else None
    rail_dc = nets.dc(rail) if rail else None
    at_rail = rail_dc is not None and abs(rail_dc.volts - pots[pin_index].volts) < 1e-9
    if rail and at_rail and not nets.is_ground(other) and not nets.is_rail(other):
        feed = _return_through_feed(s, part, other, rail)
        options += [feed] if feed is not None else []
    moved = _end_change(part, other, rail) if rail and at_rail and not options else None
    if moved is not None:
        options.append(
            Option(
                [moved],
                f"{part.name} ends: {other} -> {rail}",
                f"both ends at {pots[pin_index].volts:g} V; {rail} must be bypassed to ground at the crystal",
            )
        )
    blocked = _blocking_capacitor(s, part, other) if not options else None  # names only when used
    options += [blocked] if blocked is not None else []
    return Proposal(
        f,
        f"{part.name} return",
        options,
        source="common practice (the rule's fix: the far end at the pin's potential, or a series capacitor "
        "of about 1 nF)",
    )


def _blocking_capacitor(s: Situation, crystal, far: str) -> Option | None:
    """A 1 nF capacitor between the crystal's far end and the net it went to: no DC across the crystal,
    and against a load of some 20 pF it is close to a short at the oscillator's frequency."""
    node = s.new_net(f"{crystal.name}_DC")
    moved = _end_change(crystal, far, node)
    if moved is None:
        return None
    name = s.new_name("C")
    value = {"kind": "capacitor", "value": units.plan_text(BLOCKING, "F"), "dielectric": "ceramic"}
    return Option(
        [moved, Change(("parts",), {**value, "ends": [node, far]}, key=name)],
        f"add {name} {units.fmt(BLOCKING, 'F')} in series: {crystal.name} ends: {far} -> {node}, {name} from "
        f"{node} to {far}",
        f"{name} blocks the DC; {units.fmt(BLOCKING, 'F')} in series with the crystal's load changes it by "
        "a few percent at most",
    )
