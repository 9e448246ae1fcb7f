"""The audio family's speaker-dc, input-bypass and speaker-power findings asserted whole on the plan with
two amplifier stages of test_audio_findings.py (its helpers and sources; Ohm's law for the DC through a
speaker, Boylestad & Nashelsky ch. 12 for the full sine output, common practice for the bypass range).
"""

from __future__ import annotations

import pytest
from conftest import check, edited
from test_audio_findings import R41, TWO, expect, found, in_order

from speccheck.config import Settings

# ---- audio.speaker-dc -------------------------------------------------------------------------------

SPK2 = "SPK2: {kind: speaker, value: 16 ohm, power_rating: 2 W, ends: [SPK_B, GND]}"


def dc_finding(text: str, spk: str, net: str, volts: float, why: str, ohms: float | None, stage: str,
               shown: tuple[str, str, str] = ("", "", "")) -> dict:
    """shown: the DC, its current and its power as the message writes them (SI prefix, 4 digits)."""
    values = {net: (pytest.approx(volts), "V"), "GND": (pytest.approx(0.0), "V"),
              "DC across": (pytest.approx(volts), "V")}
    tail = ""
    if ohms is not None:
        amps, watts = volts / ohms, volts**2 / ohms  # Ohm's law at the nominal impedance
        values |= {"DC through the coil (at its nominal impedance)": (pytest.approx(amps), "A"),
                   "DC power": (pytest.approx(watts), "W")}
        tail = f": about {shown[1]} of DC ({shown[2]}) in the voice coil"
    return expect("audio.speaker-dc", "error", text, f"  {spk}: {{kind: speaker", "[", f"parts.{spk}.ends",
                  f"{spk} has {shown[0]} DC across it, {net} at {volts:g} V ({why}) and GND at 0 V{tail}",
                  values, stage=stage)


def test_second_speaker_straight_on_its_amplifier_output():
    text = edited(TWO, SPK2, SPK2.replace("[SPK_B, GND]", "[U4.out, GND]"))
    # a single-supply output idles at half its 12 V supply (common practice): 6 V into 16 ohm
    why = "pin out of U4 sits at half its supply (6 V of 12 V)"
    assert found(check(text), "audio.speaker-dc") == [
        # 6 V / 16 ohm = 375 mA, (6 V)² / 16 ohm = 2.25 W (Ohm's law)
        dc_finding(text, "SPK2", "U4.out", 6.0, why, 16.0, "monitor",
                   (f"{6.0:g} V", f"{6.0 / 16 * 1e3:.4g} mA", f"{6.0**2 / 16:.4g} W"))]


def test_speaker_in_no_stage_is_grouped_with_the_amplifier():
    spk3 = "  SPK3: {kind: speaker, value: 8 ohm, ends: [U4.out, GND]}\n"
    text = edited(TWO, f"  {SPK2}\n", f"  {SPK2}\n{spk3}")
    why = "pin out of U4 sits at half its supply (6 V of 12 V)"
    assert found(check(text), "audio.speaker-dc") == [
        # 6 V / 8 ohm = 750 mA, (6 V)² / 8 ohm = 4.5 W (Ohm's law)
        dc_finding(text, "SPK3", "U4.out", 6.0, why, 8.0, "audio-amp",
                   (f"{6.0:g} V", f"{6.0 / 8 * 1e3:.4g} mA", f"{6.0**2 / 8:.4g} W"))]


@pytest.mark.parametrize(("volts", "reported"), [
    ("0.1 V", False),   # at the 0.1 V threshold: counts as no DC
    ("0.12 V", True),   # just above it
])
def test_speaker_dc_threshold(volts, reported):
    text = edited(TWO, "\nrails:\n", f"\nnodes:\n  SPK_B: {{dc: {volts}}}\n\nrails:\n")
    got = found(check(text), "audio.speaker-dc")
    v = float(volts.split()[0])
    why = f"SPK_B is declared at {volts}"
    # 0.12 V / 16 ohm = 7.5 mA, (0.12 V)² / 16 ohm = 900 µW (Ohm's law)
    shown = (f"{v * 1e3:.4g} mV", f"{v / 16 * 1e3:.4g} mA", f"{v**2 / 16 * 1e6:.4g} µW")
    assert got == ([dc_finding(text, "SPK2", "SPK_B", v, why, 16.0, "monitor", shown)] if reported else [])


