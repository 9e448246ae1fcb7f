"""squelch.hysteresis: every finding and sheet entry, whole, at the point where it trips.

The plans, helpers and arithmetic are those of tests/test_squelch_findings.py (its docstring
writes the Thevenin equivalents and the superposition out). The base plan: a 10 kohm pot across
the 6 V rail, 100 kohm from its wiper to the squelch pin (threshold range 1 V to 2 V), and the
hysteresis resistor R3 from the pin to a mute output the profile gives as 0.5 V low, 4.5 V high.
"""

from __future__ import annotations

import pytest
from conftest import check, facts, of, sheet_rows
from scipy.optimize import brentq
from test_squelch_findings import (
    HYST_FIX,
    LEVELS_FIX,
    at,
    divider,
    finding,
    plan,
    pot,
    res,
    same,
    shown,
    width,
    wiper,
    with_feedback,
)

from speccheck.config import Settings

R_SE = 100e3  # R1, wiper to pin
TRACK = 10e3  # RV1
MIDDLE = (1.0 + 2.0) / 2  # the middle of the pin's 1 V to 2 V threshold range


def base(
    r3: str | None = "1 Mohm",
    to: str = "U1.out",
    pin: str = "U1.sq",
    ends: str = "V6, GND",
    nodes: dict | None = None,
    track: str | None = "10 kohm",
) -> str:
    parts = pot("RV1", ends, "W1", track) + res("R1", "100 kohm", "W1", pin) + res("R3", r3, to, pin)
    stage = {"device": pin.split(".")[0], "control": "RV1", "pin": pin, "series": "R1", "hysteresis": "R3"}
    return plan(parts, [stage], nodes)


def thresholds(
    x: float, v_a: float, v_b: float, r_f: float, out_lo: float, out_hi: float, r_sh: float | None = None
) -> tuple:
    """The pin with the output low and high, the wiper at x: its Thevenin source through R1 (and the
    shunt to ground, if any), then R_f to the output by superposition."""
    v_w, r_w = wiper(v_a, v_b, TRACK, x)
    v_th, r_th = divider(v_w, r_w + R_SE, r_sh)
    return with_feedback(v_th, r_th, r_f, out_lo), with_feedback(v_th, r_th, r_f, out_hi)


def rows(text: str, settings: Settings | None = None):
    result = check(text, settings=settings)
    return [facts(f) for f in of(result, "squelch.hysteresis")], sheet_rows(result, "squelch.hysteresis")


def test_the_sheet_of_a_sensible_hysteresis_and_no_finding():
    found, sheet = rows(base())
    # at a track end the wiper has no source resistance: R_th = R1 = 100 kohm;
    # width = 4 V x 100k / (100k + 1M) = 363.6 mV
    at_end = width(R_SE, 1e6, 4.5 - 0.5)
    assert at_end == pytest.approx(4 * 100 / 1100)
    # mid-track the track adds 10k x 0.5 || 10k x 0.5 = 2.5 kohm: 4 x 102.5k / 1102.5k = 371.9 mV
    r_mid = wiper(0.0, 6.0, TRACK, 0.5)[1]
    assert r_mid == pytest.approx(2.5e3)
    mid = width(R_SE + r_mid, 1e6, 4.0)
    # the knob where the output-low threshold sits at the range's middle, 1.5 V: solved here by root
    # finding (scipy brentq) on the superposition, then the output-high threshold at that setting
    x = brentq(lambda x: thresholds(x, 0.0, 6.0, 1e6, 0.5, 4.5)[0] - MIDDLE, 0.0, 1.0, xtol=1e-15)
    low, high = thresholds(x, 0.0, 6.0, 1e6, 0.5, 4.5)
    assert low == pytest.approx(MIDDLE) and at_end < high - low < mid
    assert found == []
    assert sheet == [
        ("squelch", "U1.sq", "hysteresis returns to", "U1.out (500 mV / 4.5 V)", "", "", ""),
        (
            "squelch",
            "U1.sq",
            "hysteresis width, knob at an end",
            pytest.approx(at_end, rel=1e-9),
            "V",
            "",
            "",
        ),
        ("squelch", "U1.sq", "hysteresis width, knob mid-track", pytest.approx(mid, rel=1e-9), "V", "", ""),
        (
            "squelch",
            "U1.sq",
            "threshold with the output low, knob set mid-range",
            pytest.approx(low, rel=1e-9),
            "V",
            "",
            "",
        ),
        (
            "squelch",
            "U1.sq",
            "threshold with the output high, knob set mid-range",
            pytest.approx(high, rel=1e-9),
            "V",
            "",
            "",
        ),
    ]


