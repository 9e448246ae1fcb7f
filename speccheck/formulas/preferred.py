"""Preferred values: the E12/E24 series of IEC 60063 and the R10 fuse ratings of IEC 60127-1.

Both are published as lists, not as the powers of ten they approximate, so they are written
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



# Preferred fuse ratings: the R10 series of IEC 60127-1 Annex A (ISO 3 preferred numbers),
# written out as the standard lists them, not computed as 10^(i/10) (3.15 and 6.3 are not
# what the formula gives).
R10 = (1.0, 1.25, 1.6, 2.0, 2.5, 3.15, 4.0, 5.0, 6.3, 8.0)


def r10_up(amps: float) -> float:
    """The smallest R10 preferred rating at or above `amps` (IEC 60127-1 Annex A)."""
    if not amps or amps <= 0 or not math.isfinite(amps):
        raise ValueError("a rating must be a positive number")
    decade = math.floor(math.log10(amps))
    for d in (decade - 1, decade, decade + 1):
        for step in R10:
            value = float(f"{step * 10.0 ** d:.6g}")
            if value >= amps * (1 - 1e-9):
                return value
    return float(f"{10.0 ** (decade + 1):.6g}")  # not reached
