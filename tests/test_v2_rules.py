"""The v2 families: battery, squelch, tap, connect."""

from __future__ import annotations

import pytest
from conftest import EXAMPLES, check, edited, line_of, of

PORTABLE = EXAMPLES / "portable-9v-battery.yaml"
BENCH = EXAMPLES / "bench-demod-selector.yaml"


def portable() -> str:
    return PORTABLE.read_text("utf-8")


def bench() -> str:
    return BENCH.read_text("utf-8")


def value(finding, name):
    return next(v.value for v in finding.values if v.name == name)


# ---- battery ---------------------------------------------------------------------------

def test_portable_shows_the_battery_findings_and_no_error():
    text = portable()
    result = check(text, "portable.yaml")
    assert [f for f in result.findings if f.level == "error"] == []
    eol = of(result, "battery.end-of-life")
    assert len(eol) == 1 and eol[0].location.line == line_of(text, "  U3: {profile")
    # U3 needs its 6 V output plus the profile's 2 V dropout = 8 V; six alkaline cells are flat at
    # 6 x 0.9 V = 5.4 V (end voltage per cell from memory)
    assert value(eol[0], "needed") == pytest.approx(8.0) and value(eol[0], "end voltage") == pytest.approx(
        5.4
    )
    run = of(result, "battery.running-time")
    sheet = {(e.owner, e.value.name): e.value.value for e in result.sheet}
    current = sheet[("supply", "input current budget")]
    # Peukert (Linden): H = 0.55 Ah / 25 mA = 22 h; t = 22 (0.55 / (I x 22))^1.3, k = 1.3 for alkaline
    # (from memory)
    hours = 22 * (0.55 / (current * 22)) ** 1.3
    assert sheet[("battery", "running time at the budget current")] == pytest.approx(hours)
    # the amplifier's real swing (its profile's saturation) keeps the full-output draw near 2 h: a
    # warning only under the 2 h setting
    assert [f.level for f in run] == (["warning"] if hours < 2 else [])


def test_a_battery_that_cannot_hold_the_regulator_up_even_fresh_is_an_error():
    text = edited(
        portable(), "    capacity_at: 25 mA\n", "    capacity_at: 25 mA\n    internal_resistance: 15 ohm\n"
    )
    found = [f for f in of(check(text, "portable.yaml"), "battery.sag") if f.level == "error"]
    assert len(found) == 1 and "U3" in found[0].message
    # fresh 6 x 1.6 V = 9.6 V (from memory) less I x 15 ohm (Ohm's law)
    current = value(found[0], "budget current")
    assert value(found[0], "under load") == pytest.approx(9.6 - current * 15)


def test_a_fresh_battery_above_a_chip_supply_limit_is_an_error():
    text = edited(portable(), "chemistry: alkaline\n    cells: 6", "chemistry: lithium-ion\n    cells: 3")
    text = edited(text, "  voltage: 9 V\n  rail: V9", "  voltage: 10.8 V\n  rail: V9")
    found = [f for f in of(check(text, "portable.yaml"), "battery.end-of-life") if f.level == "error"]
    # 3 x 4.2 V = 12.6 V fresh (from memory) against the audio amplifier profile's 12 V
    assert (
        len(found) == 1
        and "U2" in found[0].message
        and value(found[0], "fresh open-circuit") == pytest.approx(12.6)
    )


def test_no_battery_description_means_no_battery_finding():
    text = bench()
    result = check(text, "bench.yaml")
    assert not [f for f in result.findings if f.rule.startswith("battery.")]


# ---- squelch ---------------------------------------------------------------------------


def test_squelch_pot_on_a_higher_rail_than_the_chip_is_an_error():
    text = edited(portable(), "ends: [V6, GND], wiper: SQ_SET", "ends: [V9, GND], wiper: SQ_SET")
    found = of(check(text, "portable.yaml"), "squelch.pin-voltage")
    # the wiper reaches 9 V; the chip runs on 6 V, so the pin takes 6 + 0.3 V (common practice)
    assert len(found) == 1 and value(found[0], "pin highest") == 9.0 and value(found[0], "allowed") == 6.3
    assert found[0].location.line == line_of(text, "    control: RV2")


def test_squelch_divider_that_misses_part_of_the_threshold_range_is_a_warning():
    text = edited(portable(), "    series: R12\n", "    series: R12\n    shunt: R14\n")
    text = edited(
        text,
        "  R12: {kind: resistor, value: 100 kohm, ends: [SQ_SET, U1.squelch_in]}\n",
        "  R12: {kind: resistor, value: 100 kohm, ends: [SQ_SET, U1.squelch_in]}\n"
        "  R14: {kind: resistor, value: 10 kohm, ends: [U1.squelch_in, GND]}\n",
    )
    found = of(check(text, "portable.yaml"), "squelch.threshold-range")
    # divider 10k / (100k + 10k) of 6 V = 0.5455 V, short of the 1.5 V threshold top (typical profile)
    assert len(found) == 1 and found[0].level == "warning"
    assert value(found[0], "pin highest") == pytest.approx(6.0 * 10 / 110)


def test_squelch_range_entirely_outside_the_threshold_is_an_error():
    text = edited(portable(), "ends: [V6, GND], wiper: SQ_SET", "ends: [SQ_LOW, GND], wiper: SQ_SET")
    text = edited(text, "  GND: {voltage: 0 V}\n", "  GND: {voltage: 0 V}\n\nnodes:\n  SQ_LOW: {dc: 0.3 V}\n")
    found = of(check(text, "portable.yaml"), "squelch.threshold-range")
    assert len(found) == 1 and found[0].level == "error"


# ---- tap -------------------------------------------------------------------------------


