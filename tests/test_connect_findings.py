"""The connect family whole: every finding's level, place, text and numbers.

Plans are the shipped examples edited a line or two at a time. DC figures are worked out here from
the built-in profiles (typical, from memory): the audio amplifier's output sits at half its supply
(9 V / 2 = 4.5 V on the portable's battery rail); a pin a profile biases at a stated voltage sits
there.
"""

from __future__ import annotations

import pytest
from conftest import EXAMPLES, check, edited, facts, line_of, of

from speccheck import configs
from speccheck.config import Settings
from speccheck.units import fmt

PORTABLE = EXAMPLES / "portable-9v-battery.yaml"
BENCH = EXAMPLES / "bench-demod-selector.yaml"
MAINS = EXAMPLES / "mains-bench-unit.yaml"
CLEAN = EXAMPLES / "vhf-monitor-455k.yaml"

ONE_FIX = "Correct the net's name where it is misspelt, or add the part that connects to it."
FLOAT_FIX = "Correct the net names that should join the group to the rest of the circuit."
DC_FIX = ("Put a coupling capacitor (1 µF to 10 µF for audio) in series between the DC-carrying output and "
          "the pot or input.")
CAP_FIX = ("Give each signal its `switches:` positions and `upstream:` setting, so that only the "
           "combinations it is received in are checked.")
HALF = 9.0 / 2  # V: the amplifier's output at half its 9 V supply (its profile: dc half-supply)
HALF_WHY = f"pin out of U2 sits at half its supply ({HALF:g} V of {9.0:g} V)"


def v1() -> str:
    return (EXAMPLES.parent / "tests" / "data" / "v1" / "vhf-monitor-455k.yaml").read_text("utf-8")


def portable() -> str:
    return PORTABLE.read_text("utf-8")


def with_parts(text: str, lines: str) -> str:
    """The plan with more parts, listed before C21 (in no stage)."""
    return edited(text, "  C21: {kind", lines + "  C21: {kind")


def part_at(text: str, ref: str, field: str = "") -> dict:
    """Where a flow-mapping part `  REF: {...}` sits: its mapping, or one field's value in it."""
    needle = f"  {ref}: {{"
    if needle not in text:  # a block mapping: it starts at its first key, on the next line
        return {"line": line_of(text, f"  {ref}:") + 1, "col": 5, "path": f"parts.{ref}"}
    line = text.splitlines()[line_of(text, needle) - 1]
    if not field:
        return {"line": line_of(text, needle), "col": line.index("{") + 1, "path": f"parts.{ref}"}
    return {"line": line_of(text, needle), "col": line.index(f"{field}: ") + len(field) + 3,
            "path": f"parts.{ref}.{field}"}


def one(text: str, net: str, ref: str, names: str, stage: str) -> dict:
    return {"rule": "connect.single-connection", "level": "warning", **part_at(text, ref),
            "message": f"Net {net} reaches only {ref} ({names}): nothing else connects to it",
            "values": {"net": (net, "")}, "fix": ONE_FIX, "stage": stage, "signal": "", "position": ""}


def singles(text: str, file: str = "portable.yaml") -> list:
    return [facts(f) for f in of(check(text, file), "connect.single-connection")]


# ---- connect.single-connection --------------------------------------------------------------------

def test_a_misspelt_net_names_both_halves_with_their_stage():
    text = edited(portable(), "ends: [ZOBEL, GND]}", "ends: [ZOBLE, GND]}")
    # R21 and C21 are the audio-amp stage's output network
    assert singles(text) == [one(text, "ZOBEL", "R21", "end2", "audio-amp"),
                             one(text, "ZOBLE", "C21", "end1", "audio-amp")]


RHEOSTAT = "  RV9: {kind: potentiometer, value: 10 kohm, ends: [V6, TRIM], wiper: TRIM}\n"


def test_a_part_in_no_stage_is_under_parts_and_each_terminal_is_named():
    text = with_parts(portable(), RHEOSTAT.replace("wiper: TRIM", "wiper: TRIM2"))
    assert singles(text) == [one(text, "TRIM", "RV9", "end2", "parts"),
                             one(text, "TRIM2", "RV9", "wiper", "parts")]


