"""power: the supply fuse (size, wire, inrush, voltage, presence) and a resistor used as a fuse."""

from __future__ import annotations

from speccheck.budget import RESERVOIR_MIN, ambient, budget, bulk_capacitors, fused_rail, supply_fuse
from speccheck.findings import Value
from speccheck.formulas.fuses import (
    FUSE_CARRY,
    FUSE_GATES,
    awg_ampacity,
    fuse_gate_i2t,
    inrush,
    limited_inrush,
    rerate,
)
from speccheck.formulas.preferred import r10_up
from speccheck.registry import rule
from speccheck.units import fmt

from .source import inrush_source, short_current


def carries_rectifier_pulses(build, fuse) -> bool:
    """A fuse on the rectifier side of a capacitor-input supply (in the secondary, or between
    the rectifier and the reservoir) carries the charging pulses, not a smooth DC: one of its
    nets has a rectifier diode on it and no reservoir capacitor."""
    if build.supply is None or build.supply.kind != "mains-transformer":
        return False
    nets = build.nets
    for net in fuse.ends:
        on_net = nets.parts_on(net)
        has_diode = any(p.kind == "diode" for p in on_net)
        # 10 uF reads as 9.999999999999999e-06 F: the threshold is met within a float's rounding
        has_reservoir = any(p.kind == "capacitor" and p.value is not None
                            and p.value.si >= RESERVOIR_MIN * (1 - 1e-9) for p in on_net)
        if has_diode and not has_reservoir:
            return True
    return False


def fuse_choice(build, ctx, normal: float) -> dict:
    """The fuse the normal current asks for: derated for continuous use and rerated for the ambient."""
    share = ctx.setting("derating", of="power.fuse-size")
    ta = ambient(build)
    factor = rerate(ta, ctx.setting("rerate_per_degc", of="power.fuse-size"),
                    ctx.setting("rerate_above", of="power.fuse-size"))
    least = normal / (share * factor)
    return {"share": share, "ambient": ta, "rerate": factor, "least": least, "preferred": r10_up(least)}


@rule("power.fuse-size",
      verify="""
      Measure the normal current with a meter in series and compare it with the fuse rating.
      """,
      level="warning",
      title="Supply fuse rating against the build's normal current",
      explanation="""
      A fuse is sized from the current the build draws in normal use (its current budget at
      full output). A fuse heats on I², so it sees the RMS of that current, not its average: a
      class-B stage draws half-waves from its supply, peak I_p, average I_p/π but RMS I_p/2,
      about 1.57 times as much (a bridge draws full waves: I_p/√2 against 2·I_p/π); the
      steady quiescent currents add under the root. A fuse is only guaranteed to carry its
      rated current under the test conditions of its standard: UL 248-14 fuses carry 100 %
      and open at 135 % within an hour and at 200 % within two minutes; IEC 60127-2
      fuse-links must not open at 1.5 × I_n within an hour. In continuous use, and warm, a
      fuse ages and opens early, so common practice runs it at no more than 75 % of its
      rating, and rerates it further above 25 °C ambient. The rating is then rounded UP to the
      preferred ratings series, R10 of IEC 60127-1 Annex A (1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5,
      6.3, 8 × 10ⁿ A).

      The normal current is the budget at full output held continuously (for an amplifier, a
      full-power sine); speech and music average far less, so a fuse a little below it is a
      thin margin, not a failure. A warning when the fuse runs above the derated share of its
      (rerated) rating: it ages and may open after hours at full output. An error only past
      1.5 times the rerated rating, the current IEC 60127-2 lets a link carry for an hour: no
      standard promises that it survives, and a UL 248-14 fuse opens within the hour above
      135 %. Much larger than the preferred rating and it does not protect: a fault that draws
      a few times the normal current (a shorted capacitor, a stalled amplifier) leaves it
      intact while the wiring and the parts burn.
      """,
      fix="Fit the preferred rating shown (the next R10 value above the derated current).",
      source="UL 248-14; IEC 60127-2; R10 series: IEC 60127-1 Annex A / ISO 3; 75 % continuous-use "
             "derating: common practice; temperature rerating slope: from memory; RMS of the charging "
             "pulses of a capacitor-input rectifier about 1.8 times the DC (1.5 to 2.5): common practice",
      settings={"derating": 0.75, "rerate_per_degc": 0.005, "rerate_above": 25.0, "oversize_factor": 2.0,
                "pulse_form_factor": 1.8})
