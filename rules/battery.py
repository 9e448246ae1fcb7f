"""battery: what a battery supply delivers at the build's current, and for how long (format v2).

A v2 plan may describe its battery (supply.battery: chemistry, cells, capacity, internal
resistance, end voltage). The arithmetic is in speccheck/formulas/battery.py; the current is the
power budget's supply input (quiescent currents plus the amplifier at full output).
"""

from __future__ import annotations

from dataclasses import dataclass

from speccheck.budget import REGULATOR, budget, fused_rail, rail_volts, regulator_outputs, series_drops
from speccheck.findings import Value
from speccheck.formulas import battery as cells
from speccheck.registry import rule
from speccheck.units import fmt


@dataclass
class Pack:
    chemistry: str
    count: int
    fresh: float  # V open-circuit, new
    nominal: float
    end: float  # V counted as flat
    resistance: float  # ohm, whole pack
    resistance_typical: bool
    current: float  # A, the budget's supply input
    complete: bool  # False when the budget is only a lower bound
    position: str  # the switch positions that draw most, when positions change the budget ("" if not)

    @property
    def fresh_loaded(self) -> float:
        return cells.loaded_voltage(self.fresh, self.current, self.resistance)

    @property
    def end_loaded(self) -> float:
        return cells.loaded_voltage(self.end, self.current, self.resistance)


def cell_count(build) -> int | None:
    """The cells in series of a described battery: as stated, else the voltage over the nominal."""
    supply = build.supply
    bat = supply.battery if supply is not None and supply.kind == "battery" else None
    if bat is None:  # the schema requires supply.voltage and names only chemistries in the table
        return None
    return bat.cells or max(1, round(supply.voltage.si / cells.CHEMISTRY[bat.chemistry].nominal))


def internal_resistance(build) -> tuple[float, bool] | None:
    """(ohms, typical) of a described battery: its stated internal resistance, else the
    chemistry's typical figure per cell times the cells in series (from memory)."""
    count = cell_count(build)
    return None if count is None else _resistance(build.supply.battery, count)


def _resistance(bat, count: int) -> tuple[float, bool]:
    if bat.internal_resistance is not None:
        return bat.internal_resistance.si, False
    return cells.pack(cells.CHEMISTRY[bat.chemistry].resistance, count), True


def pack(build) -> Pack | None:
    count = cell_count(build)
    if count is None:
        return None
    bat = build.supply.battery
    chem = cells.CHEMISTRY[bat.chemistry]
    b = budget(build)
    if b.input is None:
        return None
    r, typical = _resistance(bat, count)
    end = bat.end_voltage.si if bat.end_voltage is not None else cells.pack(chem.end, count)
    return Pack(bat.chemistry, count, cells.pack(chem.fresh, count), cells.pack(chem.nominal, count), end, r,
                typical, b.input, b.complete, b.position)


def direct(build) -> list:
    """The devices fed straight from the battery: on the supply's rail, or on a rail `from: supply`."""
    fed = {name for name, r in build.rails.items() if r.source == "supply" or name == build.supply.rail}
    return [d for d in build.devices.values() if d.profile is not None and d.rail in fed]


def needs(build) -> list:
    """(device, what, volts the battery must give for it, Location) for everything fed straight from
    the battery: what the device needs at its input, plus the series drops between the battery and
    the supply's own rail (a series reverse-polarity diode, a series resistor) for a device on it."""
    drops = series_drops(build)
    lost = sum(volts for _, volts in drops)
    if not drops:
        return _input_needs(build)
    rail = fused_rail(build)
    said = ", ".join(f"{what} ({fmt(volts, 'V')})" for what, volts in drops)
    return [(dev, f"{what}, plus {said} on the way", need + lost, loc) if dev.rail == rail
            else (dev, what, need, loc) for dev, what, need, loc in _input_needs(build)]


def _input_needs(build) -> list:
    """(device, what, volts it needs at its input, Location) for everything fed straight from the battery."""
    out = []
    for dev in direct(build):
        prof = dev.profile
        if prof.cls == REGULATOR:
            outs = regulator_outputs(build, dev)
            v_out = (
                rail_volts(build, outs[0])
                if outs
                else (prof.output_voltage.si if prof.output_voltage else None)
            )
            if v_out is not None and prof.dropout is not None:
                out.append(
                    (
                        dev,
                        f"{fmt(v_out, 'V')} out plus its {prof.dropout.text} dropout",
                        v_out + prof.dropout.si,
                        dev.at("rail"),
                    )
                )
        elif prof.supply_min is not None:
            out.append((dev, f"its {prof.supply_min.text} least supply", prof.supply_min.si, dev.at("rail")))
    return out


