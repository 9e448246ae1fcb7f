"""tap.loading asserted whole: the finding (level, place, text, values, fix, stage, signal and
position), the notes for what is not given, and the design sheet, each number derived here.

The arithmetic is the voltage divider (any circuits textbook, e.g. Horowitz & Hill, The Art of
Electronics, 3rd ed., section 1.2.2): a source of open-circuit level 1 and output resistance Z
driving a load R gives R / (R + Z); in decibels 20 log10(R / (R + Z)). Resistors on one net in
parallel: 1 / (1/R1 + 1/R2 + ...). The tap's own load sees the net's level through the tap's series
resistor, a second divider. The source resistance is the profile's (fm-if-subsystem: audio pin
1 kohm, typical, from memory); the rest is the portable example's own values.
"""

from __future__ import annotations

import math

import pytest
from conftest import EXAMPLES, check, edited, facts, line_of, of, sheet_rows

from speccheck.config import Settings

PORTABLE = EXAMPLES / "portable-9v-battery.yaml"
FIX = ("Raise the tap's series resistor, or buffer the tap (an emitter or op-amp follower) so it draws "
       "no signal from the main path.")
Z = 1000.0  # U1.audio output_impedance: 1 kohm (profile fm-if-subsystem)
R9 = 5100.0  # the de-emphasis resistor, the main path's input at U1.audio
R15 = 1000.0  # the tap's series resistor
LOAD = "    load: 10 kohm\n"


def portable() -> str:
    return PORTABLE.read_text("utf-8")


def par(*ohms: float) -> float:
    """Resistors in parallel."""
    return 1 / sum(1 / r for r in ohms)


def db(load: float, source: float) -> float:
    """The voltage divider in decibels: 20 log10(R_load / (R_load + R_source))."""
    return 20 * math.log10(load / (load + source))


def loading(text: str, settings: Settings | None = None):
    result = check(text, "portable.yaml", settings)
    return [facts(f) for f in of(result, "tap.loading")], sheet_rows(result, "tap.loading")


def tap_sheet(load: float, series: float, main: float | None, signal: str = "",
              position: str = "", owner: str = "data out") -> list:
    """What the rule publishes for one tap, computed here: the tap's resistance, the level at its load,
    and (when the net has a main path) the main path's input and what the tap costs it."""
    r_tap = load + series
    seen = par(r_tap, main) if main else r_tap
    # the tap's own resistance is the same in every configuration: no signal on it
    rows = [("tap", owner, "tap load (series + input)", pytest.approx(r_tap), "Ω", "", ""),
            ("tap", owner, "level at the tap's load, from the open source",
             pytest.approx(db(seen, Z) + db(load, series)), "dB", signal, position)]
    if main:
        rows += [("tap", owner, "main path input at the net", pytest.approx(main), "Ω", signal,
                  position),
                 ("tap", owner, "level the tap costs the main path",
                  pytest.approx(db(main, Z) - db(par(r_tap, main), Z)), "dB", signal, position)]
    return rows


def heavy(text: str, load: float, main: float, names: str, shown: tuple[str, str], signal: str = "",
          position: str = "", index: int = 0) -> dict:
    r_tap = load + R15
    cost = db(main, Z) - db(par(r_tap, main), Z)
    suffix = f" [{signal}; {position}]" if signal else ""
    line = line_of(text, "    load: ", -1)  # the tap's, after the chain's `load: SPK1`
    return {"rule": "tap.loading", "level": "warning", "line": line,
            "col": text.splitlines()[line - 1].index("load: ") + len("load: ") + 1,
            "path": f"taps[{index}].load",
            "message": f"tap data out loads U1.audio with {shown[0]} beside the main path's {shown[1]} "
                       f"({names}), through the pin's 1 kohm: the main path loses {cost:.2g} dB{suffix}",
            "values": {"tap load": (pytest.approx(r_tap), "Ω"), "main path input": (pytest.approx(main), "Ω"),
                       "source resistance": (Z, "Ω"), "main path loss": (pytest.approx(cost), "dB")},
            "fix": FIX, "stage": "tap", "signal": signal, "position": position}


