"""connect: how the parts of a v2 plan hang together.

Every terminal of every part sits on a net; a net with one connection, a group of parts that
reaches no rail, declared node or device pin, and DC reaching a part or input that needs it
blocked are mistakes in the plan (or in the build). These rules read only format-2 plans: a
v1 plan keeps the results it always had.
"""

from __future__ import annotations

from speccheck.findings import Value
from speccheck.nets import split_pin
from speccheck.registry import rule
from speccheck.units import fmt


def _source_nets(build) -> set:
    """The nets the source's signal enters the build on: `source.net` when the plan names it.
    Else the input region: the nets of the first stage's parts and of the parts on the first
    device's input pin, and one part further out from a net of that region that is no rail
    (a DC-blocking capacitor from the connector, listed in no stage)."""
    source = build.source
    if source is not None and source.net:
        return {source.net}
    region: set = set()
    for stage in build.chain[:1]:  # the first stage takes the source's signal
        for ref in stage.parts:
            part = build.part(ref)
            if part is not None:
                region |= set(part.terminals.values())
    device = next((build.devices.get(st.device) for st in build.chain if st.device), None)
    if device is not None and device.profile is not None:
        for pin in device.profile.pins.values():
            if pin.role == "input":  # the pin itself is a device pin: never single, never floating
                for part in build.nets.parts_on(f"{device.name}.{pin.name}"):
                    region |= set(part.terminals.values())
    out = set(region)
    for net in region - set(build.rails):
        for part in build.nets.parts_on(net):
            if not part.selector:
                out |= set(part.terminals.values())
    return out


def _outside(build) -> set:
    """Nets that meet the world outside the plan: the supply input (and the mains conductors),
    the source input, the taps, the speaker line."""
    out = {t.net for t in build.taps} | _source_nets(build)
    supply = build.supply
    for ref in ((supply.fuse, supply.series_resistor, supply.reverse_protection) if supply else ()):
        part = build.part(ref)
        if part is not None:
            out |= set(part.terminals.values())
    if supply is not None and supply.mains is not None:
        out |= {n for n in (supply.mains.line_net, supply.mains.neutral_net) if n}
        for ref in (supply.mains.transformer, supply.mains.primary_fuse, supply.mains.switch):
            part = build.part(ref)
            if part is not None:
                out |= set(part.terminals.values())
    for stage in build.chain:  # the speaker, or the jack a speaker plugs into
        for ref in (stage.load, stage.coupling) if stage.kind == "audio-amp" else ():
            part = build.part(ref)
            if part is not None:
                out |= set(part.terminals.values())
    return out


def _anchored(build, net: str) -> bool:
    return net in build.rails or net in build.nodes or split_pin(net) is not None


@rule("connect.single-connection", level="warning",
      title="A net only one terminal connects to",
      explanation="""
      A net joins two or more terminals; a net that only one terminal of one part reaches goes
      nowhere. Usually a name is misspelt in one of the places it should appear (SPK and SPK1),
      or the part that should sit there was left out of the plan. Rails, declared nodes, device
      pins, the supply and source inputs, the taps' nets and the speaker line meet something
      outside the parts list and are not counted. The source's net is `source.net` when the
      plan names it; else the nets of the first stage's parts and of the parts on the first
      device's input pin (a DC-blocking capacitor from the connector, say).
      """,
      fix="Correct the net's name where it is misspelt, or add the part that connects to it.",
      source="common practice (netlist connectivity check)",
      verify="Follow the net on the board or the wiring: the terminal should meet at least one other.")
def single_connection(build, ctx):
    if build.build_spec != 2:
        return
    outside = _outside(build)
    source = build.source
    if source is not None and source.net and not build.nets.parts_on(source.net):
        ctx.report(f"source.net {source.net} is on no part: nothing takes the source's signal",
                   source.at("net"), [Value("net", source.net)], stage="input")
    for net, parts in build.nets.members.items():
        if len(parts) != 1 or _anchored(build, net) or net in outside:
            continue
        part = parts[0]
        names = [name for name, n in part.terminals.items() if n == net]
        if len(names) > 1:
            continue  # two terminals of one part share the net (a pot wired as a variable resistor)
        if part.selector:
            continue  # an unused throw of a selector is a throw left open
        ctx.report(f"Net {net} reaches only {part.name} ({names[0]}): nothing else connects to it",
                   part.loc, [Value("net", net)], stage=build.stage_of_part(part.name).label
                   if build.stage_of_part(part.name) else "parts")


@rule("connect.unreachable", level="warning",
      title="Parts that reach no rail, node or device pin",
      explanation="""
      Every part of a working circuit connects, through other parts, to a supply rail, ground, a
      device pin or a declared node. A group of parts that reaches none of them floats: no DC
      reaches it and no signal passes through it, so it does nothing on the board. Usually a net
      name is misspelt, or the plan left out the part that joins the group to the rest.
      """,
      fix="Correct the net names that should join the group to the rest of the circuit.",
      source="common practice (netlist connectivity check)",
      verify="Measure the resistance from each part of the group to ground: a floating group shows none.")
