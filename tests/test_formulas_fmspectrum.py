"""The FM Bessel spectrum against published tables and statements."""

from __future__ import annotations

import pytest

from speccheck.formulas import fmspectrum


def _power(beta: float, n: int) -> float:
    return dict(fmspectrum.sideband_powers(beta))[n]


# Abramowitz & Stegun, Handbook of Mathematical Functions, Table 9.1 (J0, J1, J2 at x = 1 and 5)
# and Table 9.2 (J_n(5) for n = 3..8), ten decimals.
AS_TABLE = [
    (1.0, 0, 0.7651976866), (1.0, 1, 0.4400505857), (1.0, 2, 0.1149034849),
    (5.0, 0, -0.1775967713), (5.0, 1, -0.3275791376), (5.0, 2, 0.0465651163),
    (5.0, 3, 0.3648312306), (5.0, 4, 0.3912323605), (5.0, 5, 0.2611405461),
    (5.0, 6, 0.1310487318), (5.0, 7, 0.0533764102), (5.0, 8, 0.0184052166),
]


@pytest.mark.parametrize("beta,n,j", AS_TABLE)
def test_line_powers_match_the_bessel_table(beta, n, j):
    # each line's power is J_n(beta)^2, on both sides of the carrier (J_-n = (-1)^n J_n)
    assert _power(beta, n) == pytest.approx(j * j, rel=1e-8)
    assert _power(beta, -n) == pytest.approx(j * j, rel=1e-8)


def test_the_carrier_vanishes_at_the_first_zero_of_j0():
    # A&S Table 9.5: the first zero of J0 is 2.4048255577 (the "carrier null" used to set deviation)
    assert _power(2.4048255577, 0) < 1e-18


@pytest.mark.parametrize("beta", [0.3, 1.0, 5.0 / 3.0, 5.0, 12.0])
def test_the_lines_hold_all_the_power(beta):
    # A&S 9.1.76: J0^2 + 2 * sum J_n^2 = 1
    assert sum(p for _, p in fmspectrum.sideband_powers(beta)) == pytest.approx(1.0, abs=1e-6)


@pytest.mark.parametrize("beta", range(1, 16))
def test_carson_band_holds_about_98_percent(beta):
    # Haykin, Communication Systems (Carson's rule): the band 2(deviation + f_m) holds about 98 %
    # of the power of a single-tone FM signal (checked at whole-number indices)
    assert fmspectrum.carson_share(beta * 1e3, 1e3) >= 0.98


def test_a_flat_filter_passes_everything_and_a_carrier_only_filter_the_carrier():
    flat = fmspectrum.passed_share(5e3, 3e3, lambda f: 0.0)
    assert flat == pytest.approx(1.0, abs=1e-6)
    # only the carrier line through: J0(5/3)^2; J0(5/3) = 0.3980 (A&S Table 9.1 interpolated between
    # x = 1.6 (0.4554021676) and 1.7 (0.3979848594)) -- use x = 1.7 directly
    carrier = fmspectrum.passed_share(1.7e3, 1e3, lambda f: 0.0 if abs(f) < 1 else 300.0)
    assert carrier == pytest.approx(0.3979848594 ** 2, rel=1e-6)


def test_loss_in_db():
    # definition of the decibel: half the power is 3.0103 dB
    assert fmspectrum.loss_db(0.5) == pytest.approx(3.0103, abs=1e-4)
    assert fmspectrum.loss_db(0.0) == float("inf")
