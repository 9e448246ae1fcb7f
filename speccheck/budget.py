"""The power budget of a build: what each rail and the supply input must deliver.

Computed once per build and cached (`budget`): quiescent currents, each audio amplifier's
supply current at full output for its topology, what the regulators deliver and so draw from
their own rails. The power, audio and mains rule families read it, and so can reporters; the
arithmetic is in speccheck.formulas.
"""

from __future__ import annotations

import weakref
from dataclasses import dataclass, field
from typing import Any

from speccheck.formulas.amplifiers import class_b_full_output, rms_with_dc

AMPLIFIER = "audio-power-amplifier"


REGULATOR = "linear-regulator"


DC_KINDS = ("battery", "dc-adapter", "bench")


RESERVOIR_MIN = 10e-6  # F; a capacitor this large on a rectifier output is its reservoir


def rail_volts(build, name: str | None) -> float | None:
    rail = build.rails.get(name) if name else None
    return rail.voltage.si if rail and rail.voltage else None


def ambient(build) -> float | None:
    info = build.build
    return info.ambient_max.si if info and info.ambient_max else None


def supply_fuse(build):
    """The supply's fuse part, when supply.fuse names a part of kind fuse."""
    part = build.part(build.supply.fuse) if build.supply else None
    return part if part and part.kind == "fuse" else None


def fused_rail(build) -> str | None:
    supply = build.supply
    if supply is None:
        return None
    if supply.rail:
        return supply.rail
    fuse = supply_fuse(build)
    for end in (fuse.ends if fuse else ()):
        if end in build.rails:
            return end
    return None


def bulk_capacitors(build, rail: str | None) -> list:
    """Capacitors straight across the rail to a ground."""
    if not rail:
        return []
    nets = build.nets
    out = []
    for part in nets.parts_on(rail):
        if part.kind == "capacitor" and part.value and nets.is_ground(part.other_end(rail) or ""):
            out.append(part)
    return out


@dataclass
class AmpPoint:
    device: Any
    topology: str
    v_supply: float
    v_negative: float | None
    r_load: float
    load_text: str
    stage: Any
    saturation: float = 0.0  # volts the output keeps from the rails at clipping (profile), 0 when not stated
    rated_output: float | None = None  # the profile's rated output power, W

    @property
    def label(self) -> str:
        return self.stage.label if self.stage else "audio-amp"

    def full_output(self) -> dict:
        """The full sine output this amplifier really reaches (speccheck.formulas.amplifiers)."""
        return class_b_full_output(self.topology, self.v_supply, self.r_load, self.v_negative,
                                   self.saturation, self.rated_output)

    @property
    def swing_text(self) -> str:
        """How the full output was limited, for messages and the sheet."""
        parts = []
        if self.saturation:
            parts.append(f"{self.saturation:g} V saturation")
        if self.rated_output:
            parts.append(f"rated {self.rated_output:g} W")
        return ", ".join(parts) or "rail to rail (the profile states no saturation)"


def amp_point(build, dev) -> tuple[AmpPoint | None, list]:
    """The operating point of an audio amplifier device, or the missing inputs as (message, location)."""
    prof = dev.profile
    missing = []
    stage = next((s for s in build.stages("audio-amp") if s.device == dev.name), None)
    topology = prof.output_topology
    if not topology:
        missing.append((f"profile {prof.name} of {dev.name} does not state output_topology "
                        f"(profiles.{prof.name}.output_topology: single-ended, bridge or split-supply)",
                        prof.loc))
    v_supply = rail_volts(build, dev.rail)
    if v_supply is None:
        missing.append((f"{dev.name} has no supply rail with a voltage (devices.{dev.name}.rail)", dev.loc))
    v_negative = None
    if topology == "split-supply":
        v_negative = rail_volts(build, dev.negative_rail)
        if v_negative is None:
            missing.append((f"{dev.name} is a split-supply amplifier but devices.{dev.name}.negative_rail "
                            "does not name a rail with a voltage", dev.at("negative_rail")))
    r_load, load_text = None, ""
    load = build.part(stage.load) if stage else None
    if load is not None and load.value is not None and load.kind in ("speaker", "resistor"):
        r_load, load_text = load.value.si, f"{load.name} ({load.value.text})"
    elif stage is not None and (stage.load_resistance or stage.load_impedance) is not None:
        given = stage.load_resistance or stage.load_impedance  # v2 name, v1 name
        r_load, load_text = given.si, given.text
    if r_load is None:
        where = stage.at("load") if stage else dev.loc
        missing.append((f"no load impedance for {dev.name}: name its speaker in the audio-amp stage "
                        f"(chain[].load, with the speaker's value)", where))
    if missing or v_supply == 0 or v_supply is None or r_load is None:
        return None, missing
    sat = prof.saturation.si if prof.saturation is not None else 0.0
    rated = prof.rated_output.si if prof.rated_output is not None else None
    return AmpPoint(dev, topology, v_supply, v_negative, r_load, load_text, stage, sat, rated), []