def fuse_size(build, ctx):
    supply = build.supply
    if supply is None or not supply.fuse:
        return
    part = build.part(supply.fuse)
    if part is None or part.kind == "resistor":
        return  # missing: input.reference; a resistor: power.resistor-fuse
    if part.kind != "fuse":
        ctx.report(f"supply.fuse names {part.name}, a {part.kind}, not a fuse",
                   supply.at("fuse"), level="note",
                   stage="power")
        return
    b = budget(build)
    normal = b.input
    if not normal:
        ctx.report(f"{part.name} cannot be sized: the build's current budget is unknown (no device on the "
                   "supply rail states a quiescent current)", part.loc, level="note", stage="power")
        return
    ctx.publish("fuse", part.name, "normal current (budget at full output)", normal, "A")
    if b.position:
        ctx.publish("fuse", part.name, "worst switch position", b.position)
    if carries_rectifier_pulses(build, part):
        form = ctx.setting("pulse_form_factor", of="power.fuse-size")
        normal *= form  # the fuse heats on the RMS of the charging pulses
        ctx.publish("fuse", part.name, "RMS of the rectifier charging pulses", normal, "A")
    elif b.input_rms is not None and b.input_rms > normal:
        normal = b.input_rms  # the fuse heats on I², so on the RMS of the amplifier's half-wave draw
        ctx.publish("fuse", part.name, "RMS of the supply current (class-B half-wave draw)", normal, "A")
    c = fuse_choice(build, ctx, normal)
    ctx.publish("fuse", part.name, "continuous-use share of rating", c["share"] * 100, "%")
    if c["ambient"] is not None:
        ctx.publish(
            "fuse", part.name, f"temperature rerating at {fmt(c['ambient'], '°C')}", c["rerate"] * 100, "%"
        )
    ctx.publish("fuse", part.name, "least rating", c["least"], "A")
    ctx.publish("fuse", part.name, "preferred rating (R10)", c["preferred"], "A")
    if part.current_rating is None:
        ctx.report(
            f"{part.name} states no current_rating; the build needs {fmt(c['preferred'], 'A')}",
            part.loc,
            [Value("preferred rating", c["preferred"], "A")],
            level="note",
            stage="power",
        )
        return
    rating = part.current_rating.si
    ctx.publish("fuse", part.name, "fitted rating", rating, "A")
    if part.speed:
        ctx.publish("fuse", part.name, "fitted speed", part.speed)
    carry = rating * c["rerate"]
    values = [
        Value("normal current", normal, "A"),
        Value("fitted", rating, "A"),
        Value("preferred", c["preferred"], "A"),
    ]
    fitted = part.current_rating.text
    if c["rerate"] < 1:
        fitted += f"; {fmt(carry, 'A')} at {fmt(c['ambient'], '°C')}"
    assumed = (f"the build's normal current of {fmt(normal, 'A')}{b.in_position}, its budget at full output "
               "held continuously")
    if normal > FUSE_CARRY * carry:
        ctx.report(
            f"{part.name} ({fitted}) is far below {assumed}: that is {normal / carry:.0%} of its "
            f"{'rerated ' if c['rerate'] < 1 else ''}rating, past the {FUSE_CARRY:g} × rating a fuse-link "
            f"carries for an hour under IEC 60127-2, so it opens in normal use; "
            f"fit {fmt(c['preferred'], 'A')}",
            part.at("current_rating"),
            values,
            level="error",
            stage="power",
        )
    elif rating < c["least"] * (1 - 1e-9):
        ctx.report(
            f"{part.name} ({fitted}) runs at {normal / carry:.0%} of its "
            f"{'rerated ' if c['rerate'] < 1 else ''}rating (keep under {c['share']:.0%}) at {assumed}: "
            f"it ages and may open after hours at full output; fit {fmt(c['preferred'], 'A')}",
            part.at("current_rating"),
            values,
            stage="power",
        )
    elif not b.complete:
        ctx.publish("fuse", part.name, "budget left out", b.gaps())
    elif rating > ctx.setting("oversize_factor") * c["preferred"] * (1 + 1e-9):
        ctx.report(
            f"{part.name} ({part.current_rating.text}) is {rating / c['preferred']:.3g} times the "
            f"{fmt(c['preferred'], 'A')} the build needs (normal current {fmt(normal, 'A')}, derated "
            f"to {c['share']:.0%}{' and rerated for the ambient' if c['rerate'] < 1 else ''}, "
            "rounded up to R10): a fault drawing a few times the normal current leaves it intact",
            part.at("current_rating"),
            values,
            stage="power",
        )


