"""freqplan.de-emphasis and freqplan.audio-corner pinned whole on small plans of their own: the
RC time constant tau = R C and corner 1 / (2 pi tau) (ITU-R BS.450-3: 50 µs and 75 µs; 47 CFR
73.317), the loaded corner (R || R_L) C and the divider's flat loss 20 log10((R + R_L) / R_L)
(Thevenin; Horowitz & Hill, The Art of Electronics, ch. 1), each threshold just either side."""

from __future__ import annotations

import math

import pytest
from conftest import EXAMPLES, check, edited, facts, of, sheet_rows
from freqplan_pins import khz4, where

from speccheck import units

DE = "freqplan.de-emphasis"
AC = "freqplan.audio-corner"
STATION = "  - {name: station, modulation: fm, deviation: 75 kHz, audio_max: 15 kHz, service: broadcast}\n"
DE_FIX = (
    "Make R x C of the de-emphasis network equal to the region's time constant (e.g. 5.1 kohm with 10 nF "
    "for 50 µs, 7.5 kohm with 10 nF for 75 µs)."
)
AC_FIX = (
    "Choose R x C = 1 / (2 pi f_c) with f_c a little above the highest audio frequency, counting the load: "
    "R || R_L in place of R (or buffer the filter, or use a larger volume control)."
)
RC_DE = "  - stage: de-emphasis\n    resistor: R1\n    capacitor: C1\n"
NO_PARTS = "  R9: {kind: resistor, value: 1 kohm, ends: [IN, GND]}\n"  # the parts section may not be empty
RC_LP = "  - stage: audio-filter\n    resistor: R2\n    capacitor: C2\n"


def corner(tau: float) -> float:
    return 1 / (2 * math.pi * tau)


def par(a: float, b: float) -> float:
    return a * b / (a + b)


def plan(parts: str, stages: str, signals: str = STATION, region: str | None = "itu-region-1") -> str:
    reg = f", region: {region}" if region else ""
    return f"""build_spec: 2
build: {{name: audio{reg}}}
signals:
{signals}source: {{kind: antenna, frequency: 10.7 MHz, impedance: 50 ohm}}
rails:
  GND: {{voltage: 0 V}}
parts:
{parts}chain:
{stages}"""


def de_parts(r: str, c: str = "10 nF", extra: str = "") -> str:
    return (
        f"  R1: {{kind: resistor, value: {r}, ends: [IN, DE]}}\n"
        f"  C1: {{kind: capacitor, value: {c}, ends: [DE, GND]}}\n" + extra
    )


def _found(text: str, rule: str) -> list:
    return [facts(f) for f in of(check(text), rule)]


def _mismatch(
    text: str,
    tau: float,
    want: float,
    region: str,
    wired: str = "",
    nth: int = 0,
    cap: str = "C1: {kind",
    path: str = "parts.C1.value",
    value: str = "10 nF",
) -> dict:
    return {
        "rule": DE,
        "level": "warning",
        **where(text, cap, value, path, nth),
        "message": f"de-emphasis of {units.fmt(tau, 's')} (corner {khz4(corner(tau))}){wired} does not match "
        "the "
        f"{want * 1e6:g} µs of {region} (corner {khz4(corner(want))}) for station",
        "values": {"time constant": (pytest.approx(tau), "s"), "wanted": (want, "s")},
        "fix": DE_FIX,
        "stage": "de-emphasis",
        "signal": "",
        "position": "",
    }


@pytest.mark.parametrize(
    "r, warn", [("4.4 kohm", True), ("4.6 kohm", False), ("5.4 kohm", False), ("5.6 kohm", True)]
)
def test_region_1_time_constant_within_ten_percent(r, warn):
    # 50 µs ± 10 %: 44 µs and 56 µs are out (12 %), 46 µs and 54 µs in (8 %)
    text = plan(de_parts(r), RC_DE)
    tau = float(r.split()[0]) * 1e3 * 10e-9
    assert _found(text, DE) == ([_mismatch(text, tau, 50e-6, "itu-region-1")] if warn else [])
    assert sheet_rows(check(text), DE) == [
        ("audio", "de-emphasis", "de-emphasis time constant", pytest.approx(tau), "s", "", ""),
        ("audio", "de-emphasis", "de-emphasis corner", pytest.approx(corner(tau)), "Hz", "", ""),
    ]


