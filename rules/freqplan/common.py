"""Helpers the freqplan rules share: settings read with a fallback, percentages, missing inputs, and the
share of a signal's spectrum a response passes (with the levels it is graded by)."""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from speccheck.chain import khz, necessary
from speccheck.formulas import fmspectrum

if TYPE_CHECKING:
    from speccheck.chain import Conversion


def pct(x: float) -> str:
    return f"{x * 100:+.1f} %"


def setting(ctx, name: str, cast=float):
    try:
        return cast(ctx.setting(name))
    except (TypeError, ValueError):
        return cast(ctx.rule.settings[name])


def missing_note(ctx, c: Conversion, stage_label: str):
    for path, loc in c.missing[:1]:
        ctx.report(f"{c.owner}: {path} is not given, so the LO and the IF it makes cannot be computed",
                   loc, level="note", stage=stage_label,
                   fix=f"Give {path} so the conversion can be checked.")


# ---- how much of a signal's spectrum a filter passes --------------------------------------------

# Levels of a path's verdict by the share of the signal's power it passes (settings of the rules
# that use them; see freqplan.path-width's explanation for where they come from).
SHARE_LEVELS = {"error_share": 0.5, "warning_share": 0.8, "note_share": 0.98}


def worst_tone(sig) -> tuple[float, float] | None:
    """(peak deviation, tone) of the widest single-tone test of an FM signal: its highest audio
    frequency at full deviation. None for a signal that is not FM or misses a figure."""
    if sig.modulation != "fm" or sig.deviation is None or sig.audio_max is None or sig.audio_max.si <= 0:
        return None
    return sig.deviation.si, sig.audio_max.si


def passed(sig, attenuation, offset: float = 0.0) -> float | None:
    """Share (0..1) of the signal's power that a response passes, the carrier `offset` Hz from its
    centre: the Bessel spectrum of the worst tone (FM); None where it cannot be computed."""
    tone = worst_tone(sig)
    if tone is None:
        return None
    return fmspectrum.passed_share(tone[0], tone[1], attenuation, offset)


def passed_fm(sig, attenuation, offset: float = 0.0) -> float:
    """passed() for a signal whose share is already known to be computable (an FM signal with its
    deviation and highest tone): the same number, never None."""
    share = passed(sig, attenuation, offset)
    assert share is not None
    return share


def width_for(sig, make_shape, target: float, offset: float = 0.0) -> float | None:
    """The narrowest width of this class of response that passes `target` of the signal."""
    need, tone = necessary(sig), worst_tone(sig)
    if need is None or tone is None:
        return None

    def share(width: float) -> float:
        return fmspectrum.passed_share(tone[0], tone[1], make_shape(width).attenuation, offset)

    low, high = need[0] / 8, need[0] * 8
    if share(high) < target:
        return None
    for _ in range(40):
        mid = math.sqrt(low * high)
        if share(mid) >= target:
            high = mid
        else:
            low = mid
    return high


def share_level(share: float, s: dict) -> str | None:
    if share < s["error_share"]:
        return "error"
    if share < s["warning_share"]:
        return "warning"
    if share < s["note_share"]:
        return "note"
    return None


def share_text(share: float) -> str:
    return f"{share:.1%} ({-fmspectrum.loss_db(share):.2f} dB)"


def tone_text(sig) -> str:
    tone = worst_tone(sig)
    assert tone is not None  # described only for a signal whose share was computed: an FM one
    dev, top = tone
    return f"a {khz(top)} tone at the full ±{khz(dev)} deviation"


def share_settings(ctx) -> dict:
    return {name: setting(ctx, name) for name in SHARE_LEVELS}
