"""What the plan's own supply pushes: into a short (a resistor used as the fuse) and into the bulk
capacitors at switch-on (the inrush). Read by power/fuses.py; the arithmetic is in
speccheck/formulas/fuses.py and speccheck/formulas/battery.py."""

from __future__ import annotations

from dataclasses import dataclass

from speccheck.units import fmt

from ..battery import cell_count, internal_resistance


def short_current(build, volts: float, ohms: float) -> tuple:
    """(amperes, how) the plan's own supply pushes through `ohms` into a short: V/(R + R_source),
    no more than a current-limited supply's max_current."""
    supply = build.supply
    battery = battery_resistance(build, volts) if supply.kind == "battery" else None
    if supply.source_resistance is not None:
        r_src, how = supply.source_resistance.si, f"through the supply's {supply.source_resistance.text}"
    elif battery is not None:
        r_src, how = battery[0], f"through {battery[1]}"
    else:
        r_src, how = 0.0, "from a stiff supply"
    amps = volts / (ohms + r_src)
    limited = supply.kind in ("dc-adapter", "bench") and supply.max_current is not None
    if limited and supply.max_current.si < amps:
        amps, how = supply.max_current.si, f"limited to {supply.max_current.text} by the {supply.kind} supply"
    return amps, how


def battery_resistance(build, volts: float) -> tuple[float, str] | None:
    """(ohms, how) of a battery supply's internal resistance from the plan: battery.internal_resistance,
    else V / its short-circuit max_current, else its chemistry's typical figure per cell (from
    memory); None when the plan says nothing of it."""
    supply = build.supply
    found = internal_resistance(build)
    if found is not None and not found[1]:
        return found[0], f"the battery's stated internal resistance {fmt(found[0], 'Ω')}"
    short = supply.max_current
    if short is not None and short.si > 0:
        return volts / short.si, (f"the battery's {fmt(volts / short.si, 'Ω')} internal resistance from its "
                                  f"{short.text} short-circuit current")
    if found is not None:
        return found[0], (f"the typical {fmt(found[0], 'Ω')} of {cell_count(build)} fresh "
                          f"{supply.battery.chemistry} cells, from memory: state battery.internal_resistance "
                          "for yours")
    return None


@dataclass(frozen=True)
class Source:
    ohms: float  # the source's own resistance (before any series part of the plan)
    how: str  # where that figure comes from, for the finding and the sheet
    stated: bool  # False where nothing in the plan gives it and the rule's assumption stands
    limit: float | None  # A: a bench supply's current limit, which caps the inrush peak


def inrush_source(build, volts: float, assumed: float) -> Source:
    """The resistance (and current limit) behind the bulk capacitors at switch-on, from the plan:
    supply.source_resistance wherever it is stated; for a battery its internal resistance
    (battery.internal_resistance, else its short-circuit max_current as V / I_sc, else the
    chemistry's typical figure per cell); for a bench supply its current limit caps the peak.
    An adapter's max_current is its rating, not a limit at switch-on (its own output capacitor
    delivers the surge), so only a stated source_resistance counts there. Where nothing is
    stated, the rule's assumed loop resistance stands, and `how` says so."""
    supply = build.supply
    limit = supply.max_current.si if supply.kind == "bench" and supply.max_current is not None else None
    if supply.source_resistance is not None:
        stated = supply.source_resistance
        return Source(stated.si, f"supply.source_resistance {stated.text}", True, limit)
    battery = battery_resistance(build, volts) if supply.kind == "battery" else None
    if battery is not None:
        return Source(battery[0], battery[1], True, None)
    return Source(assumed, f"an assumed {fmt(assumed, 'Ω')} of supply, leads, fuse and ESR: the plan "
                  "states no source_resistance", False, limit)
