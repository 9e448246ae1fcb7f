"""Helpers of the freqplan family pins (tests/test_freqplan_*.py): where a text sits in a plan and
the crystal arithmetic of the shipped clean plan, each written out from its formula.

Numbers shown in a message are formatted with the project's own display (units.fmt: 6 significant
digits for a frequency `hz`, 4 for `khz`), but every number handed to it is computed here.
"""

from __future__ import annotations

import math

from conftest import CLEAN, line_of
from scipy.special import jv

from speccheck import units

OSC = "oscillator: {crystal: X1, injection: low, mode: fundamental, load_caps: [C6, C7], stray: 4 pF}"


def hz6(value: float) -> str:
    """A frequency as a message shows it (6 significant digits)."""
    return units.fmt(value, "Hz", 6)


def khz4(value: float) -> str:
    """A frequency as a message shows it (4 significant digits)."""
    return units.fmt(value, "Hz", 4)


def clean() -> str:
    return CLEAN.read_text("utf-8")


def col_of(text: str, needle: str, key: str, nth: int = 0) -> int:
    """1-based column of `key` on the nth line holding `needle` (a location points at a value's
    first character, or a mapping's first key)."""
    line = text.splitlines()[line_of(text, needle, nth) - 1]
    return line.index(key) + 1


def where(text: str, needle: str, key: str, path: str, nth: int = 0) -> dict:
    """line, col and path of a finding that points at the text `key` on the line holding `needle`."""
    return {"line": line_of(text, needle, nth), "col": col_of(text, needle, key, nth), "path": path}


def pulling(c1m: float, c0: float, cl: float) -> float:
    """A crystal's pulling above series resonance, D = C1m / (2 (C0 + CL)) (crystal makers'
    application notes; check values 400 ppm at 20 fF, 5 pF, 20 pF in test_freqplan.py)."""
    return c1m / (2 * (c0 + cl))


# The clean plan's X1: 10.245 MHz, 20 ppm, specified load 20 pF, C1m 15 fF, C0 4 pF; the oscillator
# gives it 33 pF in series with 33 pF plus 4 pF stray = 20.5 pF (C1 C2 / (C1 + C2) + C_stray).
CL_CLEAN = 33e-12 * 33e-12 / (33e-12 + 33e-12) + 4e-12
PULL = pulling(15e-15, 4e-12, CL_CLEAN) - pulling(15e-15, 4e-12, 20e-12)
LO = 10.245e6 * (1 + PULL)  # f_LO = f_x (1 + D) (low side, fundamental, no multiplier)
F_IF = 10.7e6 - LO  # low side: f_IF = f_in - f_LO (Tooley, Electronic Circuits)
LO_UNC = 20e-6 * 10.245e6  # the crystal's tolerance
IF_UNC = 500.0 + LO_UNC  # the source's drift plus the LO's spread


# ---- responses and the FM spectrum, written out ---------------------------------------------------

ULTIMATE = 80.0  # a response's floor, the shapes module's modelling choice (speccheck.formulas.shapes)


def butterworth(width: float, at_db: float, stop_width: float, stop_db: float):
    """Attenuation (dB at an offset from the centre) of the equivalent Butterworth through (width at
    at_db) and (stop_width at stop_db): order N = log10(k_s / k_p) / (2 log10(stop_width / width)),
    A = 10 log10(1 + k_p (2 f / width)^(2N)) (Williams & Taylor, Electronic Filter Design Handbook),
    floored at ULTIMATE."""
    k_p, k_s = 10 ** (at_db / 10) - 1, 10 ** (stop_db / 10) - 1
    n = math.log10(k_s / k_p) / (2 * math.log10(stop_width / width))

    def att(f: float) -> float:
        return min(10 * math.log10(1 + k_p * (abs(f) / (width / 2)) ** (2 * n)), ULTIMATE)

    att.order = n  # type: ignore[attr-defined]
    return att


def ceramic(width: float, at_db: float = 6.0):
    """The typical ceramic filter of the shapes module: twice as wide at 40 dB as at 6 dB (from
    memory), its order kept when the width is quoted at another level."""
    k6, k40 = 10**0.6 - 1, 10**4 - 1
    n = math.log10(k40 / k6) / (2 * math.log10(2))
    k_p = 10 ** (at_db / 10) - 1

    def att(f: float) -> float:
        return min(10 * math.log10(1 + k_p * (abs(f) / (width / 2)) ** (2 * n)), ULTIMATE)

    att.order = n  # type: ignore[attr-defined]
    return att


def gaussian(width: float, at_db: float = 3.0):
    """A Gaussian response quoted at at_db: A = at_db (2 f / width)^2 (textbook Gaussian filter)."""
    return lambda f: min(at_db * (2 * f / width) ** 2, ULTIMATE)


def share(dev: float, tone: float, att, offset: float = 0.0) -> float:
    """Share of a single-tone FM signal's power a response passes: sum over n of
    J_n(beta)^2 10^(-A(offset + n f_m) / 10), beta = dev / f_m (Haykin, Communication Systems;
    Abramowitz & Stegun 9.1.76), J_n from scipy.special.jv."""
    beta = dev / tone
    top = int(beta) + 40
    return sum(jv(n, beta) ** 2 * 10 ** (-att(offset + n * tone) / 10) for n in range(-top, top + 1))


def share_text(s: float) -> str:
    """A share as the rules show it: percent to 0.1 and its loss 10 log10(s) in dB to 0.01."""
    return f"{s:.1%} ({10 * math.log10(s):.2f} dB)"