@pytest.mark.parametrize(
    ("to", "lo", "hi"),
    [
        ("U1.out_low", 0.5, 6.0),  # output_low stated; high: the chip's 6 V supply (common practice)
        ("U1.out_high", 0.0, 4.5),  # output_high stated; low: ground (common practice)
    ],
)
def test_one_stated_level_and_the_supply_or_ground_for_the_other(to, lo, hi):
    found, sheet = rows(base(to=to))
    assert found == []
    assert sheet[0] == (
        "squelch",
        "U1.sq",
        "hysteresis returns to",
        f"{to} ({shown(lo)} / {shown(hi)})",
        "",
        "",
        "",
    )
    # width at a track end: swing x 100k / (100k + 1M)
    assert sheet[1][2:4] == (
        "hysteresis width, knob at an end",
        pytest.approx(width(R_SE, 1e6, hi - lo), rel=1e-9),
    )


def test_an_output_with_no_levels_is_taken_to_swing_rail_to_rail_and_named_so():
    # 100 Mohm: 6 V x 102.5k / (102.5k + 100M) = 6.143 mV mid-track, 0.6 % of the 1 V range: a note
    text = base("100 Mohm", to="U1.out_bare")
    found, sheet = rows(text)
    at_end, mid = width(R_SE, 100e6, 6.0), width(R_SE + 2.5e3, 100e6, 6.0)
    why = (
        "U1.out_bare taken to switch between ground and U1's 6 V supply "
        "(its profile gives no output_low/output_high)"
    )
    message = (
        f"squelch: R3 moves the threshold of U1.sq by at most {shown(mid)} when U1.out_bare switches "
        f"({why}), "
        f"{mid / 1.0:.1%} of the 1 V threshold range: the noise of a weak carrier near the threshold swings "
        "by more than that, so the squelch will still chatter"
    )
    values = {
        "width, knob at an end": (at_end, "V"),
        "width, knob mid-track": (mid, "V"),
        "output swing": (6.0, "V"),
        "threshold range": (1.0, "V"),
    }
    same(found, [finding("squelch.hysteresis", "note", at(text, "hysteresis", "R3"), message, values)])
    assert sheet[0][3] == "U1.out_bare (0 V / 6 V)"


@pytest.mark.parametrize(
    ("r3", "level"),
    [
        # mid-track width 4 V x 102.5k / (102.5k + R3) against 5 % (least_share) of the 1 V range:
        ("8.2 Mohm", "note"),  # 410k / 8302.5k = 49.38 mV < 50 mV
        ("8097.5 kohm", None),  # 410k / 8200k = 50 mV exactly: not under
        ("8 Mohm", None),  # 410k / 8102.5k = 50.60 mV
        # width at a track end 4 V x 100k / (100k + R3) against the whole 1 V range:
        ("300 kohm", None),  # 400k / 400k = 1 V exactly: not more than the range
        ("290 kohm", "warning"),  # 400k / 390k = 1.026 V
    ],
)
def test_the_width_against_the_range_just_inside_and_outside(r3, level):
    text = base(r3)
    found, _ = rows(text)
    r_f = {"8.2 Mohm": 8.2e6, "8097.5 kohm": 8097.5e3, "8 Mohm": 8e6, "300 kohm": 300e3, "290 kohm": 290e3}[
        r3
    ]
    at_end, mid = width(R_SE, r_f, 4.0), width(R_SE + 2.5e3, r_f, 4.0)
    values = {
        "width, knob at an end": (at_end, "V"),
        "width, knob mid-track": (mid, "V"),
        "output swing": (4.0, "V"),
        "threshold range": (1.0, "V"),
    }
    why = "U1.out switches between 500 mV and 4.5 V"
    if level is None:
        assert found == []
    elif level == "note":
        message = (
            f"squelch: R3 moves the threshold of U1.sq by at most {shown(mid)} when U1.out switches ({why}), "
            f"{mid:.1%} of the 1 V threshold range: the noise of a weak carrier near the threshold swings "
            "by more than that, so the squelch will still chatter"
        )
        same(found, [finding("squelch.hysteresis", "note", at(text, "hysteresis", "R3"), message, values)])
    else:
        message = (
            f"squelch: R3 moves the threshold of U1.sq by {shown(at_end)} or more when U1.out switches "
            f"({why}), more than the whole 1 V range it switches over: wherever the knob puts one "
            "threshold inside the range the other lies outside it, so once the squelch has switched it "
            "does not switch back"
        )
        same(
            found,
            [
                finding(
                    "squelch.hysteresis", "warning", at(text, "hysteresis", "R3"), message, values, HYST_FIX
                )
            ],
        )


