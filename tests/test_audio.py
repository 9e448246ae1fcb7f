"""Audio output rules: stabilising network, coupling corner, DC through the speaker.

Check values:
- coupling capacitor corner 1/(2π·R_L·C): 8 Ω with 470 µF -> 42.3 Hz, with 1000 µF -> 19.9 Hz
  (first-order RC; cross-checked with scipy.signal.freqs: |H| = 1/√2 at the corner);
- output stabilising network 10 Ω with 0.1 µF (common practice): turnover 159 kHz.
"""

import math

import numpy as np
import pytest
from conftest import EXAMPLES, check, edited, line_of, of
from scipy import signal

from speccheck.formulas import audio as audio_formulas

HOT = (EXAMPLES / "power-hot-amplifier.yaml").read_text("utf-8")


def high_pass_gain_db(r, c, f):
    """Independent: the RC high-pass H(s) = sRC/(sRC + 1) evaluated by scipy.signal.freqs."""
    _, h = signal.freqs([r * c, 0.0], [r * c, 1.0], worN=[2 * math.pi * f])
    return 20 * np.log10(abs(h[0]))


def test_coupling_corner_check_values():
    assert audio_formulas.rc_corner(8.0, 470e-6) == pytest.approx(42.3, abs=0.05)
    assert audio_formulas.rc_corner(8.0, 1000e-6) == pytest.approx(19.9, abs=0.05)
    # scipy: the response at the computed corner is 3.01 dB down
    assert high_pass_gain_db(8.0, 470e-6, audio_formulas.rc_corner(8.0, 470e-6)) == pytest.approx(
        -10 * math.log10(2)
    )


def test_output_network_turnover_check_value():
    # 10 ohm + 0.1 µF (common practice): 159 kHz
    assert audio_formulas.rc_corner(10.0, 0.1e-6) == pytest.approx(159e3, rel=2e-3)


def test_high_pass_loss_against_scipy():
    corner = audio_formulas.rc_corner(8.0, 47e-6)
    assert audio_formulas.high_pass_loss_db(300.0, corner) == pytest.approx(
        -high_pass_gain_db(8.0, 47e-6, 300.0)
    )


def test_clean_plan_has_no_audio_finding(clean_text):
    result = check(clean_text)
    assert [f for f in result.findings if f.rule.startswith("audio.")] == []
    corners = {e.value.name: e.value.value for e in result.sheet if e.rule.startswith("audio.")}
    assert corners["coupling C20 into SPK1 corner"] == pytest.approx(42.3, abs=0.05)
    assert corners["output network R21 + C21 turnover"] == pytest.approx(159e3, rel=2e-3)


# ---- output network -----------------------------------------------------------------------------


def test_missing_recommended_network_is_a_warning(clean_text):
    text = edited(clean_text, "    output_network: {resistor: R21, capacitor: C21}\n", "")
    found = of(check(text), "audio.output-network")
    assert [f.level for f in found] == ["warning"]
    assert found[0].message.startswith(
        "profile audio-power-amp-lv of U2 recommends a series R–C network "
        "across its output and the audio-amp stage has none"
    )
    assert found[0].location.line == line_of(text, "- stage: audio-amp")


def test_missing_required_network_is_an_error():
    text = edited(HOT, "    output_network: {resistor: R21, capacitor: C21}\n", "")
    found = of(check(text), "audio.output-network")
    assert [f.level for f in found] == ["error"]
    assert "requires a series R–C network" in found[0].message


def test_network_not_across_the_output(clean_text):
    text = edited(
        clean_text,
        "R21: {kind: resistor, value: 10 ohm, ends: [U2.out, ZOBEL]}",
        "R21: {kind: resistor, value: 10 ohm, ends: [U2.in_plus, ZOBEL]}",
    )
    found = of(check(text), "audio.output-network")
    assert [f.level for f in found] == ["warning"]
    assert found[0].message.startswith("R21 and C21 do not form a series R–C from U2's output to ground")
    assert found[0].location.line == line_of(text, "R21: {kind: resistor")


def test_network_turning_over_inside_the_audio_band(clean_text):
    text = edited(clean_text, "C21: {kind: capacitor, value: 100 nF", "C21: {kind: capacitor, value: 10 uF")
    found = of(check(text), "audio.output-network")
    assert [f.level for f in found] == ["warning"]
    turnover = 1 / (2 * math.pi * 10 * 10e-6)
    assert found[0].message.startswith(
        f"output network R21 (10 ohm) + C21 (10 uF) turns over at {turnover / 1e3:.4g} kHz"
    )
    assert found[0].message.endswith("inside the audio band (below 20 kHz): R21 takes audio power")
    assert found[0].location.line == line_of(text, "C21: {kind: capacitor")
    assert [(v.name, v.unit) for v in found[0].values] == [("turnover", "Hz")]
    assert found[0].values[0].value == pytest.approx(turnover)
    entry = next(e for e in check(text).sheet if e.value.name == "output network R21 + C21 turnover")
    assert (entry.section, entry.owner, entry.value.unit) == ("audio", "audio-amp", "Hz")


def test_electrolytic_in_the_network(clean_text):
    text = edited(
        clean_text,
        "C21: {kind: capacitor, value: 100 nF, dielectric: film,",
        "C21: {kind: capacitor, value: 100 nF, dielectric: electrolytic, positive: ZOBEL,",
    )
    found = of(check(text), "audio.output-network")
    assert [f.message.split(" in the")[0] for f in found] == ["C21"]
    assert found[0].location.line == line_of(text, "C21: {kind: capacitor")