DANGLE = "  R98: {kind: resistor, value: 1 kohm, ends: [V6, DANGLE]}\n"  # a single net, listed late


def test_a_net_two_terminals_of_one_part_share_is_not_single():
    # a pot wired as a variable resistor: its end and its wiper on the same net TRIM; the nets after it
    # are still looked at
    text = with_parts(portable(), RHEOSTAT + DANGLE)
    assert singles(text) == [one(text, "DANGLE", "R98", "end2", "parts")]


def test_an_unused_throw_of_a_selector_is_left_open_on_purpose():
    text = edited(portable(), "b: {common: DAMP, throws: {wide: U1.quad}}",
                  "b: {common: DAMP, throws: {wide: U1.quad, narrow: NC_B}}")
    text = with_parts(text, DANGLE)  # after S1 in the plan: still looked at
    assert singles(text) == [one(text, "DANGLE", "R98", "end2", "parts")]


def test_a_v1_plan_keeps_its_old_results():
    text = edited(v1(), "ends: [ZOBEL, GND]}", "ends: [ZOBLE, GND]}")
    result = check(text, "v1.yaml")
    assert [f.rule for f in result.findings if f.rule.startswith("input.")] == []  # so the rules ran
    assert [f for f in result.findings if f.rule.startswith("connect.")] == []


def test_a_source_net_on_no_part_is_named_where_it_is_given():
    text = edited(portable(), "\nsource:\n", "\nsource:\n  net: IF_JACK\n")
    line = line_of(text, "  net: IF_JACK")
    assert singles(text) == [
        {"rule": "connect.single-connection", "level": "warning", "line": line, "col": 8,
         "path": "source.net",
         "message": "source.net IF_JACK is on no part: nothing takes the source's signal",
         "values": {"net": ("IF_JACK", "")}, "fix": ONE_FIX, "stage": "input", "signal": "", "position": ""},
        one(text, "IF_IN", "L1", "end1", "input-match"),  # IF_IN, no input now, is L1's alone
    ]
    named = edited(portable(), "\nsource:\n", "\nsource:\n  net: IF_IN\n")  # L1's input end: a connection
    assert singles(named) == []


# the nets that meet the world outside the plan are not single: each way in, alone

def test_the_tap_net_meets_the_tap_load():
    text = edited(portable(), "    net: U1.audio\n    series: R15\n    coupling: C15\n", "    net: TAP_OUT\n")
    text = with_parts(text, "  R16: {kind: resistor, value: 1 kohm, ends: [U1.audio, TAP_OUT]}\n")
    assert singles(text) == []


def test_the_speaker_line_meets_the_speaker():
    # C20 (the stage's coupling) onto SPKC, the speaker SPK1 (its load) on SPK: each alone on its net
    text = edited(portable(), "ends: [U2.out, SPK], positive: U2.out",
                  "ends: [U2.out, SPKC], positive: U2.out")
    assert singles(text) == []


def test_a_series_reverse_protection_diode_meets_the_battery():
    text = edited(portable(), '  D1: {kind: diode, ends: [GND, V9], positive: GND, note: "shunt diode behind '
                              'the fuse, cathode on V9"}',
                  "  D1: {kind: diode, ends: [BAT_IN, BAT_PLUS], positive: BAT_IN}")
    assert singles(text) == []


def test_a_series_resistor_meets_the_battery():
    text = edited(portable(), "  reverse_protection: D1\n",
                  "  reverse_protection: D1\n  series_resistor: R0\n")
    text = edited(text, "ends: [BAT_PLUS, V9]}", "ends: [BAT_MID, V9]}")
    text = with_parts(text, "  R0: {kind: resistor, value: 1 ohm, ends: [BAT_PLUS, BAT_MID]}\n")
    assert singles(text) == []


def mains() -> str:
    return MAINS.read_text("utf-8")


@pytest.mark.parametrize("cut", [(), ("    switch: S1\n",), ("    line_net: L\n",),
                                 ("    transformer: T1\n",), ("    neutral_net: N\n",)])
