"""The RF formulas the frequency-plan and RF-path rules share, as small pure functions.

Every value is a plain float in SI units (Hz, F, H, ohm); no unit objects, no numpy, so that
a rule can call these thousands of times for the cost of a dictionary look-up. Each function
is tested in tests/test_freqplan.py or tests/test_rfpath.py against the published source
named beside it there.
"""

from __future__ import annotations

import math
from functools import lru_cache
from decimal import ROUND_HALF_UP, Decimal

TWO_PI = 2.0 * math.pi

# ---- necessary bandwidth and the emission designator ----------------------------------------


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
    for letter, scale in (("H", 1.0), ("K", 1e3), ("M", 1e6), ("G", 1e9)):
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


# ---- conversion ------------------------------------------------------------------------------


def lo_for(f_in: float, f_if: float, injection: str) -> float:
    """Local oscillator for a wanted IF: low side f_LO = f_in - f_IF, high side f_in + f_IF."""
    return f_in - f_if if injection == "low" else f_in + f_if


def image_frequency(f_in: float, f_lo: float) -> float:
    """The other input that mixes to the same IF: mirrored about the LO (2 f_LO - f_in)."""
    return 2.0 * f_lo - f_in


def spur_inputs(f_lo: float, f_if: float, order: int):
    """Every (m, k, s, f_s) with m = 1..order, k = -order..order and s = +1/-1 for which
    m f_s + k f_LO = s f_IF has a positive root f_s. The wanted response and the image are
    m = 1, k = -1; callers drop them."""
    for m in range(1, order + 1):
        for k in range(-order, order + 1):
            for s in (1, -1):
                fs = (s * f_if - k * f_lo) / m
                if fs > 0:
                    yield m, k, s, fs


# ---- resonance and Q ----------------------------------------------------------------------


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


def rc_corner(time_constant: float) -> float:
    """-3 dB corner of a first-order RC (de-emphasis or low-pass): f = 1 / (2 pi tau)."""
    return 1.0 / (TWO_PI * time_constant)


def rc_time_constant(corner: float) -> float:
    return 1.0 / (TWO_PI * corner)


# ---- crystal ------------------------------------------------------------------------------


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


# ---- matching -----------------------------------------------------------------------------


def l_network(r_source: float, r_load: float, f: float) -> dict:
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


# ---- preferred values and coils -------------------------------------------------------------

# IEC 60063 preferred number series, written out in full: the published values are NOT the
# rounded powers of ten (the E24 step 10**(11/24) = 2.61 is published as 2.7, 10**(12/24)
# = 3.16 as 3.3, and so on).
E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)
E24 = (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
       3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1)
SERIES = {"E12": E12, "E24": E24}


def nearest_preferred(value: float, series=E24) -> tuple[float, float]:
    """(nearest preferred value, its error as a fraction of `value`), nearest on a log scale."""
    if not (value > 0 and math.isfinite(value)):
        raise ValueError("a preferred value needs a positive number")
    decade = math.floor(math.log10(value))
    best = None
    for d in (decade - 1, decade, decade + 1):
        for cand in _decade(d, series):
            dist = abs(math.log(cand / value))
            if best is None or dist < best[0]:
                best = (dist, cand)
    pick = best[1]
    return pick, pick / value - 1.0


@lru_cache(maxsize=256)
def _decade(exponent: int, series: tuple) -> tuple:
    """The series' values in one decade, rounded to 6 digits so that 4.7e-9 stays 4.7e-9."""
    scale = 10.0 ** exponent
    return tuple(float(f"{mantissa * scale:.6g}") for mantissa in series)


def toroid_turns(inductance: float, al: float) -> float:
    """Turns for an inductance on a core of inductance factor AL (H per turn squared):
    N = sqrt(L / AL)."""
    return math.sqrt(inductance / al)


def toroid_inductance(turns: float, al: float) -> float:
    """L = AL N^2."""
    return al * turns * turns