@dataclass
class Budget:
    items: dict = field(default_factory=dict)  # rail -> [(owner, what, amps)]
    totals: dict = field(default_factory=dict)  # rail -> amps
    delivered: dict = field(default_factory=dict)  # regulator -> (amps out, computed from its rail)
    full_output: dict = field(default_factory=dict)  # amplifier -> {rail: amps}
    unknown_amps: list = field(default_factory=list)  # amplifiers whose full-output current is unknown
    no_rail: list = field(default_factory=list)  # devices with no rail
    bad_rail: list = field(default_factory=list)  # devices on a rail that is not declared (input.reference)
    no_quiescent: dict = field(default_factory=dict)  # profile name -> [devices]
    input: float | None = None
    input_rails: list = field(default_factory=list)
    pulsed: dict = field(default_factory=dict)  # amplifier -> (rail, average, RMS) of its full-output draw
    input_rms: float | None = None  # RMS of the supply input current at full output
    position: str = ""  # format 2: the switch positions this budget holds for, when positions differ
    by_position: dict = field(default_factory=dict)  # switch positions -> input current there

    @property
    def in_position(self) -> str:
        """' with S2 on' when switch positions change the budget: this is the position drawing most."""
        return f" with {self.position}" if self.position else ""

    @property
    def complete(self) -> bool:
        """False when some draw is unknown: the budget is then only a lower bound."""
        return not (self.unknown_amps or self.no_rail or self.bad_rail or self.no_quiescent)

    def gaps(self) -> str:
        parts = [f"{n}'s full-output current" for n in self.unknown_amps]
        parts += [f"{d.name} (no rail)" for d in self.no_rail + self.bad_rail]
        parts += [f"{', '.join(devs)} (no quiescent current)" for devs in self.no_quiescent.values()]
        return ", ".join(parts)


_BUDGETS: weakref.WeakKeyDictionary = weakref.WeakKeyDictionary()


def regulator_outputs(build, dev) -> list:
    if dev.output_rail:
        return [dev.output_rail] if dev.output_rail in build.rails else []
    return [name for name, r in build.rails.items() if r.source == dev.name]


def budget(build) -> Budget:
    """Quiescent currents, amplifier supply current at full output, regulators' input draw.

    In a switched build (format 2) the budget is worked out for every switch position the plan
    receives in, and the one with the largest input current is returned, naming its position."""
    cached = _BUDGETS.get(build)
    if cached is not None:
        return cached
    if build.switched and getattr(build, "configuration", None) is None:
        b = _worst_position(build)
    else:
        b = _one_budget(build)
    _BUDGETS[build] = b
    return b


def _worst_position(build) -> Budget:
    from speccheck import configs

    feeders = {switch for switch, _ in switched_rails(build)[0].values()}
    if not feeders:  # no switch changes what draws current: the build's own budget
        return _one_budget(build)
    found: dict = {}
    for cfg in build.configurations():
        key = tuple(p for p in cfg.positions if p[0] in feeders)  # only the switches that feed a rail
        if key not in found:
            found[key] = _one_budget(configs.view(build, cfg))
    labels = {pos: "; ".join(f"{ref} {where}" for ref, where in pos) for pos in found}
    worst_at = max(found, key=lambda pos: found[pos].input or 0.0)  # the first of equals: plan order
    worst = found[worst_at]
    inputs = {labels[pos]: b.input for pos, b in found.items()}
    if len({round(v or 0.0, 12) for v in inputs.values()}) > 1:
        worst.position, worst.by_position = labels[worst_at], inputs
    return worst