@rule(
    "power.fuse-wire",
    verify="""
      Check the wire gauge printed on the insulation, or measure the conductor diameter, against the fuse
      rating.
      """,
    level="error",
    title="Supply fuse larger than the wiring can carry",
    explanation="""
      The fuse protects the wiring behind it. If the fuse is rated above what the supply wiring
      can carry, a fault heats the wire (its insulation softens, smokes, can catch fire) long
      before the fuse opens. The chassis-wiring ampacity of copper wire by AWG (Handbook of
      Electronic Tables and Formulas): 18 AWG 16 A, 20 AWG 11 A, 22 AWG 7 A, 24 AWG 3.5 A,
      26 AWG 2.2 A, 28 AWG 1.4 A, 30 AWG 0.86 A. Wire bundled or in a warm case carries less.
      An odd gauge is checked against the next thinner row of the table.
      """,
    fix="Fit the fuse the build needs (see power.fuse-size), or use heavier wire.",
    source="Handbook of Electronic Tables and Formulas, chassis wiring ampacity (26 and 28 AWG from memory)",
)
def fuse_wire(build, ctx):
    supply = build.supply
    if supply is None or supply.wire_gauge is None:
        return
    row = awg_ampacity(supply.wire_gauge)
    if row is None:
        ctx.report(
            f"{supply.wire_gauge} AWG is not in the chassis-wiring table (10 to 40 AWG); the fuse is "
            "not checked against the wiring",
            supply.at("wire_gauge"),
            level="note",
            stage="power",
        )
        return
    amps, used = row
    gauge = f"{supply.wire_gauge} AWG" + (f" (checked as {used} AWG)" if used != supply.wire_gauge else "")
    ctx.publish("fuse", "supply wiring", f"{gauge} chassis-wiring ampacity", amps, "A")
    normal = budget(build).input
    fuse = supply_fuse(build)
    if fuse is not None and fuse.current_rating is not None and fuse.current_rating.si > amps * (1 + 1e-9):
        ctx.report(
            f"{fuse.name} ({fuse.current_rating.text}) is above the {fmt(amps, 'A')} that the "
            f"{gauge} supply wiring carries: a fault can overheat the wire before the fuse opens",
            fuse.at("current_rating"),
            [Value("fuse rating", fuse.current_rating.si, "A"), Value("wire ampacity", amps, "A")],
            stage="power",
        )
    if normal and normal > amps:
        ctx.report(
            f"The build draws {fmt(normal, 'A')} at full output, more than the {fmt(amps, 'A')} the "
            f"{gauge} supply wiring carries",
            supply.at("wire_gauge"),
            [Value("input current budget", normal, "A"), Value("wire ampacity", amps, "A")],
            stage="power",
        )


