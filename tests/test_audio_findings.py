"""The audio family's findings asserted whole (rule, level, place, text, numbers, fix, stage) on a plan
with two amplifier stages, so that a loop over stages which stops at the first one shows.

Sources of the expected numbers (each also named beside its check):
- RC corner f = 1/(2π·R·C) (first-order RC: circuit theory);
- first-order high-pass loss at f below the corner f_c: 10·log10(1 + (f_c/f)²) dB (circuit theory);
- class-B full sine output on one supply with a coupling capacitor: ((V_s − V_sat)/2)²/(2·R_L),
  bridge-tied load (V_s − V_sat)²/(2·R_L) (Boylestad & Nashelsky, Electronic Devices and Circuit Theory,
  ch. 12, with the saturation loss);
- DC through a speaker at its nominal impedance: Ohm's law I = V/R, P = V²/R;
- a single-supply amplifier output idles at half its supply (common practice).
"""

from __future__ import annotations

import math

import pytest
from conftest import CLEAN, check, edited, facts, line_of, of, sheet_rows

from speccheck.config import Settings

FIX = {
    "audio.output-network": "Add about 10 ohm in series with 100 nF from the amplifier output to ground and "
                            "name them in the stage's output_network.",
    "audio.coupling-corner": "Use a coupling capacitor of at least 1/(2π·R_L·f_low) (the value shown), or "
                             "accept the higher corner by raising build.lowest_audio.",
    "audio.speaker-dc": "Put an electrolytic coupling capacitor (+ toward the amplifier) in series with the "
                        "speaker, or return the speaker to a net at the same DC potential.",
    "audio.input-bypass": "Fit about 470 pF to 1 nF from the amplifier input pin to ground, close to the "
                          "pin, and name it in the audio-amp stage's input_bypass.",
    "audio.speaker-power": "Fit a speaker rated at least the power shown, or limit the amplifier's gain or "
                           "supply.",
}

PROFILES = """
profiles:
  amp-bare:
    class: audio-power-amplifier
    description: an amplifier whose profile states neither its output network nor its topology
    pins:
      in_plus: {role: input, dc: ground}
      out: {role: audio-out, dc: half-supply}
      vs: {role: supply, dc: supply}
      gnd: {role: ground, dc: ground}
  amp-lv-required:
    class: audio-power-amplifier
    description: the low-voltage amplifier class, with a profile that requires the output network
    output_topology: single-ended
    output_network: required
    saturation: 3 V
    pins:
      in_plus: {role: input, dc: ground}
      out: {role: audio-out, dc: half-supply}
      bypass: {role: bypass, dc: half-supply}
      vs: {role: supply, dc: supply}
      gnd: {role: ground, dc: ground}
  amp-bridge:
    class: audio-power-amplifier
    description: bridge-tied output, two outputs idling at the same DC
    output_topology: bridge
    output_network: required
    saturation: 2 V
    pins:
      in_plus: {role: input, dc: ground}
      out_a: {role: audio-out, dc: half-supply}
      out_b: {role: audio-out, dc: half-supply}
      vs: {role: supply, dc: supply}
      gnd: {role: ground, dc: ground}
"""

# The shipped clean plan plus a second amplifier stage "monitor" (U4 into a 16 ohm speaker). The
# fuse is raised so that the second amplifier's supply current draws no power finding.
SECOND_PARTS = (
    "  # second amplifier: a monitor speaker\n"
    "  C42: {kind: capacitor, value: 1 nF, dielectric: ceramic, ends: [U4.in_plus, GND]}\n"
    "  C40: {kind: capacitor, value: 220 uF, dielectric: electrolytic, voltage_rating: 25 V, "
    "ends: [U4.out, SPK_B], positive: U4.out}\n"
    "  R41: {kind: resistor, value: 4.7 ohm, ends: [U4.out, ZOBEL_B]}\n"
    "  C41: {kind: capacitor, value: 47 nF, dielectric: film, ends: [ZOBEL_B, GND]}\n"
    "  SPK2: {kind: speaker, value: 16 ohm, power_rating: 2 W, ends: [SPK_B, GND]}\n"
)
SECOND_STAGE = (
    "  - stage: audio-amp\n"
    "    name: monitor\n"
    "    device: U4\n"
    "    load: SPK2\n"
    "    coupling: C40\n"
    "    output_network: {resistor: R41, capacitor: C41}\n"
    "    input_bypass: C42\n"
)