def test_the_mains_conductors_meet_the_mains_by_any_one_of_their_names(cut):
    # L is held by line_net and by the mains switch S1; N by neutral_net and by the transformer T1
    text = mains()
    for line in cut:
        text = edited(text, line, "")
    assert singles(text, "mains.yaml") == []


def test_the_mains_conductors_named_nowhere_are_single():
    text = mains()
    for line in ("    switch: S1\n", "    line_net: L\n", "    transformer: T1\n", "    neutral_net: N\n"):
        text = edited(text, line, "")
    assert singles(text, "mains.yaml") == [one(text, "L", "S1", "end1", "parts"),
                                           one(text, "N", "T1", "primary2", "parts")]


def test_a_primary_fuse_meets_the_mains():
    # the line through a primary fuse FP ahead of the switch: L is then on FP alone
    text = edited(mains(), "    switch: S1\n", "    switch: S1\n    primary_fuse: FP\n")
    text = edited(text, "  S1: {kind: switch, ends: [L, L_SW]", "  S1: {kind: switch, ends: [L_F, L_SW]")
    text = edited(text, "  # mains side\n",
                  "  # mains side\n"
                  "  FP: {kind: fuse, current_rating: 100 mA, speed: time-lag, ends: [L, L_F]}\n")
    assert singles(text, "mains.yaml") == []
    cut = edited(text, "    line_net: L\n", "")
    assert singles(cut, "mains.yaml") == []
    cut = edited(cut, "    primary_fuse: FP\n", "")
    assert singles(cut, "mains.yaml") == [one(cut, "L", "FP", "end1", "parts")]


# ---- connect.unreachable ------------------------------------------------------------------------

def floats(text: str, names: str, first: str, many: bool) -> dict:
    verb = "connect" if many else "connects"
    return {"rule": "connect.unreachable", "level": "warning", **part_at(text, first),
            "message": f"{names} {verb} to no rail, device pin or declared node: "
                       f"{'they float' if many else 'it floats'}",
            "values": {"parts": (names, "")}, "fix": FLOAT_FIX, "stage": "parts", "signal": "",
            "position": ""}


def islands(text: str) -> list:
    return [facts(f) for f in of(check(text, "portable.yaml"), "connect.unreachable")]


def test_one_floating_part():
    text = with_parts(portable(), "  R98: {kind: resistor, value: 1 kohm, ends: [ISL_A, ISL_B]}\n")
    assert islands(text) == [floats(text, "R98", "R98", many=False)]


def test_a_floating_group_is_named_at_its_first_part():
    text = with_parts(portable(), "  R98: {kind: resistor, value: 1 kohm, ends: [ISL_A, ISL_B]}\n"
                                  "  R99: {kind: resistor, value: 1 kohm, ends: [ISL_B, ISL_C]}\n"
                                  "  R97: {kind: resistor, value: 1 kohm, ends: [ISL_C, ISL_A]}\n")
    assert islands(text) == [floats(text, "R98, R99, R97", "R98", many=True)]


def test_parts_reached_through_other_parts_do_not_float():
    # a chain from the rail V6: R98 to ISL_A, R99 on to ISL_B, R97 on to ISL_C (three steps out)
    text = with_parts(portable(), "  R98: {kind: resistor, value: 1 kohm, ends: [V6, ISL_A]}\n"
                                  "  R99: {kind: resistor, value: 1 kohm, ends: [ISL_A, ISL_B]}\n"
                                  "  R97: {kind: resistor, value: 1 kohm, ends: [ISL_B, ISL_C]}\n")
    assert islands(text) == []


def test_parts_that_meet_the_outside_do_not_float():
    # two capacitors from the supply input (BAT_PLUS, the fuse's far end, outside) to a net of their own
    text = with_parts(portable(), "  C98: {kind: capacitor, value: 10 nF, ends: [BAT_PLUS, ISL_A]}\n"
                                  "  C99: {kind: capacitor, value: 10 nF, ends: [ISL_A, ISL_B]}\n")
    assert islands(text) == []


