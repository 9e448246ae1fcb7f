"""squelch: every finding of the three squelch rules, whole, at the point where it trips.

This file: squelch.threshold-range and the shared plans and arithmetic; squelch.pin-voltage in
test_squelch_findings_pins.py, squelch.hysteresis in test_squelch_findings_hysteresis.py.

Each plan is written here: one chip profile whose pins give a threshold range of 1 V to 2 V, a pot
whose track ends sit on rails or declared nodes, and the stage's series, shunt and hysteresis
resistors. The expected voltages are derived in this file by superposition over the divider, with
the Thevenin equivalent of each node written out (helpers below), not with
speccheck/formulas/dividers.py:

- a pot's wiper at a fraction x of its track from the V_a end is a Thevenin source of
  V_a + x (V_b - V_a) behind x R || (1 - x) R = x (1 - x) R (Thevenin's theorem; Horowitz & Hill,
  The Art of Electronics, 3rd ed., ch. 1); at an end of the track that resistance is zero;
- the wiper through the series resistor R_se with the shunt R_sh to ground is, seen from the
  pin, V_th = V_w R_sh / (R_se + R_sh) behind R_th = R_se || R_sh (Thevenin; voltage divider);
- with the hysteresis resistor R_f to an output at V_out, the pin is the sum of the two sources,
  each through the other resistance (superposition): V = V_th R_f / (R_th + R_f)
  + V_out R_th / (R_th + R_f), so the pin moves by swing x R_th / (R_th + R_f) when the output
  switches (Horowitz & Hill, ch. 4, hysteresis by positive feedback).

Displayed numbers are written with four significant digits and the milli prefix below 1 V (the
project's display convention, re-done here by `shown` on the test's own numbers).
"""

from __future__ import annotations

import pytest
from conftest import check, facts, line_of, of, sheet_rows

HEAD = """build_spec: 2

build:
  name: squelch threshold bench
  purpose: the squelch rules at their thresholds

profiles:
  sq-chip:
    class: fm-if-subsystem
    supply_min: 2 V
    supply_max: 8 V
    quiescent_current: 4 mA
    pins:
      sq: {role: squelch, threshold_min: 1 V, threshold_max: 2 V}
      sq_lim: {role: squelch, threshold_min: 1 V, threshold_max: 2 V, v_min: -0.5 V, v_max: 5 V}
      sq_half: {role: squelch, threshold_min: 1 V}
      sq_top: {role: squelch, threshold_max: 2 V}
      sq_wide: {role: squelch, threshold_min: 1 V, threshold_max: 3 V}
      sq_bare: {role: squelch}
      out: {role: mute, output_low: 0.5 V, output_high: 4.5 V}
      out_low: {role: mute, output_low: 0.5 V}
      out_high: {role: mute, output_high: 4.5 V}
      out_bare: {role: mute}
      out_small: {role: mute, output_low: 1 V, output_high: 1.5 V}

rails:
  V12: {voltage: 12 V, from: supply}
  V6: {voltage: 6 V, from: supply}
  GND: {voltage: 0 V}

devices:
  U1: {profile: sq-chip, rail: V6}
  U2: {profile: sq-chip}
"""

T_MIN, T_MAX = 1.0, 2.0  # the sq pins' threshold range (the profile above)

RANGE_FIX = (
    "Change the resistors around the pot (or the rail it sits on) so the pin's voltage sweeps the "
    "device's threshold range with a little to spare at each end."
)
PIN_FIX = (
    "Feed the pot from the chip's own supply rail, or add a shunt resistor from the pin to ground so "
    "the divider keeps the pin inside the chip's supply."
)
HYST_FIX = (
    "Choose the hysteresis resistor so the threshold moves by a tenth to a third of the pin's threshold "
    "range: a smaller resistor for more, a larger one for less; return it to the device's switching output."
)
LEVELS_FIX = (
    "Return the resistor to a device pin, and give the pin's output_low and output_high in its profile."
)


def plan(parts: str, stages: list[dict], nodes: dict | None = None) -> str:
    """HEAD with the given parts, declared nodes {name: volts} and squelch stages {key: value}."""
    text = HEAD
    if nodes:
        text += "\nnodes:\n" + "".join(f"  {name}: {{dc: {volts} V}}\n" for name, volts in nodes.items())
    text += "\nparts:\n" + parts + "\nchain:\n"
    for stage in stages:
        text += "  - stage: squelch\n" + "".join(f"    {key}: {val}\n" for key, val in stage.items())
    return text


def pot(name: str, ends: str, wiper: str, value: str | None = "10 kohm") -> str:
    shown_value = f"value: {value}, " if value else ""
    return f"  {name}: {{kind: potentiometer, {shown_value}ends: [{ends}], wiper: {wiper}}}\n"