@pytest.mark.parametrize("region, want", [("itu-region-2", 75e-6), ("itu-region-3", 50e-6)])
def test_each_region_has_its_time_constant(region, want):
    # 6.2 kohm x 10 nF = 62 µs suits neither 50 µs nor 75 µs (over 10 % from both)
    text = plan(de_parts("6.2 kohm"), RC_DE, region=region)
    assert _found(text, DE) == [_mismatch(text, 62e-6, want, region)]


def test_without_a_region_is_a_note():
    text = plan(de_parts("5.1 kohm"), RC_DE, region=None)
    assert _found(text, DE) == [
        {
            "rule": DE,
            "level": "note",
            **where(text, "build: {name", "{name", "build"),
            "message": "build.region is not given, so the broadcast de-emphasis (50 µs or 75 µs) cannot be "
            "checked",
            "values": {},
            "fix": "Give build.region (itu-region-1, -2 or -3).",
            "stage": "audio",
            "signal": "",
            "position": "",
        }
    ]


def test_only_broadcast_fm_is_judged():
    voice = "  - {name: voice, modulation: fm, deviation: 5 kHz, audio_max: 3 kHz, service: voice}\n"
    am = "  - {name: station, modulation: am, audio_max: 5 kHz, service: broadcast}\n"
    for signals in (voice, am):
        text = plan(de_parts("7.5 kohm"), RC_DE, signals=signals)
        assert _found(text, DE) == []
        assert [r[2] for r in sheet_rows(check(text), DE)] == [
            "de-emphasis time constant",
            "de-emphasis corner",
        ]


def test_broadcast_without_a_de_emphasis_stage():
    text = plan(de_parts("5.1 kohm"), RC_LP.replace("R2", "R1").replace("C2", "C1"), region="itu-region-2")
    assert _found(text, DE) == [
        {
            "rule": DE,
            "level": "warning",
            **where(text, "name: station", "broadcast}", "signals[0].service"),
            "message": "station is broadcast FM but the chain has no de-emphasis stage: the audio will be "
            "harsh and hissy "
            "(itu-region-2 uses 75 µs)",
            "values": {"wanted": (75e-6, "s")},
            "fix": "Add a de-emphasis stage with R x C = 75 µs after the detector.",
            "stage": "audio",
            "signal": "",
            "position": "",
        }
    ]


def test_time_constant_or_corner_given_as_a_figure():
    # 75 µs given directly, or as its corner 1 / (2 pi 75 µs) = 2122 Hz: both are the region-2 figure
    text = plan(NO_PARTS, "  - stage: de-emphasis\n    time_constant: 75 us\n")
    assert _found(text, DE) == [
        _mismatch(
            text,
            75e-6,
            50e-6,
            "itu-region-1",
            cap="time_constant",
            path="chain[0].time_constant",
            value="75 us",
        )
    ]
    text = plan(NO_PARTS, "  - stage: de-emphasis\n    corner: 2122 Hz\n")
    tau = 1 / (2 * math.pi * 2122)
    assert _found(text, DE) == [
        _mismatch(text, tau, 50e-6, "itu-region-1", cap="corner:", path="chain[0].corner", value="2122 Hz")
    ]
    assert sheet_rows(check(text), DE)[0][3] == pytest.approx(tau)


