"""freqplan: conversion arithmetic and the signal inside the filter at the worst-case IF."""

from __future__ import annotations

from speccheck import responses
from speccheck.chain import (
    FilterPoint,
    PathBand,
    frequency_plan,
    hz,
    khz,
    necessary,
    path_for,
)
from speccheck.findings import Value
from speccheck.formulas import mixing
from speccheck.registry import rule

from .common import (
    SHARE_LEVELS,
    missing_note,
    passed,
    passed_fm,
    setting,
    share_level,
    share_settings,
    share_text,
    tone_text,
)


@rule("freqplan.conversion",
      verify="""
      Measure the LO with a frequency counter at a buffered output or a loosely coupled probe, and the IF
      at the mixer output with a receiver or spectrum analyser.
      """,
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
      which it is. An LO equal to the input gives no IF at all. An if_frequency that differs from
      the IF the LO and the input give by more than a share of it (setting intended_share,
      default 1 %) is a warning: one of the plan's numbers is wrong, and whatever was designed
      from the stated IF (a filter, a tank) is designed for a frequency the mixer does not make.
      """,
      fix="Choose the LO as f_in - f_IF (low side) or f_in + f_IF (high side) and declare the side.",
      source="textbook mixer arithmetic (e.g. Tooley, Electronic Circuits); common practice: a 21.4 MHz IF "
             "to 455 kHz low side needs a 20.945 MHz LO",
      settings={"intended_share": 0.01})
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
            ctx.publish(
                "conversion",
                c.owner,
                "LO shift by crystal pulling",
                round(c.lo - c.lo / (1 + c.pull), 3),
                "Hz",
            )
        ctx.publish("conversion", c.owner, "LO worst-case spread (±)", c.lo_unc, "Hz")
        ctx.publish("conversion", c.owner, "injection", f"{c.side} side")
        if c.f_if <= 0:
            ctx.report(
                f"{c.owner}: the LO ({hz(c.lo)}) equals the input ({hz(c.f_in)}); the mixer makes no IF",
                c.lo_at or osc.loc,
                [Value("LO", c.lo, "Hz"), Value("input", c.f_in, "Hz")],
                stage=stage.label,
            )
            continue
        ctx.publish("conversion", c.owner, "IF (nominal)", c.f_if, "Hz")
        ctx.publish("conversion", c.owner, "IF lowest (worst case)", c.f_if - c.if_unc, "Hz")
        ctx.publish("conversion", c.owner, "IF highest (worst case)", c.f_if + c.if_unc, "Hz")
        if c.intended is not None:
            ctx.publish("conversion", c.owner, "IF offset from intended", round(c.f_if - c.intended, 3), "Hz")
            share = setting(ctx, "intended_share")
            if abs(c.f_if - c.intended) > share * c.intended:
                ctx.report(
                    f"{c.owner}: the plan states an IF of {hz(c.intended)}, but the LO ({hz(c.lo)}) and "
                    f"the input ({hz(c.f_in)}) give {hz(c.f_if)}, {hz(abs(c.f_if - c.intended))} from it: "
                    "one of these numbers is wrong",
                    c.stage.at("if_frequency"),
                    [Value("IF stated", c.intended, "Hz"), Value("IF computed", c.f_if, "Hz"),
                     Value("LO", c.lo, "Hz"), Value("input", c.f_in, "Hz")],
                    level="warning",
                    stage=stage.label,
                    fix="Correct if_frequency, or the crystal or oscillator frequency, so the two agree.",
                )
        if c.assumed or (
            c is plan.conversions[0] and build.source is not None and build.source.drift is None
        ):
            counted = [f"{p} (counted as {v})" for p, v in c.assumed]
            if c is plan.conversions[0] and build.source is not None and build.source.drift is None:
                counted.append("source.drift (counted as 0 Hz)")
            only_source = not c.assumed  # then the note is about the source section, so point there
            ctx.report(
                f"{c.owner}: the worst-case IF leaves out what is not given: {', '.join(counted)}",
                build.source.loc if only_source else (c.lo_at or osc.loc),
                level="note",
                stage=stage.label,
                fix="Give the crystal tolerance and the source drift so the worst case is real.",
            )
        if osc.injection in ("low", "high") and osc.injection != c.side:
            image = mixing.image_frequency(c.f_in, c.lo)
            ctx.report(
                f"{c.owner}: injection is declared {osc.injection} side, but the LO ({hz(c.lo)}) is "
                f"{'below' if c.side == 'low' else 'above'} the input ({hz(c.f_in)}): the IF is "
                f"still {hz(c.f_if)}, but the spectrum is "
                f"{'not ' if c.side == 'low' else ''}inverted and the image lies at {hz(image)}",
                osc.at("injection"),
                [Value("LO", c.lo, "Hz"), Value("input", c.f_in, "Hz"), Value("image", image, "Hz")],
                level="warning",
                stage=stage.label,
                fix=f"Declare injection: {c.side}, or choose the LO on the {osc.injection} side "
                f"({hz(mixing.lo_for(c.f_in, c.intended or c.f_if, osc.injection))}).",
            )
        if c.filter is None:
            ctx.report(
                f"{c.owner}: no if-filter stage follows, so the IF of {hz(c.f_if)} is checked "
                "against no passband",
                stage.loc,
                [Value("IF", c.f_if, "Hz")],
                level="note",
                stage=stage.label,
                fix="Add the if-filter stage (with its filter part or passband) after the conversion.",
            )


@rule(
    "freqplan.filter-fit",
    verify="""
      Feed a generator at the input frequency, step it across the signal's width, and watch the level
      after the filter: the whole signal must sit on the filter's flat top.
      """,
    level="error",
    title="Signal must stay inside the IF filter at the worst-case IF",
    explanation="""
      The filter after the mixer passes a band around its centre. The signal arrives at the IF the
      LO actually makes, give or take the crystal tolerance, the crystal's pulling, oscillator
      drift and the drift of the source. A wrong crystal, or one pulled by the wrong load
      capacitors, can put the signal on the filter's skirt or outside it: one side of the
      spectrum is cut, the audio distorts, the squelch chatters.

      speccheck models the filter's response shape (its bandwidth and the level it is stated
      at, its stopband, shape factor or the typical shape of its class) and the FM signal's Bessel
      spectrum for its highest audio tone at full deviation, and computes the share of the
      signal's power the filter passes with the carrier at each end of the worst-case IF. The
      levels follow the path-width rule's shares (see `speccheck explain freqplan.path-width`):
      an error below error_share (default 50 %, more than 3 dB lost: the spectrum is clearly
      cut), a warning below warning_share (default 80 %, 1 dB); a shortfall the filter has even
      on centre is left to freqplan.path-width. For a signal that is not FM the old comparison
      stands: the necessary bandwidth, shifted by the worst case, must lie inside the passband.
      """,
    fix="Use the crystal (and load capacitors) that put the IF on the filter's centre, or a filter "
    "centred on the IF the oscillator makes; reduce drift where the margin is thin.",
    source="Bessel spectrum of FM (Haykin, Communication Systems; Abramowitz & Stegun ch. 9); filter "
    "shapes (Williams & Taylor, Electronic Filter Design Handbook); the share levels: common "
    "practice",
    settings=dict(SHARE_LEVELS),
)
def filter_fit(build, ctx):
    plan = frequency_plan(build)
    levels = share_settings(ctx)
    published = set()
    for point in plan.filters:
        if point.f is None:
            continue
        for sig in build.signals:
            need = necessary(sig)
            pb = path_for(sig, point.paths)
            if need is None or pb is None or pb.width is None or pb.center is None:
                continue
            owner_name = f"{pb.name} path"
            if id(pb) not in published:
                published.add(id(pb))
                ctx.publish("if-filter", owner_name, "passband low edge", pb.low, "Hz")
                ctx.publish("if-filter", owner_name, "passband high edge", pb.high, "Hz")
                if pb.shape is not None:  # the curve the shares come from, for the pictures
                    for name, value, unit in responses.shape_entries(pb.shape):
                        ctx.publish("if-filter", owner_name, name, value, unit)
            fit_one(ctx, build, sig, need[0], point, pb, levels)


def fit_one(ctx, build, sig, bn: float, point: FilterPoint, pb: PathBand, levels: dict) -> None:
    """filter-fit for one signal on one path (one configuration of the build)."""
    band, f_if = pb.passband(), point.f
    if band is None or f_if is None:  # filter_fit weighs only a path with a passband on a known IF
        return
    owner_name = f"{pb.name} path"
    sig_lo, sig_hi = f_if - point.unc - bn / 2, f_if + point.unc + bn / 2
    margin = min(band.high - sig_hi, sig_lo - band.low)
    ctx.publish("if-filter", owner_name, f"margin for {sig.name} (worst case)", margin, "Hz")
    on_centre = passed(sig, pb.shape.attenuation, 0.0) if pb.shape else None
    conv = point.conversion
    cause = f"LO {hz(conv.lo)}" if conv is not None and conv.lo is not None else "the input"
    spread = f"{hz(f_if)} ± {khz(point.unc)} ({cause}; {point.why})"
    values = [
        Value("IF (nominal)", f_if, "Hz"),
        Value("IF spread (±)", point.unc, "Hz"),
        Value("necessary bandwidth", bn, "Hz"),
        Value("passband low", band.low, "Hz"),
        Value("passband high", band.high, "Hz"),
        Value("margin", margin, "Hz"),
    ]
    level: str | None  # None: no finding
    if pb.shape is None or on_centre is None:  # not FM: the necessary band against the passband edges
        if bn > band.width or margin >= 0:
            return
        level, what = (
            "error",
            (
                f"the {khz(bn)} signal reaches {hz(sig_lo)} to {hz(sig_hi)}, {khz(-margin)} "
                f"past the passband {hz(band.low)} to {hz(band.high)} ({pb.describe()})"
            ),
        )
        fixable = bn + 2 * point.unc <= band.width
    else:
        worst = min(
            passed_fm(sig, pb.shape.attenuation, f - band.center)
            for f in (f_if - point.unc, f_if + point.unc)
        )
        ctx.publish(
            "if-filter",
            owner_name,
            f"share of {sig.name} passed at the worst-case IF",
            round(worst * 100, 2),
            "%",
        )
        centre_level = share_level(on_centre, levels)
        if centre_level == "error":
            return  # too narrow even on centre: freqplan.path-width says so
        level = share_level(worst, levels)
        rank = {None: 0, "note": 1, "warning": 2, "error": 3}
        if rank[level] < 2 or rank[level] <= rank[centre_level]:
            return  # the offset costs no more than the width itself: freqplan.path-width's verdict
        values += [
            Value("share passed (worst case)", worst * 100, "%"),
            Value("share passed (on the filter's centre)", on_centre * 100, "%"),
        ]
        what = (
            f"the {pb.name} path ({pb.describe()}; {pb.shape.what}) passes {share_text(worst)} of the "
            f"power of {tone_text(sig)} there, against {share_text(on_centre)} on its centre"
        )
        spread_only = min(passed_fm(sig, pb.shape.attenuation, u) for u in (-point.unc, point.unc))
        fixable = rank[share_level(spread_only, levels)] < 2  # centring the IF would clear it
    # The offset is the cause when the signal fits on the filter's centre: point at what sets
    # the frequency (the crystal, the LO); otherwise at the filter.
    if fixable and conv is not None and conv.lo_at is not None:
        where = conv.lo_at
    elif fixable and conv is None and build.source is not None:
        where = build.source.at("frequency")
    else:
        where = pb.at()
    if level == "error":
        ctx.report(
            f"{sig.name} does not fit the {pb.name} path at the worst-case IF: the IF is {spread}, so {what}",
            where,
            values,
            stage=point.stage.label,
        )
    else:
        ctx.report(
            f"{sig.name} sits on the skirt of the {pb.name} path at the worst-case IF: the IF is "
            f"{spread}, so {what}",
            where,
            values,
            level="warning",
            stage=point.stage.label,
        )
