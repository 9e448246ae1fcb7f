"""squelch: the threshold network of a squelch stage (format v2).

A v2 squelch stage names its threshold pot (`control`), the device pin it sets (`pin`), and
optionally a series resistor from the wiper, a shunt resistor from the pin to ground and a
hysteresis resistor from the pin back to a switching output. The pot's track ends take their DC
from the nets they sit on (speccheck/nets.py); the wiper spans the range between them, and the
network scales it: V_pin = sum(V_i / R_i) / sum(1 / R_i) over the wiper (through the series
resistor), ground (through the shunt) and the output (through the hysteresis resistor, at its low
and its high level), speccheck/formulas/dividers.py. The pin itself is taken as a high
impedance; at the track's ends the wiper's own source resistance is zero, so the extremes are
exact; in between the wiper is a Thevenin source behind x(1 - x) of the track.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from speccheck.findings import Value
from speccheck.formulas.dividers import feedback_thresholds, feedback_width, wiper_fraction_for, wiper_source
from speccheck.nets import split_pin
from speccheck.registry import rule
from speccheck.units import fmt

PIN_MARGIN = 0.3  # V beyond the supply rails an input pin takes (common practice for absolute ratings)


def _value(part):
    return part.value.si if part is not None and part.value is not None else None


def _device_pin(build, net: str) -> tuple:
    """(device, pin) a net names as DEVICE.PIN; (None, None) for a plain net."""
    pin_of = split_pin(net)
    if pin_of is None:
        return None, None
    dev = build.device(pin_of[0])
    return dev, (dev.pin(pin_of[1]) if dev is not None else None)


@dataclass
class Feedback:
    """The hysteresis resistor of a squelch stage and the levels of the net it returns to."""

    part: Any
    net: str | None  # the end away from the pin; None when the resistor does not touch the pin
    levels: tuple | None  # (low, high) V of that net; equal when it does not switch; None: not known
    why: str = ""  # how the levels were found

    @property
    def usable(self) -> bool:
        return self.net is not None and self.levels is not None and _value(self.part) is not None


def feedback(build, stage) -> Feedback | None:
    """What the stage's hysteresis resistor is tied to, read from its own ends."""
    part = build.part(stage.hysteresis)
    if part is None or not stage.pin:
        return None
    net = part.other_end(stage.pin)
    if net is None:
        return Feedback(part, None, None)
    dev, pin = _device_pin(build, net)
    stated_levels = pin is not None and (pin.output_low is not None or pin.output_high is not None)
    if stated_levels:
        supply = build.nets.rail_voltage(dev.rail)
        low = pin.output_low.si if pin.output_low is not None else 0.0
        high = pin.output_high.si if pin.output_high is not None else supply
        if high is None:
            return Feedback(part, net, None, f"{net} states no output_high and {dev.name} no supply rail")
        return Feedback(
            part, net, (low, high), f"{net} switches between {fmt(low, 'V')} and {fmt(high, 'V')}"
        )
    stated = build.nets.stated(net)
    if stated is not None:
        return Feedback(part, net, (stated.volts, stated.volts), stated.why)
    if pin is not None:  # a pin of a device (the loader has made sure both exist)
        supply = build.nets.rail_voltage(dev.rail)
        if supply is not None:  # common practice: a switching output swings from ground to its supply
            return Feedback(
                part,
                net,
                (0.0, supply),
                f"{net} taken to switch between ground and {dev.name}'s {fmt(supply, 'V')} supply "
                "(its profile gives no output_low/output_high)",
            )
    return Feedback(part, net, None, f"the levels of {net} are not known")


def network(build, stage):
    """(pin, device, (low, high) V at the pin, how it was found) or None when it cannot be computed."""
    pot = build.part(stage.control)
    if pot is None or not stage.pin:
        return None
    span = build.nets.span(pot.wiper)
    if span is None:
        return None
    lo, hi = span
    series, shunt = build.part(stage.series), build.part(stage.shunt)
    how = f"{pot.name}'s wiper spans {fmt(lo, 'V')} to {fmt(hi, 'V')}"
    r_se, r_sh = _value(series) or 0.0, _value(shunt)
    fb = feedback(build, stage)
    if fb is not None and fb.usable:
        # the hysteresis resistor loads the pin: lowest with the output low, highest with it high
        assert fb.levels is not None  # usable: the levels are known
        r_f, (out_lo, out_hi) = _value(fb.part), fb.levels
        lo = feedback_thresholds(lo, r_se, r_sh, r_f, out_lo, out_hi)[0]
        hi = feedback_thresholds(hi, r_se, r_sh, r_f, out_lo, out_hi)[1]
        through = f" through {series.name}" if series else ""
        ground = f", {shunt.name} to ground" if shunt else ""
        how += f"{through}{ground} and {fb.part.name} to {fb.net} ({fmt(out_lo, 'V')} / {fmt(out_hi, 'V')})"
    elif r_sh is not None:
        k = r_sh / (r_se + r_sh)
        lo, hi = lo * k, hi * k
        how += f", divided by {series.name if series else 'the wiper'} and {shunt.name} to {k:.3g}"
    dev, pin = _device_pin(build, stage.pin)
    return pin, dev, (lo, hi), how


