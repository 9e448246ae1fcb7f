"""Audio output: stabilising network, coupling-capacitor corner, DC through the speaker.

The coupling capacitor's orientation and voltage rating are the wiring family's
(wiring.speaker-coupling, wiring.cap-voltage); this family does not repeat them.
"""

from __future__ import annotations

import math

from speccheck.findings import Value
from speccheck.formulas.audio import high_pass_loss_db, rc_corner
from speccheck.registry import rule
from speccheck.units import fmt

DC_THRESHOLD = 0.1  # V; below this a speaker counts as having no DC across it


def _output_nets(dev) -> list:
    """The audio outputs of a device (a device always has its profile: input.reference refuses others)."""
    return [f"{dev.name}.{pin.name}" for pin in dev.profile.pins.values() if pin.role == "audio-out"]


def _network_ok(build, dev, res, cap, extra_nets=()) -> bool:
    """The resistor and the capacitor in series from an amplifier output to ground (or across two outputs)."""
    shared = set(res.ends) & set(cap.ends)  # empty when either part has no ends (a part has two or none)
    if len(shared) != 1:
        return False
    middle = shared.pop()
    far = {res.other_end(middle), cap.other_end(middle)}
    outs = set(_output_nets(dev)) | set(extra_nets)
    nets = build.nets
    hits = [n for n in far if n in outs]
    if len(hits) == 2:
        return True  # across a bridge-tied output
    return len(hits) == 1 and all(n in outs or nets.is_ground(n) for n in far)


@rule("audio.output-network",
      verify="""
      With no input and full volume, look at the amplifier output on a scope with a speaker connected: no
      RF oscillation should be visible.
      """,
      level="warning",
      title="Series R–C stabilising network across the amplifier output",
      explanation="""
      Many audio power amplifier ICs are stable only when their output sees a resistive load at
      radio frequencies. A speaker is not one: its voice-coil inductance and the leads make the
      load rise with frequency, and the amplifier may oscillate at hundreds of kilohertz,
      running hot and distorting while nothing is audible. The usual cure is a series R–C
      network from the output to ground, about 10 Ω with 100 nF (a turnover of 1/(2π·R·C),
      159 kHz), well above the audio band so that it draws almost no audio power. The rule
      follows the amplifier profile's output_network: 'required' makes a missing network an
      error, 'recommended' a warning.
      """,
      fix="Add about 10 ohm in series with 100 nF from the amplifier output to ground and name them in the "
          "stage's output_network.",
      source="common practice (audio amplifier IC application circuits)",
      settings={"lowest_corner": 20e3})
def output_network(build, ctx):
    for stage in build.stages("audio-amp"):
        dev = build.device(stage.device)
        want = dev.profile.output_network if dev else None
        net = stage.output_network
        if net is None:
            if want in ("required", "recommended"):
                ctx.report(f"profile {dev.profile.name} of {dev.name} "
                           f"{'requires' if want == 'required' else 'recommends'} a series R–C network "
                           f"across its output and the {stage.label} stage has none: with the speaker "
                           "lead's inductance the amplifier may oscillate at RF", stage.at("kind"),
                           level="error" if want == "required" else "warning", stage=stage.label)
            continue
        res, cap = build.part(net.resistor), build.part(net.capacitor)  # input.reference checked both
        if res.kind != "resistor" or cap.kind != "capacitor":
            ctx.report(f"output_network of {stage.label} names {res.name} ({res.kind}) and {cap.name} "
                       f"({cap.kind}); expected a resistor and a capacitor",
                       net.loc, level="note", stage=stage.label)
            continue
        if res.value is not None and cap.value is not None:
            corner = rc_corner(res.value.si, cap.value.si)
            ctx.publish(
                "audio", stage.label, f"output network {res.name} + {cap.name} turnover", corner, "Hz"
            )
            lowest = ctx.setting("lowest_corner")
            if corner < lowest:
                ctx.report(
                    f"output network {res.name} ({res.value.text}) + {cap.name} ({cap.value.text}) "
                    f"turns over at {fmt(corner, 'Hz')}, inside the audio band (below "
                    f"{fmt(lowest, 'Hz')}): {res.name} takes audio power",
                    cap.at("value"),
                    [Value("turnover", corner, "Hz")],
                    stage=stage.label,
                )
        load = build.part(stage.load)
        # the speaker's ends count as outputs (a network behind the coupling capacitor); its ground end
        # changes nothing, since a network's far end may be ground anyway
        hot = load.ends if load else []
        if dev is not None and not _network_ok(build, dev, res, cap, hot):
            ctx.report(
                f"{res.name} and {cap.name} do not form a series R–C from {dev.name}'s output to "
                f"ground ({res.name}: {', '.join(res.ends) or 'no ends'}; {cap.name}: "
                f"{', '.join(cap.ends) or 'no ends'})",
                res.at("ends"),
                stage=stage.label,
            )
        if cap.polarized:
            ctx.report(
                f"{cap.name} in the output network is {cap.dielectric}: the network carries RF and "
                "audio both ways; use a film or ceramic capacitor",
                cap.at("dielectric"),
                stage=stage.label,
            )