def test_a_resistive_load_is_counted_and_named():
    # 5.6 kohm x 10 nF is 56 µs alone (out of tolerance), but a 51 kohm load makes it
    # (5.6 || 51) kohm x 10 nF = 50.5 µs as wired: in tolerance, with the rows as wired
    text = plan(
        de_parts("5.6 kohm", extra="  RL: {kind: resistor, value: 51 kohm, ends: [DE, GND]}\n"), RC_DE
    )
    wired = par(5.6e3, 51e3) * 10e-9
    assert _found(text, DE) == []
    d = ("audio", "de-emphasis")
    assert sheet_rows(check(text), DE) == [
        (*d, "de-emphasis time constant", pytest.approx(56e-6), "s", "", ""),
        (*d, "de-emphasis corner", pytest.approx(corner(56e-6)), "Hz", "", ""),
        (*d, "de-emphasis time constant as wired", pytest.approx(wired), "s", "", ""),
        (*d, "de-emphasis corner as wired", pytest.approx(corner(wired)), "Hz", "", ""),
        (*d, "load on the de-emphasis output", "RL (51 kΩ)", "", "", ""),
        (
            *d,
            "de-emphasis passband loss as wired",
            pytest.approx(20 * math.log10((5.6e3 + 51e3) / 51e3)),
            "dB",
            "",
            "",
        ),
    ]
    # a 10 kohm load takes it to (5.6 || 10) kohm x 10 nF = 35.9 µs: out, and said as wired
    text = plan(
        de_parts("5.6 kohm", extra="  RL: {kind: resistor, value: 10 kohm, ends: [DE, GND]}\n"), RC_DE
    )
    wired = par(5.6e3, 10e3) * 10e-9
    assert _found(text, DE) == [
        _mismatch(text, wired, 50e-6, "itu-region-1", wired=" as wired (RL (10 kΩ) loads its output)")
    ]


def test_two_de_emphasis_stages_are_each_judged():
    parts = de_parts("5.6 kohm") + (
        "  R3: {kind: resistor, value: 4.4 kohm, ends: [DE, DE2]}\n"
        "  C3: {kind: capacitor, value: 10 nF, ends: [DE2, GND]}\n"
    )
    stages = RC_DE + "  - stage: de-emphasis\n    resistor: R3\n    capacitor: C3\n"
    text = plan(parts, stages)
    found = _found(text, DE)
    assert [f["values"]["time constant"] for f in found] == [
        (pytest.approx(56e-6), "s"),
        (pytest.approx(44e-6), "s"),
    ]


# ---- freqplan.audio-corner ----------------------------------------------------------------------------


def lp_parts(r: str, c: str, extra: str = "") -> str:
    return (
        f"  R2: {{kind: resistor, value: {r}, ends: [IN, AF]}}\n"
        f"  C2: {{kind: capacitor, value: {c}, ends: [AF, GND]}}\n" + extra
    )


VOICE = "  - {name: voice, modulation: fm, deviation: 5 kHz, audio_max: 3 kHz, service: voice}\n"


@pytest.mark.parametrize(
    "c, level",
    [
        # 10 kohm against 3 kHz voice, low_share 10 % (cut below 2.7 kHz), high_factor 3 (a note above
        # 9 kHz): 5.6 nF gives 2.842 kHz and 6.2 nF 2.567 kHz (cut); 1.8 nF 8.842 kHz and 1.7 nF 9.362 kHz
        ("5.6 nF", None),
        ("6.2 nF", "warning"),
        ("1.8 nF", None),
        ("1.7 nF", "note"),
    ],
)
def test_corner_against_the_highest_audio(c, level):
    text = plan(lp_parts("10 kohm", c), RC_LP, signals=VOICE)
    fc = corner(10e3 * float(c.split()[0]) * 1e-9)
    expected = None if 2.7e3 <= fc <= 9e3 else "warning" if fc < 2.7e3 else "note"
    assert expected == level
    found = _found(text, AC)
    assert sheet_rows(check(text), AC) == [
        ("audio", "audio-filter", "low-pass corner", pytest.approx(fc), "Hz", "", "")
    ]
    if level is None:
        assert found == []
        return
    message = (
        f"the audio low-pass corner {khz4(fc)} is below the 3 kHz of voice: its top octave is cut"
        if level == "warning"
        else f"the audio low-pass corner {khz4(fc)} is {fc / 3e3:.1f} times the 3 kHz of voice: detector "
        "noise "
        "above the audio passes"
    )
    assert found == [
        {
            "rule": AC,
            "level": level,
            **where(text, "C2: {kind", c, "parts.C2.value"),
            "message": message,
            "values": {"corner": (pytest.approx(fc), "Hz"), "highest audio": (3e3, "Hz")},
            "fix": AC_FIX if level == "warning" else "",
            "stage": "audio-filter",
            "signal": "",
            "position": "",
        }
    ]