def _two() -> str:
    text = CLEAN.read_text("utf-8")
    text = edited(text, "current_rating: 500 mA", "current_rating: 1 A")
    text = edited(text, "\nrails:\n", PROFILES + "\nrails:\n")
    text = edited(text, "  U3: {profile", "  U4: {profile: audio-power-amp-lv, rail: V12}\n  U3: {profile")
    spk1 = "  SPK1: {kind: speaker, value: 8 ohm, power_rating: 3 W, ends: [SPK, GND]}\n"
    text = edited(text, spk1, spk1 + SECOND_PARTS)
    return text + SECOND_STAGE


TWO = _two()


def rc(r: float, c: float) -> float:
    """First-order RC corner 1/(2π·R·C) (circuit theory)."""
    return 1 / (2 * math.pi * r * c)


def audio(result) -> list:
    return [f for f in result.findings if f.rule.startswith("audio.")]


def found(result, rule: str) -> list[dict]:
    """A rule's findings as facts(), in file order (the engine sorts findings by place)."""
    return [facts(f) for f in of(result, rule)]


def in_order(*expected: dict) -> list[dict]:
    return sorted(expected, key=lambda e: (e["line"], e["col"]))


def col_of(text: str, line: int, needle: str) -> int:
    """1-based column where needle starts on a 1-based line."""
    return text.splitlines()[line - 1].index(needle) + 1


def expect(rule: str, level: str, text: str, line_needle: str, at: str, path: str, message: str,
           values: dict | None = None, stage: str = "audio-amp", fix: str | None = None,
           nth: int = 0) -> dict:
    """The facts() of a finding at the nth line holding line_needle, column where `at` starts there."""
    line = line_of(text, line_needle, nth)
    return {
        "rule": rule, "level": level, "line": line, "col": col_of(text, line, at), "path": path,
        "message": message, "values": values or {}, "fix": FIX[rule] if fix is None else fix,
        "stage": stage, "signal": "", "position": "",
    }


# ---- the two-amplifier plan itself --------------------------------------------------------------


def test_two_amplifier_plan_is_quiet_and_publishes_both_stages():
    result = check(TWO)
    assert audio(result) == []
    # coupling corners 1/(2π·R_L·C) (first-order RC): 8 ohm with 470 µF, 16 ohm with 220 µF
    assert sheet_rows(result, "audio.coupling-corner") == [
        ("audio", "audio-amp", "coupling C20 into SPK1 corner", pytest.approx(rc(8, 470e-6)), "Hz", "", ""),
        ("audio", "monitor", "coupling C40 into SPK2 corner", pytest.approx(rc(16, 220e-6)), "Hz", "", ""),
    ]
    # output networks 10 ohm + 100 nF and 4.7 ohm + 47 nF (first-order RC)
    assert sheet_rows(result, "audio.output-network") == [
        ("audio", "audio-amp", "output network R21 + C21 turnover", pytest.approx(rc(10, 100e-9)), "Hz", "",
         ""),
        ("audio", "monitor", "output network R41 + C41 turnover", pytest.approx(rc(4.7, 47e-9)), "Hz", "",
         ""),
    ]
    assert sheet_rows(result, "audio.input-bypass") == [
        ("audio", "audio-amp", "input bypass C22", pytest.approx(470e-12), "F", "", ""),
        ("audio", "monitor", "input bypass C42", pytest.approx(1e-9), "F", "", ""),
    ]
    # one 12 V supply, 3 V saturation (built-in profile, from memory): ((12 - 3)/2)² / (2·R_L)
    # (Boylestad & Nashelsky ch. 12)
    swing = "(full sine, 3 V saturation)"
    assert sheet_rows(result, "audio.speaker-power") == [
        ("audio", "audio-amp", f"most power into SPK1 {swing}", pytest.approx(4.5**2 / (2 * 8)), "W", "", ""),
        ("audio", "monitor", f"most power into SPK2 {swing}", pytest.approx(4.5**2 / (2 * 16)), "W", "", ""),
    ]