@rule(
    "audio.coupling-corner",
    verify="""
      Sweep an audio generator into the amplifier and read the speaker voltage: it falls 3 dB at the
      corner.
      """,
    level="warning",
    title="Output coupling capacitor against the lowest audio frequency",
    explanation="""
      The capacitor between a single-supply amplifier's output and the speaker forms a
      high-pass filter with the speaker's impedance: f_c = 1/(2π·R_L·C). Below f_c the bass
      falls away at 6 dB per octave. 470 µF into 8 Ω turns over at 42.3 Hz, 1000 µF at 19.9 Hz;
      a 4 Ω speaker needs twice the capacitance for the same corner. The corner should sit at or
      below the lowest audio frequency the build means to reproduce (build.lowest_audio); for a
      voice channel a few hundred hertz is plenty.
      """,
    fix="Use a coupling capacitor of at least 1/(2π·R_L·f_low) (the value shown), or accept the higher "
    "corner by raising build.lowest_audio.",
    source="first-order RC high-pass: circuit theory (cross-checked with scipy.signal in the tests)",
)
def coupling_corner(build, ctx):
    lowest = build.build.lowest_audio  # the schema requires build:
    unchecked = []
    for stage in build.stages("audio-amp"):
        cap, load = build.part(stage.coupling), build.part(stage.load)
        if (
            cap is None
            or load is None
            or cap.kind != "capacitor"
            or cap.value is None
            or load.value is None
            or load.kind not in ("speaker", "resistor")
        ):
            continue
        corner = rc_corner(load.value.si, cap.value.si)
        ctx.publish("audio", stage.label, f"coupling {cap.name} into {load.name} corner", corner, "Hz")
        if lowest is None:
            unchecked.append((stage, cap, corner))
            continue
        if corner <= lowest.si * (1 + 1e-9):
            continue
        need = 1.0 / (2 * math.pi * load.value.si * lowest.si)
        loss = high_pass_loss_db(lowest.si, corner)
        ctx.report(
            f"{cap.name} ({cap.value.text}) into {load.name} ({load.value.text}) turns over at "
            f"{fmt(corner, 'Hz')}, above the build's lowest audio frequency of {lowest.text}: "
            f"{loss:.1f} dB down there; {fmt(need, 'F')} or more keeps it",
            cap.at("value"),
            [
                Value("corner", corner, "Hz"),
                Value("lowest audio", lowest.si, "Hz"),
                Value("loss there", loss, "dB"),
                Value("capacitance needed", need, "F"),
            ],
            stage=stage.label,
        )
    if unchecked:
        stage, cap, corner = unchecked[0]
        ctx.report(
            f"build.lowest_audio is not stated: the {fmt(corner, 'Hz')} corner of {cap.name} is not checked",
            build.build.loc,
            level="note",
            stage=stage.label,
            fix="State 'lowest_audio:' under build (300 Hz for voice, 50 Hz or lower for music).",
        )