def _one_budget(build) -> Budget:
    b = Budget()
    direct: dict = {}

    def add(rail, owner, what, amps):
        direct.setdefault(rail, []).append((owner, what, amps))

    fed, dead = switched_rails(build)
    regulators = []
    for dev in build.devices.values():
        prof = dev.profile
        if prof is None or (dev.rail and dev.rail in dead):
            continue
        if not dev.rail or dev.rail not in build.rails:
            (b.no_rail if not dev.rail else b.bad_rail).append(dev)
            continue
        iq = prof.quiescent_current.si if prof.quiescent_current else None
        if iq is None:
            b.no_quiescent.setdefault(prof.name, []).append(dev.name)
        else:
            add(dev.rail, dev.name, "quiescent", iq)
        if prof.cls == AMPLIFIER:
            point, _ = amp_point(build, dev)
            if point is None:
                b.unknown_amps.append(dev.name)
            else:
                full = point.full_output()
                add(dev.rail, dev.name, "full output", full["i_pos"])
                b.pulsed[dev.name] = (dev.rail, full["i_pos"], full["rms_pos"])
                b.full_output[dev.name] = {dev.rail: full["i_pos"]}
                if point.topology == "split-supply" and dev.negative_rail in build.rails:
                    add(dev.negative_rail, dev.name, "full output", full["i_neg"])
                    b.full_output[dev.name][dev.negative_rail] = full["i_neg"]
                    if iq is not None:
                        add(dev.negative_rail, dev.name, "quiescent", iq)
        elif prof.cls == REGULATOR:
            regulators.append(dev)

    feeding: dict[str, list[Any]] = {}
    for reg in regulators:
        for out in regulator_outputs(build, reg):
            feeding.setdefault(reg.rail, []).append((reg, out))
    through: dict[str, list[Any]] = {}  # rail -> [(switch, rail it feeds through it)]
    for rail, (switch, common) in fed.items():
        if rail not in dead:
            through.setdefault(common, []).append((switch, rail))

    def total(rail, seen):
        if rail in b.totals:
            return b.totals[rail]
        if rail in seen:
            return 0.0
        seen = seen | {rail}
        items = list(direct.get(rail, []))
        for reg, out in feeding.get(rail, []):
            computed = total(out, seen)
            declared = reg.load_current.si if reg.load_current else None
            amps = max(declared, computed) if declared is not None else computed
            prior = b.delivered.get(reg.name, (0.0, 0.0))
            b.delivered[reg.name] = (prior[0] + amps, prior[1] + computed)
            items.append((reg.name, f"delivered to {out}", amps))
        for switch, out in through.get(rail, []):
            items.append((switch, f"switched to {out}", total(out, seen)))
        b.items[rail] = items
        b.totals[rail] = sum(a for _, _, a in items)
        return b.totals[rail]

    for name, rail in build.rails.items():
        if not rail.is_ground:
            total(name, frozenset())
    supply = build.supply
    if supply and supply.rail in b.totals:
        b.input_rails = [supply.rail]
    else:
        made = {out for reg in regulators for out in regulator_outputs(build, reg)} | set(fed)
        b.input_rails = [n for n, r in build.rails.items()
                         if not r.is_ground and r.source in (None, "supply") and n not in made]
    b.input = sum(b.totals.get(n, 0.0) for n in b.input_rails) if b.input_rails else None
    if b.input is not None:
        # The amplifiers' half-wave draw reaches the input through any regulator unchanged; the
        # rest is steady. Amplifiers are taken in step (one tone drives them all): the worst case.
        average = sum(avg for _, avg, _ in b.pulsed.values())
        rms = sum(r for _, _, r in b.pulsed.values())
        b.input_rms = rms_with_dc(max(0.0, b.input - average), average, rms) if b.pulsed else b.input
    return b


def switched_rails(build) -> tuple[dict, set]:
    """Rails a selector switch feeds from another rail (rail -> (switch, common rail)), and those of
    them the build's configuration leaves unfed, with the rails their regulators make (dead).
    A pole whose common is a rail feeds the rail on each of its throws; in a view the selected
    throw alone is fed. A build with no such pole has none (every format-1 file)."""
    fed: dict = {}
    chosen: set = set()
    cfg = getattr(build, "configuration", None)
    for part in build.parts.values():
        if not part.selector:
            continue
        for pole in part.poles.values():
            if pole.common not in build.rails:
                continue
            for position, net in pole.throws.items():
                if net in build.rails and net != pole.common:
                    fed.setdefault(net, (part.name, pole.common))
                    if cfg is None or cfg.position(part.name) == position:
                        chosen.add(net)
    dead = set(fed) - chosen
    grew = bool(dead)
    while grew:  # a regulator on a dead rail makes nothing
        off = {d.name for d in build.devices.values() if d.rail in dead}
        more = {n for n, r in build.rails.items() if r.source in off} - dead
        dead |= more
        grew = bool(more)
    return fed, dead


# ---- what the supply loses on its way to its rail --------------------------------------------

DIODE_DROP = 0.7  # V: a silicon rectifier diode at a few hundred mA (common practice)


def series_drops(build) -> list:
    """(what, volts) dropped in series between the supply and its rail at the budget current:
    a series reverse-polarity diode (its forward_voltage, else 0.7 V) and a series resistor or
    a resistor used as the fuse (I·R at the input current budget)."""
    supply = build.supply
    if supply is None:
        return []
    out = []
    diode = build.part(supply.reverse_protection) if supply.reverse_protection not in (None, "none") else None
    nets = build.nets
    if diode is not None and diode.kind == "diode" and len(diode.ends) == 2 and \
            not any(nets.is_ground(end) for end in diode.ends):
        vf = diode.forward_voltage.si if diode.forward_voltage is not None else DIODE_DROP
        assumed = "" if diode.forward_voltage is not None else f", {DIODE_DROP:g} V assumed"
        out.append((f"series diode {diode.name}{assumed}", vf))
    amps = budget(build).input or 0.0
    seen = set()
    for ref in (supply.series_resistor, supply.fuse):
        part = build.part(ref) if ref else None
        if part is not None and part.kind == "resistor" and part.value is not None and part.name not in seen:
            seen.add(part.name)
            out.append((f"{part.name} {part.value.text} at {amps:.3g} A", amps * part.value.si))
    return out


def rail_after_drops(build, rail: str | None) -> tuple:
    """(volts, drops) of a rail: the supply's own rail is the supply voltage less its series drops
    (never more than the rail's declared voltage); any other rail is as declared."""
    volts = rail_volts(build, rail)
    supply = build.supply
    if volts is None or supply is None or supply.voltage is None or rail != fused_rail(build):
        return volts, []
    drops = series_drops(build)
    if not drops:
        return volts, []
    return min(volts, abs(supply.voltage.si) - sum(v for _, v in drops)), drops