def test_a_v1_plan_has_no_floating_finding():
    text = with_parts(v1(), "  R98: {kind: resistor, value: 1 kohm, ends: [ISL_A, ISL_B]}\n")
    assert [f for f in check(text, "v1.yaml").findings if f.rule.startswith(("connect.", "input."))] == []


# ---- connect.dc-unblocked ---------------------------------------------------------------------------

DECODER = (
    "profiles:\n"
    "  data-decoder:\n"
    "    class: other\n"
    "    description: a data decoder's input stage\n"
    "    quiescent_current: 1 mA\n"
    "    pins:\n"
    "      in: {role: input, needs_dc_blocked: true}\n"
    "      ref: {role: input, dc: 2 V, needs_dc_blocked: true}\n"
    "      out: {role: output, dc: 2 V}\n\n"
)


def with_decoder(text: str) -> str:
    """U9, a data decoder on V6 (profile above): its input `in` through R30 from the amplifier's output, its
    biased input `ref` (2 V, its own) to ground through R31, its output `out` at 2 V."""
    text = edited(text, "\nsignals:\n", "\n" + DECODER + "signals:\n")
    text = edited(text, "\nparts:\n", "\n  U9: {profile: data-decoder, rail: V6}\nparts:\n")
    return with_parts(text, "  R30: {kind: resistor, value: 10 kohm, ends: [U2.out, U9.in]}\n"
                            "  R31: {kind: resistor, value: 10 kohm, ends: [U9.ref, GND]}\n")


def dc_found(text: str, settings: Settings | None = None) -> list:
    return [facts(f) for f in of(check(text, "portable.yaml", settings), "connect.dc-unblocked")]


def track(text: str, ref: str, volts: float, origin: str, why: str, stage: str) -> dict:
    return {"rule": "connect.dc-unblocked", "level": "warning", **part_at(text, ref, "ends"),
            "message": f"{ref}'s track carries {fmt(volts, 'V')} DC from {origin}: {why}",
            "values": {"DC across the track": (pytest.approx(volts), "V")}, "fix": DC_FIX, "stage": stage,
            "signal": "", "position": ""}


def volume_fed(old: str = "VOL_TOP, GND") -> str:
    return edited(portable(), f"ends: [{old}], wiper: U2.in_plus", "ends: [U2.out, GND], wiper: U2.in_plus")


def test_dc_into_a_volume_pot():
    text = volume_fed()
    assert dc_found(text) == [track(text, "RV1", HALF, "U2.out", HALF_WHY, "volume")]


@pytest.mark.parametrize("least, fires", [(HALF, True), (HALF + 0.1, False)])
def test_the_threshold_setting_on_a_pot(least, fires):
    # 4.5 V across the track: reported from the threshold up, the threshold itself included
    text = volume_fed()
    settings = Settings(rule_settings={"connect.dc-unblocked": {"threshold": least}})
    expected = [track(text, "RV1", HALF, "U2.out", HALF_WHY, "volume")] if fires else []
    assert dc_found(text, settings) == expected


@pytest.mark.parametrize("ends", ["U9.out, U2.out", "U2.out, U9.out"])
def test_a_pot_between_two_outputs_names_the_higher(ends):
    # 4.5 V - 2 V (U9.out's stated bias) = 2.5 V across the track, from U2.out, the larger of the two
    text = edited(with_decoder(portable()), "ends: [VOL_TOP, GND], wiper: U2.in_plus",
                  f"ends: [{ends}], wiper: U2.in_plus")
    found = [f for f in dc_found(text) if f["path"] == "parts.RV1.ends"]
    assert found == [track(text, "RV1", HALF - 2.0, "U2.out", HALF_WHY, "volume")]


def test_pots_with_no_dc_across_them_are_passed_over():
    # RV8 and RV7 (listed before RV1) hang from ground by one end: the track carries ground's 0 V to the
    # other end, so 0 V across them; RV1 after them is still judged
    text = edited(volume_fed(), "  RV1: {kind",
                  "  RV8: {kind: potentiometer, value: 10 kohm, ends: [NOWHERE, GND], wiper: NOWHERE2}\n"
                  "  RV7: {kind: potentiometer, value: 10 kohm, ends: [GND, NOWHERE3], wiper: NOWHERE4}\n"
                  "  RV1: {kind")
    assert dc_found(text) == [track(text, "RV1", HALF, "U2.out", HALF_WHY, "volume")]


