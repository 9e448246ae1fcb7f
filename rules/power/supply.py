"""power: the current budget against the supply, and each device's supply range."""

from __future__ import annotations

from speccheck.budget import budget, rail_volts, regulator_outputs
from speccheck.findings import Value
from speccheck.registry import rule
from speccheck.units import fmt


@rule("power.current-budget",
      verify="""
      Measure the supply current with a meter in series: idle, then with a tone at full volume into the
      speaker.
      """,
      level="error",
      title="Current budget of each rail and of the supply input",
      explanation="""
      The current each rail must deliver is the sum of what hangs on it: the quiescent (no
      signal) current of every device from its profile, plus the audio amplifier's supply
      current at full output into its load, plus whatever the regulators on it deliver to the
      rails they make (and their own ground current). The amplifier dominates: a class-B/AB
      stage drawing a sine of peak I_p = V_peak/R_L through one output device takes an
      average of I_p/π from the supply (a bridge-tied load, 2·I_p/π). The supply input must
      carry the total. A supply that cannot deliver it sags or shuts down at high volume; one
      that runs near its limit runs hot. The budget also sizes the fuse.
      """,
      fix="Choose a supply rated above the budget with some headroom (or lower the amplifier's supply or "
          "raise its load impedance); state each regulator's load_current at least at what its rail draws.",
      source="class-B supply current: Boylestad & Nashelsky, Electronic Devices and Circuit Theory, §12 "
             "(P_i = V_CC·(2/π)·I_p); headroom share: common practice",
      settings={"headroom_share": 0.8})
def current_budget(build, ctx):
    b = budget(build)
    for rail, items in b.items.items():
        if not items:
            continue
        for owner, what, amps in items:
            ctx.publish("power", rail, f"{owner} {what}", amps, "A")
        ctx.publish("power", rail, "rail current budget", b.totals[rail], "A")
    for name in b.unknown_amps:
        ctx.publish("power", name, "full-output supply current", "not known (see power.heat)")
    if b.input is not None:  # an input current needs rails, so the totals are there too
        ctx.publish("power", "supply", "input current budget", b.input, "A")
    if b.position:  # switch positions change what draws current: the budget is the worst one's
        ctx.publish("power", "supply", "worst switch position", b.position)
        for where, amps in b.by_position.items():
            ctx.publish("power", "supply", f"input current budget with {where}", amps or 0.0, "A")
    for dev in b.no_rail:
        ctx.report(f"{dev.name} names no supply rail (devices.{dev.name}.rail); it is left out of the "
                   "current budget", dev.loc, level="note", stage="power")
    for prof_name, devs in b.no_quiescent.items():
        prof = build.profiles.get(prof_name)
        ctx.report(f"profile {prof_name} states no quiescent_current "
                   f"(profiles.{prof_name}.quiescent_current); {', '.join(devs)} counted at 0 A in the "
                   "budget", prof.loc if prof else build.loc,
                   level="note", stage="power")
    for name, (_amps, computed) in b.delivered.items():
        dev = build.devices[name]
        if dev.load_current is not None and computed > dev.load_current.si * (1 + 1e-9):
            outs = ", ".join(regulator_outputs(build, dev))
            ctx.report(
                f"{name} is stated to deliver {dev.load_current.text} but {outs} draws "
                f"{fmt(computed, 'A')}; the budget counts {fmt(computed, 'A')}",
                dev.at("load_current"),
                [
                    Value("stated load_current", dev.load_current.si, "A"),
                    Value(f"{outs} draws", computed, "A"),
                ],
                level="warning",
                stage="power",
            )
    supply = build.supply
    if supply is None or supply.max_current is None or b.input is None:
        return
    limit, share = supply.max_current.si, ctx.setting("headroom_share")
    values = [Value("input current budget", b.input, "A"), Value("supply max_current", limit, "A")]
    if b.input > limit:
        ctx.report(
            f"the build draws {fmt(b.input, 'A')} at full output{b.in_position} but the {supply.kind} supply "
            f"delivers at most {supply.max_current.text}",
            supply.at("max_current"),
            values,
            stage="power",
        )
    elif b.input > share * limit:
        ctx.report(
            f"the build draws {fmt(b.input, 'A')} at full output{b.in_position}, "
            f"{b.input / limit:.0%} of the {supply.max_current.text} the supply delivers "
            f"(keep under {share:.0%})",
            supply.at("max_current"),
            values,
            level="warning",
            stage="power",
        )


@rule(
    "power.device-supply",
    verify="""
      Measure the voltage between the device's supply and ground pins with the build running.
      """,
    level="error",
    title="Device supply voltage inside its profile's range",
    explanation="""
      Every device profile states the supply range the part is made for. Above supply_max the
      part is overstressed (and an amplifier dissipates more than its package was sized for);
      below supply_min it does not work properly: an IF chip loses limiting, an amplifier clips
      early. For a split-supply amplifier the span from the negative to the positive rail is
      compared.
      """,
    fix="Power the device from a rail inside its range, or declare the profile of a part made for this "
    "supply.",
    source="the device profile (your datasheet's values)",
)
def device_supply(build, ctx):
    for dev in build.devices.values():
        prof = dev.profile
        if prof is None or (prof.supply_max is None and prof.supply_min is None):
            continue
        top = rail_volts(build, dev.rail)
        if top is None:
            continue
        bottom = rail_volts(build, dev.negative_rail) if dev.negative_rail else 0.0
        if bottom is None:
            continue
        span = abs(top - bottom)
        what = (
            f"{dev.rail} ({fmt(top, 'V')})"
            if not dev.negative_rail
            else f"{dev.rail} to {dev.negative_rail} ({fmt(span, 'V')} across it)"
        )
        values = [Value("supply across the device", span, "V")]
        if prof.supply_max is not None and span > prof.supply_max.si * (1 + 1e-9):
            ctx.report(
                f"{dev.name} runs from {what}, above the {prof.supply_max.text} supply_max of "
                f"profile {prof.name}",
                dev.at("rail"),
                values + [Value("supply_max", prof.supply_max.si, "V")],
                stage="power",
            )
        elif prof.supply_min is not None and span < prof.supply_min.si * (1 - 1e-9):
            ctx.report(
                f"{dev.name} runs from {what}, below the {prof.supply_min.text} supply_min of "
                f"profile {prof.name}",
                dev.at("rail"),
                values + [Value("supply_min", prof.supply_min.si, "V")],
                level="warning",
                stage="power",
            )
