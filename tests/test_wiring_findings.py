"""Wiring findings asserted whole: rule, level, place, exact text, values, fix and stage of every
branch of every wiring rule, each threshold just inside and just outside.

Every number expected here is derived in the test from the plan's own statements: a rail's stated
voltage, a pin bias from its built-in profile (fm-if-subsystem: osc_base, mixer_out and quad at
the supply; audio-power-amp-lv: out at half the supply), a node's declared DC, and the difference
of two potentials (the DC across a two-ended part: Kirchhoff's voltage law). The trade facts behind
the verdicts are common practice, as in tests/test_wiring.py: a quadrature pin biased through its
coil needs the coil's far end on the supply; no DC across a crystal; an electrolytic's positive
end at the higher potential; derating shares of 80 % (aluminium, film) and 50 % (tantalum).
"""

from __future__ import annotations

import pytest
from conftest import check, edited, facts, line_of, of

from speccheck.config import Settings

# the rules' own fix texts (ours, asserted exactly)
TANK_FIX = ("Return the coil's far end to the supply rail, through about 10 ohm with a 100 nF bypass to "
            "ground.")
BYPASS_FIX = "Add about 100 nF from the node between the coil and the resistor to ground."
CRYSTAL_FIX = ("Return the crystal's far end to the same potential as the pin (the bypassed supply rail), "
               "or put a series capacitor (about 1 nF) in line with it.")
UNSTATED_FIX = "Add 'positive: NET' naming the net at the higher DC potential."
REVERSED_FIX = "Swap the capacitor: its positive end goes to the net at the higher DC potential."
RATING_FIX = ("Choose a part rated well above the working voltage (the next series value above "
              "working voltage / derating share).")
NO_RATING_FIX = "State 'voltage_rating:' from the part you will fit."

L2 = "L2: {kind: inductor, value: 1 mH, adjust: {min: 0.9 mH, max: 1.1 mH}, q: 60, ends: [U1.quad, TANK_RET]}"
R6 = "R6: {kind: resistor, value: 10 ohm, ends: [TANK_RET, V6]}"
C10 = "  C10: {kind: capacitor, value: 100 nF, dielectric: ceramic, ends: [TANK_RET, GND]}\n"
GND_RAIL = "  GND: {voltage: 0 V}\n"

# the clean plan's stated potentials (its rails section and the profiles' pin biases)
V12 = 12.0  # rail V12: 12 V
V6 = 6.0  # rail V6: 6 V; U1 (fm-if-subsystem) runs from it, so its supply-biased pins sit at 6 V
AMP_OUT = V12 / 2  # U2 (audio-power-amp-lv) on V12: output at half its supply


def with_nodes(text: str, nodes: str) -> str:
    """The plan with a `nodes:` section (declared DC potentials) after the rails."""
    return edited(text, GND_RAIL, GND_RAIL + "\nnodes:\n" + nodes)


def at(text: str, needle: str, token: str, nth: int = 0) -> tuple[int, int]:
    """(line, col) of `token` on the nth line holding `needle`; both 1-based, as the loader counts."""
    line = line_of(text, needle, nth)
    return line, text.splitlines()[line - 1].index(token) + 1


def wiring(text: str, settings: Settings | None = None) -> list[dict]:
    return [facts(f) for f in check(text, settings=settings).findings if f.rule.startswith("wiring.")]


def finding(rule: str, level: str, place: tuple[int, int], path: str, message: str, values: dict,
            fix: str, stage: str) -> dict:
    return {"rule": rule, "level": level, "line": place[0], "col": place[1], "path": path,
            "message": message, "values": values, "fix": fix, "stage": stage, "signal": "",
            "position": ""}


# ---- tank return -----------------------------------------------------------------------------


def test_two_coils_from_the_quadrature_pin_to_ground_are_two_errors(clean_text):
    # L3 is named by no stage: its finding falls back to the discriminator stage
    text = edited(clean_text, L2, L2.replace("TANK_RET]", "GND]")
                  + "\n  L3: {kind: inductor, value: 1 mH, ends: [U1.quad, GND]}")
    message = ("{} returns U1.quad to GND (0 V): the quad pin of U1 is biased through its coil and needs "
               "the supply V6 ({:g} V); on ground the detector is dead")
    values = {"pin": ("U1.quad", ""), "coil far end": ("GND", ""), "supply V6": (V6, "V")}
    assert wiring(text) == [
        finding("wiring.tank-return", "error", at(text, "L2: {kind", "[U1.quad"), "parts.L2.ends",
                message.format("L2", V6), values, TANK_FIX, "discriminator"),
        finding("wiring.tank-return", "error", at(text, "L3: {kind", "[U1.quad"), "parts.L3.ends",
                message.format("L3", V6), values, TANK_FIX, "discriminator"),
    ]