def test_a_pot_with_the_same_dc_at_both_ends_carries_none_across_its_track():
    # U2's output and its bypass pin both sit at half the supply (profile): 4.5 V - 4.5 V = 0 V
    text = with_parts(portable(), "  RV9: {kind: potentiometer, value: 10 kohm, ends: [U2.out, U2.bypass], "
                                  "wiper: W9}\n")
    assert dc_found(text) == []


def test_a_pot_in_no_stage_is_under_parts():
    text = with_parts(portable(), "  RV9: {kind: potentiometer, value: 10 kohm, ends: [U2.out, GND], "
                                  "wiper: W9}\n")
    assert dc_found(text) == [track(text, "RV9", HALF, "U2.out", HALF_WHY, "parts")]


def tap_fed(extra: str = "") -> str:
    return edited(portable(), "    net: U1.audio\n    series: R15\n    coupling: C15\n",
                  "    net: U2.out\n" + extra)


def tap_finding(text: str) -> dict:
    return {"rule": "connect.dc-unblocked", "level": "warning", "line": line_of(text, "    net: U2.out"),
            "col": 10, "path": "taps[0].net",
            "message": f"Tap data out feeds {fmt(HALF, 'V')} DC from U2.out into a load that must not see "
                       f"DC, with no coupling capacitor: {HALF_WHY}",
            "values": {"DC at the tap": (pytest.approx(HALF), "V")}, "fix": DC_FIX, "stage": "tap",
            "signal": "", "position": ""}


def test_dc_into_a_tap_that_needs_it_blocked():
    text = tap_fed()
    assert dc_found(text) == [tap_finding(text)]
    # a tap that may see DC, or one with its coupling capacitor, is fine
    assert dc_found(edited(text, "    needs_dc_blocked: true\n", "    needs_dc_blocked: false\n")) == []
    assert dc_found(tap_fed("    coupling: C15\n")) == []


@pytest.mark.parametrize("least, fires", [(HALF, True), (HALF + 0.1, False)])
def test_the_threshold_setting_on_a_tap(least, fires):
    text = tap_fed()
    settings = Settings(rule_settings={"connect.dc-unblocked": {"threshold": least}})
    assert dc_found(text, settings) == ([tap_finding(text)] if fires else [])


def pin_finding(text: str, volts: float) -> dict:
    why = f"{HALF_WHY}, reaching U9.in through R30"
    return {"rule": "connect.dc-unblocked", "level": "warning", "line": line_of(text, "  U9: {profile"),
            "col": 7, "path": "devices.U9",
            "message": f"U9.in must not be fed DC, but {fmt(volts, 'V')} reaches it: {why}",
            "values": {"DC at the pin": (pytest.approx(volts), "V")}, "fix": DC_FIX, "stage": "parts",
            "signal": "", "position": ""}


def test_dc_into_a_pin_that_needs_it_blocked():
    # U9.in gets U2.out's 4.5 V through R30; U9.ref's own stated 2 V bias is no DC fed into it
    text = with_decoder(portable())
    assert dc_found(text) == [pin_finding(text, HALF)]


@pytest.mark.parametrize("least, fires", [(HALF, True), (HALF + 0.1, False)])
def test_the_threshold_setting_on_a_pin(least, fires):
    text = with_decoder(portable())
    settings = Settings(rule_settings={"connect.dc-unblocked": {"threshold": least}})
    assert dc_found(text, settings) == ([pin_finding(text, HALF)] if fires else [])


def test_a_v1_plan_has_no_dc_finding():
    text = edited(v1(), "ends: [VOL_TOP, GND], note", "ends: [U2.out, GND], note")
    assert [f for f in check(text, "v1.yaml").findings if f.rule.startswith(("connect.", "input."))] == []


# ---- connect.configurations-capped -----------------------------------------------------------------

