"""The rfpath family's coil-turns, gain-ahead and max-input findings and sheet entries asserted whole,
with two devices where a rule loops over devices (listed so that a loop that stops at the first one
shows). The helpers are test_rfpath_findings.py's.

Sources of the expected numbers (each also named beside its check):
- toroid: L = AL·N², N = sqrt(L/AL) (powdered-iron toroid handbook table: 0.5 in, mix 2, 49 µH per
  100 turns);
- levels: dBm plus dB of gain, gains in dB adding along a chain (plain level arithmetic);
- about 10 dB of gain ahead of a narrowband FM IF chip: common practice (the built-in profile's limit).
"""

from __future__ import annotations

import math

import pytest
from conftest import EXAMPLES, check, edited, sheet_rows
from test_rfpath_findings import AL, CLEAN_TEXT, approx, by_place, expect, found, si

from speccheck.config import Settings

# ---- rfpath.coil-turns ----------------------------------------------------------------------------

CORE = '{size: 0.5 in, material: "powdered iron, mix 2", al: 4.9 nH/turn^2}'
L3 = f"  L3: {{kind: inductor, value: 10 uH, turns: 40, core: {CORE}, ends: [L3A, L3B]}}\n"


def with_l3(text: str = CLEAN_TEXT) -> str:
    """A cored coil L3 in no stage, listed after L2 (a coil with no core)."""
    return edited(text, "  C9: {kind: capacitor", L3 + "  C9: {kind: capacitor")


def turns_off(text: str, name: str, turns: int, value: float, value_text: str, stage: str,
              at: str) -> dict:
    got = AL * turns**2  # L = AL·N² (toroid handbook)
    need = math.sqrt(value / AL)  # N = sqrt(L/AL)
    err = got / value - 1
    return expect("rfpath.coil-turns", "warning", text, f"  {name}:" if name != "L1" else "    turns:", at,
                  f"parts.{name}.turns",
                  f"{name}: {turns} turns on its core (AL {4.9:g} nH/turn²) give {si(got, 'H')}, "
                  f"{err * 100:+.0f} % from the declared {value_text}; {need:.0f} turns would give it",
                  {"from turns": (approx(got), "H"), "declared": (approx(value), "H"),
                   "turns needed": (approx(round(need, 1)), "")}, stage=stage)


@pytest.mark.parametrize(("old", "new"), [
    ("", ""),                                          # L1 as shipped (28 turns: -1.5 %)
    ("    turns: 28\n", ""),                           # L1 with no turns stated
    ("    value: 3.9 uH\n    turns: 28\n", "    turns: 28\n"),   # L1 with no value
])
def test_cored_coil_in_no_stage_with_too_few_turns(old, new):
    text = with_l3(edited(CLEAN_TEXT, old, new) if old else CLEAN_TEXT)
    result = check(text)
    # 40 turns of 4.9 nH/turn²: 7.84 µH, 22 % short of 10 µH (L = AL·N²)
    assert found(result, "rfpath.coil-turns") == [
        turns_off(text, "L3", 40, 10e-6, "10 uH", "parts", "40")]
    rows = sheet_rows(result, "rfpath.coil-turns")
    assert rows[-2:] == [
        ("coils", "L3", "turns for the declared value", approx(round(math.sqrt(10e-6 / AL), 1)), "", "", ""),
        ("coils", "L3", "inductance of 40 turns", approx(AL * 40**2), "H", "", ""),
    ]
    first = {r[2]: r[3] for r in rows if r[1] == "L1"}
    expected = {}
    if "value" not in old:
        expected["turns for the declared value"] = approx(round(math.sqrt(3.9e-6 / AL), 1))
    if "turns" not in old or "value" in old:
        expected["inductance of 28 turns"] = approx(AL * 28**2)
    assert first == expected


@pytest.mark.parametrize(("turns", "warns"), [
    (26, True),    # 3.31 µH: -15 %
    (27, False),   # 3.57 µH: -8.4 %
    (29, False),   # 4.12 µH: +5.7 %
    (30, True),    # 4.41 µH: +13 %
])
def test_turns_against_the_default_tolerance(turns, warns):
    text = edited(CLEAN_TEXT, "    turns: 28\n", f"    turns: {turns}\n")
    expected = [turns_off(text, "L1", turns, 3.9e-6, "3.9 uH", "input-match", str(turns))] if warns else []
    assert found(check(text), "rfpath.coil-turns") == expected


