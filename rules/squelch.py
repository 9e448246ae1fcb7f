"""squelch: the threshold network of a squelch stage (format v2).

A v2 squelch stage names its threshold pot (`control`), the device pin it sets (`pin`), and
optionally a series resistor from the wiper and a shunt resistor from the pin to ground. The
pot's track ends take their DC from the nets they sit on (speccheck/nets.py); the wiper spans
the range between them, and a series/shunt divider scales it: V_pin = V_wiper * R_sh / (R_se + R_sh)
(the pin itself taken as a high impedance; at the track's ends the wiper's own source resistance
is zero, so the extremes are exact).
"""

from __future__ import annotations

from speccheck.findings import Value
from speccheck.nets import split_pin
from speccheck.registry import rule
from speccheck.units import fmt

PIN_MARGIN = 0.3  # V beyond the supply rails an input pin takes (common practice for absolute ratings)


def _value(part):
    return part.value.si if part is not None and part.value is not None else None


def network(build, stage):
    """(pin, device, (low, high) V at the pin, how it was found) or None when it cannot be computed."""
    pot = build.part(stage.control)
    if pot is None or not stage.pin:
        return None
    span = build.nets.span(pot.wiper) if pot.wiper else None
    if span is None:
        return None
    lo, hi = span
    series, shunt = build.part(stage.series), build.part(stage.shunt)
    how = f"{pot.name}'s wiper spans {fmt(lo, 'V')} to {fmt(hi, 'V')}"
    r_se, r_sh = _value(series) or 0.0, _value(shunt)
    if r_sh is not None:
        k = r_sh / (r_se + r_sh)
        lo, hi = lo * k, hi * k
        how += f", divided by {series.name if series else 'the wiper'} and {shunt.name} to {k:.3g}"
    pin_of = split_pin(stage.pin)
    dev = build.device(pin_of[0]) if pin_of else None
    pin = dev.pin(pin_of[1]) if dev is not None and pin_of else None
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
      source="voltage divider V = V_in R2 / (R1 + R2); threshold range from the device profile",
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
        if found is None or found[1] is None:
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
                f"it takes ({dev.name} runs on {dev.rail})",
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
