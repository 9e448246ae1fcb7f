"""Dividers with feedback: Millman's theorem (superposition of Thevenin sources at one node),
a pot's wiper as a Thevenin source, and the two thresholds a hysteresis resistor gives a node.
Checked against a node equation solved by hand and against the full nodal matrix of the network
(the pot's track as two resistors) solved with numpy.linalg.solve (Kirchhoff's current law at
every node: Hayt, Kemmerly & Durbin, Engineering Circuit Analysis, nodal analysis)."""

from __future__ import annotations

import numpy as np
import pytest

from speccheck.formulas import dividers


def test_hand_solved_node_equation():
    """3 V through 100 kohm into the node, 100 kohm to ground, 1 Mohm to an output at 0 V or 6 V.
    KCL at the node: (V - 3)/100k + V/100k + (V - V_out)/1M = 0, so V (2/100k + 1/1M) = 3/100k + V_out/1M:
    V_out = 0 V: V = 3e-5 / 2.1e-5 = 1.428571 V; V_out = 6 V: V = 3.6e-5 / 2.1e-5 = 1.714286 V
    (hand arithmetic), 0.285714 V apart = 6 V x 50k / (50k + 1M)."""
    low, high = dividers.feedback_thresholds(3.0, 100e3, 100e3, 1e6, 0.0, 6.0)
    assert low == pytest.approx(1.428571, abs=1e-6)
    assert high == pytest.approx(1.714286, abs=1e-6)
    assert dividers.feedback_width(100e3, 100e3, 1e6, 6.0) == pytest.approx(0.285714, abs=1e-6)
    assert dividers.node_voltage([(3.0, 100e3), (0.0, 100e3), (6.0, 1e6)]) == pytest.approx(
        1.714286, abs=1e-6
    )


def test_hand_solved_without_a_shunt():
    """3 V through 100 kohm, 1 Mohm to 0 V or 6 V, nothing else: V (1/100k + 1/1M) = 3/100k + V_out/1M,
    V = 3e-5 / 1.1e-5 = 2.727273 V or 3.6e-5 / 1.1e-5 = 3.272727 V (hand arithmetic), 6 V x 100/1100 apart."""
    low, high = dividers.feedback_thresholds(3.0, 100e3, None, 1e6, 0.0, 6.0)
    assert (low, high) == (pytest.approx(2.727273, abs=1e-6), pytest.approx(3.272727, abs=1e-6))
    assert dividers.feedback_width(100e3, None, 1e6, 6.0) == pytest.approx(0.545455, abs=1e-6)


def test_a_stiff_source_pins_the_node_and_leaves_no_hysteresis():
    # a wiper straight on the pin, at the end of its track: no resistance between the rail and the node
    assert dividers.node_voltage([(6.0, 0.0), (0.0, 1e6)]) == 6.0
    assert dividers.feedback_thresholds(6.0, 0.0, None, 1e6, 0.0, 6.0) == (6.0, 6.0)
    assert dividers.feedback_width(0.0, None, 1e6, 6.0) == 0.0
    with pytest.raises(ValueError):
        dividers.node_voltage([])


def test_wiper_thevenin_by_hand():
    # 10 kohm track from 0 V to 6 V, wiper in the middle: 3 V behind 5k || 5k = 2.5 kohm (Thevenin)
    assert dividers.wiper_source(0.0, 6.0, 10e3, 0.5) == pytest.approx((3.0, 2500.0))
    # a quarter from the 6 V end: 1.5 V from it, 7.5k || 2.5k = 1875 ohm
    assert dividers.wiper_source(6.0, 0.0, 10e3, 0.25) == pytest.approx((4.5, 1875.0))
    assert dividers.wiper_source(0.0, 6.0, 10e3, 0.0) == (0.0, 0.0)


def _solved(v_a, v_b, track, x, r_se, r_sh, r_f, v_out):
    """The network itself: V_a -(x R)- W -((1-x) R)- V_b, W -R_se- P, P -R_sh- ground, P -R_f- out.
    Unknowns W and P; KCL at each, solved with numpy (the pot ends never sit exactly at 0 or 1 here)."""
    g_a, g_b, g_se, g_sh, g_f = 1 / (x * track), 1 / ((1 - x) * track), 1 / r_se, 1 / r_sh, 1 / r_f
    matrix = np.array([[g_a + g_b + g_se, -g_se], [-g_se, g_se + g_sh + g_f]])
    rhs = np.array([g_a * v_a + g_b * v_b, g_f * v_out])
    return float(np.linalg.solve(matrix, rhs)[1])