def test_a_device_with_no_rail_names_no_supply_voltage(clean_text):
    text = edited(clean_text, L2, L2.replace("TANK_RET]", "GND]"))
    text = edited(text, "U1: {profile: fm-if-subsystem, rail: V6}", "U1: {profile: fm-if-subsystem}")
    found = of(check(text), "wiring.tank-return")
    assert [facts(f) for f in found] == [
        finding("wiring.tank-return", "error", at(text, "L2: {kind", "[U1.quad"), "parts.L2.ends",
                "L2 returns U1.quad to GND (0 V): the quad pin of U1 is biased through its coil and needs "
                "the supply rail; on ground the detector is dead",
                {"pin": ("U1.quad", ""), "coil far end": ("GND", "")}, TANK_FIX, "discriminator"),
    ]


@pytest.mark.parametrize("bypass", ["", C10.replace("GND]", "V12]")])
def test_a_tank_node_with_no_bypass_to_ground_is_a_note(clean_text, bypass):
    # removed, or returned to another rail instead of ground: either way no bypass to ground
    text = edited(clean_text, C10, bypass)
    assert wiring(text) == [
        finding("wiring.tank-return", "note", at(text, "L2: {kind", "[U1.quad"), "parts.L2.ends",
                "L2 returns U1.quad to V6 through R6, but node TANK_RET has no bypass capacitor to ground; "
                "supply noise reaches the detector",
                {"pin": ("U1.quad", ""), "coil far end": ("TANK_RET", ""), "supply V6": (V6, "V"),
                 "series part": ("R6", "")}, BYPASS_FIX, "discriminator"),
    ]


def test_a_choke_from_the_tank_node_to_the_rail_feeds_it_too(clean_text):
    text = edited(clean_text, R6, "R6: {kind: inductor, value: 100 uH, ends: [TANK_RET, V6]}")
    assert wiring(text) == []
    text = edited(text, C10, "")
    assert [(f["level"], f["values"]["series part"]) for f in wiring(text)] == [("note", ("R6", ""))]


def test_a_tank_node_returned_to_ground_through_a_resistor_is_an_error(clean_text):
    text = edited(clean_text, R6, R6.replace("V6]", "GND]"))
    assert wiring(text) == [
        finding("wiring.tank-return", "error", at(text, "L2: {kind", "[U1.quad"), "parts.L2.ends",
                "L2 returns U1.quad to node TANK_RET, which sits at 0 V through R6: the detector pin gets "
                "no bias from the supply V6",
                {"pin": ("U1.quad", ""), "coil far end": ("TANK_RET", ""), "supply V6": (V6, "V")},
                TANK_FIX, "discriminator"),
    ]


def test_a_grounded_tank_node_on_a_device_with_no_rail(clean_text):
    text = edited(clean_text, R6, R6.replace("V6]", "GND]"))
    text = edited(text, "U1: {profile: fm-if-subsystem, rail: V6}", "U1: {profile: fm-if-subsystem}")
    assert [facts(f) for f in of(check(text), "wiring.tank-return")] == [
        finding("wiring.tank-return", "error", at(text, "L2: {kind", "[U1.quad"), "parts.L2.ends",
                "L2 returns U1.quad to node TANK_RET, which sits at 0 V through R6: the detector pin gets "
                "no bias from the supply ",
                {"pin": ("U1.quad", ""), "coil far end": ("TANK_RET", "")}, TANK_FIX, "discriminator"),
    ]


@pytest.mark.parametrize("declared, dead", [("0.09 V", True), ("-0.09 V", True), ("0.1 V", False),
                                            ("-0.5 V", False)])
def test_a_tank_node_declared_near_0_v_is_an_error(clean_text, declared, dead):
    # |DC| under the 0.1 V threshold (DC_THRESHOLD) counts as ground; at it, or half a volt below
    # ground, the node is not 0 V and the rule says nothing
    text = edited(clean_text, R6, R6.replace("V6]", "NOWHERE]"))
    text = with_nodes(text, f"  TANK_RET: {{dc: {declared}}}\n")
    expected = [
        finding("wiring.tank-return", "error", at(text, "L2: {kind", "[U1.quad"), "parts.L2.ends",
                "L2 returns U1.quad to node TANK_RET, which sits at 0 V: the detector pin gets no bias from "
                "the supply V6",
                {"pin": ("U1.quad", ""), "coil far end": ("TANK_RET", ""), "supply V6": (V6, "V")},
                TANK_FIX, "discriminator"),
    ]
    assert wiring(text) == (expected if dead else [])