def test_the_least_share_setting_moves_the_note():
    # 49.38 mV is 4.9 % of the range: under 5 % (the default) but not under a project's 4 %
    settings = Settings(rule_settings={"squelch.hysteresis": {"least_share": 0.04}})
    assert rows(base("8.2 Mohm"), settings)[0] == []
    assert [f["level"] for f in rows(base("8.2 Mohm"))[0]] == ["note"]


def test_a_resistor_to_a_net_that_does_not_switch():
    parts = pot("RV1", "V6, GND", "W1") + res("R1", "100 kohm", "W1", "U1.sq")
    stages = []
    for name, to in (("R31", "V6"), ("R32", "GND"), ("R33", "Q")):
        parts += res(name, "1 Mohm", to, "U1.sq")
        stages.append({"device": "U1", "control": "RV1", "pin": "U1.sq", "series": "R1", "hysteresis": name})
    text = plan(parts, stages, {"Q": 3})
    found, sheet = rows(text)

    def flat(name, to, why):
        # the swing is 0 V, so both widths are 0 V x R_th / (R_th + R_f) = 0
        values = {
            "width, knob at an end": (0.0, "V"),
            "width, knob mid-track": (0.0, "V"),
            "output swing": (0.0, "V"),
        }
        return finding(
            "squelch.hysteresis",
            "warning",
            at(text, "hysteresis", name),
            f"squelch: the hysteresis resistor {name} returns to {to}, which does not switch ({why}): the "
            "threshold never moves, so the squelch has no hysteresis and chatters on a carrier near its "
            "threshold",
            values,
            HYST_FIX,
        )

    same(
        found,
        [
            flat("R31", "V6", "V6 is a rail at 6 V"),
            flat("R32", "GND", "GND is a ground at 0 V"),
            flat("R33", "Q", "Q is declared at 3 V"),
        ],
    )
    assert [r[3] for r in sheet if r[2] == "hysteresis returns to"] == [
        "V6 (6 V / 6 V)",
        "GND (0 V / 0 V)",
        "Q (3 V / 3 V)",
    ]


def test_what_cannot_be_computed_and_every_stage_checked():
    parts = (
        pot("RV1", "V6, GND", "W1")
        + res("R1", "100 kohm", "W1", "U1.sq")
        + res("R41", "1 Mohm", "U1.out", "W1")  # misses the pin
        + res("R42", "1 Mohm", "U2.out_low", "U2.sq")  # U2 has no rail: no high level
        + res("R43", "1 Mohm", "U2.out_bare", "U2.sq")  # no levels, no rail
        + res("R44", "1 Mohm", "SQ_OUT", "U1.sq")  # a net with no known DC
        + res("R45", None, "U1.out", "U1.sq")  # no value
        + res("R46", "1 Mohm", "U1.out", "U1.sq_half")
    )  # no pin named in its stage
    stages = [
        {"device": "U1", "control": "RV1", "pin": "U1.sq", "series": "R1"},  # no hysteresis resistor
        {"device": "U1", "control": "RV1", "hysteresis": "R46"},
        {"device": "U1", "control": "RV1", "pin": "U1.sq", "hysteresis": "R41"},
        {"device": "U2", "control": "RV1", "pin": "U2.sq", "hysteresis": "R42"},
        {"device": "U2", "control": "RV1", "pin": "U2.sq", "hysteresis": "R43"},
        {"device": "U1", "control": "RV1", "pin": "U1.sq", "hysteresis": "R44"},
        {"device": "U1", "control": "RV1", "pin": "U1.sq", "hysteresis": "R45"},
    ]
    text = plan(parts, stages)
    found, sheet = rows(text)

    def note(name, why):
        return finding(
            "squelch.hysteresis",
            "note",
            at(text, "hysteresis", name),
            f"squelch: {why}, so the hysteresis {name} gives cannot be computed",
            fix=LEVELS_FIX,
        )

    same(
        found,
        [
            finding(
                "squelch.hysteresis",
                "warning",
                at(text, "hysteresis", "R41"),
                "squelch: the hysteresis resistor R41 does not touch U1.sq, so it cannot move the threshold",
                fix="Connect one end of R41 to U1.sq and the other to the device's switching output.",
            ),
            note("R42", "U2.out_low states no output_high and U2 no supply rail"),
            note("R43", "the levels of U2.out_bare are not known"),
            note("R44", "the levels of SQ_OUT are not known"),
            note("R45", "R45 has no value"),
        ],
    )
    assert sheet == []