@rule("squelch.threshold-range", level="warning",
      title="Squelch control range against the device's threshold range",
      explanation="""
      A noise squelch opens when the noise it measures crosses a threshold that the squelch pin's
      DC voltage sets; the device's data gives the range of pin voltage over which the squelch
      goes from always open to always closed. The threshold pot, through its series and shunt
      resistors, must sweep the pin across that whole range: if its whole travel lies outside it,
      the squelch can never be set (always open, or always muted) and the build fails on the
      bench: an error. If it covers only part, the knob cannot reach one end of the useful range:
      a warning.
      """,
      fix="Change the resistors around the pot (or the rail it sits on) so the pin's voltage sweeps the "
          "device's threshold range with a little to spare at each end.",
      source="voltage divider V = V_in R2 / (R1 + R2), with a hysteresis resistor superposition over the "
             "divider (speccheck/formulas/dividers.py); threshold range from the device profile",
      verify="Turn the squelch knob end to end with no signal and measure the pin's DC: it must pass "
             "through the point where the audio mutes.")
def threshold_range(build, ctx):
    for stage in build.stages("squelch"):
        if not stage.control:
            continue
        found = network(build, stage)
        if found is None:
            ctx.report(f"{stage.label}: the DC at the ends of {stage.control}'s track is not known, or the "
                       "pin is not named, so the squelch threshold range cannot be checked",
                       stage.at("control"), level="note",
                       stage=stage.label, fix="Put the pot's ends on rails or declared nodes and name the "
                                              "pin.")
            continue
        pin, _dev, (lo, hi), how = found
        ctx.publish("squelch", stage.pin, "lowest voltage at the pin", lo, "V")
        ctx.publish("squelch", stage.pin, "highest voltage at the pin", hi, "V")
        if pin is None or pin.threshold_min is None or pin.threshold_max is None:
            ctx.report(f"{stage.pin} has no threshold range in its profile (threshold_min, threshold_max), "
                       f"so the squelch control's range ({fmt(lo, 'V')} to {fmt(hi, 'V')}) cannot be "
                       "checked against it",
                       stage.at("pin"), level="note", stage=stage.label,
                       fix="Give the pin's threshold_min and threshold_max in the device profile.")
            continue
        t_lo, t_hi = pin.threshold_min.si, pin.threshold_max.si
        values = [
            Value("pin lowest", lo, "V"),
            Value("pin highest", hi, "V"),
            Value("threshold_min", t_lo, "V"),
            Value("threshold_max", t_hi, "V"),
        ]
        if hi < t_lo or lo > t_hi:
            ctx.report(
                f"the squelch control never reaches the threshold of {stage.pin}: {how}, so the pin "
                f"sees {fmt(lo, 'V')} to {fmt(hi, 'V')}, outside the {fmt(t_lo, 'V')} to "
                f"{fmt(t_hi, 'V')} the squelch switches over: it can never be set",
                stage.at("control"),
                values,
                level="error",
                stage=stage.label,
            )
        elif lo > t_lo or hi < t_hi:
            ctx.report(
                f"the squelch control covers only part of the threshold range of {stage.pin}: {how}, "
                f"so the pin sees {fmt(lo, 'V')} to {fmt(hi, 'V')} of the {fmt(t_lo, 'V')} to "
                f"{fmt(t_hi, 'V')} needed",
                stage.at("control"),
                values,
                stage=stage.label,
            )


