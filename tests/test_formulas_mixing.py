"""Mixing arithmetic: f_LO = f_in ∓ f_IF, the image 2·f_LO − f_in, and every input that gives
m·f_s + k·f_LO = ±f_IF up to an order (textbook mixer analysis, e.g. the ARRL Handbook's
mixer chapter); each expected frequency solved by hand here."""

from __future__ import annotations

import pytest

from speccheck.formulas import mixing

LO, IF = 10.245e6, 455e3  # the 10.7 MHz to 455 kHz second conversion, low-side LO


def test_lo_and_image():
    assert mixing.lo_for(10.7e6, IF, "low") == pytest.approx(LO)
    assert mixing.lo_for(10.7e6, IF, "high") == pytest.approx(11.155e6)
    assert mixing.image_frequency(10.7e6, LO) == pytest.approx(9.79e6)  # 2·10.245 − 10.7


def test_spur_inputs_reach_the_stated_order_and_no_further():
    found = {(m, k, s): fs for m, k, s, fs in mixing.spur_inputs(LO, IF, 5)}
    assert found[(1, -1, 1)] == pytest.approx(10.7e6)  # the wanted response
    assert found[(1, -1, -1)] == pytest.approx(9.79e6)  # the image
    # 4th order: 2·fs − 2·fLO = IF -> fs = fLO + IF/2
    assert found[(2, -2, 1)] == pytest.approx(LO + IF / 2)
    # 5th order, both ways: 2·fs − 3·fLO = IF and 3·fs − 2·fLO = −IF
    assert found[(2, -3, 1)] == pytest.approx((IF + 3 * LO) / 2)
    assert found[(3, -2, -1)] == pytest.approx((2 * LO - IF) / 3)
    # the highest signal order and LO order are searched; k = +5 gives no positive root
    assert found[(5, -1, 1)] == pytest.approx((IF + LO) / 5)
    assert found[(1, -5, 1)] == pytest.approx(IF + 5 * LO)
    assert (1, 5, 1) not in found
    # nothing beyond the order
    third = {(m, k, s) for m, k, s, _ in mixing.spur_inputs(LO, IF, 3)}
    assert (2, -2, 1) in third and (4, -1, 1) not in third and (1, -4, 1) not in third
    assert all(1 <= m <= 5 and -5 <= k <= 5 for m, k, _ in found)


def test_every_listed_input_solves_the_mixing_equation():
    for m, k, s, fs in mixing.spur_inputs(LO, IF, 5):
        assert m * fs + k * LO == pytest.approx(s * IF)
        assert fs > 0


def test_up_conversion_finds_positive_lo_orders():
    # LO 1.5 MHz, IF 10.7 MHz (an up-converter): fs = (IF − k·LO)/m has roots for k > 0 too
    found = {(m, k, s): fs for m, k, s, fs in mixing.spur_inputs(1.5e6, 10.7e6, 5)}
    assert found[(1, 5, 1)] == pytest.approx(10.7e6 - 5 * 1.5e6)  # 3.2 MHz
    assert found[(1, 4, 1)] == pytest.approx(10.7e6 - 4 * 1.5e6)  # 4.7 MHz
    assert (1, 6, 1) not in found  # 10.7 − 9 = 1.7 MHz would be a root, but order 6 is not searched