def _r_text(p: Pack) -> str:
    return f"{fmt(p.resistance, 'Ω')}{' (typical for the chemistry)' if p.resistance_typical else ''}"


def _lower_bound(p: Pack) -> str:
    """Where the budget current holds: the switch position drawing most, and whether it is complete."""
    where = f" with {p.position}" if p.position else ""
    return where + ("" if p.complete else " (the budget is incomplete, so the real current is higher)")


@rule(
    "battery.sag",
    level="warning",
    title="Battery voltage under the build's current",
    explanation="""
      A battery is a source with an internal resistance: under a current I its terminal voltage
      falls to V_open - I x R_internal. A small battery (a 9 V block is six small cells in series)
      has an internal resistance of a few ohms when new and more as it empties, so an audio
      amplifier's peaks pull its voltage down; the regulator or the chip behind it sees the lower
      voltage. When even a fresh battery under the budget current is below what a regulator or a
      device on it needs, the build does not work: an error. A sag of more than a share of the
      nominal voltage (setting share, default 0.1) is a warning: the audio distorts on peaks and
      the battery is worked hard.
      """,
    fix="Use a larger battery (bigger cells, or cells in parallel), a chemistry with a lower internal "
    "resistance, or reduce the current (a smaller speaker output, a lower supply for the amplifier).",
    source="Thevenin source model of a cell (V = V_open - I R); nominal voltages IEC 60086-1, IEC 61951, "
    "IEC 61960, IEC 60896; fresh voltage and internal resistance by chemistry from memory",
    verify="Measure the battery's terminal voltage with the build idle and at full volume on a steady "
    "tone: the difference is the sag.",
    settings={"share": 0.1},
)
def sag(build, ctx):
    p = pack(build)
    if p is None:
        return
    who = "battery"
    ctx.publish("power", who, "cells in series", p.count)
    ctx.publish("power", who, "nominal voltage", p.nominal, "V")
    ctx.publish("power", who, "fresh open-circuit voltage", p.fresh, "V")
    ctx.publish("power", who, "internal resistance", p.resistance, "Ω")
    ctx.publish("power", who, "budget current", p.current, "A")
    if p.position:
        ctx.publish("power", who, "budget current taken with", p.position)
    drop = p.fresh - p.fresh_loaded
    ctx.publish("power", who, "sag at the budget current", drop, "V")
    ctx.publish("power", who, "fresh voltage under load", p.fresh_loaded, "V")
    values = [
        Value("fresh open-circuit", p.fresh, "V"),
        Value("budget current", p.current, "A"),
        Value("internal resistance", p.resistance, "Ω"),
        Value("under load", p.fresh_loaded, "V"),
    ]
    short = [(dev, what, need, loc) for dev, what, need, loc in needs(build) if need > p.fresh_loaded]
    for dev, what, need, loc in short:
        ctx.report(
            f"even a fresh {p.chemistry} battery ({fmt(p.fresh, 'V')} open-circuit, {_r_text(p)}) "
            f"falls to {fmt(p.fresh_loaded, 'V')} at the budget current of "
            f"{fmt(p.current, 'A')}{_lower_bound(p)}, below the {fmt(need, 'V')} that {dev.name} "
            f"needs ({what}): it will not run from this battery",
            loc,
            values + [Value("needed", need, "V")],
            level="error",
            stage="power",
        )
    if not short and drop > ctx.setting("share") * p.nominal:
        ctx.report(
            f"the {p.chemistry} battery sags {fmt(drop, 'V')} ({drop / p.nominal:.0%} of its "
            f"{fmt(p.nominal, 'V')}) at the budget current of {fmt(p.current, 'A')} through "
            f"{_r_text(p)}{_lower_bound(p)}",
            build.supply.battery.at("chemistry"),
            values,
            stage="power",
        )


