"""Wiring rules: each one fires on a planted mistake, at its line, and stays quiet on the clean plan.

The check values here are facts of the trade with no single published source (common practice):
- a quadrature detector pin fed through its coil needs the coil's far end on the supply rail
  (often through about 10 ohm, bypassed); on ground the detector is dead;
- the output coupling electrolytic of a single-supply audio amplifier sits at about half the
  supply on the amplifier side: positive toward the amplifier;
- crystals on an oscillator pin that carries DC are returned to the supply rail rather than to
  ground so that no DC stands across the crystal.
"""

from conftest import check, edited, line_of, of

from speccheck import engine
from speccheck.config import Settings


def test_clean_plan_has_no_wiring_finding(clean_text):
    assert [f for f in check(clean_text).findings if f.rule.startswith("wiring.")] == []


# ---- tank return (common practice) ----------------------------------------------------------

def test_tank_returned_to_ground_is_an_error(clean_text):
    old = (
        "L2: {kind: inductor, value: 1 mH, adjust: {min: 0.9 mH, max: 1.1 mH}, q: 60, ends: [U1.quad, "
        "TANK_RET]}"
    )
    text = edited(clean_text, old, old.replace("TANK_RET]", "GND]"))
    found = of(check(text), "wiring.tank-return")
    assert len(found) == 1
    f = found[0]
    assert f.level == "error"
    assert f.message.startswith("L2 returns U1.quad to GND (0 V)")
    assert "needs the supply V6 (6 V)" in f.message and "detector is dead" in f.message
    assert f.location.line == line_of(text, "L2: {kind: inductor")
    assert f.location.path == "parts.L2.ends"


def test_tank_returned_through_resistor_to_rail_is_fine(clean_text):
    assert of(check(clean_text), "wiring.tank-return") == []


def test_tank_node_without_bypass_is_a_note(clean_text):
    text = edited(
        clean_text,
        "  C10: {kind: capacitor, value: 100 nF, dielectric: ceramic, ends: [TANK_RET, GND]}\n",
        "",
    )
    found = of(check(text), "wiring.tank-return")
    assert [f.level for f in found] == ["note"]
    assert "no bypass" in found[0].message


def test_tank_node_tied_to_nothing_is_a_warning(clean_text):
    text = edited(
        clean_text,
        "R6: {kind: resistor, value: 10 ohm, ends: [TANK_RET, V6]}",
        "R6: {kind: resistor, value: 10 ohm, ends: [TANK_RET, NOWHERE]}",
    )
    found = of(check(text), "wiring.tank-return")
    assert [f.level for f in found] == ["warning"]
    assert "tied to no rail" in found[0].message


# ---- DC across a crystal (common practice) ---------------------------------------------------


def test_crystal_from_biased_pin_to_ground_has_dc_across(clean_text):
    text = edited(clean_text, "ends: [U1.osc_base, V6]", "ends: [U1.osc_base, GND]")
    found = of(check(text), "wiring.crystal-dc")
    assert [f.level for f in found] == ["error"]  # the brief lists DC across a crystal among the errors
    f = found[0]
    assert f.message.startswith("X1 has 6 V DC across it: U1.osc_base at 6 V")
    assert "GND at 0 V" in f.message
    assert f.location.line == line_of(text, "ends: [U1.osc_base, GND]")
    assert {v.name: v.value for v in f.values}["DC across crystal"] == 6.0  # V6 rail 6 V minus ground 0 V


def test_crystal_dc_below_the_threshold_setting_is_fine(clean_text):
    # 6 V across X1 (V6 rail against ground): a project threshold of 6.5 V lets it pass, 5.5 V does not
    text = edited(clean_text, "ends: [U1.osc_base, V6]", "ends: [U1.osc_base, GND]")

    def levels(volts: float):
        settings = Settings(rule_settings={"wiring.crystal-dc": {"threshold": volts}})
        return [f.level for f in of(check(text, settings=settings), "wiring.crystal-dc")]

    assert levels(6.5) == [] and levels(5.5) == ["error"]


def test_crystal_returned_to_the_pin_potential_is_fine(clean_text):
    assert of(check(clean_text), "wiring.crystal-dc") == []


# ---- polarity ----------------------------------------------------------------------------------


def test_electrolytic_without_polarity_is_a_warning_with_the_right_end(clean_text):
    text = edited(clean_text, "ends: [V12, GND], positive: V12}", "ends: [V12, GND]}")
    found = of(check(text), "wiring.polarity-unstated")
    assert len(found) == 1
    assert found[0].message.startswith("C30 is electrolytic (polarized) but no positive end is noted")
    assert found[0].message.endswith("it should be positive: V12")
    assert found[0].location.line == line_of(text, "C30:")