# ---- audio.output-network -------------------------------------------------------------------------

NET1 = "    output_network: {resistor: R21, capacitor: C21}\n"
NET2 = "    output_network: {resistor: R41, capacitor: C41}\n"


def in_band(text: str, r_text: str, c_text: str, r: float, c: float, shown: str, stage: str = "monitor",
            res: str = "R41", cap: str = "C41", below: str = "20 kHz") -> dict:
    turnover = rc(r, c)  # first-order RC corner
    return expect("audio.output-network", "warning", text, f"  {cap}: {{kind: capacitor", c_text,
                  f"parts.{cap}.value",
                  f"output network {res} ({r_text}) + {cap} ({c_text}) turns over at {shown}, inside the "
                  f"audio band (below {below}): {res} takes audio power",
                  {"turnover": (pytest.approx(turnover), "Hz")}, stage=stage)


def test_missing_network_on_the_first_stage_does_not_stop_the_second():
    text = edited(TWO, NET1, "")
    text = edited(text, "C41: {kind: capacitor, value: 47 nF", "C41: {kind: capacitor, value: 2.2 uF")
    # 4.7 ohm with 2.2 µF: 1/(2π·4.7·2.2 µF) = 15.39 kHz (first-order RC); frequencies shown to 1 Hz
    shown = f"{rc(4.7, 2.2e-6) / 1e3:.5g} kHz"
    assert found(check(text), "audio.output-network") == in_order(
        expect("audio.output-network", "warning", text, "- stage: audio-amp", "audio-amp", "chain[8].stage",
               "profile audio-power-amp-lv of U2 recommends a series R–C network across its output and the "
               "audio-amp stage has none: with the speaker lead's inductance the amplifier may oscillate at "
               "RF"),
        in_band(text, "4.7 ohm", "2.2 uF", 4.7, 2.2e-6, shown),
    )


@pytest.mark.parametrize(("c_text", "c", "warns"), [
    # 4.7 ohm: the 20 kHz edge sits at C = 1/(2π·4.7·20 kHz) = 1.693 µF (first-order RC)
    ("1.8 uF", 1.8e-6, True),   # 18.81 kHz, just inside the audio band
    ("1.5 uF", 1.5e-6, False),  # 22.58 kHz, just outside
])
def test_network_turnover_at_the_edge_of_the_audio_band(c_text, c, warns):
    assert (rc(4.7, c) < 20e3) is warns
    text = edited(TWO, "C41: {kind: capacitor, value: 47 nF", f"C41: {{kind: capacitor, value: {c_text}")
    got = found(check(text), "audio.output-network")
    shown = f"{rc(4.7, c) / 1e3:.5g} kHz"  # frequencies shown to 1 Hz
    assert got == ([in_band(text, "4.7 ohm", c_text, 4.7, c, shown)] if warns else [])


def test_lowest_corner_setting_moves_the_edge():
    # 10 ohm + 100 nF turns over at 159.15 kHz, 4.7 ohm + 47 nF at 720.5 kHz (first-order RC): with the
    # edge set to 200 kHz only the first is inside it
    settings = Settings(rule_settings={"audio.output-network": {"lowest_corner": 200e3}})
    got = found(check(TWO, settings=settings), "audio.output-network")
    assert got == [in_band(TWO, "10 ohm", "100 nF", 10, 100e-9, f"{rc(10, 100e-9) / 1e3:.6g} kHz",
                             stage="audio-amp", res="R21", cap="C21", below="200 kHz")]


def test_profile_without_a_network_wish_is_quiet_and_a_required_one_is_an_error():
    text = edited(TWO, NET1, "")
    text = edited(text, NET2, "")
    text = edited(text, "U2: {profile: audio-power-amp-lv", "U2: {profile: amp-bare")
    text = edited(text, "U4: {profile: audio-power-amp-lv", "U4: {profile: amp-lv-required")
    assert found(check(text), "audio.output-network") == in_order(
        expect("audio.output-network", "error", text, "- stage: audio-amp", "audio-amp", "chain[10].stage",
               "profile amp-lv-required of U4 requires a series R–C network across its output and the "
               "monitor stage has none: with the speaker lead's inductance the amplifier may oscillate at RF",
               stage="monitor", nth=1),
    )


