"""squelch.hysteresis: the two thresholds a feedback resistor gives the squelch pin (format v2).

Expected numbers come from the node equation at the pin solved by hand (Kirchhoff's current law;
Millman's theorem), not from the code under test."""

from __future__ import annotations

import pytest
from conftest import EXAMPLES, check, edited, line_of, of

BENCH = EXAMPLES / "bench-demod-selector.yaml"
R13 = "  R13: {kind: resistor, value: 2.2 Mohm, ends: [U1.mute, U1.squelch_in]}\n"


def bench(r13: str = R13) -> str:
    text = BENCH.read_text("utf-8")
    if "  R13:" not in text:
        text = edited(text, "    series: R12\n", "    series: R12\n    hysteresis: R13\n")
        text = edited(text, "  # flat detector output", r13 + "\n  # flat detector output")
    else:
        text = edited(text, R13, r13)
    return text


def sheet(result) -> dict:
    return {(e.section, e.owner, e.value.name): e.value.value for e in result.sheet}


def test_the_bench_squelch_has_a_sensible_hysteresis_and_no_finding():
    result = check(bench(), "bench.yaml")
    assert of(result, "squelch.hysteresis") == []
    got = sheet(result)
    # Wiper at a track end (stiff): 100 kohm to the wiper, 2.2 Mohm to U1.mute swinging 0..6 V (the
    # device's supply, common practice), nothing else: dV = 6 x 100k / (100k + 2.2M) = 0.26087 V.
    assert got[("squelch", "U1.squelch_in", "hysteresis width, knob at an end")] == pytest.approx(
        0.26087, abs=1e-5
    )
    # Mid-track the 10 kohm track adds 2.5 kohm (Thevenin): 6 x 102.5k / 2302.5k = 0.26710 V.
    assert got[("squelch", "U1.squelch_in", "hysteresis width, knob mid-track")] == pytest.approx(
        0.26710, abs=1e-5
    )
    low = got[("squelch", "U1.squelch_in", "threshold with the output low, knob set mid-range")]
    high = got[("squelch", "U1.squelch_in", "threshold with the output high, knob set mid-range")]
    # set where the output-low threshold sits mid-range of 0.5..1.5 V: 1.0 V, and the other just above it
    assert low == pytest.approx(1.0, abs=1e-6)
    assert 0.26087 < high - low < 0.26710
    # the pin's extremes: wiper at 0 V with the output low, at 6 V with it high: the rails themselves
    assert got[("squelch", "U1.squelch_in", "highest voltage at the pin")] == pytest.approx(6.0)


def test_the_feedback_loads_the_divider_when_there_is_a_shunt():
    text = edited(bench(), "    series: R12\n", "    series: R12\n    shunt: R14\n")
    text = edited(text, R13, R13 + "  R14: {kind: resistor, value: 47 kohm, ends: [U1.squelch_in, GND]}\n")
    result = check(text, "bench.yaml")
    got = sheet(result)
    # highest: wiper 6 V through 100k, 47k to ground, 2.2M to 6 V:
    # V = (6/100k + 6/2.2M) / (1/100k + 1/47k + 1/2.2M) = 6.2727e-5 / 3.1731e-5 = 1.97685 V (hand)
    assert got[("squelch", "U1.squelch_in", "highest voltage at the pin")] == pytest.approx(1.97685, abs=1e-4)
    # width at a track end: R_p = 100k || 47k = 31.973 kohm; 6 x 31.973k / 2231.973k = 0.085951 V
    assert got[("squelch", "U1.squelch_in", "hysteresis width, knob at an end")] == pytest.approx(
        0.085951, abs=1e-5
    )


def test_a_resistor_returned_to_a_rail_gives_no_hysteresis():
    text = bench("  R13: {kind: resistor, value: 2.2 Mohm, ends: [V6, U1.squelch_in]}\n")
    found = of(check(text, "bench.yaml"), "squelch.hysteresis")
    assert [f.level for f in found] == ["warning"] and "does not switch" in found[0].message
    assert found[0].location.line == line_of(text, "    hysteresis: R13")