def test_reversed_electrolytic_is_an_error(clean_text):
    text = edited(clean_text, "ends: [V6, GND], positive: V6}", "ends: [V6, GND], positive: GND}")
    found = of(check(text), "wiring.polarity-reversed")
    assert len(found) == 1
    assert found[0].message.startswith("C31 is reversed: its positive end is on GND at 0 V")
    assert "negative end is on V6 at 6 V" in found[0].message
    assert found[0].location.path == "parts.C31.positive"


def test_film_capacitor_needs_no_polarity(clean_text):
    assert of(check(clean_text), "wiring.polarity-unstated") == []


def test_speaker_coupling_reversed(clean_text):
    text = edited(clean_text, "ends: [U2.out, SPK], positive: U2.out}", "ends: [U2.out, SPK], positive: SPK}")
    result = check(text)
    found = of(result, "wiring.speaker-coupling")
    assert len(found) == 1
    # single-supply amplifier output at about half of 12 V (common practice)
    assert found[0].message.startswith("C20 is reversed: positive toward the speaker (SPK, 0 V)")
    assert "U2.out sits at 6 V" in found[0].message
    assert found[0].level == "error"
    assert found[0].location.line == line_of(text, "positive: SPK}")
    assert of(result, "wiring.polarity-reversed") == []  # one finding, from the specific rule


def test_speaker_coupling_unstated(clean_text):
    text = edited(clean_text, "ends: [U2.out, SPK], positive: U2.out}", "ends: [U2.out, SPK]}")
    result = check(text)
    found = of(result, "wiring.speaker-coupling")
    assert [f.level for f in found] == ["warning"]
    assert "no polarity noted: the amplifier side sits at 6 V" in found[0].message
    assert of(result, "wiring.polarity-unstated") == []


# ---- voltage rating (derating shares: common practice) ---------------------------------------


def test_rating_below_working_voltage_is_an_error(clean_text):
    text = edited(
        clean_text, "voltage_rating: 25 V, ends: [V12, GND]", "voltage_rating: 10 V, ends: [V12, GND]"
    )
    found = of(check(text), "wiring.cap-voltage")
    assert len(found) == 1
    assert found[0].message.startswith("C30 sees 12 V but is rated 10 V")
    assert found[0].level == "error"
    assert found[0].location.path == "parts.C30.voltage_rating"


def test_rating_inside_the_derating_margin_is_a_warning(clean_text):
    # 6 V on a 6.3 V part is 95 %, above the 80 % common-practice share
    text = edited(
        clean_text, "voltage_rating: 16 V, ends: [V6, GND]", "voltage_rating: 6.3 V, ends: [V6, GND]"
    )
    found = of(check(text), "wiring.cap-voltage")
    assert [f.level for f in found] == ["warning"]
    assert "95% of its 6.3 V rating (keep under 80%)" in found[0].message


def test_derating_share_is_a_setting(clean_text):
    text = edited(
        clean_text, "voltage_rating: 16 V, ends: [V6, GND]", "voltage_rating: 6.3 V, ends: [V6, GND]"
    )
    relaxed = Settings(rule_settings={"wiring.cap-voltage": {"derating": 0.99}})
    assert of(engine.check_text(text, "plan.yaml", relaxed), "wiring.cap-voltage") == []


def test_ac_peak_adds_to_dc(clean_text):
    # 6 V DC + 5 V peak = 11 V on a 12 V part: 92 % > 80 %
    text = edited(
        clean_text,
        "voltage_rating: 25 V, ends: [U2.out, SPK]",
        "voltage_rating: 12 V, ac_peak: 5 V, ends: [U2.out, SPK]",
    )
    found = of(check(text), "wiring.cap-voltage")
    assert found and found[0].message.startswith("C20 sees 11 V")


def test_beginner_plan_names_each_planted_mistake():
    from conftest import EXAMPLES

    path = EXAMPLES / "beginner-plan.yaml"
    text = path.read_text("utf-8")
    result = engine.check_file(path)
    got = {(f.rule, f.location.line) for f in result.findings}
    assert ("wiring.tank-return", line_of(text, "L2: {kind: inductor")) in got
    assert ("wiring.crystal-dc", line_of(text, "ends: [U1.osc_base, GND]")) in got
    assert ("wiring.speaker-coupling", line_of(text, "positive: SPK}")) in got
    assert ("wiring.polarity-unstated", line_of(text, "C30:")) in got
    assert ("wiring.cap-voltage", line_of(text, "C33:")) in got
    assert ("wiring.cap-voltage", line_of(text, "C31:")) in got
