"""freqplan: conversion arithmetic, the signal inside the filter, image, necessary bandwidth against the
IF path, upstream bandwidth."""

from __future__ import annotations


from speccheck.chain import (frequency_plan, hz,
                             khz, necessary, path_for)
from speccheck.findings import Value
from speccheck.formulas import mixing
from speccheck.registry import rule
from speccheck.rules.freqplan.common import missing_note, setting


@rule("freqplan.conversion", verify='Measure the LO with a frequency counter at a buffered output or a loosely coupled probe, and the IF at the mixer output with a receiver or spectrum analyser.',
      level="error",
      title="The IF each local oscillator really produces",
      explanation="""
      A mixer makes the difference between its input and the local oscillator (LO). With low-side
      injection the LO sits below the input, f_LO = f_in - f_IF; with high-side injection above,
      f_LO = f_in + f_IF. A crystal LO runs at its marked frequency (an overtone crystal at the
      overtone it is marked for), times any multiplier after the oscillator; the oscillator's drift
      is taken at the oscillator and multiplied with it. speccheck computes the LO and the IF that
      result, the worst-case spread of that IF (crystal tolerance in ppm, the crystal's pulling by
      the load the oscillator gives it, oscillator drift, and the drift of the source), and puts
      them on the design sheet. In a chain of several conversions the IF out of one is the input
      of the next, spread and all.

      An LO on the other side of the input from what the plan says still gives the same IF, but
      the spectrum comes out inverted and the image moves to the other side; the plan should say
      which it is. An LO equal to the input gives no IF at all.
      """,
      fix="Choose the LO as f_in - f_IF (low side) or f_in + f_IF (high side) and declare the side.",
      source="textbook mixer arithmetic (e.g. Tooley, Electronic Circuits); common practice: a 21.4 MHz IF to "
             "455 kHz low side needs a 20.945 MHz LO")
def conversion(build, ctx):
    plan = frequency_plan(build)
    for c in plan.conversions:
        stage = c.stage
        if c.missing:
            missing_note(ctx, c, stage.label)
            continue
        if c.lo is None:
            continue
        osc = stage.oscillator
        ctx.publish("conversion", c.owner, "input frequency", c.f_in, "Hz")
        ctx.publish("conversion", c.owner, "LO frequency", c.lo, "Hz")
        if c.pull:
            ctx.publish("conversion", c.owner, "LO shift by crystal pulling", round(c.lo - c.lo / (1 + c.pull), 3), "Hz")
        ctx.publish("conversion", c.owner, "LO worst-case spread (±)", c.lo_unc, "Hz")
        ctx.publish("conversion", c.owner, "injection", f"{c.side} side")
        if c.f_if <= 0:
            ctx.report(f"{c.owner}: the LO ({hz(c.lo)}) equals the input ({hz(c.f_in)}); the mixer makes no IF",
                       c.lo_at or osc.loc, [Value("LO", c.lo, "Hz"), Value("input", c.f_in, "Hz")],
                       stage=stage.label)
            continue
        ctx.publish("conversion", c.owner, "IF (nominal)", c.f_if, "Hz")
        ctx.publish("conversion", c.owner, "IF lowest (worst case)", c.f_if - c.if_unc, "Hz")
        ctx.publish("conversion", c.owner, "IF highest (worst case)", c.f_if + c.if_unc, "Hz")
        if c.intended is not None:
            ctx.publish("conversion", c.owner, "IF offset from intended", round(c.f_if - c.intended, 3), "Hz")
        if c.assumed or (c is plan.conversions[0] and build.source is not None and build.source.drift is None):
            counted = [f"{p} (counted as {v})" for p, v in c.assumed]
            if c is plan.conversions[0] and build.source is not None and build.source.drift is None:
                counted.append("source.drift (counted as 0 Hz)")
            only_source = not c.assumed  # then the note is about the source section, so point there
            ctx.report(f"{c.owner}: the worst-case IF leaves out what is not given: {', '.join(counted)}",
                       build.source.loc if only_source else (c.lo_at or osc.loc), level="note", stage=stage.label,
                       fix="Give the crystal tolerance and the source drift so the worst case is real.")
        if osc.injection in ("low", "high") and osc.injection != c.side:
            image = mixing.image_frequency(c.f_in, c.lo)
            ctx.report(f"{c.owner}: injection is declared {osc.injection} side, but the LO ({hz(c.lo)}) is "
                       f"{'below' if c.side == 'low' else 'above'} the input ({hz(c.f_in)}): the IF is still "
                       f"{hz(c.f_if)}, but the spectrum is {'not ' if c.side == 'low' else ''}inverted and the image "
                       f"lies at {hz(image)}", osc.at("injection"),
                       [Value("LO", c.lo, "Hz"), Value("input", c.f_in, "Hz"), Value("image", image, "Hz")],
                       level="warning", stage=stage.label,
                       fix=f"Declare injection: {c.side}, or choose the LO on the {osc.injection} side "
                           f"({hz(mixing.lo_for(c.f_in, c.intended or c.f_if, osc.injection))}).")
        if c.filter is None:
            ctx.report(f"{c.owner}: no if-filter stage follows, so the IF of {hz(c.f_if)} is checked against no "
                       f"passband", stage.loc, [Value("IF", c.f_if, "Hz")], level="note", stage=stage.label,
                       fix="Add the if-filter stage (with its filter part or passband) after the conversion.")