@rule(
    "audio.speaker-dc",
    verify="""
      Measure the DC voltage across the speaker terminals with the build on: it should be near 0 V.
      """,
    level="error",
    title="DC standing across the speaker",
    explanation="""
      A single-supply amplifier's output idles at about half the supply. Wired straight to a
      speaker returned to ground, that DC drives a steady current through the voice coil: the
      cone sits pushed out of its gap, the coil heats (V²/R of DC, several watts from 12 V into
      8 Ω) and the amplifier wastes its output swing. A coupling capacitor (or a bridge-tied
      load, whose two outputs idle at the same DC) keeps DC out of the speaker.
      """,
    fix="Put an electrolytic coupling capacitor (+ toward the amplifier) in series with the speaker, or "
    "return the speaker to a net at the same DC potential.",
    source="common practice (single-supply audio amplifier application circuits)",
)
def speaker_dc(build, ctx):
    nets = build.nets
    for part in build.parts.values():
        known = nets.across(part) if part.kind == "speaker" else None
        if known is None or known[4] <= DC_THRESHOLD:
            continue
        a, pa, b, pb, across = known
        values = [Value(a, pa.volts, "V"), Value(b, pb.volts, "V"), Value("DC across", across, "V")]
        tail = ""
        if part.value is not None:
            amps, watts = across / part.value.si, across**2 / part.value.si
            values += [
                Value("DC through the coil (at its nominal impedance)", amps, "A"),
                Value("DC power", watts, "W"),
            ]
            tail = f": about {fmt(amps, 'A')} of DC ({fmt(watts, 'W')}) in the voice coil"
        ctx.report(
            f"{part.name} has {fmt(across, 'V')} DC across it, {a} at {pa.volts:g} V ({pa.why}) and "
            f"{b} at {pb.volts:g} V{tail}",
            part.at("ends"),
            values,
            stage=(build.stage_of_part(part.name).label if build.stage_of_part(part.name) else "audio-amp"),
        )


def _input_nets(dev) -> list:
    """The input pins of a device, none for a stage that names no device."""
    if dev is None:
        return []
    return [f"{dev.name}.{pin.name}" for pin in dev.profile.pins.values() if pin.role == "input"]


@rule(
    "audio.input-bypass",
    level="warning",
    title="Small RF bypass capacitor at the audio amplifier input",
    explanation="""
      A receiver is full of RF: the IF, the local oscillator and their harmonics travel along the
      audio wiring. An audio power amplifier's input stage rectifies whatever RF reaches it, and
      the result is hum, buzz, whistles or instability that no tuning cures. A small capacitor
      from the amplifier input to ground (a few hundred picofarads to a few nanofarads) shorts
      the RF while leaving the audio untouched: 470 pF against a 10 kohm source turns over near
      34 kHz, far above any voice or music.
      """,
    fix="Fit about 470 pF to 1 nF from the amplifier input pin to ground, close to the pin, and name it in "
    "the audio-amp stage's input_bypass.",
    source="common practice (audio amplifier IC application circuits in radio receivers)",
    verify="With the receiver tuned to a strong carrier and the volume down, listen and look at the "
    "speaker output on a scope: hum or a buzz that changes with the RF level means RF reaches the "
    "amplifier.",
    settings={"smallest": 100e-12, "largest": 10e-9},
)
def input_bypass(build, ctx):
    nets = build.nets
    for stage in build.stages("audio-amp"):
        dev = build.device(stage.device)
        if stage.input_bypass is None:
            ctx.report(
                f"the {stage.label} stage names no input_bypass: nothing keeps RF out of "
                f"{dev.name if dev else 'the amplifier'}'s input",
                stage.at("kind"),
                stage=stage.label,
            )
            continue
        cap = build.part(stage.input_bypass)  # input.reference checked that it is declared
        if cap.kind != "capacitor" or cap.value is None:
            ctx.report(
                f"input_bypass {cap.name} is a {cap.kind}{'' if cap.value else ' with no value'}; an "
                "RF bypass is a small capacitor",
                stage.at("input_bypass"),
                level="note",
                stage=stage.label,
            )
            continue
        ctx.publish("audio", stage.label, f"input bypass {cap.name}", cap.value.si, "F")
        on_input = [e for e in cap.ends if e in _input_nets(dev)]
        to_ground = [e for e in cap.ends if nets.is_ground(e)]
        if dev is not None and (not on_input or not to_ground):
            ctx.report(
                f"input_bypass {cap.name} does not sit between an input pin of {dev.name} and ground "
                f"(its ends: {', '.join(cap.ends)})",
                cap.at("ends"),
                level="note",
                stage=stage.label,
            )
        lo, hi = ctx.setting("smallest"), ctx.setting("largest")
        if not lo <= cap.value.si <= hi:
            ctx.report(
                f"input_bypass {cap.name} is {cap.value.text}: outside {fmt(lo, 'F')} to "
                f"{fmt(hi, 'F')}, "
                f"{'too small to short the RF' if cap.value.si < lo else 'large enough to cut the treble'}",
                cap.at("value"),
                [Value("bypass", cap.value.si, "F")],
                stage=stage.label,
            )


