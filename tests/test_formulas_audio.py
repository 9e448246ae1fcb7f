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


def _kcl_response(r: float, c: float, r_load: float, f: float) -> float:
    """|V_out/V_in| of R into C with R_L across C, from the node equation at the output
    (Kirchhoff's current law): V_out·(1/R + 1/R_L + sC) = V_in/R, evaluated with scipy."""
    _, h = signal.freqs([1 / r], [c, 1 / r + 1 / r_load], worN=[2 * math.pi * f])
    return float(abs(h[0]))


@pytest.mark.parametrize(
    ("r", "c", "r_load"), [(10e3, 4.7e-9, 10e3), (10e3, 1e-9, 47e3), (5.1e3, 10e-9, 2.2e3)]
)
def test_loaded_corner_and_flat_loss_against_the_node_equation(r, c, r_load):
    """The loaded RC's -3 dB point (3 dB below its own flat level) and its flat loss, found from
    the circuit's node equation with scipy (brentq on the response), not from the formula."""
    from scipy.optimize import brentq

    flat = _kcl_response(r, c, r_load, 1e-3)
    corner = brentq(lambda f: _kcl_response(r, c, r_load, f) - flat / math.sqrt(2), 1.0, 1e7, xtol=1e-9)
    assert audio.loaded_rc_corner(r, c, r_load) == pytest.approx(corner, rel=1e-6)
    assert audio.divider_loss_db(r, r_load) == pytest.approx(-20 * math.log10(flat), abs=1e-9)


def test_loaded_corner_worked_example():
    """10 kohm with 4.7 nF, loaded by a 10 kohm volume track: Thevenin resistance 5 kohm
    (Horowitz & Hill, The Art of Electronics, 3rd ed., ch. 1: a divider of equal resistors has half
    of one as its source resistance), so the corner doubles from 3386 Hz to 6773 Hz (hand
    arithmetic: 1/(2 pi 5000 4.7e-9) = 6772.6 Hz) and the passband is halved: 6.02 dB."""
    assert audio.parallel(10e3, 10e3) == pytest.approx(5e3)
    assert audio.loaded_rc_corner(10e3, 4.7e-9, 10e3) == pytest.approx(6772.6, abs=0.1)
    assert audio.rc_corner(10e3, 4.7e-9) == pytest.approx(3386.3, abs=0.1)
    assert audio.divider_loss_db(10e3, 10e3) == pytest.approx(6.0206, abs=1e-4)
    assert audio.parallel_partner(5e3, 10e3) == pytest.approx(10e3)  # 10k || 10k = 5k
    assert audio.parallel_partner(5e3, 5e3) is None  # the load alone is already no more than 5 kohm


def test_node_resistance_series_parallel_and_bridge():
    """Series and parallel by hand (10k + 10k||10k = 15k); an unbalanced bridge against numpy's
    solver of the nodal equations written out in the test."""
    import numpy as np

    assert audio.node_resistance([("a", "b", 10e3), ("b", "g", 10e3), ("b", "g", 10e3)], "a", {"g"}) == (
        pytest.approx(15e3)
    )
    assert audio.node_resistance([("a", "b", 10e3)], "a", {"g"}) is None  # no path to ground
    assert audio.node_resistance([], "g", {"g"}) == 0.0
    # bridge: a-b 1, a-c 2, b-g 3, c-g 4, b-c 5 (ohm); 1 A into a, g grounded
    nets = [("a", "b", 1.0), ("a", "c", 2.0), ("b", "g", 3.0), ("c", "g", 4.0), ("b", "c", 5.0)]
    order = ["a", "b", "c"]
    g = np.zeros((3, 3))
    for x, y, ohms in nets:
        for p, q in ((x, y), (y, x)):
            if p in order:
                g[order.index(p), order.index(p)] += 1 / ohms
                if q in order:
                    g[order.index(p), order.index(q)] -= 1 / ohms
    v = np.linalg.solve(g, np.array([1.0, 0.0, 0.0]))
    assert audio.node_resistance(nets, "a", {"g"}) == pytest.approx(float(v[0]), rel=1e-12)
