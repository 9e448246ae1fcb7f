"""Wiring: what the nets of the plan say about DC, coils, crystals and polarized parts.

Every check here reads DC potentials from speccheck.nets (rails, pin biases from device
profiles, declared node voltages, spread through coils and resistors) and names the nets
and potentials that led to the verdict.
"""

from __future__ import annotations

import weakref
from typing import Any

from speccheck.findings import Value
from speccheck.registry import rule

DC_THRESHOLD = 0.1  # V; below this two nets count as the same DC potential


def _stage(build, ref: str, default: str = "wiring") -> str:
    stage = build.stage_of_part(ref)
    return stage.label if stage else default


def _volts(name: str, pot) -> Value:
    return Value(name, pot.volts, "V")


# ---- tank return ------------------------------------------------------------------------

@rule("wiring.tank-return", level="error",
      title="Quadrature tank must return to the supply rail",
      explanation="""
      Many FM IF chips bias the quadrature (phase-shift) detector pin through the external coil:
      the pin's DC comes in through the tank. The coil's far end must therefore sit on the supply
      rail, usually through a small series resistor (about 10 ohm) with a bypass capacitor to
      ground so that the rail's noise stays out of the detector. Returned to ground instead, the
      pin has no bias, the detector transistor is cut off and there is no audio at all, however
      well the coil is tuned.
      """,
      fix="Return the coil's far end to the supply rail, through about 10 ohm with a 100 nF bypass to "
          "ground.",
      source="common practice (IF-chip application circuits)",
      verify="Power up without a signal and measure the DC on the quadrature pin with a meter to ground: it "
             "should read close to the supply rail, not 0 V. With a signal, turning the coil's slug should "
             "swing the recovered audio through a clear peak.")
def tank_return(build, ctx):
    nets = build.nets
    for dev in build.devices.values():
        if not dev.profile:
            continue
        for pin in dev.profile.pins.values():
            if not pin.bias_through_tank:
                continue
            pin_net = f"{dev.name}.{pin.name}"
            coils = [p for p in nets.parts_on(pin_net) if p.kind == "inductor"]
            for coil in coils:
                _check_coil_return(build, ctx, dev, pin_net, coil)


def _check_coil_return(build, ctx, dev, pin_net, coil):
    nets = build.nets
    far = coil.other_end(pin_net)
    supply = nets.rail_voltage(dev.rail)
    values = [Value("pin", pin_net), Value("coil far end", far)]
    if supply is not None:
        values.append(Value(f"supply {dev.rail}", supply, "V"))
    if nets.is_ground(far):
        ctx.report(f"{coil.name} returns {pin_net} to {far} (0 V): the {pin_net.split('.')[1]} pin of "
                   f"{dev.name} is biased through its coil and needs the supply "
                   f"{dev.rail or 'rail'}{f' ({supply:g} V)' if supply is not None else ''}; on ground the "
                   "detector is dead",
                   coil.at("ends"), values, stage=_stage(build, coil.name, "discriminator"))
        return
    if nets.is_rail(far):
        return
    # A named node: find what feeds it with DC (a resistor to a rail, usually).
    feed = [
        (p, p.other_end(far))
        for p in nets.parts_on(far)
        if p is not coil and p.kind in ("resistor", "inductor")
    ]
    to_rail = [(p, n) for p, n in feed if nets.is_rail(n)]
    to_ground = [(p, n) for p, n in feed if nets.is_ground(n)]
    if to_rail:
        bypass = [
            p for p in nets.parts_on(far) if p.kind == "capacitor" and nets.is_ground(p.other_end(far) or "")
        ]
        if not bypass:
            part, rail = to_rail[0]
            ctx.report(
                f"{coil.name} returns {pin_net} to {rail} through {part.name}, but node {far} has no "
                "bypass capacitor to ground; supply noise reaches the detector",
                coil.at("ends"),
                values + [Value("series part", part.name)],
                level="note",
                fix="Add about 100 nF from the node between the coil and the resistor to ground.",
                stage=_stage(build, coil.name, "discriminator"),
            )
        return
    pot = nets.dc(far)
    if pot is not None and pot.origin == pin_net:
        pot = None  # the pin's own bias, seen back through the coil: says nothing about the return
    if to_ground or (pot is not None and abs(pot.volts) < DC_THRESHOLD):
        via = to_ground[0][0].name if to_ground else None
        ctx.report(
            f"{coil.name} returns {pin_net} to node {far}, which sits at 0 "
            f"V{f' through {via}' if via else ''}: the detector pin gets no bias from the supply "
            f"{dev.rail or ''}",
            coil.at("ends"),
            values,
            stage=_stage(build, coil.name, "discriminator"),
        )
        return
    if pot is None:
        ctx.report(
            f"{coil.name} returns {pin_net} to node {far}, which is tied to no rail; the detector pin "
            f"would have no bias",
            coil.at("ends"),
            values,
            level="warning",
            stage=_stage(build, coil.name, "discriminator"),
        )


