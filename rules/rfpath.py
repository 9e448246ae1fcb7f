"""RF path: input match and gain ahead of a low-intercept IF device.

The match is computed at the frequency that arrives at the stage (from the frequency-plan
walk): the impedance the source sees through the declared network, its return loss and
VSWR, the ideal L-network with the nearest preferred values, toroid turns for a declared
core, and what a plain shunt termination would give up instead. All formulas live in
speccheck/formulas/.
"""

from __future__ import annotations

import math

from speccheck import units
from speccheck.chain import frequency_plan, owner
from speccheck.findings import Value
from speccheck.formulas import matching, preferred, resonators
from speccheck.registry import rule


def _setting(ctx, name: str, cast=float):
    try:
        return cast(ctx.setting(name))
    except (TypeError, ValueError):
        return cast(ctx.rule.settings[name])


def _fmt(value: float, unit: str) -> str:
    return units.fmt(value, unit)


def _pick(kind: str, parts: list):
    found = [p for p in parts if p is not None and p.kind == kind]
    return found[0] if found else None


def _say_override(build, stage, ctx):
    """Format 2: a works_into that differs from the device's input impedance is said, not silent."""
    dev = build.device(stage.device)
    given = stage.works_into
    if given is None or dev is None or dev.profile.input_impedance is None:
        return
    prof = dev.profile  # a device always has its profile (input.reference refuses an unknown one)
    own = prof.input_impedance.si
    if abs(given.si / own - 1) > 0.1:
        ctx.report(
            f"{stage.label}: works_into {given.text} replaces the {prof.input_impedance.text} input "
            f"impedance of {dev.name} ({prof.name} profile) in the match arithmetic",
            stage.at("works_into"),
            [Value("works_into", given.si, "Ω"), Value("device input", own, "Ω")],
            level="note",
            stage=stage.label,
        )


def _load_resistance(build, stage) -> float | None:
    """The resistance the network works into: the stage's own figure, else its device's input."""
    given = stage.works_into or stage.load_impedance  # v2 name, v1 name
    if given is not None:
        return given.si
    dev = build.device(stage.device)
    if dev is not None and dev.profile.input_impedance is not None:
        return dev.profile.input_impedance.si
    return None


def _load_field(build, stage) -> str:
    """The field that would give a stage's load resistance when _load_resistance found none."""
    dev = build.device(stage.device)
    if dev is not None:
        return f"profiles.{dev.profile.name}.input_impedance"
    return f"chain[{stage.index}].works_into or .device"


def _publish_picks(ctx, who: str, what: str, ideal: float, unit: str) -> str:
    """Publish the nearest E12 and E24 values to an ideal one; return them as words."""
    shown = []
    for name in ("E12", "E24"):
        pick, err = preferred.nearest_preferred(ideal, preferred.SERIES[name])
        ctx.publish("input-match", who, f"{what}, nearest {name}", pick, unit)
        ctx.publish("input-match", who, f"{what}, {name} error", round(err * 100, 2), "%")
        shown.append(f"{name} {_fmt(pick, unit)} {err * 100:+.1f} %")
    return ", ".join(shown)


