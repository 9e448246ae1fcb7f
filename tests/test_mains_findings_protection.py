"""Mains family, pinned whole (continued from test_mains_findings.py): the switch, the earth, the declared
ratings, the transformer's primary and the bleeder, each finding asserted whole with its numbers derived
here. Sources: as in test_mains_findings.py's header (IEC 62368-1 ES1 limits from memory, IEC 60038
tolerance from memory, V0·e^(-t/RC) and ½·C·V² from any circuit-theory textbook, common practice for
the rest, each named beside its check).
"""

from __future__ import annotations

import math

import pytest
from conftest import check, edited, facts, line_of, of, sheet_of, sheet_rows
from test_mains_findings import CAUTIONS_AFTER_FIRST, MAINS, finding, found, with_fuse

from speccheck.config import Settings

# ---- mains.switch-line ------------------------------------------------------------------------------


@pytest.mark.parametrize("neutral_stated", [True, False])
def test_switch_in_the_neutral_only(neutral_stated):
    text = edited(with_fuse(), "S1: {kind: switch, ends: [L_F, L_SW]", "S1: {kind: switch, ends: [N, N_SW]")
    text = edited(text, "primary: [L_SW, N]", "primary: [L_F, N_SW]")
    where = "in the neutral only" if neutral_stated else "not in the line conductor"
    if not neutral_stated:
        text = edited(text, "    neutral_net: N\n", "")
    # an X capacitor across the mains joins no conductors: only fuses, switches and connectors pass one on
    text = edited(text, "  S1: {kind: switch", "  CX1: {kind: capacitor, value: 100 nF, dielectric: film, "
                  "voltage_rating: 275 V, ends: [L_F, N]}\n  S1: {kind: switch")
    assert found(text, "mains.switch-line") == [finding(
        "mains.switch-line", "warning", text, "[N, N_SW]", "parts.S1.ends",
        f"mains switch S1 (N, N_SW) is {where}: switched off, the primary stays connected to the line L",
    )]


def test_switch_on_neither_conductor():
    text = edited(MAINS, "S1: {kind: switch, ends: [L, L_SW]", "S1: {kind: switch, ends: [AC1, SW_X]")
    text = edited(text, "primary: [L_SW, N]", "primary: [L, N]")
    assert found(text, "mains.switch-line") == [finding(
        "mains.switch-line", "warning", text, "[AC1, SW_X]", "parts.S1.ends",
        "mains switch S1 (AC1, SW_X) is not in the line conductor: switched off, the primary stays "
        "connected to the line L",
    )]


def test_switch_that_is_no_switch_is_a_note():
    text = edited(MAINS, "    switch: S1\n", "    switch: T1\n")
    assert found(text, "mains.switch-line") == [finding(
        "mains.switch-line", "note", text, "switch: |T1", "supply.mains.switch",
        "supply.mains.switch names T1, a transformer, not a switch", fix="",
    )]


@pytest.mark.parametrize("edit", [("    switch: S1\n", ""), ("    line_net: L\n", "")])
def test_switch_not_checked_without_the_switch_or_the_line(edit):
    text = edited(edited(MAINS, "S1: {kind: switch, ends: [L, L_SW]", "S1: {kind: switch, ends: [N, N_SW]"),
                  "primary: [L_SW, N]", "primary: [L, N_SW]")
    assert [f["level"] for f in found(text, "mains.switch-line")] == ["warning"]
    assert found(edited(text, *edit), "mains.switch-line") == []


# ---- mains.earth ----


EARTH_TAIL = ": nothing protects a person if a live wire touches an accessible part; bond the protective " \
    "earth to the enclosure or build it class II"


def test_no_earth_on_a_metal_case():
    assert found(MAINS, "mains.earth") == [finding(
        "mains.earth", "error", MAINS, "none", "supply.mains.earth",
        "earth: none and the enclosure is metal" + EARTH_TAIL)]


