"""RF-path formulas against their published check values (and scikit-rf as an independent
reference), and each rfpath rule firing on a planted mistake at its line and staying quiet on
the clean plan."""

import math

import pytest
from conftest import check, edited, line_of, of

from speccheck.formulas import matching, preferred, resonators

# ---- L-network ---------------------------------------------------------------------------------


def test_l_network_bowick_example_4_1():
    # Bowick, RF Circuit Design, Example 4-1 (from memory): 100 Ω -> 1000 Ω at 100 MHz: Q 3, L 477.5 nH, C
    # 4.77 pF
    net = matching.l_network(100.0, 1000.0, 100e6)
    assert net["q"] == pytest.approx(3.0)
    assert net["inductance"] == pytest.approx(477.5e-9, rel=1e-3)
    assert net["capacitance"] == pytest.approx(4.77e-12, rel=2e-3)
    assert net["shunt_on"] == "load"


def _skrf_match(f, z0, inductance, capacitance, r_load):
    """scikit-rf: series L, then shunt C, terminated in r_load, seen from a z0 port; returns |S11|."""
    import skrf
    from skrf.media import DefinedGammaZ0

    freq = skrf.Frequency(f, f, 1, unit="Hz")
    line = DefinedGammaZ0(freq, z0=z0)
    gamma_load = (r_load - z0) / (r_load + z0)
    net = line.inductor(inductance) ** line.shunt_capacitor(capacitance) ** line.load(gamma_load)
    return abs(net.s[0, 0, 0])


def test_l_network_bowick_values_match_in_scikit_rf():
    # scikit-rf cascade of the ideal network: return loss above 60 dB at the design frequency
    net = matching.l_network(100.0, 1000.0, 100e6)
    s11 = _skrf_match(100e6, 100.0, net["inductance"], net["capacitance"], 1000.0)
    assert -20 * math.log10(max(s11, 1e-30)) > 60


def test_return_loss_of_declared_network_matches_scikit_rf():
    # the clean plan's 3.9 µH / 56 pF into 1.5 kΩ from 50 Ω at 10.7 MHz, computed by scikit-rf
    s11 = _skrf_match(10.7e6, 50.0, 3.9e-6, 56e-12, 1500.0)
    zin = matching.zin_series_l_shunt_c(10.7e6, 3.9e-6, 56e-12, 1500.0)
    assert matching.return_loss_db(zin, 50.0) == pytest.approx(-20 * math.log10(s11), abs=1e-6)
    assert matching.vswr(zin, 50.0) == pytest.approx((1 + s11) / (1 - s11), rel=1e-9)


def test_shunt_c_first_network_matches_scikit_rf():
    # shunt C across a 1 kΩ source side, series L into 100 Ω: mirror of Bowick's case, computed by scikit-rf
    import skrf
    from skrf.media import DefinedGammaZ0

    net = matching.l_network(1000.0, 100.0, 100e6)
    assert net["shunt_on"] == "source"
    freq = skrf.Frequency(100e6, 100e6, 1, unit="Hz")
    line = DefinedGammaZ0(freq, z0=1000.0)
    gamma_load = (100.0 - 1000.0) / (100.0 + 1000.0)
    s11 = abs((line.shunt_capacitor(net["capacitance"]) ** line.inductor(net["inductance"])
               ** line.load(gamma_load)).s[0, 0, 0])
    zin = matching.zin_shunt_c_series_l(100e6, net["inductance"], net["capacitance"], 100.0)
    assert abs(matching.reflection(zin, 1000.0)) == pytest.approx(s11, abs=1e-9)


def test_l_network_50_to_3k3_at_21m4_common_practice():
    # common practice: 50 Ω to 3.3 kΩ at 21.4 MHz is about 3 µH series and 18 pF shunt
    net = matching.l_network(50.0, 3300.0, 21.4e6)
    assert net["inductance"] == pytest.approx(3e-6, rel=0.03)
    assert net["capacitance"] == pytest.approx(18e-12, rel=0.03)