@rule(
    "rfpath.input-match",
    verify="""
      Measure the return loss (or VSWR) at the input with an antenna analyser or a bridge, at the working
      frequency, with the circuit powered.
      """,
    level="warning",
    title="Input network against the source impedance at the working frequency",
    explanation="""
      The source (a receiver's IF output, an instrument, a generator) is built to work into its own
      impedance, usually 50 ohm, while the mixer input of an IF chip is often around 1.5 kohm. A
      low-pass L-network (series L, shunt C across the higher resistance) transforms one into the
      other at one frequency: Q = sqrt(R_high / R_low - 1), X_L = Q R_low, X_C = R_high / Q. speccheck
      computes the impedance the source really sees through the declared L and C at the working
      frequency, the return loss (-20 log10 |Gamma|) and VSWR, and warns when the return loss is under
      the setting min_return_loss (default 10 dB, VSWR about 1.9). The sheet shows the ideal values,
      the nearest E12 and E24 parts (IEC 60063) and their error, the turns for a declared toroid
      core, and what a plain shunt resistor across the input would cost instead: it matches the
      source by wasting power, and the chip gets 10 log10(R_in / R_source) dB less signal.
      """,
    fix="Use the ideal L-network values (nearest preferred parts), with the shunt C across the higher "
    "resistance, and check the match on the bench with a return-loss bridge.",
    source="L-network design (Bowick, RF Circuit Design, Example 4-1, from memory), cross-checked with "
    "scikit-rf in tests; IEC 60063 (E12/E24); common practice: 50 ohm to 3.3 kohm at 21.4 MHz is "
    "about 3 µH and 18 pF",
    settings={"min_return_loss": 10.0},
)
def input_match(build, ctx):
    plan = frequency_plan(build)
    for stage in build.stages("input-match"):
        who = owner(build, stage)
        src = build.source
        if src is None or src.impedance is None:
            ctx.report(
                f"{stage.label}: source.impedance is not given, so the match cannot be computed",
                src.loc if src is not None else stage.loc,
                level="note",
                stage=stage.label,
                fix="Give source.impedance (50 ohm for most receivers and instruments).",
            )
            continue
        rs = src.impedance.si
        rl = _load_resistance(build, stage)
        _say_override(build, stage, ctx)
        if rl is None:
            from_where = _load_field(build, stage)
            ctx.report(
                f"{stage.label}: {from_where} is not given, so the match cannot be computed",
                stage.loc,
                level="note",
                stage=stage.label,
                fix=f"Give {from_where}.",
            )
            continue
        f, _ = plan.at[id(stage)]  # the walk records every chain stage
        if f is None:  # the schema requires source.frequency: a conversion ahead left the IF unknown
            ctx.report(
                f"{stage.label}: the IF of a conversion ahead of it is not known, so the match cannot be "
                "computed at its working frequency",
                stage.loc,
                level="note",
                stage=stage.label,
            )
            continue
        ctx.publish("input-match", who, "working frequency", f, "Hz")
        ctx.publish("input-match", who, "source resistance", rs, "Ω")
        ctx.publish("input-match", who, "load resistance", rl, "Ω")
        cost = matching.termination_cost_db(rs, rl)
        if rl > rs:
            ctx.publish(
                "input-match",
                who,
                "shunt termination resistor instead",
                matching.termination_resistor(rs, rl),
                "Ω",
            )
            ctx.publish("input-match", who, "signal lost with a shunt termination", round(cost, 2), "dB")
        topo = stage.topology
        parts = [build.part(ref) for ref in stage.parts]
        coil, cap, res = _pick("inductor", parts), _pick("capacitor", parts), _pick("resistor", parts)
        ideal = matching.l_network(rs, rl, f) if rl != rs else None
        if ideal is not None:
            ctx.publish("input-match", who, "L-network Q", round(ideal["q"], 3))
            ctx.publish("input-match", who, "ideal series L", ideal["inductance"], "H")
            ctx.publish("input-match", who, "ideal shunt C", ideal["capacitance"], "F")
            picks_l = _publish_picks(ctx, who, "series L", ideal["inductance"], "H")
            picks_c = _publish_picks(ctx, who, "shunt C", ideal["capacitance"], "F")
            if coil is not None and coil.core is not None:  # the schema requires a core's al
                ctx.publish(
                    "input-match",
                    who,
                    f"turns for the ideal L on {coil.name}'s core",
                    round(resonators.toroid_turns(ideal["inductance"], coil.core.al.si), 1),
                )
            suggestion = (
                f"series {_fmt(ideal['inductance'], 'H')} ({picks_l}), shunt "
                f"{_fmt(ideal['capacitance'], 'F')} ({picks_c}) across the {ideal['shunt_on']} "
                "side"
            )
        else:
            suggestion = "no network: source and load are equal"
        where = stage.at("topology")  # the stage itself when no topology is given
        min_rl = _setting(ctx, "min_return_loss")
        if topo in ("series-l-shunt-c", "shunt-c-series-l"):
            if coil is None or cap is None or coil.value is None or cap.value is None:
                ctx.report(
                    f"{stage.label}: a {topo} network needs an inductor and a capacitor with values "
                    f"in chain[{stage.index}].parts",
                    where,
                    level="note",
                    stage=stage.label,
                )
                continue
            wants = "load" if topo == "series-l-shunt-c" else "source"
            if ideal is not None and ideal["shunt_on"] != wants:
                ctx.report(
                    f"a {topo} network puts its shunt C across the {wants} side, but the higher "
                    f"resistance is on the {ideal['shunt_on']} side ({_fmt(rs, 'Ω')} source, "
                    f"{_fmt(rl, 'Ω')} load): this shape cannot match them",
                    where,
                    [Value("source", rs, "Ω"), Value("load", rl, "Ω")],
                    stage=stage.label,
                    fix="Turn the network round: the shunt C goes across the higher resistance.",
                )
            zin = (
                matching.zin_series_l_shunt_c if topo == "series-l-shunt-c" else matching.zin_shunt_c_series_l
            )(f, coil.value.si, cap.value.si, rl)
        elif topo == "termination":
            if res is None or res.value is None:
                ctx.report(
                    f"{stage.label}: a termination needs its resistor with a value in "
                    f"chain[{stage.index}].parts",
                    where,
                    level="note",
                    stage=stage.label,
                )
                continue
            zin = complex(resonators.parallel(res.value.si, rl))
            share = (zin.real / rl) * (1 - abs(matching.reflection(zin, rs)) ** 2)
            lost = -10 * math.log10(share)  # share > 0: two positive resistances in parallel
            ctx.publish("input-match", who, "signal lost in the termination", round(lost, 2), "dB")
            if rl > rs and ideal is not None:
                ctx.report(
                    f"{res.name} terminates the {_fmt(rs, 'Ω')} source across the {_fmt(rl, 'Ω')} "
                    f"input: the chip gets {lost:.1f} dB less signal than through a lossless "
                    f"L-network ({suggestion})",
                    where,
                    [
                        Value("lost", round(lost, 2), "dB"),
                        Value("ideal L", ideal["inductance"], "H"),
                        Value("ideal C", ideal["capacitance"], "F"),
                    ],
                    level="note",
                    stage=stage.label,
                    fix=f"Replace the termination with an L-network: {suggestion}.",
                )
        elif topo == "direct":
            zin = complex(rl)
        else:
            continue  # a transformer or an undeclared shape: no data to compute
        rloss, ratio = matching.return_loss_db(zin, rs), matching.vswr(zin, rs)
        ctx.publish("input-match", who, "impedance seen by the source (real)", zin.real, "Ω")
        ctx.publish("input-match", who, "impedance seen by the source (imaginary)", zin.imag, "Ω")
        ctx.publish(
            "input-match", who, "return loss", round(rloss, 2), "dB"  # round(inf, 2) is inf
        )
        ctx.publish("input-match", who, "VSWR", round(ratio, 3))
        if rloss < min_rl:
            sign = "+" if zin.imag >= 0 else "−"
            ctx.report(
                f"at {units.fmt(f, 'Hz', 6)} the {_fmt(rs, 'Ω')} source sees {zin.real:.1f} {sign} "
                f"j{abs(zin.imag):.1f} Ω through the {topo} input: return loss {rloss:.1f} dB (VSWR "
                f"{ratio:.2f}), under {min_rl:g} dB; ideal for {_fmt(rl, 'Ω')}: {suggestion}",
                where,
                [
                    Value("return loss", round(rloss, 2), "dB"),
                    Value("VSWR", round(ratio, 3)),
                    Value("mismatch loss", round(matching.mismatch_loss_db(zin, rs), 2), "dB"),
                ],
                stage=stage.label,
            )