def many_settings() -> str:
    """The bench plan with 12 upstream settings that neither signal names, and S1 in both positions for
    each: 2 signals x 2 positions x 12 settings = 48 combinations."""
    settings = ", ".join(f"rbw-{k}: {100 + 10 * k} kHz" for k in range(12))
    text = edited(BENCH.read_text("utf-8"), "bandwidth_settings: {rbw-100k: 100 kHz, rbw-1m: 1 MHz}",
                  f"bandwidth_settings: {{{settings}}}")
    for cut in ("    upstream: rbw-100k\n", "    upstream: rbw-1m\n", "    switches: {S1: narrow}\n",
                "    switches: {S1: wide}\n"):
        text = edited(text, cut, "")
    return text


def capped(text: str, total: int, cap: int, where: dict) -> dict:
    return {"rule": "connect.configurations-capped", "level": "note", **where,
            "message": f"The plan has {total} combinations of signal, switch positions and upstream setting; "
                       f"the first {cap} in plan order were checked and the other {total - cap} were not",
            "values": {"combinations": (total, ""), "checked": (cap, "")}, "fix": CAP_FIX, "stage": "parts",
            "signal": "", "position": ""}


@pytest.mark.parametrize("cap", [47, 48])
def test_the_cap_is_reached_at_the_count_itself(monkeypatch, cap):
    text = many_settings()
    total = 2 * 2 * 12  # signals x positions x upstream settings
    monkeypatch.setattr(configs, "MAX_CONFIGURATIONS", cap)
    found = [facts(f) for f in of(check(text, "many.yaml"), "connect.configurations-capped")]
    s1 = {"line": line_of(text, "  S1:") + 1, "col": 5, "path": "parts.S1"}  # its block mapping's first key
    assert found == ([capped(text, total, cap, s1)] if total > cap else [])


def test_without_a_selector_the_note_points_at_the_upstream_settings(monkeypatch):
    # one signal, three upstream settings, no switch: 3 combinations
    text = edited(CLEAN.read_text("utf-8"),
                  "  bandwidth: 1 MHz          # the receiver's first IF bandwidth ahead of the tap\n",
                  "  bandwidth_settings: {a: 1 MHz, b: 2 MHz, c: 3 MHz}\n")
    monkeypatch.setattr(configs, "MAX_CONFIGURATIONS", 2)
    line = line_of(text, "  bandwidth_settings:")
    where = {"line": line, "col": len("  bandwidth_settings: ") + 1, "path": "source.bandwidth_settings"}
    found = [facts(f) for f in of(check(text, "clean.yaml"), "connect.configurations-capped")]
    assert found == [capped(text, 3, 2, where)]


def test_a_plan_that_is_not_switched_has_no_count(monkeypatch):
    monkeypatch.setattr(configs, "MAX_CONFIGURATIONS", 0)
    assert of(check(CLEAN.read_text("utf-8"), "clean.yaml"), "connect.configurations-capped") == []


# ---- where the source's signal enters, when source.net is not given ----------------------------------

def test_the_first_stages_parts_hold_the_input():
    # R1 and R2 ahead of L1 in the first stage: IF_IN is two parts away from U1's input pin, so only the
    # first stage's own parts make it an input
    text = edited(portable(), "    ends: [IF_IN, U1.mixer_in]", "    ends: [IF_A, U1.mixer_in]")
    text = edited(text, "  C1: {kind", "  R1: {kind: resistor, value: 10 ohm, ends: [IF_IN, IF_B]}\n"
                                       "  R2: {kind: resistor, value: 10 ohm, ends: [IF_B, IF_A]}\n"
                                       "  C1: {kind")
    text = edited(text, "    parts: [L1, C1]\n", "    parts: [R1, R2, L1, C1]\n")
    assert singles(text) == []


def test_the_first_devices_input_pin_holds_the_input():
    # no input-match stage: the first stage is the conversion, with no parts; L1 on U1's input pin
    # (mixer_in, its only pin of role input) brings IF_IN in
    text = edited(portable(), "  - stage: input-match\n    topology: series-l-shunt-c\n    parts: [L1, C1]\n"
                              "    device: U1\n", "")
    assert singles(text) == []