@rule(
    "power.fuse-inrush",
    verify="""
      Switch on repeatedly from cold: a quick-acting fuse that survives a few times may still open later;
      a current probe on a scope shows the inrush peak.
      """,
    level="warning",
    title="Fuse speed against the bulk capacitor's inrush",
    explanation="""
      At switch-on the bulk capacitor behind the fuse charges through the loop resistance R
      (the supply's output resistance, its leads, connector, the fuse itself and the
      capacitor's ESR): i = (V/R)·e^(−t/RC), a peak of V/R that falls with time constant RC.
      The Joule integral the fuse sees is I²t = V²C/(2R): 12 V into 4700 µF through 0.1 Ω is
      a 120 A peak and 3.4 A²s. R is the plan's own where it says it: supply.source_resistance;
      a battery's internal resistance (stated, else from its short-circuit max_current as
      V / I_sc, else the typical figure of its chemistry and cell count); plus a series resistor
      and a resistor used as the fuse. A bench supply's current limit I caps the peak: the
      charge runs at I, then ends as the RC tail, I²t = I·C·V − I²·R·C/2. Only where the plan
      states nothing is R the setting loop_resistance (default 0.5 Ω), and the finding says it
      is assumed. A quick-acting fuse of a small rating melts on far less. A
      fuse is checked against its datasheet melting I²t (less a share for the thousands of
      switch-ons over its life) when the plan states it, else against the least I²t a
      fuse-link of its speed withstands under IEC 60127-2: a time-lag link must not open
      before 10 ms at 10 × I_n, a quick-acting one before 3 ms at 4 × I_n. Real links are
      usually several times above that floor.
      """,
      fix="Use a time-lag fuse, add series resistance (or a soft-start) ahead of the bulk capacitor, or "
          "state the "
          "fuse's melting_i2t from its datasheet.",
      # the inrush figures are computed for every bulk capacitor on the supply's rail, fuse or not
      # (the design sheet shows them); only a fuse is judged against them
      source="inrush of an RC charge and of a current-limited charge: circuit theory (cross-checked with "
             "scipy in the tests); fuse gates: IEC 60127-2 (from memory); assumed loop resistance, typical "
             "battery resistance and pulse share: from memory",
      settings={"loop_resistance": 0.5, "pulse_share": 0.3})
