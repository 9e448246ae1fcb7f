"""Batteries: chemistry figures, voltage under load, running time from capacity.

Nominal cell voltages are the ones the cell standards name: 1.5 V for zinc-manganese dioxide
(alkaline and zinc-carbon) and lithium-iron disulphide primaries (IEC 60086-1), 1.2 V for
nickel-metal hydride and nickel-cadmium (IEC 61951-2 and -1), 3.6 V for lithium-ion (IEC 61960,
the usual figure for cobalt-oxide cells), 2.0 V for lead-acid (IEC 60896). The fresh open-circuit
voltage, the end voltage a cell counts as flat at, the internal resistance of a small cell and
the Peukert exponent are typical figures FROM MEMORY (end voltages as the usual discharge
tests use them); a plan gives its own cells' values to override them.

Voltage under load: V = V_open - I * R_internal (a cell modelled as a source with a series
resistance, Thevenin). Running time: t = C / I at the rated current; with the capacity's rated
current I_r and Peukert's exponent k, t = H * (C / (I * H))^k with H = C / I_r, the form of
Peukert's law in Linden's Handbook of Batteries. SI: V, A, ohm, A·h, h.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Chemistry:
    nominal: float  # V per cell, from the cell standard
    fresh: float  # V per cell open-circuit when new (from memory)
    end: float  # V per cell counted as flat (from memory)
    resistance: float  # ohm per small cell, fresh (from memory)
    peukert: float  # exponent k (from memory); 1.0 means capacity independent of current
    standard: str


CHEMISTRY = {
    "alkaline": Chemistry(1.5, 1.6, 0.9, 0.25, 1.3, "IEC 60086-1"),
    "carbon-zinc": Chemistry(1.5, 1.6, 0.9, 0.5, 1.4, "IEC 60086-1"),
    "lithium-primary": Chemistry(1.5, 1.8, 0.9, 0.15, 1.05, "IEC 60086-1"),
    "nimh": Chemistry(1.2, 1.35, 1.0, 0.05, 1.1, "IEC 61951-2"),
    "nicd": Chemistry(1.2, 1.3, 1.0, 0.05, 1.1, "IEC 61951-1"),
    "lithium-ion": Chemistry(3.6, 4.2, 3.0, 0.1, 1.05, "IEC 61960"),
    "lead-acid": Chemistry(2.0, 2.12, 1.75, 0.01, 1.25, "IEC 60896"),
}


def pack(per_cell: float, cells: int) -> float:
    """A series string of equal cells: per-cell value times the count (voltage or resistance)."""
    return per_cell * cells


def loaded_voltage(open_circuit: float, current: float, internal_resistance: float) -> float:
    """V = V_open - I * R_internal: the terminal voltage while delivering `current`."""
    return open_circuit - current * internal_resistance


def running_hours(capacity_ah: float, current: float, rated_current: float | None = None,
                  exponent: float = 1.0) -> float:
    """Hours a battery of `capacity_ah` (rated at `rated_current`) delivers `current` for.

    Without a rated current, t = C / I. With one, Peukert's law t = H (C / (I H))^k, H = C / I_r:
    a current above the rated one gives less than C / I, a smaller one more.
    """
    if current <= 0:
        return float("inf")
    if not rated_current or exponent == 1.0:
        return capacity_ah / current
    rated_hours = capacity_ah / rated_current
    return float(rated_hours * (capacity_ah / (current * rated_hours)) ** exponent)