def test_only_the_first_stage_holds_the_input():
    # a part listed in the second stage with a net of its own is single like any other
    text = edited(portable(), "    if_frequency: 455 kHz\n", "    if_frequency: 455 kHz\n    parts: [R98]\n")
    text = with_parts(text, "  R98: {kind: resistor, value: 1 kohm, ends: [U1.osc_emitter, DANGLE]}\n")
    assert singles(text) == [one(text, "DANGLE", "R98", "end2", "conversion")]


def test_a_rail_or_a_declared_node_with_one_part_is_not_single():
    rails = "  V9B: {voltage: 9 V, from: supply}\n  GND: {voltage: 0 V}\n\nnodes:\n  SQ_REF: {dc: 0.3 V}\n"
    text = edited(portable(), "  GND: {voltage: 0 V}\n", rails)
    text = with_parts(text, "  C98: {kind: capacitor, value: 100 nF, ends: [V9B, DANGLE1]}\n"
                            "  C99: {kind: capacitor, value: 100 nF, ends: [SQ_REF, DANGLE2]}\n")
    assert singles(text) == [one(text, "DANGLE1", "C98", "end2", "parts"),
                             one(text, "DANGLE2", "C99", "end2", "parts")]


def test_the_parts_on_the_input_pin_reach_one_part_further():
    # no input-match stage; the connector's IF_IN reaches U1's input through C2 and L1: two parts away
    # from the pin, but one past L1, a part on the pin
    text = edited(portable(), "  - stage: input-match\n    topology: series-l-shunt-c\n    parts: [L1, C1]\n"
                              "    device: U1\n", "")
    text = edited(text, "ends: [IF_IN, U1.mixer_in]", "ends: [LIN, U1.mixer_in]")
    text = with_parts(text, "  C2: {kind: capacitor, value: 10 nF, ends: [IF_IN, LIN]}\n")
    assert singles(text) == []


def test_a_load_named_on_another_stage_is_no_speaker_line():
    # only the audio-amp stage's load and coupling meet the speaker; a load on the volume stage does not
    text = edited(portable(), "    parts: [RV1]\n", "    parts: [RV1]\n    load: R98\n")
    text = with_parts(text, DANGLE)
    assert singles(text) == [one(text, "DANGLE", "R98", "end2", "volume")]


BARE = """build_spec: 2
build:
  name: a bare board
  purpose: two resistors and a loose one
rails:
  V5: {voltage: 5 V}
  GND: {voltage: 0 V}
parts:
  R1: {kind: resistor, value: 1 kohm, ends: [V5, MID]}
  R2: {kind: resistor, value: 1 kohm, ends: [MID, GND]}
  R3: {kind: resistor, value: 1 kohm, ends: [MID, LOOSE]}
"""


def test_a_plan_with_no_supply_no_source_and_no_chain():
    # nothing meets the outside: only LOOSE is single, and no rule trips over the missing sections
    result = check(BARE, "bare.yaml")
    assert [f for f in result.findings if f.stage == "internal"] == []
    found = [facts(f) for f in of(result, "connect.single-connection")]
    assert found == [one(BARE, "LOOSE", "R3", "end2", "parts")]
    assert of(result, "connect.unreachable") == []


def test_a_part_between_two_device_pins_does_not_float():
    # U1's filter pins hold nothing else: R98 reaches device pins, nothing outside the plan, and no rail
    text = with_parts(portable(), "  R98: {kind: resistor, value: 1 kohm, "
                                  "ends: [U1.filter_in, U1.filter_out]}\n")
    assert islands(text) == []


def test_a_pot_across_a_declared_node_is_on_purpose():
    # a threshold control across a declared 0.3 V node: no output feeds the track
    rails = "  GND: {voltage: 0 V}\n\nnodes:\n  SQ_REF: {dc: 0.3 V}\n"
    text = edited(portable(), "  GND: {voltage: 0 V}\n", rails)
    text = with_parts(text, "  RV9: {kind: potentiometer, value: 10 kohm, ends: [SQ_REF, GND], wiper: W9}\n")
    result = check(text, "portable.yaml")
    assert [f for f in result.findings if f.rule.startswith("input.")] == []  # so the rules ran
    assert of(result, "connect.dc-unblocked") == []