def test_low_share_and_high_factor_are_settings():
    from speccheck.config import Settings

    text = plan(lp_parts("10 kohm", "5.6 nF"), RC_LP, signals=VOICE)  # 2.842 kHz for 3 kHz audio
    tight = Settings(rule_settings={AC: {"low_share": 0.05}})  # cut below 2.85 kHz
    assert [f.level for f in of(check(text, settings=tight), AC)] == ["warning"]
    text = plan(lp_parts("10 kohm", "2.2 nF"), RC_LP, signals=VOICE)  # 7.234 kHz: 2.4 x 3 kHz
    low = Settings(rule_settings={AC: {"high_factor": 2.0}})
    assert [f.level for f in of(check(text, settings=low), AC)] == ["note"]


def test_loaded_corner_is_the_one_judged_and_described():
    # 10 kohm, 4.7 nF, loaded by 10 kohm through a 1 uF coupling cap (over 100 x C: a short): the
    # corner as wired is 1 / (2 pi 5 kohm 4.7 nF), 6.773 kHz, the loss 20 log10(2): below 15 kHz
    extra = (
        "  C3: {kind: capacitor, value: 1 uF, ends: [AF, VOL]}\n"
        "  RV1: {kind: potentiometer, value: 10 kohm, ends: [VOL, GND]}\n"
    )
    text = plan(lp_parts("10 kohm", "4.7 nF", extra), RC_LP)
    alone, wired = corner(10e3 * 4.7e-9), corner(5e3 * 4.7e-9)
    loss = 20 * math.log10(2)
    assert _found(text, AC) == [
        {
            "rule": AC,
            "level": "warning",
            **where(text, "C2: {kind", "4.7 nF", "parts.C2.value"),
            "message": f"the audio low-pass corner {khz4(wired)} as wired ({khz4(alone)} for the RC alone; "
            "RV1 (10 kΩ "
            f"through C3) loads its output, {loss:.1f} dB of flat loss) is below the 15 kHz of station: its "
            "top octave is cut",
            "values": {"corner": (pytest.approx(wired), "Hz"), "highest audio": (15e3, "Hz")},
            "fix": AC_FIX,
            "stage": "audio-filter",
            "signal": "",
            "position": "",
        }
    ]
    a = ("audio", "audio-filter")
    assert sheet_rows(check(text), AC) == [
        (*a, "low-pass corner", pytest.approx(alone), "Hz", "", ""),
        (*a, "low-pass corner as wired", pytest.approx(wired), "Hz", "", ""),
        (*a, "load on the low-pass output", "RV1 (10 kΩ through C3)", "", "", ""),
        (*a, "low-pass passband loss as wired", pytest.approx(loss), "dB", "", ""),
    ]


def test_each_signal_is_judged_on_its_own():
    # 10 kohm, 2.2 nF: 7.234 kHz; fine for 3 kHz voice, 7.2 x the 1 kHz of data (a note), below 15 kHz
    # broadcast (a warning)
    data = "  - {name: data, modulation: fm, deviation: 2 kHz, audio_max: 1 kHz, service: data}\n"
    text = plan(lp_parts("10 kohm", "2.2 nF"), RC_LP, signals=VOICE + data + STATION)
    assert sorted((f["level"], f["message"].split(" of ")[-1].split(":")[0]) for f in _found(text, AC)) == [
        ("note", "data"),
        ("warning", "station"),
    ]


