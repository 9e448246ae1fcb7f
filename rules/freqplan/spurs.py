"""freqplan: the mixer's spurious responses and the build's own harmonics (birdies), with levels."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from speccheck.chain import Band, Conversion, frequency_plan, hz, khz, used_paths
from speccheck.findings import Value
from speccheck.formulas import harmonics, mixing
from speccheck.registry import rule

from .common import setting


def _spur_name(m: int, k: int, s: int) -> str:
    ms = "fs" if m == 1 else f"{m}·fs"
    n = abs(k)
    ns = "fLO" if n == 1 else f"{n}·fLO"
    if k == 0:
        return f"{ms} = IF"
    if k > 0:
        return f"{ms} + {ns} = IF"
    return f"{ms} − {ns} = IF" if s > 0 else f"{ns} − {ms} = IF"


@dataclass
class Response:
    """One spurious response or self-made carrier of a conversion, for one IF path."""

    name: str
    f: float  # the input frequency it answers to (or where the harmonic lies)
    offset: float  # from the wanted input
    level: float | None  # estimated level at the build's input, as a wanted signal giving the same IF, dBm
    how: str  # how that level was estimated
    harmonic: bool  # a harmonic the build makes itself (a birdie), not a response to an outside signal


def _spur_level_settings(ctx) -> dict:
    return {name: setting(ctx, name) for name in ("limiter_level", "isolation", "asymmetry", "per_order")}


def spur_responses(c: Any, pb: Any, order: int, s: dict, strongest: float | None) -> list:
    """The responses of conversion c that land in IF path pb: mixer products |m·fs ± n·fLO| up to
    `order`, and the IF and LO harmonics that fall inside the passband ahead of the mixer (all
    of them, up to the input frequency, whatever the order), each with an estimated level.
    c is a Conversion with its LO, IF and the band ahead known, pb a PathBand with centre and
    width (the caller picks only those; typed Any because their fields are Optional)."""
    band = c.ahead
    asym = s["asymmetry"]
    out = []
    for m, k, sign, fs in mixing.spur_inputs(c.lo, pb.center, order):
        if m == 1 and k == -1:
            continue  # the wanted response and the image
        half = pb.width / (2 * m)
        if fs + half < band.low or fs - half > band.high:
            continue
        level = how = None
        if strongest is not None:
            # the LO switches the mixer: its k-th harmonic weighs in as a rectangular wave's would;
            # each order of the signal above the first costs per_order dB
            lo_db = harmonics.limiter_harmonic_db(abs(k), asym) if k else 0.0
            level = strongest - band.attenuation(fs) + lo_db - (m - 1) * s["per_order"]
            how = (f"a {strongest:g} dBm signal there, {band.attenuation(fs):.0f} dB down ahead of the "
                   f"mixer, LO harmonic {abs(k)} at {lo_db:.0f} dB, {(m - 1) * s['per_order']:.0f} dB for "
                   f"signal order {m}")
        out.append(Response("spur " + _spur_name(m, k, sign), fs, fs - c.f_in, level, how or "", False))
    for n in range(1, order + 1):
        if pb.low <= n * c.lo <= pb.high:
            out.append(Response(f"LO harmonic {n} inside the IF passband", n * c.lo, 0.0, None, "", True))
    top = band.high
    for what, base in (("IF", c.f_if), ("LO", c.lo)):
        for n in range(2, harmonics.harmonics_reaching(base, top) + 1):
            h = n * base
            if not band.holds(h):
                continue
            level, how = None, ""
            if what == "IF":
                # the limiter's output is near a rectangular wave: odd harmonics at 1/n, even ones
                # from its asymmetry; it reaches the input through the board's isolation
                h_db = harmonics.limiter_harmonic_db(n, asym)
                through = pb.attenuation(abs(h - c.lo))
                level = s["limiter_level"] + h_db - s["isolation"] - through
                how = (f"limiter {s['limiter_level']:g} dBm, harmonic {n} at {h_db:.0f} dB, "
                       f"{s['isolation']:g} dB isolation to the input, {through:.0f} dB down in the "
                       f"{pb.name} path")
            out.append(Response(f"{what} harmonic {n}", h, h - c.f_in, level, how, True))
    return out


@rule("freqplan.mixer-spurs",
      verify="""
      Sweep a strong generator across the input band and note each frequency where the squelch opens or
      the RSSI rises: each one is a spurious response.
      """,
      level="warning",
      title="Mixer spurious response or harmonic that can be heard",
      explanation="""
      A real mixer is not an ideal multiplier: harmonics of the input and of the LO mix too, so an
      input f_s gives an output wherever |m f_s ± n f_LO| falls in the IF passband. speccheck
      searches every m and n up to the setting order (default 5) for the IF path each signal
      travels, keeps the inputs that lie inside the passband ahead of the mixer, leaves out the
      wanted response and the image, and lists the rest on the design sheet. It also lists every
      harmonic of the IF and of the LO that falls inside that input passband, up to the input
      frequency whatever the order (the 65th harmonic of a 455 kHz IF lies 25 kHz below
      29.6 MHz): radiated back into the input they become self-made carriers ("birdies").

      Each response gets an estimated level, as the wanted-signal level at the input that would
      give the same IF. A limiter's output is close to a square wave: its odd harmonics fall only
      as 1/n (Fourier series of a rectangular wave), and an asymmetry of its duty cycle (setting
      asymmetry, default 0.02, i.e. 48 to 52 %) adds even ones, up to about 24 dB down (the upper
      envelope over that range of duty cycles is taken, so no null hides a birdie); it leaves the limiter
      at the setting limiter_level (default 0 dBm) and reaches the input through the board's
      isolation (setting isolation, default 60 dB), then the IF path's own response at the
      offset. A mixer spur takes the strongest signal (source.level_max) at its input, less what
      the filters ahead of the mixer take off, the LO harmonic's weight (the LO switches the
      mixer like a rectangular wave) and the setting per_order (default 20 dB) for each order of
      the signal above the first. The defaults are from memory, for a compact unshielded board
      and a small IF chip: state your own where you know better.

      A warning comes only where a response lies within the setting close (default 50 kHz,
      two 25 kHz channels; the window does not grow with the path) of the wanted signal and its
      level comes within audible_margin (default 10 dB) of the weakest wanted signal
      (source.level_min, else -110 dBm): there it opens the squelch or whistles in the audio.
      An IF or LO harmonic that is close but too weak to hear is a note with its level.
      """,
      fix="Move the LO (other injection side or another IF), narrow the passband ahead of the mixer, or "
          "shield and decouple the limiter and oscillator from the input.",
      source="Fourier series of a rectangular wave (Oppenheim & Willsky, Signals and Systems); mixer spur "
             "arithmetic: common practice (spur charts); limiter level, asymmetry, isolation and per-order "
             "suppression: from memory",
      settings={"order": 5, "close": 50e3, "max_listed": 24, "limiter_level": 0.0, "isolation": 60.0,
                "asymmetry": 0.02, "per_order": 20.0, "audible_margin": 10.0, "weakest": -110.0})
def mixer_spurs(build, ctx):
    order = max(1, min(setting(ctx, "order", int), 15))
    close = max(0.0, setting(ctx, "close"))
    max_listed = max(0, setting(ctx, "max_listed", int))
    s = _spur_level_settings(ctx)
    s["asymmetry"] = min(max(s["asymmetry"], 0.0), 0.49)
    src = build.source
    strongest = src.level_max.si if src is not None and src.level_max is not None else None
    weakest = src.level_min.si if src is not None and src.level_min is not None else setting(ctx, "weakest")
    audible = weakest - setting(ctx, "audible_margin")
    for c in frequency_plan(build).conversions:
        band = c.ahead
        if c.lo is None or not c.f_if or c.filter is None:
            continue
        if band is None:  # nothing declared ahead: look around the wanted input only
            band = Band(c.f_in - close, c.f_in + close, "the close window")
            c = Conversion(**{**c.__dict__, "ahead": band})
        paths = [p for p in used_paths(build, c.filter.paths) if p.width is not None and p.center is not None]
        found = []
        for pb in paths:
            tag = f" ({pb.name})" if len(paths) > 1 else ""
            found += [(r, pb, tag) for r in spur_responses(c, pb, order, s, strongest)]
        found.sort(key=lambda t: abs(t[0].offset))
        seen = set()
        listed = []
        for r, pb, tag in found:
            if (r.name + tag) not in seen:
                seen.add(r.name + tag)
                listed.append((r, pb, tag))
        for r, _, tag in listed[:max_listed]:
            ctx.publish("spurs", c.owner, r.name + tag, r.f, "Hz")
            if r.level is not None:
                ctx.publish("spurs", c.owner, f"{r.name}{tag} estimated level", round(r.level, 1), "dBm")
        if len(listed) > max_listed:
            ctx.publish("spurs", c.owner, "more responses not listed", len(listed) - max_listed)
        near = [t for t in listed if abs(t[0].offset) <= close]
        heard = [t for t in near if t[0].level is not None and t[0].level >= audible]
        quiet = [t for t in near if t not in heard and t[0].harmonic]
        osc = c.stage.oscillator
        where = osc.at("injection") if osc else c.stage.loc
        for group, level in ((heard, "warning"), (quiet, "note")):
            if not group:
                continue
            shown = "; ".join(_response_text(r, tag) for r, _, tag in group[:4])
            more = f" and {len(group) - 4} more" if len(group) > 4 else ""
            r0 = group[0][0]
            values = [Value("LO", c.lo, "Hz"), Value(r0.name, r0.f, "Hz"), Value("offset", r0.offset, "Hz")]
            if r0.level is not None:
                values += [Value("estimated level", r0.level, "dBm"), Value("weakest wanted", weakest, "dBm")]
            if level == "warning":
                head = (f"{c.owner}: {len(group)} response{'s' if len(group) > 1 else ''} within "
                        f"{khz(close)} of the wanted {hz(c.f_in)} (LO {hz(c.lo)}) strong enough to hear "
                        f"(within {setting(ctx, 'audible_margin'):g} dB of the weakest wanted {weakest:g} "
                        "dBm): ")
            else:
                head = (f"{c.owner}: {'a harmonic' if len(group) == 1 else f'{len(group)} harmonics'} of "
                        f"the build's own IF or LO within {khz(close)} of the wanted {hz(c.f_in)}, "
                        "estimated too weak to hear: ")
            ctx.report(head + shown + more + (f" ({r0.how})" if r0.how else ""), where, values, level=level,
                       stage=c.stage.label)


def _response_text(r: Response, tag: str) -> str:
    level = f", about {r.level:.0f} dBm" if r.level is not None else ", level not estimated"
    return f"{r.name}{tag} at {hz(r.f)} ({'+' if r.offset >= 0 else '−'}{khz(abs(r.offset))}{level})"
