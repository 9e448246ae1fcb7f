"""Remedy for a junction that runs too hot: a heat sink where the package can take one that can be
bought, else (and as alternatives) a lower common supply voltage or a higher-impedance speaker."""

from __future__ import annotations

import math

from speccheck import units
from speccheck.findings import Finding
from speccheck.formulas import picks
from speccheck.formulas.amplifiers import class_b_dissipation
from speccheck.formulas.thermal import junction_temperature
from speccheck.solver.base import Change, Option, Proposal, Situation, number, remedy, value_change


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
        return [
            f"no heat sink helps: θJC {units.fmt(jc, '°C/W')} and the mounting interface already take the "
            "junction past its limit"
        ]
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
    sink = "with its heat sink as declared" if dev.heat_sink is not None else "no heat sink"
    supply = _supply_changes(s, dev)
    volts = picks.highest_below(point.v_supply, picks.COMMON_SUPPLY_VOLTS, fits(point.r_load))
    if supply is not None and volts is not None:
        options.append(
            Option(
                supply(volts),
                f"supply {units.fmt(volts, 'V')} instead of {units.fmt(point.v_supply, 'V')}, {sink}",
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
            f"{speaker.name} {units.fmt(ohms, 'Ω')} speaker{on}, {sink}",
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