def test_no_earth_in_an_insulating_case():
    text = edited(MAINS, "enclosure: metal", "enclosure: insulating")
    assert found(text, "mains.earth") == [finding(
        "mains.earth", "error", text, "none", "supply.mains.earth", "earth: none" + EARTH_TAIL)]


def test_earth_not_declared():
    text = edited(MAINS, "    earth: none\n", "")
    assert found(text, "mains.earth") == [finding(
        "mains.earth", "error", text, "voltage: 230 V", "supply.mains",
        "no earth is declared (supply.mains.earth) and the enclosure is metal" + EARTH_TAIL)]


def test_class_ii_in_a_metal_case_is_a_warning():
    text = edited(MAINS, "earth: none", "earth: class-ii")
    assert found(text, "mains.earth") == [finding(
        "mains.earth", "warning", text, "enclosure: |metal", "supply.mains.enclosure",
        "class II (double insulation) is declared in a metal enclosure: every mains part then needs "
        "reinforced insulation from the case; bonding the case to earth is the usual build")]


@pytest.mark.parametrize(("earth", "enclosure", "shown"), [
    ("bonded", "metal", "earth bonded"), ("class-ii", "insulating", "class II"), ("bonded", "insulating",
                                                                                  "earth bonded")])
def test_protection_on_the_sheet(earth, enclosure, shown):
    text = edited(MAINS, "earth: none", f"earth: {earth}")
    text = edited(text, "enclosure: metal", f"enclosure: {enclosure}")
    result = check(text)
    assert of(result, "mains.earth") == []
    assert sheet_rows(result, "mains.earth") == [
        ("mains", "supply", "protection against shock", shown, "", "", "")]


# ---- a mains-transformer supply without its mains block ---------------------------------------------------


def test_mains_transformer_without_a_mains_block():
    text = MAINS.split("  mains:\n")[0] + "\nrails:" + MAINS.split("\nrails:")[1]
    result = check(text)
    assert result.cautions == [
        "HAZARDOUS VOLTAGE: this build runs from the mains. Touching it can kill.", *CAUTIONS_AFTER_FIRST]
    assert found(text, "mains.ratings-declared") == [finding(
        "mains.ratings-declared", "warning", text, "mains-transformer", "supply.kind",
        "the supply is a mains transformer but supply.mains is not declared (voltage, frequency, line and "
        "neutral nets, earth, transformer, primary fuse, switch)")]
    for rule in ("mains.primary-fuse", "mains.switch-line", "mains.earth", "mains.transformer-primary"):
        assert of(result, rule) == [], rule


# ---- mains.ratings-declared -------------------------------------------------------------------------------


@pytest.mark.parametrize(("drop", "said"), [
    ("    frequency: 50 Hz\n", "frequency"), ("    voltage: 230 V\n", "voltage"),
    ("    voltage: 230 V\n    frequency: 50 Hz\n", "voltage and frequency")])
def test_ratings_not_stated(drop, said):
    text = edited(MAINS, drop, "")
    got = found(text, "mains.ratings-declared")
    line = line_of(text, "  mains:") + 1  # a block mapping is placed at its first key
    assert got == [{**finding("mains.ratings-declared", "warning", text, "mains:", "supply.mains",
                              f"supply.mains does not state its {said}"), "line": line, "col": 5}]


@pytest.mark.parametrize("hz", ["47.5", "47.4", "52.5", "52.6", "57", "56.9", "63", "63.1", "55"])
def test_mains_frequency_within_five_percent_of_50_or_60(hz):
    # common practice: 50 Hz or 60 Hz, here within 5 %: 47.5-52.5 Hz and 57-63 Hz
    f = float(hz)
    odd = not (abs(f - 50) <= 2.5 or abs(f - 60) <= 3.0)
    text = edited(MAINS, "frequency: 50 Hz", f"frequency: {hz} Hz")
    expected = [finding("mains.ratings-declared", "warning", text, f"{hz} Hz", "supply.mains.frequency",
                        f"mains frequency {hz} Hz is neither 50 Hz nor 60 Hz")]
    assert found(text, "mains.ratings-declared") == (expected if odd else [])