@pytest.mark.parametrize(("tolerance", "warns"), [(0.084, True), (0.085, False)])
def test_turns_against_a_set_tolerance(tolerance, warns):
    # 27 turns: 4.9 nH·729 = 3.572 µH, -8.41 % from 3.9 µH (L = AL·N²)
    assert (abs(AL * 27**2 / 3.9e-6 - 1) > tolerance) is warns
    text = edited(CLEAN_TEXT, "    turns: 28\n", "    turns: 27\n")
    settings = Settings(rule_settings={"rfpath.coil-turns": {"tolerance": tolerance}})
    expected = [turns_off(text, "L1", 27, 3.9e-6, "3.9 uH", "input-match", "27")] if warns else []
    assert found(check(text, settings=settings), "rfpath.coil-turns") == expected


# ---- rfpath.gain-ahead ----------------------------------------------------------------------------

U1 = "  U1: {profile: fm-if-subsystem, rail: V6}\n"


def preamps(*gains: str, text: str = CLEAN_TEXT, u1: str = U1) -> str:
    """Preamplifier stages pre1, pre2... ahead of the input match, with U1 listed last among the devices
    (after U2 and U3, which no rfpath rule looks at), so that a loop that stops early misses it."""
    stages = "".join(f"  - stage: preamp\n    name: pre{i}\n    gain: {g}\n" for i, g in enumerate(gains, 1))
    text = edited(text, "chain:\n  - stage: input-match\n", f"chain:\n{stages}  - stage: input-match\n")
    text = edited(text, U1, "")
    return edited(text, "\nparts:\n", u1 + "\nparts:\n")


def too_much(text: str, total: float, limit: float, biggest: str, profile: str = "fm-if-subsystem",
             dev: str = "U1") -> dict:
    """At the gain of the biggest preamp, pre<n>: the chain's nth stage and nth gain line."""
    n = int(biggest[3:])
    return expect("rfpath.gain-ahead", "warning", text, "    gain: ", "gain: ", f"chain[{n - 1}].gain",
                  f"{total:g} dB of gain stands ahead of {dev} ({profile}), more than the {limit:g} dB its "
                  "mixer tolerates: intermodulation and overload",
                  {"gain ahead": (approx(total), "dB"), "limit": (approx(limit), "dB")}, stage=biggest,
                  nth=n - 1) | {"col": len("    gain: ") + 1}


def test_two_preamps_add_up_and_the_biggest_is_named():
    # and a third preamp that states no gain, which adds nothing
    text = preamps("4 dB", "7 dB")
    text = edited(text, "  - stage: input-match\n",
                  "  - stage: preamp\n    name: pre3\n  - stage: input-match\n")
    result = check(text)
    # 4 dB + 7 dB = 11 dB ahead of U1, over its profile's 10 dB (plain level arithmetic)
    assert found(result, "rfpath.gain-ahead") == [too_much(text, 11.0, 10.0, "pre2")]
    assert sheet_rows(result, "rfpath.gain-ahead") == [
        ("rf-levels", "U1", "gain ahead", approx(11.0), "dB", "", ""),
        ("rf-levels", "U1", "gain ahead allowed", approx(10.0), "dB", "", ""),
    ]


@pytest.mark.parametrize(("gain", "warns"), [("10 dB", False), ("10.5 dB", True)])
def test_gain_ahead_at_the_limit(gain, warns):
    text = preamps(gain)
    total = float(gain.split()[0])
    assert found(check(text), "rfpath.gain-ahead") == ([too_much(text, total, 10.0, "pre1")] if warns else [])


MY_IF = ("profiles:\n  my-if:\n    class: fm-if-subsystem\n    input_impedance: 1.5 kohm\n    pins:\n"
         "      mixer_in: {role: input}\n      osc_base: {role: oscillator}\n"
         "      osc_emitter: {role: oscillator-out}\n      mixer_out: {role: mixer-out}\n"
         "      limiter_in: {role: limiter-in}\n      quad: {role: quadrature}\n      audio: {role: output}\n"
         "      squelch: {role: squelch}\n\ndevices:\n")


@pytest.mark.parametrize(("limit", "warns"), [
    (None, False), (5.0, True), ("5.5", True), ("7", False), ("x", False)])
def test_if_chip_profile_without_a_limit_uses_the_setting(limit, warns):
    text = preamps("6 dB", text=edited(CLEAN_TEXT, "devices:\n", MY_IF),
                   u1="  U1: {profile: my-if, rail: V6}\n")
    settings = Settings(rule_settings={"rfpath.gain-ahead": {"default_limit": limit}} if limit else {})
    used = float(limit) if limit not in (None, "x") else 10.0  # the setting's default: 10 dB
    got = found(check(text, settings=settings), "rfpath.gain-ahead")
    assert got == ([too_much(text, 6.0, used, "pre1", "my-if")] if warns else [])
    assert sheet_rows(check(text, settings=settings), "rfpath.gain-ahead")[1][3] == approx(used)