def test_thresholds_at_mid_track_when_the_range_middle_cannot_be_reached_or_is_not_known():
    # the pot spans 0 to 0.9 V: the 1.5 V middle is out of reach, so the knob is taken at mid-track:
    # wiper 0.45 V behind 2.5 kohm (Thevenin), then R1 and R3 (1 Mohm to 0.5 V / 4.5 V)
    cases = [
        (base(ends="A, GND", nodes={"A": 0.9}), 0.9),
        (base(pin="U1.sq_bare"), 6.0),
        (base(pin="U1.sq_half"), 6.0),
        (base(pin="U1.sq_top"), 6.0),
    ]
    for text, top in cases:
        found, sheet = rows(text)
        low, high = thresholds(0.5, 0.0, top, 1e6, 0.5, 4.5)
        assert found == []
        assert [r[2:5] for r in sheet[3:]] == [
            ("threshold with the output low, knob mid-track", pytest.approx(low, rel=1e-9), "V"),
            ("threshold with the output high, knob mid-track", pytest.approx(high, rel=1e-9), "V"),
        ]


def test_a_pot_of_no_stated_value_gives_the_width_at_the_ends_only():
    # no track value: the mid-track width cannot grow beyond the end one, and no setting is solved
    for text in (
        base(track=None),
        plan(
            res("R1", "100 kohm", "W1", "U1.sq") + res("R3", "1 Mohm", "U1.out", "U1.sq"),
            [{"device": "U1", "pin": "U1.sq", "series": "R1", "hysteresis": "R3"}],
        ),
    ):
        found, sheet = rows(text)
        at_end = width(R_SE, 1e6, 4.0)
        assert found == []
        assert [r[2:4] for r in sheet] == [
            ("hysteresis returns to", "U1.out (500 mV / 4.5 V)"),
            ("hysteresis width, knob at an end", pytest.approx(at_end, rel=1e-9)),
            ("hysteresis width, knob mid-track", pytest.approx(at_end, rel=1e-9)),
        ]


def test_a_shunt_narrows_the_hysteresis_at_every_setting():
    # R2 47 kohm from the pin to ground: the node's Thevenin resistance is (R1 + wiper) || R2
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
    found, sheet = rows(plan(parts, [stage]))
    # at a track end: 100k || 47k = 31.97 kohm, 4 V x 31.97k / 1031.97k = 123.9 mV
    at_end = width(divider(0.0, R_SE, 47e3)[1], 1e6, 4.0)
    assert at_end == pytest.approx(4 * 31972.789 / 1031972.789, rel=1e-6)
    # mid-track: (100k + 2.5k) || 47k = 32.22 kohm
    mid = width(divider(0.0, R_SE + 2.5e3, 47e3)[1], 1e6, 4.0)
    x = brentq(lambda x: thresholds(x, 0.0, 6.0, 1e6, 0.5, 4.5, 47e3)[0] - MIDDLE, 0.0, 1.0, xtol=1e-15)
    low, high = thresholds(x, 0.0, 6.0, 1e6, 0.5, 4.5, 47e3)
    assert found == []
    assert [r[2:4] for r in sheet[1:]] == [
        ("hysteresis width, knob at an end", pytest.approx(at_end, rel=1e-9)),
        ("hysteresis width, knob mid-track", pytest.approx(mid, rel=1e-9)),
        ("threshold with the output low, knob set mid-range", pytest.approx(MIDDLE, rel=1e-9)),
        ("threshold with the output high, knob set mid-range", pytest.approx(high, rel=1e-9)),
    ]
    assert low == pytest.approx(MIDDLE)


