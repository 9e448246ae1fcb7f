"""freqplan: the FM de-emphasis and the audio low-pass corner after the detector."""

from __future__ import annotations

from speccheck import loads, units
from speccheck.chain import khz, owner, part_value
from speccheck.findings import Value
from speccheck.formulas import audio
from speccheck.registry import rule

from .common import setting


def _rc(build, stage):
    """(time constant, Location to point at) of an RC stage: from R and C, time_constant or corner."""
    if stage.time_constant is not None:
        return stage.time_constant.si, stage.at("time_constant")
    if stage.corner is not None:
        return audio.rc_time_constant(stage.corner.si), stage.at("corner")
    r, c = part_value(build, stage.resistor), part_value(build, stage.capacitor)
    if r is None or c is None:
        return None, None
    return r * c, build.part(stage.capacitor).at("value")


def _say_unlisted(ctx, build, stage) -> None:
    """A note for each capacitor counted on the stage's node that the stage does not list."""
    if not stage.unlisted:
        return
    counted = build.part(stage.capacitor)
    total = f" ({counted.value.text} = {units.fmt(counted.value.si, 'F')} in all)" \
        if counted is not None and counted.value is not None else ""
    listed = [r for r in (counted.combined_from if counted is not None else ()) if
              r not in {ref for ref, _, _ in stage.unlisted}]
    for ref, node, through in stage.unlisted:
        part = build.part(ref)
        where = f" in {through}" if through else ""
        ctx.report(f"{ref} is on {node}{where} but not in the {stage.label} stage: it is counted in "
                   f"parallel with {', '.join(listed) or 'the listed capacitor'}{total}; list it in the "
                   "stage's capacitor", part.loc if part is not None else stage.loc,
                   [Value("node", node), Value("counted capacitance", counted.value.si, "F")]
                   if counted is not None and counted.value is not None else [Value("node", node)],
                   level="note", stage=stage.label)


def _as_wired(ctx, build, stage, tau: float, what: str) -> tuple:
    """(time constant as wired, Load or None) of an RC stage given by its parts: a plain resistive
    load R_L on its output makes the source behind C the Thevenin resistance R || R_L, so
    tau = (R || R_L)·C, with the divider's flat loss. Publishes the as-wired figures beside the
    RC alone's; a load that is not a plain resistance is named and the RC alone is kept."""
    if stage.time_constant is not None or stage.corner is not None:
        return tau, None  # given as a figure, not as parts: nothing to load
    load = loads.resistive_load(build, stage)
    if load is None:
        return tau, None
    who = owner(build, stage)
    if isinstance(load, loads.NotPlain):
        ctx.publish("audio", who, f"load on the {what} output",
                    f"{', '.join(load.parts)}: not a plain resistance at the corner "
                    f"({', '.join(load.reactive)} too small to count as a short), so the figures are "
                    "the RC alone's (speccheck spice simulates it as wired)")
        return tau, None
    r = part_value(build, stage.resistor)
    return audio.parallel(r, load.ohms) * (tau / r), load


def _publish_load(ctx, build, stage, load, what: str) -> None:
    who, r = owner(build, stage), part_value(build, stage.resistor)
    ctx.publish("audio", who, f"load on the {what} output", _load_text(build, stage, load))
    ctx.publish("audio", who, f"{what} passband loss as wired", audio.divider_loss_db(r, load.ohms), "dB")


def _load_text(build, stage, load) -> str:
    shorted = f" through {', '.join(load.shorted)}" if load.shorted else ""
    rest = [n for n in load.parts if n not in load.shorted]
    return f"{', '.join(rest)} ({units.fmt(load.ohms, 'Ω')}{shorted})"