def test_a_tank_node_tied_to_nothing_is_a_warning(clean_text):
    # TANK_RET only sees the pin's own bias back through L2: that says nothing about the return
    text = edited(clean_text, R6, R6.replace("V6]", "NOWHERE]"))
    assert wiring(text) == [
        finding("wiring.tank-return", "warning", at(text, "L2: {kind", "[U1.quad"), "parts.L2.ends",
                "L2 returns U1.quad to node TANK_RET, which is tied to no rail; the detector pin would have "
                "no bias",
                {"pin": ("U1.quad", ""), "coil far end": ("TANK_RET", ""), "supply V6": (V6, "V")},
                TANK_FIX, "discriminator"),
    ]


def test_a_coil_straight_to_the_rail_is_fine_whatever_else_is_on_the_rail(clean_text):
    # a bleeder from V6 to ground is no return to ground for the coil: the coil sits on the rail
    text = edited(clean_text, L2, L2.replace("TANK_RET]", "V6]"))
    bleeder = "  R40: {kind: resistor, value: 10 kohm, ends: [V6, GND]}\n"
    text = edited(text, "  C32: {kind", bleeder + "  C32: {kind")
    assert of(check(text), "wiring.tank-return") == []


L3 = "\n  L3: {kind: inductor, value: 1 mH, ends: [U1.quad, TANK_RET]}"


@pytest.mark.parametrize("old, new, level", [(C10, "", "note"), (R6, R6.replace("V6]", "GND]"), "error"),
                                             (R6, R6.replace("V6]", "NOWHERE]"), "warning")])
def test_a_coil_named_by_no_stage_is_put_under_the_discriminator(clean_text, old, new, level):
    # L3, beside L2 and named by no stage, gets the same verdict as L2 in each branch
    text = edited(edited(clean_text, L2, L2 + L3), old, new)
    found = wiring(text)
    assert [(f["level"], f["message"].split()[0], f["stage"]) for f in found] == [
        (level, "L2", "discriminator"), (level, "L3", "discriminator")]


# ---- DC across a crystal -----------------------------------------------------------------------

XTAL_ENDS = "ends: [U1.osc_base, V6]"


def crystal_to_node(clean_text: str, volts: str) -> str:
    return with_nodes(edited(clean_text, XTAL_ENDS, "ends: [U1.osc_base, XTAL_RET]"),
                      f"  XTAL_RET: {{dc: {volts}}}\n")


def test_dc_across_a_crystal_names_both_potentials(clean_text):
    text = crystal_to_node(clean_text, "1.25 V")
    across = V6 - 1.25  # osc_base at the supply V6, the far end declared at 1.25 V
    assert wiring(text) == [
        finding("wiring.crystal-dc", "error", at(text, "ends: [U1.osc_base, XTAL_RET]", "["), "parts.X1.ends",
                f"X1 has {across:.3g} V DC across it: U1.osc_base at {V6:g} V (pin osc_base of U1 sits at "
                f"its supply V6 ({V6:g} V)) and XTAL_RET at 1.25 V (XTAL_RET is declared at 1.25 V); no "
                "series capacitor blocks it",
                {"U1.osc_base": (V6, "V"), "XTAL_RET": (1.25, "V"), "DC across crystal": (across, "V")},
                CRYSTAL_FIX, "conversion"),
    ]


def test_crystal_dc_at_the_threshold_setting_passes(clean_text):
    text = crystal_to_node(clean_text, "1.25 V")
    across = V6 - 1.25

    def rules(threshold: float) -> list[str]:
        settings = Settings(rule_settings={"wiring.crystal-dc": {"threshold": threshold}})
        return [f["rule"] for f in wiring(text, settings)]

    # at the threshold it passes (not above it); a hundredth of a volt lower it does not
    assert rules(across) == [] and rules(across - 0.01) == ["wiring.crystal-dc"]


def test_crystal_dc_just_over_the_default_threshold(clean_text):
    # 0.1 V by default: 0.15 V across is a finding, 0.05 V is not
    found = wiring(crystal_to_node(clean_text, "5.85 V"))
    assert [f["values"]["DC across crystal"] for f in found] == [(pytest.approx(V6 - 5.85), "V")]
    assert wiring(crystal_to_node(clean_text, "5.95 V")) == []


