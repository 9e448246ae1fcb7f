"""Filter response shapes against the Gaussian law and scipy's Butterworth responses."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import signal, stats

from speccheck.formulas import shapes


def test_gaussian_is_quadratic_in_db_and_matches_the_normal_curve():
    # Gaussian filter: |H(f)| = exp(-f^2 / (2 sigma^2)); scipy.stats.norm.pdf has that shape
    g = shapes.gaussian(1e6, 3.0)
    # sigma from the -3 dB half-width: 20 log10(e) * (B/2)^2 / (2 sigma^2) = 3
    sigma = 0.5e6 / math.sqrt(2 * 3.0 / (20 * math.log10(math.e)))
    for f in (0.0, 100e3, 500e3, 910e3, 2e6):
        ref = -20 * math.log10(stats.norm.pdf(f, scale=sigma) / stats.norm.pdf(0, scale=sigma))
        assert g.attenuation(f) == pytest.approx(min(ref, shapes.ULTIMATE_DB), abs=1e-9)
    # the figure: an image 910 kHz from the centre of a 1 MHz (3 dB) resolution filter
    # is only about 10 dB down: 3 dB * (910/500)^2 = 9.94 dB
    assert g.attenuation(910e3) == pytest.approx(9.94, abs=0.01)


def test_gaussian_shape_factor_is_root_twenty():
    # 60 dB : 3 dB width of a Gaussian = sqrt(60/3) = 4.472 (quadratic law)
    g = shapes.gaussian(10e3, 3.0)
    assert g.width_at(60.0) / g.width_at(3.0) == pytest.approx(math.sqrt(20.0), rel=1e-9)


def test_butterworth_order_equation():
    # Williams & Taylor, Electronic Filter Design Handbook, ch. 2: 3 dB at 1, 60 dB at 2 needs n = 9.97 (round
    # up to 10)
    n = shapes.butterworth_order(1.0, 3.0, 2.0, 60.0)
    assert n == pytest.approx(math.log10((1e6 - 1) / (10 ** 0.3 - 1)) / (2 * math.log10(2)), rel=1e-12)
    assert 9.9 < n < 10.0


@pytest.mark.parametrize("order", [1, 3, 5])
def test_butterworth_shape_matches_scipy(order):
    # scipy.signal.butter (analog low-pass prototype, corner = the 3 dB half-width) and freqs
    half = 7.5e3
    b, a = signal.butter(order, 2 * np.pi * half, analog=True)
    stop = 2 * half * (10 ** (40 / 10) - 1) ** (1 / (2 * order))  # the width where it is 40 dB down
    shape = shapes.from_stopband(2 * half, 10 * math.log10(2), stop, 40.0)
    assert shape.order == pytest.approx(order, rel=1e-9)
    for f in (1e3, 5e3, 7.5e3, 12e3, 20e3):
        _, h = signal.freqs(b, a, worN=[2 * np.pi * f])
        ref = -20 * np.log10(abs(h[0]))
        assert shape.attenuation(f) == pytest.approx(min(ref, shapes.ULTIMATE_DB), abs=1e-6)


def test_a_filter_hits_both_of_its_stated_points():
    # a 455 kHz ceramic filter quoted ±7.5 kHz at 6 dB and ±15 kHz at 40 dB (common practice figures)
    s = shapes.from_stopband(15e3, 6.0, 30e3, 40.0)
    assert s.attenuation(7.5e3) == pytest.approx(6.0, abs=1e-9)
    assert s.attenuation(15e3) == pytest.approx(40.0, abs=1e-9)
    assert s.width_at(40.0) == pytest.approx(30e3, rel=1e-9)


def test_single_tuned_circuit_falls_6_db_per_octave():
    # one tuned circuit (one pole): 10 log10(1 + x^2) -- about 6 dB per octave far out (textbook)
    s = shapes.from_class("lc", 10e3, 10 * math.log10(2))  # quoted at its half-power points
    assert s.attenuation(5e3) == pytest.approx(10 * math.log10(2), abs=1e-9)
    assert s.attenuation(15e3) == pytest.approx(10 * math.log10(1 + 9), abs=1e-9)
    assert s.attenuation(80e3) - s.attenuation(40e3) == pytest.approx(6.0, abs=0.05)


def test_rejection_is_the_difference_of_two_attenuations():
    g = shapes.gaussian(1e6, 3.0)
    # wanted on centre, unwanted 910 kHz off: the whole Gaussian attenuation
    assert shapes.rejection(g, 10.7e6, 10.7e6, 9.79e6) == pytest.approx(3.0 * (0.91 / 0.5) ** 2, abs=1e-9)
