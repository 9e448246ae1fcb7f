"""Mains and hazardous voltage: cautions and the checks behind them.

Where a build runs from the mains, or any voltage in it goes above the extra-low-voltage
limits, every report carries the usual safety cautions (through ctx.caution, so that every
output format shows them first) and defers to the local electrical code and to licensed
practice. speccheck is a review aid, never an approval.
"""

from __future__ import annotations

import math

from speccheck.budget import ambient
from speccheck.findings import Value
from speccheck.formulas.fuses import rerate
from speccheck.formulas.preferred import r10_up
from speccheck.registry import rule
from speccheck.units import fmt

HAZARD_RULE = "mains.hazard"
PASS_THROUGH = ("fuse", "switch", "connector")  # parts a conductor runs through unchanged

CLOSING = ("speccheck is a review aid, not an approval: follow your local electrical codes and regulations, "
           "and have mains work done or checked by a licensed electrician or another qualified person.")


def cautions(reasons: str) -> list[str]:
    return [
        f"HAZARDOUS VOLTAGE: {reasons}. Touching it can kill.",
        "Unplug the build and discharge every capacitor (through a resistor, then check with a meter) "
        "before you touch anything inside; capacitors keep their charge after the plug is out.",
        "Put the fuse and the switch in the line (live) conductor on the primary side of the transformer, "
        "never only in the neutral, so that opening them leaves nothing inside live.",
        "Bond the protective earth conductor securely to a metal enclosure, or build the unit "
        "double-insulated (class II) in an insulating enclosure.",
        "Clamp the mains cord with a strain relief so that a pull on the cord cannot reach the terminals.",
        "Use insulated (shrouded) terminals and sleeve every joint that carries mains or another hazardous "
        "voltage.",
        "Use mains-rated wire, switch, fuse holder and connectors, and route that wiring apart from the "
        "low-voltage wiring.",
        "Keep the creepage and clearance distances that the safety standard asks for between hazardous "
        "parts and everything a person can touch, including the low-voltage circuits.",
        CLOSING,
    ]


def is_mains(build) -> bool:
    supply = build.supply
    return bool(supply and (supply.kind == "mains-transformer" or supply.mains is not None))


def limits(ctx) -> tuple[float, float]:
    return ctx.setting("limit_ac_rms", of=HAZARD_RULE), ctx.setting("limit_dc", of=HAZARD_RULE)


def transformer(build, m):
    """The mains transformer: the part supply.mains (`m`) names, when it is one; else the build's only
    transformer."""
    if m.transformer:
        part = build.part(m.transformer)
        return part if part and part.kind == "transformer" else None
    found = [p for p in build.parts.values() if p.kind == "transformer"]
    return found[0] if len(found) == 1 else None


def conductor_nets(build, start: str | None) -> set:
    """The nets one conductor reaches from `start` through fuses, switches and connectors."""
    if not start:
        return set()
    nets = build.nets
    seen, todo = {start}, [start]
    while todo:
        net = todo.pop()
        for part in nets.parts_on(net):
            other = part.other_end(net) if part.kind in PASS_THROUGH else None
            if other and other not in seen:
                seen.add(other)
                todo.append(other)
    return seen


def hazards(build, ac_limit: float, dc_limit: float) -> list:
    """(reason, location) for each thing that makes this build hazardous."""
    out = []
    supply = build.supply
    if is_mains(build):
        m = supply.mains
        volts = f" ({m.voltage.text})" if m and m.voltage else ""
        out.append((f"this build runs from the mains{volts}", supply.at("kind")))
    for name, rail in build.rails.items():
        if rail.voltage is not None and abs(rail.voltage.si) > dc_limit:
            out.append((f"rail {name} at {rail.voltage.text} is above the {fmt(dc_limit, 'V')} DC limit",
                        rail.at("voltage")))
    for part in build.parts.values():
        if (
            part.kind == "transformer"
            and part.secondary_voltage is not None
            and part.secondary_voltage.si > ac_limit
        ):
            out.append(
                (
                    f"transformer {part.name}'s secondary ({part.secondary_voltage.text}) is above the "
                    f"{fmt(ac_limit, 'V')} rms AC limit",
                    part.at("secondary_voltage"),
                )
            )
    return out


