"""The reference checks the loader runs once the model is built: every name a build refers to
is declared, rails do not feed each other, rail voltages mean something. input.* findings."""

from __future__ import annotations

from typing import Any

from speccheck import model, registry, schema
from speccheck.findings import Finding


def _fix(rule_id: str) -> str:
    return registry.load_rules()[rule_id].fix



def check(build: model.Build, ctx: Any) -> None:
    """Every name a build refers to (parts, devices, pins, rails, IF paths) is declared; rails do
    not feed each other; no rail voltage is meaningless. Findings go to ctx.findings."""
    def missing(what, name, obj, field_name, known):
        close = schema._suggest(name, known)
        loc = obj.at(field_name)
        ctx.findings.append(
            Finding(
                "input.reference",
                "error",
                f"{what} '{name}' is not declared{close}",
                loc,
                fix=_fix("input.reference"),
                stage="input",
            )
        )

    for dev in build.devices.values():
        dev.profile = build.profiles.get(dev.profile_name)
        if dev.profile is None:
            missing("device profile", dev.profile_name, dev, "profile_name", build.profiles)
        for field_name in ("rail", "output_rail", "negative_rail"):
            rail = getattr(dev, field_name, None)
            if rail and rail not in build.rails:
                missing("rail", rail, dev, field_name, build.rails)
    for part in build.parts.values():
        for net in dict.fromkeys([*part.ends, *part.primary, *part.secondary, *part.terminals.values()]):
            pin_of = _pin(net)
            if pin_of:
                dev = build.devices.get(pin_of[0])
                if dev is None:
                    missing("device", pin_of[0], part, "ends", build.devices)
                elif dev.profile and pin_of[1] not in dev.profile.pins:
                    missing(
                        f"pin of {dev.name} ({dev.profile.name})", pin_of[1], part, "ends", dev.profile.pins
                    )
        for pair_name in ("ends", "primary", "secondary"):
            pair = getattr(part, pair_name)
            if len(pair) == 2 and pair[0] == pair[1]:
                ctx.findings.append(
                    Finding(
                        "input.shorted-part",
                        "error",
                        f"both {pair_name} of {part.name} connect to {pair[0]}: the part is shorted out",
                        part.at(pair_name),
                        fix=_fix("input.shorted-part"),
                        stage="input",
                    )
                )
        if part.positive and part.positive not in part.ends:
            ctx.findings.append(
                Finding(
                    "input.reference",
                    "error",
                    f"{part.name}.positive is '{part.positive}', which is not one of "
                    f"its ends ({', '.join(part.ends)})",
                    part.at("positive"),
                    stage="input",
                )
            )
    supply = build.supply
    if supply:
        for field_name in ("fuse", "series_resistor"):
            _check_part(build, supply, field_name, missing)
        if supply.reverse_protection not in (None, "none"):
            _check_part(build, supply, "reverse_protection", missing)
        if supply.rail and supply.rail not in build.rails:
            missing("rail", supply.rail, supply, "rail", build.rails)
        if supply.mains:
            for field_name in ("transformer", "primary_fuse", "switch"):
                _check_part(build, supply.mains, field_name, missing)
    for rail in build.rails.values():
        if rail.source not in (None, "supply") and rail.source not in build.devices:
            missing("device", rail.source, rail, "source", build.devices)
    _rail_loops(build, ctx)
    _meaningless_voltages(build, ctx)
    paths = {name for st in build.chain for name in st.paths}
    for sig in build.signals:
        if sig.path and paths and sig.path not in paths:
            missing("IF path", sig.path, sig, "path", paths)
    for stage in build.chain:
        if stage.device and stage.device not in build.devices:
            missing("device", stage.device, stage, "device", build.devices)
        for ref in stage.parts:
            if ref not in build.parts:
                missing("part", ref, stage, "parts", build.parts)
        for holder in (stage, stage.tank, stage.output_network, stage.oscillator):
            if holder is None:
                continue
            for field_name in (
                "resistor",
                "capacitor",
                "load",
                "coupling",
                "input_bypass",
                "inductor",
                "damping",
                "crystal",
                "control",
                "series",
                "shunt",
                "hysteresis",
            ):
                if field_name in getattr(holder, "choices", {}):
                    for ref in holder.choices[field_name]:
                        if ref not in build.parts:
                            missing("part", ref, holder, field_name, build.parts)
                elif hasattr(holder, field_name):
                    _check_part(build, holder, field_name, missing)
        if stage.oscillator:
            for ref in stage.oscillator.load_caps:
                if ref not in build.parts:
                    missing("part", ref, stage.oscillator, "load_caps", build.parts)
        for path in stage.paths.values():
            _check_part(build, path, "filter", missing)
            _check_part(build, path, "bypass", missing)


def _rail_loops(build: model.Build, ctx: Any):
    """A rail whose chain of 'from' regulators leads back to itself."""
    for start in build.rails.values():
        seen, rail = [], start
        while rail is not None and rail.source not in (None, "supply"):
            dev = build.devices.get(rail.source)
            if dev is None or not dev.rail:
                break
            seen.append(f"{rail.name} from {dev.name} on {dev.rail}")
            if dev.rail == start.name:
                ctx.findings.append(
                    Finding(
                        "input.rail-loop",
                        "error",
                        f"rail {start.name} feeds itself: {'; '.join(seen)}",
                        start.at("source"),
                        fix=_fix("input.rail-loop"),
                        stage="input",
                    )
                )
                break
            rail = build.rails.get(dev.rail)
            if len(seen) > len(build.rails):
                break


def _meaningless_voltages(build: model.Build, ctx: Any):
    """A supply states the voltage it delivers to the build: 0 V delivers nothing, and a negative
    figure is the other side of a split supply, which is declared as a rail of its own."""
    supply = build.supply
    if supply is None or supply.voltage is None or supply.voltage.si > 0:
        return
    why = (
        "powers nothing"
        if supply.voltage.si == 0
        else (
            "is not what a supply delivers: give its positive output here, and declare a negative side as a "
            "rail (from: supply)"
        )
    )
    ctx.report(
        "input.value-range",
        f"supply.voltage is {supply.voltage.text}: a supply of {supply.voltage.text} {why}",
        supply.doc_path + ("voltage",),
    )


def _check_part(build, holder, field_name, missing):
    ref = getattr(holder, field_name, None)
    if ref and ref not in build.parts:
        missing("part", ref, holder, field_name, build.parts)


def _pin(net: str):
    from speccheck.nets import split_pin

    return split_pin(net)