# ---- mains.transformer-primary ----------------------------------------


@pytest.mark.parametrize("volts", [206, 207, 253, 254])
def test_primary_within_the_mains_tolerance(volts):
    # IEC 60038 (from memory): ±10 % of 230 V is 207 V to 253 V
    off = abs(volts - 230) / 230
    text = edited(MAINS, "primary_voltage: 230 V", f"primary_voltage: {volts} V")
    expected = [finding("mains.transformer-primary", "error", text, f"{volts} V", "parts.T1.primary_voltage",
                        f"T1's primary is wound for {volts} V but the mains is 230 V",
                        {"primary": (float(volts), "V"), "mains": (230.0, "V")})]
    assert found(text, "mains.transformer-primary") == (expected if off > 0.1 + 1e-12 else [])


def test_primary_tolerance_by_setting():
    # 115 V on 230 V is 50 % off: inside a 0.5 tolerance, outside 0.49
    text = edited(MAINS, "primary_voltage: 230 V", "primary_voltage: 115 V")
    wide = Settings(rule_settings={"mains.transformer-primary": {"tolerance": 0.5}})
    assert found(text, "mains.transformer-primary", wide) == []
    narrow = Settings(rule_settings={"mains.transformer-primary": {"tolerance": 0.49}})
    assert [f["level"] for f in found(text, "mains.transformer-primary", narrow)] == ["error"]


def test_transformer_named_that_is_no_transformer():
    text = edited(MAINS, "    transformer: T1\n", "    transformer: S1\n")
    assert found(text, "mains.transformer-primary") == [finding(
        "mains.transformer-primary", "note", text, "transformer: |S1", "supply.mains.transformer",
        "supply.mains.transformer names S1, a switch, not a transformer", fix="")]
    # and the primary fuse has no transformer to size from
    assert [f["values"] for f in found(text, "mains.primary-fuse")] == [{}]


def test_no_transformer_part_at_all():
    text = edited(MAINS, "    transformer: T1\n", "")
    text = edited(text, "  T1: {kind: transformer, rating: 12 VA, primary_voltage: 230 V, "
                  "secondary_voltage: 15 V,\n"
                  "       primary: [L_SW, N], secondary: [AC1, AC2]}\n", "")
    assert found(text, "mains.transformer-primary") == [finding(
        "mains.transformer-primary", "note", text, "mains-transformer", "supply.kind",
        "a mains-transformer supply with no transformer part: its primary and the primary fuse are not "
        "checked", fix="")]


def test_two_transformers_none_named_is_not_guessed():
    text = edited(MAINS, "    transformer: T1\n", "")
    text = edited(text, "primary_voltage: 230 V", "primary_voltage: 115 V")
    assert [f["level"] for f in found(text, "mains.transformer-primary")] == ["error"]
    two = edited(text, "  # bridge rectifier",
                 "  T2: {kind: transformer, rating: 12 VA, primary_voltage: 115 V, secondary_voltage: 15 V,\n"
                 "       primary: [L_SW, N], secondary: [AC1, AC2]}\n\n  # bridge rectifier")
    assert found(two, "mains.transformer-primary") == []
    assert [f["values"] for f in found(two, "mains.primary-fuse")] == [{}]


def test_primary_voltage_not_stated_is_not_checked():
    text = edited(MAINS, "primary_voltage: 230 V, ", "")
    assert found(text, "mains.transformer-primary") == []


# ---- mains.bleeder ----

LAST_PART = "  SPK1: {kind: speaker, value: 8 ohm, power_rating: 3 W, ends: [SPK, GND]}\n"
HV = 150.0  # the rail the tests add; above the 60 V DC limit (IEC 62368-1 ES1, from memory)


def hv_plan(clean_text: str, parts: str, volts: str = "150 V") -> str:
    """The clean monitor with a rail HV and `parts` after all of its own (so every one of its capacitors
    is looked at first)."""
    text = edited(clean_text, "  GND: {voltage: 0 V}\n",
                  f"  GND: {{voltage: 0 V}}\n  HV: {{voltage: {volts}}}\n")
    return edited(text, LAST_PART, LAST_PART + parts)


