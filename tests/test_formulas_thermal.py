"""Heat: the series thermal-resistance model T_j = T_a + P·(θ_JC + θ_CS + θ_SA) and the
heat sink it asks for, θ_SA = (T_j,max − T_a)/P − θ_JC − θ_CS (heat-sink selection as in
every handbook's thermal chapter); a linear regulator dissipates (V_in − V_out)·I_out + V_in·I_q."""

from __future__ import annotations

import pytest

from speccheck.formulas import thermal


def test_junction_temperature_and_sink():
    assert thermal.junction_temperature(40.0, 2.0, 50.0) == pytest.approx(140.0)
    sink = thermal.heat_sink_needed(5.0, 150.0, 50.0, 3.0, 1.0)
    assert sink == pytest.approx(16.0)  # (150 − 50)/5 − 3 − 1
    # the sink found holds the junction exactly at its limit
    assert thermal.junction_temperature(50.0, 5.0, 3.0 + 1.0 + sink) == pytest.approx(150.0)


def test_regulator_dissipation():
    assert thermal.regulator_dissipation(12.0, 5.0, 0.5) == pytest.approx(3.5)
    assert thermal.regulator_dissipation(12.0, 5.0, 0.5, 0.005) == pytest.approx(3.5 + 0.06)