@rule("audio.speaker-power", level="warning",
      title="Speaker power rating against what the amplifier can deliver",
      explanation="""
      At full volume a class-B or class-AB amplifier can drive its load up to the clipping limit.
      Its output devices keep a saturation voltage from the rails (the profile's saturation,
      both sides together; a low-voltage amplifier IC loses about 3 V), so on one supply with a
      coupling capacitor the speaker sees a sine of peak (V_s − V_sat)/2 and the power reaches
      (V_s − V_sat)²/(8·R_L): 12 V into 8 ohm with 3 V lost gives 1.27 W, not the rail-to-rail
      2.25 W. A bridge-tied load doubles the swing. A profile's rated_output caps the figure.
      Driven past its rating, a speaker's voice coil overheats, its
      former warps and the coil rubs or opens. Listening levels are usually far lower, but a
      squelch tail or a feedback howl at full volume is not.
      """,
      fix="Fit a speaker rated at least the power shown, or limit the amplifier's gain or supply.",
      source="class-B output power: Boylestad & Nashelsky, Electronic Devices and Circuit Theory, ch. 12 "
             "(P_o(max) = V_CC²/(2·R_L), with V_CC = V_s/2 on one supply, less the saturation voltage); "
             "3 V saturation of a low-voltage amplifier IC: from memory",
      verify="At full volume with a tone, measure the RMS voltage across the speaker: V²/R must stay "
             "below its "
             "rating.")
def speaker_power(build, ctx):
    from speccheck.budget import amp_point

    for stage in build.stages("audio-amp"):
        dev, load = build.device(stage.device), build.part(stage.load)
        if dev is None or load is None or load.kind != "speaker" or load.power_rating is None:
            continue
        point, _ = amp_point(build, dev)
        if point is None:
            continue  # power.heat says what is missing
        full = point.full_output()["p_out"]
        name = f"most power into {load.name} (full sine, {point.swing_text})"
        ctx.publish("audio", stage.label, name, full, "W")
        if load.power_rating.si < full:
            ctx.report(
                f"{load.name} is rated {load.power_rating.text} but {dev.name} can deliver up to "
                f"{fmt(full, 'W')} into it ({point.topology} on {fmt(abs(point.v_supply), 'V')}): at "
                "full volume the voice coil overheats",
                load.at("power_rating"),
                [
                    Value("speaker rating", load.power_rating.si, "W"),
                    Value("amplifier full output", full, "W"),
                ],
                stage=stage.label,
            )