def res(name: str, value: str | None, a: str, b: str) -> str:
    shown_value = f"value: {value}, " if value else ""
    return f"  {name}: {{kind: resistor, {shown_value}ends: [{a}, {b}]}}\n"


def at(text: str, key: str, value: str) -> tuple[int, int, str]:
    """(line, col, path) of a stage's `key: value` line (1-based; path chain[i].key)."""
    line = line_of(text, f"    {key}: {value}")
    lines = text.splitlines()
    index = sum(1 for row in lines[:line] if row == "  - stage: squelch") - 1
    return line, lines[line - 1].index(value) + 1, f"chain[{index}].{key}"


def finding(rule, level, place, message, values=None, fix="", stage="squelch") -> dict:
    line, col, path = place
    return {
        "rule": rule,
        "level": level,
        "line": line,
        "col": col,
        "path": path,
        "message": message,
        "values": values or {},
        "fix": fix,
        "stage": stage,
        "signal": "",
        "position": "",
    }


def same(got: list, want: list) -> None:
    """Whole findings compared, numbers within 1e-9 relative (float arithmetic order only)."""
    assert len(got) == len(want), [f["message"] for f in got]
    for g, w in zip(got, want, strict=True):
        w = dict(
            w, values={k: (pytest.approx(v, rel=1e-9, abs=1e-12), u) for k, (v, u) in w["values"].items()}
        )
        assert g == w


def shown(volts: float) -> str:
    if volts == 0 or abs(volts) >= 1:
        return f"{volts:.4g} V"
    return f"{volts * 1e3:.4g} mV"


# ---- the arithmetic, written out (see the module docstring) -------------------------------------


def wiper(v_a: float, v_b: float, track: float, x: float) -> tuple[float, float]:
    """Thevenin source of a pot's wiper: V_a + x (V_b - V_a) behind x R || (1 - x) R."""
    upper, lower = x * track, (1 - x) * track
    r = 0.0 if upper == 0 or lower == 0 else upper * lower / (upper + lower)
    return v_a + x * (v_b - v_a), r


def divider(v_w: float, r_se: float, r_sh: float | None) -> tuple[float, float]:
    """Thevenin equivalent of the pin with the hysteresis resistor lifted: V_w through R_se, R_sh to
    ground (voltage divider V R2 / (R1 + R2) behind R1 || R2); no shunt: V_w behind R_se."""
    if r_sh is None:
        return v_w, r_se
    return v_w * r_sh / (r_se + r_sh), r_se * r_sh / (r_se + r_sh)


def with_feedback(v_th: float, r_th: float, r_f: float, v_out: float) -> float:
    """Superposition of the node's Thevenin source and the output through R_f."""
    return v_th * r_f / (r_th + r_f) + v_out * r_th / (r_th + r_f)


def width(r_th: float, r_f: float, swing: float) -> float:
    """How far the pin moves when the output swings: the output's share of the superposition."""
    return swing * r_th / (r_th + r_f)


# ---- squelch.threshold-range ----------------------------------------------------------------------


def one_pot(ends: str, nodes: dict | None = None, pin: str = "U1.sq", **extra) -> str:
    return plan(pot("RV1", ends, "W1"), [{"device": "U1", "control": "RV1", "pin": pin, **extra}], nodes)


@pytest.mark.parametrize(
    ("ends", "volts", "level"),
    [
        ("A, GND", 0.9, "error"),  # top of the sweep 0.9 V below threshold_min 1 V: never reaches
        ("A, GND", 1.0, "warning"),  # top exactly at threshold_min: reaches it, short of threshold_max
        ("V6, A", 2.1, "error"),  # bottom 2.1 V above threshold_max 2 V
        ("V6, A", 2.0, "warning"),  # bottom exactly at threshold_max, above threshold_min
        ("V6, A", 1.1, "warning"),  # bottom above threshold_min: part of the range
        ("V6, A", 1.0, None),  # bottom at threshold_min, top 6 V: the whole range
        ("A, GND", 1.9, "warning"),  # top under threshold_max
        ("A, GND", 2.0, None),  # top exactly at threshold_max, bottom 0 V
    ],
)
def test_the_sweep_against_the_threshold_range_just_inside_and_outside(ends, volts, level):
    text = one_pot(ends, {"A": volts})
    found = [facts(f) for f in of(check(text), "squelch.threshold-range")]
    # no divider: the pin sees the wiper, which spans the two ends exactly (0 V or 6 V and the node)
    lo, hi = sorted((volts, 0.0 if "GND" in ends else 6.0))
    how = f"RV1's wiper spans {shown(lo)} to {shown(hi)}"
    values = {
        "pin lowest": (lo, "V"),
        "pin highest": (hi, "V"),
        "threshold_min": (1.0, "V"),
        "threshold_max": (2.0, "V"),
    }
    if level is None:
        assert found == []
    elif level == "error":
        message = (
            f"the squelch control never reaches the threshold of U1.sq: {how}, so the pin sees "
            f"{shown(lo)} to {shown(hi)}, outside the 1 V to 2 V the squelch switches over: it "
            "can never be set"
        )
        same(
            found,
            [
                finding(
                    "squelch.threshold-range", "error", at(text, "control", "RV1"), message, values, RANGE_FIX
                )
            ],
        )
    else:
        message = (
            f"the squelch control covers only part of the threshold range of U1.sq: {how}, so the "
            f"pin sees {shown(lo)} to {shown(hi)} of the 1 V to 2 V needed"
        )
        same(
            found,
            [
                finding(
                    "squelch.threshold-range",
                    "warning",
                    at(text, "control", "RV1"),
                    message,
                    values,
                    RANGE_FIX,
                )
            ],
        )