def test_speaker_without_impedance_gets_no_current_figures():
    text = edited(TWO, SPK2, "SPK2: {kind: speaker, power_rating: 2 W, ends: [U4.out, GND]}")
    why = "pin out of U4 sits at half its supply (6 V of 12 V)"
    assert found(check(text), "audio.speaker-dc") == [
        dc_finding(text, "SPK2", "U4.out", 6.0, why, None, "monitor", (f"{6.0:g} V", "", ""))]


# ---- audio.input-bypass -----------------------------------------------------------------------------

C42 = "C42: {kind: capacitor, value: 1 nF, dielectric: ceramic, ends: [U4.in_plus, GND]}"


def out_of_range(text: str, c_text: str, c: float, why: str) -> dict:
    return expect("audio.input-bypass", "warning", text, "  C42: {kind: capacitor", c_text, "parts.C42.value",
                  f"input_bypass C42 is {c_text}: outside 100 pF to 10 nF, {why}",
                  {"bypass": (pytest.approx(c), "F")}, stage="monitor")


def test_missing_bypass_on_the_first_stage_does_not_stop_the_second():
    text = edited(edited(TWO, "    input_bypass: C22\n", ""), C42, C42.replace("1 nF", "47 nF"))
    assert found(check(text), "audio.input-bypass") == in_order(
        expect("audio.input-bypass", "warning", text, "- stage: audio-amp", "audio-amp", "chain[8].stage",
               "the audio-amp stage names no input_bypass: nothing keeps RF out of U2's input"),
        out_of_range(text, "47 nF", 47e-9, "large enough to cut the treble"),
    )


@pytest.mark.parametrize(("old", "new", "named", "said"), [
    ("    input_bypass: C22\n", "    input_bypass: R21\n", "R21", "R21 is a resistor"),
    ("C22: {kind: capacitor, value: 470 pF, ", "C22: {kind: capacitor, ", "C22",
     "C22 is a capacitor with no value"),
])
def test_bypass_that_is_no_capacitor_is_a_note(old, new, named, said):
    text = edited(edited(TWO, old, new), C42, C42.replace("1 nF", "47 pF"))
    assert found(check(text), "audio.input-bypass") == in_order(
        expect("audio.input-bypass", "note", text, f"    input_bypass: {named}", named,
               "chain[8].input_bypass",
               f"input_bypass {said}; an RF bypass is a small capacitor", fix=""),
        out_of_range(text, "47 pF", 47e-12, "too small to short the RF"),
    )


@pytest.mark.parametrize("ends", ["U4.out, GND", "U4.in_plus, NOWHERE"])
def test_bypass_not_from_an_input_to_ground(ends):
    text = edited(TWO, C42, C42.replace("U4.in_plus, GND", ends))
    assert found(check(text), "audio.input-bypass") == [
        expect("audio.input-bypass", "note", text, "  C42: {kind: capacitor", f"[{ends}]", "parts.C42.ends",
               f"input_bypass C42 does not sit between an input pin of U4 and ground (its ends: {ends})",
               stage="monitor", fix=""),
    ]


@pytest.mark.parametrize(("c_text", "c", "why"), [
    ("100 pF", 100e-12, None),    # the smallest bypass the rule takes (common practice)
    ("99 pF", 99e-12, "too small to short the RF"),
    ("10 nF", 10e-9, None),       # the largest (common practice)
    ("10.1 nF", 10.1e-9, "large enough to cut the treble"),
])
def test_bypass_range_edges(c_text, c, why):
    text = edited(TWO, C42, C42.replace("1 nF", c_text))
    got = found(check(text), "audio.input-bypass")
    assert got == ([] if why is None else [out_of_range(text, c_text, c, why)])