LNA = ("profiles:\n  lna:\n    class: rf-amplifier\n    max_gain_ahead: 6 dB\n    max_input: 0 dBm\n"
       "    pins:\n      rf_in: {role: input}\n      rf_out: {role: output}\n\ndevices:\n")


def with_lna(text: str, devices: str) -> str:
    """Profile lna (an RF amplifier that states its own gain limit and maximum input) and the devices
    given, listed first."""
    return edited(edited(text, "devices:\n", LNA), "  U2: {profile", devices + "  U2: {profile")


def test_devices_not_in_the_chain_or_with_nothing_ahead_do_not_stop_the_loop():
    # U9 (an IF chip in no stage) and U8 (the first preamp's own device: nothing ahead of it) come first
    text = preamps("8 dB", "4 dB")
    text = edited(text, "    name: pre1\n", "    name: pre1\n    device: U8\n")
    text = with_lna(text, "  U9: {profile: fm-if-subsystem, rail: V6}\n  U8: {profile: lna, rail: V6}\n")
    # 8 dB + 4 dB = 12 dB ahead of U1 (plain level arithmetic), over its 10 dB
    assert found(check(text), "rfpath.gain-ahead") == [too_much(text, 12.0, 10.0, "pre1")]
    assert [r[1] for r in sheet_rows(check(text), "rfpath.gain-ahead")] == ["U1", "U1"]


def test_a_profile_limit_makes_any_class_low_intercept():
    text = preamps("8 dB", "4 dB")
    text = edited(text, "    name: pre2\n", "    name: pre2\n    device: U8\n")
    text = with_lna(text, "  U8: {profile: lna, rail: V6}\n")
    result = check(text)
    lna = too_much(text, 8.0, 6.0, "pre1", "lna", "U8")
    assert by_place(found(result, "rfpath.gain-ahead")) == by_place([lna, too_much(text, 12.0, 10.0, "pre1")])
    assert sheet_rows(result, "rfpath.gain-ahead") == [
        ("rf-levels", "U8", "gain ahead", approx(8.0), "dB", "", ""),
        ("rf-levels", "U8", "gain ahead allowed", approx(6.0), "dB", "", ""),
        ("rf-levels", "U1", "gain ahead", approx(12.0), "dB", "", ""),
        ("rf-levels", "U1", "gain ahead allowed", approx(10.0), "dB", "", ""),
    ]


# ---- rfpath.max-input -----------------------------------------------------------------------------


def over(text: str, level: float, source: str, dev: str = "U1", limit: str = "-10 dBm", gain: float = 0.0,
         stage: str = "input-match") -> dict:
    plus = f" plus {gain:g} dB gain" if gain else ""
    return expect("rfpath.max-input", "warning", text, "  level_max:", source, "source.level_max",
                  f"up to {level:g} dBm reaches {dev} (source {source}{plus}), above the {limit} its profile "
                  "allows",
                  {"highest level": (approx(level), "dBm"),
                   "max input": (approx(float(limit.split()[0])), "dBm")},
                  stage=stage)


@pytest.mark.parametrize(("source", "warns"), [("-10 dBm", False), ("-9.9 dBm", True)])
def test_source_level_at_the_chip_maximum(source, warns):
    text = edited(CLEAN_TEXT, "level_max: -30 dBm", f"level_max: {source}")
    level = float(source.split()[0])
    result = check(text)
    assert found(result, "rfpath.max-input") == ([over(text, level, source)] if warns else [])
    assert sheet_rows(result, "rfpath.max-input") == [
        ("rf-levels", "U1", "highest input level", approx(level), "dBm", "", ""),
        ("rf-levels", "U1", "maximum input (profile)", approx(-10.0), "dBm", "", ""),
    ]


def test_preamp_gain_and_two_devices_each_checked():
    # U8 (0 dBm maximum) is the second preamp's device, listed before U1: -12 dBm + 8 dB = -4 dBm reaches
    # it, within its limit; -12 dBm + 8 dB + 4 dB = 0 dBm reaches U1, above its -10 dBm (level arithmetic)
    text = preamps("8 dB", "4 dB", text=edited(CLEAN_TEXT, "level_max: -30 dBm", "level_max: -12 dBm"))
    text = edited(text, "    name: pre2\n", "    name: pre2\n    device: U8\n")
    text = with_lna(text, "  U8: {profile: lna, rail: V6}\n")
    result = check(text)
    assert found(result, "rfpath.max-input") == [over(text, 0.0, "-12 dBm", gain=12.0)]
    assert sheet_rows(result, "rfpath.max-input") == [
        ("rf-levels", "U8", "highest input level", approx(-4.0), "dBm", "", ""),
        ("rf-levels", "U8", "maximum input (profile)", approx(0.0), "dBm", "", ""),
        ("rf-levels", "U1", "highest input level", approx(0.0), "dBm", "", ""),
        ("rf-levels", "U1", "maximum input (profile)", approx(-10.0), "dBm", "", ""),
    ]