def test_termination_cost_matches_scikit_rf():
    # a plain shunt resistor across a 1.5 kΩ input, matching it to 50 Ω, against a lossless match:
    # transducer gain |S21|^2 between a 50 Ω port and a 1.5 kΩ port, computed by scikit-rf
    import skrf
    from skrf.media import DefinedGammaZ0

    rt = matching.termination_resistor(50.0, 1500.0)
    freq = skrf.Frequency(10.7e6, 10.7e6, 1, unit="Hz")
    line = DefinedGammaZ0(freq, z0=50.0)
    shunt = (
        line.shunt_resistor(rt)
        if hasattr(line, "shunt_resistor")
        else line.shunt(line.resistor(rt) ** line.short())
    )
    shunt.renormalize([50.0, 1500.0])
    gain_db = 10 * math.log10(abs(shunt.s[0, 1, 0]) ** 2)
    assert matching.termination_cost_db(50.0, 1500.0) == pytest.approx(-gain_db, abs=1e-6)
    assert abs(shunt.s[0, 0, 0]) < 1e-9  # and it is matched: the source sees 50 Ω


# ---- preferred values and toroids ---------------------------------------------------------------

IEC_60063_E12 = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2]
IEC_60063_E24 = [
    1.0,
    1.1,
    1.2,
    1.3,
    1.5,
    1.6,
    1.8,
    2.0,
    2.2,
    2.4,
    2.7,
    3.0,
    3.3,
    3.6,
    3.9,
    4.3,
    4.7,
    5.1,
    5.6,
    6.2,
    6.8,
    7.5,
    8.2,
    9.1,
]


def test_series_are_the_published_iec_60063_values():
    # IEC 60063, typed in from the standard's table
    assert list(preferred.E12) == IEC_60063_E12
    assert list(preferred.E24) == IEC_60063_E24
    # and they are NOT the rounded powers of ten (which give 2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6, 8.3)
    rounded = [round(10 ** (i / 24), 1) for i in range(24)]
    assert rounded != IEC_60063_E24


@pytest.mark.parametrize(
    "value, series, pick",
    [
        (3.16e-6, "E24", 3.3e-6),  # 10**(12/24): the published value is 3.3 (IEC 60063)
        (2.61e-12, "E24", 2.7e-12),  # 10**(11/24): published 2.7
        (8.25e3, "E24", 8.2e3),  # 10**(22/24) = 8.25: published 8.2
        (53.4e-12, "E12", 56e-12),
        (4.005e-6, "E12", 3.9e-6),
        (9.5, "E24", 9.1),  # the log midpoint of 9.1 and 10 is sqrt(91) = 9.54 (plain arithmetic)
        (9.6, "E24", 10.0),
    ],
)
def test_nearest_preferred_value(value, series, pick):
    got, err = preferred.nearest_preferred(value, preferred.SERIES[series])
    assert got == pytest.approx(pick)
    assert err == pytest.approx(pick / value - 1)


def test_toroid_handbook_table_mix_2():
    # powdered-iron toroid handbook table: 0.5 in OD, mix 2: AL 49 µH per 100 turns = 4.9 nH/turn²; 50 turns
    # -> 12.25 µH
    al = 49e-6 / 100**2
    assert al == pytest.approx(4.9e-9)
    assert resonators.toroid_inductance(50, al) == pytest.approx(12.25e-6)
    assert resonators.toroid_turns(12.25e-6, al) == pytest.approx(50)


def test_toroid_25_turns_about_3uh_common_practice():
    # common practice: 25 turns on that 0.5 in mix-2 core gives about 3 µH (the 21.4 MHz match coil)
    assert resonators.toroid_inductance(25, 4.9e-9) == pytest.approx(3e-6, rel=0.03)


# ---- rfpath.input-match ------------------------------------------------------------------------------


