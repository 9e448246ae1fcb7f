"""freqplan: the FM de-emphasis and the audio low-pass corner after the detector."""

from __future__ import annotations

from speccheck import units
from speccheck.chain import khz, owner, part_value
from speccheck.findings import Value
from speccheck.formulas import audio
from speccheck.registry import rule
from speccheck.rules.freqplan.common import setting


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
      75 µs. The wrong one makes the audio dull or shrill; none at all leaves it harsh and hissy.
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
        who = owner(build, stage)
        ctx.publish("audio", who, "de-emphasis time constant", tau, "s")
        ctx.publish("audio", who, "de-emphasis corner", audio.corner_from_tau(tau), "Hz")
        measured.append((stage, tau, where))
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
    for stage, tau, where in measured:
        if abs(tau / want - 1) > tol:
            ctx.report(
                f"de-emphasis of {units.fmt(tau, 's')} (corner {khz(audio.corner_from_tau(tau))}) "
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
      first-order RC has its corner at f = 1 / (2 pi R C). A corner below the highest audio
      frequency (by more than the setting low_share, default 10 %) dulls the audio; one far above
      it (more than high_factor times, default 3) lets the noise through.
      """,
    fix="Choose R x C = 1 / (2 pi f_c) with f_c a little above the highest audio frequency.",
    source="first-order RC corner (scipy.signal.freqs cross-check in tests); common practice (3 kHz voice, "
    "15 kHz broadcast)",
    settings={"low_share": 0.1, "high_factor": 3.0},
)
def audio_corner(build, ctx):
    tops = [(s, s.audio_max.si) for s in build.signals if s.audio_max is not None]
    for stage in build.stages("audio-filter"):
        tau, where = _rc(build, stage)
        if tau is None:
            continue
        fc = audio.corner_from_tau(tau)
        ctx.publish("audio", owner(build, stage), "low-pass corner", fc, "Hz")
        if not tops:
            continue
        for sig, top in tops:
            corner_one(ctx, stage, where, fc, sig, top)


def corner_one(ctx, stage, where, fc: float, sig, top: float) -> None:
    """audio-corner for one signal (one configuration of the build): a corner below its highest
    audio cuts it; one far above lets the detector's noise through."""
    values = [Value("corner", fc, "Hz"), Value("highest audio", top, "Hz")]
    if fc < top * (1 - setting(ctx, "low_share")):
        ctx.report(
            f"the audio low-pass corner {khz(fc)} is below the {khz(top)} of {sig.name}: its top "
            f"octave is cut",
            where,
            values,
            stage=stage.label,
        )
    elif fc > top * setting(ctx, "high_factor"):
        ctx.report(
            f"the audio low-pass corner {khz(fc)} is {fc / top:.1f} times the {khz(top)} "
            f"of {sig.name}: detector noise above the audio passes",
            where,
            values,
            level="note",
            stage=stage.label,
        )