@rule("freqplan.filter-fit", verify="Feed a generator at the input frequency, step it across the signal's width, and watch the level after the filter: the whole signal must sit on the filter's flat top.",
      level="error",
      title="Signal must stay inside the IF filter at the worst-case IF",
      explanation="""
      The filter after the mixer passes a fixed band around its centre. The signal arrives at the IF
      the LO actually makes, give or take the crystal tolerance, the crystal's pulling, oscillator
      drift and the drift of the source. At the worst case the signal's occupied band (its
      necessary bandwidth, centred on the shifted IF) must still lie inside the passband, or one
      sideband is cut: distortion, lost audio, squelch chatter. A wrong crystal, or one pulled by
      the wrong load capacitors, can put the whole signal outside the filter.

      A warning comes when the room left between the signal's worst-case edge and the filter's
      edge is under a share of the filter's half-bandwidth (setting margin_share, default 0.1):
      filter skirts, part tolerances and ageing eat that room. Filters are taken at the bandwidth
      their part states (bandwidth_at, often 6 dB).
      """,
      fix="Use the crystal (and load capacitors) that put the IF on the filter's centre, or a filter centred on "
          "the IF the oscillator makes; reduce drift where the margin is thin.",
      source="common practice: a 455 kHz ceramic filter of ±10 kHz at 6 dB passes 16 kHz narrowband FM",
      settings={"margin_share": 0.1})
def filter_fit(build, ctx):
    plan = frequency_plan(build)
    share_min = setting(ctx, "margin_share")
    published = set()
    for point in plan.filters:
        if point.f is None:
            continue
        for sig in build.signals:
            need = necessary(sig)
            pb = path_for(sig, point.paths)
            if need is None or pb is None or pb.width is None or pb.center is None:
                continue
            bn = need[0]
            owner_name = f"{pb.name} path"
            if id(pb) not in published:
                published.add(id(pb))
                ctx.publish("if-filter", owner_name, "passband low edge", pb.low, "Hz")
                ctx.publish("if-filter", owner_name, "passband high edge", pb.high, "Hz")
            if bn > pb.width:
                continue  # freqplan.path-width reports a path narrower than the signal
            sig_lo, sig_hi = point.f - point.unc - bn / 2, point.f + point.unc + bn / 2
            margin = min(pb.high - sig_hi, sig_lo - pb.low)
            share = margin / (pb.width / 2)
            ctx.publish("if-filter", owner_name, f"margin for {sig.name} (worst case)", margin, "Hz")
            if margin >= 0 and share >= share_min:
                continue
            conv = point.conversion
            # Would the IF on the filter's centre clear it? Then the offset is the cause: point at
            # what sets the frequency (the crystal, the LO); otherwise at the filter's width.
            centred = (pb.width / 2 - bn / 2 - point.unc) / (pb.width / 2) >= share_min
            if centred and conv is not None and conv.lo_at is not None:
                where = conv.lo_at
            elif centred and conv is None and build.source is not None:
                where = build.source.at("frequency")
            else:
                where = pb.at()
            cause = f"LO {hz(conv.lo)}" if conv is not None and conv.lo is not None else "the input"
            values = [Value("IF (nominal)", point.f, "Hz"), Value("IF spread (±)", point.unc, "Hz"),
                      Value("necessary bandwidth", bn, "Hz"), Value("passband low", pb.low, "Hz"),
                      Value("passband high", pb.high, "Hz"), Value("margin", margin, "Hz")]
            spread = f"{hz(point.f)} ± {khz(point.unc)} ({cause}; {point.why})"
            if margin < 0:
                ctx.report(f"{sig.name} does not fit the {pb.name} path at the worst-case IF: the IF is {spread}, "
                           f"so the {khz(bn)} signal reaches {hz(sig_lo)} to {hz(sig_hi)}, {khz(-margin)} past the "
                           f"passband {hz(pb.low)} to {hz(pb.high)} ({pb.describe()})", where, values,
                           stage=point.stage.label)
            else:
                ctx.report(f"{sig.name} fits the {pb.name} path with only {khz(margin)} to spare at the worst-case IF "
                           f"({share:.0%} of the half passband, under {share_min:.0%}): the IF is {spread}, the "
                           f"passband {hz(pb.low)} to {hz(pb.high)} ({pb.describe()})", where, values,
                           level="warning", stage=point.stage.label)