def test_a_series_and_shunt_divider_scales_the_sweep():
    parts = (
        pot("RV1", "V6, GND", "W1")
        + res("R1", "100 kohm", "W1", "U1.sq")
        + res("R2", "10 kohm", "U1.sq", "GND")
    )
    text = plan(parts, [{"device": "U1", "control": "RV1", "pin": "U1.sq", "series": "R1", "shunt": "R2"}])
    result = check(text)
    # divider R2 / (R1 + R2) = 10k / 110k = 0.0909; 6 V x 0.0909 = 545.5 mV, under threshold_min 1 V
    v_top = divider(6.0, 100e3, 10e3)[0]
    assert v_top == pytest.approx(6 * 10 / 110)
    message = (
        f"the squelch control never reaches the threshold of U1.sq: RV1's wiper spans 0 V to 6 V, "
        f"divided by R1 and R2 to 0.0909, so the pin sees 0 V to {shown(v_top)}, outside the 1 V "
        "to 2 V the squelch switches over: it can never be set"
    )
    values = {
        "pin lowest": (0.0, "V"),
        "pin highest": (v_top, "V"),
        "threshold_min": (1.0, "V"),
        "threshold_max": (2.0, "V"),
    }
    same(
        [facts(f) for f in of(result, "squelch.threshold-range")],
        [finding("squelch.threshold-range", "error", at(text, "control", "RV1"), message, values, RANGE_FIX)],
    )
    assert sheet_rows(result, "squelch.threshold-range") == [
        ("squelch", "U1.sq", "lowest voltage at the pin", 0.0, "V", "", ""),
        ("squelch", "U1.sq", "highest voltage at the pin", pytest.approx(v_top), "V", "", ""),
    ]


def test_the_divider_scales_both_ends_of_the_sweep():
    # a pot from 6 V to 12 V through 10 kohm with 10 kohm to ground: k = 10k / 20k = 0.5, so the pin
    # sees 3 V to 6 V, all of it above threshold_max 2 V
    parts = (
        pot("RV1", "V6, V12", "W1")
        + res("R1", "10 kohm", "W1", "U1.sq")
        + res("R2", "10 kohm", "U1.sq", "GND")
    )
    text = plan(parts, [{"device": "U1", "control": "RV1", "pin": "U1.sq", "series": "R1", "shunt": "R2"}])
    lo, hi = divider(6.0, 10e3, 10e3)[0], divider(12.0, 10e3, 10e3)[0]
    assert (lo, hi) == pytest.approx((3.0, 6.0))
    message = (
        "the squelch control never reaches the threshold of U1.sq: RV1's wiper spans 6 V to 12 V, divided by "
        f"R1 and R2 to 0.5, so the pin sees {shown(lo)} to {shown(hi)}, outside the 1 V to 2 V the squelch "
        "switches over: it can never be set"
    )
    values = {
        "pin lowest": (lo, "V"),
        "pin highest": (hi, "V"),
        "threshold_min": (1.0, "V"),
        "threshold_max": (2.0, "V"),
    }
    same(
        [facts(f) for f in of(check(text), "squelch.threshold-range")],
        [finding("squelch.threshold-range", "error", at(text, "control", "RV1"), message, values, RANGE_FIX)],
    )