def cap(name: str, value: str = "100 uF", ends: str = "[HV, GND]") -> str:
    return (f"  {name}: {{kind: capacitor, value: {value}, dielectric: electrolytic, voltage_rating: 250 V, "
            f"ends: {ends}, positive: HV}}\n")


def res(name: str, value: str, power: str = "") -> str:
    rating = f", power_rating: {power}" if power else ""
    return f"  {name}: {{kind: resistor, value: {value}{rating}, ends: [HV, GND]}}\n"


def energy(farads: float, volts: float = HV) -> float:
    return 0.5 * farads * volts**2  # ½·C·V²


def test_capacitors_without_a_bleeder_each_reported(clean_text):
    # a capacitor with an end of no known DC is passed over (C48, C49); the next ones are each reported,
    # the second from V12 up to HV: what counts is the voltage across it, 150 V - 12 V = 138 V
    floating = ("  C48: {kind: capacitor, value: 10 uF, dielectric: film, ends: [HV, FLOAT_C]}\n"
                "  C49: {kind: capacitor, value: 10 uF, dielectric: film, ends: [FLOAT_A, FLOAT_B]}\n")
    text = hv_plan(clean_text, floating + cap("C50") + cap("C51", "47 uF", "[V12, HV]"))
    across = HV - 12.0
    result = check(text)
    assert [facts(f) for f in of(result, "mains.bleeder")] == [
        finding("mains.bleeder", "warning", text, "C50: |{kind", "parts.C50",
                f"C50 (100 uF) holds 150 V ({energy(100e-6):.4g} J) with no bleeder resistor across it: it "
                "stays charged after switch-off",
                {"voltage": (HV, "V"), "stored energy": (pytest.approx(energy(100e-6)), "J")}),
        finding("mains.bleeder", "warning", text, "C51: |{kind", "parts.C51",
                f"C51 (47 uF) holds {across:.4g} V ({energy(47e-6, across) * 1e3:.4g} mJ) with no bleeder "
                "resistor across it: it stays charged after switch-off",
                {"voltage": (across, "V"), "stored energy": (pytest.approx(energy(47e-6, across)), "J")}),
    ]
    assert sheet_rows(result, "mains.bleeder") == [
        ("mains", "C50", "stored energy", pytest.approx(energy(100e-6)), "J", "", ""),
        ("mains", "C51", "stored energy", pytest.approx(energy(47e-6, across)), "J", "", ""),
    ]


@pytest.mark.parametrize(("value", "bulk"), [("1 uF", True), ("990 nF", False)])
def test_bulk_capacitor_from_one_microfarad(clean_text, value, bulk):
    # bulk_min 1 µF (common practice): smaller ones hold too little charge to matter here
    text = hv_plan(clean_text, cap("C50", value))
    assert [f["path"] for f in found(text, "mains.bleeder")] == (["parts.C50"] if bulk else [])


@pytest.mark.parametrize(("volts", "charged"), [("60 V", False), ("61 V", True)])
def test_bleeder_only_above_the_dc_limit(clean_text, volts, charged):
    # IEC 62368-1 ES1 (from memory): 60 V DC
    text = hv_plan(clean_text, cap("C50"), volts)
    result = check(text)
    v = float(volts.split()[0])
    assert [f["values"] for f in found(text, "mains.bleeder")] == (
        [{"voltage": (v, "V"), "stored energy": (pytest.approx(energy(100e-6, v)), "J")}] if charged else [])
    assert sheet_of(result, "mains.bleeder") == (
        {"stored energy": (pytest.approx(energy(100e-6, v)), "J")} if charged else {})