@rule("freqplan.image", verify="Set a generator to the image frequency at the wanted signal's level and compare the RSSI or audio with the wanted signal: the difference is the image rejection.",
      level="warning",
      title="Image frequency with nothing ahead of the mixer to reject it",
      explanation="""
      A mixer answers two inputs with the same IF: the wanted one and its image, mirrored about the
      LO on the far side (f_image = 2 f_LO - f_in, that is f_in - 2 f_IF for low-side and
      f_in + 2 f_IF for high-side injection). Whatever sits on the image frequency comes out in the
      IF on top of the wanted signal, and the IF filter cannot tell them apart. Only something ahead
      of the mixer can reject it: the bandwidth of the receiver or instrument whose IF output feeds
      the build, a preselector, or an earlier IF filter in a multi-conversion chain. The image
      should lie outside that passband, preferably well outside.
      """,
      fix="Declare what limits the input (source.bandwidth or source.preselector), add a preselector, or choose "
          "the injection side or IF that puts the image outside the upstream passband.",
      source="textbook (Tooley, Electronic Circuits: 455 kHz IF, tuned to 1200 kHz, LO 1655 kHz, image 2110 kHz)")
def image(build, ctx):
    for c in frequency_plan(build).conversions:
        if c.lo is None or c.f_in is None or not c.f_if:
            continue
        img = mixing.image_frequency(c.f_in, c.lo)
        ctx.publish("conversion", c.owner, "image frequency", img, "Hz")
        osc = c.stage.oscillator
        where = osc.at("injection") if osc is not None else c.stage.loc
        values = [Value("input", c.f_in, "Hz"), Value("LO", c.lo, "Hz"), Value("image", img, "Hz")]
        band = c.ahead
        if band is None:
            ctx.report(f"{c.owner}: the image at {hz(img)} ({khz(abs(img - c.f_in))} from the wanted "
                       f"{hz(c.f_in)}) converts to the IF too, and nothing declared ahead of the mixer rejects it",
                       where, values, stage=c.stage.label)
        elif band.holds(img):
            ctx.report(f"{c.owner}: the image at {hz(img)} lies inside {band.what}, so it reaches the mixer and "
                       f"lands on the IF with the wanted {hz(c.f_in)}", where,
                       values + [Value("passband low", band.low, "Hz"), Value("passband high", band.high, "Hz")],
                       stage=c.stage.label)
        else:
            outside = min(abs(img - band.low), abs(img - band.high))
            ctx.publish("conversion", c.owner, "image outside the passband ahead by", outside, "Hz")


@rule("freqplan.path-width", verify='Apply a carrier at full deviation and watch the recovered audio on a scope: a path narrower than the signal distorts the peaks; compare with the other path.',
      level="error",
      title="IF path narrower than the signal, or many times wider",
      explanation="""
      Every signal occupies a band: for FM, Carson's rule gives B = 2(peak deviation + highest audio
      frequency), and ITU-R SM.1138 gives the necessary bandwidth Bn = 2M + 2DK with K = 1, the same
      number. The emission designator writes it the ITU way (Radio Regulations Appendix 1): three
      significant figures with the unit letter standing for the decimal point, then the class,
      e.g. 16K0F3E for 5 kHz deviation and 3 kHz audio, 180KF3E for broadcast FM.

      The IF path that carries a signal (the narrow filter, or a wide bypass) must be at least that
      wide, or the detector sees a clipped spectrum: heavy distortion, and for broadcast FM through
      a narrowband filter hardly anything intelligible. A path several times wider than the signal
      (setting wide_factor, default 3) works but lets in noise and adjacent channels: a warning.
      """,
      fix="Route the signal through a path at least as wide as its necessary bandwidth (name it in the signal's "
          "path), or fit a filter closer to the signal's width.",
      source="ITU-R SM.1138 (Bn = 2M + 2DK); Radio Regulations Appendix 1 (designators); common practice: a 455 kHz "
             "ceramic filter of ±10 kHz is far too narrow for broadcast FM",
      settings={"wide_factor": 3.0})
