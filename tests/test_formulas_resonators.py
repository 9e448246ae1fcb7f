"""Resonators: f0 = 1/(2π·sqrt(LC)), parallel-RLC Q = R_p/(ω0·L) and a coil's loss resistance
R_p = Q·ω0·L (Wikibooks, Practical Electronics / Parallel RLC: 10.7 MHz, 1 µH, 10 kΩ gives
Q 148.7), crystal pulling D = C1/(2·(C0 + CL)) (IEC 60444 parameters; 20 fF, 5 pF, 20 pF gives
400 ppm), toroid turns N = sqrt(L/AL); each expected number derived by hand."""

from __future__ import annotations

import math

import pytest

from speccheck.formulas import resonators

W = 2 * math.pi * 10.7e6


def test_resonance_and_its_capacitance():
    c = 1 / (W ** 2 * 1e-6)  # 221.2 pF resonates 1 µH at 10.7 MHz
    assert c == pytest.approx(221.2e-12, rel=1e-3)
    assert resonators.capacitance_for(10.7e6, 1e-6) == pytest.approx(c)
    assert resonators.resonance(1e-6, c) == pytest.approx(10.7e6)


def test_q_and_coil_loss_resistance():
    assert resonators.parallel_q(10e3, 10.7e6, 1e-6) == pytest.approx(148.7, abs=0.05)  # Wikibooks
    # a coil of unloaded Q 100 at 10.7 MHz, 1 µH: R_p = 100·ω·L = 6723 ohm; doubling L doubles it
    assert resonators.coil_parallel_resistance(100, 10.7e6, 1e-6) == pytest.approx(100 * W * 1e-6)
    assert resonators.coil_parallel_resistance(100, 10.7e6, 2e-6) == pytest.approx(2 * 100 * W * 1e-6)
    # loaded by 10 kohm: R = 6723 ∥ 10000 = 4020 ohm, Q = 4020/(ω·L) = 59.8
    r = resonators.parallel(10e3, 100 * W * 1e-6)
    assert r == pytest.approx(1 / (1 / 10e3 + 1 / (100 * W * 1e-6)))
    assert resonators.parallel_q(r, 10.7e6, 1e-6) == pytest.approx(r / (W * 1e-6))
    assert resonators.parallel(100.0, 100.0, 100.0) == pytest.approx(100 / 3)


def test_crystal_load_and_pulling():
    assert resonators.series_load(33e-12, 33e-12) == pytest.approx(16.5e-12)
    assert resonators.series_load(22e-12, 47e-12, 5e-12) == pytest.approx(22 * 47 / 69 * 1e-12 + 5e-12)
    assert resonators.pulling(20e-15, 5e-12, 20e-12) == pytest.approx(400e-6)
    assert resonators.pulling(20e-15, 5e-12, 18e-12) == pytest.approx(20e-15 / (2 * 23e-12))  # 434.8 ppm
    # running at 18 pF instead of the calibrated 20 pF: +34.8 ppm, high because the load is smaller
    assert resonators.pulling_shift(20e-15, 5e-12, 18e-12, 20e-12) == pytest.approx(34.78e-6, abs=1e-8)
    assert resonators.pulling_shift(20e-15, 5e-12, 22e-12, 20e-12) < 0


def test_toroid_turns_and_inductance():
    # AL 4.9 nH/turn²: 50 turns give 12.25 µH, and 12.25 µH needs 50 turns
    assert resonators.toroid_inductance(50, 4.9e-9) == pytest.approx(12.25e-6)
    assert resonators.toroid_turns(12.25e-6, 4.9e-9) == pytest.approx(50.0)
    assert resonators.toroid_turns(4 * 12.25e-6, 4.9e-9) == pytest.approx(100.0)  # N ∝ sqrt(L)
