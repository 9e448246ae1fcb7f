"""Resonators: LC resonance and Q, coil loss, crystal load and pulling, toroid turns, and the
response of a tuned circuit near resonance (the universal resonance curve).

f0 = 1/(2 pi sqrt(LC)) and the parallel-RLC Q (any circuits text); crystal pulling
D = C1/(2 (C0 + CL)) (IEC 60444 crystal-unit parameters; crystal-oscillator application
notes); toroid turns from the inductance factor AL (core makers' tables). SI: H, F, ohm, Hz.
"""

from __future__ import annotations

import math

TWO_PI = 2.0 * math.pi


def resonance(inductance: float, capacitance: float) -> float:
    """f0 = 1 / (2 pi sqrt(L C))."""
    return 1.0 / (TWO_PI * math.sqrt(inductance * capacitance))


def capacitance_for(f0: float, inductance: float) -> float:
    """C that resonates L at f0."""
    return 1.0 / ((TWO_PI * f0) ** 2 * inductance)


def parallel_q(resistance: float, f0: float, inductance: float) -> float:
    """Q of a parallel RLC at resonance: R_p / (omega0 L)."""
    return resistance / (TWO_PI * f0 * inductance)


def coil_parallel_resistance(q: float, f0: float, inductance: float) -> float:
    """The parallel loss resistance of a coil of unloaded Q at f0: Q omega0 L."""
    return q * TWO_PI * f0 * inductance


def parallel(*resistances: float) -> float:
    return 1.0 / sum(1.0 / r for r in resistances)


def series_load(c1: float, c2: float, stray: float = 0.0) -> float:
    """Load capacitance a Pierce/Colpitts oscillator presents: C1 C2 / (C1 + C2) + C_stray."""
    return c1 * c2 / (c1 + c2) + stray


def pulling(motional: float, shunt: float, load: float) -> float:
    """Fractional offset of a crystal's load-resonant frequency above series resonance:
    D = C1m / (2 (C0 + CL))."""
    return motional / (2.0 * (shunt + load))


def pulling_shift(motional: float, shunt: float, load_actual: float, load_specified: float) -> float:
    """Fractional frequency change when the crystal sees load_actual instead of the load it
    was calibrated at (positive: it runs high, because the load is smaller)."""
    return pulling(motional, shunt, load_actual) - pulling(motional, shunt, load_specified)


def toroid_turns(inductance: float, al: float) -> float:
    """Turns for an inductance on a core of inductance factor AL (H per turn squared):
    N = sqrt(L / AL)."""
    return math.sqrt(inductance / al)


def toroid_inductance(turns: float, al: float) -> float:
    """L = AL N^2."""
    return al * turns * turns


# ---- the universal resonance curve: the tank's response near resonance ----------------------------
# For a parallel RLC tank of resonance f0 and loaded Q, driven by a current, the impedance
# relative to its value at resonance is
#
#     Z(f) / R = 1 / (1 + j·Q·(f/f0 − f0/f))
#
# so the amplitude is 1 / sqrt(1 + x²) and the phase −atan(x), with x = Q·(f/f0 − f0/f)
# (about 2·Q·(f − f0)/f0 near resonance). The amplitude is 3 dB down where x = ±1, that is a
# bandwidth of f0/Q; a quadrature detector's output follows the phase, which is near-straight
# over the same span. Source: the second-order band-pass H(s) = (ω0/Q)·s / (s² + (ω0/Q)·s + ω0²)
# (Terman, Radio Engineers' Handbook, the universal resonance curve; the same H as
# scipy.signal.freqs computes, used in the test).


def detuning(f: float, f0: float, q: float) -> float:
    """x = Q·(f/f0 − f0/f): how far off resonance, in half-bandwidths."""
    return q * (f / f0 - f0 / f)


def tank_amplitude(f: float, f0: float, q: float) -> float:
    """|Z(f)| / R of a parallel tank: 1 at resonance, 1/√2 at f0 ± f0/(2Q) (near resonance)."""
    x = detuning(f, f0, q)
    return 1.0 / math.sqrt(1.0 + x * x)


def tank_phase(f: float, f0: float, q: float) -> float:
    """Phase of Z(f) in radians: 0 at resonance, −π/4 at the upper 3 dB point."""
    return -math.atan(detuning(f, f0, q))