def path_width(build, ctx):
    plan = frequency_plan(build)
    factor = setting(ctx, "wide_factor")
    for i, sig in enumerate(build.signals):
        need = necessary(sig)
        if need is None:
            if sig.modulation == "fm" and (sig.deviation is None or sig.audio_max is None):
                missing = "deviation" if sig.deviation is None else "audio_max"
                ctx.report(f"signal {sig.name}: signals[{i}].{missing} is not given, so its necessary bandwidth "
                           f"cannot be computed", sig.loc, level="note", stage="signals",
                           fix=f"Give signals[{i}].{missing}.")
            elif sig.modulation in ("am", "ssb") and sig.audio_max is None:
                ctx.report(f"signal {sig.name}: signals[{i}].audio_max is not given, so its necessary bandwidth "
                           f"cannot be computed", sig.loc, level="note", stage="signals",
                           fix=f"Give signals[{i}].audio_max.")
            continue
        bn, carson, designator = need
        if carson is not None:
            ctx.publish("signals", sig.name, "Carson bandwidth", carson, "Hz")
        ctx.publish("signals", sig.name, "necessary bandwidth (ITU-R SM.1138)", bn, "Hz")
        if designator:
            ctx.publish("signals", sig.name, "emission designator", designator)
        for point in plan.filters:
            pb = path_for(sig, point.paths)
            if pb is None or pb.width is None:
                continue
            where = sig.at("path")
            values = [Value("necessary bandwidth", bn, "Hz"), Value("path bandwidth", pb.width, "Hz")]
            if pb.width < bn:
                wider = [p for p in point.paths.values() if p.width is not None and p.width >= bn]
                hint = f"; the {wider[0].name} path ({khz(wider[0].width)}) would pass it" if wider else ""
                ctx.report(f"{sig.name} needs {khz(bn)}{f' ({designator})' if designator else ''} but the "
                           f"{pb.name} path passes only "
                           f"{khz(pb.width)} ({pb.describe()}){hint}", where, values, stage=point.stage.label,
                           fix=(f"Set the signal's path to {wider[0].name}." if wider else None))
            elif pb.width > factor * bn:
                ctx.report(f"the {pb.name} path ({khz(pb.width)}) is {pb.width / bn:.1f} times the {khz(bn)}"
                           f"{f' ({designator})' if designator else ''} that {sig.name} needs: it lets in noise "
                           "and neighbouring channels",
                           where, values, level="warning", stage=point.stage.label,
                           fix="Use a filter nearer the signal's necessary bandwidth for this signal.")


@rule("freqplan.upstream-bandwidth", verify="Step a generator across the upstream receiver's input and read the level at its IF output: the -6 dB points give its IF bandwidth.",
      level="error",
      title="Upstream IF or resolution bandwidth narrower than the signal",
      explanation="""
      When the build taps another receiver's or instrument's IF output, that equipment has already
      filtered the signal with its own IF or resolution bandwidth. Nothing downstream can restore
      what it cut: its bandwidth must cover each signal's necessary bandwidth. About 1 MHz of
      upstream bandwidth suits broadcast FM; a spectrum analyser's IF output at a narrow
      resolution bandwidth does not.
      """,
      fix="Set the upstream receiver or instrument to a wider IF or resolution bandwidth.",
      source="ITU-R SM.1138 (necessary bandwidth); common practice: about 1 MHz upstream suits broadcast FM")
def upstream_bandwidth(build, ctx):
    src = build.source
    if src is None or src.kind not in ("receiver-if", "instrument-if"):
        return
    needs = [(sig, necessary(sig)) for sig in build.signals]
    needs = [(sig, n) for sig, n in needs if n is not None]
    if not needs:
        return
    if src.bandwidth is None:
        ctx.report("source.bandwidth is not given: the upstream IF or resolution bandwidth cannot be checked "
                   "against the signals", src.loc, level="note", stage="source",
                   fix="Give source.bandwidth (the upstream IF or resolution bandwidth).")
        return
    bw = src.bandwidth.si
    for sig, (bn, _, designator) in needs:
        if bw < bn:
            ctx.report(f"the upstream bandwidth {khz(bw)} is narrower than the {khz(bn)}"
                       f"{f' ({designator})' if designator else ''} that "
                       f"{sig.name} needs: the source has cut the signal before it reaches the build",
                       src.at("bandwidth"), [Value("upstream bandwidth", bw, "Hz"),
                                             Value("necessary bandwidth", bn, "Hz")], stage="source")