def test_a_crystal_named_by_no_stage_is_put_under_conversion(clean_text):
    # a second crystal, on the mixer output (biased at the supply, profile) and to ground
    x2 = "  X2: {kind: crystal, frequency: 10 MHz, ends: [U1.mixer_out, GND]}\n"
    text = edited(clean_text, "  C6: {kind", x2 + "  C6: {kind")
    assert wiring(text) == [
        finding("wiring.crystal-dc", "error", at(text, "X2: {kind", "[U1.mixer_out"), "parts.X2.ends",
                f"X2 has {V6 - 0:.3g} V DC across it: U1.mixer_out at {V6:g} V (pin mixer_out of U1 sits at "
                f"its supply V6 ({V6:g} V)) and GND at 0 V (GND is a ground at 0 V); no series capacitor "
                "blocks it",
                {"U1.mixer_out": (V6, "V"), "GND": (0.0, "V"), "DC across crystal": (V6 - 0, "V")},
                CRYSTAL_FIX, "conversion"),
    ]


# ---- polarity unstated -------------------------------------------------------------------------

C30 = ("C30: {kind: capacitor, value: 1000 uF, dielectric: electrolytic, voltage_rating: 25 V, "
       "ends: [V12, GND], positive: V12}")
C31 = ("C31: {kind: capacitor, value: 100 uF, dielectric: electrolytic, voltage_rating: 16 V, "
       "ends: [V6, GND], positive: V6}")


@pytest.mark.parametrize("ends, high", [("[V12, GND]", "V12"), ("[GND, V12]", "V12")])
def test_an_electrolytic_with_no_positive_end_is_told_which_end(clean_text, ends, high):
    text = edited(clean_text, C30, C30.replace("ends: [V12, GND], positive: V12", f"ends: {ends}"))
    a, b = ends.strip("[]").split(", ")
    volts = {"V12": V12, "GND": 0.0}
    assert wiring(text) == [
        finding("wiring.polarity-unstated", "warning", at(text, "C30: {kind", "electrolytic"),
                "parts.C30.dielectric",
                f"C30 is electrolytic (polarized) but no positive end is noted; by the DC on its nets ({a} "
                f"{volts[a]:g} V, {b} {volts[b]:g} V) it should be positive: {high}",
                {a: (volts[a], "V"), b: (volts[b], "V")}, UNSTATED_FIX, "wiring"),
    ]


@pytest.mark.parametrize("declared, hint", [("5.95 V", False), ("5.85 V", True)])
def test_the_positive_end_is_suggested_only_above_the_threshold(clean_text, declared, hint):
    # 6 V against 5.95 V differ by 0.05 V, under the 0.1 V threshold: no suggestion; 0.15 V: V6
    text = edited(clean_text, C31, C31.replace("ends: [V6, GND], positive: V6", "ends: [V6, NEAR]"))
    text = with_nodes(text, f"  NEAR: {{dc: {declared}}}\n")
    near = float(declared.split()[0])
    suggestion = (f"; by the DC on its nets (V6 {V6:g} V, NEAR {near:g} V) it should be positive: V6"
                  if hint else "")
    assert wiring(text) == [
        finding("wiring.polarity-unstated", "warning", at(text, "C31: {kind", "electrolytic"),
                "parts.C31.dielectric",
                f"C31 is electrolytic (polarized) but no positive end is noted{suggestion}",
                {"V6": (V6, "V"), "NEAR": (near, "V")}, UNSTATED_FIX, "wiring"),
    ]


def test_a_difference_of_exactly_the_threshold_suggests_nothing(clean_text):
    # NEAR at 0.1 V against ground: a difference of exactly DC_THRESHOLD (0.1 V) is not above it, so
    # no positive end is suggested, and no voltage rating is asked for (working voltage 0.1 V)
    text = edited(clean_text, C31, C31.replace("voltage_rating: 16 V, ends: [V6, GND], positive: V6",
                                               "ends: [NEAR, GND]"))
    text = with_nodes(text, "  NEAR: {dc: 0.1 V}\n")
    assert wiring(text) == [
        finding("wiring.polarity-unstated", "warning", at(text, "C31: {kind", "electrolytic"),
                "parts.C31.dielectric", "C31 is electrolytic (polarized) but no positive end is noted",
                {"NEAR": (0.1, "V"), "GND": (0.0, "V")}, UNSTATED_FIX, "wiring"),
    ]


def test_an_electrolytic_on_an_unknown_net_gets_no_suggestion_and_no_values(clean_text):
    # nothing states the DC of LOOSE: no rating check either (the DC across is unknown)
    text = edited(clean_text, C31, C31.replace("ends: [V6, GND], positive: V6", "ends: [V6, LOOSE]"))
    assert wiring(text) == [
        finding("wiring.polarity-unstated", "warning", at(text, "C31: {kind", "electrolytic"),
                "parts.C31.dielectric", "C31 is electrolytic (polarized) but no positive end is noted", {},
                UNSTATED_FIX, "wiring"),
    ]