def fuse_inrush(build, ctx):
    supply = build.supply
    fuse = supply_fuse(build)
    if supply is None or supply.voltage is None:
        return
    caps = bulk_capacitors(build, fused_rail(build))
    farads = sum(c.value.si for c in caps)
    if farads <= 0:
        return
    volts = abs(supply.voltage.si)
    series = []  # a series resistor and a resistor used as the fuse: both carry the inrush
    for ref in dict.fromkeys(r for r in (supply.series_resistor, supply.fuse) if r):
        part = build.part(ref)
        if part is not None and part.kind == "resistor" and part.value is not None:
            series.append(part)
    r_series = sum(p.value.si for p in series)
    source = inrush_source(build, volts, ctx.setting("loop_resistance"))
    ohms = r_series + source.ohms
    if ohms <= 0 or volts <= 0:
        return
    peak, tau, i2t = inrush(volts, farads, ohms)
    limited = False
    if source.limit is not None and source.limit < peak:
        limited = True
        peak, i2t = limited_inrush(volts, farads, source.limit, ohms)
    source_text = source.how + "".join(f" plus {p.name}" for p in series)
    owner = fuse.name if fuse is not None else "supply input"
    ctx.publish("fuse", owner, "bulk capacitance behind it", farads, "F")
    ctx.publish("fuse", owner, "inrush loop resistance", ohms, "Ω")
    ctx.publish("fuse", owner, "inrush source", source_text)
    if limited:
        ctx.publish("fuse", owner, "inrush current limit", source.limit, "A")
    ctx.publish("fuse", owner, "inrush peak", peak, "A")
    ctx.publish("fuse", owner, "inrush time constant RC", tau, "s")
    ctx.publish("fuse", owner, "inrush I²t", i2t, "A²s")
    if fuse is None or fuse.current_rating is None:
        return  # the figures stand on the sheet; there is no fuse to judge them against
    rating = fuse.current_rating.si
    names = ", ".join(c.name for c in caps)
    if fuse.melting_i2t is not None:
        share = ctx.setting("pulse_share")
        allowed = fuse.melting_i2t.si * share
        basis = f"its melting I²t {fuse.melting_i2t.text} × {share:.0%} for repeated switch-on"
    elif fuse.speed in FUSE_GATES:
        allowed = fuse_gate_i2t(fuse.speed, rating)
        k, t_min = FUSE_GATES[fuse.speed]
        basis = (
            f"the {fmt(allowed, 'A²s')} a {fuse.speed} link withstands ({k:g} × I_n for {fmt(t_min, 's')}, "
            "IEC 60127-2)"
        )
    else:
        ctx.report(
            f"{fuse.name} states neither speed nor melting_i2t; its inrush withstand is not checked "
            f"({fmt(i2t, 'A²s')} into {names})",
            fuse.loc,
            level="note",
            stage="power",
        )
        return
    ctx.publish("fuse", owner, "I²t it withstands", allowed, "A²s")
    if i2t <= allowed:
        return
    values = [
        Value("inrush peak", peak, "A"),
        Value("time constant", tau, "s"),
        Value("inrush I²t", i2t, "A²s"),
        Value("fuse withstands", allowed, "A²s"),
    ]
    head = (
        f"Switching {fmt(volts, 'V')} onto {names} ({fmt(farads, 'F')}) through {fmt(ohms, 'Ω')} "
        f"({source_text}) gives a {fmt(peak, 'A')} peak{' (the supply current limit)' if limited else ''} "
        f"and {fmt(i2t, 'A²s')}, more than {basis}"
    )
    where = fuse.at("speed") if fuse.given("speed") else fuse.loc
    if fuse.speed == "quick-acting":
        slow = fuse_gate_i2t("time-lag", rating)
        tail = (
            f": the quick-acting {fuse.name} will open at switch-on; fit a time-lag fuse of the same "
            "rating"
            + (
                ""
                if slow >= i2t
                else f", and add series resistance (a time-lag link withstands only {fmt(slow, 'A²s')})"
            )
        )
    else:
        tail = (
            f": {fuse.name} may open at switch-on; add series resistance or a soft-start ahead of the "
            "capacitor"
        )
    ctx.report(head + tail, where, values, stage="power")


@rule(
    "power.fuse-voltage",
    verify='Read the voltage rating printed on the fuse body or its end cap.',
    level="error",
    title="Fuse voltage rating below the circuit voltage",
    explanation="""
      A fuse's voltage rating is the highest voltage it can safely interrupt: above it, the arc
      that forms when the element melts may keep burning and the fault current keeps flowing.
      The rating must be at least the voltage of the circuit it protects.
      """,
    fix="Fit a fuse rated for at least the circuit voltage.",
    source="UL 248-14; IEC 60127-1 (rated voltage)",
)
def fuse_voltage(build, ctx):
    supply = build.supply
    fuse = supply_fuse(build)
    if supply is None or fuse is None or fuse.voltage_rating is None or supply.voltage is None:
        return
    if fuse.voltage_rating.si < abs(supply.voltage.si) - 1e-9:
        ctx.report(
            f"{fuse.name} is rated {fuse.voltage_rating.text} but protects a {supply.voltage.text} supply",
            fuse.at("voltage_rating"),
            [
                Value("fuse voltage rating", fuse.voltage_rating.si, "V"),
                Value("supply", supply.voltage.si, "V"),
            ],
            stage="power",
        )


