"""The FM spectrum as Bessel-function sidebands, and what a filter leaves of it.

A carrier frequency-modulated by one tone f_m with peak deviation Δf (modulation index
β = Δf/f_m) is a set of lines at f_c + n·f_m, n = …, −1, 0, 1, …, whose amplitudes are the
Bessel functions of the first kind J_n(β); the line powers J_n(β)² add up to the unmodulated
carrier's power (Σ J_n² = 1, Abramowitz & Stegun 9.1.76). This is the textbook spectrum of
FM (e.g. Haykin, Communication Systems, ch. 4); Carson's rule B = 2(Δf + f_m) is the band that
holds about 98 % of that power.

A filter passes each line attenuated by its response at that offset, so the share of the
signal's power a path passes is Σ J_n(β)²·10^(−A(n·f_m + δ)/10), δ the offset of the carrier
from the filter's centre. The worst case for a voice or broadcast channel is the highest
modulating frequency at full deviation (the widest single-tone spectrum that fits the
channel's Carson band), so that is the tone the rules test with.

mpmath.besselj computes J_n (a small pure-Python library: a plain check must not pay for a
large numerical package's start-up); the tests cross-check it with scipy.special.jv.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from functools import lru_cache

# Lines below this power share are left out of a sum (their total stays under a millionth).
NEGLIGIBLE = 1e-9


def sideband_powers(beta: float) -> list[tuple[int, float]]:
    """(n, J_n(β)²) for every line that carries more than NEGLIGIBLE of the power."""
    if beta < 0 or not math.isfinite(beta):
        raise ValueError("a modulation index must be a finite number, zero or more")
    return list(_lines(beta))


@lru_cache(maxsize=256)
def _lines(beta: float) -> tuple[tuple[int, float], ...]:
    """The lines of one modulation index, computed once: a rule asks for the same spectrum through
    many filter shapes. J_-n = (-1)^n J_n (A&S 9.1.5), so only n >= 0 is computed."""
    from mpmath import besselj  # imported only when a spectrum is wanted

    top = int(beta + 20 + 3 * math.sqrt(beta + 1))  # J_n falls off fast beyond n = β + 1
    powers = {n: float(besselj(n, beta)) ** 2 for n in range(top + 1)}
    return tuple((n, powers[abs(n)]) for n in range(-top, top + 1) if powers[abs(n)] > NEGLIGIBLE or n == 0)


def passed_share(deviation: float, f_mod: float, attenuation_db: Callable[[float], float],
                 offset: float = 0.0) -> float:
    """Share (0 to 1) of a single-tone FM signal's power that a filter passes.

    attenuation_db(f) gives the filter's attenuation in dB at f Hz from its centre; the
    carrier sits `offset` Hz from that centre."""
    if f_mod <= 0:
        raise ValueError("the modulating frequency must be positive")
    return sum(p * 10 ** (-attenuation_db(offset + n * f_mod) / 10)
               for n, p in sideband_powers(deviation / f_mod))


def share_within(beta: float, highest: int) -> float:
    """Share of the power in the lines |n| <= highest (the carrier and `highest` pairs)."""
    return sum(p for n, p in sideband_powers(beta) if abs(n) <= highest)


def carson_share(deviation: float, f_mod: float) -> float:
    """Share of the power inside Carson's band 2(Δf + f_m): the lines |n|·f_m <= Δf + f_m."""
    highest = math.floor((deviation + f_mod) / f_mod + 1e-9)
    return share_within(deviation / f_mod, highest)


def loss_db(share: float) -> float:
    """A passed share as the loss in dB it means (−10·log10(share))."""
    return math.inf if share <= 0 else -10 * math.log10(share)
