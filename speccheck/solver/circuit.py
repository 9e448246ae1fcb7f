"""Remedies for wiring, power and the parts a stage lacks: capacitor ratings and polarity, coil and
crystal returns, fuse rating and speed, heat sink, output network and input bypass."""

from __future__ import annotations

import math

from speccheck import units
from speccheck.findings import Finding
from speccheck.formulas import audio, picks
from speccheck.formulas.amplifiers import class_b_dissipation
from speccheck.formulas.thermal import junction_temperature
from speccheck.solver.base import (
    Change,
    Option,
    Proposal,
    Situation,
    number,
    remedy,
    set_or_add,
    value_change,
)

# ---- wiring -----------------------------------------------------------------------------------


@remedy("wiring.cap-voltage")
def cap_voltage(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    working = (number(f, "DC across") or 0.0) + (number(f, "AC peak") or 0.0)
    rating = number(f, "rating")
    allowed = next((v.value for v in f.values if v.name.startswith("allowed at")), None)
    if part is None or not working or not rating or not isinstance(allowed, float):
        return None
    share = allowed / rating
    options: list[Option] = []
    pick = picks.voltage_rating_up(working / share)
    while pick is not None and len(options) < 2:
        options.append(
            Option(
                [set_or_add(part, "voltage_rating", units.plan_text(pick, "V"))],
                f"{part.name} rated {units.fmt(pick, 'V')}",
                f"{working:.3g} V is {working / pick:.0%} of {units.fmt(pick, 'V')} (keep under {share:.0%})",
            )
        )
        pick = picks.voltage_rating_up(pick * 1.001)
    return Proposal(
        f,
        f"{part.name} voltage rating",
        options,
        source="stocked capacitor voltage ratings (R5 of ISO 3, and common practice); derating: the rule's",
    )


def _polarity(s: Situation, f: Finding, positive: str | None, why: str) -> Proposal | None:
    part = s.part_for(f)
    if part is None or not positive:
        return None
    change = set_or_add(part, "positive", positive)
    return Proposal(
        f,
        f"{part.name} polarity",
        [Option([change], f"{part.name} positive: {positive}", why)],
        source="common practice: + toward the higher DC potential",
    )


def _higher_end(s: Situation, part) -> tuple[str, str] | None:
    known = s.build.nets.across(part)
    if known is None:
        return None
    a, pa, b, pb, _ = known
    if pa.volts == pb.volts:
        return None
    high, low = (a, b) if pa.volts > pb.volts else (b, a)
    return high, f"{high} sits at {max(pa.volts, pb.volts):g} V, {low} at {min(pa.volts, pb.volts):g} V"


@remedy("wiring.polarity-unstated")
def polarity_unstated(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    found = _higher_end(s, part) if part is not None else None
    return _polarity(s, f, *found) if found else None


@remedy("wiring.polarity-reversed")
def polarity_reversed(s: Situation, f: Finding) -> Proposal | None:
    return polarity_unstated(s, f)


@remedy("wiring.speaker-coupling")
def speaker_coupling(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    stage = next(
        (st for st in s.build.stages("audio-amp") if part is not None and st.coupling == part.name), None
    )
    load = s.build.part(stage.load) if stage is not None else None
    if part is None or load is None or len(part.ends) != 2:
        return None
    shared = [end for end in part.ends if end in load.ends]
    if len(shared) != 1:
        return None
    nets = (part.other_end(shared[0]), shared[0])  # (amplifier side, speaker side)
    return _polarity(s, f, nets[0], f"+ toward the amplifier output {nets[0]}, - toward the speaker")


def _swap_end(s: Situation, f: Finding, part, old: str, new: str, why: str, title: str) -> Proposal | None:
    if old not in part.ends or new in part.ends:
        return None
    index = part.ends.index(old)
    path = part.places["ends"] + (index,)
    return Proposal(
        f,
        title,
        [Option([Change(path, new)], f"{part.name} ends: {old} -> {new}", why)],
        source="common practice (the fix the rule names)",
    )


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
        f"{coil.name} returns the pin to {rail} through {r_name}; {c_name} keeps the supply's noise out",
    )


@remedy("wiring.crystal-dc")
def crystal_dc(s: Situation, f: Finding) -> Proposal | None:
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
    if dev is None or not dev.rail or nets.dc(dev.rail) is None:
        return None
    if abs(nets.dc(dev.rail).volts - pots[pin_index].volts) > 1e-9:
        return None  # the pin does not sit at its supply: returning there would not remove the DC
    if not nets.is_ground(other) and not nets.is_rail(other):
        feed = _return_through_feed(s, part, other, dev.rail)
        if feed is not None:
            return Proposal(
                f,
                f"{part.name} return",
                [feed],
                source="common practice (the rule's fix: the far end at the pin's potential, bypassed)",
            )
    return _swap_end(
        s,
        f,
        part,
        other,
        dev.rail,
        f"both ends at {pots[pin_index].volts:g} V; {dev.rail} must be bypassed to ground at the crystal",
        f"{part.name} return",
    )


# ---- power ------------------------------------------------------------------------------------


@remedy("power.fuse-size")
def fuse_size(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    preferred = number(f, "preferred")
    if part is None or not preferred:
        return None
    return Proposal(
        f,
        f"{part.name} rating",
        [
            Option(
                [set_or_add(part, "current_rating", units.plan_text(preferred, "A"))],
                f"{part.name} {units.fmt(preferred, 'A')}",
                f"normal current {units.fmt(number(f, 'normal current') or 0.0, 'A')} within the derated "
                f"share of {units.fmt(preferred, 'A')}",
            )
        ],
        source="R10 series, IEC 60127-1 Annex A (the rule's pick)",
    )


@remedy("power.fuse-inrush")
def fuse_inrush(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    if part is None or part.kind != "fuse" or part.speed == "time-lag":
        return None
    return Proposal(
        f,
        f"{part.name} speed",
        [
            Option(
                [set_or_add(part, "speed", "time-lag")],
                f"{part.name} time-lag",
                "a time-lag fuse rides through the charging surge of the bulk capacitor",
            )
        ],
        source="IEC 60127-2 time-lag characteristic (the rule's comparison)",
    )


@remedy("power.heat")
def heat(s: Situation, f: Finding) -> Proposal | None:
    """A heat sink where the package takes one that can be bought; else (and after it) a lower supply
    or a higher-impedance speaker that keeps the junction within its limit without one."""
    dev = s.device_for(f)
    if dev is None or dev.profile is None:
        return None
    sinks = _heat_sink_options(s, f, dev)
    cooler = _cooler_amplifier(s, f, dev)
    notes = [] if sinks else _no_heat_sink_why(f, dev)
    if any(o.summary.startswith("supply") or " on " in o.summary for o in cooler):
        notes.append(
            f"a lower supply feeds everything on {dev.rail} (the check after the change covers it); "
            "rename the rail if its name states its voltage"
        )
    return Proposal(
        f,
        f"{dev.name} junction temperature",
        sinks + cooler,
        note="; ".join(notes),
        source="θSA = (Tj,max - Ta)/P - θJC - θCS (the rule's figure), rounded down; heat sink bounds from "
        "memory; class-B dissipation V²/(2π²R_L) + V·I_q and T_j = T_a + P·θ (Boylestad & Nashelsky "
        "Example 12.8, the rule's formulas); supply voltages and speaker impedances: common practice",
    )


def _no_heat_sink_why(f: Finding, dev) -> list[str]:
    need = number(f, "heat sink needed θSA")
    jc = dev.profile.theta_jc.si if dev.profile.theta_jc is not None else None
    if need is None or jc is None:
        return []
    if need <= 0:
        return [f"no heat sink helps: θJC {units.fmt(jc, '°C/W')} alone takes the junction past its limit"]
    floor = picks.smallest_heat_sink(jc)
    return [
        f"a heat sink of θSA {units.fmt(need, '°C/W')} is not one this package can take (θJC "
        f"{units.fmt(jc, '°C/W')}: no tab; a small clip-on reaches about {units.fmt(floor, '°C/W')} at best, "
        "from memory)"
    ]


def _heat_sink_options(s: Situation, f: Finding, dev) -> list[Option]:
    need = number(f, "heat sink needed θSA")
    jc = dev.profile.theta_jc.si if dev.profile.theta_jc is not None else None
    if not need or need <= 0 or jc is None:
        return []  # θJC alone (with the interface) already takes the junction past its limit
    floor = picks.smallest_heat_sink(jc)
    options = []
    for pick in _heat_sink_steps(need):
        if pick < floor:
            continue
        text = units.plan_text(pick, "°C/W")
        if dev.heat_sink is not None and dev.heat_sink.theta_sa is not None:
            change = Change(dev.heat_sink.places["theta_sa"], text)
        elif dev.heat_sink is not None:
            change = Change(dev.heat_sink.doc_path, text, key="theta_sa")
        else:
            change = Change(dev.doc_path, {"theta_sa": text}, key="heat_sink")
        options.append(
            Option(
                [change],
                f"{dev.name} heat sink θSA {units.fmt(pick, '°C/W')}",
                f"θSA {units.fmt(need, '°C/W')} or less is needed; choose a heat sink rated at or "
                f"below {units.fmt(pick, '°C/W')} as mounted",
                figure=("heat", dev.name, "junction temperature at"),
            )
        )
    return options


def _heat_sink_steps(need: float) -> list[float]:
    """Round numbers at or below the needed θSA (heat sinks have no preferred series): two figures."""
    exponent = math.floor(math.log10(need)) - 1
    first = math.floor(need / 10**exponent) * 10**exponent
    return [float(f"{first:.2g}")] + ([float(f"{first * 0.8:.2g}")] if first * 0.8 > 0 else [])


def _junction_limit(s: Situation, dev) -> float | None:
    """tj_max less the rule's margin, as the rule published it on the design sheet."""
    for entry in s.before.sheet:
        named = entry.value.name.startswith("junction limit")
        if entry.section == "heat" and entry.owner == dev.name and named:
            value = entry.value.value
            return float(value) if isinstance(value, (int, float)) else None
    return None


def _cooler_amplifier(s: Situation, f: Finding, dev) -> list[Option]:
    """A lower common supply voltage, or the next speaker impedance up, that keeps the junction within
    the rule's limit on the thermal path it has now (class-B dissipation, T_j = T_a + P·θ)."""
    from dataclasses import replace

    from speccheck.budget import AMPLIFIER, amp_point

    found = number(f, "θ junction to ambient"), number(f, "ambient"), _junction_limit(s, dev)
    point = amp_point(s.build, dev)[0] if dev.profile.cls == AMPLIFIER else None
    if point is None or point.topology == "split-supply" or None in found:
        return []
    theta, ta, limit = (float(x or 0.0) for x in found)
    iq = dev.profile.quiescent_current.si if dev.profile.quiescent_current is not None else 0.0
    lowest = dev.profile.supply_min.si if dev.profile.supply_min is not None else 0.0
    highest = dev.profile.supply_max.si if dev.profile.supply_max is not None else math.inf

    def junction(volts: float, ohms: float) -> float:
        power = class_b_dissipation(point.topology, volts, ohms)[0] + iq * volts
        return junction_temperature(ta, power, theta)

    def fits(ohms: float):
        return lambda volts: lowest <= volts <= highest and junction(volts, ohms) <= limit

    def output(volts: float, ohms: float) -> str:
        watts = replace(point, v_supply=volts, r_load=ohms).full_output()["p_out"]
        return f"full output {units.fmt(watts, 'W')}"

    options = []
    supply = _supply_changes(s, dev)
    volts = picks.highest_below(point.v_supply, picks.COMMON_SUPPLY_VOLTS, fits(point.r_load))
    if supply is not None and volts is not None:
        options.append(
            Option(
                supply(volts),
                f"supply {units.fmt(volts, 'V')} instead of {units.fmt(point.v_supply, 'V')}, no heat sink",
                f"junction {units.fmt(junction(volts, point.r_load), '°C')} at {units.fmt(ta, '°C')} "
                f"ambient (limit {units.fmt(limit, '°C')}); {output(volts, point.r_load)}",
                figure=("heat", dev.name, "junction temperature at"),
            )
        )
    speaker = s.build.part(point.stage.load) if point.stage is not None else None
    ohms = next((z for z in picks.SPEAKER_IMPEDANCES if z > point.r_load * 1.01), None)
    if speaker is None or speaker.kind != "speaker" or ohms is None:
        return options
    changes = [value_change(speaker, ohms, "Ω")]
    volts = point.v_supply
    if not fits(ohms)(volts):
        lower = picks.highest_below(point.v_supply, picks.COMMON_SUPPLY_VOLTS, fits(ohms))
        if supply is None or lower is None:
            return options
        volts = lower
        changes += supply(volts)
    on = f" on {units.fmt(volts, 'V')}" if volts != point.v_supply else ""
    options.append(
        Option(
            changes,
            f"{speaker.name} {units.fmt(ohms, 'Ω')} speaker{on}, no heat sink",
            f"junction {units.fmt(junction(volts, ohms), '°C')} at {units.fmt(ta, '°C')} ambient (limit "
            f"{units.fmt(limit, '°C')}); {output(volts, ohms)}",
            figure=("heat", dev.name, "junction temperature at"),
        )
    )
    return options


def _supply_changes(s: Situation, dev):
    """The edits that set the amplifier's rail to another voltage: an adapter-fed rail only (a
    battery's voltage is its cells', a transformer's its windings', a regulator's its own)."""
    supply, rail = s.build.supply, s.build.rails.get(dev.rail or "")
    if (
        supply is None
        or rail is None
        or rail.source != "supply"
        or supply.rail != dev.rail
        or supply.kind == "battery"
        or supply.mains is not None
        or supply.battery is not None
        or "voltage" not in supply.places
    ):
        return None

    def changes(volts: float) -> list[Change]:
        text = units.plan_text(volts, "V")
        found = [Change(supply.places["voltage"], text)]
        return found + ([Change(rail.places["voltage"], text)] if "voltage" in rail.places else [])

    return changes


def _pins(dev, role: str) -> list[str]:
    if dev is None or dev.profile is None:
        return []
    return [f"{dev.name}.{pin.name}" for pin in dev.profile.pins.values() if pin.role == role]


def add_output_network(s: Situation, f: Finding, stage) -> Proposal | None:
    """The usual series R-C from the output to ground: 10 ohm with 100 nF (the rule's fix)."""
    dev = s.build.device(stage.device)
    outs, ground = _pins(dev, "audio-out"), s.ground()
    if not outs or ground is None:
        return None
    r_name, c_name, middle = s.new_name("R"), s.new_name("C"), s.new_net("OUT_RC")
    ohms, farads = 10.0, 100e-9
    changes = [
        Change(
            ("parts",),
            {"kind": "resistor", "value": units.plan_text(ohms, "Ω"), "ends": [outs[0], middle]},
            key=r_name,
        ),
        Change(
            ("parts",),
            {
                "kind": "capacitor",
                "value": units.plan_text(farads, "F"),
                "dielectric": "film",
                "ends": [middle, ground],
            },
            key=c_name,
        ),
        Change(stage.doc_path, {"resistor": r_name, "capacitor": c_name}, key="output_network"),
    ]
    return Proposal(
        f,
        f"output network of {dev.name}",
        [
            Option(
                changes,
                f"add {r_name} {units.fmt(ohms, 'Ω')} and {c_name} {units.fmt(farads, 'F')} in series from "
                f"{outs[0]} to {ground}",
                f"turnover {units.fmt(audio.rc_corner(ohms, farads), 'Hz')}, far above the audio band",
            )
        ],
        note="fit them close to the amplifier's output and ground pins",
        source="common practice (audio amplifier IC application circuits)",
    )


@remedy("audio.input-bypass")
def input_bypass(s: Situation, f: Finding) -> Proposal | None:
    stage = s.stage_for(f)
    if stage is None or stage.input_bypass is not None:
        return None
    dev = s.build.device(stage.device)
    inputs, ground = _pins(dev, "input"), s.ground()
    if not inputs or ground is None:
        return None
    wired = {end for part in s.build.parts.values() for end in part.ends}
    inputs.sort(key=lambda net: (net not in wired, "plus" not in net and "+" not in net, net))
    name = s.new_name("C")
    farads = 470e-12
    changes = [
        Change(
            ("parts",),
            {
                "kind": "capacitor",
                "value": units.plan_text(farads, "F"),
                "dielectric": "ceramic",
                "ends": [inputs[0], ground],
            },
            key=name,
        ),
        Change(stage.doc_path, name, key="input_bypass"),
    ]
    return Proposal(
        f,
        f"RF bypass at {dev.name}'s input",
        [
            Option(
                changes,
                f"add {name} {units.fmt(farads, 'F')} from {inputs[0]} to {ground}",
                "shorts RF at the amplifier input; against a 10 kohm source it turns over near 34 kHz",
            )
        ],
        note="fit it right at the input pin",
        source="common practice (the rule's fix)",
    )


@remedy("audio.output-network")
def output_network(s: Situation, f: Finding) -> Proposal | None:
    stage = s.stage_for(f)
    net = stage.output_network if stage is not None else None
    if net is None:
        return add_output_network(s, f, stage)
    res, cap = s.build.part(net.resistor), s.build.part(net.capacitor)
    if res is None or cap is None or res.value is None or cap.value is None:
        return None
    lowest = s.settings.rule_settings.get("audio.output-network", {}).get("lowest_corner", 20e3)
    most = 1 / (2 * math.pi * res.value.si * lowest)
    series = s.series_for("capacitor")
    options = []
    for c in reversed(picks.series_values(series, most / 3, most)[-2:]):
        options.append(
            Option(
                [value_change(cap, c, "F")],
                f"{cap.name} {units.fmt(c, 'F')}",
                f"turnover {units.fmt(audio.rc_corner(res.value.si, c), 'Hz')}, above the audio band",
            )
        )
    return Proposal(f, f"output network {cap.name}", options, source=f"f = 1/(2 pi R C); IEC 60063 {series}")


@remedy("mains.primary-fuse")
def primary_fuse(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    preferred = number(f, "preferred")
    if part is None or part.kind != "fuse" or not preferred:
        return None  # no fuse at all: where it goes in the line conductor is the builder's wiring
    changes = [set_or_add(part, "current_rating", units.plan_text(preferred, "A"))]
    if part.speed != "time-lag":
        changes.append(set_or_add(part, "speed", "time-lag"))
    return Proposal(
        f,
        f"{part.name} primary fuse",
        [
            Option(
                changes,
                f"{part.name} time-lag {units.fmt(preferred, 'A')}",
                f"primary current {units.fmt(number(f, 'primary current') or 0.0, 'A')} with room for the "
                "switch-on inrush",
            )
        ],
        note="mains wiring: unplug before work; a competent person fits and checks it, under local "
        "electrical codes",
        source="R10 series, IEC 60127-1 Annex A; time-lag per IEC 60127-2 (the rule's pick)",
    )


@remedy("power.reverse-polarity")
def reverse_polarity(s: Situation, f: Finding) -> Proposal | None:
    """A shunt diode from ground to the fused rail, so a reversed supply opens the fuse (the rule's fix)."""
    supply = s.build.supply
    ground = s.ground()
    fuse = s.build.part(supply.fuse) if supply is not None else None
    if (
        supply is None
        or fuse is None
        or fuse.kind != "fuse"
        or not supply.rail
        or supply.rail not in fuse.ends
        or ground is None
        or supply.reverse_protection
    ):
        return None
    name = s.new_name("D")
    changes = [
        Change(("parts",), {"kind": "diode", "ends": [ground, supply.rail], "positive": ground}, key=name),
        set_or_add(supply, "reverse_protection", name),
    ]
    return Proposal(
        f,
        "reverse-polarity protection",
        [
            Option(
                changes,
                f"add {name}, a shunt diode from {ground} (anode) to {supply.rail} (cathode), behind "
                f"{fuse.name}",
                f"off in normal use; reversed, it conducts and opens {fuse.name}",
            )
        ],
        note=f"a silicon rectifier diode that carries the fault current until {fuse.name} opens (a 1 A "
        "class part for a fuse under 1 A; common practice)",
        source="common practice (the rule's fix)",
    )


@remedy("power.fuse-wire")
def fuse_wire(s: Situation, f: Finding) -> Proposal | None:
    """The fuse the build needs where the wire carries it; else wire that carries the fitted fuse."""
    from speccheck.formulas.fuses import AWG_CHASSIS_AMPS

    fuse = s.part_for(f)
    supply = s.build.supply
    rating, carries = number(f, "fuse rating"), number(f, "wire ampacity")
    if fuse is None or fuse.kind != "fuse" or supply is None or rating is None or carries is None:
        return None
    options = []
    needed = s.sheet("fuse", fuse.name, "preferred rating (R10)")
    if needed is not None and needed <= carries:
        options.append(
            Option(
                [set_or_add(fuse, "current_rating", units.plan_text(needed, "A"))],
                f"{fuse.name} {units.fmt(needed, 'A')}",
                f"the rating the build needs, within the {units.fmt(carries, 'A')} the wiring carries",
            )
        )
    gauge = picks.thinnest_wire_for(rating, AWG_CHASSIS_AMPS)
    if gauge is not None and "wire_gauge" in supply.places:
        options.append(
            Option(
                [Change(supply.places["wire_gauge"], gauge)],
                f"supply wiring {gauge} AWG",
                f"carries {units.fmt(AWG_CHASSIS_AMPS[gauge], 'A')}, above the {units.fmt(rating, 'A')} fuse",
            )
        )
    return Proposal(
        f,
        f"{fuse.name} against the wiring",
        options,
        source="chassis-wiring ampacity (Handbook of Electronic Tables and Formulas, the rule's table); R10 "
        "series, IEC 60127-1 Annex A",
    )


@remedy("audio.speaker-power")
def speaker_power(s: Situation, f: Finding) -> Proposal | None:
    speaker = s.part_for(f)
    full = number(f, "amplifier full output")
    if speaker is None or not full:
        return None
    pick = picks.rating_up(full, picks.SPEAKER_POWERS)
    if pick is None:
        return None
    return Proposal(
        f,
        f"{speaker.name} power rating",
        [
            Option(
                [set_or_add(speaker, "power_rating", units.plan_text(pick, "W"))],
                f"{speaker.name} rated {units.fmt(pick, 'W')}",
                f"at or above the {units.fmt(full, 'W')} the amplifier can deliver",
            )
        ],
        source="the rule's full output; speaker power steps: common practice",
    )