@rule(
    "power.fuse-missing",
    verify="""
      Follow the supply lead from the connector: the first part on the positive conductor should be the
      fuse.
      """,
    level="warning",
    title="No fuse on a supply that can deliver more than the build needs",
    explanation="""
      Any supply that can deliver more current than the build needs can feed a fault (a shorted
      capacitor, a solder splash, a reversed part) until something burns: a battery delivers
      tens of amperes into a short, a bench supply its current limit, an adapter its rating and
      more. A fuse at the supply input, sized from the build's current budget, opens first.
      Only a supply whose own limit sits below what the build needs protects the build by
      itself.
      """,
    fix="Add a fuse at the supply input (supply.fuse) of the preferred rating from power.fuse-size.",
    source="common practice",
)
def fuse_missing(build, ctx):
    supply = build.supply
    if supply is None or supply.fuse or supply.series_resistor or supply.kind == "mains-transformer":
        return
    b = budget(build)
    if supply.max_current is not None and b.input and supply.max_current.si <= b.input:
        return
    values = []
    need = ""
    if b.input and b.complete:
        c = fuse_choice(build, ctx, max(b.input, b.input_rms or 0.0))
        values = [Value("normal current", b.input, "A"), Value("preferred rating", c["preferred"], "A")]
        need = f"; the build needs about {fmt(c['preferred'], 'A')}"
    can = (
        f" (up to {supply.max_current.text}{' into a short' if supply.kind == 'battery' else ''})"
        if supply.max_current is not None
        else ""
    )
    ctx.report(f"The {supply.kind} supply{can} has no fuse{need}", supply.at("kind"), values, stage="power")


@rule(
    "power.resistor-fuse",
    verify="""
      Read the resistor's marking or datasheet for 'fusible' or 'flame-proof'; measure its drop with the
      build at full output.
      """,
    level="warning",
    title="A resistor in series with the supply, or used as its fuse",
    explanation="""
      A small resistor in series with the supply input (about 1 Ω with a large bulk capacitor)
      is used to knock down noise and to soften the inrush. It costs a voltage drop I·R and a
      dissipation I²·R in normal use (on the RMS of the supply current), which must stay well
      inside its power rating. It is no substitute for a fuse: into a short at its far end it
      takes I²·R, with I the current the plan's own supply can push through it: V/(R + R_source)
      (the supply's source_resistance; a battery's internal resistance from its short-circuit
      current), no more than the limit of a current-limited adapter or bench supply
      (max_current). On a stiff 12 V source 1 Ω takes 144 W; behind a 1 A adapter, 1 W.

      A plain resistor as the only protection: an error when the short drives it past
      glow_factor times its rating (default 4; a resistor at several times its rating runs at
      hundreds of °C, chars the board and may set it alight before it opens, if it opens at all:
      from memory), a warning when past its rating, a note when the supply's own limit keeps it
      inside (nothing burns, but nothing disconnects the fault either). Only a fusible
      (flame-proof) resistor, made to open safely, may serve as the fuse, and only when the
      fault power is well above its rating (fusing_factor, default 10) so that it does open. A
      resistor of unstated rating is taken as 0.25 W (the smallest common through-hole size).
      """,
      fix="Fit a real fuse at the supply input; where the resistor must also protect, use a fusible "
          "(flame-proof) type whose fusing curve opens at the fault power shown.",
      source="common practice; fusing power of fusible resistors and the glow factor: from memory",
      settings={"power_share": 0.5, "drop_share": 0.05, "fusing_factor": 10.0, "glow_factor": 4.0,
                "unrated_watts": 0.25})