def test_the_shipped_tap_costs_the_main_path_under_a_decibel():
    # 10 kohm + 1 kohm beside R9's 5.1 kohm, from 1 kohm: about 0.64 dB, under the 1 dB setting
    found, sheet = loading(portable())
    assert found == []
    assert sheet == tap_sheet(10e3, R15, R9)


def test_a_heavy_tap_is_a_warning_with_its_numbers():
    text = edited(portable(), LOAD, "    load: 200 ohm\n")
    found, sheet = loading(text)
    # 200 ohm + 1 kohm = 1.2 kohm; the main path 5.1 kohm (units.fmt writes 4 significant digits)
    assert found == [heavy(text, 200.0, R9, "R9", ("1.2 kΩ", "5.1 kΩ"))]
    assert sheet == tap_sheet(200.0, R15, R9)


@pytest.mark.parametrize("above", [True, False])
def test_max_loss_is_the_line(above):
    # the shipped tap's cost, computed here; the setting a hair below it trips, a hair above does not
    cost = db(R9, Z) - db(par(10e3 + R15, R9), Z)
    settings = Settings(rule_settings={"tap.loading": {"max_loss": cost * (1 - 1e-9 if above else 1 + 1e-9)}})
    found, _ = loading(portable(), settings)
    assert [f["values"]["main path loss"] for f in found] == ([(pytest.approx(cost), "dB")] if above else [])


def test_a_part_in_circuit_in_one_position_changes_the_cost_there():
    # R16 (2 kohm to ground) loads U1.audio only with S1 on wide: the main path is R9 || R16 there
    text = edited(portable(), "  C15: {kind", "  R16: {kind: resistor, value: 2 kohm, ends: [U1.audio, GND], "
                  "in_circuit: {S1: wide}}\n  C15: {kind")
    text = edited(text, LOAD, "    load: 3 kohm\n")
    found, sheet = loading(text)
    wide = par(R9, 2000.0)  # 1.437 kohm to 4 significant digits, as units.fmt writes it
    assert sorted(found, key=lambda f: f["signal"]) == [
        heavy(text, 3000.0, wide, "R16, R9", ("4 kΩ", "1.437 kΩ"), "broadcast FM", "S1 wide"),
        heavy(text, 3000.0, R9, "R9", ("4 kΩ", "5.1 kΩ"), "repeater voice", "S1 narrow"),
    ]
    narrow_rows = tap_sheet(3000.0, R15, R9, "repeater voice", "S1 narrow")
    wide_rows = tap_sheet(3000.0, R15, wide, "broadcast FM", "S1 wide")
    # the tap's own resistance is the same in both: said once, with no signal
    assert sheet == narrow_rows + wide_rows[1:]


def test_what_is_not_given_is_a_note_per_tap():
    text = edited(portable(), LOAD, "")
    text += ("  - name: second\n    net: DE1\n    load: 10 kohm\n"
             "  - name: third\n    net: U1.quad\n    load: 10 kohm\n"
             "  - name: fourth\n    net: U1.quad\n")
    found, sheet = loading(text)

    def note(name: str, index: int, what: str) -> dict:
        line = line_of(text, f"  - name: {name}")
        return {"rule": "tap.loading", "level": "note", "line": line, "col": 5, "path": f"taps[{index}]",
                "message": f"tap {name}: {what} is not given, so what the tap costs the main path cannot be "
                           "computed",
                "values": {}, "fix": f"Give {what}.", "stage": "tap", "signal": "", "position": ""}

    # DE1 is no pin; U1.quad is a pin with no output impedance in its profile; a missing load is
    # named before a missing impedance
    assert found == [note("data out", 0, "taps[0].load"),
                     note("second", 1, "the output_impedance of DE1 (its profile pin)"),
                     note("third", 2, "the output_impedance of U1.quad (its profile pin)"),
                     note("fourth", 3, "taps[3].load")]
    assert sheet == []