def test_a_shunt_without_a_series_resistor_leaves_the_wiper_undivided():
    # the wiper's own resistance is zero at the track's ends: R2 alone divides by R2 / (0 + R2) = 1
    parts = pot("RV1", "A, GND", "U1.sq") + res("R2", "10 kohm", "U1.sq", "GND")
    text = plan(parts, [{"device": "U1", "control": "RV1", "pin": "U1.sq", "shunt": "R2"}], {"A": 0.9})
    message = (
        "the squelch control never reaches the threshold of U1.sq: RV1's wiper spans 0 V to 900 mV, "
        "divided by the wiper and R2 to 1, so the pin sees 0 V to 900 mV, outside the 1 V to 2 V the "
        "squelch switches over: it can never be set"
    )
    values = {
        "pin lowest": (0.0, "V"),
        "pin highest": (0.9, "V"),
        "threshold_min": (1.0, "V"),
        "threshold_max": (2.0, "V"),
    }
    same(
        [facts(f) for f in of(check(text), "squelch.threshold-range")],
        [finding("squelch.threshold-range", "error", at(text, "control", "RV1"), message, values, RANGE_FIX)],
    )


def test_the_hysteresis_resistor_loads_the_extremes():
    # lowest: wiper at 0 V with the output low (500 mV); highest: wiper at 6 V with it high (4.5 V)
    parts = (
        pot("RV1", "V6, GND", "W1")
        + res("R1", "100 kohm", "W1", "U1.sq")
        + res("R2", "47 kohm", "U1.sq", "GND")
        + res("R3", "1 Mohm", "U1.out", "U1.sq")
    )
    stage = {
        "device": "U1",
        "control": "RV1",
        "pin": "U1.sq",
        "series": "R1",
        "shunt": "R2",
        "hysteresis": "R3",
    }
    text = plan(parts, [stage])
    result = check(text)
    lo = with_feedback(*divider(0.0, 100e3, 47e3), 1e6, 0.5)
    hi = with_feedback(*divider(6.0, 100e3, 47e3), 1e6, 4.5)
    # R_th = 100k || 47k = 31.97 kohm; lo = 0.5 x 31.97k / 1031.97k = 15.49 mV;
    # hi = 6 x 47/147 x 1M / 1031.97k + 4.5 x 31.97k / 1031.97k = 1.998 V, just under threshold_max
    assert lo == pytest.approx(0.5 * 31972.789 / 1031972.789, rel=1e-6)
    assert 1.99 < hi < 2.0
    message = (
        f"the squelch control covers only part of the threshold range of U1.sq: RV1's wiper spans 0 V "
        f"to 6 V through R1, R2 to ground and R3 to U1.out (500 mV / 4.5 V), so the pin sees "
        f"{shown(lo)} to {shown(hi)} of the 1 V to 2 V needed"
    )
    values = {
        "pin lowest": (lo, "V"),
        "pin highest": (hi, "V"),
        "threshold_min": (1.0, "V"),
        "threshold_max": (2.0, "V"),
    }
    same(
        [facts(f) for f in of(result, "squelch.threshold-range")],
        [
            finding(
                "squelch.threshold-range", "warning", at(text, "control", "RV1"), message, values, RANGE_FIX
            )
        ],
    )
    assert sheet_rows(result, "squelch.threshold-range") == [
        ("squelch", "U1.sq", "lowest voltage at the pin", pytest.approx(lo), "V", "", ""),
        ("squelch", "U1.sq", "highest voltage at the pin", pytest.approx(hi), "V", "", ""),
    ]


def test_a_wiper_straight_on_the_pin_is_not_moved_by_the_hysteresis_resistor():
    # no series resistor: at the track's ends the wiper has no source resistance and pins the node
    parts = pot("RV1", "A, GND", "U1.sq") + res("R3", "1 Mohm", "U1.out", "U1.sq")
    text = plan(parts, [{"device": "U1", "control": "RV1", "pin": "U1.sq", "hysteresis": "R3"}], {"A": 0.9})
    message = (
        "the squelch control never reaches the threshold of U1.sq: RV1's wiper spans 0 V to 900 mV and "
        "R3 to U1.out (500 mV / 4.5 V), so the pin sees 0 V to 900 mV, outside the 1 V to 2 V the "
        "squelch switches over: it can never be set"
    )
    values = {
        "pin lowest": (0.0, "V"),
        "pin highest": (0.9, "V"),
        "threshold_min": (1.0, "V"),
        "threshold_max": (2.0, "V"),
    }
    same(
        [facts(f) for f in of(check(text), "squelch.threshold-range")],
        [finding("squelch.threshold-range", "error", at(text, "control", "RV1"), message, values, RANGE_FIX)],
    )


