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


def harmonics_reaching(f_base: float, f_top: float) -> int:
    """The highest harmonic number whose frequency is at or below f_top (at least 1)."""
    return max(1, math.floor(f_top / f_base + 1e-9))
