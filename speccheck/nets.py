"""Nets of a build and the DC potential each one sits at.

A net's DC potential comes from what the plan states: a rail's voltage, a device pin's DC
bias from its profile, a named node's declared voltage. It then spreads across parts that
carry DC with (nearly) no drop: coils, fuses, switches, speaker voice coils, transformer
windings. Resistors spread it too, one step later, on the usual assumption that the bias
current through them is small; a net that two different potentials reach that way is left
unknown rather than guessed. The ends of a potentiometer's track inside a resistor divider
(a pot with fixed resistors above and below it, between a rail and ground) carry the divider's
current, so they are solved by nodal analysis instead (formulas/dividers.network_voltages).
"""

from __future__ import annotations

import heapq
import weakref
from dataclasses import dataclass
from typing import Any

ZERO_DROP = {"inductor", "fuse", "switch", "speaker", "connector", "transformer"}
SMALL_DROP = {"resistor", "potentiometer"}


@dataclass(frozen=True, slots=True)
class Potential:
    volts: float
    why: str  # how it was found, for the finding's text
    origin: str  # the net the value was first stated on


def split_pin(net: str) -> tuple[str, str] | None:
    """'U1.quad' -> ('U1', 'quad'); None for a plain net name."""
    if "." in net:
        device, _, pin = net.partition(".")
        return device, pin
    return None