@rule(
    HAZARD_RULE,
    verify="""
      Do not measure on a live mains circuit unless you are trained and equipped for it; unplug and
      discharge the capacitors before touching anything.
      """,
    level="note",
    title="Mains or hazardous voltage: safety cautions",
    explanation="""
      A build that runs from the mains, or has any voltage above the extra-low-voltage limits,
      can kill. speccheck then prints the usual cautions first in every report: hazardous
      voltage; unplug and discharge before work; fuse and switch in the line conductor on the
      primary; protective earth bonded to a metal enclosure, or a double-insulated design;
      strain relief; insulated terminals; mains-rated wiring; creepage and clearance. It closes
      by deferring to the local electrical codes and to licensed practice: this tool is a
      review aid, not an approval.

      The limits used are those of energy source class ES1 of IEC 62368-1 (the safety standard
      for audio, video and IT equipment): 30 V rms (42.4 V peak) AC and 60 V DC. The looser
      SELV limits of IEC 61140 / IEC 61558-1, 50 V rms AC and 120 V ripple-free DC, can be set
      instead with the limit_ac_rms and limit_dc settings.
      """,
    fix="Read the cautions; follow your local electrical code and have the work checked by a qualified "
    "person.",
    source="ES1 limits: IEC 62368-1 (from memory); SELV: IEC 61140 / IEC 61558-1; cautions: common "
    "practice of every national wiring code",
    settings={"limit_ac_rms": 30.0, "limit_dc": 60.0},
)
def hazard(build, ctx):
    ac_limit, dc_limit = ctx.setting("limit_ac_rms"), ctx.setting("limit_dc")
    found = hazards(build, ac_limit, dc_limit)
    if not found:
        return
    reasons = "; ".join(reason for reason, _ in found)
    for text in cautions(reasons):
        ctx.caution(text)
    ctx.report(
        f"hazardous voltage: {reasons}; read the safety cautions at the top of this report",
        found[0][1],
        [Value("AC limit (rms)", ac_limit, "V"), Value("DC limit", dc_limit, "V")],
        stage="mains",
    )


