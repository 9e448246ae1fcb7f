"""Harmonics of a hard-limited IF and of a switching mixer: how far below the fundamental.

A limiter drives its output from rail to rail: a rectangular wave. Its Fourier series
(any signals-and-systems textbook, e.g. Oppenheim & Willsky, Signals and Systems, the
rectangular pulse train) has harmonic amplitudes proportional to |sin(π·n·d)|/n for duty
cycle d, so relative to the fundamental the n-th harmonic stands at

    |sin(π·n·d)| / (n·sin(π·d)).

A perfect square wave (d = 0.5) has only odd harmonics, falling as 1/n (−20·log10(n) dB);
any asymmetry (d ≠ 0.5) adds even ones, about π·|d − 0.5| of the fundamental for low n.
The same law gives the LO harmonics of a mixer whose LO acts as a switch.
"""

from __future__ import annotations

import math

# A harmonic this far down, or an exact null, is reported at this floor rather than −infinity.
FLOOR_DB = -160.0


def pulse_harmonic(n: int, duty: float = 0.5) -> float:
    """Amplitude of the n-th harmonic of a rectangular wave of duty cycle `duty`, relative to
    its fundamental (1 for n = 1)."""
    if n < 1 or not 0 < duty < 1:
        raise ValueError("n must be 1 or more and the duty cycle between 0 and 1")
    return abs(math.sin(math.pi * n * duty)) / (n * math.sin(math.pi * duty))


def pulse_harmonic_db(n: int, duty: float = 0.5) -> float:
    """The same in dB (20·log10), never below FLOOR_DB."""
    a = pulse_harmonic(n, duty)
    return FLOOR_DB if a <= 10 ** (FLOOR_DB / 20) else max(FLOOR_DB, 20 * math.log10(a))


def limiter_harmonic(n: int, asymmetry: float = 0.0) -> float:
    """The most the n-th harmonic of a limiter's output can be, relative to its fundamental, for
    any duty cycle within `asymmetry` of 50 %: the upper envelope of the pulse-train series.

    With d = 0.5 − δ the odd harmonics stand at |cos(π·n·δ)|/(n·cos(π·δ)) and the even ones at
    |sin(π·n·δ)|/(n·cos(π·δ)); bounding |cos| by 1 and |sin x| by min(1, x) gives 1/(n·cos πδ)
    for odd n (the square wave's 1/n) and min(1, π·n·δ)/(n·cos πδ) for even n (about π·δ of
    the fundamental for low n). An envelope, so that no birdie hides in a null of one assumed
    duty cycle."""
    if n < 1 or not 0 <= asymmetry < 0.5:
        raise ValueError("n must be 1 or more and the asymmetry between 0 and 0.5")
    scale = 1.0 / (n * math.cos(math.pi * asymmetry))
    if n == 1:
        return 1.0
    return scale if n % 2 else min(1.0, math.pi * n * asymmetry) * scale


def limiter_harmonic_db(n: int, asymmetry: float = 0.0) -> float:
    """The same in dB, never below FLOOR_DB."""
    a = limiter_harmonic(n, asymmetry)
    return FLOOR_DB if a <= 10 ** (FLOOR_DB / 20) else max(FLOOR_DB, 20 * math.log10(a))


def harmonics_reaching(f_base: float, f_top: float) -> int:
    """The highest harmonic number whose frequency is at or below f_top (at least 1)."""
    return max(1, math.floor(f_top / f_base + 1e-9))