class NetGraph:
    def __init__(self, build):
        # A proxy, not the build itself: the build caches this graph, and a reference cycle
        # would leave every checked build for the cyclic garbage collector to find.
        self.build = weakref.proxy(build)
        self.links: dict[str, list] = {}  # net -> [(part, other net, cost)]
        self.members: dict[str, list] = {}  # net -> [part]
        for part in build.parts.values():
            for net in dict.fromkeys(part.terminals.values() or part.ends):
                self.members.setdefault(net, []).append(part)
            for pair in self._pairs(part):
                a, b = pair
                cost = 0 if part.kind in ZERO_DROP else 1 if part.kind in SMALL_DROP else None
                if cost is not None:
                    self.links.setdefault(a, []).append((part, b, cost))
                    self.links.setdefault(b, []).append((part, a, cost))
        self.cost: dict[str, int] = {}  # net -> resistors between it and a stated potential
        self.potentials = self._solve()
        self._divide_pot_tracks()
        self.spans = self._wipers()

    def _pairs(self, part):
        if part.kind == "transformer":
            return [tuple(w) for w in (part.primary, part.secondary) if len(w) == 2]
        if part.selector:  # a selector joins each pole's common to the throw of the position in use
            here = self.build.selected.get(part.name)
            return [(pole.common, pole.throws[here]) for pole in part.poles.values()
                    if pole.common and here in pole.throws and pole.common != pole.throws[here]]
        return [tuple(part.ends)] if len(part.ends) == 2 else []

    def _wipers(self) -> dict:
        """A wiper sits anywhere between its track's end potentials: net -> (low, high, pot)."""
        spans = {}
        for part in self.build.parts.values():
            if part.kind != "potentiometer" or not part.wiper or len(part.ends) != 2:
                continue
            a, b = (self.potentials.get(e) for e in part.ends)
            if a is None or b is None:
                continue
            spans[part.wiper] = (min(a.volts, b.volts), max(a.volts, b.volts), part)
            spread = self.potentials.get(part.wiper)
            if spread is not None and spread.origin != part.wiper and abs(a.volts - b.volts) >= 1e-9:
                # a guess through resistors; the wiper's range is what is known
                del self.potentials[part.wiper]
            if part.wiper not in self.potentials and abs(a.volts - b.volts) < 1e-9:
                self.potentials[part.wiper] = Potential(
                    a.volts, f"{a.why}, at both ends of {part.name}", a.origin
                )
        return spans

    def span(self, net: str | None) -> tuple | None:
        """(lowest, highest) DC the net can sit at: a known potential, or a wiper's range."""
        if not net:
            return None
        pot = self.potentials.get(net)
        if pot is not None:
            return pot.volts, pot.volts
        found = self.spans.get(net)
        return (found[0], found[1]) if found else None

    # ---- stated potentials ----------------------------------------------------------
    def rail_voltage(self, name: str | None) -> float | None:
        rail = self.build.rails.get(name) if name else None
        return rail.voltage.si if rail and rail.voltage else None

    def is_ground(self, net: str) -> bool:
        rail = self.build.rails.get(net)
        return bool(rail and rail.is_ground)

    def is_rail(self, net: str) -> bool:
        rail = self.build.rails.get(net)
        return bool(rail and not rail.is_ground)

    def stated(self, net: str) -> Potential | None:
        rail = self.build.rails.get(net)
        if rail and rail.voltage:
            what = "ground" if rail.is_ground else "rail"
            return Potential(rail.voltage.si, f"{net} is a {what} at {rail.voltage.text}", net)
        node = self.build.nodes.get(net)
        if node and node.dc:
            return Potential(node.dc.si, f"{net} is declared at {node.dc.text}", net)
        pin_of = split_pin(net)
        if not pin_of:
            return None
        device = self.build.device(pin_of[0])
        pin = device.pin(pin_of[1]) if device else None
        if not pin or pin.dc in (None, "none"):
            return None
        supply = self.rail_voltage(device.rail)
        if pin.dc == "ground":
            return Potential(0.0, f"pin {pin.name} of {device.name} sits at ground", net)
        if pin.dc == "supply" and supply is not None:
            return Potential(
                supply,
                f"pin {pin.name} of {device.name} sits at its supply {device.rail} ({supply:g} V)",
                net,
            )
        if pin.dc == "half-supply" and supply is not None:
            return Potential(
                supply / 2,
                f"pin {pin.name} of {device.name} sits at half its supply ({supply / 2:g} V of {supply:g} V)",
                net,
            )
        if hasattr(pin.dc, "si"):
            return Potential(pin.dc.si, f"pin {pin.name} of {device.name} is biased at {pin.dc.text}", net)
        return None

    # ---- spreading --------------------------------------------------------------------
    def _solve(self) -> dict:
        nets = set(self.members) | set(self.build.rails) | set(self.build.nodes)
        best: dict[str, tuple] = {}
        heap: list[tuple[Any, ...]] = []
        for net in sorted(nets):
            pot = self.stated(net)
            if pot:
                best[net] = (0, pot)
                heapq.heappush(heap, (0, net))
        conflicted = set()
        while heap:
            cost, net = heapq.heappop(heap)
            if best[net][0] != cost or net in conflicted:
                continue
            pot = best[net][1]
            for part, other, step in self.links.get(net, ()):
                new_cost = cost + step
                new = Potential(pot.volts, f"{pot.why}, reaching {other} through {part.name}", pot.origin)
                if other not in best or new_cost < best[other][0]:
                    best[other] = (new_cost, new)
                    conflicted.discard(other)
                    heapq.heappush(heap, (new_cost, other))
                elif (
                    best[other][0] == new_cost
                    and new_cost > 0
                    and abs(best[other][1].volts - pot.volts) > 1e-9
                ):
                    conflicted.add(other)
        self.cost = {net: c for net, (c, p) in best.items() if net not in conflicted}
        return {net: p for net, (c, p) in best.items() if net not in conflicted}

    def _divide_pot_tracks(self) -> None:
        """A pot whose track ends are reached only through resistors from two or more different
        stiff potentials sits in a divider: its ends are set by the divider's current, not by the
        nearest rail."""
        from speccheck.formulas.dividers import network_voltages

        for part in self.build.parts.values():
            if part.kind != "potentiometer" or not part.wiper or len(part.ends) != 2:
                continue
            if all(self.cost.get(end) == 0 for end in part.ends):
                continue  # both ends stiff: nothing to divide
            network = self._resistive_network(part.ends)
            if network is None:
                continue
            resistors, held, names = network
            if len({round(v, 9) for v in held.values()}) < 2:
                continue  # one potential only: no current flows, the spread value is exact
            volts = network_voltages(resistors, held)
            edge = " to ".join(f"{net} ({held[net]:g} V)" for net in sorted(held, key=held.get, reverse=True))
            for end in part.ends:
                if end in volts:
                    self.potentials[end] = Potential(
                        volts[end], f"the divider {', '.join(names)} from {edge} sets {end} at "
                        f"{volts[end]:.3g} V", end)

    def _resistive_network(self, start) -> tuple | None:
        """(resistors as (a, b, ohms), stiff nets held at their volts, part names) of the resistors
        and pot tracks joined to `start`, up to the nets whose potential is stated or reached with
        no drop; None when a part in it has no value or no stiff net bounds it."""
        resistors, held, names = [], {}, []
        seen, todo, parts = set(start), list(start), set()
        while todo:
            net = todo.pop()
            if self.cost.get(net) == 0:
                held[net] = self.potentials[net].volts
                continue
            for part, other, step in self.links.get(net, ()):
                if step != 1 or part.name in parts:
                    continue
                if part.value is None or part.value.si <= 0:
                    return None
                parts.add(part.name)
                names.append(part.name)
                a, b = part.ends
                resistors.append((a, b, part.value.si))
                if other not in seen:
                    seen.add(other)
                    todo.append(other)
        return (resistors, held, sorted(names)) if held else None

    def dc(self, net: str | None) -> Potential | None:
        return self.potentials.get(net) if net else None

    def across(self, part) -> tuple | None:
        """(net a, Potential a, net b, Potential b, |difference| in V) for a two-ended part whose
        nets both have a known DC potential, else None."""
        if len(part.ends) != 2:
            return None
        a, b = part.ends
        pa, pb = self.dc(a), self.dc(b)
        if pa is None or pb is None:
            return None
        return a, pa, b, pb, abs(pa.volts - pb.volts)

    def parts_on(self, net: str) -> list:
        return self.members.get(net, [])