@rule("freqplan.de-emphasis",
      verify="""
      Feed tones at constant deviation and read the audio output: the level is 3 dB down at the
      de-emphasis corner frequency.
      """,
      level="warning",
      title="De-emphasis time constant for broadcast FM",
      explanation="""
      FM broadcasting boosts the treble before transmission (pre-emphasis) so that the receiver can
      cut it again together with the hiss. The receiver's de-emphasis must use the same time
      constant as the transmitters it hears: 50 µs or 75 µs (ITU-R BS.450-3; 75 µs in the United
      States per 47 CFR 73.317). speccheck takes 75 µs for ITU Region 2 (the Americas) and 50 µs
      for Regions 1 and 3 (that mapping is from memory; a few countries differ, so check your own). The
      corner of a first-order de-emphasis is f = 1 / (2 pi tau): 3183 Hz for 50 µs, 2122 Hz for
      75 µs. When a plain resistance R_L loads the network's output, the time constant that
      counts is (R || R_L) x C (Thevenin); that as-wired figure is the one checked. The
      wrong one makes the audio dull or shrill; none at all leaves it harsh and hissy.
      """,
      fix="Make R x C of the de-emphasis network equal to the region's time constant (e.g. 5.1 kohm with 10 "
          "nF for 50 µs, 7.5 kohm with 10 nF for 75 µs).",
      source="ITU-R BS.450-3 (50 µs / 75 µs, peak deviation 75 kHz); 47 CFR 73.317 and 73.1570; region "
             "mapping from memory",
      settings={"tolerance": 0.1})
def de_emphasis(build, ctx):
    stages = build.stages("de-emphasis")
    measured = []
    for stage in stages:
        tau, where = _rc(build, stage)
        if tau is None:
            continue
        _say_unlisted(ctx, build, stage)
        who = owner(build, stage)
        ctx.publish("audio", who, "de-emphasis time constant", tau, "s")
        ctx.publish("audio", who, "de-emphasis corner", audio.corner_from_tau(tau), "Hz")
        wired, load = _as_wired(ctx, build, stage, tau, "de-emphasis")
        if load is not None:
            ctx.publish("audio", who, "de-emphasis time constant as wired", wired, "s")
            ctx.publish("audio", who, "de-emphasis corner as wired", audio.corner_from_tau(wired), "Hz")
            _publish_load(ctx, build, stage, load, "de-emphasis")
        measured.append((stage, wired, where, load))
    broadcast = [s for s in build.signals if s.service == "broadcast" and s.modulation == "fm"]
    if not broadcast:
        return
    region = build.build.region if build.build is not None else None
    if region not in audio.DEEMPHASIS:
        ctx.report("build.region is not given, so the broadcast de-emphasis (50 µs or 75 µs) cannot be "
                   "checked",
                   build.build.loc if build.build is not None else build.loc, level="note", stage="audio",
                   fix="Give build.region (itu-region-1, -2 or -3).")
        return
    want = audio.DEEMPHASIS[region]
    sig = broadcast[0]
    if not stages:
        ctx.report(f"{sig.name} is broadcast FM but the chain has no de-emphasis stage: the audio will be "
                   f"harsh and hissy ({region} uses {want * 1e6:g} µs)",
                   sig.at("service"), [Value("wanted", want, "s")],
                   stage="audio",
                   fix=f"Add a de-emphasis stage with R x C = {want * 1e6:g} µs after the detector.")
        return
    tol = setting(ctx, "tolerance")
    for stage, tau, where, load in measured:
        if abs(tau / want - 1) > tol:
            wired = "" if load is None else f" as wired ({_load_text(build, stage, load)} loads its output)"
            ctx.report(
                f"de-emphasis of {units.fmt(tau, 's')} (corner {khz(audio.corner_from_tau(tau))}){wired} "
                f"does not match the {want * 1e6:g} µs of {region} (corner "
                f"{khz(audio.corner_from_tau(want))}) for {sig.name}",
                where,
                [Value("time constant", tau, "s"), Value("wanted", want, "s")],
                stage=stage.label,
            )