# ---- DC across a crystal ----------------------------------------------------------------


@rule(
    "wiring.crystal-dc",
    level="error",
    title="DC standing across a crystal",
    explanation="""
      A quartz crystal is meant to carry only the oscillator's RF. When one end sits on a pin with
      a DC bias and the other end on a net at another DC potential (often ground), that DC stands
      across the crystal all the time it is powered. The quartz plate itself blocks DC, so the
      oscillator may well start on the first day; what fails is the crystal and the tuning. The
      steady field between the electrodes drives their metal across the plate (electromigration),
      so the frequency ages and the motional resistance rises until the oscillator stops; the
      load the pin sees is no longer the one the crystal was cut for, so the pulling the plan
      computes is not the one on the bench; and a holder that leaks a little (flux, moisture)
      pulls the pin's bias off, and the oscillator does not start at all. Application circuits
      avoid it by returning the crystal's far end to the same DC potential as the pin (often the
      bypassed supply rail) or by putting a blocking capacitor in series.

      An error when the DC across the crystal is above the threshold setting (default 0.1 V, a
      real bias rather than two nets at nearly the same potential).
      """,
    fix="Return the crystal's far end to the same potential as the pin (the bypassed supply rail), "
    "or put a series capacitor (about 1 nF) in line with it.",
    source="common practice (crystal oscillator application circuits: no DC across the crystal); "
    "electrode migration under DC: from memory",
    verify="With the board powered and no crystal fitted, measure the DC between the two crystal pads: "
    "it should be about 0 V. Fitted, the oscillator should start every time it is powered.",
    settings={"threshold": DC_THRESHOLD},
)
def crystal_dc(build, ctx):
    nets = build.nets
    least = ctx.setting("threshold")
    for part in build.parts.values():
        known = nets.across(part) if part.kind == "crystal" else None
        if known is None or known[4] <= least:
            continue
        a, pa, b, pb, across = known
        ctx.report(
            f"{part.name} has {across:.3g} V DC across it: {a} at {pa.volts:g} V ({pa.why}) and "
            f"{b} at {pb.volts:g} V ({pb.why}); no series capacitor blocks it",
            part.at("ends"),
            [_volts(a, pa), _volts(b, pb), Value("DC across crystal", across, "V")],
            stage=_stage(build, part.name, "conversion"),
        )


# ---- polarized capacitors ---------------------------------------------------------------

# build -> its speaker-line capacitors (three rules ask)
_SPEAKER_CAPS: weakref.WeakKeyDictionary[Any, Any] = weakref.WeakKeyDictionary()


def speaker_coupling_caps(build) -> dict:
    """Polarized capacitors in the speaker line -> (amplifier-side net, speaker-side net)."""
    if build in _SPEAKER_CAPS:
        return _SPEAKER_CAPS[build]
    found = _SPEAKER_CAPS[build] = {}
    nets = build.nets
    named = {s.coupling for s in build.stages("audio-amp") if s.coupling}
    for part in build.parts.values():
        if part.kind != "capacitor" or len(part.ends) != 2:
            continue
        for end in part.ends:
            other = part.other_end(end)
            toward_speaker = any(p.kind == "speaker" for p in nets.parts_on(other))
            pin = _pin_role(build, end)
            if (pin == "audio-out" and toward_speaker) or (part.name in named and pin == "audio-out"):
                found[part.name] = (end, other)
    return found


def _pin_role(build, net: str) -> str | None:
    from speccheck.nets import split_pin

    pin_of = split_pin(net)
    if pin_of is None:
        return None
    dev = build.device(pin_of[0])
    pin = dev.pin(pin_of[1]) if dev else None
    return pin.role if pin else None