@rule(
    "squelch.pin-voltage",
    level="error",
    title="Squelch pin driven outside its allowed voltage",
    explanation="""
      An IC input must stay within its supply rails, give or take a few tenths of a volt (its
      absolute maximum ratings; the profile's v_min and v_max where given, else ground - 0.3 V
      to its supply + 0.3 V, common practice). A squelch pot on a higher rail than the chip
      (the 12 V input of a build whose IF chip runs on 6 V) can drive the pin far above the chip's
      supply: the input's protection diodes conduct, the squelch misbehaves, and the chip can be
      damaged. Put the pot on the chip's own rail, or divide it down.
      """,
    fix="Feed the pot from the chip's own supply rail, or add a shunt resistor from the pin to ground so "
    "the divider keeps the pin inside the chip's supply.",
    source="common practice: input pins within the supply rails ± 0.3 V (absolute maximum ratings)",
    verify="Turn the squelch knob fully towards the supply end and measure the pin's DC against the chip's "
    "supply pin.",
)
def pin_voltage(build, ctx):
    for stage in build.stages("squelch"):
        if not stage.control:
            continue
        found = network(build, stage)
        if found is None:  # the loader has made sure the pin's device exists
            continue
        pin, dev, (lo, hi), how = found
        supply = build.nets.rail_voltage(dev.rail)
        v_max = (
            pin.v_max.si
            if pin is not None and pin.v_max is not None
            else (supply + PIN_MARGIN if supply is not None else None)
        )
        v_min = pin.v_min.si if pin is not None and pin.v_min is not None else -PIN_MARGIN
        if v_max is not None and hi > v_max:
            ctx.report(
                f"{stage.pin} can be driven to {fmt(hi, 'V')} ({how}), above the {fmt(v_max, 'V')} "
                f"it takes" + (f" ({dev.name} runs on {dev.rail})" if dev.rail else ""),
                stage.at("control"),
                [Value("pin highest", hi, "V"), Value("allowed", v_max, "V")],
                stage=stage.label,
            )
        if lo < v_min:
            ctx.report(
                f"{stage.pin} can be driven to {fmt(lo, 'V')} ({how}), below the {fmt(v_min, 'V')} it takes",
                stage.at("control"),
                [Value("pin lowest", lo, "V"), Value("allowed", v_min, "V")],
                stage=stage.label,
            )


@rule(
    "squelch.hysteresis",
    level="warning",
    title="Squelch hysteresis from the feedback resistor",
    explanation="""
      A squelch with no hysteresis chatters on a weak or fading carrier: the noise the squelch
      measures fluctuates around the threshold, and the audio is switched on and off many times a
      second. A resistor from the pin back to a switching output (the squelch status or mute
      output) moves the threshold when the squelch switches, so it takes a larger change of noise
      to switch it back. The threshold node is a divider fed by the pot's wiper (through the
      series resistor), ground (through the shunt) and the output (through the hysteresis
      resistor); by superposition the threshold moves by the output's swing x R_p / (R_p + R_h),
      R_p being the wiper side and the shunt in parallel. With the wiper at an end of its track
      only the series resistor is behind it; in mid-track the track adds a quarter of its value,
      so the width grows towards the middle of the knob's travel.
      A resistor returned to a net that does not switch gives no hysteresis at all (a warning: the
      plan means some). A width under a small share of the pin's threshold range (setting
      least_share, default 0.05, common practice) is a note: it will not hold a noisy carrier.
      A width larger than the whole threshold range is a warning: wherever the knob puts one
      threshold inside the range, the other lies outside it, so once the squelch has switched it
      does not switch back. The output must move the pin the way that holds the new state (positive
      feedback); the plan cannot show which way the device's output moves: check its data.
      """,
    fix="Choose the hysteresis resistor so the threshold moves by a tenth to a third of the pin's threshold "
    "range: a smaller resistor for more, a larger one for less; return it to the device's switching output.",
    source="superposition (Millman's theorem) over the divider; a pot's wiper as a Thevenin source x(1 - x)R "
    "(Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 1 and ch. 4, hysteresis by positive feedback); "
    "least_share: common practice",
    verify="With no signal, set the knob just where the audio mutes, then feed a weak carrier and raise it "
    "slowly until the squelch opens and lower it until it closes: the two levels must differ.",
    settings={"least_share": 0.05},
)
def hysteresis(build, ctx):
    for stage in build.stages("squelch"):
        fb = feedback(build, stage)
        if fb is None:
            continue
        where = stage.at("hysteresis")
        if fb.net is None:
            ctx.report(
                f"{stage.label}: the hysteresis resistor {fb.part.name} does not touch {stage.pin}, so it "
                "cannot move the threshold",
                where,
                stage=stage.label,
                fix=f"Connect one end of {fb.part.name} to {stage.pin} and the other to the device's "
                "switching output.",
            )
            continue
        if not fb.usable:
            why = fb.why if fb.levels is None else f"{fb.part.name} has no value"
            ctx.report(
                f"{stage.label}: {why}, so the hysteresis {fb.part.name} gives cannot be computed",
                where,
                level="note",
                stage=stage.label,
                fix="Return the resistor to a device pin, and give the pin's output_low and output_high "
                "in its profile.",
            )
            continue
        _judge_hysteresis(build, ctx, stage, fb)


