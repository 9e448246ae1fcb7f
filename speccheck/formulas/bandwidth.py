"""Necessary bandwidth and the emission designator.

Carson's rule (J. R. Carson, 1922; every communications textbook), the necessary bandwidth of
ITU-R SM.1138 (Annex) and the bandwidth code and class symbols of the Radio Regulations,
Appendix 1. Frequencies in Hz.
"""

from __future__ import annotations

import math
from decimal import ROUND_HALF_UP, Decimal


def carson_bandwidth(deviation: float, audio_max: float) -> float:
    """Carson's rule for FM: B = 2 (peak deviation + highest modulating frequency)."""
    return 2.0 * (deviation + audio_max)


def necessary_bandwidth(modulation: str, deviation: float | None, audio_max: float | None,
                        k: float = 1.0) -> float | None:
    """Necessary bandwidth Bn after ITU-R SM.1138 (Annex): FM sound Bn = 2M + 2DK (K = 1);
    double-sideband AM telephony Bn = 2M; single-sideband suppressed carrier Bn = M.
    None when the inputs the formula needs are not given (CW needs a keying speed)."""
    if audio_max is None:
        return None
    if modulation == "fm":
        if deviation is None:
            return None
        return 2.0 * audio_max + 2.0 * deviation * k
    if modulation == "am":
        return 2.0 * audio_max
    if modulation == "ssb":
        return audio_max
    return None


def _round3(value: float) -> Decimal:
    """Round to three significant figures, halves away from zero (180.5 -> 181)."""
    d = Decimal(repr(float(value)))
    quantum = Decimal(1).scaleb(d.adjusted() - 2)
    return d.quantize(quantum, rounding=ROUND_HALF_UP)


def bandwidth_code(hz: float) -> str:
    """The four-character bandwidth part of an emission designator (Radio Regulations
    Appendix 1): three significant figures with the unit letter H, K, M or G standing where
    the decimal point goes: 2.4 kHz -> 2K40, 12.5 kHz -> 12K5, 180.5 kHz -> 181K."""
    if not (hz > 0 and math.isfinite(hz)):
        raise ValueError("a bandwidth must be a positive number")
    if hz < 1.0:
        r = _round3(hz)
        if r < 1:
            thousandths = int((r * 1000).to_integral_value(rounding=ROUND_HALF_UP))
            return f"H{max(thousandths, 1):03d}"
    for letter, scale in (("H", 1.0), ("K", 1e3), ("M", 1e6), ("G", 1e9)):  # noqa: B007 (used after the loop)
        r = _round3(hz / scale)
        if r < 1000:
            break
    else:
        raise ValueError("a bandwidth above 999 GHz has no designator")
    places = 2 - r.adjusted()  # 1.xx -> 2 decimals, 1x.x -> 1, 1xx -> 0
    text = f"{r:.{places}f}"
    return text.replace(".", letter) if "." in text else text + letter


def emission_class(modulation: str, service: str | None) -> str | None:
    """The three class symbols of Radio Regulations Appendix 1 for the signals a build
    carries: F3E FM telephony / sound broadcasting, F2D FM data on a subcarrier, A3E
    double-sideband AM telephony, J3E single sideband suppressed carrier, A1A on-off keying
    (the symbol table is recalled from memory; F3E is the issue's published check value)."""
    if modulation == "fm":
        return "F2D" if service == "data" else "F3E"
    return {"am": "A3E", "ssb": "J3E", "cw": "A1A"}.get(modulation)


def emission_designator(bn: float, modulation: str, service: str | None = None) -> str | None:
    """Bandwidth code and class symbols, or None where Appendix 1 has no spelling for them."""
    cls = emission_class(modulation, service)
    try:
        return bandwidth_code(bn) + cls if cls else None
    except ValueError:  # beyond 999 GHz: no designator exists, the bandwidth still stands
        return None