@rule(
    "wiring.polarity-unstated",
    level="warning",
    title="Polarized capacitor with no polarity noted",
    explanation="""
      An electrolytic or tantalum capacitor works only one way round: its positive terminal must
      sit at the higher DC potential. Fitted backwards it leaks, heats and can vent or burst. The
      plan must say which net the positive end goes to, so that the builder (and this tool) can
      check it.
      """,
    fix="Add 'positive: NET' naming the net at the higher DC potential.",
    source="common practice (IEC 60384-4 marks the polarity of aluminium electrolytic capacitors)",
    verify="Before fitting, measure the DC on both pads with the board powered: the stripe (negative) side "
    "goes to the pad that reads lower.",
)
def polarity_unstated(build, ctx):
    speaker_caps = speaker_coupling_caps(build)
    nets = build.nets
    for part in build.parts.values():
        if not part.polarized or part.positive or part.name in speaker_caps or len(part.ends) != 2:
            continue
        a, b = part.ends
        pa, pb = nets.dc(a), nets.dc(b)
        values, hint = [], ""
        if pa and pb:
            values = [_volts(a, pa), _volts(b, pb)]
            if abs(pa.volts - pb.volts) > DC_THRESHOLD:
                high = a if pa.volts > pb.volts else b
                hint = (
                    f"; by the DC on its nets ({a} {pa.volts:g} V, {b} {pb.volts:g} V) it should be "
                    f"positive: {high}"
                )
        ctx.report(
            f"{part.name} is {part.dielectric} (polarized) but no positive end is noted{hint}",
            part.at("dielectric"),  # Located.at falls back to the part itself
            values,
            stage=_stage(build, part.name),
        )


@rule(
    "wiring.polarity-reversed",
    level="error",
    title="Polarized capacitor fitted backwards",
    explanation="""
      The net noted as this capacitor's positive end sits at a lower DC potential than its
      negative end. An electrolytic reverse-biased by more than a volt or so conducts, heats up
      and may vent; a tantalum can fail short and burn.
      """,
    fix="Swap the capacitor: its positive end goes to the net at the higher DC potential.",
    source="common practice (IEC 60384-4 marks the polarity of aluminium electrolytic capacitors)",
    verify="Power the board briefly and measure the DC from the capacitor's + lead to its - lead: it must "
    "read positive. A reversed part warms up; switch off at once if it does.",
)
def polarity_reversed(build, ctx):
    speaker_caps = speaker_coupling_caps(build)
    nets = build.nets
    for part in build.parts.values():
        if not part.polarized or not part.positive or part.name in speaker_caps:
            continue
        negative = part.other_end(part.positive)
        pp, pn = nets.dc(part.positive), nets.dc(negative)
        if pp is None or pn is None or pp.volts >= pn.volts - DC_THRESHOLD:
            continue
        ctx.report(
            f"{part.name} is reversed: its positive end is on {part.positive} at {pp.volts:g} V "
            f"({pp.why}) but its negative end is on {negative} at {pn.volts:g} V ({pn.why})",
            part.at("positive"),
            [
                _volts(f"+ end {part.positive}", pp),
                _volts(f"- end {negative}", pn),
                Value("reverse voltage", pn.volts - pp.volts, "V"),
            ],
            stage=_stage(build, part.name),
        )