def resistor_fuse(build, ctx):
    supply = build.supply
    if supply is None:
        return
    fuse_part = build.part(supply.fuse)
    as_fuse_ref = supply.fuse if fuse_part is not None and fuse_part.kind == "resistor" else None
    ref = as_fuse_ref or supply.series_resistor
    part = build.part(ref)
    if part is None or part.kind != "resistor":
        return
    as_fuse = as_fuse_ref is not None or not supply.fuse
    stage = "power"
    if part.value is None:
        return
    ohms = part.value.si
    volts = abs(supply.voltage.si) if supply.voltage else None
    b = budget(build)
    normal = b.input or 0.0
    heating = max(normal, b.input_rms or 0.0)  # it heats on the RMS of the supply current
    p_normal, drop = heating ** 2 * ohms, normal * ohms
    ctx.publish("power", part.name, "drop in normal use", drop, "V")
    ctx.publish("power", part.name, "dissipation in normal use", p_normal, "W")
    values = [Value("normal "
                    "current", normal, "A"), Value("drop", drop, "V"), Value("dissipation", p_normal, "W")]
    p_short, how = None, ""
    if volts is not None:
        i_short, how = short_current(build, volts, ohms)
        p_short = i_short ** 2 * ohms
        ctx.publish("power", part.name, "current into a short at its far end", i_short, "A")
        ctx.publish("power", part.name, "power into a short at its far end", p_short, "W")
        values += [Value("short-circuit current", i_short, "A"), Value("power at a short", p_short, "W")]
    rating = part.power_rating.si if part.power_rating is not None else ctx.setting("unrated_watts")
    rating_text = part.power_rating.text if part.power_rating is not None else \
        f"{fmt(rating, 'W')} (assumed: no power_rating)"
    where = part.at("fusible") if part.given("fusible") else part.loc
    if as_fuse and not part.fusible:
        if p_short is None or p_short >= ctx.setting("glow_factor") * rating:
            short = f": into a short it takes {fmt(p_short, 'W')} ({how})" if p_short is not None else ""
            ctx.report(f"{part.name} ({part.value.text}) is the only protection on the supply input but "
                       f"is a plain "
                       f"resistor{short}, {p_short / rating:.3g} times its {rating_text} rating; it "
                       f"glows and can set "
                       f"the board alight before it opens; fit a fuse or a fusible (flame-proof) resistor"
                       if p_short is not None else
                       f"{part.name} ({part.value.text}) is the only protection on the supply input but "
                       f"is a plain "
                       f"resistor; it glows and can set the board alight before it opens; fit a fuse",
                       where, values, level="error", stage=stage)
        elif p_short > rating:
            ctx.report(f"{part.name} ({part.value.text}) is the only protection on the supply input: "
                       f"into a short it "
                       f"takes {fmt(p_short, 'W')} ({how}), above its {rating_text} rating; it runs hot and "
                       f"disconnects nothing; fit a fuse", where, values, stage=stage)
        else:
            ctx.report(f"{part.name} ({part.value.text}) is the only protection on the supply input: "
                       f"into a short it "
                       f"takes {fmt(p_short, 'W')} ({how}), inside its {rating_text} rating, so the "
                       f"supply's own limit "
                       f"protects the build; a fuse would also disconnect a "
                       f"fault", where, values, level="note",
                       stage=stage)
    elif as_fuse and p_short is not None and p_short < ctx.setting("fusing_factor") * rating:
        limited = how.startswith("limited")
        ctx.report(f"Fusible {part.name} takes only {fmt(p_short, 'W')} into a short ({how}), "
                   f"{p_short / rating:.3g} "
                   f"times its {rating_text} rating: it may sit hot instead of opening (check its fusing "
                   f"curve)"
                   + ("; the supply's limit holds the fault meanwhile" if limited else ""),
                   part.at("power_rating") if part.given("power_rating") else part.loc, values,
                   level="note" if limited else "warning", stage=stage)
    if part.power_rating is None:
        if p_normal > 0:
            ctx.report(
                f"{part.name} dissipates {fmt(p_normal, 'W')} in normal use; state its power_rating",
                part.loc,
                values,
                level="note",
                stage=stage,
            )
    elif p_normal > ctx.setting("power_share") * part.power_rating.si:
        ctx.report(
            f"{part.name} dissipates {fmt(p_normal, 'W')} in normal use, "
            f"{p_normal / part.power_rating.si:.0%} of its {part.power_rating.text} rating (keep "
            f"under {ctx.setting('power_share'):.0%})",
            part.at("power_rating"),
            values,
            stage=stage,
        )
    if volts and drop > ctx.setting("drop_share") * volts:
        ctx.report(f"{part.name} drops {fmt(drop, 'V')} at the build's {fmt(normal, 'A')}, "
                   f"{drop / volts:.0%} of the "
                   f"{supply.voltage.text} supply", part.at("value"), values, stage=stage)