def test_two_electrolytics_with_no_positive_end_are_two_findings(clean_text):
    text = edited(clean_text, C30, C30.replace(", positive: V12", ""))
    text = edited(text, C31, C31.replace(", positive: V6", ""))
    assert [(f["rule"], f["message"].split()[0]) for f in wiring(text)] == [
        ("wiring.polarity-unstated", "C30"), ("wiring.polarity-unstated", "C31")]


# ---- polarity reversed --------------------------------------------------------------------------


def test_a_reversed_electrolytic_names_both_ends(clean_text):
    text = edited(clean_text, C31, C31.replace("positive: V6", "positive: GND"))
    assert wiring(text) == [
        finding("wiring.polarity-reversed", "error", at(text, "C31: {kind", "GND}"), "parts.C31.positive",
                f"C31 is reversed: its positive end is on GND at 0 V (GND is a ground at 0 V) but its "
                f"negative end is on V6 at {V6:g} V (V6 is a rail at 6 V)",
                {"+ end GND": (0.0, "V"), "- end V6": (V6, "V"), "reverse voltage": (V6 - 0.0, "V")},
                REVERSED_FIX, "wiring"),
    ]


def test_two_reversed_electrolytics_are_two_findings(clean_text):
    text = edited(clean_text, C30, C30.replace("positive: V12", "positive: GND"))
    text = edited(text, C31, C31.replace("positive: V6", "positive: GND"))
    found = wiring(text)
    assert [(f["rule"], f["values"]["reverse voltage"]) for f in found] == [
        ("wiring.polarity-reversed", (V12, "V")), ("wiring.polarity-reversed", (V6, "V"))]


@pytest.mark.parametrize("declared, reversed_", [("5.9 V", False), ("5.85 V", True), ("6.5 V", False)])
def test_a_positive_end_a_little_low_is_tolerated(clean_text, declared, reversed_):
    # reversed only when the positive end sits more than 0.1 V below the negative one: 6 V - 5.9 V
    # is exactly the threshold (passes), 0.15 V is over it; positive above negative is right
    text = edited(clean_text, C31, C31.replace("[V6, GND], positive: V6", "[V6, LOW], positive: LOW"))
    text = with_nodes(text, f"  LOW: {{dc: {declared}}}\n")
    low = float(declared.split()[0])
    found = [f for f in wiring(text) if f["rule"] == "wiring.polarity-reversed"]
    expected = [(pytest.approx(V6 - low), "V")] if reversed_ else []
    assert [f["values"]["reverse voltage"] for f in found] == expected


def test_a_positive_end_on_an_unknown_net_is_not_judged(clean_text):
    for ends in ("ends: [V6, LOOSE], positive: LOOSE", "ends: [V6, LOOSE], positive: V6"):
        text = edited(clean_text, C31, C31.replace("ends: [V6, GND], positive: V6", ends))
        assert of(check(text), "wiring.polarity-reversed") == []


# ---- speaker coupling ----------------------------------------------------------------------------

C20 = ("C20: {kind: capacitor, value: 470 uF, dielectric: electrolytic, voltage_rating: 25 V, "
       "ends: [U2.out, SPK], positive: U2.out}")
SPEAKER_FIX = "Add 'positive: U2.out': + toward the amplifier, - toward the speaker."
SPEAKER_SWAP_FIX = "Set 'positive: U2.out' and fit + toward the amplifier."


@pytest.mark.parametrize("ends", ["[U2.out, SPK]", "[SPK, U2.out]"])
def test_a_speaker_coupling_with_no_polarity_is_a_warning(clean_text, ends):
    # either way round in the plan, the amplifier side is the audio-out pin
    text = edited(clean_text, C20, C20.replace("[U2.out, SPK], positive: U2.out", ends))
    result = check(text)
    assert [facts(f) for f in of(result, "wiring.speaker-coupling")] == [
        finding("wiring.speaker-coupling", "warning", at(text, "C20: {kind", "electrolytic"),
                "parts.C20.dielectric",
                f"C20 couples U2.out to the speaker with no polarity noted: the amplifier side sits at "
                f"{AMP_OUT:g} V (pin out of U2 sits at half its supply ({AMP_OUT:g} V of {V12:g} V))",
                {"U2.out": (AMP_OUT, "V"), "SPK": (0.0, "V")}, SPEAKER_FIX, "audio-amp"),
    ]
    assert of(result, "wiring.polarity-unstated") == []


def test_a_reversed_speaker_coupling_is_an_error(clean_text):
    text = edited(clean_text, C20, C20.replace("positive: U2.out", "positive: SPK"))
    assert wiring(text) == [
        finding("wiring.speaker-coupling", "error", at(text, "C20: {kind", "SPK}"), "parts.C20.positive",
                f"C20 is reversed: positive toward the speaker (SPK, 0 V) while the amplifier side U2.out "
                f"sits at {AMP_OUT:g} V",
                {"U2.out": (AMP_OUT, "V"), "SPK": (0.0, "V")}, SPEAKER_SWAP_FIX, "audio-amp"),
    ]