def test_no_audio_max_no_verdict_but_the_rows():
    text = plan(
        lp_parts("10 kohm", "2.2 nF"), RC_LP, signals="  - {name: s, modulation: fm, deviation: 5 kHz}\n"
    )
    assert _found(text, AC) == []
    assert [r[2] for r in sheet_rows(check(text), AC)] == ["low-pass corner"]


def test_missing_part_value_gives_nothing():
    text = plan(
        "  R2: {kind: resistor, ends: [IN, AF]}\n  C2: {kind: capacitor, value: 1 nF, ends: [AF, GND]}\n",
        RC_LP,
        signals=VOICE,
    )
    assert _found(text, AC) == [] and sheet_rows(check(text), AC) == []


def test_a_switched_capacitor_not_listed_is_a_note():
    from test_v2 import bench

    # the selector example: C13 reaches AF1 through S1 in the narrow position; the stage lists C11 only
    text = edited(bench(), "    capacitor: [C11, C13]\n", "    capacitor: C11\n")
    notes = [f for f in _found(text, AC) if f["message"].startswith("C13 is on")]
    assert notes == [
        {
            "rule": AC,
            "level": "note",
            **where(text, "  C13: {kind", "{kind", "parts.C13"),
            "message": "C13 is on AF1 in S1 narrow but not in the audio-filter stage: it is counted in "
            "parallel with C11 "
            f"(1 nF || 3.9 nF = {units.fmt(1e-9 + 3.9e-9, 'F')} in all); list it in the stage's capacitor "
            "[repeater voice; S1 narrow; upstream rbw-100k]",
            "values": {"node": ("AF1", ""), "counted capacitance": (pytest.approx(4.9e-9), "F")},
            "fix": "",
            "stage": "audio-filter",
            "signal": "repeater voice",
            "position": "S1 narrow; upstream rbw-100k",
        }
    ]
    assert EXAMPLES.is_dir()


def test_a_figure_given_with_parts_is_not_loaded():
    # time_constant: 50 us stated beside R1 and C1 (with a 10 kohm load on their node): the figure stands,
    # nothing is loaded, no as-wired rows
    text = plan(
        de_parts("5.6 kohm", extra="  RL: {kind: resistor, value: 10 kohm, ends: [DE, GND]}\n"),
        RC_DE + "    time_constant: 50 us\n",
    )
    assert _found(text, DE) == []
    assert [r[2] for r in sheet_rows(check(text), DE)] == ["de-emphasis time constant", "de-emphasis corner"]


def test_a_load_that_is_not_plain_is_named_with_every_reactive_part():
    # a 10 nF coupling capacitor (under 100 x 4.7 nF) and a coil in the load: both named, the RC alone kept
    extra = (
        "  C3: {kind: capacitor, value: 10 nF, ends: [AF, X]}\n"
        "  R3: {kind: resistor, value: 10 kohm, ends: [X, GND]}\n"
        "  L3: {kind: inductor, value: 10 mH, ends: [AF, Y]}\n"
        "  R4: {kind: resistor, value: 10 kohm, ends: [Y, GND]}\n"
    )
    text = plan(lp_parts("10 kohm", "4.7 nF", extra), RC_LP, signals=VOICE)
    rows = {r[2]: r[3] for r in sheet_rows(check(text), AC)}
    assert rows == {
        "low-pass corner": pytest.approx(corner(10e3 * 4.7e-9)),
        # the parts in the order the walk from AF finds them
        "load on the low-pass output": "C3, L3, R4, R3: not a plain resistance at the corner (C3, L3 too "
        "small to count as a short), so the figures are the RC alone's (speccheck spice simulates it as "
        "wired)",
    }
