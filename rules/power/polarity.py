"""power: protection against a reversed supply, and what the protection diode costs."""

from __future__ import annotations

from speccheck.budget import DC_KINDS, supply_fuse
from speccheck.findings import Value
from speccheck.registry import rule


@rule("power.reverse-polarity",
      verify="""
      With a current-limited bench supply set low, apply reversed polarity briefly: no current should flow
      (series diode) or the fuse opens (shunt diode).
      """,
      level="warning",
      title="No reverse-polarity protection on a DC input with polarized parts",
      explanation="""
      A battery snap touched on the wrong way, a bench supply's leads swapped, an adapter with
      the other centre polarity: the DC input gets reversed sooner or later. Electrolytic and
      tantalum capacitors then conduct and can vent or burn, and the ICs' substrate diodes
      carry the supply's full current. The usual fixes: a series diode (it blocks the reversed
      supply, at the cost of its forward drop, about 0.7 V for silicon and 0.3 to 0.4 V for a
      Schottky part) or a shunt diode across the rail behind the fuse, cathode on the rail (it
      conducts on reversal and opens the fuse; no drop in normal use).
      """,
      fix="Add a series diode (mind its drop) or a shunt diode from ground to the rail behind the fuse, and "
          "name it in supply.reverse_protection.",
      source="common practice")
def reverse_polarity(build, ctx):
    supply = build.supply
    if supply is None or supply.kind not in DC_KINDS:
        return
    if supply.reverse_protection not in (None, "none"):
        return
    caps = [p.name for p in build.parts.values() if p.polarized]
    chips = [d.name for d in build.devices.values()]
    if not caps and not chips:
        return
    at_risk = ", ".join(caps + chips)
    stated = " (reverse_protection: none)" if supply.reverse_protection == "none" else ""
    what = {"battery": "battery", "dc-adapter": "adapter", "bench": "bench supply"}[supply.kind]
    ctx.report(
        f"nothing protects {at_risk} if the {what} is connected the wrong way round{stated}",
        supply.at("reverse_protection") if supply.given("reverse_protection") else supply.at("kind"),
        [Value("polarized capacitors", len(caps), ""), Value("devices", len(chips), "")],
        stage="power",
    )


@rule(
    "power.reverse-diode",
    verify="""
      Measure the voltage across the protection diode at full load: that drop is lost from the rail.
      """,
    level="error",
    title="Reverse-polarity diode wired the right way and in the right place",
    explanation="""
      A shunt protection diode sits across the rail with its anode on ground and its cathode on
      the rail: it is off in normal use and conducts only when the input is reversed, which
      opens the fuse ahead of it. Turned round, it shorts the supply the moment it is switched
      on. Without a fuse ahead of it (or placed ahead of the fuse) it carries the whole short-
      circuit current until it fails. A series diode has its anode toward the input and its
      cathode toward the rail; turned round, it blocks the supply.
      """,
    fix="Fit the shunt diode from ground (anode) to the rail behind the fuse (cathode); a series diode "
    "anode to the input.",
    source="common practice",
)
def reverse_diode(build, ctx):
    supply = build.supply
    if supply is None or supply.reverse_protection in (None, "none"):
        return
    diode = build.part(supply.reverse_protection)
    if diode is None:
        return
    if diode.kind != "diode" or len(diode.ends) != 2:
        ctx.report(
            f"supply.reverse_protection names {diode.name}, a {diode.kind}; expected a diode",
            supply.at("reverse_protection"),
            level="note",
            stage="power",
        )
        return
    nets = build.nets
    a, b = diode.ends
    ground = a if nets.is_ground(a) else b if nets.is_ground(b) else None
    if not diode.positive:
        ctx.report(
            f"{diode.name} protects against reversed polarity but its anode is not noted (positive: NET)",
            diode.loc,
            level="warning",
            stage="power",
        )
        return
    fuse = supply_fuse(build)
    if ground is not None:
        hot = diode.other_end(ground)
        if diode.positive == hot:
            ctx.report(
                f"{diode.name} has its anode on {hot} and its cathode on {ground}: it conducts in "
                "normal use and shorts the supply",
                diode.at("positive"),
                stage="power",
            )
            return
        ctx.publish("power", diode.name, "reverse protection", f"shunt diode across {hot}")
        if fuse is None:
            ctx.report(
                f"{diode.name} is a shunt diode but no fuse is declared ahead of it: on reversal it "
                "carries the supply's whole short-circuit current",
                diode.at("ends"),
                level="warning",
                stage="power",
            )
        elif hot in fuse.ends and supply.rail and hot != supply.rail and supply.rail in fuse.ends:
            ctx.report(
                f"{diode.name} sits on {hot}, ahead of fuse {fuse.name}: on reversal nothing opens",
                diode.at("ends"),
                level="warning",
                stage="power",
            )
        return
    rail = supply.rail
    if rail in diode.ends and diode.positive == rail:
        ctx.report(
            f"series diode {diode.name} has its cathode toward the input and its anode on {rail}: it "
            "blocks the supply",
            diode.at("positive"),
            stage="power",
        )
        return
    if diode.forward_voltage is not None:
        ctx.publish("power", diode.name, "series diode drop", diode.forward_voltage.si, "V")
