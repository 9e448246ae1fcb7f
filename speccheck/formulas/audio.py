"""Audio networks: first-order RC corners, a high-pass's loss, FM de-emphasis time constants.

f_c = 1/(2 pi R C) = 1/(2 pi tau) (any circuits text; checked against scipy.signal.freqs in
the tests). A resistive load R_L on the output of an RC low-pass makes the source behind C the
Thevenin resistance R || R_L, so the corner moves to 1/(2 pi (R || R_L) C), and the passband
falls by the divider's 20 log10((R + R_L)/R_L) dB (Thevenin's theorem; Horowitz & Hill, The Art
of Electronics, 3rd ed., ch. 1). The resistance a network of resistors shows at one node is
found by nodal analysis (any circuits text). SI: ohm, F, s, Hz; dB.
"""

from __future__ import annotations

import math

from speccheck.formulas.dividers import network_voltages

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


def parallel(r1: float, r2: float) -> float:
    """R1 || R2 = R1·R2/(R1 + R2): two resistances side by side (Thevenin resistance of a divider)."""
    return r1 * r2 / (r1 + r2)


def parallel_partner(target: float, other: float) -> float | None:
    """The resistance that in parallel with `other` gives `target`: 1/(1/target − 1/other);
    None when `other` alone is already at or below the target."""
    if other <= target:
        return None
    return 1.0 / (1.0 / target - 1.0 / other)


def loaded_rc_corner(ohms: float, farads: float, load_ohms: float) -> float:
    """Corner of an RC low-pass whose output feeds a resistive load R_L: the source behind C is
    R || R_L (Thevenin), so f_c = 1/(2π·(R∥R_L)·C)."""
    return rc_corner(parallel(ohms, load_ohms), farads)


def divider_loss_db(ohms: float, load_ohms: float) -> float:
    """Flat loss in the passband of a series R into a load R_L: 20·log10((R + R_L)/R_L) dB
    (positive; 6.02 dB for R = R_L)."""
    return 20 * math.log10((ohms + load_ohms) / load_ohms)


def node_resistance(resistors: list[tuple[str, str, float]], node: str, grounds: set[str]) -> float | None:
    """The resistance between `node` and the grounds of a network of resistors (a, b, ohms): hold
    `node` at 1 V and the grounds at 0 V, solve the other nodes (dividers.network_voltages, nodal
    analysis), and R = 1 V / the current leaving `node`. None when no resistor path reaches a
    ground (or a part of the network floats)."""
    if node in grounds:
        return 0.0
    held = dict.fromkeys(grounds, 0.0) | {node: 1.0}
    try:
        volts = held | network_voltages(resistors, held)
    except ValueError:
        return None
    amps = sum((1.0 - volts[b if a == node else a]) / ohms
               for a, b, ohms in resistors if node in (a, b) and a != b)
    return 1.0 / amps if amps > 1e-15 else None