def test_a_net_with_no_main_path_resistor_is_only_published():
    # R9 moved off U1.audio: only the tap's own series resistor is left there, so there is no
    # main path to lose level, however heavy the tap
    text = edited(portable(), "ends: [U1.audio, DE1]}", "ends: [AUDIO_B, DE1]}")
    text = edited(text, LOAD, "    load: 200 ohm\n")
    found, sheet = loading(text)
    assert found == []
    assert sheet == tap_sheet(200.0, R15, None)


def test_a_tap_with_no_series_resistor():
    # the tap's load sits on the net directly; R15, no longer the tap's series part, counts as main path
    text = edited(portable(), "    series: R15\n", "")
    found, sheet = loading(text)
    main = par(R9, R15)
    assert sheet == tap_sheet(10e3, 0.0, main)
    cost = db(main, Z) - db(par(10e3, main), Z)
    assert cost < 1 and found == []  # about 0.4 dB: under the 1 dB setting


def test_a_potentiometer_on_the_net_is_main_path_too():
    rv3 = "  RV3: {kind: potentiometer, value: 47 kohm, ends: [U1.audio, GND]}\n"
    text = edited(portable(), "  C15: {kind", rv3 + "  C15: {kind")
    found, sheet = loading(text)
    assert found == []
    assert sheet == tap_sheet(10e3, R15, par(R9, 47e3))


def test_parts_with_no_value_are_left_out():
    # a potentiometer on the net with no value given adds nothing to the main path; a series resistor
    # with no value adds nothing to the tap's resistance
    rv3 = "  RV3: {kind: potentiometer, ends: [U1.audio, GND]}\n"
    text = edited(portable(), "  C15: {kind", rv3 + "  C15: {kind")
    assert loading(text) == ([], tap_sheet(10e3, R15, R9))
    text = edited(portable(), "R15: {kind: resistor, value: 1 kohm, ", "R15: {kind: resistor, ")
    assert loading(text) == ([], tap_sheet(10e3, 0.0, R9))


def test_a_tap_with_no_main_path_does_not_stop_the_next_one():
    # a second IF chip U4 whose audio pin feeds nothing but a tap: that tap is only published; the
    # heavy tap after it is still judged
    text = edited(portable(), "  U3: {profile: regulator", "  U4: {profile: fm-if-subsystem, rail: V6}\n"
                  "  U3: {profile: regulator")
    text = edited(text, "taps:\n  - name: data out\n", "taps:\n  - name: side\n    net: U4.audio\n"
                  "    load: 10 kohm\n  - name: data out\n")
    text = edited(text, "    load: 10 kohm\n    needs", "    load: 200 ohm\n    needs")
    found, sheet = loading(text)
    assert found == [heavy(text, 200.0, R9, "R9", ("1.2 kΩ", "5.1 kΩ"), index=1)]
    assert sheet == tap_sheet(10e3, 0.0, None, owner="side") + tap_sheet(200.0, R15, R9)


def test_a_cost_equal_to_max_loss_passes():
    # "more than max_loss" is the warning: the setting equal to the cost passes. The cost is worked
    # out here in the rule's own order of operations (R9 alone "in parallel" is 1 / (1 / R9)), so
    # the two floats agree to the last bit
    main = par(R9)
    cost = db(main, Z) - db(par(10e3 + R15, main), Z)
    assert loading(portable(), Settings(rule_settings={"tap.loading": {"max_loss": cost}}))[0] == []


def test_a_series_part_that_is_no_resistor_is_refused():
    # a capacitor's value (in farads) cannot be added to the tap's load in ohms
    text = edited(portable(), "    series: R15\n", "    series: C15\n")
    result = check(text, "portable.yaml")
    line = line_of(text, "    series: C15")
    col = text.splitlines()[line - 1].index("C15") + 1
    assert [facts(f) for f in result.findings] == [
        {"rule": "input.reference", "level": "error", "line": line, "col": col, "path": "taps[0].series",
         "message": "tap data out: series part 'C15' is a capacitor, not a resistor", "values": {},
         "fix": "Declare the switch, position or setting, or correct the name.", "stage": "input",
         "signal": "", "position": ""}]
