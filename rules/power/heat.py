"""power: junction temperature and heat sink of amplifiers and regulators; regulator dropout."""

from __future__ import annotations

from speccheck.budget import (
    AMPLIFIER,
    REGULATOR,
    ambient,
    amp_point,
    budget,
    rail_after_drops,
    rail_volts,
    regulator_outputs,
)
from speccheck.findings import Value
from speccheck.formulas.amplifiers import class_b_dissipation, split_rails
from speccheck.formulas.thermal import heat_sink_needed, junction_temperature, regulator_dissipation
from speccheck.registry import rule
from speccheck.units import fmt


def _thermal(build, ctx, dev, power: float, what: str, stage: str, values: list):
    """Junction temperature of one device dissipating `power`; findings when it runs too hot."""
    prof = dev.profile
    ta = ambient(build)
    if ta is None:
        return "no-ambient"
    if power <= 0:
        return None
    if prof.tj_max is None:
        ctx.report(f"profile {prof.name} states no tj_max (profiles.{prof.name}.tj_max); the junction "
                   f"temperature of {dev.name} is not checked", prof.loc, level="note", stage=stage)
        return None
    tj_max, margin = prof.tj_max.si, ctx.setting("tj_margin")
    target = tj_max - margin
    jc = prof.theta_jc.si if prof.theta_jc else None
    sink = dev.heat_sink if dev.heat_sink and dev.heat_sink.theta_sa else None
    cs_default = ctx.setting("theta_cs")
    if sink:
        if jc is None:
            ctx.report(f"{dev.name} has a heat sink but profile {prof.name} states no theta_jc "
                       f"(profiles.{prof.name}.theta_jc); the junction temperature is not checked",
                       sink.at("theta_sa"),
                       level="note", stage=stage)
            return None
        cs = sink.theta_cs.si if sink.theta_cs is not None else cs_default
        theta = jc + cs + sink.theta_sa.si
        how = (f"θJC {fmt(jc, '°C/W')} + θCS "
               f"{fmt(cs, '°C/W')}{'' if sink.theta_cs is not None else ' (assumed)'} + θSA "
               f"{fmt(sink.theta_sa.si, '°C/W')}")
        where = sink.at("theta_sa")
    else:
        q = dev.theta_ja or prof.theta_ja
        if q is None:
            ctx.report(f"no theta_ja for {dev.name}: state it on the device (as mounted, with its copper "
                       f"area) or in profile {prof.name}", dev.loc, level="note", stage=stage)
            return None
        theta = q.si
        how = f"θJA {fmt(q.si, '°C/W')}" + (" as mounted" if dev.theta_ja else f" from profile {prof.name}")
        where = dev.at("theta_ja") if dev.theta_ja else dev.loc
    tj = junction_temperature(ta, power, theta)
    ctx.publish("heat", dev.name, "thermal resistance junction to ambient", theta, "°C/W")
    ctx.publish("heat", dev.name, f"junction temperature at {fmt(ta, '°C')} ambient", tj, "°C")
    ctx.publish(
        "heat",
        dev.name,
        f"junction limit (tj_max {fmt(tj_max, '°C')} less {fmt(margin, '°C')})",
        target,
        "°C",
    )
    values = values + [
        Value("ambient", ta, "°C"),
        Value("θ junction to ambient", theta, "°C/W"),
        Value("junction temperature", tj, "°C"),
        Value("tj_max", tj_max, "°C"),
    ]
    if tj <= target:
        return None
    cs = sink.theta_cs.si if sink and sink.theta_cs is not None else cs_default
    level = "error" if tj > tj_max else "warning"
    head = (
        f"{dev.name} dissipates up to {fmt(power, 'W')} ({what}); with {how} its junction reaches "
        f"{fmt(tj, '°C')} at {fmt(ta, '°C')} ambient, "
        + (
            f"above its {fmt(tj_max, '°C')} limit"
            if tj > tj_max
            else f"within {fmt(margin, '°C')} of its {fmt(tj_max, '°C')} limit"
        )
    )
    if jc is None:
        ctx.report(
            head + f"; state theta_jc in profile {prof.name} to size a heat sink",
            where,
            values,
            level=level,
            stage=stage,
        )
        return None
    need = heat_sink_needed(power, target, ta, jc, cs)
    need_abs = heat_sink_needed(power, tj_max, ta, jc, cs)
    ctx.publish("heat", dev.name, f"heat sink needed for {fmt(target, '°C')} (θSA at most)", need, "°C/W")
    values.append(Value("heat sink needed θSA", need, "°C/W"))
    cs_note = f"θCS {fmt(cs, '°C/W')}{'' if sink and sink.theta_cs is not None else ' assumed'}"
    if need <= 0:
        ctx.report(
            head + f"; no heat sink can hold it at {fmt(target, '°C')} (θJC {fmt(jc, '°C/W')} and {cs_note} "
            f"already take it there): lower the supply, raise the load impedance or choose a larger part",
            where,
            values,
            level=level,
            stage=stage,
        )
        return None
    if sink:
        msg = (
            f"; the declared heat sink ({sink.theta_sa.text}) is not enough: it needs θSA of "
            f"{fmt(need, '°C/W')} or less ({cs_note}; {fmt(need_abs, '°C/W')} at the absolute limit)"
        )
    else:
        msg = (
            f"; it needs a heat sink of θSA {fmt(need, '°C/W')} or less ({cs_note}; "
            f"{fmt(need_abs, '°C/W')} at the absolute limit), or more copper area under it"
        )
    ctx.report(head + msg, where, values, level=level, stage=stage)
    return None