@pytest.mark.parametrize(("first", "named"), [
    ("{resistor: C21, capacitor: R21}", "C21 (capacitor) and R21 (resistor)"),
    ("{resistor: R21, capacitor: R10}", "R21 (resistor) and R10 (resistor)"),
    ("{resistor: C22, capacitor: C21}", "C22 (capacitor) and C21 (capacitor)"),
])
def test_network_of_wrong_kinds_is_a_note_and_the_second_stage_still_checked(first, named):
    text = edited(TWO, NET1, f"    output_network: {first}\n")
    text = edited(text, "C41: {kind: capacitor, value: 47 nF, dielectric: film,",
                  "C41: {kind: capacitor, value: 47 nF, dielectric: electrolytic, positive: ZOBEL_B,")
    assert found(check(text), "audio.output-network") == in_order(
        expect("audio.output-network", "note", text, f"output_network: {first}", "{",
               "chain[8].output_network",
               f"output_network of audio-amp names {named}; expected a resistor and a capacitor", fix=""),
        expect("audio.output-network", "warning", text, "  C41: {kind: capacitor", "electrolytic",
               "parts.C41.dielectric",
               "C41 in the output network is electrolytic: the network carries RF and audio both ways; use a "
               "film or ceramic capacitor", stage="monitor"),
    )


R41 = "R41: {kind: resistor, value: 4.7 ohm, ends: [U4.out, ZOBEL_B]}"
C41 = "C41: {kind: capacitor, value: 47 nF, dielectric: film, ends: [ZOBEL_B, GND]}"


@pytest.mark.parametrize(("r_ends", "c_ends"), [
    ("U4.out, ZOBEL_B", "ZOBEL_B, NOWHERE"),    # the far end of C41 is neither ground nor an output
    ("U4.out, ZOBEL_B", "ZOBEL_B, V12"),        # the supply rail is no ground for this rule
    ("U4.out, ZOBEL_B", "U4.out, ZOBEL_B"),     # in parallel: two nets shared, no middle node
    ("U4.out, ZOBEL_B", "ZOBEL_C, GND"),        # no net shared at all
    ("U4.in_plus, ZOBEL_B", "ZOBEL_B, GND"),    # across the input, not the output
    ("GND, ZOBEL_B", "ZOBEL_B, GND"),           # from ground back to ground
])
def test_network_not_a_series_rc_from_the_output(r_ends, c_ends):
    text = edited(TWO, R41, R41.replace("U4.out, ZOBEL_B", r_ends))
    text = edited(text, C41, C41.replace("ZOBEL_B, GND", c_ends))
    assert found(check(text), "audio.output-network") == in_order(
        expect("audio.output-network", "warning", text, "  R41: {kind: resistor", f"[{r_ends}]",
               "parts.R41.ends",
               f"R41 and C41 do not form a series R–C from U4's output to ground (R41: {r_ends}; "
               f"C41: {c_ends})",
               stage="monitor"),
    )


@pytest.mark.parametrize(("r_ends", "c_ends"), [
    ("SPK_B, ZOBEL_B", "ZOBEL_B, GND"),       # on the speaker side of the coupling capacitor
    ("U4.out, ZOBEL_B", "ZOBEL_B, SPK_B"),    # across the coupling capacitor: both far ends are outputs
    ("ZOBEL_B, GND", "U4.out, ZOBEL_B"),      # capacitor first from the output
])
def test_network_wired_as_a_series_rc_is_quiet(r_ends, c_ends):
    text = edited(TWO, R41, R41.replace("U4.out, ZOBEL_B", r_ends))
    text = edited(text, C41, C41.replace("ZOBEL_B, GND", c_ends))
    assert of(check(text), "audio.output-network") == []