def test_a_reversed_speaker_coupling_to_a_net_of_unknown_dc(clean_text):
    text = edited(clean_text, C20, C20.replace("positive: U2.out", "positive: SPK"))
    text = edited(text, "ends: [SPK, GND]}", "ends: [SPK, LOOSE]}")
    assert wiring(text) == [
        finding("wiring.speaker-coupling", "error", at(text, "C20: {kind", "SPK}"), "parts.C20.positive",
                f"C20 is reversed: positive toward the speaker (SPK) while the amplifier side U2.out sits at "
                f"{AMP_OUT:g} V",
                {"U2.out": (AMP_OUT, "V")}, SPEAKER_SWAP_FIX, "audio-amp"),
    ]


def test_the_named_coupling_counts_even_when_no_speaker_is_on_its_far_net(clean_text):
    # C19, a film part from the amplifier output to the speaker, comes first and needs no polarity;
    # C20, named as the stage's coupling, now goes to a net without the speaker
    c19 = "C19: {kind: capacitor, value: 1 uF, dielectric: film, ends: [U2.out, SPK]}\n  "
    text = edited(clean_text, C20, c19 + C20.replace("[U2.out, SPK], positive: U2.out", "[U2.out, SPK_X]"))
    found = of(check(text), "wiring.speaker-coupling")
    assert [facts(f) for f in found] == [
        finding("wiring.speaker-coupling", "warning", at(text, "C20: {kind", "electrolytic"),
                "parts.C20.dielectric",
                f"C20 couples U2.out to the speaker with no polarity noted: the amplifier side sits at "
                f"{AMP_OUT:g} V (pin out of U2 sits at half its supply ({AMP_OUT:g} V of {V12:g} V))",
                {"U2.out": (AMP_OUT, "V")}, SPEAKER_FIX, "audio-amp"),
    ]


def test_an_unnamed_electrolytic_toward_the_speaker_is_judged_and_left_to_this_rule(clean_text):
    # C19 reaches the speaker from the amplifier output without being the stage's coupling
    text = edited(clean_text, C20, "C19: {kind: capacitor, value: 470 uF, dielectric: electrolytic, "
                  "voltage_rating: 25 V, ends: [U2.out, SPK], positive: SPK}\n  " + C20)
    result = check(text)
    found = [(f.rule, f.message.split()[0], f.level) for f in result.findings if f.rule.startswith("wiring.")]
    assert found == [("wiring.speaker-coupling", "C19", "error")]


def test_a_capacitor_from_another_pin_toward_the_speaker_is_not_a_coupling(clean_text):
    # U2.bypass is no audio-out pin: C19 is an ordinary electrolytic, judged by polarity-unstated
    text = edited(clean_text, C20, "C19: {kind: capacitor, value: 10 uF, dielectric: electrolytic, "
                  "voltage_rating: 25 V, ends: [U2.bypass, SPK]}\n  " + C20)
    found = [(f["rule"], f["message"].split()[0]) for f in wiring(text)]
    assert found == [("wiring.polarity-unstated", "C19")]


def test_an_electrolytic_from_the_amplifier_output_to_no_speaker_is_no_coupling(clean_text):
    # C24 (a bootstrap-like part) from U2.out to a net without the speaker: the general polarity
    # rule judges it, half of 12 V against nothing known
    c24 = ("  C24: {kind: capacitor, value: 10 uF, dielectric: electrolytic, voltage_rating: 25 V, "
           "ends: [U2.out, BOOT]}\n")
    text = edited(clean_text, "  R21: {kind", c24 + "  R21: {kind")
    found = wiring(text)
    assert [(f["rule"], f["message"].split()[0]) for f in found] == [("wiring.polarity-unstated", "C24")]


def test_an_unnamed_speaker_electrolytic_is_put_under_the_audio_amplifier(clean_text):
    c19 = ("C19: {kind: capacitor, value: 470 uF, dielectric: electrolytic, voltage_rating: 25 V, "
           "ends: [U2.out, SPK]}\n  ")
    text = edited(clean_text, C20, c19 + C20)
    assert [facts(f) for f in of(check(text), "wiring.speaker-coupling")] == [
        finding("wiring.speaker-coupling", "warning", at(text, "C19: {kind", "electrolytic"),
                "parts.C19.dielectric",
                f"C19 couples U2.out to the speaker with no polarity noted: the amplifier side sits at "
                f"{AMP_OUT:g} V (pin out of U2 sits at half its supply ({AMP_OUT:g} V of {V12:g} V))",
                {"U2.out": (AMP_OUT, "V"), "SPK": (0.0, "V")}, SPEAKER_FIX, "audio-amp"),
    ]


