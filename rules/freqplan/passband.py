"""freqplan: the image, the necessary bandwidth against the IF path, the upstream bandwidth."""

from __future__ import annotations

from speccheck import responses
from speccheck.chain import (
    Band,
    Conversion,
    FilterPoint,
    PathBand,
    frequency_plan,
    hz,
    khz,
    necessary,
    path_for,
    response_shape,
    source_shape,
)
from speccheck.findings import Value
from speccheck.formulas import fmspectrum, mixing, shapes
from speccheck.registry import rule

from .common import (
    SHARE_LEVELS,
    passed,
    passed_fm,
    setting,
    share_level,
    share_settings,
    share_text,
    tone_text,
    width_for,
    worst_tone,
)

# ---- 2. image ----------------------------------------------------------------------------


@rule(
    "freqplan.image",
    verify="""
      Set a generator to the image frequency at the wanted signal's level and compare the RSSI or audio
      with the wanted signal: the difference is the image rejection.
      """,
    level="warning",
    title="Image frequency weakly rejected ahead of the mixer",
    explanation="""
      A mixer answers two inputs with the same IF: the wanted one and its image, mirrored about the
      LO on the far side (f_image = 2 f_LO - f_in, that is f_in - 2 f_IF for low-side and
      f_in + 2 f_IF for high-side injection). Whatever sits on the image frequency comes out in the
      IF on top of the wanted signal, and the IF filter cannot tell them apart. Only something ahead
      of the mixer can reject it: the bandwidth of the receiver or instrument whose IF output feeds
      the build, a preselector, or an earlier IF filter in a multi-conversion chain.

      speccheck computes that rejection in dB from the response shape of each filter ahead (the
      stated stopband or shape factor, or the typical shape of its class; an instrument's
      resolution filter is Gaussian, quoted at 3 dB, so 1 MHz of it rejects an image 910 kHz
      from its centre by only about 10 dB). Below warning_db (default 20 dB) a signal on the
      image is heard nearly as well as the wanted one: a warning; below note_db (default 40 dB)
      a strong one still gets through: a note. Both figures are common practice for a simple
      converter, not a standard.
      """,
    fix="Declare what limits the input (source.bandwidth or source.preselector) with its shape, add a "
    "preselector, or choose the injection side or IF that puts the image further out.",
    source="textbook (Tooley, Electronic Circuits: 455 kHz IF, tuned to 1200 kHz, LO 1655 kHz, image 2110 "
    "kHz); Gaussian and equivalent-Butterworth shapes (speccheck.formulas.shapes); thresholds: "
    "common practice",
    settings={"warning_db": 20.0, "note_db": 40.0},
)
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
        if band is not None:  # the passband ahead of the mixer, for the frequency-plan picture
            ctx.publish("conversion", c.owner, "passband ahead low edge", band.low, "Hz")
            ctx.publish("conversion", c.owner, "passband ahead high edge", band.high, "Hz")
            for k, (centre, shape) in enumerate(band.responses):  # the curves the rejection comes from
                for name, value, unit in responses.shape_entries(shape, responses.ahead_prefix(k), centre):
                    ctx.publish("conversion", c.owner, name, value, unit)
        if band is None:
            ctx.report(
                f"{c.owner}: the image at {hz(img)} ({khz(abs(img - c.f_in))} from the wanted "
                f"{hz(c.f_in)}) converts to the IF too, and nothing declared ahead of the mixer "
                "rejects it",
                where,
                values,
                stage=c.stage.label,
            )
            continue
        image_verdict(ctx, c, img, band, where, values)


def image_verdict(ctx, c: Conversion, img: float, band: Band, where, values: list) -> None:
    f_in = c.f_in
    assert f_in is not None  # image() weighs only a conversion whose input frequency is known
    rejection = band.attenuation(img) - band.attenuation(f_in)
    ctx.publish("conversion", c.owner, "image rejection ahead of the mixer", round(rejection, 1), "dB")
    if not band.holds(img):
        outside = min(abs(img - band.low), abs(img - band.high))
        ctx.publish("conversion", c.owner, "image outside the passband ahead by", outside, "Hz")
    values = values + [
        Value("passband low", band.low, "Hz"),
        Value("passband high", band.high, "Hz"),
        Value("image rejection", rejection, "dB"),
    ]
    typical = any(shape.typical for _, shape in band.responses)
    shapes_used = "; ".join(shape.what for _, shape in band.responses if shape.what)
    assumed = f" ({shapes_used}{'; state its stopband or shape_factor for a real figure' if typical else ''})"
    warn, note = setting(ctx, "warning_db"), setting(ctx, "note_db")
    if rejection >= note:
        return
    where_it = f"lies inside {band.what}" if band.holds(img) else f"lies outside {band.what}"
    ctx.report(
        f"{c.owner}: the image at {hz(img)} {where_it}, which rejects it by only {rejection:.1f} dB"
        f"{assumed}: a signal there lands on the IF with the wanted {hz(f_in)}",
        where,
        values,
        level="warning" if rejection < warn else "note",
        stage=c.stage.label,
    )