@rule(
    "mains.primary-fuse",
    verify="""
      With the set unplugged, check with an ohmmeter that the fuse holder sits between the line pin of the
      plug and the transformer.
      """,
    level="error",
    title="Primary fuse: present, in the line conductor, sized from the transformer",
    explanation="""
      A mains transformer needs a fuse on its primary, in the line (live) conductor: the mains
      circuit breaker is sized for the building's wiring and lets a faulty transformer burn.
      In the neutral only, an open fuse leaves the transformer live. The fuse is sized from the
      transformer's rating: primary current I_p = VA / V_mains, derated for continuous use and
      rerated for the ambient like any fuse, and with an allowance for the magnetising inrush
      at switch-on (several times the rated current for a half cycle): a time-lag fuse of
      about twice I_p rides through it, a quick-acting one does not. A much larger fuse does
      not protect the transformer from an overloaded or shorted secondary.
      """,
    fix="Fit a time-lag fuse of the rating shown in the line conductor, ahead of the switch, and name it "
    "in supply.mains.primary_fuse.",
    source="common practice; preferred ratings: IEC 60127-1 Annex A (R10); inrush allowance: from memory",
    settings={"inrush_allowance": 2.0, "oversize_factor": 2.0},
)
def primary_fuse(build, ctx):
    if not is_mains(build) or build.supply.mains is None:
        return
    m = build.supply.mains
    xf = transformer(build, m)
    choice = _primary_choice(build, ctx, m, xf)
    if not m.primary_fuse:
        need = (
            f"; fit a time-lag {fmt(choice['preferred'], 'A')} fuse in the line conductor" if choice else ""
        )
        ctx.report(
            f"the mains primary has no fuse (supply.mains.primary_fuse){need}: a fault in the "
            "transformer or its wiring is then limited only by the building's circuit breaker",
            m.at("transformer"),  # the mains block itself when no transformer is named
            [Value("preferred rating", choice["preferred"], "A")] if choice else [],
            stage="mains",
        )
        return
    fuse = build.part(m.primary_fuse)
    if fuse is None:
        return  # input.reference
    if fuse.kind != "fuse":
        ctx.report(
            f"supply.mains.primary_fuse names {fuse.name}, a {fuse.kind}, not a fuse",
            m.at("primary_fuse"),
            stage="mains",
        )
        return
    if not m.line_net:
        ctx.report(
            f"supply.mains.line_net is not stated: whether {fuse.name} sits in the line conductor is "
            "not checked",
            m.loc,
            level="note",
            stage="mains",
        )
    else:
        line = conductor_nets(build, m.line_net)
        neutral = conductor_nets(build, m.neutral_net) - line
        if not (set(fuse.ends) & line):
            where = "in the neutral" if set(fuse.ends) & neutral else "not in the line conductor"
            ctx.report(
                f"{fuse.name} ({', '.join(fuse.ends)}) is {where} ({m.line_net} is the line): a "
                "blown fuse leaves the transformer connected to the line",
                fuse.at("ends"),
                stage="mains",
            )
    if choice is None:
        return
    ctx.publish("mains", fuse.name, "preferred rating (R10)", choice["preferred"], "A")
    if (
        fuse.voltage_rating is not None
        and m.voltage is not None
        and fuse.voltage_rating.si < m.voltage.si - 1e-9
    ):
        ctx.report(
            f"{fuse.name} is rated {fuse.voltage_rating.text}, below the {m.voltage.text} mains",
            fuse.at("voltage_rating"),
            stage="mains",
        )
    if fuse.current_rating is None:
        ctx.report(
            f"{fuse.name} states no current_rating; the transformer needs a time-lag "
            f"{fmt(choice['preferred'], 'A')}",
            fuse.loc,
            level="note",
            stage="mains",
        )
        return
    rating = fuse.current_rating.si
    ctx.publish("mains", fuse.name, "fitted rating", rating, "A")
    values = [
        Value("primary current", choice["primary"], "A"),
        Value("fitted", rating, "A"),
        Value("preferred", choice["preferred"], "A"),
    ]
    if fuse.speed == "quick-acting":
        ctx.report(
            f"{fuse.name} is quick-acting: the transformer's magnetising inrush at switch-on will "
            f"open it; fit a time-lag {fmt(choice['preferred'], 'A')}",
            fuse.at("speed"),
            values,
            level="warning",
            stage="mains",
        )
    if rating < choice["primary"] / choice["rerate"]:
        ctx.report(
            f"{fuse.name} ({fuse.current_rating.text}) is below the {fmt(choice['primary'], 'A')} "
            f"primary current of {xf.name} at full load: it will open in use; fit "
            f"{fmt(choice['preferred'], 'A')}",
            fuse.at("current_rating"),
            values,
            stage="mains",
        )
    elif rating < choice["least"] * (1 - 1e-9):
        ctx.report(
            f"{fuse.name} ({fuse.current_rating.text}) leaves too little room for the continuous "
            f"primary current ({fmt(choice['primary'], 'A')}) and the switch-on inrush; fit "
            f"{fmt(choice['preferred'], 'A')}",
            fuse.at("current_rating"),
            values,
            level="warning",
            stage="mains",
        )
    elif rating > ctx.setting("oversize_factor") * choice["preferred"] * (1 + 1e-9):
        ctx.report(
            f"{fuse.name} ({fuse.current_rating.text}) is {rating / choice['preferred']:.3g} times "
            f"the {fmt(choice['preferred'], 'A')} that {xf.name} ({xf.rating.text}) needs: an "
            "overloaded or shorted secondary leaves it intact",
            fuse.at("current_rating"),
            values,
            level="warning",
            stage="mains",
        )


