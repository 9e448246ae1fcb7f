"""Class-B/AB output stages, each figure derived by hand from the textbook relations
(Boylestad & Nashelsky, Electronic Devices and Circuit Theory, ch. 12: P_o = V_p²/(2 R_L),
a half-wave of peak I_p averages I_p/π, a full wave 2·I_p/π; the ideal efficiency at full
output is π/4 = 78.54 %; a device of a push-pull pair dissipates at most V_CC²/(π² R_L))."""

from __future__ import annotations

import math

import pytest

from speccheck.formulas import amplifiers

PI_OVER_4 = math.pi / 4  # Boylestad & Nashelsky §12: maximum class-B efficiency 78.54 %


def test_split_rails_single_ended_and_split():
    assert amplifiers.split_rails("single-ended", 12.0) == (6.0, 6.0)  # output idles at Vs/2
    assert amplifiers.split_rails("split-supply", 15.0, -12.0) == (15.0, 12.0)
    assert amplifiers.split_rails("split-supply", 15.0) == (15.0, 15.0)  # symmetric when not given


def test_bridge_full_output_draws_a_full_wave():
    # 12 V bridge into 8 ohm: each end swings the whole supply, V_p = 12 V, I_p = 1.5 A;
    # the supply sees a full-wave rectified current, average 2·I_p/π = 0.9549 A.
    full = amplifiers.class_b_full_output("bridge", 12.0, 8.0)
    assert full["v_peak"] == pytest.approx(12.0)
    assert full["i_peak"] == pytest.approx(1.5)
    assert full["i_pos"] == pytest.approx(2 * 1.5 / math.pi)
    assert full["i_neg"] == 0.0
    assert full["p_out"] == pytest.approx(12.0 ** 2 / (2 * 8.0))  # 9 W
    assert full["p_out"] / full["p_in"] == pytest.approx(PI_OVER_4)


def test_single_ended_full_output_half_wave_from_one_supply():
    # 12 V single-ended into 8 ohm: V_p = 6 V, I_p = 0.75 A, the upper device draws I_p/π.
    full = amplifiers.class_b_full_output("single-ended", 12.0, 8.0)
    assert full["v_peak"] == pytest.approx(6.0)
    assert full["i_pos"] == pytest.approx(0.75 / math.pi)
    assert full["p_in"] == pytest.approx(12.0 * 0.75 / math.pi)
    assert full["p_out"] / full["p_in"] == pytest.approx(PI_OVER_4)


def test_split_supply_span_is_both_rails():
    # ±15 V into 8 ohm: each rail delivers I_p/π; the input power spans both rails (30 V).
    full = amplifiers.class_b_full_output("split-supply", 15.0, 8.0, -15.0)
    i_half = (15.0 / 8.0) / math.pi
    assert full["i_pos"] == pytest.approx(i_half) and full["i_neg"] == pytest.approx(i_half)
    assert full["p_in"] == pytest.approx(30.0 * i_half)
    assert full["p_out"] / full["p_in"] == pytest.approx(PI_OVER_4)
    # unequal rails: the smaller one clips first (V_p = 12 V), the span is still 15 + 12 V
    lop = amplifiers.class_b_full_output("split-supply", 15.0, 8.0, -12.0)
    assert lop["v_peak"] == pytest.approx(12.0)
    assert lop["p_in"] == pytest.approx(27.0 * (12.0 / 8.0) / math.pi)


def test_dissipation_per_topology():
    # single-ended 12 V, 8 ohm: two devices on ±6 V, each 6²/(π²·8), total 12²/(2π²·8) = 0.912 W
    total, per = amplifiers.class_b_dissipation("single-ended", 12.0, 8.0)
    assert per == pytest.approx(36 / (math.pi ** 2 * 8))
    assert total == pytest.approx(144 / (2 * math.pi ** 2 * 8))
    # bridge: four devices each on ±6 V into R_L/2 = 4 ohm: total 2·12²/(π²·8), four times the above
    btotal, bper = amplifiers.class_b_dissipation("bridge", 12.0, 8.0)
    assert bper == pytest.approx(36 / (math.pi ** 2 * 4))
    assert btotal == pytest.approx(4 * total)
    # unequal split rails: the larger rail's device is the hotter one
    stotal, sper = amplifiers.class_b_dissipation("split-supply", 15.0, 8.0, -12.0)
    assert sper == pytest.approx(225 / (math.pi ** 2 * 8))
    assert stotal == pytest.approx((225 + 144) / (math.pi ** 2 * 8))