@rule(
    "battery.end-of-life",
    level="warning",
    title="What stops working before the battery is flat",
    explanation="""
      A battery's voltage falls as it discharges, down to an end voltage per cell at which it
      counts as flat (about 0.9 V for an alkaline cell, 1.0 V for nickel-metal hydride, 3.0 V for
      lithium-ion: from memory; give end_voltage for your cells). A regulator stops regulating when
      its input falls below its output plus its dropout; a chip stops below its least supply.
      When that happens well above the battery's end voltage, the build goes silent while most of
      the charge is still in the battery: a warning, with the voltage at which it stops. A fresh
      battery above a chip's highest supply voltage would damage it: an error.
      """,
    fix="Use a low-dropout regulator, a lower output voltage, more cells, or a chemistry whose voltage "
    "stays up longer; keep every chip's supply range above the battery's end voltage.",
    source="regulator dropout and supply range from the device profiles; end voltages per cell from memory "
    "(the usual discharge-test end points)",
    verify="Run the build from a bench supply and lower the voltage until the audio distorts or the "
    "regulator's output falls: compare that voltage with the battery's end voltage.",
)
def end_of_life(build, ctx):
    p = pack(build)
    if p is None:
        return
    ctx.publish("power", "battery", "end voltage (flat)", p.end, "V")
    ctx.publish("power", "battery", "end voltage under load", p.end_loaded, "V")
    for dev, what, need, loc in needs(build):
        if p.end_loaded < need <= p.fresh_loaded:
            # the share of the window between fresh and flat (under load) left unused; the test
            # above makes the window positive
            used = (p.fresh_loaded - need) / (p.fresh_loaded - p.end_loaded)
            ctx.publish("power", dev.name, "stops when the battery falls to (under load)", need, "V")
            ctx.report(
                f"{dev.name} needs {fmt(need, 'V')} ({what}), so the build stops when the battery "
                f"falls to {fmt(need, 'V')} under load, long before it is flat at {fmt(p.end, 'V')} "
                f"({p.count} × {fmt(p.end / p.count, 'V')}): only {used:.0%} of the battery's "
                "voltage range is used",
                loc,
                [
                    Value("needed", need, "V"),
                    Value("end voltage", p.end, "V"),
                    Value("fresh under load", p.fresh_loaded, "V"),
                ],
                stage="power",
            )
    for dev in direct(build):
        prof = dev.profile
        if prof.supply_max is not None and p.fresh > prof.supply_max.si:
            ctx.report(
                f"a fresh {p.chemistry} battery reads {fmt(p.fresh, 'V')} ({p.count} × "
                f"{fmt(p.fresh / p.count, 'V')}), above the {prof.supply_max.text} that {dev.name} "
                "takes",
                dev.at("rail"),
                [Value("fresh open-circuit", p.fresh, "V"), Value("supply_max", prof.supply_max.si, "V")],
                level="error",
                stage="power",
            )


@rule(
    "battery.running-time",
    level="warning",
    title="How long the battery runs the build",
    explanation="""
      Running time is the capacity divided by the current: t = C / I. A capacity is rated at a
      small current (capacity_at); at a larger one a battery gives less, which Peukert's law
      describes: t = H (C / (I H))^k with H = C / I_rated and an exponent k of about 1.3 for
      alkaline cells and near 1 for lithium (from memory). The current here is the power
      budget's, with the amplifier at full output, so real listening lasts longer; a time under
      the setting min_hours (default 2) is a warning: the battery is too small for the build.
      """,
    fix="Use a battery with more capacity (larger cells, or a pack), or lower the current the build draws.",
    source="Peukert's law as written in Linden's Handbook of Batteries (t = H (C/(I H))^k); exponents "
    "from memory",
    verify="Run the build on a fresh battery at a steady volume and note when it stops; or log the "
    "current with a meter and divide the capacity by it.",
    settings={"min_hours": 2.0},
)
def running_time(build, ctx):
    p = pack(build)
    if p is None:
        return
    bat = build.supply.battery
    if bat.capacity is None:
        ctx.report(
            "supply.battery.capacity is not given, so the running time cannot be computed",
            bat.loc,
            level="note",
            stage="power",
            fix="Give supply.battery.capacity (e.g. '500 mAh').",
        )
        return
    capacity_ah = bat.capacity.si / 3600.0
    rated = bat.capacity_at.si if bat.capacity_at is not None else None
    k = cells.CHEMISTRY[p.chemistry].peukert
    hours = cells.running_hours(capacity_ah, p.current, rated, k)
    ctx.publish("power", "battery", "capacity", capacity_ah, "Ah")
    ctx.publish("power", "battery", "running time at the budget current", hours, "h")
    if hours < ctx.setting("min_hours"):
        how = (
            f"Peukert exponent {k:g} from the {fmt(rated, 'A')} rating" if rated else "capacity over current"
        )
        ctx.report(
            f"the battery's {bat.capacity.text} lasts about {hours:.2g} h at the budget current of "
            f"{fmt(p.current, 'A')} ({how}){_lower_bound(p)}, under the {ctx.setting('min_hours'):g} "
            "h a battery build should run",
            bat.at("capacity"),
            [
                Value("capacity", capacity_ah, "Ah"),
                Value("budget current", p.current, "A"),
                Value("running time", hours, "h"),
            ],
            stage="power",
        )