UNBIASED = """profiles:
  amp-unbiased:
    class: audio-power-amplifier
    description: an amplifier whose output bias the plan does not state
    supply_min: 4 V
    supply_max: 12 V
    quiescent_current: 6 mA
    input_impedance: 50 kohm
    theta_ja: 100 degC/W
    tj_max: 150 degC
    output_topology: single-ended
    source: test values
    pins:
      in_plus: {role: input, dc: ground}
      out: {role: audio-out}
      vs: {role: supply, dc: supply}
      gnd: {role: ground, dc: ground}

devices:
"""


@pytest.mark.parametrize("positive, level, message, fix, key", [
    ("", "warning", "C20 couples U2.out to the speaker with no polarity noted", SPEAKER_FIX, "dielectric"),
    (", positive: SPK", "error", "C20 is reversed: positive toward the speaker", SPEAKER_SWAP_FIX,
     "positive"),
])
def test_an_amplifier_output_of_unknown_dc_is_not_quoted(clean_text, positive, level, message, fix, key):
    # a profile whose output pin states no DC bias: the messages say what is known, the speaker
    # side's 0 V (through the voice coil to ground) stays among the values
    text = edited(edited(clean_text, "devices:\n", UNBIASED), "U2: {profile: audio-power-amp-lv,",
                  "U2: {profile: amp-unbiased,")
    text = edited(text, C20, C20.replace(", positive: U2.out", positive))
    token = "electrolytic" if key == "dielectric" else "SPK}"
    assert [facts(f) for f in of(check(text), "wiring.speaker-coupling")] == [
        finding("wiring.speaker-coupling", level, at(text, "C20: {kind", token), f"parts.C20.{key}", message,
                {"SPK": (0.0, "V")}, fix, "audio-amp"),
    ]


# ---- voltage rating (derating shares 80 % and 50 %: common practice) -----------------------------


def rating_at(text: str, needle: str) -> tuple[int, int]:
    """Where the value of voltage_rating sits on the line holding needle."""
    line, col = at(text, needle, "voltage_rating: ")
    return line, col + len("voltage_rating: ")


def rating_finding(text: str, ref: str, level: str, message: str, values: dict) -> dict:
    return finding("wiring.cap-voltage", level, rating_at(text, f"{ref}: {{kind"),
                   f"parts.{ref}.voltage_rating", message, values, RATING_FIX, "wiring")


def test_a_rating_below_the_working_voltage_is_an_error(clean_text):
    text = edited(clean_text, C30, C30.replace("25 V", "10 V"))
    assert wiring(text) == [rating_finding(
        text, "C30", "error", f"C30 sees {V12:.3g} V but is rated 10 V: V12 {V12:g} V, GND 0 V",
        {"V12": (V12, "V"), "GND": (0.0, "V"), "DC across": (V12, "V"), "rating": (10.0, "V"),
         "allowed at 80%": (pytest.approx(10.0 * 0.8), "V")})]


def test_a_working_voltage_equal_to_the_rating_is_a_warning_not_an_error(clean_text):
    text = edited(clean_text, C31, C31.replace("16 V", "6 V"))
    assert wiring(text) == [rating_finding(
        text, "C31", "warning", f"C31 sees {V6:.3g} V, {V6 / 6.0:.0%} of its 6 V rating (keep under 80%): "
        f"V6 {V6:g} V, GND 0 V",
        {"V6": (V6, "V"), "GND": (0.0, "V"), "DC across": (V6, "V"), "rating": (6.0, "V"),
         "allowed at 80%": (pytest.approx(6.0 * 0.8), "V")})]


@pytest.mark.parametrize("rating, warned", [("7.5 V", False), ("7.4 V", True)])
def test_the_derating_share_is_the_warning_line(clean_text, rating, warned):
    # 80 % of 7.5 V is exactly the 6 V across C31: inside the share; of 7.4 V it is 5.92 V: over it
    text = edited(clean_text, C31, C31.replace("16 V", rating))
    found = wiring(text)
    volts = float(rating.split()[0])
    assert [(f["level"], f["values"]["allowed at 80%"]) for f in found] == (
        [("warning", (pytest.approx(volts * 0.8), "V"))] if warned else [])


def tantalum(clean_text: str, rating: str) -> str:
    return edited(clean_text, "  C32:", "  C33: {kind: capacitor, value: 10 uF, dielectric: tantalum, "
                  f"voltage_rating: {rating}, ends: [V6, GND], positive: V6}}\n  C32:")