def test_slow_bleeder_through_two_resistors(clean_text):
    # two 20 MΩ in parallel: 10 MΩ; t = RC·ln(V0/V_limit) = 10 MΩ x 100 µF x ln(150/60)
    ohms = 1 / (1 / 20e6 + 1 / 20e6)
    t = ohms * 100e-6 * math.log(HV / 60)
    text = hv_plan(clean_text, cap("C50") + res("R50", "20 Mohm") + res("R51", "20 Mohm"))
    result = check(text)
    assert [facts(f) for f in of(result, "mains.bleeder")] == [finding(
        "mains.bleeder", "warning", text, "R50: {kind: resistor, value: |20 Mohm", "parts.R50.value",
        f"C50 takes {t:.4g} s to fall below 60 V through R50 ({ohms / 1e6:.4g} MΩ); keep it under 60 s",
        {"voltage": (HV, "V"), "stored energy": (pytest.approx(energy(100e-6)), "J"),
         "discharge time": (pytest.approx(t), "s")},
    )]
    assert sheet_rows(result, "mains.bleeder") == [
        ("mains", "C50", "stored energy", pytest.approx(energy(100e-6)), "J", "", ""),
        ("mains", "C50", "time to fall below 60 V", pytest.approx(t), "s", "", ""),
    ]


@pytest.mark.parametrize("kohms", [650, 660])
def test_bleeder_at_the_one_minute_limit(clean_text, kohms):
    # common practice: safe within about a minute; R·C·ln(150/60) = 60 s at R = 654.8 kΩ
    t = kohms * 1e3 * 100e-6 * math.log(HV / 60)
    assert (t > 60) == (kohms == 660)
    text = hv_plan(clean_text, cap("C50") + res("R50", f"{kohms} kohm", "1 W"))
    result = check(text)
    assert [f["message"] for f in found(text, "mains.bleeder")] == (
        [f"C50 takes {t:.4g} s to fall below 60 V through R50 ({kohms} kΩ); keep it under 60 s"]
        if t > 60 else [])
    assert sheet_of(result, "mains.bleeder")["time to fall below 60 V"] == (pytest.approx(t), "s")


@pytest.mark.parametrize(("power", "hot"), [("500 mW", False), ("440 mW", True)])
def test_bleeder_at_half_its_power_rating(clean_text, power, hot):
    # V²/R = 150² / 100 kΩ = 225 mW, at most half the rating (common practice)
    watts = HV**2 / 100e3
    rating = float(power.split()[0]) / 1e3
    assert (watts > 0.5 * rating) == hot
    text = hv_plan(clean_text, cap("C50") + res("R50", "100 kohm", power))
    expected = finding("mains.bleeder", "warning", text, f"power_rating: |{power}", "parts.R50.power_rating",
                       f"bleeder R50 dissipates {watts * 1e3:.4g} mW, {watts / rating:.0%} of its {power} "
                       "rating",
                       {"dissipation": (pytest.approx(watts), "W")})
    assert found(text, "mains.bleeder") == ([expected] if hot else [])


def test_each_bleeder_rated_on_its_own(clean_text):
    # 1 MΩ dissipates 22.5 mW (fine in 1 W); 100 kΩ dissipates 225 mW in 250 mW: 90 %, over half
    text = hv_plan(clean_text, cap("C50") + res("R50", "1 Mohm", "1 W") + res("R51", "100 kohm", "250 mW"))
    watts = HV**2 / 100e3
    assert [f["message"] for f in found(text, "mains.bleeder")] == [
        f"bleeder R51 dissipates {watts * 1e3:.4g} mW, {watts / 0.25:.0%} of its 250 mW rating"]


def test_bleeder_settings(clean_text):
    text = hv_plan(clean_text, cap("C50") + res("R50", "10 Mohm", "250 mW"))
    t = 10e6 * 100e-6 * math.log(HV / 60)  # 916 s
    watts = HV**2 / 10e6  # 2.25 mW
    assert [f["values"].get("discharge time") for f in found(text, "mains.bleeder")] == [
        (pytest.approx(t), "s")]
    # a longer allowed time, a smaller power share (2.25 mW is over 0.5 % of 250 mW)
    settings = Settings(rule_settings={"mains.bleeder": {"discharge_time": 1000.0, "power_share": 0.005}})
    assert [f["message"] for f in found(text, "mains.bleeder", settings)] == [
        f"bleeder R50 dissipates {watts * 1e3:.4g} mW, {watts / 0.25:.0%} of its 250 mW rating"]
    # a larger least bulk capacitance passes the 100 µF over
    settings = Settings(rule_settings={"mains.bleeder": {"bulk_min": 200e-6}})
    assert found(text, "mains.bleeder", settings) == []