def test_clean_plan_has_no_rfpath_warning_or_error(clean_text):
    bad = [f for f in check(clean_text).findings if f.rule.startswith("rfpath.") and f.level != "note"]
    assert bad == [], [f.message for f in bad]


def test_clean_plan_sheet_lists_match_values(clean_text):
    sheet = {(e.section, e.owner, e.value.name): e.value for e in check(clean_text).sheet}
    ideal = matching.l_network(50.0, 1500.0, 10.7e6)  # checked against Bowick and scikit-rf above
    assert sheet[("input-match", "input-match", "ideal series L")].value == pytest.approx(ideal["inductance"])
    assert sheet[("input-match", "input-match", "ideal series L")].unit == "H"
    assert sheet[("input-match", "input-match", "ideal shunt C")].unit == "F"
    assert sheet[("input-match", "input-match", "series L, nearest E12")].value == pytest.approx(3.9e-6)
    assert sheet[("input-match", "input-match", "shunt C, nearest E12")].value == pytest.approx(56e-12)
    assert sheet[("input-match", "input-match", "shunt C, nearest E24")].value == pytest.approx(51e-12)
    s11 = _skrf_match(10.7e6, 50.0, 3.9e-6, 56e-12, 1500.0)
    assert sheet[("input-match", "input-match", "return loss")].value == pytest.approx(
        -20 * math.log10(s11), abs=0.01
    )
    assert sheet[("input-match", "input-match", "return loss")].unit == "dB"
    # 10 log10(1500 / 50) = 14.77 dB (plain arithmetic)
    assert sheet[
        ("input-match", "input-match", "signal lost with a shunt termination")
    ].value == pytest.approx(14.77, abs=0.01)
    # N = sqrt(L / AL) for the declared 3.9 µH on 4.9 nH/turn²
    assert sheet[("coils", "L1", "turns for the declared value")].value == pytest.approx(
        math.sqrt(3.9e-6 / 4.9e-9), abs=0.05
    )


def test_badly_tuned_match_is_a_warning(clean_text):
    text = edited(clean_text, "C1: {kind: capacitor, value: 56 pF", "C1: {kind: capacitor, value: 150 pF")
    found = of(check(text), "rfpath.input-match")
    assert [f.level for f in found] == ["warning"]
    zin = 1j * 2 * math.pi * 10.7e6 * 3.9e-6 + 1 / (1 / 1500 + 1j * 2 * math.pi * 10.7e6 * 150e-12)
    gamma = abs((zin - 50) / (zin + 50))  # plain arithmetic of the network
    assert f"return loss {-20 * math.log10(gamma):.1f} dB" in found[0].message
    # L-network (Bowick, RF Circuit Design, ch. 4, from memory): Q = sqrt(Rp/Rs - 1), X_L = Q Rs
    ideal_l = math.sqrt(1500 / 50 - 1) * 50 / (2 * math.pi * 10.7e6)
    assert f"ideal for 1.5 kΩ: series {ideal_l * 1e6:.4g} µH" in found[0].message
    assert found[0].location.line == line_of(text, "topology: series-l-shunt-c")


def test_network_turned_the_wrong_way(clean_text):
    text = edited(clean_text, "topology: series-l-shunt-c", "topology: shunt-c-series-l")
    found = of(check(text), "rfpath.input-match")
    assert "this shape cannot match them" in found[0].message
    assert found[0].location.line == line_of(text, "topology: shunt-c-series-l")


def test_plain_termination_is_a_note_with_its_cost(clean_text):
    text = edited(
        clean_text,
        "  - stage: input-match\n    topology: series-l-shunt-c\n    parts: [L1, C1]\n",
        "  - stage: input-match\n    topology: termination\n    parts: [R1]\n",
    )
    text = edited(
        text,
        "  C1: {kind: capacitor, value: 56 pF",
        "  R1: {kind: resistor, value: 51.7 ohm, ends: [IF_IN, GND]}\n  C1: {kind: capacitor, value: 56 pF",
    )
    found = of(check(text), "rfpath.input-match")
    assert [f.level for f in found] == ["note"]
    # 51.7 Ω || 1.5 kΩ = 49.98 Ω: all but 49.98/1500 of the power goes into R1 -> about 14.8 dB lost
    assert "the chip gets 14.8 dB less signal than through a lossless L-network" in found[0].message
    assert found[0].location.line == line_of(text, "topology: termination")


