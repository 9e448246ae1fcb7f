"""DC potentials of nets: stated by rails, pin profiles and nodes, spread through coils and resistors."""

import pytest

from speccheck import loader

BASE = """build_spec: 1
build: {name: nets}
rails: {V12: {voltage: 12 V}, GND: {voltage: 0 V}}
devices: {U2: {profile: audio-power-amp-lv, rail: V12}}
parts:
"""


def nets_of(parts: str):
    loaded = loader.load_text(BASE + parts, "n.yaml")
    assert not loaded.findings, [f.message for f in loaded.findings]
    return loaded.build.nets


def test_rails_and_pins_state_potentials():
    nets = nets_of("  C1: {kind: capacitor, value: 1 uF, dielectric: film, ends: [U2.out, V12]}\n")
    assert nets.dc("V12").volts == 12.0
    assert nets.dc("U2.out").volts == 6.0  # half of the 12 V supply (profile: half-supply)


def test_coil_carries_dc_and_capacitor_does_not():
    nets = nets_of("  L1: {kind: inductor, value: 1 mH, ends: [V12, A]}\n"
                   "  C1: {kind: capacitor, value: 1 nF, dielectric: ceramic, ends: [A, B]}\n")
    assert nets.dc("A").volts == 12.0
    assert nets.dc("B") is None


def test_speaker_voice_coil_returns_to_ground():
    nets = nets_of("  SPK1: {kind: speaker, value: 8 ohm, ends: [SPK, GND]}\n")
    assert nets.dc("SPK").volts == 0.0


def test_node_between_two_resistors_from_different_rails_is_unknown():
    nets = nets_of("  R1: {kind: resistor, value: 10 kohm, ends: [V12, MID]}\n"
                   "  R2: {kind: resistor, value: 10 kohm, ends: [MID, GND]}\n")
    assert nets.dc("MID") is None  # a divider: the tool does not guess its voltage


def test_coil_wins_over_resistor():
    nets = nets_of("  L1: {kind: inductor, value: 1 mH, ends: [V12, N]}\n"
                   "  R1: {kind: resistor, value: 10 kohm, ends: [N, GND]}\n")
    assert nets.dc("N").volts == 12.0


# ---- a potentiometer inside a divider --------------------------------------------------------

POT_IN_DIVIDER = (
    "  R13: {kind: resistor, value: 4.7 kohm, ends: [V6, SQ_TOP]}\n"
    "  RV2: {kind: potentiometer, value: 10 kohm, ends: [SQ_TOP, SQ_BOT], wiper: U1.squelch_in}\n"
    "  R14: {kind: resistor, value: 22 kohm, ends: [SQ_BOT, GND]}\n"
)


def squelch_plan(parts: str) -> str:
    from conftest import CLEAN, edited

    text = edited(CLEAN.read_text("utf-8"), "  C22: {kind: capacitor", parts + "  C22: {kind: capacitor")
    return edited(text, "  - stage: squelch\n    device: U1\n",
                  "  - stage: squelch\n    device: U1\n    control: RV2\n    pin: U1.squelch_in\n")


def test_a_pot_between_fixed_resistors_spans_the_divided_voltages():
    # 6 V -> 4.7k -> 10k track -> 22k -> ground: one current 6 V / 36.7 kΩ through all three (Ohm's
    # law, a series circuit); the track's ends sit at 6·(10k + 22k)/36.7k and 6·22k/36.7k
    from conftest import check, of

    result = check(squelch_plan(POT_IN_DIVIDER))
    top, bottom = 6 * 32e3 / 36.7e3, 6 * 22e3 / 36.7e3  # 5.232 V, 3.597 V
    found = of(result, "squelch.threshold-range")
    assert [f.level for f in found] == ["error"]  # 3.6-5.2 V never reaches the pin's 0.5-1.5 V
    values = {v.name: v.value for v in found[0].values}
    assert values["pin lowest"] == pytest.approx(bottom)
    assert values["pin highest"] == pytest.approx(top)


def test_a_divider_that_sweeps_the_threshold_is_clean():
    # 6 V -> 33k -> 10k track -> 2.2k -> ground: ends at 6·12.2/45.2 = 1.62 V and 6·2.2/45.2 = 0.29 V,
    # across the 0.5-1.5 V the squelch switches over
    from conftest import check, of

    parts = POT_IN_DIVIDER.replace("4.7 kohm", "33 kohm").replace("22 kohm", "2.2 kohm")
    loaded = loader.load_text(squelch_plan(parts), "p.yaml")
    low, high, _pot = loaded.build.nets.spans["U1.squelch_in"]
    assert (low, high) == (pytest.approx(6 * 2.2 / 45.2), pytest.approx(6 * 12.2 / 45.2))
    assert "divider R13, R14, RV2" in loaded.build.nets.dc("SQ_TOP").why
    assert of(check(squelch_plan(parts)), "squelch.threshold-range") == []


def test_a_pot_fed_from_one_rail_only_keeps_that_rail_at_both_ends():
    # no path to a second potential: no current flows, both ends sit at the rail (exact)
    parts = "  R13: {kind: resistor, value: 4.7 kohm, ends: [V6, SQ_TOP]}\n" \
            "  RV2: {kind: potentiometer, value: 10 kohm, ends: [SQ_TOP, SQ_BOT], wiper: U1.squelch_in}\n"
    loaded = loader.load_text(squelch_plan(parts), "p.yaml")
    assert loaded.build.nets.dc("SQ_TOP").volts == 6.0 and loaded.build.nets.dc("SQ_BOT").volts == 6.0
