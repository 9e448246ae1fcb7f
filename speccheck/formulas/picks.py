"""Picking buyable values: E-series neighbours of an ideal value, capacitor voltage ratings,
and the small inverse formulas a solver needs (the value that gives a wanted figure).

SI floats in and out; no model, YAML or pint. The series tables (IEC 60063 E12, E24, E96) live in
formulas/preferred.py.
"""

from __future__ import annotations

import math
from collections.abc import Callable

from speccheck.formulas import preferred

# Rated DC voltages of aluminium electrolytic and ceramic capacitors as sold. 4, 6.3, 10, 16, 25,
# 40, 63 and 100 V are the R5 series of ISO 3 (which IEC 60384-1 names for rated voltages);
# 35, 50, 160, 200, 350 and 450 V are the further steps the trade stocks: common practice.
CAPACITOR_VOLTAGES = (
    4.0,
    6.3,
    10.0,
    16.0,
    25.0,
    35.0,
    40.0,
    50.0,
    63.0,
    100.0,
    160.0,
    200.0,
    250.0,
    350.0,
    400.0,
    450.0,
    500.0,
    630.0,
)


def series_values(name: str, low: float, high: float) -> list[float]:
    """Every value of the E-series `name` from low to high (inclusive), ascending."""
    table = preferred.SERIES[name]
    if not (0 < low <= high and math.isfinite(high)):
        raise ValueError("a range of positive values is needed")
    out = []
    for exponent in range(math.floor(math.log10(low)) - 1, math.floor(math.log10(high)) + 2):
        for value in preferred.decade_values(exponent, table):
            if low * (1 - 1e-9) <= value <= high * (1 + 1e-9):
                out.append(value)
    return sorted(set(out))


def preferred_up(value: float, name: str) -> float:
    """The smallest value of the series at or above `value`."""
    return series_values(name, value, value * 10.0)[0]


def preferred_down(value: float, name: str) -> float:
    """The largest value of the series at or below `value`."""
    return series_values(name, value / 10.0, value)[-1]


def preferred_around(value: float, name: str, each_side: int = 2) -> list[float]:
    """The `each_side` series values below `value` and the `each_side` at or above it, ascending."""
    below = [v for v in series_values(name, value / 10.0, value) if v < value * (1 - 1e-9)]
    above = series_values(name, value, value * 10.0)
    return below[-each_side:] + above[:each_side]


# Power ratings loudspeakers are sold with (nominal, continuous): common practice.
SPEAKER_POWERS = (0.1, 0.25, 0.5, 1.0, 2.0, 3.0, 5.0, 8.0, 10.0, 15.0, 20.0, 30.0, 50.0)


# Output voltages of common DC adapters and fixed regulators: common practice.
COMMON_SUPPLY_VOLTS = (5.0, 6.0, 9.0, 12.0, 15.0, 18.0, 24.0)

# Nominal loudspeaker impedances: common practice (IEC 60268-5 states the rated impedance; these
# are the values sold for small amplifiers).
SPEAKER_IMPEDANCES = (4.0, 8.0, 16.0)

# Heat sinks a builder can buy and fit (from memory): a package with a mounting tab has a θJC of a
# few °C/W and takes a bolt-on extrusion down to about 1 °C/W; a small package without a tab (θJC
# of tens of °C/W) takes at best a small clip-on sink, not much below 5 °C/W.
TAB_THETA_JC = 5.0
SMALLEST_THETA_SA_TAB = 1.0
SMALLEST_THETA_SA_CLIP_ON = 5.0


def smallest_heat_sink(theta_jc: float) -> float:
    """The lowest sink-to-ambient resistance worth proposing for a package of this θJC (from memory)."""
    return SMALLEST_THETA_SA_TAB if theta_jc <= TAB_THETA_JC else SMALLEST_THETA_SA_CLIP_ON


def highest_below(value: float, table: tuple[float, ...], fits: Callable[[float], bool]) -> float | None:
    """The highest entry of `table` below `value` for which fits(entry) holds."""
    return next((v for v in sorted(table, reverse=True) if v < value and fits(v)), None)


def rating_up(value: float, table: tuple[float, ...]) -> float | None:
    """The smallest rating of an ascending table at or above `value`; None above the table."""
    for rating in table:
        if rating >= value * (1 - 1e-9):
            return rating
    return None


def voltage_rating_up(volts: float) -> float | None:
    """The smallest stocked capacitor voltage rating at or above `volts`; None above the table."""
    return rating_up(volts, CAPACITOR_VOLTAGES)


def thinnest_wire_for(amps: float, table: dict[int, float]) -> int | None:
    """The thinnest gauge (largest AWG number) of an ampacity table {AWG: amperes} that carries `amps`."""
    fit = [gauge for gauge, carries in table.items() if carries >= amps * (1 - 1e-9)]
    return max(fit) if fit else None


# ---- inverse formulas ---------------------------------------------------------------------


def equal_load_capacitors(load: float, stray: float) -> float:
    """Each of two equal loading capacitors that give a crystal `load` with `stray` on the board.

    C_L = C1 C2 / (C1 + C2) + C_stray with C1 = C2 = C gives C = 2 (C_L - C_stray)."""
    return 2.0 * (load - stray)


def damping_for(total: float, coil_loss: float | None) -> float:
    """The resistor that, in parallel with a coil's loss resistance, gives `total` across a tank.

    1/R_total = 1/R_damping + 1/R_coil; with no coil loss given the damping resistor is the total."""
    if coil_loss is None or math.isinf(coil_loss):
        return total
    if coil_loss <= total:
        return math.inf  # the coil alone already damps the tank this far
    return 1.0 / (1.0 / total - 1.0 / coil_loss)


def rc_partner(time_constant: float, known: float) -> float:
    """R for a wanted time constant and a given C, or C for a given R: tau = R C."""
    return time_constant / known


def centre_capacitance(f0: float, l_low: float, l_high: float) -> float:
    """Tank capacitance that puts f0 at the geometric centre of a coil's tuning range.

    f = 1 / (2 pi sqrt(L C)): the range runs 1/(2 pi sqrt(L_high C)) to 1/(2 pi sqrt(L_low C));
    its geometric centre is 1/(2 pi sqrt(sqrt(L_low L_high) C))."""
    return 1.0 / ((2 * math.pi * f0) ** 2 * math.sqrt(l_low * l_high))


def inductance_for(f0: float, capacitance: float) -> float:
    """The inductance that resonates `capacitance` at f0: L = 1 / ((2 pi f0)^2 C)."""
    return 1.0 / ((2 * math.pi * f0) ** 2 * capacitance)


def position_in_range(f: float, low: float, high: float) -> float:
    """Where f sits in [low, high] on a log scale: 0 at low, 0.5 at the geometric centre, 1 at high."""
    if high <= low:
        return 0.5
    return math.log(f / low) / math.log(high / low)


def rc_high_pass_c(r_load: float, corner: float) -> float:
    """The coupling capacitance whose corner with r_load is `corner`: C = 1/(2 pi R f)."""
    return 1.0 / (2 * math.pi * r_load * corner)