@pytest.mark.parametrize(
    ("x", "r_se", "r_sh", "r_f"),
    [
        (0.5, 100e3, 220e3, 2.2e6),
        (0.1, 47e3, 47e3, 1e6),
        (0.9, 10e3, 1e6, 100e3),
        (0.3, 1e3, 10e3, 4.7e6),
    ],
)
def test_thresholds_against_the_nodal_matrix(x, r_se, r_sh, r_f):
    v_w, r_w = dividers.wiper_source(0.0, 6.0, 10e3, x)
    low, high = dividers.feedback_thresholds(v_w, r_w + r_se, r_sh, r_f, 0.2, 5.6)
    assert low == pytest.approx(_solved(0.0, 6.0, 10e3, x, r_se, r_sh, r_f, 0.2), rel=1e-12)
    assert high == pytest.approx(_solved(0.0, 6.0, 10e3, x, r_se, r_sh, r_f, 5.6), rel=1e-12)
    assert dividers.feedback_width(r_w + r_se, r_sh, r_f, 5.4) == pytest.approx(high - low, rel=1e-12)


@pytest.mark.parametrize(("target", "v_out"), [(1.0, 0.0), (0.7, 6.0), (1.45, 0.0)])
def test_the_knob_setting_for_a_threshold_solves_the_network(target, v_out):
    """The setting found puts the network itself (the nodal matrix, numpy) at the target voltage."""
    x = dividers.wiper_fraction_for(target, 0.0, 6.0, 10e3, 100e3, None, 2.2e6, v_out)
    assert x is not None and 0 < x < 1
    assert _solved(0.0, 6.0, 10e3, x, 100e3, 1e12, 2.2e6, v_out) == pytest.approx(target, abs=1e-5)


def test_a_target_the_track_cannot_reach():
    # 0..6 V through 100 kohm into 10 kohm to ground reaches at most 6 x 10/110 = 0.545 V (divider)
    assert dividers.wiper_fraction_for(1.0, 0.0, 6.0, 10e3, 100e3, 10e3, 1e9, 0.0) is None


# ---- network_voltages: nodal analysis with held nodes ------------------------------------------


def test_network_series_divider_is_ohms_law():
    # one current 6 V / (4.7k + 10k + 22k) through a series chain (Ohm's law, a series circuit)
    volts = dividers.network_voltages([("V6", "A", 4.7e3), ("A", "B", 10e3), ("B", "GND", 22e3)],
                                      {"V6": 6.0, "GND": 0.0})
    amps = 6.0 / 36.7e3
    assert volts == {"A": pytest.approx(6.0 - amps * 4.7e3), "B": pytest.approx(amps * 22e3)}


def test_network_two_free_nodes_by_hand():
    # 10 V -1k- A -2k- B -3k- ground, and 4k from A to ground. KCL at B: (A - B)/2k = B/3k, so
    # B = 0.6 A; at A: (10 - A)/1k = A/4k + (A - B)/2k = 0.45 A/1k, so A = 10/1.45 (Hayt, ch. 4)
    volts = dividers.network_voltages(
        [("V", "A", 1e3), ("A", "B", 2e3), ("B", "G", 3e3), ("A", "G", 4e3)], {"V": 10.0, "G": 0.0})
    assert volts["A"] == pytest.approx(10 / 1.45)
    assert volts["B"] == pytest.approx(0.6 * 10 / 1.45)


def test_network_one_node_is_millmans_theorem():
    # three sources into one node: (12/1k + 5/2k + 0/4k) / (1/1k + 1/2k + 1/4k) = 14.5/1.75 V
    volts = dividers.network_voltages([("P", "N", 1e3), ("Q", "N", 2e3), ("G", "N", 4e3)],
                                      {"P": 12.0, "Q": 5.0, "G": 0.0})
    assert volts == {"N": pytest.approx(14.5 / 1.75)}


def test_network_refuses_a_floating_node_and_a_zero_resistor():
    with pytest.raises(ValueError, match="floats"):
        dividers.network_voltages([("V", "A", 1e3), ("X", "Y", 1e3)], {"V": 1.0})
    with pytest.raises(ValueError, match="no positive resistance"):
        dividers.network_voltages([("V", "A", 0.0)], {"V": 1.0})