def test_a_huge_resistor_gives_negligible_hysteresis():
    # 6 x 100k / (100k + 100M) = 6.0 mV at the ends, 6.1 mV mid-track: under 5 % of the 1 V range
    text = bench("  R13: {kind: resistor, value: 100 Mohm, ends: [U1.mute, U1.squelch_in]}\n")
    found = of(check(text, "bench.yaml"), "squelch.hysteresis")
    assert [f.level for f in found] == ["note"] and "chatter" in found[0].message
    width = next(v.value for v in found[0].values if v.name == "width, knob mid-track")
    assert width == pytest.approx(6 * 102.5e3 / (102.5e3 + 100e6), rel=1e-9)


def test_hysteresis_wider_than_the_threshold_range_is_a_warning():
    # 6 x 100k / (100k + 330k) = 1.395 V, more than the 1 V range the pin switches over
    text = bench("  R13: {kind: resistor, value: 330 kohm, ends: [U1.mute, U1.squelch_in]}\n")
    found = of(check(text, "bench.yaml"), "squelch.hysteresis")
    assert [f.level for f in found] == ["warning"] and "does not switch back" in found[0].message
    width = next(v.value for v in found[0].values if v.name == "width, knob at an end")
    assert width == pytest.approx(6 * 100e3 / 430e3, rel=1e-9)


def test_the_profile_states_the_output_levels():
    text = bench().replace(
        "signals:\n",
        "profiles:\n  if-chip-with-levels:\n    class: fm-if-subsystem\n"
        "    supply_min: 2 V\n    supply_max: 8 V\n"
        "    quiescent_current: 4 mA\n    input_impedance: 1.5 kohm\n    max_input: -10 dBm\n"
        "    max_gain_ahead: 10 dB\n    pins:\n      mixer_in: {role: input}\n"
        "      osc_base: {role: oscillator, dc: supply}\n      osc_emitter: {role: oscillator-out}\n"
        "      mixer_out: {role: mixer-out, dc: supply}\n      limiter_in: {role: limiter-in}\n"
        "      quad: {role: quadrature, dc: supply, bias_through_tank: true}\n"
        "      audio: {role: output, output_impedance: 1 kohm}\n"
        "      squelch_in: {role: squelch, threshold_min: 0.5 V, threshold_max: 1.5 V}\n"
        "      mute: {role: mute, output_low: 0.2 V, output_high: 4.2 V}\n\nsignals:\n",
        1,
    )
    text = edited(text, "U1: {profile: fm-if-subsystem,", "U1: {profile: if-chip-with-levels,")
    got = sheet(check(text, "bench.yaml"))
    # the stated 4 V swing: 4 x 100k / 2.3M = 0.173913 V
    assert got[("squelch", "U1.squelch_in", "hysteresis width, knob at an end")] == pytest.approx(
        0.173913, abs=1e-6
    )
    assert got[("squelch", "U1.squelch_in", "hysteresis returns to")] == "U1.mute (200 mV / 4.2 V)"


def test_a_resistor_that_misses_the_pin_or_returns_to_an_unknown_net():
    text = bench("  R13: {kind: resistor, value: 2.2 Mohm, ends: [U1.mute, SQ_SET]}\n")
    found = of(check(text, "bench.yaml"), "squelch.hysteresis")
    assert [f.level for f in found] == ["warning"] and "does not touch U1.squelch_in" in found[0].message
    text = bench("  R13: {kind: resistor, value: 2.2 Mohm, ends: [SQ_OUT, U1.squelch_in]}\n")
    found = of(check(text, "bench.yaml"), "squelch.hysteresis")
    assert "note" in [f.level for f in found] and any("not known" in f.message for f in found)
