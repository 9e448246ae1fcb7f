"""Preferred values: the E12, E24 and E96 series of IEC 60063 and the R10 fuse ratings of IEC 60127-1.

All are published as lists, not as the powers of ten they approximate, so they are written
out here as the standards list them.
"""

from __future__ import annotations

import math
from functools import lru_cache

# IEC 60063 preferred number series, written out in full: the published values are NOT the
# rounded powers of ten (the E24 step 10**(11/24) = 2.61 is published as 2.7, 10**(12/24)
# = 3.16 as 3.3, and so on).
E12 = (1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2)


E24 = (1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0,
       3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1)


# E96 (the 1 % series), IEC 60063: three figures, each 10^(i/96) rounded; the test compares every
# entry with that definition.
E96 = (1.00, 1.02, 1.05, 1.07, 1.10, 1.13, 1.15, 1.18, 1.21, 1.24, 1.27, 1.30, 1.33, 1.37, 1.40, 1.43,
       1.47, 1.50, 1.54, 1.58, 1.62, 1.65, 1.69, 1.74, 1.78, 1.82, 1.87, 1.91, 1.96, 2.00, 2.05, 2.10,
       2.15, 2.21, 2.26, 2.32, 2.37, 2.43, 2.49, 2.55, 2.61, 2.67, 2.74, 2.80, 2.87, 2.94, 3.01, 3.09,
       3.16, 3.24, 3.32, 3.40, 3.48, 3.57, 3.65, 3.74, 3.83, 3.92, 4.02, 4.12, 4.22, 4.32, 4.42, 4.53,
       4.64, 4.75, 4.87, 4.99, 5.11, 5.23, 5.36, 5.49, 5.62, 5.76, 5.90, 6.04, 6.19, 6.34, 6.49, 6.65,
       6.81, 6.98, 7.15, 7.32, 7.50, 7.68, 7.87, 8.06, 8.25, 8.45, 8.66, 8.87, 9.09, 9.31, 9.53, 9.76)


SERIES = {"E12": E12, "E24": E24, "E96": E96}


def nearest_preferred(value: float, series: tuple[float, ...] = E24) -> tuple[float, float]:
    """(nearest preferred value, its error as a fraction of `value`), nearest on a log scale."""
    if not (value > 0 and math.isfinite(value)):
        raise ValueError("a preferred value needs a positive number")
    decade = math.floor(math.log10(value))
    best = (math.inf, value)
    # 10^decade (every series starts at 1.0) is at or below value, so no lower decade can be nearer
    for d in (decade, decade + 1):
        for cand in _decade(d, series):
            dist = abs(math.log(cand / value))
            if dist < best[0]:
                best = (dist, cand)
    pick = best[1]
    return pick, pick / value - 1.0


def decade_values(exponent: int, series: tuple[float, ...]) -> tuple[float, ...]:
    """The series' values from 10^exponent up to (not including) 10^(exponent+1)."""
    return _decade(exponent, series)


@lru_cache(maxsize=256)
def _decade(exponent: int, series: tuple[float, ...]) -> tuple[float, ...]:
    """The series' values in one decade, rounded to 6 digits so that 4.7e-9 stays 4.7e-9."""
    scale = 10.0 ** exponent
    return tuple(float(f"{mantissa * scale:.6g}") for mantissa in series)



# Preferred fuse ratings: the R10 series of IEC 60127-1 Annex A (ISO 3 preferred numbers),
# written out as the standard lists them, not computed as 10^(i/10) (3.15 and 6.3 are not
# what the formula gives).
R10 = (1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0)


def r10_up(amps: float) -> float:
    """The smallest R10 preferred rating at or above `amps` (IEC 60127-1 Annex A)."""
    if not amps or amps <= 0 or not math.isfinite(amps):
        raise ValueError("a rating must be a positive number")
    decade = math.floor(math.log10(amps))
    # amps lies below 10^(decade+1), the next decade's first step, so the search always ends there
    steps = (value for d in (decade, decade + 1) for value in _decade(d, R10))
    return next(value for value in steps if value >= amps * (1 - 1e-9))