def test_a_tantalum_is_held_to_half_its_rating(clean_text):
    text = tantalum(clean_text, "10 V")  # 6 V on 10 V: 60 %, over 50 % though under 80 %
    assert wiring(text) == [rating_finding(
        text, "C33", "warning", f"C33 sees {V6:.3g} V, {V6 / 10.0:.0%} of its 10 V rating (keep under 50%): "
        f"V6 {V6:g} V, GND 0 V",
        {"V6": (V6, "V"), "GND": (0.0, "V"), "DC across": (V6, "V"), "rating": (10.0, "V"),
         "allowed at 50%": (pytest.approx(10.0 * 0.5), "V")})]
    assert wiring(tantalum(clean_text, "12 V")) == []  # half of 12 V is exactly the 6 V across


def test_the_tantalum_share_is_its_own_setting(clean_text):
    text = tantalum(clean_text, "10 V")
    relaxed = Settings(rule_settings={"wiring.cap-voltage": {"tantalum_derating": 0.6}})
    assert wiring(text, relaxed) == []  # 60 % is now the line itself
    strict = Settings(rule_settings={"wiring.cap-voltage": {"derating": 0.3}})
    # 30 % no longer spares C30 (12 V on 25 V: 48 %) nor C31 (6 V on 16 V: 38 %), still spares C32
    # (6 V on 50 V: 12 %) and C20 (6 V on 25 V: 24 %); C33 keeps its own 50 %
    assert [(f["message"].split()[0], f["level"]) for f in wiring(text, strict)] == [
        ("C30", "warning"), ("C31", "warning"), ("C33", "warning")]


def test_an_ac_peak_adds_to_the_dc(clean_text):
    text = edited(clean_text, "voltage_rating: 25 V, ends: [U2.out, SPK]",
                  "voltage_rating: 12 V, ac_peak: 5 V, ends: [U2.out, SPK]")
    working = AMP_OUT + 5.0  # U2.out at half of 12 V, SPK at 0 V through the voice coil; plus 5 V peak
    assert wiring(text) == [finding(
        "wiring.cap-voltage", "warning", rating_at(text, "C20: {kind"), "parts.C20.voltage_rating",
        f"C20 sees {working:.3g} V, {working / 12.0:.0%} of its 12 V rating (keep under 80%): U2.out "
        f"{AMP_OUT:g} V, SPK 0 V",
        {"U2.out": (AMP_OUT, "V"), "SPK": (0.0, "V"), "DC across": (AMP_OUT, "V"), "AC peak": (5.0, "V"),
         "rating": (12.0, "V"), "allowed at 80%": (pytest.approx(12.0 * 0.8), "V")},
        RATING_FIX, "audio-amp")]


def test_an_electrolytic_with_no_rating_is_a_note(clean_text):
    text = edited(clean_text, C31, C31.replace("voltage_rating: 16 V, ", ""))
    assert wiring(text) == [finding(
        "wiring.cap-voltage", "note", at(text, "C31: {kind", "{kind"), "parts.C31",
        f"C31 (electrolytic) has {V6:.3g} V across it but no voltage_rating is stated",
        {"V6": (V6, "V"), "GND": (0.0, "V")}, NO_RATING_FIX, "wiring")]


@pytest.mark.parametrize("declared, noted", [("5.9 V", False), ("5.85 V", True)])
def test_an_unrated_electrolytic_with_almost_no_dc_across_passes(clean_text, declared, noted):
    # 0.1 V or less across (6 V - 5.9 V) counts as none; 0.15 V does not
    text = edited(clean_text, C31, C31.replace("voltage_rating: 16 V, ends: [V6, GND]", "ends: [V6, NEAR]"))
    text = with_nodes(text, f"  NEAR: {{dc: {declared}}}\n")
    found = [f for f in wiring(text) if f["rule"] == "wiring.cap-voltage"]
    assert [f["level"] for f in found] == (["note"] if noted else [])


def test_an_unrated_film_capacitor_is_not_asked_for_a_rating(clean_text):
    # C12 (film, no rating) sits between nets of known DC only if both are stated: give AF1 and
    # VOL_TOP potentials through a node declaration and check nothing is said
    text = with_nodes(clean_text, "  VOL_TOP: {dc: 3 V}\n")
    assert [f for f in wiring(text) if f["rule"] == "wiring.cap-voltage"] == []


def test_a_voltage_rating_on_another_kind_of_part_is_not_this_rule(clean_text):
    # D1 (from GND to V12) rated 10 V has 12 V across it; the capacitor rule leaves diodes alone
    text = edited(clean_text, "D1: {kind: diode, ends:", "D1: {kind: diode, voltage_rating: 10 V, ends:")
    assert of(check(text), "wiring.cap-voltage") == []
