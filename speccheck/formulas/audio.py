"""Audio networks: first-order RC corners, a high-pass's loss, FM de-emphasis time constants.

f_c = 1/(2 pi R C) = 1/(2 pi tau) (any circuits text; checked against scipy.signal.freqs in
the tests). SI: ohm, F, s, Hz; dB.
"""

from __future__ import annotations

import math

TWO_PI = 2.0 * math.pi

# FM broadcast de-emphasis time constants by ITU region: 50 us in Regions 1 and 3, 75 us in
# Region 2 (ITU-R BS.450, transmission standards for FM sound broadcasting).
DEEMPHASIS = {"itu-region-1": 50e-6, "itu-region-2": 75e-6, "itu-region-3": 50e-6}


def rc_corner(ohms: float, farads: float) -> float:
    """f_c = 1/(2π·R·C): the corner of a first-order RC (high-pass for a coupling capacitor
    into its load, the turnover of a series R–C network)."""
    return 1.0 / (2 * math.pi * ohms * farads)


def corner_from_tau(time_constant: float) -> float:
    """-3 dB corner of a first-order RC (de-emphasis or low-pass): f = 1 / (2 pi tau)."""
    return 1.0 / (TWO_PI * time_constant)


def rc_time_constant(corner: float) -> float:
    """The time constant of a first-order RC with this -3 dB corner: tau = 1 / (2 pi f)."""
    return 1.0 / (TWO_PI * corner)


def high_pass_loss_db(f: float, corner: float) -> float:
    """Loss of a first-order high-pass at f: 10·log10(1 + (f_c/f)²) dB."""
    return 10 * math.log10(1 + (corner / f) ** 2)