def test_an_unusable_hysteresis_resistor_leaves_the_plain_divider():
    # R3 returns to a net whose levels are not known: the pin is the divider alone, 6 x 10/110
    parts = (
        pot("RV1", "V6, GND", "W1")
        + res("R1", "100 kohm", "W1", "U1.sq")
        + res("R2", "10 kohm", "U1.sq", "GND")
        + res("R3", "1 Mohm", "SQ_OUT", "U1.sq")
    )
    stage = {
        "device": "U1",
        "control": "RV1",
        "pin": "U1.sq",
        "series": "R1",
        "shunt": "R2",
        "hysteresis": "R3",
    }
    result = check(plan(parts, [stage]))
    assert sheet_rows(result, "squelch.threshold-range")[1][3] == pytest.approx(divider(6.0, 100e3, 10e3)[0])


def test_what_cannot_be_checked_is_a_note_and_the_next_stage_is_still_checked():
    parts = (
        pot("RV1", "X, Y", "W1")
        + pot("RV2", "V6, GND", "W2")
        + pot("RV3", "V6, GND", "W3")
        + pot("RV4", "V6, GND", "W4")
        + pot("RV6", "V6, GND", "W6")
        + pot("RV5", "A, GND", "W5")
    )
    stages = [
        {"device": "U1"},  # no control: nothing to check
        {"device": "U1", "control": "RV1", "pin": "U1.sq"},  # X and Y carry no known DC
        {"device": "U1", "control": "RV2"},  # no pin named
        {"device": "U1", "control": "RV3", "pin": "U1.sq_bare"},  # no threshold range
        {"device": "U1", "control": "RV4", "pin": "U1.sq_half"},  # only threshold_min
        {"device": "U1", "control": "RV6", "pin": "U1.sq_top"},  # only threshold_max
        {"device": "U1", "control": "RV5", "pin": "U1.sq"},  # 0 to 0.9 V: error
    ]
    text = plan(parts, stages, {"A": 0.9})
    result = check(text)

    def unknown(ctl):
        return finding(
            "squelch.threshold-range",
            "note",
            at(text, "control", ctl),
            f"squelch: the DC at the ends of {ctl}'s track is not known, or the pin is not named, "
            "so the squelch threshold range cannot be checked",
            fix="Put the pot's ends on rails or declared nodes and name the pin.",
        )

    def no_range(pin):
        return finding(
            "squelch.threshold-range",
            "note",
            at(text, "pin", pin),
            f"{pin} has no threshold range in its profile (threshold_min, threshold_max), so the "
            "squelch control's range (0 V to 6 V) cannot be checked against it",
            fix="Give the pin's threshold_min and threshold_max in the device profile.",
        )

    error = finding(
        "squelch.threshold-range",
        "error",
        at(text, "control", "RV5"),
        "the squelch control never reaches the threshold of U1.sq: RV5's wiper spans 0 V to 900 mV, so the "
        "pin sees 0 V to 900 mV, outside the 1 V to 2 V the squelch switches over: it can never be set",
        {
            "pin lowest": (0.0, "V"),
            "pin highest": (0.9, "V"),
            "threshold_min": (1.0, "V"),
            "threshold_max": (2.0, "V"),
        },
        RANGE_FIX,
    )
    same(
        [facts(f) for f in of(result, "squelch.threshold-range")],
        [
            unknown("RV1"),
            unknown("RV2"),
            no_range("U1.sq_bare"),
            no_range("U1.sq_half"),
            no_range("U1.sq_top"),
            error,
        ],
    )
    # the extremes are published for every stage whose network is known, with or without a range
    assert [(r[1], r[2], r[3]) for r in sheet_rows(result, "squelch.threshold-range")] == [
        ("U1.sq_bare", "lowest voltage at the pin", 0.0),
        ("U1.sq_bare", "highest voltage at the pin", 6.0),
        ("U1.sq_half", "lowest voltage at the pin", 0.0),
        ("U1.sq_half", "highest voltage at the pin", 6.0),
        ("U1.sq_top", "lowest voltage at the pin", 0.0),
        ("U1.sq_top", "highest voltage at the pin", 6.0),
        ("U1.sq", "lowest voltage at the pin", 0.0),
        ("U1.sq", "highest voltage at the pin", 0.9),
    ]


def test_a_pot_without_a_wiper_is_not_checked():
    text = plan(
        "  RV1: {kind: potentiometer, value: 10 kohm, ends: [V6, U1.sq]}\n",
        [{"device": "U1", "control": "RV1", "pin": "U1.sq"}],
    )
    found = [facts(f) for f in of(check(text), "squelch.threshold-range")]
    assert [f["level"] for f in found] == ["note"] and "RV1's track is not known" in found[0]["message"]
