"""Edges of the formulas that other test files pin in the middle: the guards, the floors and the
labels, each expected value derived by hand from the formula in the function's docstring
(rectangular-wave Fourier series, Oppenheim & Willsky; Peukert's law t = H·(C/(I·H))^k;
a Gaussian response a = A·(2·Δf/B)², so the width at d dB is B·sqrt(d/A); a Butterworth
through two points, Williams & Taylor, Electronic Filter Design Handbook, ch. 2)."""

from __future__ import annotations

import math

import pytest

from speccheck.formulas import battery, harmonics, shapes


def test_pulse_harmonic_guards_and_values():
    assert harmonics.pulse_harmonic(1, 0.3) == pytest.approx(1.0)  # the fundamental is the reference
    assert harmonics.pulse_harmonic(3, 0.5) == pytest.approx(1 / 3)  # square wave: 1/n
    # duty 1/4, n = 2: |sin(π/2)| / (2·sin(π/4)) = 0.7071
    assert harmonics.pulse_harmonic(2, 0.25) == pytest.approx(1 / (2 * math.sin(math.pi / 4)))
    for n, duty in ((0, 0.5), (1, 0.0), (1, 1.0), (2, 1.5)):
        with pytest.raises(ValueError, match="n must be 1 or more and the duty cycle between 0 and 1"):
            harmonics.pulse_harmonic(n, duty)


def test_pulse_harmonic_db_and_its_floor():
    assert harmonics.pulse_harmonic_db(3, 0.5) == pytest.approx(20 * math.log10(1 / 3))  # −9.54 dB
    assert harmonics.pulse_harmonic_db(2, 0.5) == harmonics.FLOOR_DB  # a square wave has no even ones
    assert harmonics.pulse_harmonic_db(1, 0.5) == 0.0


def test_running_hours():
    assert battery.running_hours(0.5, 0.0) == math.inf  # nothing drawn
    assert battery.running_hours(0.5, 0.05) == pytest.approx(10.0)  # C/I without a rated current
    assert battery.running_hours(0.5, 0.05, rated_current=0.025) == pytest.approx(10.0)  # k = 1: C/I
    # Peukert k = 1.3, C = 0.5 Ah at the 20 h rate (25 mA): at 50 mA, 20·(0.5/(0.05·20))^1.3 = 8.12 h
    assert battery.running_hours(0.5, 0.05, 0.025, 1.3) == pytest.approx(20 * 0.5 ** 1.3)
    assert battery.running_hours(0.5, 0.0125, 0.025, 1.3) == pytest.approx(20 * 2 ** 1.3)  # more at less


def test_gaussian_and_flat_widths():
    g = shapes.gaussian(1e6)
    assert (g.kind, g.what, g.typical, g.at_db) == ("gaussian", "Gaussian", False, 3.0)
    assert shapes.gaussian(1e6, typical=True).typical is True
    assert g.width_at(0.0) == 0.0
    assert g.width_at(12.0) == pytest.approx(2e6)  # sqrt(12/3) = 2
    assert g.width_at(0.75) == pytest.approx(0.5e6)  # below 1 dB too
    assert g.attenuation(0.5e6) == pytest.approx(3.0)  # at the quoted edge
    flat = shapes.Shape(20e3, 6.0, "flat")
    assert flat.width_at(60.0) == 20e3
    assert flat.attenuation(10e3) == 0.0 and flat.attenuation(10.1e3) == flat.ultimate_db


def test_butterworth_width_at_inverts_attenuation():
    s = shapes.from_stopband(20e3, 6.0, 40e3, 60.0, what="a 455 kHz ceramic filter")
    assert s.what == "a 455 kHz ceramic filter" and s.kind == "butterworth" and s.typical is False
    assert s.width_at(60.0) == pytest.approx(40e3)
    assert s.width_at(6.0) == pytest.approx(20e3)
    assert s.attenuation(s.width_at(30.0) / 2) == pytest.approx(30.0)
    with pytest.raises(ValueError):
        shapes.from_stopband(20e3, 6.0, 10e3, 60.0)  # a stopband narrower than the passband


def test_pulse_harmonic_db_at_another_duty_and_rejection():
    # duty 1/4, n = 2: 0.7071 of the fundamental, −3.01 dB (not the square wave's missing even one)
    expected = 20 * math.log10(1 / (2 * math.sin(math.pi / 4)))
    assert harmonics.pulse_harmonic_db(2, 0.25) == pytest.approx(expected)
    g = shapes.gaussian(10e3)  # 3 dB at ±5 kHz, 12 dB at ±10 kHz (a = 3·(2Δf/B)²)
    assert shapes.rejection(g, 455e3, 460e3, 465e3) == pytest.approx(12.0 - 3.0)
    assert shapes.from_stopband(20e3, 6.0, 40e3, 60.0, typical=True).typical is True
    assert shapes.from_stopband(20e3, 6.0, 40e3, 60.0).what == ""
