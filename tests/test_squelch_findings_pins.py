"""squelch.pin-voltage: every finding, whole, at the point where it trips.

The plans and helpers are those of tests/test_squelch_findings.py; the limits are the profile's
v_min / v_max where given, else ground - 0.3 V and the chip's supply + 0.3 V (common practice for
an input's absolute maximum ratings), and the divider is worked out there (Thevenin).
"""

from __future__ import annotations

import pytest
from conftest import check, facts, of
from test_squelch_findings import PIN_FIX, at, divider, finding, one_pot, plan, pot, res, same, shown

# ---- squelch.pin-voltage --------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("pin", "volts", "allowed"),
    [
        ("U1.sq_lim", 5.1, 5.0),  # the profile's v_max 5 V
        ("U1.sq_lim", 5.0, None),  # exactly at v_max
        ("U1.sq", 6.4, 6.3),  # no v_max: the 6 V supply + 0.3 V (common practice)
        ("U1.sq", 6.3, None),  # exactly at supply + 0.3 V
    ],
)
def test_the_pin_driven_above_what_it_takes(pin, volts, allowed):
    text = one_pot("A, GND", {"A": volts}, pin=pin)
    found = [facts(f) for f in of(check(text), "squelch.pin-voltage")]
    if allowed is None:
        assert found == []
        return
    message = (
        f"{pin} can be driven to {shown(volts)} (RV1's wiper spans 0 V to {shown(volts)}), above the "
        f"{shown(allowed)} it takes (U1 runs on V6)"
    )
    same(
        found,
        [
            finding(
                "squelch.pin-voltage",
                "error",
                at(text, "control", "RV1"),
                message,
                {"pin highest": (volts, "V"), "allowed": (allowed, "V")},
                PIN_FIX,
            )
        ],
    )


@pytest.mark.parametrize(
    ("pin", "volts", "allowed"),
    [
        ("U1.sq_lim", -0.6, -0.5),  # the profile's v_min -0.5 V
        ("U1.sq_lim", -0.5, None),  # exactly at v_min
        ("U1.sq", -0.4, -0.3),  # no v_min: ground - 0.3 V (common practice)
        ("U1.sq", -0.3, None),  # exactly at ground - 0.3 V
    ],
)
def test_the_pin_driven_below_what_it_takes(pin, volts, allowed):
    text = one_pot("A, GND", {"A": volts}, pin=pin)
    found = [facts(f) for f in of(check(text), "squelch.pin-voltage")]
    if allowed is None:
        assert found == []
        return
    message = (
        f"{pin} can be driven to {shown(volts)} (RV1's wiper spans {shown(volts)} to 0 V), below the "
        f"{shown(allowed)} it takes"
    )
    same(
        found,
        [
            finding(
                "squelch.pin-voltage",
                "error",
                at(text, "control", "RV1"),
                message,
                {"pin lowest": (volts, "V"), "allowed": (allowed, "V")},
                PIN_FIX,
            )
        ],
    )


def test_both_ends_out_and_every_stage_checked():
    parts = (
        pot("RV1", "X, Y", "W1")
        + pot("RV3", "V12, A", "W3")
        + pot("RV4", "V12, GND", "W4")
        + pot("RV5", "V12, A", "W5")
    )
    stages = [
        {"device": "U1"},  # no control
        {"device": "U1", "control": "RV1", "pin": "U1.sq"},  # network unknown
        {"device": "U1", "control": "RV3", "pin": "U1.sq"},  # -1 V to 12 V on a 6 V chip: both ends out
        {"device": "U2", "control": "RV4", "pin": "U2.sq"},  # U2 has no supply rail and sq no v_max
        {"device": "U2", "control": "RV5", "pin": "U2.sq_lim"},  # v_max 5 V stated, no rail named
    ]
    text = plan(parts, stages, {"A": -1.0})
    found = [facts(f) for f in of(check(text), "squelch.pin-voltage")]
    same(
        found,
        [
            # (the report lists a stage's findings in message order)
            finding(
                "squelch.pin-voltage",
                "error",
                at(text, "control", "RV3"),
                "U1.sq can be driven to -1 V (RV3's wiper spans -1 V to 12 V), below the -300 mV it takes",
                {"pin lowest": (-1.0, "V"), "allowed": (-0.3, "V")},
                PIN_FIX,
            ),
            finding(
                "squelch.pin-voltage",
                "error",
                at(text, "control", "RV3"),
                "U1.sq can be driven to 12 V (RV3's wiper spans -1 V to 12 V), above the 6.3 V it takes "
                "(U1 runs on V6)",
                {"pin highest": (12.0, "V"), "allowed": (6.0 + 0.3, "V")},
                PIN_FIX,
            ),
            finding(
                "squelch.pin-voltage",
                "error",
                at(text, "control", "RV5"),
                "U2.sq_lim can be driven to -1 V (RV5's wiper spans -1 V to 12 V), "
                "below the -500 mV it takes",
                {"pin lowest": (-1.0, "V"), "allowed": (-0.5, "V")},
                PIN_FIX,
            ),
            finding(
                "squelch.pin-voltage",
                "error",
                at(text, "control", "RV5"),
                "U2.sq_lim can be driven to 12 V (RV5's wiper spans -1 V to 12 V), above the 5 V it takes",
                {"pin highest": (12.0, "V"), "allowed": (5.0, "V")},
                PIN_FIX,
            ),
        ],
    )


def test_a_divider_brings_the_pin_inside_the_supply():
    # 12 V x 10k / (10k + 10k) = 6 V, under 6.3 V: no finding; the same pot straight on the pin: 12 V
    parts = (
        pot("RV1", "V12, GND", "W1")
        + res("R1", "10 kohm", "W1", "U1.sq")
        + res("R2", "10 kohm", "U1.sq", "GND")
    )
    text = plan(parts, [{"device": "U1", "control": "RV1", "pin": "U1.sq", "series": "R1", "shunt": "R2"}])
    assert divider(12.0, 10e3, 10e3)[0] == pytest.approx(6.0)
    assert of(check(text), "squelch.pin-voltage") == []
