"""DC potentials of nets: stated by rails, pin profiles and nodes, spread through coils and resistors."""

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
