"""Remedies for wiring, power and the parts a stage lacks: capacitor ratings and polarity, coil and
crystal returns, fuse rating and speed, heat sink, output network and input bypass."""

from __future__ import annotations

import math

from speccheck import units
from speccheck.findings import Finding
from speccheck.formulas import audio, picks
from speccheck.solver.base import (
    Change,
    Option,
    Proposal,
    Situation,
    number,
    remedy,
    set_or_add,
    value_change,
)

# ---- wiring -----------------------------------------------------------------------------------


@remedy("wiring.cap-voltage")
def cap_voltage(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    working = (number(f, "DC across") or 0.0) + (number(f, "AC peak") or 0.0)
    rating = number(f, "rating")
    allowed = next((v.value for v in f.values if v.name.startswith("allowed at")), None)
    if part is None or not working or not rating or not isinstance(allowed, float):
        return None
    share = allowed / rating
    options: list[Option] = []
    pick = picks.voltage_rating_up(working / share)
    roomy = picks.voltage_rating_up(working / UNREGULATED_SHARE) if _on_unregulated_rail(s, part) else None
    steps = []
    if roomy is not None and pick is not None and roomy > pick:
        steps.append(roomy)  # the rule's share alone leaves no room for the adapter's rise at light load
    while pick is not None and len(steps) < 2:
        steps.append(pick)
        pick = picks.voltage_rating_up(pick * 1.001)
    for pick in steps:
        options.append(
            Option(
                [set_or_add(part, "voltage_rating", units.plan_text(pick, "V"))],
                f"{part.name} rated {units.fmt(pick, 'V')}",
                f"{working:.3g} V is {working / pick:.0%} of {units.fmt(pick, 'V')} (keep under {share:.0%})",
            )
        )
    return Proposal(
        f,
        f"{part.name} voltage rating",
        options,
        note="an adapter or transformer supply may be unregulated and rise above its nominal voltage at "
        "light load: the first rating leaves a third in hand (common practice)"
        if len(steps) > 1 and steps[0] == roomy
        else "",
        source="stocked capacitor voltage ratings (R5 of ISO 3, and common practice); derating: the rule's",
    )


# An adapter or transformer supply without a regulator sits well above its nominal voltage at light
# load; builders keep the working voltage within about two thirds of the rating there (common practice).
UNREGULATED_SHARE = 2 / 3


def _on_unregulated_rail(s: Situation, part) -> bool:
    supply = s.build.supply
    if supply is None or supply.kind not in ("dc-adapter", "mains-transformer"):
        return False
    rails = [s.build.rails.get(end) for end in part.ends]
    return any(rail is not None and rail.source == "supply" and not rail.is_ground for rail in rails)


def _polarity(s: Situation, f: Finding, positive: str | None, why: str) -> Proposal | None:
    part = s.part_for(f)
    if part is None or not positive:
        return None
    change = set_or_add(part, "positive", positive)
    return Proposal(
        f,
        f"{part.name} polarity",
        [Option([change], f"{part.name} positive: {positive}", why)],
        source="common practice: + toward the higher DC potential",
    )


def _higher_end(s: Situation, part) -> tuple[str, str] | None:
    known = s.build.nets.across(part)
    if known is None:
        return None
    a, pa, b, pb, _ = known
    if pa.volts == pb.volts:
        return None
    high, low = (a, b) if pa.volts > pb.volts else (b, a)
    return high, f"{high} sits at {max(pa.volts, pb.volts):g} V, {low} at {min(pa.volts, pb.volts):g} V"


@remedy("wiring.polarity-unstated")
def polarity_unstated(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    found = _higher_end(s, part) if part is not None else None
    return _polarity(s, f, *found) if found else None


@remedy("wiring.polarity-reversed")
def polarity_reversed(s: Situation, f: Finding) -> Proposal | None:
    return polarity_unstated(s, f)


@remedy("wiring.speaker-coupling")
def speaker_coupling(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    stage = next(
        (st for st in s.build.stages("audio-amp") if part is not None and st.coupling == part.name), None
    )
    load = s.build.part(stage.load) if stage is not None else None
    if part is None or load is None or len(part.ends) != 2:
        return None
    shared = [end for end in part.ends if end in load.ends]
    if len(shared) != 1:
        return None
    nets = (part.other_end(shared[0]), shared[0])  # (amplifier side, speaker side)
    return _polarity(s, f, nets[0], f"+ toward the amplifier output {nets[0]}, - toward the speaker")


# ---- power ------------------------------------------------------------------------------------


@remedy("power.fuse-size")
def fuse_size(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    preferred = number(f, "preferred")
    if part is None or not preferred:
        return None
    return Proposal(
        f,
        f"{part.name} rating",
        [
            Option(
                [set_or_add(part, "current_rating", units.plan_text(preferred, "A"))],
                f"{part.name} {units.fmt(preferred, 'A')}",
                f"normal current {units.fmt(number(f, 'normal current') or 0.0, 'A')} within the derated "
                f"share of {units.fmt(preferred, 'A')}",
            )
        ],
        source="R10 series, IEC 60127-1 Annex A (the rule's pick)",
    )


@remedy("power.fuse-inrush")
def fuse_inrush(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    if part is None or part.kind != "fuse" or part.speed == "time-lag":
        return None
    return Proposal(
        f,
        f"{part.name} speed",
        [
            Option(
                [set_or_add(part, "speed", "time-lag")],
                f"{part.name} time-lag",
                "a time-lag fuse rides through the charging surge of the bulk capacitor",
            )
        ],
        source="IEC 60127-2 time-lag characteristic (the rule's comparison)",
    )


def _pins(dev, role: str) -> list[str]:
    if dev is None or dev.profile is None:
        return []
    return [f"{dev.name}.{pin.name}" for pin in dev.profile.pins.values() if pin.role == role]


def add_output_network(s: Situation, f: Finding, stage) -> Proposal | None:
    """The usual series R-C from the output to ground: 10 ohm with 100 nF (the rule's fix)."""
    dev = s.build.device(stage.device)
    outs, ground = _pins(dev, "audio-out"), s.ground()
    if not outs or ground is None:
        return None
    r_name, c_name, middle = s.new_name("R"), s.new_name("C"), s.new_net("OUT_RC")
    ohms, farads = 10.0, 100e-9
    changes = [
        Change(
            ("parts",),
            {"kind": "resistor", "value": units.plan_text(ohms, "Ω"), "ends": [outs[0], middle]},
            key=r_name,
        ),
        Change(
            ("parts",),
            {
                "kind": "capacitor",
                "value": units.plan_text(farads, "F"),
                "dielectric": "film",
                "ends": [middle, ground],
            },
            key=c_name,
        ),
        Change(stage.doc_path, {"resistor": r_name, "capacitor": c_name}, key="output_network"),
    ]
    return Proposal(
        f,
        f"output network of {dev.name}",
        [
            Option(
                changes,
                f"add {r_name} {units.fmt(ohms, 'Ω')} and {c_name} {units.fmt(farads, 'F')} in series from "
                f"{outs[0]} to {ground}",
                f"turnover {units.fmt(audio.rc_corner(ohms, farads), 'Hz')}, far above the audio band",
            )
        ],
        note="fit them close to the amplifier's output and ground pins",
        source="common practice (audio amplifier IC application circuits)",
    )


@remedy("audio.input-bypass")
def input_bypass(s: Situation, f: Finding) -> Proposal | None:
    stage = s.stage_for(f)
    if stage is None or stage.input_bypass is not None:
        return None
    dev = s.build.device(stage.device)
    inputs, ground = _pins(dev, "input"), s.ground()
    if not inputs or ground is None:
        return None
    wired = {end for part in s.build.parts.values() for end in part.ends}
    inputs.sort(key=lambda net: (net not in wired, "plus" not in net and "+" not in net, net))
    name = s.new_name("C")
    farads = 470e-12
    changes = [
        Change(
            ("parts",),
            {
                "kind": "capacitor",
                "value": units.plan_text(farads, "F"),
                "dielectric": "ceramic",
                "ends": [inputs[0], ground],
            },
            key=name,
        ),
        Change(stage.doc_path, name, key="input_bypass"),
    ]
    return Proposal(
        f,
        f"RF bypass at {dev.name}'s input",
        [
            Option(
                changes,
                f"add {name} {units.fmt(farads, 'F')} from {inputs[0]} to {ground}",
                "shorts RF at the amplifier input; against a 10 kohm source it turns over near 34 kHz",
            )
        ],
        note="fit it right at the input pin",
        source="common practice (the rule's fix)",
    )


@remedy("audio.output-network")
def output_network(s: Situation, f: Finding) -> Proposal | None:
    stage = s.stage_for(f)
    net = stage.output_network if stage is not None else None
    if net is None:
        return add_output_network(s, f, stage)
    res, cap = s.build.part(net.resistor), s.build.part(net.capacitor)
    if res is None or cap is None or res.value is None or cap.value is None:
        return None
    lowest = s.settings.rule_settings.get("audio.output-network", {}).get("lowest_corner", 20e3)
    most = 1 / (2 * math.pi * res.value.si * lowest)
    series = s.series_for("capacitor")
    options = []
    for c in reversed(picks.series_values(series, most / 3, most)[-2:]):
        options.append(
            Option(
                [value_change(cap, c, "F")],
                f"{cap.name} {units.fmt(c, 'F')}",
                f"turnover {units.fmt(audio.rc_corner(res.value.si, c), 'Hz')}, above the audio band",
            )
        )
    return Proposal(f, f"output network {cap.name}", options, source=f"f = 1/(2 pi R C); IEC 60063 {series}")


@remedy("mains.primary-fuse")
def primary_fuse(s: Situation, f: Finding) -> Proposal | None:
    part = s.part_for(f)
    preferred = number(f, "preferred")
    if part is None or part.kind != "fuse" or not preferred:
        return None  # no fuse at all: where it goes in the line conductor is the builder's wiring
    changes = [set_or_add(part, "current_rating", units.plan_text(preferred, "A"))]
    if part.speed != "time-lag":
        changes.append(set_or_add(part, "speed", "time-lag"))
    return Proposal(
        f,
        f"{part.name} primary fuse",
        [
            Option(
                changes,
                f"{part.name} time-lag {units.fmt(preferred, 'A')}",
                f"primary current {units.fmt(number(f, 'primary current') or 0.0, 'A')} with room for the "
                "switch-on inrush",
            )
        ],
        note="mains wiring: unplug before work; a competent person fits and checks it, under local "
        "electrical codes",
        source="R10 series, IEC 60127-1 Annex A; time-lag per IEC 60127-2 (the rule's pick)",
    )


@remedy("power.reverse-polarity")
def reverse_polarity(s: Situation, f: Finding) -> Proposal | None:
    """A shunt diode from ground to the fused rail, so a reversed supply opens the fuse (the rule's fix)."""
    supply = s.build.supply
    ground = s.ground()
    fuse = s.build.part(supply.fuse) if supply is not None else None
    if (
        supply is None
        or fuse is None
        or fuse.kind != "fuse"
        or not supply.rail
        or supply.rail not in fuse.ends
        or ground is None
        or supply.reverse_protection
    ):
        return None
    name = s.new_name("D")
    changes = [
        Change(("parts",), {"kind": "diode", "ends": [ground, supply.rail], "positive": ground}, key=name),
        set_or_add(supply, "reverse_protection", name),
    ]
    return Proposal(
        f,
        "reverse-polarity protection",
        [
            Option(
                changes,
                f"add {name}, a shunt diode from {ground} (anode) to {supply.rail} (cathode), behind "
                f"{fuse.name}",
                f"off in normal use; reversed, it conducts and opens {fuse.name}",
            )
        ],
        note=f"a silicon rectifier diode that carries the fault current until {fuse.name} opens (a 1 A "
        "class part for a fuse under 1 A; common practice)",
        source="common practice (the rule's fix)",
    )


@remedy("power.fuse-wire")
def fuse_wire(s: Situation, f: Finding) -> Proposal | None:
    """The fuse the build needs where the wire carries it; else wire that carries the fitted fuse."""
    from speccheck.formulas.fuses import AWG_CHASSIS_AMPS

    fuse = s.part_for(f)
    supply = s.build.supply
    rating, carries = number(f, "fuse rating"), number(f, "wire ampacity")
    if fuse is None or fuse.kind != "fuse" or supply is None or rating is None or carries is None:
        return None
    options = []
    needed = s.sheet("fuse", fuse.name, "preferred rating (R10)")
    if needed is not None and needed <= carries:
        options.append(
            Option(
                [set_or_add(fuse, "current_rating", units.plan_text(needed, "A"))],
                f"{fuse.name} {units.fmt(needed, 'A')}",
                f"the rating the build needs, within the {units.fmt(carries, 'A')} the wiring carries",
            )
        )
    gauge = picks.thinnest_wire_for(rating, AWG_CHASSIS_AMPS)
    if gauge is not None and "wire_gauge" in supply.places:
        options.append(
            Option(
                [Change(supply.places["wire_gauge"], gauge)],
                f"supply wiring {gauge} AWG",
                f"carries {units.fmt(AWG_CHASSIS_AMPS[gauge], 'A')}, above the {units.fmt(rating, 'A')} fuse",
            )
        )
    return Proposal(
        f,
        f"{fuse.name} against the wiring",
        options,
        source="chassis-wiring ampacity (Handbook of Electronic Tables and Formulas, the rule's table); R10 "
        "series, IEC 60127-1 Annex A",
    )


@remedy("audio.speaker-power")
def speaker_power(s: Situation, f: Finding) -> Proposal | None:
    speaker = s.part_for(f)
    full = number(f, "amplifier full output")
    if speaker is None or not full:
        return None
    pick = picks.rating_up(full, picks.SPEAKER_POWERS)
    if pick is None:
        return None
    return Proposal(
        f,
        f"{speaker.name} power rating",
        [
            Option(
                [set_or_add(speaker, "power_rating", units.plan_text(pick, "W"))],
                f"{speaker.name} rated {units.fmt(pick, 'W')}",
                f"at or above the {units.fmt(full, 'W')} the amplifier can deliver",
            )
        ],
        source="the rule's full output; speaker power steps: common practice",
    )