@rule(
    "rfpath.coil-turns",
    verify="""
      Measure the wound coil with an LC meter, or resonate it with a known capacitor and a dip meter,
      before fitting it.
      """,
    level="warning",
    title="Turns on a declared core against the coil's inductance",
    explanation="""
      A coil wound on a toroid or other core with a known inductance factor AL (inductance per turn
      squared; handbook tables often give it per 100 turns) has L = AL N^2, so N = sqrt(L / AL). A
      0.5 in powdered-iron toroid of the common mix 2 material has about 4.9 nH per turn squared
      (49 µH per 100 turns): 50 turns give 12.25 µH. speccheck lists the turns each declared value
      needs and warns when the declared turns give an inductance more than the setting tolerance
      (default 10 %) away from the declared value.
      """,
    fix="Wind N = sqrt(L / AL) turns, or correct the declared value or core.",
    source="powdered-iron toroid handbook table (0.5 in, mix 2: 49 µH per 100 turns)",
    settings={"tolerance": 0.1},
)
def coil_turns(build, ctx):
    for part in build.parts.values():
        if part.kind != "inductor" or part.core is None:  # the schema requires a core's al
            continue
        al = part.core.al.si
        stage = build.stage_of_part(part.name)
        label = stage.label if stage else "parts"
        if part.value is not None:
            need = resonators.toroid_turns(part.value.si, al)
            ctx.publish("coils", part.name, "turns for the declared value", round(need, 1))
        if part.turns is None:
            continue
        got = resonators.toroid_inductance(part.turns, al)
        ctx.publish("coils", part.name, f"inductance of {part.turns} turns", got, "H")
        if part.value is None:
            continue
        err = got / part.value.si - 1
        if abs(err) > _setting(ctx, "tolerance"):
            ctx.report(
                f"{part.name}: {part.turns} turns on its core (AL {units.fmt(al * 1e9, '')} "
                f"nH/turn²) give {_fmt(got, 'H')}, {err * 100:+.0f} % from the declared "
                f"{part.value.text}; {need:.0f} turns would give it",
                part.at("turns"),
                [
                    Value("from turns", got, "H"),
                    Value("declared", part.value.si, "H"),
                    Value("turns needed", round(need, 1)),
                ],
                stage=label,
            )