# ---- 3. necessary bandwidth against the IF path --------------------------------------------------


@rule(
    "freqplan.path-width",
    verify="""
      Apply a carrier at full deviation and watch the recovered audio on a scope: a path narrower than the
      signal distorts the peaks; compare with the other path.
      """,
    level="error",
    title="IF path that cuts the signal's spectrum, or is many times wider",
    explanation="""
      Every signal occupies a band: for FM, Carson's rule gives B = 2(peak deviation + highest audio
      frequency), and ITU-R SM.1138 gives the necessary bandwidth Bn = 2M + 2DK with K = 1, the same
      number. The emission designator writes it the ITU way (Radio Regulations Appendix 1), e.g.
      16K0F3E for 5 kHz deviation and 3 kHz audio, 180KF3E for broadcast FM. Carson's band holds
      about 98 % of the signal's power; it is not a limit to compare with a filter's 6 dB points.

      speccheck takes the signal's spectrum as the textbook Bessel-function sidebands of its
      highest audio tone at full deviation (the widest single-tone spectrum of the channel) and
      the path's response shape (its bandwidth and the level it is stated at, its stopband or
      shape factor, or the typical shape of its class), and computes the share of the signal's power the path
      passes, in % and dB:
      - below error_share (default 50 %: more than half the power, 3 dB, the half-power
        convention) the spectrum is clearly cut: heavy distortion on the bench, an error;
      - below warning_share (default 80 %, 1 dB) the peaks of high tones distort: a warning;
      - below note_share (default 98 %, the share Carson's band holds) the outermost sidebands
        are trimmed, as with a ±7.5 kHz filter for ±5 kHz voice: a note, no action needed.
      The thresholds are common practice (settings), not a standard. A path several times
      wider than the signal (setting wide_factor, default 3) works but lets in noise and
      adjacent channels: a warning. With the signal's channel_spacing given, the path's
      rejection of the adjacent channel is put on the design sheet in dB.
      """,
    fix="Route the signal through a path that passes its spectrum (name it in the signal's path), or fit a "
    "filter of at least the width shown.",
    source="ITU-R SM.1138 (Bn = 2M + 2DK); Radio Regulations Appendix 1 (designators); Bessel spectrum of "
    "FM (Haykin, Communication Systems; Abramowitz & Stegun ch. 9); Carson's 98 %; share levels: "
    "common practice",
    settings={"wide_factor": 3.0, **SHARE_LEVELS},
)
def path_width(build, ctx):
    plan = frequency_plan(build)
    for i, sig in enumerate(build.signals):
        need = necessary(sig)
        if need is None:
            if sig.modulation == "fm" and (sig.deviation is None or sig.audio_max is None):
                missing = "deviation" if sig.deviation is None else "audio_max"
                ctx.report(
                    f"signal {sig.name}: signals[{i}].{missing} is not given, so its necessary "
                    "bandwidth cannot be computed",
                    sig.loc,
                    level="note",
                    stage="signals",
                    fix=f"Give signals[{i}].{missing}.",
                )
            elif sig.modulation in ("am", "ssb") and sig.audio_max is None:
                ctx.report(
                    f"signal {sig.name}: signals[{i}].audio_max is not given, so its necessary "
                    "bandwidth cannot be computed",
                    sig.loc,
                    level="note",
                    stage="signals",
                    fix=f"Give signals[{i}].audio_max.",
                )
            continue
        bn, carson, designator = need
        tone = worst_tone(sig)
        if carson is not None and tone is not None:  # an FM signal: Carson's rule needs its tone
            ctx.publish("signals", sig.name, "Carson bandwidth", carson, "Hz")
            ctx.publish(
                "signals",
                sig.name,
                "power inside Carson's band (worst tone)",
                round(fmspectrum.carson_share(*tone) * 100, 2),
                "%",
            )
        ctx.publish("signals", sig.name, "necessary bandwidth (ITU-R SM.1138)", bn, "Hz")
        tone = worst_tone(sig)
        if tone is not None:  # the tone every share is computed with, for the spectrum pictures
            for name, value, unit in responses.tone_entries(*tone):
                ctx.publish("signals", sig.name, name, value, unit)
        if designator:
            ctx.publish("signals", sig.name, "emission designator", designator)
        for point in plan.filters:
            pb = path_for(sig, point.paths)
            if pb is not None and pb.width is not None:
                width_one(ctx, sig, need, point, pb)