def _primary_choice(build, ctx, m, xf):
    if xf is None or xf.rating is None or m.voltage is None or m.voltage.si <= 0:
        return None
    primary = xf.rating.si / m.voltage.si
    share = ctx.setting("derating", of="power.fuse-size")
    factor = rerate(
        ambient(build),
        ctx.setting("rerate_per_degc", of="power.fuse-size"),
        ctx.setting("rerate_above", of="power.fuse-size"),
    )
    allowance = ctx.setting("inrush_allowance")
    least = max(primary / (share * factor), primary * allowance / factor)
    choice = {"primary": primary, "least": least, "preferred": r10_up(least), "rerate": factor}
    ctx.publish("mains", xf.name, "primary current at full load (VA / V mains)", primary, "A")
    ctx.publish("mains", xf.name, "least primary fuse rating (time-lag)", least, "A")
    return choice


@rule(
    "mains.switch-line",
    verify="""
      With the set unplugged, check with an ohmmeter that the switch breaks the line conductor (the fuse
      side).
      """,
    level="warning",
    title="Mains switch in the line conductor",
    explanation="""
      The mains switch must break the line (live) conductor. A switch in the neutral only turns
      the build off but leaves the transformer primary, the fuse holder and the wiring to them
      live, and that is exactly what a builder touches once the set is 'off'. A double-pole
      switch breaks both.
      """,
    fix="Wire the switch into the line conductor, after the fuse (or use a double-pole switch).",
    source="common practice of every national wiring code",
)
def switch_line(build, ctx):
    if not is_mains(build) or build.supply.mains is None:
        return
    m = build.supply.mains
    switch = build.part(m.switch)
    if switch is None or not m.line_net:
        return
    if switch.kind != "switch":
        ctx.report(
            f"supply.mains.switch names {switch.name}, a {switch.kind}, not a switch",
            m.at("switch"),
            level="note",
            stage="mains",
        )
        return
    line = conductor_nets(build, m.line_net)
    if set(switch.ends) & line:
        return
    neutral = conductor_nets(build, m.neutral_net)
    where = "in the neutral only" if set(switch.ends) & neutral else "not in the line conductor"
    ctx.report(
        f"mains switch {switch.name} ({', '.join(switch.ends)}) is {where}: switched off, the "
        f"primary stays connected to the line {m.line_net}",
        switch.at("ends"),
        stage="mains",
    )


@rule(
    "mains.earth",
    verify="""
      With the set unplugged, measure the resistance from the plug's earth pin to the bare metal of the
      chassis: it should be well under 1 ohm.
      """,
    level="error",
    title="Protective earth bonded, or class II construction declared",
    explanation="""
      A mains-powered build needs one of two protections against a live wire touching what a
      person holds: a protective earth conductor bonded to a metal enclosure (a fault then
      opens the fuse or the breaker), or a double-insulated (class II) design in which no
      single insulation failure can make an accessible part live. A metal enclosure with
      neither can sit at mains potential without any sign.
      """,
    fix="Bond the earth conductor of a three-core cord to the metal enclosure (earth: bonded), or build it "
    "double-insulated in an insulating enclosure (earth: class-ii).",
    source="common practice; IEC 61140 (protection classes I and II)",
)
def earth(build, ctx):
    if not is_mains(build):
        return
    m = build.supply.mains
    if m is None:
        return  # mains.ratings-declared asks for supply.mains
    if m.earth is None or m.earth == "none":
        metal = " and the enclosure is metal" if m.enclosure == "metal" else ""
        said = "no earth is declared (supply.mains.earth)" if m.earth is None else "earth: none"
        ctx.report(
            f"{said}{metal}: nothing protects a person if a live wire touches an accessible part; "
            "bond the protective earth to the enclosure or build it class II",
            m.at("earth") if m.earth else m.loc,
            stage="mains",
        )
    elif m.earth == "class-ii" and m.enclosure == "metal":
        ctx.report(
            "class II (double insulation) is declared in a metal enclosure: every mains part then "
            "needs reinforced insulation from the case; bonding the case to earth is the usual build",
            m.at("enclosure"),
            level="warning",
            stage="mains",
        )
    else:
        ctx.publish(
            "mains",
            "supply",
            "protection against shock",
            "earth bonded" if m.earth == "bonded" else "class II",
        )