def _first_stage_of(build, device_name: str):
    for i, stage in enumerate(build.chain):
        if stage.device == device_name:
            return i, stage
    return None, None


def _gain_ahead(build, upto: int) -> tuple[float, list]:
    stages = [s for s in build.chain[:upto] if s.kind == "preamp" and s.gain is not None]
    return sum(s.gain.si for s in stages), stages


def _low_intercept(dev) -> bool:
    return dev.profile is not None and (
        dev.profile.max_gain_ahead is not None or dev.profile.cls == "fm-if-subsystem"
    )


@rule(
    "rfpath.gain-ahead",
    verify="""
      Raise the input level in 10 dB steps with a generator and watch for the audio to distort or the RSSI
      to stop rising: there the chip overloads.
      """,
    level="warning",
    title="Too much gain ahead of a low-intercept IF device",
    explanation="""
      The mixers of narrowband FM IF chips are made for small signals: their intercept point is
      low, so a preamplifier ahead of them raises the interfering signals as much as the wanted
      one, and intermodulation products grow three times as fast as the signals do. Keep the gain
      ahead of such a chip to what its profile allows (about 10 dB is common practice; profiles
      state max_gain_ahead, and the setting default_limit covers IF-chip profiles that do not).
      """,
    fix="Reduce the preamplifier gain (or add a pad after it) to the profile's limit.",
    source="common practice: keep gain ahead of a narrowband FM IF chip to about 10 dB",
    settings={"default_limit": 10.0},
)
def gain_ahead(build, ctx):
    for dev in build.devices.values():
        if not _low_intercept(dev):
            continue
        index, first = _first_stage_of(build, dev.name)
        if first is None:
            continue
        total, stages = _gain_ahead(build, index)
        if not stages:
            continue
        limit = (
            dev.profile.max_gain_ahead.si
            if dev.profile.max_gain_ahead is not None
            else _setting(ctx, "default_limit")
        )
        ctx.publish("rf-levels", dev.name, "gain ahead", total, "dB")
        ctx.publish("rf-levels", dev.name, "gain ahead allowed", limit, "dB")
        if total > limit:
            biggest = max(stages, key=lambda s: s.gain.si)
            ctx.report(
                f"{total:g} dB of gain stands ahead of {dev.name} ({dev.profile.name}), more than the "
                f"{limit:g} dB its mixer tolerates: intermodulation and overload",
                biggest.at("gain"),
                [Value("gain ahead", total, "dB"), Value("limit", limit, "dB")],
                stage=biggest.label,
            )


@rule(
    "rfpath.max-input",
    verify="""
      Raise the input level in 10 dB steps with a generator and watch for the audio to distort or the RSSI
      to stop rising: there the chip overloads.
      """,
    level="warning",
    title="Highest level reaching the chip against its maximum input",
    explanation="""
      The strongest signal the source delivers (source.level_max), plus the gain of every
      preamplifier ahead of the device, reaches its input. A lossless match changes the voltage,
      not the power, so the level in dBm carries through it. Above the device profile's max_input
      the mixer and limiter overload: distortion, spurious responses, in the worst case damage.
      """,
    fix="Add attenuation ahead of the device, reduce the preamplifier gain, or lower the source level.",
    source="common practice (level plan); device limits from the profile",
)
def max_input(build, ctx):
    src = build.source
    for dev in build.devices.values():
        if dev.profile.max_input is None:  # a device always has its profile (input.reference)
            continue
        index, first = _first_stage_of(build, dev.name)
        if first is None or first.kind not in ("input-match", "preamp", "conversion", "if-filter", "limiter"):
            continue
        if src is None or src.level_max is None:
            ctx.report(
                f"{dev.name}: source.level_max is not given, so the highest level reaching it cannot "
                f"be checked against its {dev.profile.max_input.text}",
                src.loc if src is not None else first.loc,
                level="note",
                stage=first.label,
                fix="Give source.level_max.",
            )
            continue
        total, _ = _gain_ahead(build, index)
        level = src.level_max.si + total
        ctx.publish("rf-levels", dev.name, "highest input level", level, "dBm")
        ctx.publish("rf-levels", dev.name, "maximum input (profile)", dev.profile.max_input.si, "dBm")
        if level > dev.profile.max_input.si:
            ctx.report(
                f"up to {level:g} dBm reaches {dev.name} (source "
                f"{src.level_max.text}{f' plus {total:g} dB gain' if total else ''}), above the "
                f"{dev.profile.max_input.text} its profile allows",
                src.at("level_max"),
                [Value("highest level", level, "dBm"), Value("max input", dev.profile.max_input.si, "dBm")],
                stage=first.label,
            )