def bridged(rating: str = "2 W") -> str:
    """The monitor stage as a bridge-tied amplifier: SPK2 straight across its two outputs (no coupling
    capacitor), the network across the two outputs."""
    text = edited(TWO, "U4: {profile: audio-power-amp-lv", "U4: {profile: amp-bridge")
    text = edited(text, "ends: [U4.out, SPK_B], positive: U4.out}",
                  "ends: [U4.out_a, SPK_B], positive: U4.out_a}")
    text = edited(text, "    coupling: C40\n", "")
    text = edited(text, R41, R41.replace("U4.out, ZOBEL_B", "U4.out_a, ZOBEL_B"))
    text = edited(text, C41, C41.replace("ZOBEL_B, GND", "ZOBEL_B, U4.out_b"))
    return edited(text, "power_rating: 2 W, ends: [SPK_B, GND]}",
                  f"power_rating: {rating}, ends: [U4.out_a, U4.out_b]}}")


def test_bridge_tied_output_network_across_both_outputs():
    text = bridged()
    result = check(text)
    assert of(result, "audio.output-network") == []
    assert of(result, "audio.speaker-dc") == []  # both outputs idle at half the supply
    assert of(result, "audio.coupling-corner") == []  # no coupling capacitor to check
    # bridge-tied: (V_s - V_sat)² / (2·R_L) = (12 - 2)² / 32 = 3.125 W (Boylestad & Nashelsky ch. 12,
    # bridge doubling the swing)
    full = (12.0 - 2.0) ** 2 / (2 * 16)
    assert found(result, "audio.speaker-power") == in_order(
        expect("audio.speaker-power", "warning", text, "  SPK2: {kind: speaker", "2 W",
               "parts.SPK2.power_rating",
               f"SPK2 is rated 2 W but U4 can deliver up to {full:.4g} W into it (bridge on 12 V): at full "
               "volume the voice coil overheats",
               {"speaker rating": (pytest.approx(2.0), "W"),
                "amplifier full output": (pytest.approx(full), "W")},
               stage="monitor"),
    )


# ---- audio.coupling-corner --------------------------------------------------------------------------

C40 = "C40: {kind: capacitor, value: 220 uF"
SMALL_C40 = "C40: {kind: capacitor, value: 22 uF"


def too_high(text: str, load: str = "SPK2", cap: str = "C40", r: float = 16.0, c: float = 22e-6,
             c_text: str = "22 uF", r_text: str = "16 ohm", lowest: float = 300.0,
             lowest_text: str = "300 Hz", stage: str = "monitor") -> dict:
    corner = rc(r, c)  # first-order RC high-pass corner 1/(2π·R_L·C)
    need = 1 / (2 * math.pi * r * lowest)  # the C that puts the corner at the lowest audio frequency
    loss = 10 * math.log10(1 + (corner / lowest) ** 2)  # first-order high-pass below its corner
    return expect("audio.coupling-corner", "warning", text, f"  {cap}: {{kind: capacitor", c_text,
                  f"parts.{cap}.value",
                  f"{cap} ({c_text}) into {load} ({r_text}) turns over at {corner:.4g} Hz, above the build's "
                  f"lowest audio frequency of {lowest_text}: {loss:.1f} dB down there; {need * 1e6:.4g} µF "
                  "or more keeps it",
                  {"corner": (pytest.approx(corner), "Hz"), "lowest audio": (pytest.approx(lowest), "Hz"),
                   "loss there": (pytest.approx(loss), "dB"),
                   "capacitance needed": (pytest.approx(need), "F")},
                  stage=stage)


@pytest.mark.parametrize(("old", "new"), [
    ("    coupling: C20\n", ""),                                    # no coupling capacitor named
    ("    coupling: C20\n", "    coupling: R21\n"),                 # a resistor named as one
    ("    load: SPK1\n", ""),                                       # no load named
    ("    load: SPK1\n", "    load: C21\n"),                        # a capacitor named as the load
    ("C20: {kind: capacitor, value: 470 uF, ", "C20: {kind: capacitor, "),         # no value
    ("SPK1: {kind: speaker, value: 8 ohm, ", "SPK1: {kind: speaker, "),            # no impedance
])
def test_first_stage_unchecked_second_stage_corner_too_high(old, new):
    text = edited(edited(TWO, old, new), C40, SMALL_C40)
    result = check(text)
    # 16 ohm with 22 µF: 452.1 Hz, above 300 Hz (first-order RC); no other audio rule trips on the edit
    assert [facts(f) for f in audio(result)] == [too_high(text)]
    assert [row[:3] for row in sheet_rows(result, "audio.coupling-corner")] == [
        ("audio", "monitor", "coupling C40 into SPK2 corner")]