@rule(
    "power.heat",
    verify="""
      After ten minutes at full output, measure the package or tab temperature with a thermocouple; add
      the junction-to-case rise for the junction.
      """,
    level="error",
    title="Dissipation, junction temperature and heat sink of amplifiers and regulators",
    explanation="""
      A class-B or class-AB output stage dissipates most not at full output but at an output amplitude of
      2·V_CC/π, about 64 % of the full swing (about 40 % of the full power). Each device of a push-pull
      pair on ±V_CC into R_L then dissipates V_CC²/(π²·R_L). A single-ended stage on one supply V_s with a
      coupling capacitor works on ±V_s/2, so the package dissipates V_s²/(2π²·R_L) (12 V into 8 Ω: 0.91
      W). A bridge-tied load puts two such stages in antiphase across the speaker: four times as much,
      2·V_s²/(π²·R_L). The quiescent current adds V_s·I_q.

      The junction then sits at T_j = T_a + P·θ_JA, with the build's worst-case ambient. The
      θ_JA stated on the device (the copper area it is soldered to) overrides the profile's
      bare-package figure. When T_j comes within a margin of T_j,max the part needs a heat
      sink: its junction-to-ambient path becomes θ_JC + θ_CS + θ_SA, so the sink must reach
      θ_SA ≤ (T_j,max − T_a)/P − θ_JC − θ_CS. Too hot, the part goes into thermal shutdown
      (the audio cuts in and out at high volume) or fails.
      """,
    fix="Fit a heat sink of the θSA shown (or more copper area, stated as theta_ja on the device), lower "
    "the supply voltage, or use a higher-impedance speaker.",
    source="class-B dissipation: Sedra & Smith, Microelectronic Circuits (from memory) and Boylestad & "
    "Nashelsky, Example 12.8; θSA: handbook form of the series thermal-resistance model; margin and "
    "assumed θCS: common practice",
    settings={"tj_margin": 25.0, "theta_cs": 1.0},
)
def heat(build, ctx):
    no_ambient = []
    for dev in build.devices.values():
        if dev.profile is None or dev.profile.cls != AMPLIFIER:
            continue
        point, missing = amp_point(build, dev)
        stage = next((s.label for s in build.stages("audio-amp") if s.device == dev.name), "audio-amp")
        if point is None:
            for message, where in missing:
                ctx.report(message + "; its dissipation is not computed", where, level="note", stage=stage)
            continue
        total, per_device = class_b_dissipation(
            point.topology, point.v_supply, point.r_load, point.v_negative
        )
        iq = dev.profile.quiescent_current.si if dev.profile.quiescent_current else 0.0
        vp, vn = split_rails(point.topology, point.v_supply, point.v_negative)
        span = vp + vn if point.topology == "split-supply" else abs(point.v_supply)
        p_q = iq * span
        power = total + p_q
        full = point.full_output()
        ctx.publish("heat", dev.name, f"full sine output power ({point.swing_text})", full["p_out"], "W")
        ctx.publish("heat", dev.name, f"output stage dissipation, worst case ({point.topology})", total, "W")
        if point.topology != "single-ended":
            ctx.publish("heat", dev.name, "per output device, worst case", per_device, "W")
        ctx.publish("heat", dev.name, "quiescent dissipation", p_q, "W")
        ctx.publish("heat", dev.name, "package dissipation", power, "W")
        supply_text = (
            f"±{fmt(vp, 'V')}" if point.topology == "split-supply" else fmt(abs(point.v_supply), "V")
        )
        what = f"{point.topology} on {supply_text} into {point.load_text}"
        values = [Value("output stage worst case", total, "W"), Value("quiescent", p_q, "W")]
        if _thermal(build, ctx, dev, power, what, point.label, values) == "no-ambient":
            no_ambient.append(dev.name)
    for dev in build.devices.values():
        if dev.profile is None or dev.profile.cls != REGULATOR:
            continue
        p = _regulator_power(build, dev)
        if p is None:
            continue
        power, v_in, v_out, i_out = p
        ctx.publish("heat", dev.name, "regulator dissipation", power, "W")
        values = [Value("V_in", v_in, "V"), Value("V_out", v_out, "V"), Value("I_out", i_out, "A")]
        what = f"{fmt(v_in - v_out, 'V')} across it at {fmt(i_out, 'A')}, plus its ground current"
        if _thermal(build, ctx, dev, power, what, "power", values) == "no-ambient":
            no_ambient.append(dev.name)
    if no_ambient:
        info = build.build
        ctx.report(
            f"build.ambient_max is not stated: the junction temperature of {', '.join(no_ambient)} "
            "is not checked",
            info.loc if info else build.loc,
            level="note",
            stage="power",
            fix="State 'ambient_max:' under build: the hottest air the build will sit in (40 degC "
            "indoors is a usual worst case).",
        )


