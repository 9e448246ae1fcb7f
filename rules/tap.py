"""tap: outputs taken off the signal chain (format v2), and what they cost the main path.

A tap (a flat detector output for a data decoder, before any filtering) loads the net it is
taken from. With the source pin's output resistance Z, the main path's input resistance R_m
and the tap's series resistor plus load R_t, the net's level falls from R_m / (R_m + Z) to
(R_m || R_t) / (R_m || R_t + Z) of the open-circuit level (voltage divider).
"""

from __future__ import annotations

import math

from speccheck.findings import Value
from speccheck.nets import split_pin
from speccheck.registry import rule
from speccheck.units import fmt


def parallel(*ohms: float) -> float:
    return 1.0 / sum(1.0 / r for r in ohms)


def divider_db(load: float, source: float) -> float:
    """20 log10(R_load / (R_load + R_source)): the level a resistive load keeps of an open-circuit source."""
    return 20 * math.log10(load / (load + source))


def main_path_input(build, tap) -> tuple[float | None, list]:
    """The resistors the chain takes its signal through from the tap's net, in parallel."""
    found = [p for p in build.nets.parts_on(tap.net)
             if p.kind in ("resistor", "potentiometer") and p.name != tap.series and p.value is not None]
    return (parallel(*(p.value.si for p in found)) if found else None), found


def source_resistance(build, net: str):
    pin_of = split_pin(net)
    if pin_of is None:
        return None
    dev = build.device(pin_of[0])
    pin = dev.pin(pin_of[1]) if dev is not None else None
    return pin.output_impedance if pin is not None else None


@rule("tap.loading", level="warning",
      title="A tap's load against the source it shares with the main path",
      explanation="""
      A tap takes the signal from a net the main path also uses; the tap's load (its series
      resistor plus the input resistance of what it feeds) sits in parallel with the main path's
      input, and both are fed through the source pin's output resistance. A heavy tap lowers the
      level the main path gets (and the audio the speaker gives). The design sheet shows what the
      tap costs the main path and the level the tap delivers; more than the setting max_loss
      (default 1 dB) lost from the main path is a warning.
      """,
      fix="Raise the tap's series resistor, or buffer the tap (an emitter or op-amp follower) so it draws "
          "no signal from the main path.",
      source="voltage divider V_out/V_in = R_load / (R_load + R_source)",
      verify="Measure the audio level at the tap's source net with the tap's load connected and "
             "disconnected.",
      settings={"max_loss": 1.0})
def loading(build, ctx):
    for i, tap in enumerate(build.taps):
        z = source_resistance(build, tap.net)
        series = build.part(tap.series)
        if z is None or tap.load is None:
            what = (
                f"taps[{i}].load"
                if tap.load is None
                else f"the output_impedance of {tap.net} (its profile pin)"
            )
            ctx.report(
                f"tap {tap.name}: {what} is not given, so what the tap costs the main path cannot be "
                "computed",
                tap.loc,
                level="note",
                stage="tap",
                fix=f"Give {what}.",
            )
            continue
        r_tap = tap.load.si + (series.value.si if series is not None and series.value is not None else 0.0)
        r_main, parts = main_path_input(build, tap)
        delivered = divider_db(parallel(r_tap, r_main) if r_main else r_tap, z.si) + divider_db(
            tap.load.si, r_tap - tap.load.si
        )
        ctx.publish("tap", tap.name, "tap load (series + input)", r_tap, "Ω")
        ctx.publish("tap", tap.name, "level at the tap's load, from the open source", delivered, "dB")
        if r_main is None:
            continue
        before = divider_db(r_main, z.si)
        after = divider_db(parallel(r_tap, r_main), z.si)
        cost = before - after
        ctx.publish("tap", tap.name, "main path input at the net", r_main, "Ω")
        ctx.publish("tap", tap.name, "level the tap costs the main path", cost, "dB")
        if cost > ctx.setting("max_loss"):
            names = ", ".join(p.name for p in parts)
            ctx.report(
                f"tap {tap.name} loads {tap.net} with {fmt(r_tap, 'Ω')} beside the main path's "
                f"{fmt(r_main, 'Ω')} ({names}), through the pin's {z.text}: the main path loses "
                f"{cost:.2g} dB",
                tap.at("load"),
                [
                    Value("tap load", r_tap, "Ω"),
                    Value("main path input", r_main, "Ω"),
                    Value("source resistance", z.si, "Ω"),
                    Value("main path loss", cost, "dB"),
                ],
                stage="tap",
            )