@rule(
    "wiring.speaker-coupling",
    level="error",
    title="Speaker coupling capacitor orientation",
    explanation="""
      A single-supply audio amplifier's output sits at about half the supply, so the electrolytic
      that couples it to the speaker has several volts of DC across it: the amplifier side is
      positive, the speaker side (returned to ground through the voice coil) is at 0 V. The plan
      must say so. Reversed, the capacitor is reverse-biased by half the supply for as long as the
      set is on: it leaks, the speaker sees DC and clicks, and the capacitor fails.
      """,
    fix="Note 'positive: <amplifier output net>' and fit the capacitor with + toward the amplifier, "
    "- toward the speaker.",
    source="common practice (single-supply audio amplifier application circuits)",
    verify="With the speaker connected and no signal, measure the DC at the amplifier output (about half "
    "the supply) and at the speaker terminal (about 0 V); the capacitor's + lead is on the "
    "amplifier side. The speaker should give no click beyond a soft thump at switch-on.",
)
def speaker_coupling(build, ctx):
    nets = build.nets
    for ref, (amp_net, speaker_net) in speaker_coupling_caps(build).items():
        part = build.parts[ref]
        pa, ps = nets.dc(amp_net), nets.dc(speaker_net)
        values = [
            v for v in (_volts(amp_net, pa) if pa else None, _volts(speaker_net, ps) if ps else None) if v
        ]
        stage = _stage(build, ref, "audio-amp")
        if not part.polarized:
            continue
        if not part.positive:
            ctx.report(
                f"{ref} couples {amp_net} to the speaker with no polarity noted: the amplifier side "
                f"sits at {pa.volts:g} V ({pa.why})"
                if pa
                else f"{ref} couples {amp_net} to the speaker with no polarity noted",
                part.at("dielectric"),
                values,
                level="warning",
                stage=stage,
                fix=f"Add 'positive: {amp_net}': + toward the amplifier, - toward the speaker.",
            )
        elif part.positive == speaker_net:
            ctx.report(
                f"{ref} is reversed: positive toward the speaker "
                f"({speaker_net}{f', {ps.volts:g} V' if ps else ''}) while the amplifier side "
                f"{amp_net} sits at {pa.volts:g} V"
                if pa
                else f"{ref} is reversed: positive toward the speaker",
                part.at("positive"),
                values,
                stage=stage,
                fix=f"Set 'positive: {amp_net}' and fit + toward the amplifier.",
            )


# ---- voltage rating ---------------------------------------------------------------------


@rule(
    "wiring.cap-voltage",
    level="error",
    title="Capacitor voltage rating against the voltage across it",
    explanation="""
      The DC across a capacitor (the difference of the DC potentials of its two nets) plus any
      AC peak on top must stay below its rated voltage with a margin. Common practice runs
      aluminium electrolytics and film parts at no more than 80 % of their rating and tantalum
      parts at no more than 50 %, because the rating is a limit, not a working point, and
      life falls fast near it. Above the rating itself the part breaks down.
      """,
    fix="Choose a part rated well above the working voltage (the next series value above "
    "working voltage / derating share).",
    source="derating shares: common practice",
    verify="Measure the DC across the capacitor in circuit at the highest supply voltage you will use, and "
    "compare it with the rating printed on the part: keep it under the derating share.",
    settings={"derating": 0.8, "tantalum_derating": 0.5},
)
def cap_voltage(build, ctx):
    nets = build.nets
    for part in build.parts.values():
        known = nets.across(part) if part.kind == "capacitor" else None
        if known is None:
            continue
        a, pa, b, pb, dc = known
        peak = part.ac_peak.si if part.ac_peak else 0.0
        working = dc + peak
        if part.voltage_rating is None:
            if part.polarized and working > DC_THRESHOLD:
                ctx.report(
                    f"{part.name} ({part.dielectric}) has {working:.3g} V across it but no "
                    "voltage_rating is stated",
                    part.loc,
                    [_volts(a, pa), _volts(b, pb)],
                    level="note",
                    stage=_stage(build, part.name),
                    fix="State 'voltage_rating:' from the part you will fit.",
                )
            continue
        rating = part.voltage_rating.si
        share = ctx.setting("tantalum_derating") if part.dielectric == "tantalum" else ctx.setting("derating")
        allowed = rating * share
        values = [_volts(a, pa), _volts(b, pb), Value("DC across", dc, "V")]
        if peak:
            values.append(Value("AC peak", peak, "V"))
        values += [Value("rating", rating, "V"), Value(f"allowed at {share:.0%}", allowed, "V")]
        if working > rating:
            ctx.report(
                f"{part.name} sees {working:.3g} V but is rated {part.voltage_rating.text}: "
                f"{a} {pa.volts:g} V, {b} {pb.volts:g} V",
                part.at("voltage_rating"),
                values,
                stage=_stage(build, part.name),
            )
        elif working > allowed:
            ctx.report(
                f"{part.name} sees {working:.3g} V, {working / rating:.0%} of its "
                f"{part.voltage_rating.text} rating (keep under {share:.0%}): {a} {pa.volts:g} V, "
                f"{b} {pb.volts:g} V",
                part.at("voltage_rating"),
                values,
                level="warning",
                stage=_stage(build, part.name),
            )