# ---- coupling corner ----------------------------------------------------------------------------


def test_small_coupling_capacitor_cuts_the_bass(clean_text):
    text = edited(clean_text, "C20: {kind: capacitor, value: 470 uF", "C20: {kind: capacitor, value: 47 uF")
    found = of(check(text), "audio.coupling-corner")
    assert [f.level for f in found] == ["warning"]
    corner = 1 / (2 * math.pi * 8 * 47e-6)
    loss = -high_pass_gain_db(8.0, 47e-6, 300.0)
    need = 1 / (2 * math.pi * 8 * 300)
    assert found[0].message == (
        f"C20 (47 uF) into SPK1 (8 ohm) turns over at {corner:.4g} Hz, above the "
        f"build's lowest audio frequency of 300 Hz: {loss:.1f} dB down there; "
        f"{need * 1e6:.4g} µF or more keeps it"
    )
    assert found[0].location.line == line_of(text, "C20: {kind: capacitor")


def test_missing_lowest_audio_is_a_note(clean_text):
    text = edited(clean_text, "  lowest_audio: 300 Hz\n", "")
    found = of(check(text), "audio.coupling-corner")
    assert [f.level for f in found] == ["note"]
    assert found[0].message.startswith("build.lowest_audio is not stated")


def test_large_enough_coupling_is_fine():
    assert of(check(HOT), "audio.coupling-corner") == []


# ---- DC through the speaker ---------------------------------------------------------------------


def test_speaker_straight_on_a_half_supply_output(clean_text):
    text = edited(
        clean_text,
        "SPK1: {kind: speaker, value: 8 ohm, power_rating: 3 W, ends: [SPK, GND]}",
        "SPK1: {kind: speaker, value: 8 ohm, power_rating: 3 W, ends: [U2.out, GND]}",
    )
    found = of(check(text), "audio.speaker-dc")
    assert [f.level for f in found] == ["error"]
    # half of the 12 V supply across 8 ohm: 0.75 A, 4.5 W (Ohm's law)
    assert found[0].message.startswith("SPK1 has 6 V DC across it, U2.out at 6 V")
    assert found[0].message.endswith("about 750 mA of DC (4.5 W) in the voice coil")
    assert found[0].location.line == line_of(text, "SPK1: {kind: speaker")


def test_capacitor_coupled_speaker_has_no_dc(clean_text):
    assert of(check(clean_text), "audio.speaker-dc") == []


# ---- audio.input-bypass (values: common practice, a few hundred pF to a few nF) -------------------------


def test_input_bypass_present_and_in_range_is_quiet(clean_text):
    assert of(check(clean_text), "audio.input-bypass") == []


def test_missing_input_bypass_is_a_warning_at_the_stage(clean_text):
    text = edited(clean_text, "    input_bypass: C22\n", "")
    found = of(check(text), "audio.input-bypass")
    assert [f.level for f in found] == ["warning"]
    assert found[0].message.startswith("the audio-amp stage names no input_bypass")
    assert found[0].location.line == line_of(text, "- stage: audio-amp")


def test_input_bypass_too_large_cuts_the_treble(clean_text):
    text = edited(clean_text, "C22: {kind: capacitor, value: 470 pF", "C22: {kind: capacitor, value: 47 nF")
    found = of(check(text), "audio.input-bypass")
    assert found and "large enough to cut the treble" in found[0].message
    assert found[0].location.line == line_of(text, "C22: {kind: capacitor")


# ---- audio.speaker-power (Boylestad & Nashelsky ch. 12: P_o(max) = V_CC^2 / (2 R_L)) -----------------


def test_speaker_rated_above_the_amplifier_is_quiet(clean_text):
    assert of(check(clean_text), "audio.speaker-power") == []


def test_small_speaker_on_a_12_v_amplifier_is_a_warning(clean_text):
    text = edited(clean_text, "value: 8 ohm, power_rating: 3 W", "value: 8 ohm, power_rating: 1 W")
    found = of(check(text), "audio.speaker-power")
    assert [f.level for f in found] == ["warning"]
    # one supply: peak (V_s - V_sat) / 2 with the builtin profile's 3 V saturation (typical, from memory):
    # (12 - 3)^2 / (8 x 8) = 1.27 W (clipping limit with saturation, Boylestad & Nashelsky ch. 12)
    p_max = ((12.0 - 3.0) / 2) ** 2 / (2 * 8.0)
    assert found[0].message.startswith(f"SPK1 is rated 1 W but U2 can deliver up to {p_max:.4g} W into it")
    assert found[0].location.line == line_of(text, "SPK1: {kind: speaker")


def test_coupling_corner_threshold_at_its_edge(clean_text):
    # C20 (470 µF) into 8 ohm turns over at 1/(2π·8·470 µF) = 42.33 Hz (first-order RC). With
    # lowest_audio just above it the plan is fine; just below, the rule warns.
    corner = 1 / (2 * math.pi * 8 * 470e-6)
    above = edited(clean_text, "  lowest_audio: 300 Hz\n", f"  lowest_audio: {corner * 1.001:.4f} Hz\n")
    below = edited(clean_text, "  lowest_audio: 300 Hz\n", f"  lowest_audio: {corner * 0.999:.4f} Hz\n")
    assert of(check(above), "audio.coupling-corner") == []
    found = of(check(below), "audio.coupling-corner")
    assert [f.level for f in found] == ["warning"]
    loss = 10 * math.log10(1 + (1 / 0.999) ** 2)  # first-order high-pass at 0.999 of its corner: 3.01 dB
    assert f"{loss:.1f} dB down there" in found[0].message
