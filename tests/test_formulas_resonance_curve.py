"""The universal resonance curve against scipy.signal.freqs of the second-order band-pass
H(s) = (w0/Q) s / (s^2 + (w0/Q) s + w0^2), the parallel tank's impedance over R
(Terman, Radio Engineers' Handbook, universal resonance curve)."""

import math

import numpy as np
import pytest
from scipy import signal

from speccheck.formulas.resonators import detuning, tank_amplitude, tank_phase


@pytest.mark.parametrize("f0,q", [(455e3, 16.28), (10.7e6, 40.0), (1e3, 0.7)])
def test_amplitude_and_phase_match_the_band_pass_transfer_function(f0, q):
    w0 = 2 * math.pi * f0
    freqs = np.linspace(0.6 * f0, 1.4 * f0, 41)
    _, h = signal.freqs([w0 / q, 0.0], [1.0, w0 / q, w0 * w0], worN=2 * math.pi * freqs)
    for f, hv in zip(freqs, h, strict=True):
        assert tank_amplitude(float(f), f0, q) == pytest.approx(abs(hv), rel=1e-9)
        assert tank_phase(float(f), f0, q) == pytest.approx(float(np.angle(hv)), abs=1e-9)


def test_half_power_points_are_f0_over_q_apart():
    # Textbook definition: bandwidth between the -3 dB points of a parallel RLC is f0/Q.
    f0, q = 455e3, 20.0
    half = f0 / (2 * q)
    upper = half + math.sqrt(half * half + f0 * f0)  # exact upper -3 dB point of the band-pass
    lower = upper - f0 / q
    assert tank_amplitude(upper, f0, q) == pytest.approx(1 / math.sqrt(2))
    assert tank_amplitude(lower, f0, q) == pytest.approx(1 / math.sqrt(2))
    assert detuning(upper, f0, q) == pytest.approx(1.0)