def test_a_wiper_straight_on_the_pin_gives_hysteresis_only_through_its_track():
    # no series resistor: at a track end the wiper pins the node (R_th = 0, width 0); mid-track the
    # track's 2.5 kohm alone: 4 V x 2.5k / (2.5k + 1M) = 9.975 mV, 1.0 % of the range: a note
    parts = pot("RV1", "V6, GND", "U1.sq") + res("R3", "1 Mohm", "U1.out", "U1.sq")
    text = plan(parts, [{"device": "U1", "control": "RV1", "pin": "U1.sq", "hysteresis": "R3"}])
    found, _ = rows(text)
    at_end, mid = width(0.0, 1e6, 4.0), width(wiper(0.0, 6.0, TRACK, 0.5)[1], 1e6, 4.0)
    assert at_end == 0.0 and mid == pytest.approx(4 * 2.5e3 / 1002.5e3)
    message = (
        f"squelch: R3 moves the threshold of U1.sq by at most {shown(mid)} when U1.out switches (U1.out "
        f"switches between 500 mV and 4.5 V), {mid:.1%} of the 1 V threshold range: the noise of a weak "
        "carrier near the threshold swings by more than that, so the squelch will still chatter"
    )
    values = {
        "width, knob at an end": (at_end, "V"),
        "width, knob mid-track": (mid, "V"),
        "output swing": (4.0, "V"),
        "threshold range": (1.0, "V"),
    }
    same(found, [finding("squelch.hysteresis", "note", at(text, "hysteresis", "R3"), message, values)])


def test_a_small_swing_still_switches():
    # an output swinging 1 V to 1.5 V (a swing under 1 V is still a swing): 0.5 V x 102.5k / 1102.5k =
    # 46.49 mV mid-track, under 5 % of the 1 V range (50 mV): a note, not "does not switch"
    found, _ = rows(base(to="U1.out_small"))
    mid = width(R_SE + 2.5e3, 1e6, 0.5)
    assert [f["level"] for f in found] == ["note"] and f"at most {shown(mid)}" in found[0]["message"]
    assert found[0]["values"]["output swing"] == (pytest.approx(1.5 - 1.0), "V")


@pytest.mark.parametrize(("r3", "level"), [("6.8 Mohm", "note"), ("3.9 Mohm", None)])
def test_the_least_share_is_of_the_pin_s_own_range(r3, level):
    # threshold range 1 V to 3 V: 5 % of 2 V = 100 mV. Mid-track 4 V x 102.5k / (102.5k + R3):
    # 6.8 Mohm: 59.40 mV, 3.0 % of the range: a note; 3.9 Mohm: 102.4 mV: none
    text = base(r3, pin="U1.sq_wide")
    found, _ = rows(text)
    r_f = {"6.8 Mohm": 6.8e6, "3.9 Mohm": 3.9e6}[r3]
    at_end, mid = width(R_SE, r_f, 4.0), width(R_SE + 2.5e3, r_f, 4.0)
    if level is None:
        assert mid > 0.05 * 2.0 and found == []
        return
    message = (
        f"squelch: R3 moves the threshold of U1.sq_wide by at most {shown(mid)} when U1.out switches (U1.out "
        f"switches between 500 mV and 4.5 V), {mid / 2.0:.1%} of the 2 V threshold range: the noise of a "
        "weak carrier near the threshold swings by more than that, so the squelch will still chatter"
    )
    values = {
        "width, knob at an end": (at_end, "V"),
        "width, knob mid-track": (mid, "V"),
        "output swing": (4.0, "V"),
        "threshold range": (2.0, "V"),
    }
    same(found, [finding("squelch.hysteresis", "note", at(text, "hysteresis", "R3"), message, values)])