def test_bypass_range_follows_the_settings():
    settings = Settings(rule_settings={"audio.input-bypass": {"smallest": 500e-12, "largest": 2e-9}})
    text = TWO
    # 470 pF is below 500 pF; 1 nF is inside 500 pF to 2 nF
    assert found(check(text, settings=settings), "audio.input-bypass") == [
        expect("audio.input-bypass", "warning", text, "  C22: {kind: capacitor", "470 pF", "parts.C22.value",
               "input_bypass C22 is 470 pF: outside 500 pF to 2 nF, too small to short the RF",
               {"bypass": (pytest.approx(470e-12), "F")}),
    ]


# ---- audio.speaker-power ----------------------------------------------------------------------------


def underrated(text: str, rating: str, watts: float, full: float) -> dict:
    return expect("audio.speaker-power", "warning", text, "  SPK2: {kind: speaker", rating,
                  "parts.SPK2.power_rating",
                  f"SPK2 is rated {rating} but U4 can deliver up to {full * 1e3:.4g} mW into it "
                  "(single-ended on 12 V): at full volume the voice coil overheats",
                  {"speaker rating": (pytest.approx(watts), "W"),
                   "amplifier full output": (pytest.approx(full), "W")},
                  stage="monitor")


# one 12 V supply less 3 V saturation into 16 ohm: ((12 - 3)/2)² / (2·16) = 0.6328 W (Boylestad &
# Nashelsky ch. 12; the 3 V of the built-in profile is from memory)
FULL_16 = ((12.0 - 3.0) / 2) ** 2 / (2 * 16.0)


@pytest.mark.parametrize(("old", "new"), [
    ("value: 8 ohm, power_rating: 3 W,", "value: 8 ohm,"),              # SPK1 has no power rating
    ("U2: {profile: audio-power-amp-lv", "U2: {profile: amp-bare"),  # no topology: no full output known
    ("    load: SPK1\n", "    load: C21\n"),                          # the load is no speaker
    ("    load: SPK1\n", ""),                                          # no load named
])
def test_first_stage_unchecked_second_speaker_underrated(old, new):
    text = edited(edited(TWO, old, new), "power_rating: 2 W", "power_rating: 0.5 W")
    assert found(check(text), "audio.speaker-power") == [underrated(text, "0.5 W", 0.5, FULL_16)]


@pytest.mark.parametrize(("rating", "watts", "warns"), [
    ("0.6328125 W", 0.6328125, False),  # exactly the full output 81/128 W: not below it
    ("0.632 W", 0.632, True),
])
def test_speaker_rating_at_the_full_output(rating, watts, warns):
    assert (watts < FULL_16) is warns
    text = edited(TWO, "power_rating: 2 W", f"power_rating: {rating}")
    got = found(check(text), "audio.speaker-power")
    assert got == ([underrated(text, rating, watts, FULL_16)] if warns else [])


# ---- a stage that names no device, a part with no ends --------------------------------------------


def test_stage_without_a_device_checks_only_what_needs_none():
    # the monitor stage names no amplifier: its network's wiring, its bypass's ends and its speaker's
    # rating cannot be judged against one; the bypass value still can
    text = edited(TWO, "    device: U4\n", "")
    text = edited(text, R41, R41.replace("U4.out, ZOBEL_B", "U4.in_plus, ZOBEL_B"))
    text = edited(text, C42, C42.replace("1 nF", "47 nF").replace("U4.in_plus, GND", "U4.out, GND"))
    text = edited(text, "    input_bypass: C22\n", "")
    text = edited(text, "power_rating: 2 W", "power_rating: 0.1 W")
    result = check(text)
    assert found(result, "audio.output-network") == []
    assert found(result, "audio.speaker-power") == []
    assert found(result, "audio.input-bypass") == in_order(
        expect("audio.input-bypass", "warning", text, "- stage: audio-amp", "audio-amp", "chain[8].stage",
               "the audio-amp stage names no input_bypass: nothing keeps RF out of U2's input"),
        out_of_range(text, "47 nF", 47e-9, "large enough to cut the treble"),
    )
    no_bypass = edited(text, "    input_bypass: C42\n", "")
    assert [f["message"] for f in found(check(no_bypass), "audio.input-bypass")][-1] == (
        "the monitor stage names no input_bypass: nothing keeps RF out of the amplifier's input")