def _set_point(pin, span, track, r_se, r_sh, r_f, out_lo):
    """(knob fraction, where it is) for the thresholds on the sheet: the setting that puts the
    threshold (output low) at the middle of the pin's threshold range, else mid-track."""
    if pin is not None and pin.threshold_min is not None and pin.threshold_max is not None:
        middle = (pin.threshold_min.si + pin.threshold_max.si) / 2
        x = wiper_fraction_for(middle, span[0], span[1], track, r_se, r_sh, r_f, out_lo)
        if x is not None:
            return x, "knob set mid-range"
    return 0.5, "knob mid-track"


def _judge_hysteresis(build, ctx, stage, fb: Feedback) -> None:
    pot = build.part(stage.control)
    span = build.nets.span(pot.wiper) if pot is not None else None
    r_se, r_sh, r_f = (
        _value(build.part(stage.series)) or 0.0,
        _value(build.part(stage.shunt)),
        _value(fb.part),
    )
    if fb.levels is None:
        return
    out_lo, out_hi = fb.levels
    swing = out_hi - out_lo
    track = _value(pot)
    pin = _device_pin(build, stage.pin)[1]
    at_ends = feedback_width(r_se, r_sh, r_f, swing)
    widest = feedback_width(r_se + track / 4, r_sh, r_f, swing) if track is not None else at_ends
    owner = stage.pin
    ctx.publish(
        "squelch", owner, "hysteresis returns to", f"{fb.net} ({fmt(out_lo, 'V')} / {fmt(out_hi, 'V')})"
    )
    ctx.publish("squelch", owner, "hysteresis width, knob at an end", at_ends, "V")
    ctx.publish("squelch", owner, "hysteresis width, knob mid-track", widest, "V")
    if span is not None and track is not None:
        x, setting = _set_point(pin, span, track, r_se, r_sh, r_f, out_lo)
        v_w, r_w = wiper_source(span[0], span[1], track, x)
        low, high = feedback_thresholds(v_w, r_w + r_se, r_sh, r_f, out_lo, out_hi)
        ctx.publish("squelch", owner, f"threshold with the output low, {setting}", low, "V")
        ctx.publish("squelch", owner, f"threshold with the output high, {setting}", high, "V")
    values = [
        Value("width, knob at an end", at_ends, "V"),
        Value("width, knob mid-track", widest, "V"),
        Value("output swing", swing, "V"),
    ]
    if abs(swing) < 1e-9:
        ctx.report(
            f"{stage.label}: the hysteresis resistor {fb.part.name} returns to {fb.net}, which does not "
            f"switch ({fb.why}): the threshold never moves, so the squelch has no hysteresis and "
            "chatters on a carrier near its threshold",
            stage.at("hysteresis"),
            values,
            stage=stage.label,
        )
        return
    if pin is None or pin.threshold_min is None or pin.threshold_max is None:
        return
    width = pin.threshold_max.si - pin.threshold_min.si
    values.append(Value("threshold range", width, "V"))
    share = ctx.setting("least_share")
    move = f"{fb.part.name} moves the threshold of {stage.pin} by"
    if widest < share * width:
        ctx.report(
            f"{stage.label}: {move} at most {fmt(widest, 'V')} when {fb.net} switches "
            f"({fb.why}), {widest / width:.1%} of the {fmt(width, 'V')} threshold range: the noise of a "
            "weak carrier near the threshold swings by more than that, so the squelch will still chatter",
            stage.at("hysteresis"),
            values,
            level="note",
            stage=stage.label,
        )
    elif at_ends > width:
        ctx.report(
            f"{stage.label}: {move} {fmt(at_ends, 'V')} or more when {fb.net} switches ({fb.why}), "
            f"more than the whole {fmt(width, 'V')} range it switches over: wherever the knob puts one "
            "threshold inside the range the other lies outside it, so once the squelch has switched it "
            "does not switch back",
            stage.at("hysteresis"),
            values,
            stage=stage.label,
        )