@rule(
    "mains.ratings-declared",
    verify="""
      Read the mains voltage and frequency on the transformer's label and on the supply you will connect.
      """,
    level="warning",
    title="Mains voltage and frequency declared",
    explanation="""
      The mains voltage and frequency decide the transformer's primary, the primary fuse, the
      ratings of the switch, fuse holder and wiring, and the ripple frequency after the
      rectifier. Mains is about 230 V 50 Hz in most of the world and 120 V 60 Hz in North
      America, with other pairs in between; the plan must say which one it is built for.
      """,
    fix="State supply.mains.voltage (e.g. '230 V') and supply.mains.frequency (e.g. '50 Hz').",
    source="IEC 60038 (standard voltages); common practice",
)
def ratings_declared(build, ctx):
    if not is_mains(build):
        return
    supply, m = build.supply, build.supply.mains
    if m is None:
        ctx.report(
            "the supply is a mains transformer but supply.mains is not declared (voltage, frequency, "
            "line and neutral nets, earth, transformer, primary fuse, switch)",
            supply.at("kind"),
            stage="mains",
        )
        return
    missing = [name for name in ("voltage", "frequency") if getattr(m, name) is None]
    if missing:
        ctx.report(f"supply.mains does not state its {' and '.join(missing)}", m.loc, stage="mains")
    if m.voltage is not None and m.voltage.si <= 0:
        ctx.report(
            f"mains voltage {m.voltage.text} is not a mains voltage (state the rms value, e.g. '230 V')",
            m.at("voltage"),
            stage="mains",
        )
    if m.frequency is not None and not any(abs(m.frequency.si - f) <= 0.05 * f for f in (50.0, 60.0)):
        ctx.report(
            f"mains frequency {m.frequency.text} is neither 50 Hz nor 60 Hz", m.at("frequency"), stage="mains"
        )


@rule(
    "mains.transformer-primary",
    verify="""
      Read the transformer's primary rating on its label; it must match the local mains voltage.
      """,
    level="error",
    title="Transformer primary voltage against the mains",
    explanation="""
      A transformer wound for 115 V on a 230 V mains saturates, draws many times its rated
      current and burns (and delivers twice its secondary voltage until it does); one wound
      for 230 V on 115 V delivers half. The primary voltage must match the mains within the
      usual ±10 % supply tolerance.
      """,
    fix="Use a transformer (or primary tap) for the mains voltage the build runs on.",
    source="mains tolerance ±10 %: IEC 60038 (from memory)",
    settings={"tolerance": 0.1},
)
def transformer_primary(build, ctx):
    if not is_mains(build) or build.supply.mains is None:
        return
    m = build.supply.mains
    xf = transformer(build, m)
    named = build.part(m.transformer)
    if xf is None and named is not None:
        ctx.report(
            f"supply.mains.transformer names {named.name}, a {named.kind}, not a transformer",
            m.at("transformer"),
            level="note",
            stage="mains",
        )
        return
    if xf is None:
        if not any(p.kind == "transformer" for p in build.parts.values()):
            ctx.report(
                "a mains-transformer supply with no transformer part: its primary and the primary "
                "fuse are not checked",
                build.supply.at("kind"),
                level="note",
                stage="mains",
            )
        return
    if xf.primary_voltage is None or m.voltage is None or m.voltage.si <= 0:
        return
    off = abs(xf.primary_voltage.si - m.voltage.si) / m.voltage.si
    if off > ctx.setting("tolerance"):
        ctx.report(
            f"{xf.name}'s primary is wound for {xf.primary_voltage.text} but the mains is {m.voltage.text}",
            xf.at("primary_voltage"),
            [Value("primary", xf.primary_voltage.si, "V"), Value("mains", m.voltage.si, "V")],
            stage="mains",
        )