def test_a_heavy_tap_costs_the_main_path_level():
    text = edited(portable(), "    load: 10 kohm\n", "    load: 200 ohm\n")
    found = of(check(text, "portable.yaml"), "tap.loading")
    assert len(found) == 1
    # source 1 kohm (typical profile); main path R9 5.1 kohm; tap 1 kohm + 200 ohm. Divider arithmetic:
    main = 5100.0
    tap = 1200.0
    both = 1 / (1 / main + 1 / tap)
    import math

    expected = 20 * math.log10(main / (main + 1000)) - 20 * math.log10(both / (both + 1000))
    assert value(found[0], "main path loss") == pytest.approx(expected)


# ---- connect ---------------------------------------------------------------------------


def test_a_misspelt_net_leaves_two_nets_with_one_connection():
    text = edited(portable(), "ends: [ZOBEL, GND]}", "ends: [ZOBLE, GND]}")
    found = of(check(text, "portable.yaml"), "connect.single-connection")
    assert sorted(f.message.split()[1] for f in found) == ["ZOBEL", "ZOBLE"]


def test_an_island_of_parts_is_reported():
    text = edited(
        portable(),
        "  C21: {kind",
        "  R98: {kind: resistor, value: 1 kohm, ends: [ISL_A, ISL_B]}\n"
        "  R99: {kind: resistor, value: 1 kohm, ends: [ISL_A, ISL_B]}\n  C21: {kind",
    )
    found = of(check(text, "portable.yaml"), "connect.unreachable")
    assert len(found) == 1 and found[0].message.startswith("R98, R99 connect to no rail")


def test_dc_into_a_pot_or_a_load_that_needs_it_blocked():
    text = edited(
        portable(), "ends: [VOL_TOP, GND], wiper: U2.in_plus", "ends: [U2.out, GND], wiper: U2.in_plus"
    )
    found = of(check(text, "portable.yaml"), "connect.dc-unblocked")
    # the amplifier output sits at half its 9 V supply: 4.5 V across the track
    assert len(found) == 1 and value(found[0], "DC across the track") == 4.5
    text = edited(portable(), "    net: U1.audio\n    series: R15\n    coupling: C15\n", "    net: U2.out\n")
    found = of(check(text, "portable.yaml"), "connect.dc-unblocked")
    assert len(found) == 1 and "Tap data out" in found[0].message


def test_the_shipped_v2_examples_have_no_connectivity_finding():
    for text in (bench(), portable()):
        result = check(text, "x.yaml")
        assert not [f for f in result.findings if f.rule.startswith("connect.")]


# ---- how many combinations are checked --------------------------------------------------------

def test_combinations_past_the_cap_are_named_in_a_note(monkeypatch):
    from speccheck import configs

    # 12 upstream settings (the format's most) that neither signal names, and S1 in both positions
    # for each: 2 signals x 2 positions x 12 settings = 48 combinations; with the cap at 20, 28 are left
    settings = ", ".join(f"rbw-{k}: {100 + 10 * k} kHz" for k in range(12))
    text = edited(bench(), "bandwidth_settings: {rbw-100k: 100 kHz, rbw-1m: 1 MHz}",
                  f"bandwidth_settings: {{{settings}}}")
    for cut in ("    upstream: rbw-100k\n", "    upstream: rbw-1m\n", "    switches: {S1: narrow}\n",
                "    switches: {S1: wide}\n"):
        text = edited(text, cut, "")
    assert of(check(text), "connect.configurations-capped") == []  # 48: all checked under the cap of 64
    monkeypatch.setattr(configs, "MAX_CONFIGURATIONS", 20)
    result = check(text, "many.yaml")
    found = of(result, "connect.configurations-capped")
    assert [f.level for f in found] == ["note"]
    assert found[0].message == ("The plan has 48 combinations of signal, switch positions and upstream "
                                "setting; the first 20 in plan order were checked and the other 28 were not")
    assert of(check(bench()), "connect.configurations-capped") == []  # 2 signals, each in one position


def coupled_input() -> str:
    # a DC-blocking capacitor from the connector's net IF_IN to the match, listed in no stage
    text = edited(portable(), "ends: [IF_IN, U1.mixer_in]", "ends: [LIN, U1.mixer_in]")
    return edited(text, "  C1: {kind", "  C2: {kind: capacitor, value: 10 nF, dielectric: ceramic, "
                                        "ends: [IF_IN, LIN]}\n  C1: {kind")


def test_the_net_the_source_feeds_is_a_connection():
    assert of(check(coupled_input(), "portable.yaml"), "connect.single-connection") == []
    direct = edited(coupled_input(), "ends: [IF_IN, LIN]", "ends: [IF_IN, U1.mixer_in]")
    direct = edited(direct, "ends: [LIN, U1.mixer_in]", "ends: [U1.mixer_in, GND]")  # L1 to ground
    assert of(check(direct, "portable.yaml"), "connect.single-connection") == []


def test_source_net_names_where_the_signal_enters():
    named = edited(coupled_input(), "\nsource:\n", "\nsource:\n  net: IF_IN\n")
    assert of(check(named, "portable.yaml"), "connect.single-connection") == []
    wrong = edited(named, "  net: IF_IN\n", "  net: IF_JACK\n")
    found = of(check(wrong, "portable.yaml"), "connect.single-connection")
    messages = sorted(f.message for f in found)
    assert messages[0].startswith("Net IF_IN reaches only C2")  # named elsewhere: IF_IN is no input now
    assert messages[1] == "source.net IF_JACK is on no part: nothing takes the source's signal"
    named_net = next(f for f in found if f.message == messages[1])
    assert named_net.location.line == line_of(wrong, "net: IF_JACK")
