"""Limiter (rectangular-wave) harmonics against the Fourier series and numpy's FFT."""

from __future__ import annotations

import math

import numpy as np
import pytest

from speccheck.formulas import harmonics


def _fft_relative(n: int, duty: float, samples: int = 200_000) -> float:
    # numpy.fft of one period of a sampled rectangular wave: |X[n]| / |X[1]|
    t = np.arange(samples) / samples
    wave = np.where(t < duty, 1.0, -1.0)
    spectrum = np.abs(np.fft.rfft(wave))
    return spectrum[n] / spectrum[1]


@pytest.mark.parametrize("n", [3, 5, 7, 25, 65])
def test_square_wave_odd_harmonics_fall_as_one_over_n(n):
    # Fourier series of a square wave: 4/(pi n) for odd n, i.e. 1/n of the fundamental
    assert harmonics.pulse_harmonic(n) == pytest.approx(1 / n, rel=1e-12)
    assert harmonics.pulse_harmonic_db(n) == pytest.approx(-20 * math.log10(n), abs=1e-9)


def test_square_wave_has_no_even_harmonics():
    assert harmonics.pulse_harmonic(2) < 1e-15
    assert harmonics.pulse_harmonic_db(64) == harmonics.FLOOR_DB


@pytest.mark.parametrize("n,duty", [(2, 0.48), (4, 0.48), (3, 0.45), (64, 0.49), (65, 0.49)])
def test_asymmetric_wave_matches_the_fft(n, duty):
    assert harmonics.pulse_harmonic(n, duty) == pytest.approx(_fft_relative(n, duty), rel=2e-3, abs=1e-5)


def test_harmonics_reaching_the_input():
    # the case: a 455 kHz IF reaches 29.6 MHz plus half a 180 kHz path with its 65th harmonic
    assert harmonics.harmonics_reaching(455e3, 29.6e6 + 90e3) == 65


@pytest.mark.parametrize("n", [2, 3, 4, 23, 24, 25, 64, 65])
def test_limiter_envelope_bounds_every_duty_within_the_asymmetry(n):
    # the envelope is at least the Fourier coefficient for every duty cycle from 48 % to 50 %
    # (checked on a fine grid) and reaches 1/n for odd n at 50 % (square wave)
    env = harmonics.limiter_harmonic(n, 0.02)
    worst = max(harmonics.pulse_harmonic(n, d) for d in np.linspace(0.48, 0.5, 2001))
    assert env >= worst - 1e-12
    assert env <= worst * 1.02 + 1e-3  # and not far above it (a bound, not a guess)
    if n % 2:
        assert harmonics.limiter_harmonic(n, 0.0) == pytest.approx(1 / n)
