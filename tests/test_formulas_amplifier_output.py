"""A real amplifier's full output (saturation, rated output) and the RMS of its supply current."""

from __future__ import annotations

import math

import pytest
from scipy import integrate

from speccheck.formulas import amplifiers


def _half_wave(peak: float):
    return lambda t: max(0.0, peak * math.sin(2 * math.pi * t))


def _mean(f) -> float:
    return integrate.quad(f, 0, 1, limit=400)[0]


def test_saturation_lowers_the_single_ended_output():
    # clipping limit with the output devices' saturation (Boylestad & Nashelsky §12 form):
    # P = (V_s - V_sat)^2 / (8 R_L): 12 V, 3 V total saturation, 8 ohm -> 81/64 = 1.27 W, against the
    # rail-to-rail 144/64 = 2.25 W
    real = amplifiers.class_b_full_output("single-ended", 12.0, 8.0, saturation=3.0)
    assert real["p_out"] == pytest.approx(81 / 64)
    assert real["v_peak"] == pytest.approx(4.5)
    assert amplifiers.class_b_full_output("single-ended", 12.0, 8.0)["p_out"] == pytest.approx(144 / 64)


def test_saturation_in_a_bridge_and_a_split_supply():
    # bridge: each output loses V_sat, the load sees V_s - V_sat: (12 - 3)^2 / (2 x 8) = 5.06 W
    bridge = amplifiers.class_b_full_output("bridge", 12.0, 8.0, saturation=3.0)
    assert bridge["p_out"] == pytest.approx(81 / 16)
    # split ±15 V, 4 V saturation in all: peak 13 V, 169 / 16 W into 8 ohm
    split = amplifiers.class_b_full_output("split-supply", 15.0, 8.0, -15.0, saturation=4.0)
    assert split["p_out"] == pytest.approx(169 / 16)


def test_rated_output_caps_the_swing():
    # a stated 0.5 W into 8 ohm: peak sqrt(2 x 8 x 0.5) = 2.83 V (P = V_peak^2 / (2 R_L))
    capped = amplifiers.class_b_full_output("single-ended", 12.0, 8.0, saturation=3.0, rated_output=0.5)
    assert capped["p_out"] == pytest.approx(0.5)
    assert capped["v_peak"] == pytest.approx(math.sqrt(8.0))


def test_half_wave_supply_current_average_and_rms():
    # one device of a single-ended stage draws half-waves of peak I_p: average I_p/pi, RMS I_p/2
    # (checked by numerical integration with scipy.integrate.quad)
    full = amplifiers.class_b_full_output("single-ended", 12.0, 8.0, saturation=3.0)
    peak = 4.5 / 8.0
    assert full["i_pos"] == pytest.approx(_mean(_half_wave(peak)), rel=1e-6)
    assert full["rms_pos"] == pytest.approx(math.sqrt(_mean(lambda t: _half_wave(peak)(t) ** 2)), rel=1e-6)


def test_bridge_draws_a_full_wave():
    full = amplifiers.class_b_full_output("bridge", 12.0, 8.0, saturation=3.0)
    peak = 9.0 / 8.0
    wave = lambda t: abs(peak * math.sin(2 * math.pi * t))  # noqa: E731
    assert full["i_pos"] == pytest.approx(_mean(wave), rel=1e-6)
    assert full["rms_pos"] == pytest.approx(math.sqrt(_mean(lambda t: wave(t) ** 2)), rel=1e-6)


def test_rms_with_a_steady_current():
    # 21 mA of quiescent draw under a 0.5625 A half-wave: the RMS of the sum, by integration
    peak, dc = 0.5625, 0.021
    ref = math.sqrt(_mean(lambda t: (dc + _half_wave(peak)(t)) ** 2))
    assert amplifiers.rms_with_dc(dc, peak / math.pi, peak / 2) == pytest.approx(ref, rel=1e-6)