def test_unstated_source_level_is_a_note_per_device():
    text = preamps("4 dB", text=edited(CLEAN_TEXT, "  level_max: -30 dBm\n", ""))
    text = edited(text, "    name: pre1\n", "    name: pre1\n    device: U8\n")
    text = with_lna(text, "  U8: {profile: lna, rail: V6}\n")

    def unstated(dev: str, limit: str, stage: str) -> dict:
        return expect("rfpath.max-input", "note", text, "  kind: receiver-if", "kind", "source",
                      f"{dev}: source.level_max is not given, so the highest level reaching it cannot be "
                      f"checked against its {limit}", stage=stage, fix="Give source.level_max.")

    assert by_place(found(check(text), "rfpath.max-input")) == by_place(
        [unstated("U8", "0 dBm", "pre1"), unstated("U1", "-10 dBm", "input-match")])


@pytest.mark.parametrize(("stage_old", "stage_new", "kind", "checked"), [
    ("", "", "no stage", False),
    ("  - stage: conversion\n    device: U1\n", "  - stage: conversion\n    device: U7\n", "conversion",
     True),
    ("  - stage: limiter\n    device: U1\n", "  - stage: limiter\n    device: U7\n", "limiter", True),
    ("  - stage: discriminator\n    device: U1\n", "  - stage: discriminator\n    device: U7\n",
     "discriminator", False),
    ("  - stage: if-filter\n", "  - stage: if-filter\n    device: U7\n", "if-filter", True),
])
def test_where_a_device_first_sits_decides_whether_its_input_is_checked(stage_old, stage_new, kind, checked):
    # U7 (lna profile: 0 dBm maximum) on the stage named; the source delivers up to +3 dBm
    text = edited(CLEAN_TEXT, "level_max: -30 dBm", "level_max: 3 dBm")
    if stage_old:
        text = edited(text, stage_old, stage_new)
    text = with_lna(text, "  U7: {profile: lna, rail: V6}\n")
    text = edited(text, U1, "")  # U1 listed after U7, so that a loop that stops at U7 misses it
    text = edited(text, "\nparts:\n", U1 + "\nparts:\n")
    expected = [over(text, 3.0, "3 dBm")]  # +3 dBm reaches U1 too, above its -10 dBm
    if checked:
        expected.append(over(text, 3.0, "3 dBm", dev="U7", limit="0 dBm", stage=kind))
    assert by_place(found(check(text), "rfpath.max-input")) == by_place(expected)


def test_plan_without_a_source_is_a_note_at_the_device_first_stage():
    text = CLEAN_TEXT[:CLEAN_TEXT.index("source:\n")] + CLEAN_TEXT[CLEAN_TEXT.index("supply:\n"):]
    assert found(check(text), "rfpath.max-input") == [
        expect("rfpath.max-input", "note", text, "  - stage: input-match", "stage", "chain[0]",
               "U1: source.level_max is not given, so the highest level reaching it cannot be checked "
               "against its -10 dBm", fix="Give source.level_max."),
    ]


# ---- per configuration: the switched plan --------------------------------------------------------


def test_switched_plan_says_a_level_finding_once_for_every_configuration():
    # the bench demodulator runs gain-ahead and max-input once per signal, selector position and upstream
    # bandwidth; the gain and the level do not depend on any of them, so each is said once, unnamed
    text = (EXAMPLES / "bench-demod-selector.yaml").read_text("utf-8")
    text = edited(text, "level_max: -30 dBm", "level_max: -20 dBm")
    text = edited(text, "chain:\n  - stage: input-match\n",
                  "chain:\n  - stage: preamp\n    name: pre1\n    gain: 12 dB\n  - stage: input-match\n")
    result = check(text)
    # -20 dBm + 12 dB = -8 dBm, above the profile's -10 dBm; 12 dB over its 10 dB (level arithmetic)
    assert found(result, "rfpath.gain-ahead") == [too_much(text, 12.0, 10.0, "pre1")]
    assert found(result, "rfpath.max-input") == [over(text, -8.0, "-20 dBm", gain=12.0)]
    assert sheet_rows(result, "rfpath.max-input") == [
        ("rf-levels", "U1", "highest input level", approx(-8.0), "dBm", "", ""),
        ("rf-levels", "U1", "maximum input (profile)", approx(-10.0), "dBm", "", ""),
    ]
