"""Fuses and wiring: RC inrush i = (V/R)·e^(−t/RC), so I²t = V²·C/(2R) (∫ of the square of
the exponential); a current-limited charge takes t = C·V/I, so I²t = I·C·V; the IEC 60127-2
gates (from memory: time-lag 10·I_n for 10 ms, quick-acting 4·I_n for 3 ms); linear rerating
above an ambient; chassis ampacity rows of the Handbook of Electronic Tables and Formulas."""

from __future__ import annotations

import math

import pytest
from scipy import integrate

from speccheck.formulas import fuses


def test_rc_inrush_against_the_integral():
    v, c, r = 12.0, 4700e-6, 0.1
    peak, tau, i2t = fuses.inrush(v, c, r)
    assert peak == pytest.approx(120.0) and tau == pytest.approx(470e-6)
    numeric, _ = integrate.quad(lambda t: (v / r * math.exp(-t / (r * c))) ** 2, 0, 50 * r * c)  # scipy
    assert i2t == pytest.approx(numeric, rel=1e-6)
    assert i2t == pytest.approx(v * v * c / (2 * r))


def test_current_limited_charge():
    # 3 A limit charging 4700 µF to 12 V: 18.8 ms at 3 A, I²t = 9·0.0188 = 0.1692 A²s
    peak, bound = fuses.limited_inrush(12.0, 4700e-6, 3.0)
    assert peak == 3.0
    t = 4700e-6 * 12.0 / 3.0
    assert bound == pytest.approx(3.0 ** 2 * t)
    assert bound == pytest.approx(0.1692)


def _limited_charge_i2t(v: float, c: float, r: float, limit: float) -> float:
    """The I²t of a current-limited RC charge, integrated numerically with scipy: the current is
    min(I_limit, (V - v_c)/R); the capacitor voltage comes from solve_ivp, its square from quad."""
    from scipy.integrate import solve_ivp

    def current(vc: float) -> float:
        return min(limit, max(0.0, (v - vc) / r))

    stop = c * v / limit + 30 * r * c
    run = solve_ivp(lambda t, y: [current(y[0]) / c], (0, stop), [0.0], dense_output=True, rtol=1e-10,
                    atol=1e-12, max_step=r * c / 20)
    knee = c * (v - limit * r) / limit  # where the limit lets go (the integrand has a kink there)
    value, _ = integrate.quad(lambda t: current(run.sol(t)[0]) ** 2, 0, stop, points=[knee], limit=400)
    return float(value)


@pytest.mark.parametrize(("v", "c", "r", "limit"), [(18.0, 2200e-6, 0.5, 3.0), (12.0, 4700e-6, 0.1, 5.0)])
def test_current_limited_charge_through_a_resistance_against_scipy(v, c, r, limit):
    # 18 V, 2200 uF, 0.5 ohm, 3 A: I·C·V = 0.1188, less I²·R·C/2 = 0.00495, 0.11385 A²s (hand)
    peak, i2t = fuses.limited_inrush(v, c, limit, r)
    assert peak == limit
    assert i2t == pytest.approx(_limited_charge_i2t(v, c, r, limit), rel=1e-4)
    assert i2t < fuses.limited_inrush(v, c, limit)[1]  # below the bound of a charge all at the limit


def test_gates_as_i2t():
    assert fuses.fuse_gate_i2t("time-lag", 1.0) == pytest.approx(10.0 ** 2 * 0.010)  # 1 A²s
    assert fuses.fuse_gate_i2t("quick-acting", 1.0) == pytest.approx(4.0 ** 2 * 0.003)  # 0.048 A²s
    assert fuses.fuse_gate_i2t("time-lag", 2.0) == pytest.approx(4.0)  # scales with I_n²


def test_rerating_just_inside_and_outside_its_knee():
    assert fuses.rerate(None, 0.005, 25.0) == 1.0
    assert fuses.rerate(25.0, 0.005, 25.0) == 1.0  # at the knee: full rating
    assert fuses.rerate(26.0, 0.005, 25.0) == pytest.approx(0.995)  # 1 °C above: 0.5 % less
    assert fuses.rerate(65.0, 0.005, 25.0) == pytest.approx(0.8)
    assert fuses.rerate(500.0, 0.005, 25.0) == pytest.approx(0.05)  # floor: never below 5 %


def test_awg_rows():
    assert fuses.awg_ampacity(22) == (7.0, 22)  # handbook chassis column
    assert fuses.awg_ampacity(21) == (7.0, 22)  # an odd gauge takes the next thinner row
    assert fuses.awg_ampacity(None) is None
    assert fuses.awg_ampacity(60) is None


def test_long_time_gate_is_one_and_a_half_times_the_rating():
    # IEC 60127-2 standard sheets (from memory): a fuse-link carries 1.5 x I_n for at least one hour
    assert fuses.FUSE_CARRY == 1.5