def test_missing_input_impedance_is_a_note(clean_text):
    text = edited(
        clean_text, "  U1: {profile: fm-if-subsystem, rail: V6}\n", "  U1: {profile: my-chip, rail: V6}\n"
    )
    text = edited(
        text,
        "devices:\n",
        "profiles:\n  my-chip:\n    class: mixer\n    pins:\n      mixer_in: {role: input}\n"
        "      osc_base: {role: oscillator}\n      osc_emitter: {role: oscillator-out}\n"
        "      mixer_out: {role: mixer-out}\n      limiter_in: {role: limiter-in}\n"
        "      quad: {role: quadrature}\n      audio: {role: output}\n\ndevices:\n",
    )
    found = of(check(text), "rfpath.input-match")
    assert [f.level for f in found] == ["note"]
    assert "profiles.my-chip.input_impedance is not given" in found[0].message


# ---- rfpath.coil-turns -----------------------------------------------------------------------------


def test_turns_that_do_not_give_the_value(clean_text):
    text = edited(clean_text, "    turns: 28\n", "    turns: 20\n")
    found = of(check(text), "rfpath.coil-turns")
    assert [f.level for f in found] == ["warning"]
    # AL N^2 = 4.9 nH x 400 = 1.96 µH (handbook AL, plain arithmetic)
    assert "20 turns on its core (AL 4.9 nH/turn²) give 1.96 µH" in found[0].message
    assert found[0].location.line == line_of(text, "turns: 20")


def test_clean_coil_turns_are_fine(clean_text):
    assert of(check(clean_text), "rfpath.coil-turns") == []


# ---- rfpath.gain-ahead / max-input ----------------------------------------------------------------


def _with_preamp(text: str, gain: str) -> str:
    return edited(
        text,
        "chain:\n  - stage: input-match\n",
        f"chain:\n  - stage: preamp\n    gain: {gain}\n  - stage: input-match\n",
    )


def test_too_much_gain_ahead_of_the_if_chip(clean_text):
    text = _with_preamp(clean_text, "20 dB")
    found = of(check(text), "rfpath.gain-ahead")
    assert [f.level for f in found] == ["warning"]
    assert "20 dB of gain stands ahead of U1 (fm-if-subsystem), more than the 10 dB" in found[0].message
    assert found[0].location.line == line_of(text, "gain: 20 dB")


def test_ten_db_ahead_is_fine_common_practice(clean_text):
    # common practice: keep gain ahead of such an IF chip to about 10 dB
    assert of(check(_with_preamp(clean_text, "10 dB")), "rfpath.gain-ahead") == []


def test_strong_source_overloads_the_chip(clean_text):
    text = edited(clean_text, "level_max: -30 dBm", "level_max: -5 dBm")
    found = of(check(text), "rfpath.max-input")
    assert [f.level for f in found] == ["warning"]
    assert "up to -5 dBm reaches U1" in found[0].message and "above the -10 dBm" in found[0].message
    assert found[0].location.line == line_of(text, "level_max: -5 dBm")


def test_preamp_gain_counts_toward_the_level(clean_text):
    # -30 dBm + 25 dB = -5 dBm (plain arithmetic), above the profile's -10 dBm
    found = of(check(_with_preamp(clean_text, "25 dB")), "rfpath.max-input")
    assert len(found) == 1 and "up to -5 dBm reaches U1 (source -30 dBm plus 25 dB gain)" in found[0].message


def test_clean_level_is_fine(clean_text):
    assert of(check(clean_text), "rfpath.max-input") == []