def width_one(ctx, sig, need: tuple, point: FilterPoint, pb: PathBand) -> None:
    """path-width for one signal on one path (one configuration of the build)."""
    width = pb.width
    assert width is not None  # path_width weighs only a path whose width is known
    bn, _, designator = need
    levels = share_settings(ctx)
    factor = setting(ctx, "wide_factor")
    des = f" ({designator})" if designator else ""
    where = sig.at("path")
    values = [Value("necessary bandwidth", bn, "Hz"), Value("path bandwidth", width, "Hz")]
    offset = 0.0  # the width question, on the filter's centre; freqplan.filter-fit weighs the offset
    share = passed(sig, pb.shape.attenuation, offset) if pb.shape else None
    owner_name = f"{pb.name} path"
    if pb.shape is not None and sig.channel_spacing is not None:
        acr = pb.shape.attenuation(sig.channel_spacing.si) - pb.shape.attenuation(0.0)
        ctx.publish(
            "if-filter",
            owner_name,
            f"adjacent-channel rejection for {sig.name} (±{khz(sig.channel_spacing.si)})",
            round(acr, 1),
            "dB",
        )
    if pb.shape is None or share is None:  # not FM: the necessary bandwidth against the path's stated width
        if width < bn:
            wider = [(p.name, w) for p in point.paths.values() if (w := p.width) is not None and w >= bn]
            hint, fix = "", None
            if wider:
                name, w = wider[0]
                hint, fix = f"; the {name} path ({khz(w)}) would pass it", f"Set the signal's path to {name}."
            ctx.report(
                f"{sig.name} needs {khz(bn)}{des} but the {pb.name} path passes only {khz(width)} "
                f"({pb.describe()}){hint}",
                where,
                values,
                stage=point.stage.label,
                fix=fix,
            )
        elif width > factor * bn:
            _too_wide(ctx, sig, pb, bn, des, factor, where, values, point)
        return
    ctx.publish("if-filter", owner_name, f"share of {sig.name} passed", round(share * 100, 2), "%")
    level = share_level(share, levels)
    if level is None:
        if width > factor * bn:
            _too_wide(ctx, sig, pb, bn, des, factor, where, values, point)
        return
    values += [Value("share passed", share * 100, "%"), Value("loss", fmspectrum.loss_db(share), "dB")]
    shape = pb.shape.what
    head = (
        f"{sig.name} needs {khz(bn)}{des} but the {pb.name} path passes only {khz(width)} "
        f"({pb.describe()}; {shape}): {share_text(share)} of the power of {tone_text(sig)}"
    )
    if level == "note":
        ctx.report(
            f"the {pb.name} path ({khz(width)}, {shape}) passes {share_text(share)} of the power "
            f"of {tone_text(sig)} for {sig.name} ({khz(bn)}{des}): only the outermost sidebands of "
            "the highest tones are trimmed; usual practice, no change needed",
            where,
            values,
            level="note",
            stage=point.stage.label,
            fix="",
        )
        return
    # A builder's fix: another path that passes it without being far too wide, else the width needed.
    better = []
    for p in point.paths.values():
        band = p.passband()
        if p is pb or p.shape is None or band is None:
            continue
        s = passed_fm(sig, p.shape.attenuation, (point.f or band.center) - band.center)
        if share_level(s, levels) in (None, "note") and (level == "error" or band.width <= factor * bn):
            better.append((p.name, band.width, s))
    need_width = width_for(sig, lambda w: response_shape(w, pb.path, pb.part), levels["note_share"], offset)
    if better:
        name, w, s = max(better, key=lambda t: t[2])
        hint = f"; the {name} path ({khz(w)}) would pass {share_text(s)} of it"
        fix = f"Set the signal's path to {name}."
    else:
        hint = ""
        fix = (
            f"Fit a filter of about {khz(need_width)} at {pb.shape.at_db:g} dB (it passes "
            f"{levels['note_share']:.0%}), or reduce the deviation or the highest audio frequency."
            if need_width
            else "Fit a wider filter, or reduce the deviation or the highest audio frequency."
        )
    tail = (
        ": the spectrum is clearly cut and the audio distorts badly"
        if level == "error"
        else ": the peaks of high tones at full deviation distort"
    )
    ctx.report(head + tail + hint, where, values, level=level, stage=point.stage.label, fix=fix)


def _too_wide(ctx, sig, pb, bn, des, factor, where, values, point):
    ctx.report(
        f"the {pb.name} path ({khz(pb.width)}) is {pb.width / bn:.1f} times the {khz(bn)}{des} that "
        f"{sig.name} needs: it lets in noise and neighbouring channels",
        where,
        values,
        level="warning",
        stage=point.stage.label,
        fix="Use a filter nearer the signal's necessary bandwidth for this signal.",
    )