@rule(
    "mains.bleeder",
    verify="""
      Unplugged, measure the voltage across the bulk capacitor over a minute: with a bleeder it falls to a
      safe level.
      """,
    level="warning",
    title="Bleeder resistor across a bulk capacitor above the safe limit",
    explanation="""
      A bulk capacitor charged above the extra-low-voltage limit keeps that charge for minutes
      or hours after the plug is pulled, and a hand across it gets the whole stored energy
      ½·C·V². A bleeder resistor across it discharges it: the voltage falls as
      V·e^(−t/RC), so it takes RC·ln(V/V_limit) to reach the limit. Common practice wants it
      safe within about a minute, with the resistor run at no more than half its power rating
      (it dissipates V²/R all the time the set is on). Discharge and measure before work all
      the same.
      """,
    fix="Fit a bleeder resistor across the capacitor: R at most t / (C·ln(V/V_limit)), rated at least "
    "2·V²/R.",
    source="common practice; limits as in mains.hazard",
    settings={"discharge_time": 60.0, "bulk_min": 1e-6, "power_share": 0.5},
)
def bleeder(build, ctx):
    _, dc_limit = limits(ctx)
    nets = build.nets
    for cap in build.parts.values():
        if (
            cap.kind != "capacitor"
            or cap.value is None
            or len(cap.ends) != 2
            or cap.value.si < ctx.setting("bulk_min")
        ):
            continue
        a, b = cap.ends
        pa, pb = nets.dc(a), nets.dc(b)
        if pa is None or pb is None:
            continue
        volts = abs(pa.volts - pb.volts)
        if volts <= dc_limit:
            continue
        energy = 0.5 * cap.value.si * volts**2
        ctx.publish("mains", cap.name, "stored energy", energy, "J")
        across = [p for p in nets.parts_on(a) if p.kind == "resistor" and p.value and set(p.ends) == {a, b}]
        values = [Value("voltage", volts, "V"), Value("stored energy", energy, "J")]
        if not across:
            ctx.report(
                f"{cap.name} ({cap.value.text}) holds {fmt(volts, 'V')} ({fmt(energy, 'J')}) with no "
                "bleeder resistor across it: it stays charged after switch-off",
                cap.loc,
                values,
                stage="mains",
            )
            continue
        ohms = 1.0 / sum(1.0 / p.value.si for p in across)
        if dc_limit <= 0:
            continue
        t = ohms * cap.value.si * math.log(volts / dc_limit)
        ctx.publish("mains", cap.name, f"time to fall below {fmt(dc_limit, 'V')}", t, "s")
        if t > ctx.setting("discharge_time"):
            ctx.report(
                f"{cap.name} takes {fmt(t, 's')} to fall below {fmt(dc_limit, 'V')} through "
                f"{across[0].name} ({fmt(ohms, 'Ω')}); keep it under "
                f"{fmt(ctx.setting('discharge_time'), 's')}",
                across[0].at("value"),
                values + [Value("discharge time", t, "s")],
                stage="mains",
            )
        for res in across:
            watts = volts**2 / res.value.si
            if res.power_rating is not None and watts > ctx.setting("power_share") * res.power_rating.si:
                ctx.report(
                    f"bleeder {res.name} dissipates {fmt(watts, 'W')}, "
                    f"{watts / res.power_rating.si:.0%} of its {res.power_rating.text} rating",
                    res.at("power_rating"),
                    [Value("dissipation", watts, "W")],
                    stage="mains",
                )