def _regulator_power(build, dev):
    outs = regulator_outputs(build, dev)
    v_in = rail_volts(build, dev.rail)
    v_out = rail_volts(build, outs[0]) if outs else None
    if v_out is None and dev.profile.output_voltage is not None:
        v_out = dev.profile.output_voltage.si
    if v_in is None or v_out is None:
        return None
    delivered = budget(build).delivered.get(dev.name)
    i_out = delivered[0] if delivered else (dev.load_current.si if dev.load_current else 0.0)
    iq = dev.profile.quiescent_current.si if dev.profile.quiescent_current else 0.0
    return regulator_dissipation(v_in, v_out, i_out, iq), v_in, v_out, i_out


@rule(
    "power.regulator-dropout",
    verify="""
      Measure input and output of the regulator at the lowest supply voltage and full load: the output
      must stay at its nominal value.
      """,
    level="error",
    title="Linear regulator input headroom (dropout)",
    explanation="""
      A linear regulator holds its output only while its input stays above the output by at
      least its dropout voltage (about 2 V for a classic three-terminal part, a few hundred
      millivolts for a low-dropout one). Below that the output follows the input down, with
      the input's ripple and noise on it. The input is taken after every series drop between
      the supply and the regulator's rail: a series protection diode (its forward_voltage, else
      0.7 V for silicon) and a series resistor or resistor-fuse at the budget current. Within
      the setting margin (default 0.5 V) above the dropout the regulation is thin: a warning.
      The regulator turns the rest, (V_in − V_out)·I, into heat; that part is checked with the
      other heat rules.
      """,
      fix="Raise the input rail, use a Schottky series diode or a shunt protection diode behind the "
          "fuse, choose "
          "a low-dropout regulator, or lower the output voltage.",
      source="common practice (linear regulator datasheets; 0.7 V silicon diode drop; 0.5 V margin)",
      settings={"margin": 0.5})
def regulator_dropout(build, ctx):
    for dev in build.devices.values():
        prof = dev.profile
        if prof is None or prof.cls != REGULATOR:
            continue
        outs = regulator_outputs(build, dev)
        v_in, drops = rail_after_drops(build, dev.rail)
        stated_out = prof.output_voltage.si if prof.output_voltage else None
        v_out = rail_volts(build, outs[0]) if outs else stated_out
        if v_in is None or v_out is None:
            continue
        headroom = v_in - v_out
        after = ""
        if drops:
            after = " after " + ", ".join(f"{what} ({fmt(v, 'V')})" for what, v in drops)
            ctx.publish("power", dev.name, "input after series drops", v_in, "V")
        ctx.publish("power", dev.name, "input headroom V_in − V_out", headroom, "V")
        if prof.dropout is None:
            continue
        values = [Value("headroom", headroom, "V"), Value("dropout", prof.dropout.si, "V")]
        if headroom < prof.dropout.si - 1e-9:
            ctx.report(f"{dev.name} makes {fmt(v_out, 'V')} from {dev.rail} at {fmt(v_in, 'V')}{after}: "
                       f"{fmt(headroom, 'V')} of headroom, less than its {prof.dropout.text} dropout; "
                       f"the output will "
                       f"sag and carry the input's ripple", dev.at("rail"), values, stage="power")
        elif headroom < prof.dropout.si + ctx.setting("margin") - 1e-9:
            ctx.report(f"{dev.name} makes {fmt(v_out, 'V')} from {dev.rail} at {fmt(v_in, 'V')}{after}: "
                       f"{fmt(headroom, 'V')} of headroom, within {fmt(ctx.setting('margin'), 'V')} of its "
                       f"{prof.dropout.text} dropout: ripple troughs or a low supply will take it out of "
                       f"regulation",
                       dev.at("rail"), values, level="warning", stage="power")
