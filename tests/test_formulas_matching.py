"""Matching arithmetic against hand-derived values: Γ = (Z − Z0)/(Z + Z0), return loss
−20·log10|Γ|, VSWR (1 + |Γ|)/(1 − |Γ|), mismatch loss −10·log10(1 − |Γ|²) (Pozar, Microwave
Engineering, §2.3; a VSWR of 2 is the published table value of 9.54 dB return loss and
0.51 dB mismatch loss), the L-network Q = sqrt(R_high/R_low − 1) (Bowick, RF Circuit Design,
ch. 4)."""

from __future__ import annotations

import math

import pytest

from speccheck.formulas import matching


def test_reflection_return_loss_vswr_mismatch_of_100_ohm_on_50():
    z = complex(100.0, 0.0)
    assert matching.reflection(z, 50.0) == pytest.approx(1 / 3)
    assert matching.return_loss_db(z, 50.0) == pytest.approx(9.542, abs=1e-3)  # VSWR 2 table
    assert matching.vswr(z, 50.0) == pytest.approx(2.0)
    assert matching.mismatch_loss_db(z, 50.0) == pytest.approx(-10 * math.log10(1 - 1 / 9))
    assert matching.mismatch_loss_db(z, 50.0) == pytest.approx(0.512, abs=1e-3)  # VSWR 2 table


def test_reactive_load_and_the_limits():
    z = complex(50.0, 50.0)  # Γ = j50/(100 + j50): |Γ|² = 2500/12500 = 0.2
    assert abs(matching.reflection(z, 50.0)) ** 2 == pytest.approx(0.2)
    assert matching.mismatch_loss_db(z, 50.0) == pytest.approx(-10 * math.log10(0.8))
    assert matching.vswr(z, 50.0) == pytest.approx((1 + math.sqrt(0.2)) / (1 - math.sqrt(0.2)))
    assert matching.return_loss_db(complex(50.0), 50.0) == math.inf  # matched
    assert matching.vswr(complex(0.0), 50.0) == math.inf  # a short reflects all
    assert matching.mismatch_loss_db(complex(0.0), 50.0) == math.inf


def test_l_network_both_directions():
    # 50 ohm to 200 ohm at 10 MHz: Q = sqrt(3); X_series = Q·50; X_shunt = 200/Q
    q = math.sqrt(3)
    w = 2 * math.pi * 10e6
    up = matching.l_network(50.0, 200.0, 10e6)
    assert up["q"] == pytest.approx(q)
    assert up["inductance"] == pytest.approx(q * 50 / w)
    assert up["capacitance"] == pytest.approx(1 / (w * 200 / q))
    assert up["shunt_on"] == "load"
    down = matching.l_network(200.0, 50.0, 10e6)
    assert down["q"] == pytest.approx(q) and down["shunt_on"] == "source"
    # the network really matches: the series-L / shunt-C section loads the source with 50 ohm
    zin = matching.zin_series_l_shunt_c(10e6, up["inductance"], up["capacitance"], 200.0)
    assert zin == pytest.approx(complex(50.0, 0.0), abs=1e-6)
    zin2 = matching.zin_shunt_c_series_l(10e6, down["inductance"], down["capacitance"], 50.0)
    assert zin2 == pytest.approx(complex(200.0, 0.0), abs=1e-6)


def test_shunt_termination_and_its_cost():
    # 50 ohm source, 1 kohm load: R ∥ 1000 = 50 needs R = 50·1000/950 = 52.63 ohm
    assert matching.termination_resistor(50.0, 1000.0) == pytest.approx(50 * 1000 / 950)
    assert matching.termination_resistor(1000.0, 50.0) == math.inf  # cannot raise a resistance
    # it gives up 10·log10(1000/50) = 13.01 dB against a lossless match
    assert matching.termination_cost_db(50.0, 1000.0) == pytest.approx(13.0103, abs=1e-4)
    assert matching.termination_cost_db(50.0, 50.0) == 0.0


def test_l_network_edges():
    same = matching.l_network(50.0, 50.0, 10e6)  # nothing to match: Q 0, no shunt part
    assert same["q"] == 0.0 and same["x_series"] == 0.0
    assert same["x_shunt"] == math.inf and same["capacitance"] == 0.0
    assert same["shunt_on"] == "load"
    small = matching.l_network(50.0, 60.0, 10e6)  # Q = sqrt(0.2) = 0.447, below 1
    w = 2 * math.pi * 10e6
    assert small["x_shunt"] == pytest.approx(60.0 / math.sqrt(0.2))
    assert small["capacitance"] == pytest.approx(math.sqrt(0.2) / (w * 60.0))
    assert small["x_series"] == pytest.approx(math.sqrt(0.2) * 50.0)


def test_termination_edges():
    assert matching.termination_resistor(50.0, 50.0) == math.inf  # already matched: no resistor
    assert matching.termination_cost_db(50.0, 10.0) == 0.0  # a load below the source: nothing given up