# ---- 4. upstream bandwidth ---------------------------------------------------------------


@rule(
    "freqplan.upstream-bandwidth",
    verify="""
      Step a generator across the upstream receiver's input and read the level at its IF output: the -6 dB
      points give its IF bandwidth.
      """,
    level="error",
    title="Upstream IF or resolution bandwidth that cuts the signal",
    explanation="""
      When the build taps another receiver's or instrument's IF output, that equipment has already
      filtered the signal with its own IF or resolution bandwidth. Nothing downstream can restore
      what it cut. speccheck computes the share of each signal's power the upstream response
      passes (the Bessel spectrum of the highest audio tone at full deviation through the
      upstream shape: an instrument's resolution filter is Gaussian, quoted at 3 dB; a
      receiver's IF the typical ceramic shape unless stated) and grades it with the same shares
      as freqplan.path-width: an error below 50 % (3 dB), a warning below 80 %, a note below
      98 %. About 1 MHz of upstream bandwidth suits broadcast FM; a spectrum analyser's IF
      output at a narrow resolution bandwidth does not.
      """,
    fix="Set the upstream receiver or instrument to a wider IF or resolution bandwidth.",
    source="ITU-R SM.1138 (necessary bandwidth); Bessel spectrum of FM (Haykin); Gaussian resolution "
    "filter (speccheck.formulas.shapes); common practice: about 1 MHz upstream suits broadcast FM",
    settings=dict(SHARE_LEVELS),
)
def upstream_bandwidth(build, ctx):
    src = build.source
    if src is None or src.kind not in ("receiver-if", "instrument-if"):
        return
    needs = [(sig, necessary(sig)) for sig in build.signals]
    needs = [(sig, n) for sig, n in needs if n is not None]
    if not needs:
        return
    if src.bandwidth is None:
        ctx.report(
            "source.bandwidth is not given: the upstream IF or resolution bandwidth cannot be checked "
            "against the signals",
            src.loc,
            level="note",
            stage="source",
            fix="Give source.bandwidth (the upstream IF or resolution bandwidth).",
        )
        return
    for sig, need in needs:
        upstream_one(ctx, src, sig, need)


def upstream_one(ctx, src, sig, need: tuple) -> None:
    """upstream-bandwidth for one signal (one configuration of the build)."""
    bn, _, designator = need
    bw = src.bandwidth.si
    des = f" ({designator})" if designator else ""
    values = [Value("upstream bandwidth", bw, "Hz"), Value("necessary bandwidth", bn, "Hz")]
    shape = source_shape(src)
    share = passed(sig, shape.attenuation) if shape is not None else None
    if shape is None or share is None:
        if bw < bn:
            ctx.report(
                f"the upstream bandwidth {khz(bw)} is narrower than the {khz(bn)}{des} that "
                f"{sig.name} needs: the source has cut the signal before it reaches the build",
                src.at("bandwidth"),
                values,
                stage="source",
            )
        return
    levels = share_settings(ctx)
    ctx.publish("source", "upstream", f"share of {sig.name} passed", round(share * 100, 2), "%")
    level = share_level(share, levels)
    if level is None:
        return
    values += [Value("share passed", share * 100, "%"), Value("loss", fmspectrum.loss_db(share), "dB")]
    what = shape.what
    if level == "note":
        ctx.report(
            f"the upstream bandwidth {khz(bw)} ({what}) passes {share_text(share)} of the power of "
            f"{tone_text(sig)} for {sig.name} ({khz(bn)}{des}): only the outermost sidebands are "
            "trimmed; usual practice",
            src.at("bandwidth"),
            values,
            level="note",
            stage="source",
            fix="",
        )
        return
    need_width = width_for(
        sig,
        lambda w: response_shape(
            w, src, default=("gaussian" if src.kind == "instrument-if" else shapes.DEFAULT_CLASS)
        ),
        levels["note_share"],
    )
    fix = (
        f"Set the upstream receiver or instrument to about {khz(need_width)} or more."
        if need_width
        else "Set the upstream receiver or instrument to a wider IF or resolution bandwidth."
    )
    ctx.report(
        f"the upstream bandwidth {khz(bw)} ({what}) passes only {share_text(share)} of the power of "
        f"{tone_text(sig)}, the {khz(bn)}{des} that {sig.name} needs: the source has "
        + (
            "cut the signal before it reaches the build"
            if level == "error"
            else "trimmed the signal's high tones at full deviation"
        ),
        src.at("bandwidth"),
        values,
        level=level,
        stage="source",
        fix=fix,
    )