def test_bleeder_against_the_selv_dc_limit(clean_text):
    # SELV (IEC 61140): 120 V DC; the time is to 120 V now: 10 MΩ x 100 µF x ln(150/120)
    settings = Settings(rule_settings={"mains.hazard": {"limit_dc": 120.0}})
    text = hv_plan(clean_text, cap("C50") + res("R50", "10 Mohm"))
    t = 10e6 * 100e-6 * math.log(HV / 120)
    assert [f["message"] for f in found(text, "mains.bleeder", settings)] == [
        f"C50 takes {t:.4g} s to fall below 120 V through R50 (10 MΩ); keep it under 60 s"]
    # and at 150 V the capacitor is not above it
    assert found(text, "mains.bleeder", Settings(rule_settings={"mains.hazard": {"limit_dc": 150.0}})) == []


def test_bleeder_with_no_dc_limit_reports_only_the_missing_bleeders(clean_text):
    # a limit of 0 V makes every charged bulk capacitor count; a bleeder then cannot bring it "below"
    # 0 V in any time, so only the capacitors without one are reported: C30 (12 V) has one, C31 (6 V)
    # and the output coupling C20 (half of 12 V) do not
    text = edited(clean_text, "  C31: {kind: capacitor",
                  "  R59: {kind: resistor, value: 10 kohm, ends: [V12, GND]}\n  C31: {kind: capacitor")
    settings = Settings(rule_settings={"mains.hazard": {"limit_dc": 0.0}})
    result = check(text, settings=settings)
    assert [f.location.path for f in of(result, "mains.bleeder")] == ["parts.C31", "parts.C20"]
    assert [f.rule for f in result.findings if f.rule.startswith("internal")] == []


@pytest.mark.parametrize("volts", ["0 V", "-230 V"])
def test_mains_voltage_that_is_no_mains_voltage(volts):
    text = edited(MAINS, "    voltage: 230 V\n", f"    voltage: {volts}\n")
    assert found(text, "mains.ratings-declared") == [finding(
        "mains.ratings-declared", "warning", text, f"voltage: |{volts}", "supply.mains.voltage",
        f"mains voltage {volts} is not a mains voltage (state the rms value, e.g. '230 V')")]
    # neither the primary nor its fuse is sized from it
    assert found(text, "mains.transformer-primary") == []
    assert [f["message"] for f in found(text, "mains.primary-fuse")] == [
        "the mains primary has no fuse (supply.mains.primary_fuse): a fault in the transformer or its wiring "
        "is then limited only by the building's circuit breaker"]
    assert sheet_of(check(text), "mains.primary-fuse") == {}


def test_parts_without_a_value_are_passed_over(clean_text):
    # a capacitor of no stated value is not judged, and a resistor of no stated value is no bleeder; the
    # capacitor after them still is: ½ x 10 µF x 150² = 112.5 mJ
    no_value = "  C49: {kind: capacitor, dielectric: electrolytic, ends: [HV, GND], positive: HV}\n"
    text = hv_plan(clean_text, no_value + cap("C50", "10 uF") + "  R50: {kind: resistor, ends: [HV, GND]}\n")
    assert found(text, "mains.bleeder") == [finding(
        "mains.bleeder", "warning", text, "C50: |{kind", "parts.C50",
        f"C50 (10 uF) holds 150 V ({energy(10e-6) * 1e3:.4g} mJ) with no bleeder resistor across it: it "
        "stays charged after switch-off",
        {"voltage": (HV, "V"), "stored energy": (pytest.approx(energy(10e-6)), "J")})]
