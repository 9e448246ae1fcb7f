"""What loads a net: the passive parts behind it on the plan's nets, and the plain resistance
they make at audio frequencies.

Rails count as AC ground (an ideal supply is a short at signal frequencies) and device pins as
open (their input impedance is not known). Both the audio rules (the loaded RC corner) and the
SPICE decks (the as-wired copy of an RC stage) read the same walk from here.
"""

from __future__ import annotations

from dataclasses import dataclass

from speccheck.formulas import audio

PASSIVE = {"resistor": "R", "potentiometer": "R", "speaker": "R", "capacitor": "C", "inductor": "L"}

# A capacitor in the load counts as a short at the stage's corner when it is at least this many
# times the stage's own capacitor: its reactance there is then at most 1 % of the stage's
# resistance, i.e. its own corner with that resistance lies two decades below the RC corner
# (common practice: "two decades away" is where a first-order section no longer matters).
SHORT_RATIO = 100.0


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


def members(build, part) -> list:
    """The real parts behind a part: the several a format-2 list stands in for (damping
    resistors in parallel, filter capacitors side by side), or the part itself."""
    refs = getattr(part, "combined_from", None) or ()
    found = [build.parts.get(r) for r in refs]
    return [p for p in found if p is not None and p.value is not None] or [part]


def rc_output(build, stage) -> tuple | None:
    """(resistor, capacitor, input net, output net) of an RC stage given by its parts: the output
    is the net the resistor shares with the capacitor; None when the stage has no such net."""
    res, cap = build.part(stage.resistor), build.part(stage.capacitor)
    if res is None or cap is None or res.value is None or cap.value is None:
        return None
    shared = [n for n in res.ends if any(n in c.ends for c in members(build, cap))]
    if not shared:
        return None
    return res, cap, res.other_end(shared[0]), shared[0]


@dataclass(frozen=True)
class Load:
    ohms: float  # the plain resistance the load makes, from the net to AC ground
    parts: tuple  # every part of the load (names)
    shorted: tuple  # the capacitors counted as shorts (names)


@dataclass(frozen=True)
class NotPlain:
    parts: tuple  # every part of the load (names)
    reactive: tuple  # the capacitors or coils that keep it from being a plain resistance


def resistive_load(build, stage) -> Load | NotPlain | None:
    """The load on an RC stage's output as a plain resistance, or NotPlain when a capacitor
    in it is too small to count as a short (or a coil is in it): the response is then no longer
    first order. None when nothing loads the output (or the stage is not given by its parts)."""
    found = rc_output(build, stage)
    if found is None:
        return None
    res, cap, _inp, out = found
    skip = {res.name, cap.name, *(p.name for p in members(build, cap))}
    parts = load_on(build, out, skip)
    if not parts:
        return None
    names = tuple(p.name for p in parts)
    reactive = tuple(p.name for p in parts if p.kind == "inductor"
                     or (p.kind == "capacitor" and p.value.si < SHORT_RATIO * cap.value.si))
    if reactive:
        return NotPlain(names, reactive)
    shorted = [p for p in parts if p.kind == "capacitor"]
    merged = _merge(build, out, shorted)
    resistors = [(merged(p.ends[0]), merged(p.ends[1]), p.value.si) for p in parts if p.kind != "capacitor"]
    grounds = {merged(r) for r in build.rails}
    ohms = audio.node_resistance(resistors, merged(out), grounds)
    if ohms is None:
        return None
    if ohms <= 0:  # a capacitor shorts the output itself to AC ground: no corner to speak of
        return NotPlain(names, tuple(p.name for p in shorted))
    return Load(ohms, names, tuple(p.name for p in shorted))


def _merge(build, out: str, shorted: list):
    """A net-renaming function that joins the two ends of every shorted capacitor (a capacitor
    to a rail makes its other end a rail too)."""
    parent: dict = {}

    def find(net: str) -> str:
        while parent.get(net, net) != net:
            net = parent[net]
        return net

    for part in shorted:
        a, b = (find(e) for e in part.ends)
        if a != b:
            # keep a rail's name so that the joined net counts as AC ground
            keep, drop = (a, b) if a in build.rails else (b, a)
            parent[drop] = keep
    return find