def test_dummy_load_resistor_counts_as_the_load():
    text = edited(TWO, "  SPK2: {kind: speaker, value: 16 ohm, power_rating: 2 W, ends: [SPK_B, GND]}\n",
                  "  RL2: {kind: resistor, value: 16 ohm, power_rating: 5 W, ends: [SPK_B, GND]}\n")
    text = edited(edited(text, "    load: SPK2\n", "    load: RL2\n"), C40, SMALL_C40)
    assert found(check(text), "audio.coupling-corner") == [too_high(text, load="RL2")]


@pytest.mark.parametrize("factor", [1.001, 0.999])
def test_second_stage_corner_at_the_lowest_audio_frequency(factor):
    # 16 ohm with 220 µF turns over at 1/(2π·16·220 µF) = 45.21 Hz (first-order RC); the first stage's
    # 42.33 Hz stays below both
    corner = rc(16, 220e-6)
    lowest = f"{corner * factor:.4f} Hz"
    text = edited(TWO, "  lowest_audio: 300 Hz\n", f"  lowest_audio: {lowest}\n")
    got = found(check(text), "audio.coupling-corner")
    if factor > 1:
        assert got == []
    else:
        assert got == [too_high(text, c=220e-6, c_text="220 uF", lowest=float(lowest.split()[0]),
                                lowest_text=lowest)]


def unstated(text: str, corner: float, cap: str, stage: str) -> dict:
    return expect("audio.coupling-corner", "note", text, "  name: VHF monitor", "name:", "build",
                  f"build.lowest_audio is not stated: the {corner:.4g} Hz corner of {cap} is not checked",
                  stage=stage,
                  fix="State 'lowest_audio:' under build (300 Hz for voice, 50 Hz or lower for music).")


def test_unstated_lowest_audio_is_one_note_naming_the_first_stage():
    text = edited(TWO, "  lowest_audio: 300 Hz\n", "")
    result = check(text)
    # 8 ohm with 470 µF: 42.33 Hz (first-order RC)
    assert found(result, "audio.coupling-corner") == [unstated(text, rc(8, 470e-6), "C20", "audio-amp")]
    assert len(sheet_rows(result, "audio.coupling-corner")) == 2


def test_unstated_lowest_audio_names_the_first_stage_it_could_compute():
    text = edited(edited(TWO, "  lowest_audio: 300 Hz\n", ""), "    coupling: C20\n", "")
    # 16 ohm with 220 µF: 45.21 Hz (first-order RC)
    assert found(check(text), "audio.coupling-corner") == [unstated(text, rc(16, 220e-6), "C40", "monitor")]


# ---- parts with no ends or no value --------------------------------------------------------------


def test_network_resistor_with_no_ends():
    text = edited(TWO, R41, "R41: {kind: resistor, value: 4.7 ohm}")
    assert found(check(text), "audio.output-network") == [
        # with no ends given the finding points at the part itself: its mapping opens at "{"
        expect("audio.output-network", "warning", text, "  R41: {kind: resistor", "{", "parts.R41",
               "R41 and C41 do not form a series R–C from U4's output to ground (R41: no ends; C41: ZOBEL_B, "
               "GND)", stage="monitor"),
    ]


def test_network_part_without_a_value_gives_no_turnover():
    text = edited(TWO, R41, R41.replace("value: 4.7 ohm, ", ""))
    result = check(text)
    assert audio(result) == []
    assert [row[1] for row in sheet_rows(result, "audio.output-network")] == ["audio-amp"]


def test_network_capacitor_with_no_ends():
    text = edited(TWO, C41, "C41: {kind: capacitor, value: 47 nF, dielectric: film}")
    assert found(check(text), "audio.output-network") == [
        expect("audio.output-network", "warning", text, "  R41: {kind: resistor", "[U4.out", "parts.R41.ends",
               "R41 and C41 do not form a series R–C from U4's output to ground (R41: U4.out, ZOBEL_B; "
               "C41: no ends)", stage="monitor"),
    ]
