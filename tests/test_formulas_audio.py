"""Audio networks: a first-order RC corner 1/(2π·R·C) = 1/(2π·τ), its loss 10·log10(1 + (f_c/f)²)
below the corner, checked against scipy.signal.freqs; FM de-emphasis 50 µs / 75 µs (ITU-R
BS.450): corners 3183 Hz and 2122 Hz."""

from __future__ import annotations

import math

import pytest
from scipy import signal

from speccheck.formulas import audio


def test_corners_and_time_constants():
    assert audio.rc_corner(8.0, 470e-6) == pytest.approx(1 / (2 * math.pi * 8 * 470e-6))  # 42.3 Hz
    assert audio.corner_from_tau(50e-6) == pytest.approx(3183.1, abs=0.1)
    assert audio.corner_from_tau(75e-6) == pytest.approx(2122.1, abs=0.1)
    assert audio.rc_time_constant(3183.1) == pytest.approx(50e-6, rel=1e-4)
    assert audio.DEEMPHASIS == {"itu-region-1": 50e-6, "itu-region-2": 75e-6, "itu-region-3": 50e-6}


@pytest.mark.parametrize("ratio", [0.25, 0.5, 1.0, 2.0])
def test_high_pass_loss_against_scipy(ratio):
    corner = 100.0
    f = corner * ratio
    tau = 1 / (2 * math.pi * corner)
    _, h = signal.freqs([tau, 0.0], [tau, 1.0], worN=[2 * math.pi * f])  # s·τ / (s·τ + 1)
    assert audio.high_pass_loss_db(f, corner) == pytest.approx(-20 * math.log10(abs(h[0])), abs=1e-9)