@rule(
    "freqplan.audio-corner",
    verify="""
      Sweep an audio tone at constant deviation and read the output with an AC voltmeter: the level falls
      3 dB at the corner.
      """,
    level="warning",
    title="Audio low-pass corner against the highest modulating frequency",
    explanation="""
      The audio low-pass after the detector should pass the highest modulating frequency of the
      signals the build receives (about 3 kHz for voice, 15 kHz for broadcast FM) and cut what
      lies above: detector noise, which in FM rises with frequency, and leftovers of the IF. A
      first-order RC has its corner at f = 1 / (2 pi R C), but only into no load. The volume
      control usually hangs on the filter's output through a coupling capacitor; then the source
      behind C is R || R_L (Thevenin's theorem), the corner moves up to 1 / (2 pi (R || R_L) C)
      and the passband drops by 20 log10((R + R_L) / R_L) dB: a 10 kohm track on a 10 kohm
      resistor doubles the corner and costs 6 dB. A coupling capacitor in the load counts as a
      short when it is at least 100 times the filter's capacitor (its reactance at the corner is
      then under 1 % of R: its own corner lies two decades lower); a smaller one, or a coil,
      leaves the load no plain resistance, and the RC alone is used. The verdict uses the corner
      as wired. A corner below the highest audio frequency (by more than the setting low_share,
      default 10 %) dulls the audio (a warning); one far above it (more than high_factor times,
      default 3) lets the noise through (a note). The design sheet shows both corners, the RC
      alone's and the one as wired, with the flat loss. In a plan with selector switches, every
      capacitor in circuit from the stage's node to ground counts in each position (one that a
      switch's throw brings in too), listed in the stage or not; one it does not list is named
      in a note, so that the plan can say it.
      """,
    fix="Choose R x C = 1 / (2 pi f_c) with f_c a little above the highest audio frequency, counting "
        "the load: R || R_L in place of R (or buffer the filter, or use a larger volume control).",
    source="first-order RC corner (scipy.signal.freqs cross-check in tests); loaded corner and divider "
    "loss: Thevenin's theorem (Horowitz & Hill, The Art of Electronics, ch. 1); common practice (3 kHz "
    "voice, 15 kHz broadcast, two decades for a negligible coupling corner)",
    settings={"low_share": 0.1, "high_factor": 3.0},
)
def audio_corner(build, ctx):
    tops = [(s, s.audio_max.si) for s in build.signals if s.audio_max is not None]
    for stage in build.stages("audio-filter"):
        tau, where = _rc(build, stage)
        if tau is None:
            continue
        _say_unlisted(ctx, build, stage)
        alone = audio.corner_from_tau(tau)
        who = owner(build, stage)
        ctx.publish("audio", who, "low-pass corner", alone, "Hz")
        wired_tau, load = _as_wired(ctx, build, stage, tau, "low-pass")
        fc = audio.corner_from_tau(wired_tau)
        wired = ""
        if load is not None:
            ctx.publish("audio", who, "low-pass corner as wired", fc, "Hz")
            _publish_load(ctx, build, stage, load, "low-pass")
            r = part_value(build, stage.resistor)
            wired = (f" as wired ({khz(alone)} for the RC alone; {_load_text(build, stage, load)} loads its "
                     f"output, {audio.divider_loss_db(r, load.ohms):.1f} dB of flat loss)")
        if not tops:
            continue
        for sig, top in tops:
            corner_one(ctx, stage, where, fc, sig, top, wired)


def corner_one(ctx, stage, where, fc: float, sig, top: float, wired: str = "") -> None:
    """audio-corner for one signal (one configuration of the build): a corner below its highest
    audio cuts it; one far above lets the detector's noise through."""
    values = [Value("corner", fc, "Hz"), Value("highest audio", top, "Hz")]
    if fc < top * (1 - setting(ctx, "low_share")):
        ctx.report(
            f"the audio low-pass corner {khz(fc)}{wired} is below the {khz(top)} of {sig.name}: its top "
            f"octave is cut",
            where,
            values,
            stage=stage.label,
        )
    elif fc > top * setting(ctx, "high_factor"):
        ctx.report(
            f"the audio low-pass corner {khz(fc)}{wired} is {fc / top:.1f} times the {khz(top)} "
            f"of {sig.name}: detector noise above the audio passes",
            where,
            values,
            level="note",
            stage=stage.label,
        )
