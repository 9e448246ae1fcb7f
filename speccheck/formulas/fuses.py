"""Fuses and wiring: the IEC 60127-2 gates as I2t, rerating for ambient, RC inrush, wire ampacity.

SI: A, s, A2s, degC, F, ohm.
"""

from __future__ import annotations

# Chassis-wiring ampacity of copper wire by AWG (Handbook of Electronic Tables and Formulas,
# chassis wiring column): 18, 20, 22, 24 and 30 from the handbook table; 10-16, 26, 28 and
# 32-40 from memory of the same table.
AWG_CHASSIS_AMPS = {10: 55.0, 12: 41.0, 14: 32.0, 16: 22.0, 18: 16.0, 20: 11.0, 22: 7.0, 24: 3.5,
                    26: 2.2, 28: 1.4, 30: 0.86, 32: 0.53, 34: 0.33, 36: 0.21, 38: 0.13, 40: 0.092}


# IEC 60127-2 (miniature fuse-links, standard sheets for 5 x 20 mm cartridges), from memory:
# the shortest gate with a least pre-arcing time. A time-lag link must not open before 10 ms
# at 10 x I_n; a quick-acting link must not open before 3 ms at 4 x I_n (at 10 x I_n it only
# has an upper limit). (multiple of I_n, least pre-arcing time in s)
FUSE_GATES = {"time-lag": (10.0, 0.010), "quick-acting": (4.0, 0.003)}

# IEC 60127-2, the long-time gate shared by its standard sheets (from memory): a fuse-link
# carries 1.5 x I_n for at least an hour without opening (it opens at 2.1 x I_n within a
# time that depends on the sheet). Above 1.5 x I_n no standard promises the link survives.
FUSE_CARRY = 1.5


def awg_ampacity(gauge: int) -> tuple[float, int] | None:
    """(amperes, gauge of the table row used); an odd gauge takes the next thinner even row."""
    if gauge is None:
        return None
    row = gauge if gauge in AWG_CHASSIS_AMPS else gauge + 1
    return (AWG_CHASSIS_AMPS[row], row) if row in AWG_CHASSIS_AMPS else None


def inrush(volts: float, farads: float, ohms: float) -> tuple[float, float, float]:
    """Switching V onto C through R: i = (V/R)·e^(−t/RC). Returns (peak V/R, τ = RC, I²t = V²C/(2R))."""
    return volts / ohms, ohms * farads, volts ** 2 * farads / (2 * ohms)


def limited_inrush(volts: float, farads: float, limit: float, ohms: float = 0.0) -> tuple[float, float]:
    """Switching V onto C through R from a source that limits its current to I (I < V/R):
    (peak I, I²t). The charge runs at I until the capacitor is at V − I·R (Q = C·V: for a time
    C·(V − I·R)/I, so I·C·(V − I·R)), then falls as the RC charge from I (I²·R·C/2):
    I²t = I·C·V − I²·R·C/2. With R = 0 it is I·C·V, the whole charge at the limit. Derived
    from Q = C·V and the RC charge (any circuits text)."""
    return limit, limit * farads * volts - limit ** 2 * ohms * farads / 2


def fuse_gate_i2t(speed: str, rating: float) -> float:
    """The least I²t an IEC 60127-2 fuse-link of this speed withstands at its shortest gate:
    (k·I_n)²·t_min."""
    k, t_min = FUSE_GATES[speed]
    return (k * rating) ** 2 * t_min


def rerate(t_ambient: float | None, per_degc: float, above: float) -> float:
    """Share of its rating a fuse carries at t_ambient (linear fall above `above` °C)."""
    if t_ambient is None or t_ambient <= above:
        return 1.0
    return max(0.05, 1.0 - per_degc * (t_ambient - above))