def unreachable(build, ctx):
    if build.build_spec != 2:
        return
    reached = {net for net in build.nets.members if _anchored(build, net)} | _outside(build)
    todo = list(reached)
    while todo:
        net = todo.pop()
        for part in build.nets.parts_on(net):
            for other in part.terminals.values():
                if other not in reached:
                    reached.add(other)
                    todo.append(other)
    islands = [p for p in build.parts.values() if p.terminals and not set(p.terminals.values()) & reached]
    if islands:
        names = ", ".join(p.name for p in islands)
        ctx.report(f"{names} connect{'s' if len(islands) == 1 else ''} to no rail, device pin or declared "
                   f"node: {'it floats' if len(islands) == 1 else 'they float'}", islands[0].loc,
                   [Value("parts", names)], stage="parts")


@rule("connect.dc-unblocked", level="warning",
      title="DC reaching a part or input that needs it blocked",
      explanation="""
      Many outputs sit at a DC level (a detector's audio output at a bias voltage, an amplifier's
      output near half the supply). Fed straight into a volume or squelch pot, that DC flows
      through the track: the pot crackles as it is turned, and the DC moves with the wiper into
      the next stage. Fed into an input that must not see DC (a decoder's input, a tap's load)
      it shifts its bias point. A coupling capacitor in series blocks the DC and passes the
      audio.
      """,
      fix="Put a coupling capacitor (1 µF to 10 µF for audio) in series between the DC-carrying output and "
          "the pot or input.",
      source="common practice (coupling capacitors block DC between stages)",
      verify="Measure the DC across the pot's track or at the input with the build on: it should be near 0 "
             "V.",
      settings={"threshold": 0.1})
def dc_unblocked(build, ctx):
    if build.build_spec != 2:
        return
    nets = build.nets
    least = ctx.setting("threshold")
    for part in build.parts.values():
        if part.kind != "potentiometer" or len(part.ends) != 2:
            continue
        a, b = (nets.dc(e) for e in part.ends)
        if a is None or b is None or abs(a.volts - b.volts) < least:
            continue
        fed = [p for p in (a, b) if split_pin(p.origin) is not None and p.origin not in build.rails]
        if not fed:
            continue  # a pot across a supply on purpose (a threshold or bias control)
        src = max(fed, key=lambda p: abs(p.volts))
        ctx.report(f"{part.name}'s track carries {fmt(abs(a.volts - b.volts), 'V')} DC from {src.origin}: "
                   f"{src.why}", part.at("ends"), [Value("DC across the track", abs(a.volts - b.volts), "V")],
                   stage=build.stage_of_part(part.name).label if build.stage_of_part(part.name) else "parts")
    for tap in build.taps:
        pot = nets.dc(tap.net)
        if tap.needs_dc_blocked and not tap.coupling and pot is not None and abs(pot.volts) >= least:
            ctx.report(f"Tap {tap.name} feeds {fmt(pot.volts, 'V')} DC from {tap.net} into a load that must "
                       f"not see DC, with no coupling capacitor: {pot.why}", tap.at("net"),
                       [Value("DC at the tap", pot.volts, "V")], stage="tap")
    for dev in build.devices.values():
        for pin in (dev.profile.pins.values() if dev.profile else ()):
            net = f"{dev.name}.{pin.name}"
            pot = nets.dc(net)
            if pin.needs_dc_blocked and pot is not None and pot.origin != net and abs(pot.volts) >= least:
                ctx.report(f"{net} must not be fed DC, but {fmt(pot.volts, 'V')} reaches it: {pot.why}",
                           dev.loc, [Value("DC at the pin", pot.volts, "V")], stage="parts")


@rule("connect.configurations-capped", level="note",
      title="More signal and position combinations than are checked",
      explanation="""
      In a plan with selector switches or upstream bandwidth settings, the rules that depend on
      what is in circuit (path width, tank, audio corner, gain ahead, tap loading) run once for
      each signal in each switch position and upstream setting it can be received in. A plan
      with many switches multiplies these combinations; speccheck checks the first ones, in plan
      order, up to a fixed number, and says nothing about the rest. Naming for each signal the
      positions it is received in (`switches:`) and the upstream setting (`upstream:`) keeps the
      count to the combinations that matter.
      """,
      fix="Give each signal its `switches:` positions and `upstream:` setting, so that only the "
          "combinations it is received in are checked.",
      source="speccheck's own limit (a bound on the work of one check)",
      verify="Nothing to measure: the combinations left out were not reviewed.")
def configurations_capped(build, ctx):
    from speccheck.configs import MAX_CONFIGURATIONS, configuration_count

    if not build.switched:
        return
    total = configuration_count(build)
    if total <= MAX_CONFIGURATIONS:
        return
    switches = [p for p in build.parts.values() if p.selector]
    where = switches[0].loc if switches else build.source.at("bandwidth_settings")
    ctx.report(f"The plan has {total} combinations of signal, switch positions and upstream setting; "
               f"the first {MAX_CONFIGURATIONS} in plan order were checked and the other "
               f"{total - MAX_CONFIGURATIONS} were not", where,
               [Value("combinations", total), Value("checked", MAX_CONFIGURATIONS)], stage="parts")
