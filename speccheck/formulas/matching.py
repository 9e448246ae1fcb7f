"""Matching: the L-network, input impedance of the two L sections, reflection, return loss,
VSWR, mismatch loss, and the plain shunt termination with what it costs.

Q = sqrt(R_high/R_low - 1) and Gamma = (Z - Z0)/(Z + Z0) (any RF-design text; checked against
scikit-rf in the tests). SI: ohm, H, F, Hz; dB.
"""

from __future__ import annotations

import math
from typing import TypedDict

TWO_PI = 2.0 * math.pi


class LNetwork(TypedDict):
    q: float
    x_series: float
    x_shunt: float
    inductance: float
    capacitance: float
    shunt_on: str  # "load" or "source": the side the shunt C sits on


def l_network(r_source: float, r_load: float, f: float) -> LNetwork:
    """Low-pass L-network (series L, shunt C) between two resistances at f. The shunt C sits
    across the higher resistance: Q = sqrt(R_high / R_low - 1), X_series = Q R_low,
    X_shunt = R_high / Q."""
    r_low, r_high = min(r_source, r_load), max(r_source, r_load)
    q = math.sqrt(r_high / r_low - 1.0)
    w = TWO_PI * f
    xs, xp = q * r_low, (r_high / q) if q > 0 else math.inf
    return {"q": q, "x_series": xs, "x_shunt": xp, "inductance": xs / w,
            "capacitance": (1.0 / (w * xp)) if q > 0 else 0.0,
            "shunt_on": "load" if r_load >= r_source else "source"}


def zin_series_l_shunt_c(f: float, inductance: float, capacitance: float, r_load: float) -> complex:
    """Impedance the source sees: series L, then C across the load resistance."""
    w = TWO_PI * f
    y = 1.0 / r_load + 1j * w * capacitance
    return 1j * w * inductance + 1.0 / y


def zin_shunt_c_series_l(f: float, inductance: float, capacitance: float, r_load: float) -> complex:
    """Impedance the source sees: C across the source side, then series L to the load."""
    w = TWO_PI * f
    branch = r_load + 1j * w * inductance
    return 1.0 / (1j * w * capacitance + 1.0 / branch)


def reflection(z: complex, z0: float) -> complex:
    return (z - z0) / (z + z0)


def return_loss_db(z: complex, z0: float) -> float:
    g = abs(reflection(z, z0))
    return math.inf if g == 0 else -20.0 * math.log10(g)


def vswr(z: complex, z0: float) -> float:
    g = abs(reflection(z, z0))
    return math.inf if g >= 1 else (1 + g) / (1 - g)


def mismatch_loss_db(z: complex, z0: float) -> float:
    """Power lost to reflection: -10 log10(1 - |Gamma|^2)."""
    g2 = abs(reflection(z, z0)) ** 2
    return math.inf if g2 >= 1 else -10.0 * math.log10(1.0 - g2)


def termination_resistor(r_source: float, r_load: float) -> float:
    """The shunt resistor that, in parallel with r_load, presents r_source."""
    return r_source * r_load / (r_load - r_source) if r_load > r_source else math.inf


def termination_cost_db(r_source: float, r_load: float) -> float:
    """Signal given up by a plain shunt termination instead of a lossless match: the matched
    resistor takes all but r_source / r_load of the power, so the load voltage falls by
    10 log10(r_load / r_source) dB (0 when the load is not above the source)."""
    return 10.0 * math.log10(r_load / r_source) if r_load > r_source else 0.0
