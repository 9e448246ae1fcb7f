"""The supply switch-on deck: a transient through the fuse into the bulk capacitors."""

from __future__ import annotations

import math

from speccheck.spice.deck import (
    Deck,
    Sheet,
    described,
)
from speccheck.spice.text import Names, comment, number

# ---- supply switch-on -----------------------------------------------------------------------

def switch_on(build, sheet: Sheet) -> Deck | None:
    supply = build.supply
    fuse = build.part(supply.fuse) if supply is not None else None
    if supply is None or fuse is None or fuse.kind != "fuse" or supply.voltage is None:
        return None
    peak = sheet.get("fuse", fuse.name, "inrush peak")
    ohms = sheet.get("fuse", fuse.name, "inrush loop resistance")
    tau = sheet.get("fuse", fuse.name, "inrush time constant RC")
    farads = sheet.get("fuse", fuse.name, "bulk capacitance behind it")
    if peak is None or ohms is None or tau is None or farads is None:
        return None
    volts = abs(supply.voltage.si)
    rail = supply.rail if supply.rail else next((e for e in fuse.ends if e in build.rails), None)
    if rail is None:
        return None
    ground = {n for n, r in build.rails.items() if r.is_ground}
    names = Names(ground)
    series = build.part(supply.series_resistor)
    r_series = series.value.si if series is not None and series.kind == "resistor" and series.value else 0.0
    limit = sheet.get("fuse", fuse.name, "inrush current limit")  # the rule's: a bench supply's limit
    src = names.net("supply emf")
    fuse_in = names.net(fuse.other_end(rail) or "fuse input")
    rail_node = names.net(rail)
    deck = Deck(
        "switch-on",
        "switch-on",
        f"supply switch-on through {fuse.name} into the bulk capacitance",
        "every signal and switch position: the supply is switched on before any signal",
    )
    rise = tau / 1e5
    lines = deck.lines
    lines += [
        f"* the supply ({comment(supply.kind)}) switched on at t = 0 (rise {number(rise)} s)",
        f"V_SUPPLY {src} 0 PWL(0 0 {number(rise)} {number(volts)})",
        (
            f"* the loop resistance not in a named part: {number(ohms - r_series)} ohm "
            "(supply, leads, fuse, capacitor ESR: the design sheet's figure less the series resistor)"
        ),
    ]
    r_loop = ohms - r_series
    after_source = names.net("after source") if r_series else fuse_in
    if limit is None:
        lines.append(f"{names.element('R', 'source')} {src} {after_source} {number(r_loop)}")
    else:
        lines += [
            f"* a current-limited {comment(supply.kind)}: at most {number(limit)} A",
            (
                f"{names.element('B', 'source')} {src} {after_source} "
                f"I=min({number(limit)}, max(0, v({src},{after_source})/{number(r_loop)}))"
            ),
        ]
    if r_series:
        lines += [
            f"* {comment(described(series))}",
            f"{names.element('R', series.name)} {after_source} {fuse_in} {number(r_series)}",
        ]
    fuse_el = names.element("V", fuse.name)
    lines += [
        f"* {comment(described(fuse))}: an ammeter (0 V source); its resistance is in the loop figure",
        f"{fuse_el} {fuse_in} {rail_node} DC 0",
    ]
    for part in build.nets.parts_on(rail):
        if part.kind == "capacitor" and part.value and part.other_end(rail) in ground:
            lines += [
                f"* {comment(described(part))}",
                f"{names.element('C', part.name)} {rail_node} 0 {number(part.value.si)}",
            ]
    square = names.net("current squared")
    stop = 12 * tau + (farads * volts / limit if limit else 0.0)
    lines += [
        "* the fuse current squared, whose integral is the I2t the fuse sees",
        f"{names.element('B', 'i2')} {square} 0 V=i({fuse_el})*i({fuse_el})",
        f".tran {number(tau / 500)} {number(stop)} 0 {number(tau / 500)}",
        f".save v({rail_node}) v({square}) i({fuse_el})",
        f".measure tran inrush_peak max i({fuse_el})",
        f".measure tran i2t integ v({square}) from=0 to={number(stop)}",
    ]
    sheet.check(deck, "inrush_peak", "fuse", fuse.name, "inrush peak")
    sheet.check(deck, "i2t", "fuse", fuse.name, "inrush I²t")
    if limit is None:
        # the capacitor reaches 1 - 1/e of the supply voltage after one time constant
        lines.append(
            f".measure tran time_constant when v({rail_node})={number(volts * (1 - math.exp(-1)))} rise=1"
        )
        sheet.check(deck, "time_constant", "fuse", fuse.name, "inrush time constant RC")
    else:
        deck.notes.append(
            "no time-constant measure: a current-limited supply charges the capacitor at a "
            "steady current first"
        )
    deck.notes.append(
        "the supply as a DC step of its voltage behind the loop resistance, as the fuse rule takes it"
        + (" (and its current limit)" if limit else "")
    )
    if supply.mains is not None or supply.kind == "mains-transformer":
        deck.notes.append(
            "a transformer and rectifier really charge the reservoir over several mains "
            "half-cycles; the step is the worst case the rule checks"
        )
    return deck
